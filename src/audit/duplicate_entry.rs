//! `duplicate-entry`: the same headword with the same pronunciation on two rows.
//!
//! Headwords are compared exactly as written and pronunciations token by token (so `K  IY1` equals
//! `K IY1`). Spellings that differ only by normalisation are `normalization-duplicate`'s business.
//! The first row is kept; every later copy is reported, naming the first.

use super::{Check, Context, Finding, Severity};

/// Reports rows that repeat an earlier row's headword and pronunciation.
pub struct DuplicateEntry;

impl Check for DuplicateEntry {
    fn id(&self) -> &'static str {
        "duplicate-entry"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "the same headword with the same pronunciation twice"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        context.each_group(2, |group, out| {
            for (n, &id) in group.iter().enumerate() {
                let entry = &entries[id];
                let first = group[..n].iter().copied().find(|&earlier| {
                    let other = &entries[earlier];
                    other.word == entry.word && other.phones().eq(entry.phones())
                });
                if let Some(first) = first {
                    let message = format!("repeats line {} (same headword, same pronunciation)", entries[first].line);
                    let finding = Finding::new(self.id(), self.severity(), id, entry, message)
                        .suggest(format!("delete this row; line {} keeps it", entries[first].line))
                        .relate(vec![first]);
                    out.push(finding);
                }
            }
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn later_copies_are_reported_against_the_first() {
        let rows = entries(&[("quay", "K IY1"), ("quay", "K EY1"), ("quay", "K  IY1"), ("pier", "P IH1 R"), ("quay", "K IY1")]);
        let found = with(&rows, |c| DuplicateEntry.run(c));
        let mut ids: Vec<(usize, Vec<usize>)> = found.iter().map(|f| (f.entry, f.related.clone())).collect();
        ids.sort();
        assert_eq!(ids, [(2, vec![0]), (4, vec![0])]);
        assert!(found[0].message.contains("line 2"));
    }

    #[test]
    fn variants_and_other_spellings_are_not_duplicates() {
        let rows = entries(&[("quay", "K IY1"), ("quay", "K IY0"), ("Quay", "K IY1"), ("quay ", "K IY1")]);
        assert!(with(&rows, |c| DuplicateEntry.run(c)).is_empty());
    }
}
