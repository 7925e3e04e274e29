//! The review queue: items waiting for a person, the candidates on offer for each, the
//! decisions people make, the append-only journal those decisions go to, intake from every
//! source (word lists, running text, variant proposals, audit findings), and merging decided
//! items into the lexicon in a crash-safe order; decisions on many items at once; checking and
//! repairing a damaged journal.
//!
//! This module draws nothing. It gets candidates only from the project's one guesser
//! ([`Workspace`](crate::workspace::Workspace)) and from the variant generator, and the review
//! screen hands it [`Decision`]s.

mod apply;
mod batch;
mod entry_edit;
mod error;
mod fileio;
mod guessing;
mod intake;
mod item;
mod journal;
mod ledger;
mod project_files;
mod sources;
mod state;
mod recovery;
mod store;
mod tokenise;

pub use apply::{apply_decisions, ApplyReport, Outcome};
pub use batch::{
    plan_batch, plan_over, plan_removal, plan_restore, plan_undo, removed_keys, run_batch, BatchError, BatchPlan, BatchRequest, BatchRun,
    Selection, Threshold,
};
pub use entry_edit::entry_key;
pub use error::QueueError;
pub use guessing::{candidates_for, fill_candidates, CandidateSource, WorkspaceGuesser};
pub use project_files::{
    apply_project, list_items, save_guessed, ApplyOptions, ApplyRun, ApplyStatus, ListedDecision, ListedItem, ProjectQueueError, ReviewFiles,
};
pub use sources::{add_sources, gather, AddSummary, Corpus, Gathered, IntakeError, Sources, PRONUNCIATION_CHECKS};
pub use state::ItemState;
pub use fileio::{MAX_JOURNAL, MAX_QUEUE};
pub use intake::{items_from_corpus, items_from_word_list, MAX_INTAKE_TEXT, MAX_WORD_CHARS};
pub use item::{sort_candidates, AlignPair, Candidate, Item, ItemKind};
pub use journal::{
    Action, Decision, Journal, JournalError, JournalProblem, JournalWarning, Logged, ProblemKind, Record, MAX_JOURNAL_BYTES,
};
pub use ledger::Ledger;
pub use recovery::{check_journal, repair_journal, DamagedTail, JournalReport, Repaired};
pub use store::{Added, Queue, QUEUE_FORMAT};
pub use tokenise::{count_unknown, tokens, Apostrophe, Case, Counted, Digits, Hyphen, TokenRule, MAX_CONTEXT};
