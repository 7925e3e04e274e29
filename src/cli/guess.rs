//! `orthoepy guess`: pronunciations of words from a trained model, from a shipped
//! letter-to-sound rule set (`--rules LANG`), or — inside a project with a lexicon — from the
//! hybrid guesser (initialisms, compounds, derivations, then the model or the project's rules).

use super::DataFormat;
use anyhow::Context;
use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig, Proposal};
use orthoepy::g2p::lts::{LetterToSoundRules, SHIPPED};
use orthoepy::g2p::{Guess, Model};
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::project::Project;
use orthoepy::workspace::Workspace;
use std::io::BufRead;
use std::path::PathBuf;
use std::process::ExitCode;

/// Guess pronunciations for new words (model N-best, letter-to-sound rules, or the hybrid).
///
/// Words come from the command line, or one a line from standard input when none are given or
/// the only word is `-`.
///
/// With MODEL only: the model's N-best list. With `--rules LANG`: a shipped letter-to-sound rule
/// set (`en`, `es`; no model argument) with its language's initialisms, no lexicon. Inside a project whose orthoepy.toml names a
/// lexicon: the hybrid guesser over that lexicon, with MODEL (or the project's model), else
/// the project's letter-to-sound rules. Scores are calibrated probabilities in 0..1.
///
/// Examples: orthoepy guess model.g2p quayside ferryman --nbest 3 --format json
///           orthoepy guess --rules es muelle embarcadero
///           orthoepy guess --project harbour-lexicon ferryboats
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The model file written by `orthoepy train` (leave out with --rules, or to use the project's).
    model: Option<PathBuf>,
    /// Words to guess (`-` or none: read standard input).
    words: Vec<String>,
    /// Guess with the shipped letter-to-sound rules of this language alone (en, es).
    #[arg(long, value_name = "LANG")]
    rules: Option<String>,
    /// Hypotheses per word.
    #[arg(long, value_name = "N", default_value_t = 5)]
    nbest: usize,
    /// Output format: text is tab-separated, one candidate a line (`word rank phones score
    /// alignment-or-sources`).
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: super::ProjectArgs,
}

/// The TSV lines of one model guess: `word rank phones posterior alignment`; the alignment is
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

/// Candidates of one word for the rules and hybrid paths.
#[derive(Debug, serde::Serialize)]
struct WordCandidates {
    word: String,
    candidates: Vec<Proposal>,
}

/// The TSV lines of one word's candidates: `word rank phones score sources` (sources joined by `,`).
fn candidate_lines(word: &WordCandidates) -> Vec<String> {
    word.candidates
        .iter()
        .enumerate()
        .map(|(rank, c)| {
            let sources: Vec<String> = c.sources.iter().map(ToString::to_string).collect();
            format!("{}\t{}\t{}\t{:.4}\t{}", word.word, rank + 1, c.pronunciation, c.score, sources.join(","))
        })
        .collect()
}

/// Prints the candidates, and each word's warnings once on standard error.
fn print_candidates(all: &[WordCandidates], format: DataFormat) -> anyhow::Result<()> {
    for word in all {
        let mut said: Vec<&str> = Vec::new();
        for w in word.candidates.iter().flat_map(|c| &c.warnings) {
            if !said.contains(&w.as_str()) {
                eprintln!("warning: {}: {w}", word.word);
                said.push(w);
            }
        }
    }
    match format {
        DataFormat::Json => super::print_json(&all)?,
        DataFormat::Text => all.iter().flat_map(candidate_lines).for_each(|l| println!("{l}")),
    }
    Ok(())
}

