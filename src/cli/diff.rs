//! `orthoepy diff`: the pronunciations added, removed and changed between two lexicon files.

use super::{DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::diff::{alignment_text, diff_entries, Change};
use orthoepy::lexicon::Lexicon;
use std::path::PathBuf;
use std::process::ExitCode;

/// Compare two versions of a lexicon, word by word.
///
/// Lines start with `+` (pronunciation added), `-` (removed) or `~` (changed, with the phone
/// alignment: `EY1>AA1` substituted, `-T` deleted, `+T` inserted). Exit status 0 when the
/// pronunciations are equal, 1 when they differ, 2 on error (as the standard diff tools do).
///
/// Examples:
///   orthoepy diff lexicon.csv.bak lexicon.csv
///   orthoepy diff old.csv new.csv --format json
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The old CSV store.
    old: PathBuf,
    /// The new CSV store.
    new: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let policy = args.project.find()?.as_ref().map(orthoepy::project::Project::headword_policy).unwrap_or_default();
    let old = Lexicon::load(&args.old, policy).with_context(|| "cannot load the old lexicon".to_string())?;
    let new = Lexicon::load(&args.new, policy).with_context(|| "cannot load the new lexicon".to_string())?;
    let diff = diff_entries(old.entries(), new.entries(), &policy);
    match args.format {
        DataFormat::Json => super::print_json(&diff)?,
        DataFormat::Text => {
            for word in &diff {
                for change in &word.changes {
                    match change {
                        Change::Added { new } => println!("+ {}\t{new}", word.word),
                        Change::Removed { old } => println!("- {}\t{old}", word.word),
                        Change::Changed { old, new, alignment } => {
                            println!("~ {}\t{old}\t{new}\t{}", word.word, alignment_text(alignment))
                        }
                    }
                }
            }
        }
    }
    Ok(if diff.is_empty() { ExitCode::SUCCESS } else { ExitCode::from(1) })
}
