//! `empty-pronunciation`: a row with no phones at all.
//!
//! A pronunciation of only spaces counts as empty. Nothing else is judged here.

use super::{Check, Context, Finding, Severity};

/// Reports rows whose pronunciation holds no phone token.
pub struct EmptyPronunciation;

impl Check for EmptyPronunciation {
    fn id(&self) -> &'static str {
        "empty-pronunciation"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "rows with no phones"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        context.each_entry(|id, entry, out| {
            if entry.phones().next().is_none() {
                let finding = Finding::new(self.id(), self.severity(), id, entry, "the pronunciation is empty".into())
                    .suggest("write the phones, or delete the row if the word has no pronunciation yet");
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
    fn blank_and_space_only_pronunciations_are_empty() {
        let mut rows = entries(&[("quay", "K IY1"), ("pier", ""), ("ferry", "F EH1 R IY0")]);
        rows[2].pronunciation = "   ".into();
        let ids: Vec<usize> = with(&rows, |c| EmptyPronunciation.run(c)).iter().map(|f| f.entry).collect();
        assert_eq!(ids, [1, 2]);
    }
}
