//! `orthoepy split`: deterministic word-level train/test split of a lexicon.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::eval::split_by_word;
use orthoepy::lexicon::Lexicon;
use std::path::PathBuf;
use std::process::ExitCode;

/// Split a lexicon into train and test stores by word, deterministically.
///
/// All variants of a word go to one side, chosen by the FNV-1a hash of the NFC lower-case word:
/// a word is a test word when hash mod 100 is below the test percentage.
///
/// Example: orthoepy split lexicon.csv --test-percent 10 --train train.csv --test test.csv
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Percent of words to put in the test store (0..=100).
    #[arg(long, value_name = "P", value_parser = clap::value_parser!(u32).range(0..=100))]
    test_percent: u32,
    /// Where to write the training entries.
    #[arg(long, value_name = "OUT")]
    train: PathBuf,
    /// Where to write the test entries.
    #[arg(long, value_name = "OUT")]
    test: PathBuf,
    #[command(flatten)]
    project: ProjectArgs,
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (lexicon, _) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let policy = *lexicon.policy();
    let (train, test) = split_by_word(lexicon.entries().to_vec(), |e| e.word.as_str(), args.test_percent);
    let (n_train, n_test) = (train.len(), test.len());
    Lexicon::from_entries(train, policy).save_as(&args.train).context("cannot write the training store")?;
    Lexicon::from_entries(test, policy).save_as(&args.test).context("cannot write the test store")?;
    eprintln!("{n_train} entries → {}, {n_test} entries → {}", args.train.display(), args.test.display());
    Ok(ExitCode::SUCCESS)
}
