//! `orthoepy apply`: merge the journal's decisions into the lexicon.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::lexicon::Lexicon;
use orthoepy::queue::{apply_decisions, Journal, Ledger, Outcome, Queue, Record};
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
        Outcome::Unchanged { word, reason } => format!("unchanged {word}: {reason}"),
        Outcome::Conflict { word, reason, .. } => format!("CONFLICT  {word}: {reason}"),
    }
}

/// Run `orthoepy apply`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    // A dry run only reads; a real one writes the lexicon and the journal, one writer at a time.
    let lock = if args.dry_run { None } else { Some(super::lock_project(&project, "apply")?) };
    let mut lexicon = Lexicon::load(&project.lexicon, project.headword_policy()).context("cannot load the lexicon")?;
    let queue = Queue::load(&project.queue).context("cannot read the queue")?;
    // Opened for writing (which keeps a torn last line aside) only under the lock.
    let (ledger, warnings, journal) = if lock.is_some() {
        let (journal, warnings) = Journal::open(&project.journal).context("cannot open the journal")?;
        (Ledger::replay(journal.records()), warnings, Some(journal))
    } else {
        let (records, warnings) = Journal::read(&project.journal).context("cannot read the journal")?;
        (Ledger::replay(&records), warnings, None)
    };
    for w in &warnings {
        eprintln!("warning: {w}");
    }
    let report = apply_decisions(&mut lexicon, &queue, &ledger);
    match args.format {
        DataFormat::Json => print_json(&report)?,
        DataFormat::Text => {
            for o in &report.outcomes {
                println!("{}", describe(o));
            }
        }
    }
    if report.has_conflicts() && !args.skip_conflicts {
        eprintln!("refused: the lexicon contradicts some decisions (see CONFLICT above); nothing was changed. \
                   Review those items again, or pass --skip-conflicts to merge the rest.");
        return Ok(ExitCode::from(1));
    }
    let Some(mut journal) = journal else {
        eprintln!("dry run: nothing was changed");
        return Ok(ExitCode::SUCCESS);
    };
    if report.changed() {
        lexicon.save().context("cannot save the lexicon (nothing was marked applied; run apply again)")?;
    }
    // Withdraw the conflicting decisions before marking the journal, so a crash in between
    // leaves them open (the next apply sees them again) rather than marked as merged.
    let reopened = report.conflicts();
    for &seq in &reopened {
        journal.append(Record::Revoke { seq }).context("cannot reopen a conflicting decision")?;
    }
    if report.through > ledger.applied_through() {
        journal.append(Record::Applied { through: report.through }).context("cannot mark the journal applied")?;
    }
    let merged = report.outcomes.iter().filter(|o| matches!(o, Outcome::Added { .. } | Outcome::Replaced { .. })).count();
    eprintln!("merged {merged} decision(s) into {}", project.lexicon.display());
    if !reopened.is_empty() {
        eprintln!("{} conflicting item(s) are back in the review queue", reopened.len());
    }
    drop(lock);
    Ok(ExitCode::SUCCESS)
}
