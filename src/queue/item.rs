//! Review items and their candidates: the data a reviewer decides on.
//!
//! An [`Item`] is one question put to a person ("how is this word said?", "is this variant right?",
//! "is this audit finding a real problem?"), with the evidence gathered for it (corpus count and an
//! example line) and the [`Candidate`] pronunciations on offer. This file owns only the data model
//! and the rule for merging two items about the same thing; it does not read files or guess.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

/// Where an item came from, and what accepting one of its candidates means.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum ItemKind {
    /// A word missing from the lexicon (from a word list or running text); accepting a candidate
    /// creates a new entry.
    NewWord,
    /// A proposed variant of an existing entry; accepting adds the variant as another entry.
    Variant {
        /// The pronunciation the variant was derived from.
        canonical: String,
        /// The accent profile or rule-set list that proposed it.
        profile: String,
    },
    /// An audit finding on an existing entry; accepting a candidate replaces the flagged
    /// pronunciation, rejecting keeps the entry as it is.
    Audit {
        /// The audit check that fired (e.g. "unknown-phone").
        check: String,
        /// The flagged pronunciation as it is in the lexicon.
        current: String,
        /// The finding's message, shown to the reviewer.
        message: String,
        /// 1-based line of the entry in the lexicon file when the finding was made (0 = unknown).
        line: usize,
    },
}

impl ItemKind {
    /// Short name used in keys, filters and progress counts: `new`, `variant` or `audit`.
    pub fn tag(&self) -> &'static str {
        match self {
            ItemKind::NewWord => "new",
            ItemKind::Variant { .. } => "variant",
            ItemKind::Audit { .. } => "audit",
        }
    }
}

/// One letter group paired with the phones it produced (either side may be empty).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct AlignPair {
    /// Letters of the spelling, e.g. `"ph"`.
    pub letters: String,
    /// Phones, space separated, e.g. `"F"`; empty for silent letters.
    pub phones: String,
}

/// A pronunciation on offer for an item.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Candidate {
    /// Phone symbols separated by single spaces.
    pub pronunciation: String,
    /// Which guesser or rule produced it: "g2p", "rules:en", "analogy", "variant:flapping" ...
    pub source: String,
    /// The producer's confidence in 0..=1 (a posterior or a profile weight), if it has one.
    #[serde(default)]
    pub score: Option<f64>,
    /// Letter-to-phone alignment, when the producer knows one.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub alignment: Vec<AlignPair>,
    /// Rewrite rules that fired to make it (variants only).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub rules: Vec<String>,
    /// What the producer warned about (e.g. letters the model never saw, read as their base
    /// letter), shown beside the item. Left out of the file when empty, so queue files written
    /// before warnings were kept read the same.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub warnings: Vec<String>,
}

impl Candidate {
    /// A candidate with no score, alignment or rules.
    ///
    /// ```
    /// use orthoepy::queue::Candidate;
    /// let c = Candidate::new("K AE1 T", "g2p");
    /// assert_eq!(c.source, "g2p");
    /// assert!(c.score.is_none());
    /// ```
    pub fn new(pronunciation: &str, source: &str) -> Candidate {
        Candidate {
            pronunciation: pronunciation.to_string(),
            source: source.to_string(),
            score: None,
            alignment: Vec::new(),
            rules: Vec::new(),
            warnings: Vec::new(),
        }
    }
}

/// One question for the reviewer.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Item {
    /// The word as it should be written in the lexicon.
    pub word: String,
    /// What kind of question this is.
    #[serde(flatten)]
    pub kind: ItemKind,
    /// How often the word was seen in the corpora it came from (0 when it came from a word list):
    /// the sum of [`counts`](Item::counts).
    #[serde(default)]
    pub count: u64,
    /// The count from each origin, so that reading the same file again replaces its count
    /// instead of adding to it (empty in files written before counts were kept per origin: then
    /// `count` belongs to `origin`).
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub counts: BTreeMap<String, u64>,
    /// One line of running text showing the word in use (may be empty).
    #[serde(default)]
    pub context: String,
    /// Pronunciations on offer, best first.
    #[serde(default)]
    pub candidates: Vec<Candidate>,
    /// Where the item was queued from ("words:new-words.txt", "corpus:queries.txt",
    /// "variants:PROFILE", "audit"); progress is counted per origin.
    #[serde(default)]
    pub origin: String,
}

