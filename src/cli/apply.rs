//! `orthoepy apply`: merge the journal's decisions into the lexicon.

use super::{print_json, DataFormat, ProjectArgs};
use orthoepy::queue::{apply_project, ApplyOptions, ApplyStatus, Outcome};
use std::process::ExitCode;

/// Merge reviewed decisions into the lexicon (atomic save with a .bak), then mark the journal.
///
/// Refuses (exit 1) when the lexicon now contradicts a decision, e.g. a queued new word was
/// added meanwhile with another pronunciation; --skip-conflicts merges the rest and puts the
/// conflicting items back in the review queue (their decisions are withdrawn in the journal).
///
/// Example: orthoepy apply --project demo-copy --dry-run
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// Show what would be merged without changing anything.
    #[arg(long)]
    dry_run: bool,
    /// Merge what does not conflict; the conflicting items go back to review.
    #[arg(long)]
    skip_conflicts: bool,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

fn describe(o: &Outcome) -> String {
    match o {
        Outcome::Added { word, pronunciation } => format!("added     {word} /{pronunciation}/"),
        Outcome::Replaced { word, old, new } => format!("replaced  {word} /{old}/ -> /{new}/"),
        Outcome::Deprecated { word, pronunciation } => format!("deprecated {word} /{pronunciation}/"),
        Outcome::Unchanged { word, reason } => format!("unchanged {word}: {reason}"),
        Outcome::Conflict { word, reason, .. } => format!("CONFLICT  {word}: {reason}"),
        Outcome::Invalid { word, reason, .. } => format!("INVALID   {word}: {reason}"),
    }
}

/// Run `orthoepy apply`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    let options = ApplyOptions { dry_run: args.dry_run, skip_conflicts: args.skip_conflicts };
    // A dry run only reads; a real one writes the lexicon and the journal, one writer at a time.
    let lock = if args.dry_run { None } else { Some(super::lock_project(&project, "apply")?) };
    let run = apply_project(&project, options)?;
    drop(lock);
    for w in &run.warnings {
        eprintln!("warning: {w}");
    }
    match args.format {
        DataFormat::Json => print_json(&run.report)?,
        DataFormat::Text => run.report.outcomes.iter().for_each(|o| println!("{}", describe(o))),
    }
    match run.status {
        ApplyStatus::Refused if run.report.has_invalid() => {
            eprintln!(
                "refused: {}: some decisions are invalid (see INVALID above); nothing was changed. \
                 Review those items again, or pass --skip-conflicts to merge the rest.",
                project.journal.display()
            );
            return Ok(ExitCode::from(2));
        }
        ApplyStatus::Refused => {
            eprintln!(
                "refused: the lexicon contradicts some decisions (see CONFLICT above); nothing was changed. \
                 Review those items again, or pass --skip-conflicts to merge the rest."
            );
            return Ok(ExitCode::from(1));
        }
        ApplyStatus::DryRun => eprintln!("dry run: nothing was changed"),
        ApplyStatus::Applied => {
            eprintln!("merged {} decision(s) into {}", run.merged, project.lexicon.display());
            if run.reopened > 0 {
                eprintln!("{} conflicting item(s) are back in the review queue", run.reopened);
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
