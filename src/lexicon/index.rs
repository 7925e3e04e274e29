//! The FST index over a lexicon: headword lookup, prefix listing, fuzzy search and sounds-like.
//!
//! Keys of the headword map are normalised headwords (see [`normalize_key`]); each value is the
//! number of a posting list of [`EntryId`]s, because one headword may have several rows (variants).
//! A second map goes from pronunciation to entries (homophones), and a third from the pronunciation
//! with stress marks removed. The maps are `fst::Map`s (A. Gallant, "Index 1,600,000,000 keys with
//! automata and Rust", 2015), so prefix and Levenshtein queries run as automata over the index rather
//! than by scanning. The index is a snapshot: rebuild it after editing the lexicon.

use super::normalize::normalize_key;
use super::store::Lexicon;
use fst::automaton::{Levenshtein, Str};
use fst::{Automaton, IntoStreamer, Map, MapBuilder, Streamer};

/// The position of an entry in [`Lexicon::entries`].
pub type EntryId = usize;

/// Errors of index queries.
#[derive(Debug, thiserror::Error)]
pub enum IndexError {
    /// The Levenshtein automaton for the query would be too large.
    #[error("fuzzy query {query:?} with distance {distance} is too large to search; use a smaller distance or a longer query")]
    FuzzyTooLarge {
        /// The query.
        query: String,
        /// The distance asked for.
        distance: u32,
    },
}

/// How pronunciations are keyed in the sounds-like maps.
///
/// ```
/// use orthoepy::lexicon::IndexOptions;
/// let options = IndexOptions::default();
/// assert_eq!(options.strip_stress("K AA1 R"), "K AA R");
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct IndexOptions {
    /// Stress marks written as suffixes of phone symbols (digits `0`, `1`, `2` by default).
    pub stress_suffixes: Vec<String>,
}

impl Default for IndexOptions {
    fn default() -> Self {
        IndexOptions { stress_suffixes: vec!["0".into(), "1".into(), "2".into()] }
    }
}

impl IndexOptions {
    /// The pronunciation with stress suffixes removed from every phone.
    pub fn strip_stress(&self, pronunciation: &str) -> String {
        let mut out = String::with_capacity(pronunciation.len());
        for phone in pronunciation.split(' ').filter(|p| !p.is_empty()) {
            if !out.is_empty() {
                out.push(' ');
            }
            let bare = self
                .stress_suffixes
                .iter()
                .find_map(|mark| phone.strip_suffix(mark.as_str()).filter(|b| !b.is_empty()))
                .unwrap_or(phone);
            out.push_str(bare);
        }
        out
    }
}

/// A posting map: FST from key to posting number, and the postings.
#[derive(Debug, Clone)]
struct PostingMap {
    map: Map<Vec<u8>>,
    postings: Vec<Vec<EntryId>>,
}

impl PostingMap {
    fn build(mut pairs: Vec<(String, EntryId)>) -> PostingMap {
        pairs.sort_unstable();
        let mut builder = MapBuilder::memory();
        let mut postings: Vec<Vec<EntryId>> = Vec::new();
        let mut last: Option<&str> = None;
        for (key, id) in &pairs {
            if last == Some(key.as_str()) {
                if let Some(list) = postings.last_mut() {
                    list.push(*id);
                }
                continue;
            }
            // Keys arrive sorted and deduplicated, the only conditions insert checks.
            let _ = builder.insert(key, postings.len() as u64);
            postings.push(vec![*id]);
            last = Some(key);
        }
        let bytes = builder.into_inner().unwrap_or_default();
        let map = Map::new(bytes).unwrap_or_default();
        PostingMap { map, postings }
    }

    fn get(&self, key: &str) -> &[EntryId] {
        self.map.get(key).and_then(|n| self.postings.get(n as usize)).map(Vec::as_slice).unwrap_or(&[])
    }

    fn search<A: Automaton>(&self, automaton: A, limit: usize) -> Vec<(String, Vec<EntryId>)> {
        let mut stream = self.map.search(automaton).into_stream();
        let mut out = Vec::new();
        while let Some((key, n)) = stream.next() {
            if out.len() >= limit {
                break;
            }
            let ids = self.postings.get(n as usize).cloned().unwrap_or_default();
            out.push((String::from_utf8_lossy(key).into_owned(), ids));
        }
        out
    }
}

/// The index of one lexicon snapshot.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// let lexicon = Lexicon::from_entries(
///     vec![Entry::new("Pier", "P IH1 R"), Entry::new("peer", "P IH1 R"), Entry::new("pierhead", "P IH1 R HH EH2 D")],
///     HeadwordPolicy { fold_case: true },
/// );
/// let index = lexicon.index();
/// assert_eq!(index.lookup("PIER"), &[0]);
/// assert_eq!(index.prefix("pier", 10).len(), 2);
/// let near: Vec<String> = index.fuzzy("pear", 1, 10).unwrap().into_iter().map(|(k, _)| k).collect();
/// assert_eq!(near, ["peer"]);
/// assert_eq!(index.sounds_like("P IH1 R"), &[0, 1]);
/// ```
#[derive(Debug, Clone)]
pub struct LexiconIndex {
    words: PostingMap,
    pronunciations: PostingMap,
    unstressed: PostingMap,
    policy: super::HeadwordPolicy,
    options: IndexOptions,
}

