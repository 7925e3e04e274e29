//! Decisions on many items at once: accept the best candidate of every pending item that scores
//! at least a threshold, reject those below one, remove items from review or bring them back.
//! Each item gets its own journal record, exactly as if a reviewer had decided it on the screen
//! (so the screen's undo and `apply` treat them alike); the records of one batch are written
//! with one fsync.
//!
//! A [`Selection`] says which items a batch is about (kind, the best candidate's source,
//! origin, words); [`plan_batch`], [`plan_removal`] and [`plan_restore`] compute the records
//! without writing anything; [`run_batch`] writes them into a project's journal. Scores are
//! read as the probability that a candidate is right, so the expected number of wrong
//! decisions in a batch is the sum of `1 − p` over the accepted candidates and of `p` over the
//! rejected ones (the expectation of a sum of Bernoulli variables is the sum of their means;
//! common practice).

use std::collections::HashSet;
use std::ops::RangeInclusive;

use super::error::QueueError;
use super::item::Item;
use super::journal::{Action, Decision, Journal, JournalError, Record};
use super::ledger::Ledger;
use super::state::ItemState;
use super::store::Queue;
use crate::project::Project;

/// Which queued items a batch is about. Every field that is set must match; an empty
/// selection matches every item.
#[derive(Debug, Clone, Default)]
pub struct Selection {
    /// The item's kind tag (`new`, `variant`, `audit`; see [`ItemKind::tag`](super::ItemKind::tag)).
    pub kind: Option<String>,
    /// The source of the item's best candidate: `S` matches the source `S` and every source
    /// that begins `S:` or `S+` (so `variant` matches `variant:flapping+t-glottal` and `rules`
    /// matches `rules:en`).
    pub source: Option<String>,
    /// The item's origin (`words:FILE`, `corpus:FILE`, `variants:PROFILE`, `audit:CHECK`); a
    /// name without `:` matches every origin of that kind, and every origin the item was seen
    /// in counts.
    pub origin: Option<String>,
    /// The item's word, compared without regard to case (any of these).
    pub words: Vec<String>,
}

impl Selection {
    /// Whether `item` is selected.
    ///
    /// ```
    /// use orthoepy::queue::{Candidate, Item, Selection};
    /// let mut item = Item::new_word("Kelport");
    /// item.seen_in("corpus:queries.txt", 3);
    /// item.candidates.push(Candidate::new("K EH1 L P AO2 R T", "rules:en"));
    /// let by_source = Selection { source: Some("rules".into()), ..Selection::default() };
    /// assert!(by_source.matches(&item));
    /// let by_origin = Selection { origin: Some("words".into()), ..Selection::default() };
    /// assert!(!by_origin.matches(&item));
    /// ```
    pub fn matches(&self, item: &Item) -> bool {
        let kind = self.kind.as_deref().map_or(true, |k| item.kind.tag() == k);
        let source = self.source.as_deref().map_or(true, |s| {
            item.candidates.first().is_some_and(|best| source_matches(&best.source, s))
        });
        let origin = self.origin.as_deref().map_or(true, |o| {
            item.origin_counts().keys().chain(std::iter::once(&item.origin)).any(|have| origin_matches(have, o))
        });
        let word = self.words.is_empty() || self.words.iter().any(|w| w.to_lowercase() == item.word.to_lowercase());
        kind && source && origin && word
    }
}

fn source_matches(source: &str, wanted: &str) -> bool {
    source == wanted
        || source.strip_prefix(wanted).is_some_and(|rest| rest.starts_with(':') || rest.starts_with('+'))
}

fn origin_matches(origin: &str, wanted: &str) -> bool {
    origin == wanted || (!wanted.contains(':') && origin.split_once(':').is_some_and(|(kind, _)| kind == wanted))
}

/// What a batch decides about the selected pending items.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Threshold {
    /// Accept the best candidate of every item whose best candidate scores at least this.
    AcceptAbove(f64),
    /// Reject every item whose best candidate scores below this.
    RejectBelow(f64),
}

