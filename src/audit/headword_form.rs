//! `headword-form`: a headword that is not in its tidy form (NFC, trimmed, single-spaced) while no
//! other row spells the word differently (that case is `normalization-duplicate`).
//!
//! Surrounding whitespace is an error because the store refuses such rows outside repair mode;
//! a decomposed (non-NFC) spelling or repeated inner spaces are warnings. Rows with invisible
//! characters are left to `invisible-character`.

use super::fix::{is_tidy, repaired_headword};
use super::normalization_duplicate::visible_rows;
use super::{Check, Context, Finding, Severity};

/// Reports untidy headwords that have no differently spelt twin.
pub struct HeadwordForm;

impl Check for HeadwordForm {
    fn id(&self) -> &'static str {
        "headword-form"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "headwords with surrounding or repeated whitespace, or not in Unicode NFC"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        context.each_group(1, |group, out| {
            let first = &entries[group[0]];
            if group.iter().all(|&id| entries[id].word == first.word) && is_tidy(&first.word) {
                return; // the common case, decided without allocating
            }
            let rows = visible_rows(entries, group);
            let Some((_, first)) = rows.first() else { return };
            if rows.iter().any(|(_, e)| e.word != first.word) {
                return;
            }
            let tidy = repaired_headword(&first.word);
            if tidy == first.word {
                return;
            }
            let (severity, what) = if first.word.trim() != first.word {
                (Severity::Error, "has surrounding whitespace (the store refuses it outside `audit --fix`)")
            } else if first.word.contains("  ") {
                (Severity::Warning, "has repeated spaces")
            } else {
                (Severity::Warning, "is not in Unicode NFC (it uses decomposed characters)")
            };
            for &(id, entry) in &rows {
                let finding = Finding::new(self.id(), severity, id, entry, format!("the headword {what}"))
                    .suggest(format!("write it as {tidy:?} (`orthoepy audit --fix` does this)"));
                out.push(finding);
            }
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn lone_untidy_headwords_are_reported_with_their_severity() {
        let rows = entries(&[("quay ", "K IY1"), ("new  york", "N UW1 Y AO1 R K"), ("cafe\u{301}", "K AE0 F EY1"), ("pier", "P IH1 R")]);
        let found = with(&rows, |c| HeadwordForm.run(c));
        let mut got: Vec<(usize, Severity)> = found.iter().map(|f| (f.entry, f.severity)).collect();
        got.sort();
        assert_eq!(got, [(0, Severity::Error), (1, Severity::Warning), (2, Severity::Warning)]);
    }

    #[test]
    fn twins_are_left_to_normalization_duplicate() {
        let rows = entries(&[("quay ", "K IY1"), ("quay", "K EY1")]);
        assert!(with(&rows, |c| HeadwordForm.run(c)).is_empty());
    }
}
