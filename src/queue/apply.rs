//! Merging decisions into a lexicon, in memory: accepted new words become entries, accepted
//! variants become extra entries, accepted audit fixes replace the flagged pronunciation.
//! Decisions the lexicon has meanwhile made moot are skipped; decisions it now contradicts are
//! conflicts, and a decision whose pronunciation does not parse in the project's phoneset
//! (unknown phone, stress mark out of place) or whose headword holds a control character is
//! invalid: the journal is not trusted to hold only what the review screen checked. Both block
//! the save (the caller refuses unless told to merge the rest, and then withdraws those decisions
//! so their items come back for review).
//!
//! Saving the lexicon and marking the journal are the caller's (through `Lexicon::save` and
//! [`Journal::append`](super::Journal::append)); this file only edits the in-memory lexicon.

use std::collections::HashMap;

use crate::lexicon::{check_controls, normalize_key, Entry, Lexicon, Status};
use crate::phoneset::Phoneset;

use super::item::ItemKind;
use super::journal::{Action, Decision};
use super::ledger::Ledger;
use super::store::Queue;

/// What one decision did, or would do.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(tag = "outcome", rename_all = "snake_case")]
pub enum Outcome {
    /// A new entry was added.
    Added {
        /// Headword.
        word: String,
        /// Its pronunciation.
        pronunciation: String,
    },
    /// An entry's pronunciation was replaced (audit fix).
    Replaced {
        /// Headword.
        word: String,
        /// What it was.
        old: String,
        /// What it is now.
        new: String,
    },
    /// An entry was marked deprecated.
    Deprecated {
        /// Headword.
        word: String,
        /// The deprecated pronunciation.
        pronunciation: String,
    },
    /// Nothing to change (rejected, or the lexicon already has it).
    Unchanged {
        /// Headword.
        word: String,
        /// Why.
        reason: String,
    },
    /// The decision cannot be merged as it is: its pronunciation does not parse in the
    /// project's phoneset, or its headword holds a control character. Nothing was changed for it.
    Invalid {
        /// Journal sequence number of the decision (to withdraw it and review the item again).
        seq: u64,
        /// Headword.
        word: String,
        /// What is wrong and what to do.
        reason: String,
    },
    /// The lexicon now contradicts the decision; nothing was changed for it.
    Conflict {
        /// Journal sequence number of the decision (to withdraw it and review the item again).
        seq: u64,
        /// Headword.
        word: String,
        /// What contradicts it.
        reason: String,
    },
}

impl Outcome {
    /// Whether this outcome changed the lexicon (added, replaced or deprecated an entry).
    pub fn changes_lexicon(&self) -> bool {
        matches!(self, Outcome::Added { .. } | Outcome::Replaced { .. } | Outcome::Deprecated { .. })
    }
}

/// The result of [`apply_decisions`].
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct ApplyReport {
    /// One outcome per decision considered, in journal order.
    pub outcomes: Vec<Outcome>,
    /// Highest journal sequence number considered (mark the journal applied through it).
    pub through: u64,
}

impl ApplyReport {
    /// Whether any decision blocks the save: a conflict with the lexicon or an invalid decision.
    pub fn has_conflicts(&self) -> bool {
        !self.conflicts().is_empty()
    }

    /// Whether any decision is invalid (see [`Outcome::Invalid`]).
    pub fn has_invalid(&self) -> bool {
        self.outcomes.iter().any(|o| matches!(o, Outcome::Invalid { .. }))
    }

    /// Journal sequence numbers of the decisions that block the save (conflicting or invalid),
    /// oldest first.
    pub fn conflicts(&self) -> Vec<u64> {
        self.outcomes
            .iter()
            .filter_map(|o| match o {
                Outcome::Conflict { seq, .. } | Outcome::Invalid { seq, .. } => Some(*seq),
                _ => None,
            })
            .collect()
    }

    /// Whether the lexicon was changed.
    pub fn changed(&self) -> bool {
        self.outcomes.iter().any(Outcome::changes_lexicon)
    }
}

