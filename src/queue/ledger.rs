//! The ledger: what the journal's records add up to. For each item, the decision in force is
//! its latest decision that has not been revoked; everything up to the last `Applied` mark is
//! already in the lexicon.
//!
//! Pure bookkeeping over [`Logged`] records; reads and writes nothing.

use std::collections::HashMap;

use super::journal::{Action, Decision, Logged, Record};

/// Decisions in force, rebuilt from journal records.
#[derive(Debug, Clone, Default)]
pub struct Ledger {
    per_item: HashMap<String, Vec<(u64, Decision)>>,
    item_of_seq: HashMap<u64, String>,
    applied_through: u64,
    last_seq: u64,
}

impl Ledger {
    /// Replay records in order.
    ///
    /// ```
    /// use orthoepy::queue::{Action, Decision, Ledger, Logged, Record};
    /// let d = Decision { item: "new:quay".into(), word: "quay".into(), action: Action::Reject, note: String::new() };
    /// let records = vec![
    ///     Logged { seq: 1, record: Record::Decide(d) },
    ///     Logged { seq: 2, record: Record::Revoke { seq: 1 } },
    /// ];
    /// let ledger = Ledger::replay(&records);
    /// assert!(ledger.current("new:quay").is_none());
    /// ```
    pub fn replay(records: &[Logged]) -> Ledger {
        let mut ledger = Ledger::default();
        for r in records {
            ledger.record(r.seq, &r.record);
        }
        ledger
    }

    /// Take one more record into account.
    pub fn record(&mut self, seq: u64, record: &Record) {
        self.last_seq = self.last_seq.max(seq);
        match record {
            Record::Decide(d) => {
                self.item_of_seq.insert(seq, d.item.clone());
                self.per_item.entry(d.item.clone()).or_default().push((seq, d.clone()));
            }
            Record::Revoke { seq: target } => {
                if let Some(key) = self.item_of_seq.remove(target) {
                    if let Some(stack) = self.per_item.get_mut(&key) {
                        stack.retain(|(s, _)| s != target);
                    }
                }
            }
            Record::Applied { through } => self.applied_through = self.applied_through.max(*through),
        }
    }

    /// The decision in force for an item, with its sequence number.
    pub fn current(&self, key: &str) -> Option<(u64, &Decision)> {
        self.per_item.get(key).and_then(|s| s.last()).map(|(seq, d)| (*seq, d))
    }

    /// The decision with this sequence number, if it is the one in force for its item.
    pub fn in_force(&self, seq: u64) -> Option<&Decision> {
        let key = self.item_of_seq.get(&seq)?;
        self.current(key).filter(|(s, _)| *s == seq).map(|(_, d)| d)
    }

    /// Whether the decision in force for this item is already merged into the lexicon
    /// (set-aside decisions never are: they stay open).
    pub fn is_applied(&self, key: &str) -> bool {
        self.current(key).is_some_and(|(seq, d)| seq <= self.applied_through && d.action != Action::SetAside)
    }

    /// Highest sequence number merged into the lexicon (0 = none).
    pub fn applied_through(&self) -> u64 {
        self.applied_through
    }

    /// Highest sequence number seen.
    pub fn last_seq(&self) -> u64 {
        self.last_seq
    }

    /// Decisions in force that are not merged yet, oldest first.
    pub fn unapplied(&self) -> Vec<(u64, &Decision)> {
        let mut out: Vec<(u64, &Decision)> = self
            .per_item
            .values()
            .filter_map(|s| s.last())
            .filter(|(seq, _)| *seq > self.applied_through)
            .map(|(seq, d)| (*seq, d))
            .collect();
        out.sort_by_key(|(seq, _)| *seq);
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(item: &str, action: Action) -> Record {
        Record::Decide(Decision { item: item.into(), word: item.into(), action, note: String::new() })
    }

    #[test]
    fn revoking_the_latest_falls_back_to_the_earlier_decision() {
        let mut l = Ledger::default();
        l.record(1, &d("a", Action::SetAside));
        l.record(2, &d("a", Action::Reject));
        l.record(3, &Record::Revoke { seq: 2 });
        assert_eq!(l.current("a").map(|(s, _)| s), Some(1));
    }

    #[test]
    fn applied_mark_splits_merged_from_pending() {
        let mut l = Ledger::default();
        l.record(1, &d("a", Action::Reject));
        l.record(2, &Record::Applied { through: 1 });
        l.record(3, &d("b", Action::Reject));
        assert!(l.is_applied("a"));
        assert!(!l.is_applied("b"));
        let pending: Vec<u64> = l.unapplied().iter().map(|(s, _)| *s).collect();
        assert_eq!(pending, vec![3]);
    }
}
