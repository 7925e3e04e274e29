//! The FST index over a lexicon: headword lookup, prefix listing, fuzzy search and sounds-like.
//!
//! Keys of the headword map are normalised headwords (see [`normalize_key`]); each value is the
//! range of a flat posting list of [`EntryId`]s, because one headword may have several rows
//! (variants). The headword map is an `fst::Map` (A. Gallant, "Index 1,600,000,000 keys with
//! automata and Rust", 2015), so prefix and Levenshtein queries run as automata over the index
//! rather than by scanning. Two reverse maps go from pronunciation to entries (homophones), with and
//! without stress marks; they need exact lookup only, so they are spans over one text buffer, sorted by hash and
//! found by binary search. The index is a snapshot: rebuild it after editing the lexicon.

use super::normalize::normalize_key;
use super::store::Lexicon;
use crate::support::hash::fnv1a_64;
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
        self.push_stripped(pronunciation, &mut out);
        out
    }

    /// Appends the pronunciation with stress suffixes removed (and single spaces) to `out`.
    pub fn push_stripped(&self, pronunciation: &str, out: &mut String) {
        let mut first = true;
        for phone in pronunciation.split(' ').filter(|p| !p.is_empty()) {
            if !first {
                out.push(' ');
            }
            first = false;
            let bare = match phone.as_bytes() {
                // One-byte marks (the digit convention) are checked without string searches.
                [.., last] if phone.len() > 1 && self.stress_suffixes.iter().any(|m| m.as_bytes() == [*last]) => {
                    &phone[..phone.len() - 1]
                }
                _ => self
                    .stress_suffixes
                    .iter()
                    .filter(|m| m.len() > 1)
                    .find_map(|mark| phone.strip_suffix(mark.as_str()).filter(|b| !b.is_empty()))
                    .unwrap_or(phone),
            };
            out.push_str(bare);
        }
    }
}

/// A posting map: FST from key to a packed (start, length) range of `ids`.
///
/// Postings are stored flat: the ids of one key are contiguous in `ids`, in ascending order, so a
/// lookup is one FST walk and one slice.
#[derive(Debug, Clone)]
struct PostingMap {
    map: Map<Vec<u8>>,
    ids: Vec<EntryId>,
    keys: usize,
}

impl PostingMap {
    fn build<K: AsRef<str> + Ord>(mut pairs: Vec<(K, EntryId)>) -> PostingMap {
        let order = |a: &(K, EntryId), b: &(K, EntryId)| a.0.as_ref().cmp(b.0.as_ref()).then(a.1.cmp(&b.1));
        // A saved store is already in key order; checking first makes that case linear.
        if !pairs.windows(2).all(|w| order(&w[0], &w[1]).is_le()) {
            pairs.sort_unstable_by(order);
        }
        let mut builder = MapBuilder::memory();
        let mut ids = Vec::with_capacity(pairs.len());
        let mut keys = 0;
        let mut i = 0;
        while i < pairs.len() {
            let key = pairs[i].0.as_ref();
            let start = ids.len();
            while i < pairs.len() && pairs[i].0.as_ref() == key {
                ids.push(pairs[i].1);
                i += 1;
            }
            // Keys arrive sorted and deduplicated, the only conditions insert checks.
            let _ = builder.insert(key, pack(start, ids.len() - start));
            keys += 1;
        }
        let bytes = builder.into_inner().unwrap_or_default();
        let map = Map::new(bytes).unwrap_or_default();
        PostingMap { map, ids, keys }
    }

    fn range(&self, packed: u64) -> &[EntryId] {
        let (start, len) = unpack(packed);
        self.ids.get(start..start + len).unwrap_or(&[])
    }

    fn get(&self, key: &str) -> &[EntryId] {
        self.map.get(key).map(|v| self.range(v)).unwrap_or(&[])
    }

    fn search<A: Automaton>(&self, automaton: A, limit: usize) -> Vec<(String, Vec<EntryId>)> {
        let mut stream = self.map.search(automaton).into_stream();
        let mut out = Vec::new();
        while let Some((key, packed)) = stream.next() {
            if out.len() >= limit {
                break;
            }
            out.push((String::from_utf8_lossy(key).into_owned(), self.range(packed).to_vec()));
        }
        out
    }
}

fn pack(start: usize, len: usize) -> u64 {
    ((start as u64) << 32) | len as u64
}

fn unpack(packed: u64) -> (usize, usize) {
    ((packed >> 32) as usize, (packed & 0xffff_ffff) as usize)
}

