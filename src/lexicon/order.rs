//! The entries of a lexicon grouped by normalised headword, in store order, without copying them.
//!
//! This module owns [`HeadwordGroups`]: entry ids sorted by normalised headword (then file order),
//! cut into one group per headword. Writers of whole lexicons (the build lexicon, PLS) walk it;
//! it holds two numbers per entry and no text, and a store saved by this crate is already in that
//! order, so for one the sort is skipped.

use super::entry::Entry;
use super::index::EntryId;
use super::normalize::{normalize_key, HeadwordPolicy};
use rayon::prelude::*;
use std::borrow::Cow;

/// Entry ids in store order (normalised headword, then file order), one group per headword.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordGroups, HeadwordPolicy, Status};
/// let mut gone = Entry::new("pier", "P IH1 R");
/// gone.status = Status::Deprecated;
/// let entries = [Entry::new("Quay", "K IY1"), Entry::new("ferry", "F EH1 R IY0"), gone, Entry::new("quay", "K EY1")];
/// let groups = HeadwordGroups::new(&entries, &HeadwordPolicy::default(), |e| e.status != Status::Deprecated);
/// assert_eq!(groups.iter().collect::<Vec<_>>(), [&[1][..], &[0, 3][..]]);
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct HeadwordGroups {
    ids: Vec<EntryId>,
    ends: Vec<usize>,
}

impl HeadwordGroups {
    /// Groups the entries `keep` accepts. Keys are compared as `normalize_key(word.trim())`.
    pub fn new(entries: &[Entry], policy: &HeadwordPolicy, keep: impl Fn(&Entry) -> bool + Sync) -> HeadwordGroups {
        let key = |id: EntryId| normalize_key(entries[id].word.trim(), policy);
        let kept: Vec<EntryId> = (0..entries.len()).into_par_iter().filter(|&id| keep(&entries[id])).collect();
        // A store this crate saved is in key order already: checking costs one pass and no copy.
        let sorted = kept.par_windows(2).all(|pair| key(pair[0]) <= key(pair[1]));
        let ids = if sorted {
            kept
        } else {
            let mut rows: Vec<(Cow<'_, str>, EntryId)> = kept.into_par_iter().map(|id| (key(id), id)).collect();
            rows.par_sort_unstable();
            rows.into_iter().map(|(_, id)| id).collect()
        };
        let mut ends: Vec<usize> = (1..ids.len()).into_par_iter().filter(|&i| key(ids[i - 1]) != key(ids[i])).collect();
        if !ids.is_empty() {
            ends.push(ids.len());
        }
        HeadwordGroups { ids, ends }
    }

    /// Number of groups (distinct headwords).
    pub fn len(&self) -> usize {
        self.ends.len()
    }

    /// True when no entry was kept.
    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The ids of group `n` (in file order), empty past the end.
    pub fn group(&self, n: usize) -> &[EntryId] {
        let start = if n == 0 { 0 } else { self.ends.get(n - 1).copied().unwrap_or(self.ids.len()) };
        let end = self.ends.get(n).copied().unwrap_or(start);
        &self.ids[start..end]
    }

    /// The groups in key order.
    pub fn iter(&self) -> impl Iterator<Item = &[EntryId]> + '_ {
        (0..self.len()).map(|n| self.group(n))
    }
}
