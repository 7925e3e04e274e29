//! The lexicon: entries, the CSV store, headword normalisation, the FST index (and its cache
//! beside the store) and plain-text interchange.
//!
//! This module owns everything about headwords and rows; it treats a pronunciation as phone tokens
//! separated by spaces and leaves their meaning to [`crate::phoneset`].

mod cache;
mod entry;
mod index;
mod normalize;
mod order;
pub mod plain;
mod query;
mod stats;
mod store;
mod store_file;

pub use cache::{cache_path, CacheState, IndexedStore, Stale, CACHE_FOLDER};
pub use entry::{join_phones, Entry, Status, UnknownStatus};
pub use index::{EntryId, IndexError, IndexOptions, LexiconIndex};
pub use normalize::{check_controls, check_headword, find_control, normalize_headword, normalize_key, HeadwordError, HeadwordPolicy};
pub use order::HeadwordGroups;
pub use query::{find, EntrySource, FindError, Query};
pub use stats::LexiconStats;
pub use store::{LexiconError, LoadMode, Lexicon, ParseProblem, COLUMNS, MAX_LEXICON};
