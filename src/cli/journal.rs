//! `orthoepy journal`: check a project's review journal, and move a damaged tail aside.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::project::Project;
use orthoepy::queue::{check_journal, repair_journal, JournalReport, ProblemKind};
use std::io::{BufRead, IsTerminal, Write};
use std::process::ExitCode;

/// Check the review journal, or repair a damaged one.
///
/// `check` reads the journal and reports its records and every bad line; it changes nothing
/// (exit 0 clean, 1 damaged). `repair` asks, then moves everything from the first bad line on
/// into a side file beside the journal (NAME.damaged-TIME, or NAME.torn-TIME for a write cut
/// short) and keeps the good records before it. No decision is deleted: the side file holds
/// the moved lines exactly; review those items again.
///
/// Examples:
///   orthoepy journal check
///   orthoepy journal repair --yes
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    #[command(subcommand)]
    action: JournalAction,
    #[command(flatten)]
    project: ProjectArgs,
}

#[derive(Debug, clap::Subcommand)]
enum JournalAction {
    /// Report the journal's records and every bad line (exit 0 clean, 1 damaged).
    Check(CheckArgs),
    /// Move the damaged tail into a side file, keeping the good records before it.
    Repair(RepairArgs),
}

#[derive(Debug, clap::Args)]
struct CheckArgs {
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
}

#[derive(Debug, clap::Args)]
struct RepairArgs {
    /// Do not ask for confirmation (needed when standard input is not a terminal).
    #[arg(long)]
    yes: bool,
}

/// Run `orthoepy journal`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    match args.action {
        JournalAction::Check(a) => check(&project, a.format),
        JournalAction::Repair(a) => repair(&project, a.yes),
    }
}

fn check(project: &Project, format: DataFormat) -> anyhow::Result<ExitCode> {
    let report = check_journal(&project.journal).context("cannot check the journal")?;
    match format {
        DataFormat::Json => print_json(&report)?,
        DataFormat::Text => print_report(&report),
    }
    Ok(if report.is_clean() { ExitCode::SUCCESS } else { ExitCode::from(1) })
}

fn print_report(r: &JournalReport) {
    let path = r.path.display();
    if !r.exists {
        println!("{path}: no journal yet (nothing has been decided)");
        return;
    }
    println!(
        "{path}: {} good record(s), last sequence number {}, applied through {}, {} decision(s) waiting for `orthoepy apply`",
        r.records, r.last_seq, r.applied_through, r.pending
    );
    for p in &r.problems {
        let kind = match p.kind {
            ProblemKind::Torn => "torn",
            ProblemKind::Damaged => "damaged",
        };
        println!("{path}:{}: {kind}: {}", p.line, p.message);
    }
    if r.unlisted_problems > 0 {
        println!("... and {} more bad line(s)", r.unlisted_problems);
    }
    match &r.tail {
        None => println!("the journal is clean"),
        Some(t) if t.kind == ProblemKind::Torn => println!(
            "the last line is a write cut short (never confirmed); the next command that writes the journal \
             moves it into a side file, or run `orthoepy journal repair`"
        ),
        Some(t) => println!(
            "damaged from line {} on: {} line(s), {} byte(s), {} of them whole records. `orthoepy journal repair` \
             moves them into a side file and keeps the {} good record(s) before line {}",
            t.from_line, t.lines, t.bytes, t.records, r.records, t.from_line
        ),
    }
}

fn repair(project: &Project, yes: bool) -> anyhow::Result<ExitCode> {
    let lock = super::lock_project(project, "journal repair")?;
    let report = check_journal(&project.journal).context("cannot check the journal")?;
    print_report(&report);
    let Some(tail) = &report.tail else {
        return Ok(ExitCode::SUCCESS);
    };
    if !yes {
        anyhow::ensure!(
            std::io::stdin().is_terminal(),
            "not repairing without confirmation, and standard input is not a terminal; pass --yes to move the tail aside"
        );
        eprint!(
            "Move lines {}-{} of {} into a side file beside it? [y/N] ",
            tail.from_line,
            tail.from_line + tail.lines - 1,
            report.path.display()
        );
        std::io::stderr().flush().context("cannot write the question")?;
        let mut answer = String::new();
        std::io::stdin().lock().read_line(&mut answer).context("cannot read the answer")?;
        if !matches!(answer.trim().to_lowercase().as_str(), "y" | "yes") {
            eprintln!("nothing was changed");
            return Ok(ExitCode::from(1));
        }
    }
    match repair_journal(&project.journal, &report).context("cannot repair the journal")? {
        Some(done) => println!(
            "moved line(s) {}-{} ({} byte(s), {} whole record(s)) to {}; the journal keeps {} good record(s). \
             Decisions in the side file are not applied: review those items again",
            done.moved.from_line,
            done.moved.from_line + done.moved.lines - 1,
            done.moved.bytes,
            done.moved.records,
            done.side_file.display(),
            done.kept_records
        ),
        None => println!("nothing to repair"),
    }
    lock.release().context("cannot remove the project lock")?;
    Ok(ExitCode::SUCCESS)
}