/// Merge every decision in force that is not applied yet (set-aside and removed items stay out)
/// into `lexicon`; decided pronunciations are checked against `phoneset` first.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// use orthoepy::queue::{apply_decisions, Action, Candidate, Decision, Item, Ledger, Queue, Record};
/// let mut queue = Queue::new();
/// let mut item = Item::new_word("Kelport");
/// item.candidates.push(Candidate::new("K EH1 L P AO2 R T", "g2p"));
/// queue.add(item);
/// let mut ledger = Ledger::default();
/// ledger.record(1, &Record::Decide(Decision {
///     item: "new:kelport".into(), word: "Kelport".into(), note: "reviewed by ana".into(),
///     action: Action::Accept { pronunciation: "K EH1 L P AO2 R T".into(), source: "g2p".into(), score: None, edited: false },
/// }));
/// let mut lexicon = Lexicon::from_entries(vec![Entry::new("quay", "K IY1")], HeadwordPolicy { fold_case: true });
/// let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
/// let report = apply_decisions(&mut lexicon, &queue, &ledger, &set);
/// assert!(report.changed() && !report.has_conflicts());
/// assert_eq!(lexicon.entries().len(), 2);
/// ```
pub fn apply_decisions(lexicon: &mut Lexicon, queue: &Queue, ledger: &Ledger, phoneset: &Phoneset) -> ApplyReport {
    let mut report = ApplyReport { outcomes: Vec::new(), through: ledger.last_seq() };
    let policy = *lexicon.policy();
    // Entries by normalised headword, kept up to date as entries are added, so each decision
    // costs a hash look-up rather than a pass over the lexicon.
    let mut by_word: HashMap<String, Vec<usize>> = HashMap::new();
    for (i, e) in lexicon.entries().iter().enumerate() {
        by_word.entry(normalize_key(e.word.trim(), &policy).into_owned()).or_default().push(i);
    }
    for (seq, decision) in ledger.unapplied() {
        if matches!(decision.action, Action::SetAside | Action::Remove) {
            continue;
        }
        let outcome = match invalid(decision, queue, phoneset) {
            Some(reason) => Outcome::Invalid { seq, word: decision.word.clone(), reason },
            None => apply_one(lexicon, &mut by_word, queue, seq, decision),
        };
        report.outcomes.push(outcome);
    }
    report
}

/// Why an accepted decision cannot be merged as it is, if it cannot.
fn invalid(d: &Decision, queue: &Queue, phoneset: &Phoneset) -> Option<String> {
    let pronunciation = match &d.action {
        Action::Accept { pronunciation, .. } | Action::ChangeEntry { pronunciation, .. } | Action::AddVariant { pronunciation } => {
            pronunciation
        }
        Action::Reject | Action::SetAside | Action::Remove | Action::DeprecateEntry { .. } => return None,
    };
    let word = queue.get(&d.item).map_or(d.word.as_str(), |item| item.word.as_str());
    if let Err(problem) = check_controls(word) {
        return Some(format!("{problem}; the item cannot be merged"));
    }
    phoneset.parse(pronunciation).err().map(|problem| {
        format!("the decided pronunciation /{pronunciation}/ does not parse in phoneset {}: {problem}; review the item again", phoneset.id())
    })
}