/// The records a batch would write, and what they are expected to cost.
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct BatchPlan {
    /// One decision per item, in queue order.
    pub decisions: Vec<Decision>,
    /// Expected number of wrong decisions: Σ (1 − p) over acceptances, Σ p over rejections.
    pub expected_wrong: f64,
    /// Pending items the selection matched.
    pub considered: usize,
    /// Of those, items left alone because their best candidate has no score (or there is no
    /// candidate at all).
    pub unscored: usize,
}

/// The pending items of `queue` that `selection` matches, with the best candidate of each.
fn pending<'a>(queue: &'a Queue, ledger: &'a Ledger, selection: &'a Selection) -> impl Iterator<Item = &'a Item> {
    queue.items().iter().filter(move |item| state_of(ledger, item) == ItemState::Pending && selection.matches(item))
}

fn state_of(ledger: &Ledger, item: &Item) -> ItemState {
    let key = item.key();
    ItemState::of(ledger.current(&key).map(|(_, d)| &d.action), ledger.is_applied(&key))
}

/// Plans a batch decision over the pending items `selection` matches (nothing is written).
///
/// ```
/// use orthoepy::queue::{plan_batch, Candidate, Item, Ledger, Queue, Selection, Threshold};
/// let mut queue = Queue::new();
/// for (word, p) in [("Kelport", 0.97), ("Brannoch", 0.6)] {
///     let mut item = Item::new_word(word);
///     let mut c = Candidate::new("K EH1 L P AO2 R T", "g2p");
///     c.score = Some(p);
///     item.candidates.push(c);
///     queue.add(item);
/// }
/// let plan = plan_batch(&queue, &Ledger::default(), &Selection::default(), Threshold::AcceptAbove(0.9));
/// assert_eq!(plan.decisions.len(), 1);
/// assert!((plan.expected_wrong - 0.03).abs() < 1e-9);
/// ```
pub fn plan_batch(queue: &Queue, ledger: &Ledger, selection: &Selection, threshold: Threshold) -> BatchPlan {
    plan_over(pending(queue, ledger, selection), threshold)
}

/// Plans a batch decision over exactly these items (the caller has chosen them, e.g. the pending
/// items the review screen's filter shows; nothing is written).
///
/// ```
/// use orthoepy::queue::{plan_over, Candidate, Item, Threshold};
/// let mut item = Item::new_word("Kelport");
/// let mut c = Candidate::new("K EH1 L P AO2 R T", "g2p");
/// c.score = Some(0.2);
/// item.candidates.push(c);
/// let plan = plan_over([&item], Threshold::RejectBelow(0.5));
/// assert_eq!(plan.decisions.len(), 1);
/// assert!((plan.expected_wrong - 0.2).abs() < 1e-12);
/// ```
pub fn plan_over<'a>(items: impl IntoIterator<Item = &'a Item>, threshold: Threshold) -> BatchPlan {
    let mut plan = BatchPlan::default();
    for item in items {
        plan.considered += 1;
        let Some((best, p)) = item.candidates.first().and_then(|c| c.score.filter(|p| p.is_finite()).map(|p| (c, p))) else {
            plan.unscored += 1;
            continue;
        };
        let action = match threshold {
            Threshold::AcceptAbove(min) if p >= min => {
                plan.expected_wrong += 1.0 - p;
                Action::Accept { pronunciation: best.pronunciation.clone(), source: best.source.clone(), score: Some(p), edited: false }
            }
            Threshold::RejectBelow(max) if p < max => {
                plan.expected_wrong += p;
                Action::Reject
            }
            _ => continue,
        };
        plan.decisions.push(Decision { item: item.key(), word: item.word.clone(), action, note: String::new() });
    }
    plan
}

/// Plans removing the selected pending and set-aside items from review (decided items must be
/// undone first; nothing is written).
pub fn plan_removal(queue: &Queue, ledger: &Ledger, selection: &Selection) -> Vec<Decision> {
    queue
        .items()
        .iter()
        .filter(|item| matches!(state_of(ledger, item), ItemState::Pending | ItemState::Aside) && selection.matches(item))
        .map(|item| Decision { item: item.key(), word: item.word.clone(), action: Action::Remove, note: String::new() })
        .collect()
}