/// An exact-match map from pronunciation to entries.
///
/// Pronunciations need exact lookup only (prefix and fuzzy search are for spellings), so they are
/// kept as one text buffer with spans sorted by content and found by binary search: one copy of
/// the text and one sort instead of an automaton build.
#[derive(Debug, Clone)]
struct SoundMap {
    text: String,
    /// (hash, start, length) of each key, sorted by hash, then key text, then entry.
    spans: Vec<(u64, u32, u32)>,
    /// The entry of each span, so the entries of one key form a slice.
    ids: Vec<EntryId>,
}

impl SoundMap {
    /// Builds the map; `write_key(i, out)` appends the key of entry `i` to `out`.
    fn build(count: usize, mut write_key: impl FnMut(usize, &mut String)) -> SoundMap {
        let mut text = String::new();
        let mut span_of: Vec<(u32, u32)> = Vec::with_capacity(count);
        let mut order: Vec<(u64, EntryId)> = Vec::with_capacity(count);
        for id in 0..count {
            let start = text.len();
            write_key(id, &mut text);
            span_of.push((start as u32, (text.len() - start) as u32));
            order.push((fnv1a_64(&text.as_bytes()[start..]), id));
        }
        // An integer sort by (hash, entry); then, inside each run of one hash (homophones, or a
        // rare collision), order by text so that every key's entries are contiguous.
        order.sort_unstable();
        let key_of = |id: EntryId| {
            let (start, len) = span_of[id];
            &text[start as usize..(start + len) as usize]
        };
        let mut run = 0;
        while run < order.len() {
            let end = run + order[run..].iter().take_while(|o| o.0 == order[run].0).count();
            if end - run > 1 {
                order[run..end].sort_by(|a, b| key_of(a.1).cmp(key_of(b.1)).then(a.1.cmp(&b.1)));
            }
            run = end;
        }
        let spans = order.iter().map(|&(h, id)| (h, span_of[id].0, span_of[id].1)).collect();
        let ids = order.iter().map(|o| o.1).collect();
        SoundMap { text, spans, ids }
    }

    fn key(&self, start: u32, len: u32) -> &str {
        self.text.get(start as usize..(start + len) as usize).unwrap_or("")
    }

    fn get(&self, key: &str) -> &[EntryId] {
        let hash = fnv1a_64(key.as_bytes());
        let first = self.spans.partition_point(|&(h, s, l)| (h, self.key(s, l)) < (hash, key));
        let count = self.spans[first..].iter().take_while(|&&(h, s, l)| h == hash && self.key(s, l) == key).count();
        &self.ids[first..first + count]
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
    pronunciations: SoundMap,
    unstressed: SoundMap,
    policy: super::HeadwordPolicy,
    options: IndexOptions,
}

impl LexiconIndex {
    /// Builds the index of a lexicon with the given options.
    pub fn build(lexicon: &Lexicon, options: IndexOptions) -> LexiconIndex {
        let policy = *lexicon.policy();
        let entries = lexicon.entries();
        let ((words, pronunciations), unstressed) = rayon::join(
            || {
                rayon::join(
                    || {
                        let keys = entries.iter().enumerate();
                        PostingMap::build(keys.map(|(id, e)| (normalize_key(e.word.trim(), &policy), id)).collect())
                    },
                    || SoundMap::build(entries.len(), |i, out| out.push_str(&entries[i].pronunciation)),
                )
            },
            || SoundMap::build(entries.len(), |i, out| options.push_stripped(&entries[i].pronunciation, out)),
        );
        LexiconIndex { words, pronunciations, unstressed, policy, options }
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
        self.words.keys
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
        let mut all = Vec::with_capacity(self.words.keys);
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
        assert!(index.sounds_like("F EH1 R").is_empty());
    }

    #[test]
    fn stress_stripping_fast_and_general_paths_agree() {
        let digits = IndexOptions::default();
        let general = IndexOptions { stress_suffixes: vec!["1".into(), "0".into(), "2".into(), "ˈ".into()] };
        for pron in ["K AA1 R", "AH0", "0 1 IY2", "  A1  B2 ", "ɡ ɑ1 ɹ", ""] {
            let mut fast = String::new();
            digits.push_stripped(pron, &mut fast);
            let mut slow = String::new();
            general.push_stripped(pron, &mut slow);
            assert_eq!(fast, slow, "{pron:?}");
        }
        assert_eq!(digits.strip_stress("0 1 IY2"), "0 1 IY");
    }

    #[test]
    fn keys_are_sorted_and_unique() {
        let keys: Vec<_> = sample().index().keys().collect();
        assert_eq!(keys, ["café", "fairy", "ferries", "ferry"]);
    }
}