impl Item {
    /// A new-word item with no evidence or candidates yet.
    ///
    /// ```
    /// use orthoepy::queue::Item;
    /// let item = Item::new_word("Saltmarsh");
    /// assert_eq!(item.key(), "new:saltmarsh");
    /// ```
    pub fn new_word(word: &str) -> Item {
        Item {
            word: word.to_string(),
            kind: ItemKind::NewWord,
            count: 0,
            counts: BTreeMap::new(),
            context: String::new(),
            candidates: Vec::new(),
            origin: String::new(),
        }
    }

    /// Sets the count this item was seen with in `origin` (and makes it the item's origin).
    ///
    /// ```
    /// use orthoepy::queue::Item;
    /// let mut item = Item::new_word("Kelport");
    /// item.seen_in("corpus:queries.txt", 4);
    /// assert_eq!((item.count, item.origin.as_str()), (4, "corpus:queries.txt"));
    /// ```
    pub fn seen_in(&mut self, origin: &str, count: u64) {
        self.origin = origin.to_string();
        self.counts = BTreeMap::from([(origin.to_string(), count)]);
        self.count = count;
    }

    /// Every distinct warning of the item's candidates, in candidate order.
    ///
    /// ```
    /// use orthoepy::queue::{Candidate, Item};
    /// let mut item = Item::new_word("café");
    /// let mut c = Candidate::new("K AE0 F EY1", "model:1");
    /// c.warnings.push("é read as e".into());
    /// item.candidates.extend([c.clone(), c]);
    /// assert_eq!(item.warnings(), ["é read as e"]);
    /// ```
    pub fn warnings(&self) -> Vec<&str> {
        let mut out: Vec<&str> = Vec::new();
        for w in self.candidates.iter().flat_map(|c| &c.warnings) {
            if !out.contains(&w.as_str()) {
                out.push(w);
            }
        }
        out
    }

    /// The count from each origin (for items of older files: `count` under `origin`).
    pub fn origin_counts(&self) -> BTreeMap<String, u64> {
        if self.counts.is_empty() && (self.count > 0 || !self.origin.is_empty()) {
            return BTreeMap::from([(self.origin.clone(), self.count)]);
        }
        self.counts.clone()
    }

    fn set_origin_counts(&mut self, counts: BTreeMap<String, u64>) {
        self.count = counts.values().fold(0u64, |sum, c| sum.saturating_add(*c));
        self.counts = counts;
    }

    /// Identity used for merging and for journal decisions: kind, lower-cased word and, for
    /// variants and audit findings, the pronunciation they are about.
    pub fn key(&self) -> String {
        let word = self.word.to_lowercase();
        match &self.kind {
            ItemKind::NewWord => format!("new:{word}"),
            ItemKind::Variant { canonical, .. } => format!("variant:{word}:{canonical}"),
            ItemKind::Audit { check, current, .. } => format!("audit:{check}:{word}:{current}"),
        }
    }

    /// Fold `other` (an item with the same [`key`](Item::key), from the same reading of the
    /// sources) into this one: counts add up per origin, the first non-empty context is kept,
    /// and candidates are united by pronunciation (keeping the higher score and the source that
    /// gave it). Candidates stay sorted best first.
    ///
    /// ```
    /// use orthoepy::queue::{Candidate, Item};
    /// let mut a = Item::new_word("quay");
    /// a.seen_in("corpus:a.txt", 3);
    /// a.candidates.push(Candidate::new("K IY1", "g2p"));
    /// let mut b = Item::new_word("Quay");
    /// b.seen_in("corpus:a.txt", 2);
    /// b.candidates.push(Candidate::new("K W EY1", "rules:en"));
    /// a.merge(b);
    /// assert_eq!(a.count, 5);
    /// assert_eq!(a.candidates.len(), 2);
    /// ```
    pub fn merge(&mut self, other: Item) {
        let mut counts = self.origin_counts();
        for (origin, count) in other.origin_counts() {
            let sum = counts.entry(origin).or_insert(0);
            *sum = sum.saturating_add(count);
        }
        self.take_evidence(other, counts);
    }

