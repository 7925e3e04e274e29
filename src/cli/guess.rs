//! `orthoepy guess`: N-best pronunciations of words from a trained model.

use anyhow::Context;
use orthoepy::g2p::{Guess, Model};
use std::io::BufRead;
use std::path::PathBuf;
use std::process::ExitCode;

/// Output formats of `guess`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum GuessFormat {
    /// word, rank, phones, posterior, alignment — tab-separated, one hypothesis a line.
    Tsv,
    /// One JSON array of guesses with hypotheses, posteriors, alignments and warnings.
    Json,
}

/// Guess pronunciations with a trained model. Words come from the command line, or one a
/// line from standard input when none are given or the only word is `-`.
///
/// Example: orthoepy guess model.g2p quayside ferryman --nbest 3 --format json
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The model file written by `orthoepy train`.
    model: PathBuf,
    /// Words to guess (`-` or none: read standard input).
    words: Vec<String>,
    /// Hypotheses per word.
    #[arg(long, value_name = "N", default_value_t = 5)]
    nbest: usize,
    /// Output format.
    #[arg(long, value_enum, default_value = "tsv")]
    format: GuessFormat,
}

/// The TSV lines of one guess: `word rank phones posterior alignment`; the alignment is
/// `letters:phones` pieces joined by `|` (phones joined by `_`).
fn tsv_lines(guess: &Guess) -> Vec<String> {
    guess
        .hypotheses
        .iter()
        .enumerate()
        .map(|(rank, h)| {
            let alignment: Vec<String> = h.alignment.iter().map(|p| format!("{}:{}", p.letters, p.phones.join("_"))).collect();
            format!("{}\t{}\t{}\t{:.4}\t{}", guess.word, rank + 1, h.phones.join(" "), h.posterior, alignment.join("|"))
        })
        .collect()
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let model = Model::load(&args.model).context("cannot load the model")?;
    let words: Vec<String> = if args.words.is_empty() || args.words == ["-"] {
        std::io::stdin().lock().lines().collect::<Result<Vec<_>, _>>().context("cannot read words from standard input")?
    } else {
        args.words
    };
    let guesses: Vec<Guess> = words.iter().map(|w| w.trim()).filter(|w| !w.is_empty()).map(|w| model.guess(w, args.nbest)).collect();
    for g in &guesses {
        for w in &g.warnings {
            eprintln!("warning: {}: {w}", g.word);
        }
    }
    match args.format {
        GuessFormat::Json => super::print_json(&guesses)?,
        GuessFormat::Tsv => guesses.iter().flat_map(tsv_lines).for_each(|l| println!("{l}")),
    }
    Ok(ExitCode::SUCCESS)
}
