//! The review queue: items waiting for a person, the candidates on offer for each, the
//! decisions people make, the append-only journal those decisions go to, corpus tokenising to
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
mod store;
mod tokenise;

pub use apply::{apply_decisions, ApplyReport, Outcome};
pub use error::QueueError;
pub use fileio::{MAX_JOURNAL, MAX_QUEUE};
pub use intake::{items_from_corpus, items_from_word_list, MAX_INTAKE_TEXT, MAX_WORD_CHARS};
pub use item::{sort_candidates, AlignPair, Candidate, Item, ItemKind};
pub use journal::{Action, Decision, Journal, JournalWarning, Logged, Record};
pub use ledger::Ledger;
pub use store::{Added, Queue, QUEUE_FORMAT};
pub use tokenise::{count_unknown, tokens, Apostrophe, Case, Counted, Digits, Hyphen, TokenRule, MAX_CONTEXT};