    /// Fold `other` (an item with the same [`key`](Item::key), from a later reading of its
    /// sources) into this queued one: the counts of the origins `other` was read from are
    /// replaced, not added, so reading the same file twice changes nothing and reading a
    /// changed file updates its counts. Context and candidates as in [`merge`](Item::merge).
    /// Returns whether the item changed.
    ///
    /// ```
    /// use orthoepy::queue::Item;
    /// let mut queued = Item::new_word("Kelport");
    /// queued.seen_in("corpus:queries.txt", 4);
    /// let mut again = Item::new_word("Kelport");
    /// again.seen_in("corpus:queries.txt", 4);
    /// assert!(!queued.refresh(again.clone()));
    /// assert_eq!(queued.count, 4);
    /// again.seen_in("corpus:queries.txt", 6);
    /// assert!(queued.refresh(again));
    /// assert_eq!(queued.count, 6);
    /// ```
    pub fn refresh(&mut self, other: Item) -> bool {
        let before = self.clone();
        let mut counts = self.origin_counts();
        counts.extend(other.origin_counts());
        self.take_evidence(other, counts);
        *self != before
    }

    /// Drops the count an origin gave this item (its source no longer lists the word).
    pub fn forget_origin(&mut self, origin: &str) {
        let mut counts = self.origin_counts();
        if counts.remove(origin).is_some() {
            self.set_origin_counts(counts);
        }
    }

    fn take_evidence(&mut self, other: Item, counts: BTreeMap<String, u64>) {
        self.set_origin_counts(counts);
        if self.context.is_empty() {
            self.context = other.context;
        }
        if self.origin.is_empty() {
            self.origin = other.origin;
        }
        for cand in other.candidates {
            match self.candidates.iter_mut().find(|c| c.pronunciation == cand.pronunciation) {
                Some(have) if score_of(&cand) > score_of(have) => *have = cand,
                Some(_) => {}
                None => self.candidates.push(cand),
            }
        }
        sort_candidates(&mut self.candidates);
    }
}

fn score_of(c: &Candidate) -> f64 {
    c.score.unwrap_or(-1.0)
}

/// Sort candidates best first (by score, unscored last; ties keep their order).
pub fn sort_candidates(cands: &mut [Candidate]) {
    cands.sort_by(|a, b| score_of(b).total_cmp(&score_of(a)));
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn merge_keeps_higher_score_and_sorts() {
        let mut a = Item::new_word("Quay");
        let mut low = Candidate::new("K IY1", "rules:en");
        low.score = Some(0.2);
        a.candidates.push(low);
        let mut b = Item::new_word("quay");
        let mut high = Candidate::new("K IY1", "g2p");
        high.score = Some(0.7);
        let mut other = Candidate::new("K W EY1", "g2p");
        other.score = Some(0.1);
        b.candidates.push(other);
        b.candidates.push(high);
        b.context = "to the quay".into();
        a.merge(b);
        assert_eq!(a.candidates.len(), 2);
        assert_eq!(a.candidates[0].source, "g2p");
        assert_eq!(a.candidates[0].score, Some(0.7));
        assert_eq!(a.context, "to the quay");
    }

    #[test]
    fn keys_separate_kinds() {
        let n = Item::new_word("read");
        let mut v = Item::new_word("read");
        v.kind = ItemKind::Variant { canonical: "R IY1 D".into(), profile: "p".into() };
        assert_ne!(n.key(), v.key());
    }

    #[test]
    fn item_round_trips_through_json() {
        let mut item = Item::new_word("ferry");
        item.kind = ItemKind::Audit {
            check: "unknown-phone".into(),
            current: "F EH1 R IY0".into(),
            message: "m".into(),
            line: 4,
        };
        let mut c = Candidate::new("F EH1 R IY0", "g2p");
        c.alignment.push(AlignPair { letters: "f".into(), phones: "F".into() });
        item.candidates.push(c);
        let text = serde_json::to_string(&item).unwrap();
        let back: Item = serde_json::from_str(&text).unwrap();
        assert_eq!(back, item);
    }
}