impl LexiconIndex {
    /// Builds the index of a lexicon with the given options.
    pub fn build(lexicon: &Lexicon, options: IndexOptions) -> LexiconIndex {
        let policy = *lexicon.policy();
        let entries = lexicon.entries();
        let mut words = Vec::with_capacity(entries.len());
        let mut prons = Vec::with_capacity(entries.len());
        let mut bare = Vec::with_capacity(entries.len());
        for (id, entry) in entries.iter().enumerate() {
            words.push((normalize_key(entry.word.trim(), &policy).into_owned(), id));
            prons.push((entry.pronunciation.clone(), id));
            bare.push((options.strip_stress(&entry.pronunciation), id));
        }
        LexiconIndex {
            words: PostingMap::build(words),
            pronunciations: PostingMap::build(prons),
            unstressed: PostingMap::build(bare),
            policy,
            options,
        }
    }

    fn key<'a>(&self, word: &'a str) -> std::borrow::Cow<'a, str> {
        normalize_key(word.trim(), &self.policy)
    }

    /// The entries of a headword (normalised by the lexicon's policy before lookup).
    pub fn lookup(&self, word: &str) -> &[EntryId] {
        self.words.get(&self.key(word))
    }

    /// True when the headword is in the lexicon.
    pub fn contains(&self, word: &str) -> bool {
        !self.lookup(word).is_empty()
    }

    /// Number of distinct normalised headwords.
    pub fn word_count(&self) -> usize {
        self.words.postings.len()
    }

    /// Headwords starting with `prefix`, in key order, at most `limit` of them.
    pub fn prefix(&self, prefix: &str, limit: usize) -> Vec<(String, Vec<EntryId>)> {
        let key = self.key(prefix);
        self.words.search(Str::new(&key).starts_with(), limit)
    }

    /// Headwords within `max_edits` Levenshtein edits (over code points) of `word`, nearest first,
    /// at most `limit` of them.
    pub fn fuzzy(&self, word: &str, max_edits: u32, limit: usize) -> Result<Vec<(String, Vec<EntryId>)>, IndexError> {
        let key = self.key(word);
        let automaton = Levenshtein::new(&key, max_edits)
            .map_err(|_| IndexError::FuzzyTooLarge { query: word.to_string(), distance: max_edits })?;
        let mut found = self.words.search(automaton, usize::MAX);
        found.sort_by_cached_key(|(k, _)| (strsim::levenshtein(k, &key), k.clone()));
        found.truncate(limit);
        Ok(found)
    }

    /// Entries whose pronunciation is exactly `pronunciation` (stress marks included).
    pub fn sounds_like(&self, pronunciation: &str) -> &[EntryId] {
        let folded = crate::lexicon::join_phones(pronunciation.split_whitespace());
        self.pronunciations.get(&folded)
    }

    /// Entries whose pronunciation equals `pronunciation` once stress marks are removed from both.
    pub fn sounds_like_unstressed(&self, pronunciation: &str) -> &[EntryId] {
        self.unstressed.get(&self.options.strip_stress(pronunciation))
    }

    /// Every normalised headword, in key order.
    pub fn keys(&self) -> impl Iterator<Item = String> + '_ {
        let mut stream = self.words.map.keys();
        let mut all = Vec::with_capacity(self.words.postings.len());
        while let Some(k) = stream.next() {
            all.push(String::from_utf8_lossy(k).into_owned());
        }
        all.into_iter()
    }
}

impl Lexicon {
    /// Builds the FST index of this lexicon with the default [`IndexOptions`].
    pub fn index(&self) -> LexiconIndex {
        LexiconIndex::build(self, IndexOptions::default())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{Entry, HeadwordPolicy};

    fn sample() -> Lexicon {
        Lexicon::from_entries(
            vec![
                Entry::new("ferry", "F EH1 R IY0"),
                Entry::new("fairy", "F EH1 R IY0"),
                Entry::new("ferries", "F EH1 R IY0 Z"),
                Entry::new("ferry", "F EH1 R IY2"),
                Entry::new("Café", "K AE0 F EY1"),
            ],
            HeadwordPolicy { fold_case: true },
        )
    }

    #[test]
    fn lookup_returns_all_variants_in_store_order() {
        let index = sample().index();
        assert_eq!(index.lookup("ferry"), &[0, 3]);
        assert_eq!(index.lookup("Ferry"), &[0, 3]);
        assert!(index.lookup("ferr").is_empty());
        assert_eq!(index.word_count(), 4);
    }

    #[test]
    fn lookup_normalises_unicode_form() {
        let index = sample().index();
        assert_eq!(index.lookup("CAFE\u{301}"), &[4]);
    }

    #[test]
    fn prefix_respects_limit_and_order() {
        let index = sample().index();
        let keys: Vec<_> = index.prefix("fe", 10).into_iter().map(|(k, _)| k).collect();
        assert_eq!(keys, ["ferries", "ferry"]);
        assert_eq!(index.prefix("fe", 1).len(), 1);
    }

    #[test]
    fn fuzzy_sorts_by_distance() {
        let index = sample().index();
        let keys: Vec<_> = index.fuzzy("ferri", 2, 10).unwrap().into_iter().map(|(k, _)| k).collect();
        assert_eq!(keys, ["ferry", "ferries"]); // "fairy" is 3 edits away
    }

    #[test]
    fn sounds_like_with_and_without_stress() {
        let index = sample().index();
        assert_eq!(index.sounds_like("F EH1 R IY0"), &[0, 1]);
        assert_eq!(index.sounds_like_unstressed("F EH R IY"), &[0, 1, 3]);
    }

    #[test]
    fn keys_are_sorted_and_unique() {
        let keys: Vec<_> = sample().index().keys().collect();
        assert_eq!(keys, ["café", "fairy", "ferries", "ferry"]);
    }
}
