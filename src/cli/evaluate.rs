//! `orthoepy evaluate`: PER/WER of a model on a held-out lexicon, and how well the scores of the
//! model and of the hybrid guesser's other sources are calibrated.

use super::DataFormat;
use anyhow::Context;
use orthoepy::eval::{evaluate_model, evaluate_sources, Evaluation};
use orthoepy::g2p::hybrid::HybridGuesser;
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::g2p::{training_pairs, Model};
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::workspace::language_parts;
use std::path::PathBuf;
use std::process::ExitCode;

/// Score a model on a test store: word and phone error rates with and without stress, a
/// breakdown by word length, the most frequent phone confusions, and a reliability table of
/// the top guess's score with the expected calibration error. Then the same for every
/// candidate of the hybrid guesser's other sources (initialisms, compounds, derivations,
/// letter-to-sound rules; the shipped language configuration and rules of the phoneset), one
/// line per source, looking stems and compound parts up in --lexicon (e.g. the training store).
///
/// Examples:
///   orthoepy evaluate model.g2p test.csv --format json
///   orthoepy evaluate model.g2p test.csv --lexicon train.csv --errors
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The model file written by `orthoepy train`.
    model: PathBuf,
    /// The test store (CSV), e.g. written by `orthoepy split`.
    test: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    /// Also list every wrongly guessed word with its references and the guess.
    #[arg(long)]
    errors: bool,
    /// Worker threads (default: one per core).
    #[arg(long, value_name = "T", default_value_t = 0)]
    threads: usize,
    /// The store the guesser's compounds and derivations look words up in (default: none, so
    /// only initialisms and the rules are scored).
    #[arg(long, value_name = "STORE")]
    lexicon: Option<PathBuf>,
    /// The phoneset of the references (a shipped id or a file; default: the model's, when it is
    /// a shipped id).
    #[arg(long, value_name = "PHONESET")]
    phoneset: Option<String>,
}

fn print_text(e: &Evaluation, errors: bool) {
    for (label, r) in [("with stress", &e.stressed), ("without stress", &e.unstressed)] {
        println!("{label:<15} WER {:6.2}%  PER {:6.2}%  ({} words, {} reference phones)", 100.0 * r.wer, 100.0 * r.per, r.words, r.reference_phones);
    }
    println!("\nby word length (letters, with stress):");
    for b in &e.by_length {
        println!("  {:>3}{}  {:>6} words  WER {:6.2}%  PER {:6.2}%", b.letters, if b.letters >= 15 { "+" } else { " " }, b.rates.words, 100.0 * b.rates.wer, 100.0 * b.rates.per);
    }
    println!("\nmost frequent confusions (reference → hypothesis):");
    for c in &e.confusions {
        let side = |s: &Option<String>| s.clone().unwrap_or_else(|| "—".to_string());
        println!("  {:>6}  {} → {}", c.count, side(&c.reference), side(&c.hypothesis));
    }
    if let Some(r) = &e.calibration {
        println!("\nreliability of the top guess's score (stress as written):");
        println!("  {:>9}  {:>7}  {:>10}  {:>11}", "score", "words", "mean score", "share right");
        for b in &r.bins {
            println!("  {:.1}–{:.1}  {:>7}  {:>10.4}  {:>11.4}", b.from, b.to, b.count, b.mean_score, b.share_right);
        }
        println!("  expected calibration error {:.4}", r.expected_calibration_error);
    }
    if !e.sources.is_empty() {
        println!("\nreliability of the other sources (every candidate; score fitted with the model, or configured):");
        println!("  {:<11} {:>10}  {:>10}  {:>11}  {:>7}  {:<10}", "source", "candidates", "mean score", "share right", "ECE", "score");
        for s in &e.sources {
            let from = if s.fitted { "fitted" } else { "configured" };
            println!(
                "  {:<11} {:>10}  {:>10.4}  {:>11.4}  {:>7.4}  {from}",
                s.source, s.candidates, s.mean_score, s.share_right, s.reliability.expected_calibration_error
            );
        }
    }
    if errors {
        println!("\nwrong words ({}; word, phone edits, guess, then the references):", e.errors.len());
        for w in &e.errors {
            println!("  {}\t{}\tguess {}\treference {}", w.word, w.phone_errors, w.hypothesis, w.references.join(" | "));
        }
    }
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let model = Model::load(&args.model).context("cannot load the model")?;
    let lexicon = Lexicon::load(&args.test, HeadwordPolicy::default()).context("cannot load the test store")?;
    let pairs = training_pairs(lexicon.entries());
    let pool = rayon::ThreadPoolBuilder::new().num_threads(args.threads).build().context("cannot start worker threads")?;
    let mut evaluation = pool.install(|| evaluate_model(&model, &pairs));
    let phoneset = match &args.phoneset {
        Some(spec) => Some(super::resolve_phoneset(Some(spec), None)?),
        None => Phoneset::shipped(model.phoneset_id()).ok(),
    };
    match phoneset.as_ref().and_then(|set| LetterToSoundRules::shipped_for_phoneset(set.id()).map(|id| (set, id))) {
        Some((set, id)) => {
            let (config, rules) = language_parts(Some(id), set)?;
            let policy = HeadwordPolicy::default();
            let lexicon = match &args.lexicon {
                Some(path) => Lexicon::load(path, policy).context("cannot load the guesser's lexicon")?,
                None => Lexicon::from_entries(Vec::new(), policy),
            };
            let index = lexicon.index();
            let mut guesser = HybridGuesser::new(&lexicon, &index, set, &config).with_model(&model);
            if let Some(rules) = &rules {
                guesser = guesser.with_rules(rules);
            }
            evaluation.sources = evaluate_sources(&guesser, &pairs, model.symbol_options());
        }
        None => eprintln!(
            "note: the model's phoneset `{}` has no shipped language configuration; pass --phoneset to score the guesser's other sources",
            model.phoneset_id()
        ),
    }
    if !args.errors {
        evaluation.errors.clear();
    }
    match args.format {
        DataFormat::Json => super::print_json(&evaluation)?,
        DataFormat::Text => print_text(&evaluation, args.errors),
    }
    Ok(ExitCode::SUCCESS)
}
