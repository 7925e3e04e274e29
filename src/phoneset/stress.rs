//! Stress marks: the declared suffix marks of a phoneset (e.g. ARPAbet digits `0 1 2`), their
//! levels, splitting a token into symbol and mark, and checking the declarations. It does not
//! decide which phones may carry stress (that is the phone's `syllabic` flag).

use std::collections::HashMap;

use super::error::CheckProblem;
use super::raw::{Problems, RawStress};
use super::PhoneId;
use toml::Spanned;

/// A level of lexical stress.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum StressLevel {
    /// Primary stress (ARPAbet `1`).
    Primary,
    /// Secondary stress (ARPAbet `2`).
    Secondary,
    /// Explicitly unstressed (ARPAbet `0`).
    Unstressed,
}

impl StressLevel {
    /// All levels.
    pub const ALL: [StressLevel; 3] = [
        StressLevel::Primary,
        StressLevel::Secondary,
        StressLevel::Unstressed,
    ];

    /// The name used in phoneset files: `primary`, `secondary`, `unstressed`.
    pub fn as_str(self) -> &'static str {
        match self {
            StressLevel::Primary => "primary",
            StressLevel::Secondary => "secondary",
            StressLevel::Unstressed => "unstressed",
        }
    }

    pub(crate) fn from_name(name: &str) -> Option<StressLevel> {
        StressLevel::ALL.into_iter().find(|l| l.as_str() == name)
    }
}

/// A declared stress mark and its level.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct Stress {
    /// The mark as written after the symbol, e.g. `1`.
    pub mark: String,
    /// Its level.
    pub level: StressLevel,
}

/// The stress declarations of a phoneset.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct StressMarks {
    /// Marks in declaration order.
    pub marks: Vec<Stress>,
    /// Whether every nucleus must carry a mark.
    pub required: bool,
}

impl StressMarks {
    /// Builds and checks the `[stress]` table against the phones' symbols.
    pub fn build(
        raw: Option<&Spanned<RawStress>>,
        phones: &HashMap<String, PhoneId>,
        problems: &mut Problems<'_>,
    ) -> StressMarks {
        let Some(raw) = raw else {
            return StressMarks::default();
        };
        let mut marks: Vec<Stress> = Vec::new();
        for m in &raw.get_ref().marks {
            let m = m.get_ref();
            let mark = m.mark.get_ref();
            let mut fail = |message: String| {
                problems.add(
                    m.mark.span(),
                    CheckProblem::BadStressMark {
                        mark: mark.clone(),
                        message,
                    },
                )
            };
            if mark.is_empty() || mark.contains(char::is_whitespace) {
                fail("a mark must be non-empty and contain no whitespace".into());
            } else if marks.iter().any(|s| &s.mark == mark) {
                fail("declared twice".into());
            } else if phones.contains_key(mark) {
                fail("it is also a phone symbol; pick a mark that is not".into());
            } else if let Some(sym) = ambiguous_symbol(mark, phones) {
                fail(format!("`{sym}` could be read as a symbol plus this mark or as a symbol of its own; rename one"));
            }
            let Some(level) = StressLevel::from_name(m.level.get_ref()) else {
                problems.add(
                    m.level.span(),
                    CheckProblem::BadStressMark {
                        mark: mark.clone(),
                        message: format!(
                            "unknown level `{}`; use primary, secondary or unstressed",
                            m.level.get_ref()
                        ),
                    },
                );
                continue;
            };
            marks.push(Stress {
                mark: mark.clone(),
                level,
            });
        }
        let required = raw.get_ref().required;
        if required && marks.is_empty() {
            problems.add(
                raw.span(),
                CheckProblem::BadStressMark {
                    mark: String::new(),
                    message: "stress is required but no marks are declared".into(),
                },
            );
        }
        StressMarks { marks, required }
    }

    /// Splits a trailing declared mark off `token` (longest mark first). A token that is itself
    /// a symbol is never split. Returns the bare part and the index of the mark in `marks`.
    pub fn split<'a>(
        &self,
        token: &'a str,
        phones: &HashMap<String, PhoneId>,
    ) -> (&'a str, Option<usize>) {
        if phones.contains_key(token) {
            return (token, None);
        }
        let best = self
            .marks
            .iter()
            .enumerate()
            .filter(|(_, s)| token.len() > s.mark.len() && token.ends_with(&s.mark))
            .max_by_key(|(_, s)| s.mark.len());
        match best {
            Some((i, s)) => (&token[..token.len() - s.mark.len()], Some(i)),
            None => (token, None),
        }
    }

    /// The first mark declared for `level`.
    pub fn mark_for(&self, level: StressLevel) -> Option<&str> {
        self.marks
            .iter()
            .find(|s| s.level == level)
            .map(|s| s.mark.as_str())
    }
}

/// A symbol that equals another symbol plus `mark`, if any.
fn ambiguous_symbol(mark: &str, phones: &HashMap<String, PhoneId>) -> Option<String> {
    phones
        .keys()
        .filter(|sym| sym.len() > mark.len() && sym.ends_with(mark))
        .find(|sym| phones.contains_key(&sym[..sym.len() - mark.len()]))
        .cloned()
}