fn apply_one(lexicon: &mut Lexicon, by_word: &mut HashMap<String, Vec<usize>>, queue: &Queue, seq: u64, d: &Decision) -> Outcome {
    if let Some(outcome) = super::entry_edit::apply_entry_edit(lexicon, by_word, seq, d) {
        return outcome;
    }
    let word = d.word.clone();
    let Some(item) = queue.get(&d.item) else {
        return Outcome::Conflict { seq, word, reason: format!("item {} is no longer in the queue", d.item) };
    };
    let Action::Accept { pronunciation, source, score, edited } = &d.action else {
        return Outcome::Unchanged { word, reason: "rejected".into() };
    };
    let policy = *lexicon.policy();
    let key = normalize_key(item.word.trim(), &policy).into_owned();
    let ids: Vec<usize> = by_word.get(&key).cloned().unwrap_or_default();
    let existing: Vec<String> = ids.iter().filter_map(|&i| lexicon.entries().get(i)).map(|e| e.pronunciation.to_string()).collect();
    let has = |p: &str| existing.iter().any(|e| e == p);
    if has(pronunciation) && !matches!(item.kind, ItemKind::Audit { .. }) {
        return Outcome::Unchanged { word, reason: "already in the lexicon".into() };
    }
    let mut entry = Entry::new(&item.word, pronunciation);
    entry.status = Status::Accepted;
    entry.source = if *edited { "review".into() } else { source.as_str().into() };
    entry.score = *score;
    entry.note = d.note.as_str().into();
    match &item.kind {
        ItemKind::NewWord if !existing.is_empty() => Outcome::Conflict {
            seq,
            word,
            reason: format!("added to the lexicon meanwhile as /{}/; review it again", existing.join("/, /")),
        },
        ItemKind::Variant { canonical, .. } if !has(canonical) => Outcome::Conflict {
            seq,
            word,
            reason: format!("its canonical form /{canonical}/ is no longer in the lexicon"),
        },
        ItemKind::NewWord | ItemKind::Variant { .. } => {
            by_word.entry(key).or_default().push(lexicon.entries().len());
            lexicon.push(entry);
            Outcome::Added { word, pronunciation: pronunciation.clone() }
        }
        ItemKind::Audit { current, .. } => {
            if current == pronunciation {
                return Outcome::Unchanged { word, reason: "kept as it is".into() };
            }
            let at = ids.iter().copied().find(|&i| lexicon.entries().get(i).is_some_and(|e| e.pronunciation == *current));
            let target = at.and_then(|i| lexicon.entries_mut().get_mut(i));
            match target {
                Some(e) => {
                    e.pronunciation = pronunciation.as_str().into();
                    e.status = Status::Accepted;
                    e.source = entry.source;
                    e.note = entry.note;
                    Outcome::Replaced { word, old: current.clone(), new: pronunciation.clone() }
                }
                None if existing.contains(pronunciation) => {
                    Outcome::Unchanged { word, reason: "already fixed in the lexicon".into() }
                }
                None => Outcome::Conflict {
                    seq,
                    word,
                    reason: format!("the flagged entry /{current}/ changed since the audit; audit again"),
                },
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::HeadwordPolicy;
    use crate::queue::{Item, Record};

    fn accept(item: &Item, p: &str) -> Record {
        Record::Decide(Decision {
            item: item.key(),
            word: item.word.clone(),
            note: String::new(),
            action: Action::Accept { pronunciation: p.into(), source: "g2p".into(), score: Some(0.5), edited: false },
        })
    }

    fn arpa() -> Phoneset {
        Phoneset::shipped("en-arpa").unwrap()
    }

    #[test]
    fn pronunciations_outside_the_phoneset_are_invalid_and_block_the_save() {
        let mut q = Queue::new();
        let a = Item::new_word("Kelport");
        let b = Item::new_word("quay");
        q.add(a.clone());
        q.add(b.clone());
        let mut l = Ledger::default();
        l.record(1, &accept(&a, "K EH1 L P QQ1 T"));
        l.record(2, &accept(&b, "K IY9"));
        let mut lexicon = lex(&[]);
        let r = apply_decisions(&mut lexicon, &q, &l, &arpa());
        assert!(matches!(&r.outcomes[0], Outcome::Invalid { seq: 1, reason, .. } if reason.contains("QQ")), "{:?}", r.outcomes);
        assert!(matches!(&r.outcomes[1], Outcome::Invalid { seq: 2, .. }));
        assert!(r.has_invalid() && r.has_conflicts());
        assert_eq!(r.conflicts(), [1, 2]);
        assert!(lexicon.entries().is_empty());
    }

    fn lex(entries: &[(&str, &str)]) -> Lexicon {
        Lexicon::from_entries(entries.iter().map(|(w, p)| Entry::new(w, p)).collect(), HeadwordPolicy { fold_case: true })
    }

    #[test]
    fn new_word_added_meanwhile_is_a_conflict_and_same_pron_is_skipped() {
        let mut q = Queue::new();
        let a = Item::new_word("Kelport");
        let b = Item::new_word("Saltmarsh");
        q.add(a.clone());
        q.add(b.clone());
        let mut l = Ledger::default();
        l.record(1, &accept(&a, "K EH1 L P AO2 R T"));
        l.record(2, &accept(&b, "S AO1 L T M AA2 R SH"));
        let mut lexicon = lex(&[("kelport", "K EH1 L P ER0 T"), ("saltmarsh", "S AO1 L T M AA2 R SH")]);
        let r = apply_decisions(&mut lexicon, &q, &l, &arpa());
        assert!(matches!(r.outcomes[0], Outcome::Conflict { .. }));
        assert!(matches!(r.outcomes[1], Outcome::Unchanged { .. }));
        assert_eq!(lexicon.entries().len(), 2);
        assert_eq!(r.through, 2);
    }

    #[test]
    fn audit_fix_replaces_and_variant_needs_canonical() {
        let mut q = Queue::new();
        let mut audit = Item::new_word("ferry");
        audit.kind = ItemKind::Audit { check: "unknown-phone".into(), current: "F EH1 R EE0".into(), message: "m".into(), line: 2 };
        let mut var = Item::new_word("harbour");
        var.kind = ItemKind::Variant { canonical: "HH AA1 R B ER0".into(), profile: "coast".into() };
        q.add(audit.clone());
        q.add(var.clone());
        let mut l = Ledger::default();
        l.record(1, &accept(&audit, "F EH1 R IY0"));
        l.record(2, &accept(&var, "AA1 B AH0"));
        let mut lexicon = lex(&[("ferry", "F EH1 R EE0")]);
        let r = apply_decisions(&mut lexicon, &q, &l, &arpa());
        assert!(matches!(&r.outcomes[0], Outcome::Replaced { new, .. } if new == "F EH1 R IY0"));
        assert!(matches!(r.outcomes[1], Outcome::Conflict { .. }));
        assert_eq!(lexicon.entries()[0].status, Status::Accepted);
    }

    #[test]
    fn set_aside_and_applied_are_left_out() {
        let mut q = Queue::new();
        let a = Item::new_word("a");
        let b = Item::new_word("b");
        q.add(a.clone());
        q.add(b.clone());
        let mut l = Ledger::default();
        l.record(1, &accept(&a, "EY1"));
        l.record(2, &Record::Applied { through: 1 });
        l.record(3, &Record::Decide(Decision { item: b.key(), word: "b".into(), note: String::new(), action: Action::SetAside }));
        let mut lexicon = lex(&[]);
        let r = apply_decisions(&mut lexicon, &q, &l, &arpa());
        assert!(r.outcomes.is_empty());
        assert!(!l.is_applied(&b.key()));
    }
}
