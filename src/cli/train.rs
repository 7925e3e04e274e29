//! `orthoepy train`: trains a joint-sequence G2P model from a lexicon and writes the model file.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::g2p::{train, training_pairs, LetterUnit, SymbolOptions, TrainOptions};
use std::path::PathBuf;
use std::process::ExitCode;

/// Train a grapheme-to-phoneme model (joint-sequence graphone n-gram) from imported and
/// accepted entries of a lexicon.
///
/// Example: orthoepy train lexicon.csv -o model.g2p --order 8 --threads 2
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Model file to write (default: the project's model).
    #[arg(short = 'o', long, value_name = "MODEL")]
    output: Option<PathBuf>,
    /// N-gram order over graphones (1..=9).
    #[arg(long, value_name = "N")]
    order: Option<usize>,
    /// Most letters and most phones per graphone (1..=3); `--max-letters` and `--max-phones`
    /// set one side.
    #[arg(long, value_name = "L")]
    graphone_size: Option<usize>,
    /// Most letters per graphone (1..=3; default: the measured best, see BENCHMARKS.md).
    #[arg(long, value_name = "N")]
    max_letters: Option<usize>,
    /// Most phones per graphone (1..=3).
    #[arg(long, value_name = "N")]
    max_phones: Option<usize>,
    /// Worker threads (default: one per core).
    #[arg(long, value_name = "T", default_value_t = 0)]
    threads: usize,
    /// Train on phones with stress marks removed.
    #[arg(long)]
    strip_stress: bool,
    /// Treat extended grapheme clusters, not code points, as letters.
    #[arg(long)]
    grapheme_clusters: bool,
    /// Most EM iterations at each order above 1 (default: the measured best, see
    /// BENCHMARKS.md); an iteration that makes the held-out words less likely is undone.
    #[arg(long, value_name = "N")]
    iterations: Option<usize>,
    /// Percent of training words held out to tune discounts (0..=50).
    #[arg(long, value_name = "P")]
    heldout_percent: Option<u32>,
    /// Print nothing but errors.
    #[arg(long)]
    quiet: bool,
    #[command(flatten)]
    project: ProjectArgs,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let output = match (&args.output, project.as_ref().and_then(|p| p.model.clone())) {
        (Some(o), _) => o.clone(),
        (None, Some(m)) => m,
        (None, None) => anyhow::bail!("no model file given and the project names none; pass -o MODEL"),
    };
    let defaults = TrainOptions::default();
    let opts = TrainOptions {
        order: args.order.unwrap_or(defaults.order),
        max_letters: args.max_letters.or(args.graphone_size).unwrap_or(defaults.max_letters),
        max_phones: args.max_phones.or(args.graphone_size).unwrap_or(defaults.max_phones),
        threads: args.threads,
        heldout_percent: args.heldout_percent.unwrap_or(defaults.heldout_percent),
        iterations: args.iterations.unwrap_or(defaults.iterations),
        symbols: SymbolOptions {
            letter_unit: if args.grapheme_clusters { LetterUnit::GraphemeCluster } else { LetterUnit::CodePoint },
            lowercase: lexicon.policy().fold_case || defaults.symbols.lowercase,
            strip_stress: args.strip_stress,
        },
        phoneset_id: project.as_ref().map(|p| p.phoneset.clone()).unwrap_or_default(),
        ..defaults
    };
    let pairs = training_pairs(lexicon.entries());
    let bar = if args.quiet { indicatif::ProgressBar::hidden() } else { super::progress_bar_with_status(opts.order as u64, "training") };
    let start = std::time::Instant::now();
    let model = train(&pairs, &opts, &mut |p| {
        bar.set_position(p.order as u64 - 1);
        // One line of at most 80 columns: LL is the log-likelihood (natural log, summed).
        let per = p.heldout_per.map(|x| format!(", PER {:.2}%", 100.0 * x)).unwrap_or_default();
        let undone = if p.undone { " (worse: undone)" } else { "" };
        bar.set_message(format!(
            "order {} iter {}: LL {:.0}, held-out LL {:.0}{per}{undone}",
            p.order, p.iteration, p.log_likelihood, p.heldout_log_likelihood
        ));
    })
    .context("training failed")?;
    bar.finish_and_clear();
    model.save(&output).context("cannot write the model")?;
    if !args.quiet {
        eprintln!(
            "trained on {} pronunciations in {:.0} s: order {}, {} graphones, {} n-grams → {}",
            pairs.len(),
            start.elapsed().as_secs_f64(),
            model.order(),
            model.graphone_count(),
            model.ngram_count(),
            output.display()
        );
    }
    Ok(ExitCode::SUCCESS)
}