/// `--rules LANG`: the shipped rule set with its language configuration and no lexicon (so
/// initialisms are spelled out as in a project, and nothing else is looked up), in the phoneset
/// the rules are written for.
fn with_rules(lang: &str, words: &[String], args: &Args) -> anyhow::Result<ExitCode> {
    let Some((_, phoneset_id)) = SHIPPED.iter().find(|(id, _)| *id == lang) else {
        let known: Vec<&str> = SHIPPED.iter().map(|(id, _)| *id).collect();
        anyhow::bail!("no shipped letter-to-sound rules for `{lang}`; choose one of: {}", known.join(", "));
    };
    let phoneset = Phoneset::shipped(phoneset_id)?;
    let rules = LetterToSoundRules::shipped(lang, &phoneset)?;
    let config = LanguageConfig::shipped(lang, &phoneset)?;
    let lexicon = Lexicon::from_entries(Vec::new(), HeadwordPolicy::default());
    let index = lexicon.index();
    let guesser = HybridGuesser::new(&lexicon, &index, &phoneset, &config).with_rules(&rules);
    let mut all = Vec::with_capacity(words.len());
    for word in words {
        rules.transcribe(word).with_context(|| format!("cannot transcribe `{word}`"))?;
        all.push(WordCandidates { word: word.clone(), candidates: guesser.guess(word, args.nbest) });
    }
    print_candidates(&all, args.format)?;
    Ok(ExitCode::SUCCESS)
}

/// The project's guesser (see [`Workspace::guess`]), with MODEL instead of the project's model
/// when one is given.
fn with_project(project: Project, model: Option<PathBuf>, words: &[String], args: &Args) -> anyhow::Result<ExitCode> {
    let model = model.or_else(|| project.model.clone());
    let workspace = Workspace::open_with_model(project, model.as_deref())?;
    let all: Vec<WordCandidates> =
        words.iter().map(|w| WordCandidates { word: w.clone(), candidates: workspace.guess(w, args.nbest) }).collect();
    print_candidates(&all, args.format)?;
    Ok(ExitCode::SUCCESS)
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let mut positional: Vec<String> = args.model.iter().map(|p| p.display().to_string()).chain(args.words.iter().cloned()).collect();
    let read_stdin = positional.is_empty() || positional == ["-"];
    let read_words = |rest: Vec<String>| -> anyhow::Result<Vec<String>> {
        let words = if rest.is_empty() || rest == ["-"] {
            std::io::stdin().lock().lines().collect::<Result<Vec<_>, _>>().context("cannot read words from standard input")?
        } else {
            rest
        };
        Ok(words.iter().map(|w| w.trim().to_string()).filter(|w| !w.is_empty()).collect())
    };
    if let Some(lang) = &args.rules {
        let words = read_words(if read_stdin { Vec::new() } else { positional })?;
        return with_rules(lang, &words, &args);
    }
    if let Some(project) = args.project.find()? {
        // Inside a project the first argument is a model only if it is an existing file; one
        // named like a model file that does not exist is a mistake, not a word to guess.
        let model = match positional.first() {
            Some(first) if std::path::Path::new(first).is_file() => Some(PathBuf::from(positional.remove(0))),
            Some(first) if first.to_lowercase().ends_with(".g2p") => {
                anyhow::bail!("no model file {first}; name an existing model, or leave it out to use the project's")
            }
            _ => None,
        };
        let words = read_words(positional)?;
        return with_project(project, model, &words, &args);
    }
    let Some(model_path) = args.model.clone() else {
        anyhow::bail!("no model given and no orthoepy.toml found; name a MODEL file, pass --project DIR, or use --rules LANG");
    };
    let model = Model::load(&model_path).context("cannot load the model")?;
    let words = read_words(args.words.clone())?;
    let guesses: Vec<Guess> = words.iter().map(|w| model.guess(w, args.nbest)).collect();
    for g in &guesses {
        for w in &g.warnings {
            eprintln!("warning: {}: {w}", g.word);
        }
    }
    match args.format {
        DataFormat::Json => super::print_json(&guesses)?,
        DataFormat::Text => guesses.iter().flat_map(tsv_lines).for_each(|l| println!("{l}")),
    }
    Ok(ExitCode::SUCCESS)
}
