//! The look-ups `orthoepy find` offers, as one function over a lexicon and its index: exact
//! headword, prefix, fuzzy (Levenshtein), by phones, and sounds-like (other words sharing a
//! pronunciation with the query word).
//!
//! It reads the index and the entries and changes nothing.

use super::{Entry, EntryId, IndexError, Lexicon, LexiconError, LexiconIndex};

/// Where the entries an index points at come from: a loaded [`Lexicon`], or a store opened
/// through its index cache that parses only the rows asked for
/// ([`IndexedStore`](super::IndexedStore)).
pub trait EntrySource {
    /// The entries `ids`, in that order (ids outside the lexicon are skipped).
    fn entries_of(&self, ids: &[EntryId]) -> Result<Vec<Entry>, LexiconError>;
}

impl EntrySource for Lexicon {
    fn entries_of(&self, ids: &[EntryId]) -> Result<Vec<Entry>, LexiconError> {
        Ok(ids.iter().filter_map(|&id| self.entries().get(id).cloned()).collect())
    }
}

/// Why a look-up failed.
#[derive(Debug, thiserror::Error)]
pub enum FindError {
    /// The query cannot be run on the index.
    #[error(transparent)]
    Index(#[from] IndexError),
    /// The rows of the store could not be read.
    #[error(transparent)]
    Store(#[from] LexiconError),
}

/// What kind of look-up to run.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Query {
    /// The headword itself (normalised by the lexicon's policy).
    Exact,
    /// Headwords starting with the text, at most `limit` of them.
    Prefix {
        /// Most headwords returned.
        limit: usize,
    },
    /// Headwords within `edits` Levenshtein edits, at most `limit` of them.
    Fuzzy {
        /// Largest edit distance.
        edits: u32,
        /// Most headwords returned.
        limit: usize,
    },
    /// Entries whose pronunciation is the text (phones separated by spaces).
    Phones {
        /// Compare stress marks too (else they are ignored).
        exact_stress: bool,
    },
    /// Other entries pronounced like one of the query word's entries.
    SoundsLike {
        /// Compare stress marks too (else they are ignored).
        exact_stress: bool,
    },
}

/// The entries `query` finds for `text`, as entry ids of the index (`rows` gives the query
/// word's own pronunciations for [`Query::SoundsLike`]).
///
/// ```
/// use orthoepy::lexicon::{find, Entry, HeadwordPolicy, Lexicon, Query};
/// let lexicon = Lexicon::from_entries(
///     vec![Entry::new("quay", "K IY1"), Entry::new("key", "K IY1"), Entry::new("quays", "K IY1 Z")],
///     HeadwordPolicy::default(),
/// );
/// let index = lexicon.index();
/// let words = |ids: Vec<usize>| ids.iter().map(|&i| lexicon.entries()[i].word.clone()).collect::<Vec<_>>();
/// assert_eq!(words(find(&index, &lexicon, "quay", Query::SoundsLike { exact_stress: false }).unwrap()), ["key"]);
/// assert_eq!(words(find(&index, &lexicon, "qua", Query::Prefix { limit: 10 }).unwrap()), ["quay", "quays"]);
/// ```
pub fn find(index: &LexiconIndex, rows: &dyn EntrySource, text: &str, query: Query) -> Result<Vec<EntryId>, FindError> {
    let flatten = |hits: Vec<(String, Vec<EntryId>)>| hits.into_iter().flat_map(|(_, ids)| ids).collect();
    let by_sound = |pronunciation: &str, exact_stress: bool| -> Vec<EntryId> {
        if exact_stress {
            index.sounds_like(pronunciation).to_vec()
        } else {
            index.sounds_like_unstressed(pronunciation).to_vec()
        }
    };
    Ok(match query {
        Query::Exact => index.lookup(text).to_vec(),
        Query::Prefix { limit } => flatten(index.prefix(text, limit)),
        Query::Fuzzy { edits, limit } => flatten(index.fuzzy(text, edits, limit)?),
        Query::Phones { exact_stress } => by_sound(text, exact_stress),
        Query::SoundsLike { exact_stress } => {
            let own = index.lookup(text);
            let mut ids: Vec<EntryId> = rows
                .entries_of(own)?
                .iter()
                .flat_map(|e| by_sound(&e.pronunciation, exact_stress))
                .filter(|i| !own.contains(i))
                .collect();
            ids.sort_unstable();
            ids.dedup();
            ids
        }
    })
}
