//! `orthoepy train`: trains a joint-sequence G2P model from a lexicon and writes the model file,
//! with the calibration of the hybrid guesser's rule-based sources when the phoneset is known.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::g2p::{train_with_sources, training_pairs, LetterUnit, RuleSources, SymbolOptions, TrainOptions};
use orthoepy::workspace::language_parts;
use std::path::PathBuf;
use std::process::ExitCode;

/// Train a grapheme-to-phoneme model (joint-sequence graphone n-gram) from imported and
/// accepted entries of a lexicon.
///
/// Inside a project (or with --phoneset) the words held out to calibrate the model's scores
/// also calibrate the hybrid guesser's other sources (initialisms, compounds, derivations,
/// letter-to-sound rules), stored with the model.
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
    /// The lexicon's phoneset (a shipped id or a file; default: the project's). Without one
    /// outside a project, the guesser's other sources are not calibrated.
    #[arg(long, value_name = "PHONESET")]
    phoneset: Option<String>,
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
    // The guesser's sources are calibrated in the phoneset the lexicon is written in, with the
    // project's language configuration and rules (outside a project: the shipped ones).
    let phoneset = match (&args.phoneset, &project) {
        (None, None) => None,
        (explicit, _) => Some(super::resolve_phoneset(explicit.as_deref(), project.as_ref())?),
    };
    let parts = match (&phoneset, &project) {
        (Some(set), Some(p)) => Some(language_parts(p.letter_to_sound.as_deref(), set)?),
        (Some(set), None) => Some(language_parts(LetterToSoundRules::shipped_for_phoneset(set.id()), set)?),
        (None, _) => None,
    };
    let sources = match (&phoneset, &parts) {
        (Some(phoneset), Some((config, rules))) => Some(RuleSources { phoneset, config, rules: rules.as_ref() }),
        _ => None,
    };
    let opts = TrainOptions { phoneset_id: phoneset.as_ref().map(|p| p.id().to_string()).unwrap_or(opts.phoneset_id), ..opts };
    let pairs = training_pairs(lexicon.entries());
    let bar = if args.quiet { indicatif::ProgressBar::hidden() } else { super::progress_bar_with_status(opts.order as u64, "training") };
    let start = std::time::Instant::now();
    let model = train_with_sources(&pairs, &opts, sources.as_ref(), &mut |p| {
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
        match model.source_calibration() {
            Some(fitted) => {
                let fits: Vec<String> = fitted.fits().iter().map(|f| format!("{} ({})", f.source, f.observations)).collect();
                eprintln!("calibrated on held-out words: {}", fits.join(", "));
            }
            None if sources.is_none() => eprintln!("note: no phoneset known (no project, no --phoneset): the guesser's other sources keep their configured scores"),
            None => eprintln!("note: too few held-out candidates: the guesser's other sources keep their configured scores"),
        }
    }
    Ok(ExitCode::SUCCESS)
}
