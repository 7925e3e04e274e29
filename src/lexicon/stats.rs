//! Counts that describe a lexicon: entries, distinct headwords, variants per word, statuses,
//! sources, phones per entry and phone frequencies, as `orthoepy stats` prints them.
//!
//! Counting borrows the entries' strings (no string is allocated per phone); it reads the
//! lexicon and its index and changes nothing.

use std::collections::{BTreeMap, HashMap};

use super::{Lexicon, LexiconIndex};

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
    /// Counts `lexicon`, with `index` (built from it) for the headword counts.
    ///
    /// ```
    /// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon, LexiconStats};
    /// let lexicon = Lexicon::from_entries(
    ///     vec![Entry::new("quay", "K IY1"), Entry::new("quay", "K EY1"), Entry::new("key", "K IY1")],
    ///     HeadwordPolicy::default(),
    /// );
    /// let stats = LexiconStats::of(&lexicon, &lexicon.index());
    /// assert_eq!((stats.entries, stats.words), (3, 2));
    /// assert_eq!(stats.variants_per_word[&2], 1);
    /// assert_eq!(stats.phone_frequencies["K"], 3);
    /// ```
    pub fn of(lexicon: &Lexicon, index: &LexiconIndex) -> LexiconStats {
        let mut variants_per_word = BTreeMap::new();
        for key in index.keys() {
            *variants_per_word.entry(index.lookup(&key).len()).or_insert(0) += 1;
        }
        let mut statuses: HashMap<String, usize> = HashMap::new();
        let mut sources: HashMap<&str, usize> = HashMap::new();
        let mut phone_counts: HashMap<&str, usize> = HashMap::new();
        let mut phones = 0usize;
        for entry in lexicon.entries() {
            *statuses.entry(entry.status.to_string()).or_insert(0) += 1;
            *sources.entry(entry.source.as_str()).or_insert(0) += 1;
            for phone in entry.phones() {
                phones += 1;
                *phone_counts.entry(phone).or_insert(0) += 1;
            }
        }
        let entries = lexicon.entries().len();
        LexiconStats {
            entries,
            words: index.word_count(),
            variants_per_word,
            statuses: statuses.into_iter().collect(),
            sources: sources.into_iter().map(|(s, n)| (s.to_string(), n)).collect(),
            mean_phones_per_entry: if entries == 0 { 0.0 } else { phones as f64 / entries as f64 },
            phone_frequencies: phone_counts.into_iter().map(|(p, n)| (p.to_string(), n)).collect(),
        }
    }

    /// The phones, most frequent first (ties in symbol order).
    pub fn phones_by_frequency(&self) -> Vec<(&str, usize)> {
        let mut phones: Vec<(&str, usize)> = self.phone_frequencies.iter().map(|(p, &n)| (p.as_str(), n)).collect();
        phones.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(b.0)));
        phones
    }
}
