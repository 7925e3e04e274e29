//! Counts that describe a lexicon: entries, distinct headwords, variants per word, statuses,
//! sources, phones per entry and phone frequencies, as `orthoepy stats` prints them.
//!
//! One pass over the entries builds nothing else: no index (headwords are counted as runs of
//! equal keys, which a saved store already has in order), no string per phone or per status
//! (counting borrows the entries' strings; a string is made once per distinct phone and source
//! at the end). It reads the lexicon and changes nothing.

use std::borrow::Cow;
use std::collections::BTreeMap;

use super::normalize::normalize_key;
use super::{Lexicon, Status};
use crate::support::hash::FastMap;

/// The counts of one lexicon.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LexiconStats {
    /// Rows of the store.
    pub entries: usize,
    /// Distinct normalised headwords.
    pub words: usize,
    /// How many words have N pronunciations, by N.
    pub variants_per_word: BTreeMap<usize, usize>,
    /// Entries per status.
    pub statuses: BTreeMap<String, usize>,
    /// Entries per source (empty = none given).
    pub sources: BTreeMap<String, usize>,
    /// Mean number of phone tokens per entry.
    pub mean_phones_per_entry: f64,
    /// Occurrences of each phone token (stress marks kept).
    pub phone_frequencies: BTreeMap<String, usize>,
}

impl LexiconStats {
    /// Counts `lexicon`.
    ///
    /// ```
    /// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon, LexiconStats};
    /// let lexicon = Lexicon::from_entries(
    ///     vec![Entry::new("quay", "K IY1"), Entry::new("quay", "K EY1"), Entry::new("key", "K IY1")],
    ///     HeadwordPolicy::default(),
    /// );
    /// let stats = LexiconStats::of(&lexicon);
    /// assert_eq!((stats.entries, stats.words), (3, 2));
    /// assert_eq!(stats.variants_per_word[&2], 1);
    /// assert_eq!(stats.phone_frequencies["K"], 3);
    /// ```
    pub fn of(lexicon: &Lexicon) -> LexiconStats {
        let (words, variants_per_word) = count_headwords(lexicon);
        let mut statuses = [0usize; Status::ALL.len()];
        let mut sources: FastMap<&str, usize> = FastMap::default();
        let mut short_phones: FastMap<u64, usize> = FastMap::default();
        let mut long_phones: FastMap<&str, usize> = FastMap::default();
        let mut phones = 0usize;
        // Rows of one source come in long runs (an import), so a run is counted once.
        let mut source_run: Option<(&str, usize)> = None;
        for entry in lexicon.entries() {
            statuses[entry.status as usize] += 1; // `Status::ALL` is in declaration order
            match &mut source_run {
                Some((source, n)) if *source == entry.source => *n += 1,
                _ => {
                    if let Some((source, n)) = source_run.replace((entry.source.as_str(), 1)) {
                        *sources.entry(source).or_insert(0) += n;
                    }
                }
            }
            for phone in entry.phones() {
                phones += 1;
                match pack_phone(phone) {
                    Some(packed) => *short_phones.entry(packed).or_insert(0) += 1,
                    None => *long_phones.entry(phone).or_insert(0) += 1,
                }
            }
        }
        if let Some((source, n)) = source_run {
            *sources.entry(source).or_insert(0) += n;
        }
        let mut phone_frequencies: BTreeMap<String, usize> = long_phones.into_iter().map(|(p, n)| (p.to_string(), n)).collect();
        phone_frequencies.extend(short_phones.into_iter().map(|(packed, n)| (unpack_phone(packed), n)));
        let entries = lexicon.entries().len();
        LexiconStats {
            entries,
            words,
            variants_per_word,
            statuses: Status::ALL
                .iter()
                .zip(statuses)
                .filter(|&(_, n)| n > 0)
                .map(|(status, n)| (status.as_str().to_string(), n))
                .collect(),
            sources: sources.into_iter().map(|(s, n)| (s.to_string(), n)).collect(),
            mean_phones_per_entry: if entries == 0 { 0.0 } else { phones as f64 / entries as f64 },
            phone_frequencies,
        }
    }

    /// The phones, most frequent first (ties in symbol order).
    pub fn phones_by_frequency(&self) -> Vec<(&str, usize)> {
        let mut phones: Vec<(&str, usize)> = self.phone_frequencies.iter().map(|(p, &n)| (p.as_str(), n)).collect();
        phones.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(b.0)));
        phones
    }
}

