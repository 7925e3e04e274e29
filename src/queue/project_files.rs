//! A project's review files taken as a whole: opening the queue with the journal replayed,
//! listing items with their review state, merging decisions into the lexicon in the crash-safe
//! order, and writing guessed candidates back to the queue file.
//!
//! **Apply order.** The lexicon is saved first (atomically, with a `.bak`); then conflicting
//! decisions are withdrawn; then the journal is marked applied. A crash between any two steps
//! leaves decisions open rather than marked merged, so the next `apply` sees them again and
//! finds them already in the lexicon (skipped as unchanged), never lost and never applied twice.
//!
//! This file prints nothing; the command line reports what the returned values say.

use std::path::Path;

use super::apply::{apply_decisions, ApplyReport};
use super::error::QueueError;
use super::item::{Candidate, Item};
use super::journal::{Journal, JournalWarning, Record};
use super::ledger::Ledger;
use super::state::ItemState;
use super::store::Queue;
use crate::lexicon::{Lexicon, LexiconError};
use crate::project::Project;

/// Errors of the project-wide queue operations.
#[derive(Debug, thiserror::Error)]
pub enum ProjectQueueError {
    /// The lexicon could not be loaded or saved.
    #[error(transparent)]
    Lexicon(#[from] LexiconError),
    /// The queue could not be read or written.
    #[error(transparent)]
    Queue(#[from] QueueError),
    /// The journal could not be read or written, or is damaged.
    #[error(transparent)]
    Journal(#[from] super::journal::JournalError),
    /// The project's phoneset, which decisions are checked against, could not be loaded.
    #[error(transparent)]
    Phoneset(#[from] crate::phoneset::PhonesetError),
}

/// The queue of a project with its journal open and replayed.
pub struct ReviewFiles {
    /// The queued items, in review order.
    pub queue: Queue,
    /// The journal, open for appending.
    pub journal: Journal,
    /// The decisions in force, replayed from the journal.
    pub ledger: Ledger,
    /// What opening the journal found (e.g. a write cut short).
    pub warnings: Vec<JournalWarning>,
}

impl ReviewFiles {
    /// Opens the project's queue and journal for writing (the caller holds the project lock).
    /// Items removed from review (`queue remove`) are left out of [`queue`](Self::queue).
    pub fn open(project: &Project) -> Result<ReviewFiles, QueueError> {
        let mut queue = Queue::load(&project.queue)?;
        let (journal, warnings) = Journal::open(&project.journal)?;
        let ledger = Ledger::replay(journal.records());
        queue.remove_keys(&super::batch::removed_keys(&queue, &ledger));
        Ok(ReviewFiles { queue, journal, ledger, warnings })
    }
}

/// One queued item with its review state, as `queue list` shows it.
#[derive(Debug, serde::Serialize)]
pub struct ListedItem {
    /// The item.
    #[serde(flatten)]
    pub item: Item,
    /// Its state under the journal's decisions.
    pub state: ItemState,
    /// The decision in force, if any, with its journal sequence number.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub decision: Option<ListedDecision>,
}

/// A decision as `queue list` shows it.
#[derive(Debug, serde::Serialize)]
pub struct ListedDecision {
    /// Journal sequence number of the decision.
    pub seq: u64,
    /// What was decided.
    #[serde(flatten)]
    pub action: super::journal::Action,
    /// The reviewer's note.
    #[serde(skip_serializing_if = "String::is_empty")]
    pub note: String,
}

/// Every queued item with its review state (the journal is only read), and the journal's
/// warnings.
pub fn list_items(project: &Project) -> Result<(Vec<ListedItem>, Vec<JournalWarning>), QueueError> {
    let queue = Queue::load(&project.queue)?;
    let (records, warnings) = Journal::read(&project.journal)?;
    let ledger = Ledger::replay(&records);
    let listed = queue
        .items()
        .iter()
        .map(|item| {
            let key = item.key();
            let current = ledger.current(&key);
            let state = ItemState::of(current.map(|(_, d)| &d.action), ledger.is_applied(&key));
            let decision =
                current.map(|(seq, d)| ListedDecision { seq, action: d.action.clone(), note: d.note.clone() });
            ListedItem { item: item.clone(), state, decision }
        })
        .collect();
    Ok((listed, warnings))
}

/// How `apply` should treat the decisions.
#[derive(Debug, Clone, Copy, Default)]
pub struct ApplyOptions {
    /// Report what would be merged; change nothing.
    pub dry_run: bool,
    /// Merge what does not conflict and withdraw the conflicting decisions.
    pub skip_conflicts: bool,
}

/// What an apply run decided to do with its report.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ApplyStatus {
    /// The lexicon contradicts some decisions; nothing was changed.
    Refused,
    /// A dry run: nothing was changed.
    DryRun,
    /// The decisions were merged (the lexicon saved, the journal marked).
    Applied,
}

/// The result of [`apply_project`].
#[derive(Debug)]
pub struct ApplyRun {
    /// Every decision's outcome.
    pub report: ApplyReport,
    /// Whether anything was changed.
    pub status: ApplyStatus,
    /// Decisions merged (entries added or replaced).
    pub merged: usize,
    /// Conflicting decisions withdrawn (their items are back in review).
    pub reopened: usize,
    /// What opening the journal found.
    pub warnings: Vec<JournalWarning>,
}

/// Merges the journal's unapplied decisions into the project's lexicon in the crash-safe order
/// (see the module docs). Unless it is a dry run, the caller holds the project lock
/// ([`ProjectLock`](crate::lock::ProjectLock)).
pub fn apply_project(project: &Project, options: ApplyOptions) -> Result<ApplyRun, ProjectQueueError> {
    let mut lexicon = Lexicon::load(&project.lexicon, project.headword_policy())?;
    let queue = Queue::load(&project.queue)?;
    // A dry run only reads the journal; a real run opens it for writing (which keeps a torn
    // last line aside), so the caller must hold the project lock.
    let (journal, ledger, warnings) = if options.dry_run {
        let (records, warnings) = Journal::read(&project.journal)?;
        (None, Ledger::replay(&records), warnings)
    } else {
        let (journal, warnings) = Journal::open(&project.journal)?;
        let ledger = Ledger::replay(journal.records());
        (Some(journal), ledger, warnings)
    };
    let phoneset = crate::phoneset::Phoneset::resolve(&project.phoneset, &project.root)?;
    let report = apply_decisions(&mut lexicon, &queue, &ledger, &phoneset);
    let merged = report.outcomes.iter().filter(|o| o.changes_lexicon()).count();
    let mut run = ApplyRun { report, status: ApplyStatus::DryRun, merged, reopened: 0, warnings };
    if run.report.has_conflicts() && !options.skip_conflicts {
        run.status = ApplyStatus::Refused;
        return Ok(run);
    }
    let Some(mut journal) = journal else {
        return Ok(run);
    };
    if run.report.changed() {
        lexicon.save()?;
    }
    // Withdraw the conflicting decisions before marking the journal, so a crash in between
    // leaves them open (the next apply sees them again) rather than marked as merged.
    let reopened = run.report.conflicts();
    for &seq in &reopened {
        journal.append(Record::Revoke { seq })?;
    }
    if run.report.through > ledger.applied_through() {
        journal.append(Record::Applied { through: run.report.through })?;
    }
    run.reopened = reopened.len();
    run.status = ApplyStatus::Applied;
    Ok(run)
}

/// Writes candidates guessed during a review session back to the queue file: the file is read
/// again and only items that still have no candidates get them, so items added or changed on
/// disk meanwhile are kept. Returns whether the file changed.
pub fn save_guessed<'a>(
    queue_path: &Path,
    guessed: impl IntoIterator<Item = (&'a str, &'a [Candidate])>,
) -> Result<bool, QueueError> {
    let mut queue = Queue::load(queue_path)?;
    let mut changed = false;
    for (key, candidates) in guessed {
        if !candidates.is_empty() && queue.get(key).is_some_and(|item| item.candidates.is_empty()) {
            queue.set_candidates(key, candidates.to_vec());
            changed = true;
        }
    }
    if changed {
        queue.save()?;
    }
    Ok(changed)
}