/// Plans bringing the selected removed items back into review: one revocation of each removal
/// (nothing is written).
pub fn plan_restore(queue: &Queue, ledger: &Ledger, selection: &Selection) -> Vec<Record> {
    queue
        .items()
        .iter()
        .filter(|item| selection.matches(item))
        .filter_map(|item| match ledger.current(&item.key()) {
            Some((seq, d)) if d.action == Action::Remove => Some(Record::Revoke { seq }),
            _ => None,
        })
        .collect()
}

/// Plans revoking the `count` most recent decisions not yet merged into the lexicon, newest
/// first (nothing is written); how `queue undo` takes back a batch.
pub fn plan_undo(ledger: &Ledger, count: usize) -> Vec<Record> {
    let unapplied = ledger.unapplied();
    unapplied.iter().rev().take(count).map(|(seq, _)| Record::Revoke { seq: *seq }).collect()
}

/// What a batch operation on a project's review files is.
#[derive(Debug, Clone)]
pub enum BatchRequest {
    /// Accept or reject by score.
    Decide(Selection, Threshold),
    /// Remove items from review.
    Remove(Selection),
    /// Bring removed items back.
    Restore(Selection),
    /// Revoke the most recent unmerged decisions.
    Undo(usize),
}

/// The result of [`run_batch`].
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct BatchRun {
    /// The decisions made (empty for restore and undo).
    pub plan: BatchPlan,
    /// Records written or, in a dry run, that would be.
    pub records: usize,
    /// Sequence numbers of the records written (none in a dry run or when there was nothing to do).
    pub written: Option<RangeInclusive<u64>>,
}

