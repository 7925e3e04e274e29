//! `normalization-duplicate`: one headword written in several ways that the lexicon treats as the
//! same key — differing only by Unicode normalisation form (UAX #15), by case when the project
//! folds case, or by surrounding or repeated whitespace.
//!
//! Within a word, the reference spelling is the most frequent tidy one (trimmed, single-spaced,
//! NFC), the earliest on a tie; every row spelt otherwise is reported against it. Rows whose
//! headword holds invisible characters are left to `invisible-character`.

use super::fix::{is_tidy, repaired_headword};
use super::invisible_character::invisible_characters;
use super::{Check, Context, Finding, Severity};
use crate::lexicon::{Entry, EntryId};
use unicode_normalization::UnicodeNormalization;

/// The rows of a word group that this check and `headword-form` judge (no invisible characters).
pub(super) fn visible_rows<'e>(entries: &'e [Entry], group: &[EntryId]) -> Vec<(EntryId, &'e Entry)> {
    group.iter().map(|&id| (id, &entries[id])).filter(|(_, e)| invisible_characters(&e.word).is_empty()).collect()
}

/// Reports rows spelling a word differently from the word's other rows.
pub struct NormalizationDuplicate;

impl Check for NormalizationDuplicate {
    fn id(&self) -> &'static str {
        "normalization-duplicate"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "headwords differing only by Unicode form, folded case or whitespace"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        let folds = context.policy().fold_case;
        context.each_group(2, |group, out| {
            let rows = visible_rows(entries, group);
            let Some((reference_id, reference)) = reference_spelling(&rows) else { return };
            for &(id, entry) in &rows {
                if entry.word == reference.word {
                    continue;
                }
                let how = difference(&entry.word, &reference.word);
                let message = format!(
                    "{:?} and {:?} (line {}) are the same headword{}; they differ only by {how}",
                    entry.word,
                    reference.word,
                    reference.line,
                    if folds { " under this project's case folding" } else { "" },
                );
                let suggestion = if repaired_headword(&entry.word) == reference.word {
                    format!("write it as {:?} (`orthoepy audit --fix` does this)", reference.word)
                } else {
                    format!(
                        "write it as {:?} like line {}, or set fold_case = false in orthoepy.toml if the spellings are different words",
                        reference.word, reference.line
                    )
                };
                out.push(Finding::new(self.id(), self.severity(), id, entry, message).suggest(suggestion).relate(vec![reference_id]));
            }
        })
    }
}

/// The most frequent tidy spelling (earliest on a tie), else the most frequent spelling; `None`
/// when the rows agree on one spelling.
fn reference_spelling<'e>(rows: &[(EntryId, &'e Entry)]) -> Option<(EntryId, &'e Entry)> {
    let first = rows.first()?;
    if rows.iter().all(|(_, e)| e.word == first.1.word) {
        return None;
    }
    let count = |w: &str| rows.iter().filter(|(_, e)| e.word == w).count();
    let tidy = |e: &Entry| is_tidy(&e.word);
    let mut best: Option<(bool, usize, EntryId, &'e Entry)> = None;
    for &(id, entry) in rows {
        let rank = (tidy(entry), count(&entry.word));
        if best.map_or(true, |(t, c, _, _)| rank > (t, c)) {
            best = Some((rank.0, rank.1, id, entry));
        }
    }
    best.map(|(_, _, id, e)| (id, e))
}

/// How two spellings with one key differ, in words.
fn difference(a: &str, b: &str) -> String {
    let (a1, b1) = (a.split_whitespace().collect::<Vec<_>>().join(" "), b.split_whitespace().collect::<Vec<_>>().join(" "));
    let mut kinds = Vec::new();
    if a1 != a || b1 != b {
        kinds.push("whitespace");
    }
    let (a2, b2): (String, String) = (a1.nfc().collect(), b1.nfc().collect());
    if a2 != a1 || b2 != b1 {
        kinds.push("Unicode normalisation form (composed vs decomposed characters)");
    }
    if a2 != b2 {
        kinds.push("letter case");
    }
    kinds.join(" and ")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with, with_policy};
    use crate::lexicon::HeadwordPolicy;
    use crate::audit::StressPolicy;

    #[test]
    fn nfd_case_and_whitespace_variants_are_reported_against_the_tidy_spelling() {
        // UAX #15: "e" + U+0301 COMBINING ACUTE ACCENT is canonically equivalent to U+00E9.
        let rows = entries(&[("cafe\u{301}", "K AE0 F EY1"), ("café", "K AE0 F EY1"), ("Café", "K AH0 F EY1"), ("café ", "K AE1 F EY0")]);
        let found = with(&rows, |c| NormalizationDuplicate.run(c));
        let mut got: Vec<(usize, Vec<usize>)> = found.iter().map(|f| (f.entry, f.related.clone())).collect();
        got.sort();
        assert_eq!(got, [(0, vec![1]), (2, vec![1]), (3, vec![1])]);
        let message = |id: usize| found.iter().find(|f| f.entry == id).map(|f| f.message.clone()).unwrap_or_default();
        assert!(message(0).contains("Unicode normalisation form"), "{}", message(0));
        assert!(message(2).ends_with("letter case"), "{}", message(2));
        assert!(message(3).ends_with("whitespace"), "{}", message(3));
    }

    #[test]
    fn case_is_a_different_word_when_the_project_keeps_case() {
        let rows = entries(&[("Polish", "P OW1 L IH0 SH"), ("polish", "P AA1 L IH0 SH")]);
        let keep = HeadwordPolicy { fold_case: false };
        assert!(with_policy(&rows, keep, &StressPolicy::default(), |c| NormalizationDuplicate.run(c)).is_empty());
        assert_eq!(with(&rows, |c| NormalizationDuplicate.run(c)).len(), 1);
    }

    #[test]
    fn invisible_characters_are_left_to_their_own_check() {
        let rows = entries(&[("quay\u{200b}", "K IY1"), ("quay", "K IY1")]);
        assert!(with(&rows, |c| NormalizationDuplicate.run(c)).is_empty());
    }
}
