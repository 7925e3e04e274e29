//! The review queue: items waiting for a person, the candidates on offer for each, the
//! decisions people make, the append-only journal those decisions go to (and its check and repair), corpus tokenising to
//! find new words, and merging decided items into the lexicon.
//!
//! This module draws nothing and runs no models: guessers and variant generators hand it
//! [`Candidate`]s, and the review screen hands it [`Decision`]s.

mod apply;
mod error;
mod fileio;
mod intake;
mod item;
mod journal;
mod ledger;
mod recovery;
mod store;
mod tokenise;

pub use apply::{apply_decisions, ApplyReport, Outcome};
pub use error::QueueError;
pub use intake::{items_from_corpus, items_from_word_list, MAX_WORD_CHARS};
pub use item::{sort_candidates, AlignPair, Candidate, Item, ItemKind};
pub use journal::{
    Action, Decision, Journal, JournalError, JournalProblem, JournalWarning, Logged, ProblemKind, Record, MAX_JOURNAL_BYTES,
};
pub use ledger::Ledger;
pub use recovery::{check_journal, repair_journal, DamagedTail, JournalReport, Repaired};
pub use store::{Added, Queue, QUEUE_FORMAT};
pub use tokenise::{count_unknown, tokens, Apostrophe, Case, Counted, Digits, Hyphen, TokenRule, MAX_CONTEXT};
