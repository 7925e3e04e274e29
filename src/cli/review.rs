//! `orthoepy review`: the review screen over a project's queue and journal.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::project::Project;
use orthoepy::queue::{save_guessed, ReviewFiles, WorkspaceGuesser};
use orthoepy::tui::{self, App, Lookups, PhonesetCheck, Services};
use orthoepy::workspace::Workspace;
use std::io::IsTerminal;
use std::process::ExitCode;
use std::io::Write;
use std::sync::Arc;

/// Review queued items: accept, edit, reject or set aside their candidate pronunciations.
///
/// Every decision is written to the journal (and synced) before the screen moves on; merge
/// the decisions into the lexicon with `orthoepy apply`. Press ? in the screen for the keys.
///
/// Example: orthoepy review --project demo-copy
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// Name written into the note of each decision (default: $USER).
    #[arg(long)]
    reviewer: Option<String>,
    #[command(flatten)]
    project: ProjectArgs,
}

/// Run `orthoepy review`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    open_review(project, args.reviewer)
}

/// Open the review screen on a project and report where the decisions went.
pub fn open_review(project: Project, reviewer: Option<String>) -> anyhow::Result<ExitCode> {
    anyhow::ensure!(
        std::io::stdout().is_terminal(),
        "the review screen needs a terminal; use `orthoepy queue list` to see the queue from a script"
    );
    // The screen appends to the journal and writes guesses back to the queue: one writer at a
    // time, held until the screen has closed and the queue is saved.
    let lock = super::lock_project(&project, "review")?;
    let files = ReviewFiles::open(&project)?;
    for w in &files.warnings {
        eprintln!("warning: {w}");
    }
    let workspace = Arc::new(Workspace::open(project.clone())?);
    let replayed = files.ledger.unapplied().len();
    // The editor runs the audit's checks under the project's stress policy; IPA stress marks
    // go where the PLS export puts them (onsets from the lexicon's own words).
    let phones = Arc::new(PhonesetCheck::with_project(
        workspace.phoneset().clone(),
        project.stress.clone(),
        Some(workspace.shared_lexicon().0),
    ));
    let title = project.root.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let mut app = App::new(&title, files.queue.items().to_vec(), files.ledger, phones);
    app.reviewer = reviewer
        .or_else(|| std::env::var("USER").ok())
        .or_else(|| std::env::var("LOGNAME").ok())
        .unwrap_or_else(|| "reviewer".to_string());
    app.message = match (files.warnings.first(), replayed) {
        (Some(w), _) => format!("warning: {w}"),
        (None, 0) => "press ? for keys".to_string(),
        (None, n) => format!("{n} decision(s) from the journal not yet applied — press ? for keys"),
    };
    let color = std::env::var_os("NO_COLOR").map_or(true, |v| v.is_empty());
    let (lexicon, index) = workspace.shared_lexicon();
    let lookups = Lookups::shared(lexicon, index, Some(workspace.phoneset().clone()));
    let guesser = Box::new(WorkspaceGuesser(Arc::clone(&workspace)));
    let services = Services { lookups, journal: files.journal, guesser: Some(guesser), color };
    let app = tui::run(app, services).context("the review screen failed")?;
    let guessed = app.keys.iter().map(String::as_str).zip(app.items.iter().map(|i| i.candidates.as_slice()));
    save_guessed(&project.queue, guessed).context("cannot save guessed candidates to the queue")?;
    drop(lock);
    let pending = app.ledger().unapplied().len();
    // After a hang-up the terminal is gone and this line has nowhere to go: not an error.
    let _ = writeln!(
        std::io::stdout(),
        "{pending} decision(s) in {} waiting to be merged; run `orthoepy apply --project {}`",
        project.journal.display(),
        project.root.display()
    );
    Ok(ExitCode::SUCCESS)
}