/// Errors of [`run_batch`].
#[derive(Debug, thiserror::Error)]
pub enum BatchError {
    /// The queue could not be read.
    #[error(transparent)]
    Queue(#[from] QueueError),
    /// The journal could not be read or written.
    #[error(transparent)]
    Journal(#[from] JournalError),
}

/// Plans `request` against the project's queue and journal and, unless `dry_run`, writes its
/// records into the journal (one write, one fsync). The caller holds the project lock unless
/// it is a dry run (which only reads).
pub fn run_batch(project: &Project, request: &BatchRequest, dry_run: bool) -> Result<BatchRun, BatchError> {
    let queue = Queue::load(&project.queue)?;
    let (records, _) = Journal::read(&project.journal)?;
    let ledger = Ledger::replay(&records);
    let (plan, records) = match request {
        BatchRequest::Decide(selection, threshold) => {
            let plan = plan_batch(&queue, &ledger, selection, *threshold);
            let records = plan.decisions.iter().cloned().map(Record::Decide).collect();
            (plan, records)
        }
        BatchRequest::Remove(selection) => {
            (BatchPlan::default(), plan_removal(&queue, &ledger, selection).into_iter().map(Record::Decide).collect())
        }
        BatchRequest::Restore(selection) => (BatchPlan::default(), plan_restore(&queue, &ledger, selection)),
        BatchRequest::Undo(count) => (BatchPlan::default(), plan_undo(&ledger, *count)),
    };
    let mut run = BatchRun { plan, records: records.len(), written: None };
    if dry_run || records.is_empty() {
        return Ok(run);
    }
    let (mut journal, _) = Journal::open(&project.journal)?;
    run.written = Some(journal.append_all(records)?);
    Ok(run)
}

/// Keys of the items whose decision in force removes them from review.
pub fn removed_keys(queue: &Queue, ledger: &Ledger) -> HashSet<String> {
    queue.items().iter().map(Item::key).filter(|key| matches!(ledger.current(key), Some((_, d)) if d.action == Action::Remove)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::queue::{Candidate, ItemKind};

    fn item(word: &str, source: &str, score: Option<f64>) -> Item {
        let mut item = Item::new_word(word);
        let mut c = Candidate::new("K IY1", source);
        c.score = score;
        item.candidates.push(c);
        item
    }

    fn queue_of(items: Vec<Item>) -> Queue {
        let mut q = Queue::new();
        for i in items {
            q.add(i);
        }
        q
    }

    #[test]
    fn accept_above_takes_only_pending_scored_items_at_or_over_the_threshold() {
        let q = queue_of(vec![item("a", "g2p", Some(0.9)), item("b", "g2p", Some(0.89)), item("c", "g2p", None), item("d", "g2p", Some(1.0))]);
        let mut ledger = Ledger::default();
        ledger.record(1, &Record::Decide(Decision { item: "new:d".into(), word: "d".into(), action: Action::Reject, note: String::new() }));
        let plan = plan_batch(&q, &ledger, &Selection::default(), Threshold::AcceptAbove(0.9));
        let words: Vec<&str> = plan.decisions.iter().map(|d| d.word.as_str()).collect();
        assert_eq!(words, ["a"], "b is below, c has no score, d is decided");
        assert_eq!((plan.considered, plan.unscored), (3, 1));
        assert!((plan.expected_wrong - 0.1).abs() < 1e-12);
    }

    #[test]
    fn reject_below_expects_the_rejected_scores_to_be_wrong_decisions() {
        let q = queue_of(vec![item("a", "g2p", Some(0.2)), item("b", "g2p", Some(0.1)), item("c", "g2p", Some(0.5))]);
        let plan = plan_batch(&q, &Ledger::default(), &Selection::default(), Threshold::RejectBelow(0.5));
        assert_eq!(plan.decisions.len(), 2);
        assert!(plan.decisions.iter().all(|d| d.action == Action::Reject));
        assert!((plan.expected_wrong - 0.3).abs() < 1e-12);
    }

    #[test]
    fn selection_by_kind_source_origin_and_word() {
        let mut variant = item("ferry", "variant:flapping+t-glottal", Some(0.4));
        variant.kind = ItemKind::Variant { canonical: "F EH1 R IY0".into(), profile: "coast".into() };
        variant.seen_in("variants:coast", 0);
        let mut word = item("Kelport", "rules:en", Some(0.3));
        word.seen_in("corpus:queries.txt", 2);
        let pick = |s: Selection| [&variant, &word].iter().filter(|i| s.matches(i)).map(|i| i.word.clone()).collect::<Vec<_>>();
        assert_eq!(pick(Selection { kind: Some("variant".into()), ..Default::default() }), ["ferry"]);
        assert_eq!(pick(Selection { source: Some("variant:flapping".into()), ..Default::default() }), ["ferry"]);
        assert_eq!(pick(Selection { source: Some("rules".into()), ..Default::default() }), ["Kelport"]);
        assert!(pick(Selection { source: Some("rule".into()), ..Default::default() }).is_empty(), "no partial names");
        assert_eq!(pick(Selection { origin: Some("corpus".into()), ..Default::default() }), ["Kelport"]);
        assert_eq!(pick(Selection { origin: Some("variants:coast".into()), ..Default::default() }), ["ferry"]);
        assert_eq!(pick(Selection { words: vec!["KELPORT".into()], ..Default::default() }), ["Kelport"]);
    }

    #[test]
    fn removal_and_restore_are_revocable_decisions() {
        let q = queue_of(vec![item("a", "g2p", Some(0.9)), item("b", "g2p", Some(0.9))]);
        let removal = plan_removal(&q, &Ledger::default(), &Selection { words: vec!["a".into()], ..Default::default() });
        assert_eq!(removal.len(), 1);
        let mut ledger = Ledger::default();
        ledger.record(1, &Record::Decide(removal[0].clone()));
        assert_eq!(state_of(&ledger, &q.items()[0]), ItemState::Removed);
        assert_eq!(removed_keys(&q, &ledger).len(), 1);
        assert!(plan_batch(&q, &ledger, &Selection::default(), Threshold::AcceptAbove(0.0)).decisions.iter().all(|d| d.word == "b"));
        let restore = plan_restore(&q, &ledger, &Selection::default());
        assert_eq!(restore, vec![Record::Revoke { seq: 1 }]);
        ledger.record(2, &restore[0]);
        assert_eq!(state_of(&ledger, &q.items()[0]), ItemState::Pending);
    }

    #[test]
    fn undo_takes_back_the_newest_unmerged_decisions_first() {
        let mut ledger = Ledger::default();
        for (seq, w) in [(1, "a"), (2, "b"), (3, "c")] {
            ledger.record(seq, &Record::Decide(Decision { item: format!("new:{w}"), word: w.into(), action: Action::Reject, note: String::new() }));
        }
        ledger.record(4, &Record::Applied { through: 1 });
        assert_eq!(plan_undo(&ledger, 5), vec![Record::Revoke { seq: 3 }, Record::Revoke { seq: 2 }]);
    }
}
