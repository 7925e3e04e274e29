//! Comparing two versions of a lexicon: per headword (normalised by the lexicon's policy), the
//! pronunciations added and removed, and — where a word lost some and gained others — the i-th
//! removed paired with the i-th added as a change, with a phone-level alignment
//! ([`crate::support::align`], unit costs). Statuses, sources and notes are not compared.
//! Deprecated entries count as absent.

use std::collections::BTreeMap;

use crate::lexicon::{normalize_key, Entry, HeadwordPolicy, Status};
use crate::support::align::align;

/// What happened to one pronunciation of a word.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "kind")]
pub enum Change {
    /// Only in the new lexicon.
    Added {
        /// The pronunciation.
        new: String,
    },
    /// Only in the old lexicon.
    Removed {
        /// The pronunciation.
        old: String,
    },
    /// Replaced: the old pronunciation, the new one, and their phone alignment.
    Changed {
        /// Before.
        old: String,
        /// After.
        new: String,
        /// Aligned phones: (old phone, new phone); one side is empty for an insertion or
        /// deletion.
        alignment: Vec<(String, String)>,
    },
}

/// The changes of one headword.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct WordDiff {
    /// The headword as written in the new lexicon (else the old).
    pub word: String,
    /// Its changes, removed-and-added pairs first.
    pub changes: Vec<Change>,
}

/// The words whose pronunciations differ between `old` and `new`, in headword order.
///
/// ```
/// use orthoepy::diff::{diff_entries, Change};
/// use orthoepy::lexicon::{Entry, HeadwordPolicy};
/// let old = [Entry::new("tomato", "T AH0 M EY1 T OW2"), Entry::new("ferry", "F EH1 R IY0")];
/// let new = [Entry::new("tomato", "T AH0 M AA1 T OW2"), Entry::new("ferry", "F EH1 R IY0")];
/// let diff = diff_entries(&old, &new, &HeadwordPolicy::default());
/// assert_eq!(diff.len(), 1);
/// let Change::Changed { alignment, .. } = &diff[0].changes[0] else { panic!() };
/// assert_eq!(alignment[2], ("M".to_string(), "M".to_string()));
/// assert_eq!(alignment[3], ("EY1".to_string(), "AA1".to_string()));
/// ```
pub fn diff_entries(old: &[Entry], new: &[Entry], policy: &HeadwordPolicy) -> Vec<WordDiff> {
    let mut words: BTreeMap<String, (String, Vec<String>, Vec<String>)> = BTreeMap::new();
    for (side, entries) in [(0, old), (1, new)] {
        for e in entries.iter().filter(|e| e.status != Status::Deprecated) {
            let key = normalize_key(e.word.trim(), policy).into_owned();
            let slot = words.entry(key).or_insert_with(|| (e.word.trim().to_string(), Vec::new(), Vec::new()));
            if side == 1 {
                slot.0 = e.word.trim().to_string();
            }
            let list = if side == 0 { &mut slot.1 } else { &mut slot.2 };
            let pron = crate::lexicon::join_phones(e.phones());
            if !list.contains(&pron) {
                list.push(pron);
            }
        }
    }
    let mut out = Vec::new();
    for (_, (word, before, after)) in words {
        let removed: Vec<&String> = before.iter().filter(|p| !after.contains(p)).collect();
        let added: Vec<&String> = after.iter().filter(|p| !before.contains(p)).collect();
        let mut changes: Vec<Change> = removed.iter().zip(&added).map(|(o, n)| changed(o, n)).collect();
        let paired = changes.len();
        changes.extend(removed.iter().skip(paired).map(|o| Change::Removed { old: o.to_string() }));
        changes.extend(added.iter().skip(paired).map(|n| Change::Added { new: n.to_string() }));
        if !changes.is_empty() {
            out.push(WordDiff { word, changes });
        }
    }
    out
}

fn changed(old: &str, new: &str) -> Change {
    let (a, b): (Vec<&str>, Vec<&str>) = (old.split(' ').collect(), new.split(' ').collect());
    let found = align(a.len(), b.len(), 1usize, |i, j| usize::from(a.get(i) != b.get(j)));
    let pick = |side: &[&str], at: Option<usize>| at.and_then(|i| side.get(i)).map_or(String::new(), |s| s.to_string());
    let alignment = found.pairs.iter().map(|&(i, j)| (pick(&a, i), pick(&b, j))).collect();
    Change::Changed { old: old.to_string(), new: new.to_string(), alignment }
}

/// The alignment written for people: `AA1` for a match, `EY1>AA1` for a substitution, `-T` for
/// a deletion, `+T` for an insertion.
///
/// ```
/// let pairs = [("T".to_string(), "T".to_string()), ("EY1".to_string(), "AA1".to_string()), ("".to_string(), "S".to_string())];
/// assert_eq!(orthoepy::diff::alignment_text(&pairs), "T EY1>AA1 +S");
/// ```
pub fn alignment_text(alignment: &[(String, String)]) -> String {
    let cells: Vec<String> = alignment
        .iter()
        .map(|(o, n)| match (o.is_empty(), n.is_empty()) {
            (true, _) => format!("+{n}"),
            (_, true) => format!("-{o}"),
            _ if o == n => o.clone(),
            _ => format!("{o}>{n}"),
        })
        .collect();
    cells.join(" ")
}