impl Lexicon {
    /// Distinct normalised headwords, counted without building an index.
    pub fn headword_count(&self) -> usize {
        count_headwords(self).0
    }
}

/// A phone token of at most seven bytes packed into one integer (its bytes, then its length in
/// the top byte), so that counting hashes a number instead of a string; `None` for longer
/// tokens, which are counted by string.
fn pack_phone(phone: &str) -> Option<u64> {
    let bytes = phone.as_bytes();
    (bytes.len() <= 7).then(|| {
        let mut packed = [0u8; 8];
        packed[..bytes.len()].copy_from_slice(bytes);
        packed[7] = bytes.len() as u8;
        u64::from_le_bytes(packed)
    })
}

/// The token [`pack_phone`] packed.
fn unpack_phone(packed: u64) -> String {
    let bytes = packed.to_le_bytes();
    let len = usize::from(bytes[7]).min(7);
    String::from_utf8_lossy(&bytes[..len]).into_owned()
}

/// Distinct normalised headwords, and how many of them have N entries, by N.
fn count_headwords(lexicon: &Lexicon) -> (usize, BTreeMap<usize, usize>) {
    let policy = lexicon.policy();
    let mut keys: Vec<Cow<str>> = lexicon.entries().iter().map(|e| normalize_key(e.word.trim(), policy)).collect();
    // A saved store is in key order already; checking first keeps that case linear.
    if !keys.windows(2).all(|w| w[0] <= w[1]) {
        keys.sort_unstable();
    }
    let mut variants_per_word = BTreeMap::new();
    let mut words = 0;
    for run in keys.chunk_by(|a, b| a == b) {
        words += 1;
        *variants_per_word.entry(run.len()).or_insert(0) += 1;
    }
    (words, variants_per_word)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{Entry, HeadwordPolicy};

    #[test]
    fn counts_agree_with_the_index_on_an_unsorted_lexicon() {
        let words = ["Ferry", "quay", "ferry", "café", "CAFE\u{301}", "quay", "ferry"];
        let entries = words.iter().map(|w| Entry::new(w, "K AE0 F EY1")).collect();
        let lexicon = Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true });
        let stats = LexiconStats::of(&lexicon);
        let index = lexicon.index();
        assert_eq!(stats.words, index.word_count());
        let mut expected = BTreeMap::new();
        for key in index.keys() {
            *expected.entry(index.lookup(&key).len()).or_insert(0) += 1;
        }
        assert_eq!(stats.variants_per_word, expected);
        assert_eq!(stats.variants_per_word, BTreeMap::from([(2, 2), (3, 1)]));
        assert_eq!(stats.statuses, BTreeMap::from([("accepted".to_string(), 7)]));
        assert_eq!(stats.phone_frequencies["EY1"], 7);
    }

    #[test]
    fn short_and_long_phones_and_source_runs_are_counted_alike() {
        // Phones of 1 to 9 bytes (IPA with diacritics runs past the seven packed bytes), and
        // sources in runs and interleaved.
        let rows = [("a", "t͡ʃʰ ɑː t", "x"), ("b", "t͡ʃʰː t", "x"), ("c", "t t͡ʃʰ", "y"), ("d", "ɑː", "x"), ("e", "A\u{0} A", "")];
        let entries = rows.iter().map(|(w, p, s)| Entry { source: (*s).into(), ..Entry::new(w, p) }).collect();
        let stats = LexiconStats::of(&Lexicon::from_entries(entries, HeadwordPolicy::default()));
        let mut expected: BTreeMap<String, usize> = BTreeMap::new();
        for (_, p, _) in rows {
            for phone in p.split(' ') {
                *expected.entry(phone.to_string()).or_insert(0) += 1;
            }
        }
        assert_eq!(stats.phone_frequencies, expected);
        assert_eq!(stats.sources, BTreeMap::from([(String::new(), 1), ("x".to_string(), 3), ("y".to_string(), 1)]));
        for phone in ["", "A", "t͡ʃʰ", "t͡ʃʰː", "1234567"] {
            assert_eq!(pack_phone(phone).map(unpack_phone).as_deref(), (phone.len() <= 7).then_some(phone));
        }
    }
}
