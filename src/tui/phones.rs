//! What the review screen needs to know about phone symbols: whether a token is a phone of the
//! project's phoneset, which symbols are near a bad one, and which symbols complete a prefix
//! (for Tab in the phone editor).
//!
//! The screen asks through the [`PhoneCheck`] trait so that it stays a pure function of its
//! state; the terminal loop hands in an implementation backed by the project's phoneset.

use std::collections::BTreeSet;

use crate::phoneset::Phoneset;

/// Verdict on one phone token.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TokenVerdict {
    /// A phone of the phoneset (with a valid stress mark, if any).
    Known,
    /// Not a phone; nearest symbols, best first.
    Unknown(Vec<String>),
}

/// Phone symbol knowledge the screen relies on.
pub trait PhoneCheck: Send + Sync {
    /// The phoneset's id, shown in the validation panel.
    fn name(&self) -> &str;
    /// Judge one token (symbol plus optional stress mark).
    fn check(&self, token: &str) -> TokenVerdict;
    /// Tokens (symbols, with stress marks where the phone takes them) starting with `prefix`,
    /// in a stable order.
    fn complete(&self, prefix: &str) -> Vec<String>;
}

/// A plain list of tokens: every symbol, and vowels with each stress digit. Used when no
/// phoneset file is at hand, and in tests.
///
/// ```
/// use orthoepy::tui::{PhoneCheck, SymbolList, TokenVerdict};
/// let set = SymbolList::new("tiny", &["K", "T"], &["AE", "IY"], &["0", "1", "2"]);
/// assert_eq!(set.check("AE1"), TokenVerdict::Known);
/// assert!(matches!(set.check("AE"), TokenVerdict::Unknown(_)));
/// assert_eq!(set.complete("I"), vec!["IY0", "IY1", "IY2"]);
/// ```
#[derive(Debug, Clone)]
pub struct SymbolList {
    name: String,
    tokens: BTreeSet<String>,
}

impl SymbolList {
    /// `consonants` stand alone; `vowels` must carry one of `stress_marks` (when marks are given).
    pub fn new(name: &str, consonants: &[&str], vowels: &[&str], stress_marks: &[&str]) -> SymbolList {
        let mut tokens: BTreeSet<String> = consonants.iter().map(|s| s.to_string()).collect();
        for v in vowels {
            if stress_marks.is_empty() {
                tokens.insert(v.to_string());
            }
            for m in stress_marks {
                tokens.insert(format!("{v}{m}"));
            }
        }
        SymbolList { name: name.to_string(), tokens }
    }
}

impl PhoneCheck for SymbolList {
    fn name(&self) -> &str {
        &self.name
    }

    fn check(&self, token: &str) -> TokenVerdict {
        if self.tokens.contains(token) {
            return TokenVerdict::Known;
        }
        let mut near: Vec<(usize, &String)> =
            self.tokens.iter().map(|t| (strsim::levenshtein(t, token), t)).collect();
        near.sort();
        TokenVerdict::Unknown(near.into_iter().take(3).map(|(_, t)| t.clone()).collect())
    }

    fn complete(&self, prefix: &str) -> Vec<String> {
        self.tokens.range(prefix.to_string()..).take_while(|t| t.starts_with(prefix)).cloned().collect()
    }
}

/// Check a whole pronunciation: each token with its verdict.
pub fn check_all(checker: &dyn PhoneCheck, pronunciation: &str) -> Vec<(String, TokenVerdict)> {
    pronunciation.split_whitespace().map(|t| (t.to_string(), checker.check(t))).collect()
}

/// Phone knowledge from a [`Phoneset`]: tokens are its symbols, nuclei with each declared
/// stress mark (and bare too when stress is optional); suggestions come from
/// [`Phoneset::suggest`].
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// use orthoepy::tui::{PhoneCheck, PhonesetCheck, TokenVerdict};
/// let check = PhonesetCheck::new(Phoneset::shipped("en-arpa").unwrap());
/// assert_eq!(check.check("AO2"), TokenVerdict::Known);
/// assert!(matches!(check.check("Q"), TokenVerdict::Unknown(_)));
/// assert!(check.complete("S").contains(&"SH".to_string()));
/// ```
pub struct PhonesetCheck {
    set: Phoneset,
    list: SymbolList,
}

impl PhonesetCheck {
    /// Wrap a phoneset.
    pub fn new(set: Phoneset) -> PhonesetCheck {
        let marks: Vec<&str> = set.stress_marks().iter().map(|s| s.mark.as_str()).collect();
        let mut tokens = BTreeSet::new();
        for p in set.phones() {
            if p.is_nucleus() && !marks.is_empty() {
                tokens.extend(marks.iter().map(|m| format!("{}{m}", p.symbol)));
                if !set.stress_required() {
                    tokens.insert(p.symbol.clone());
                }
            } else {
                tokens.insert(p.symbol.clone());
            }
        }
        let list = SymbolList { name: set.id().to_string(), tokens };
        PhonesetCheck { set, list }
    }
}

impl PhoneCheck for PhonesetCheck {
    fn name(&self) -> &str {
        self.list.name()
    }

    fn check(&self, token: &str) -> TokenVerdict {
        if self.list.tokens.contains(token) {
            return TokenVerdict::Known;
        }
        let (bare, stress) = self.set.split_stress(token);
        let mark = stress.map(|s| s.mark).unwrap_or_default();
        let mut out: Vec<String> = Vec::new();
        let mut push = |t: String| {
            if self.list.tokens.contains(&t) && !out.contains(&t) {
                out.push(t);
            }
        };
        if self.set.lookup(bare).is_some() {
            // A known phone with a missing or stray stress mark.
            for m in self.set.stress_marks() {
                push(format!("{bare}{}", m.mark));
            }
            push(bare.to_string());
        }
        for s in self.set.suggest(bare, 4) {
            push(format!("{s}{mark}"));
            push(s);
        }
        out.truncate(3);
        TokenVerdict::Unknown(out)
    }

    fn complete(&self, prefix: &str) -> Vec<String> {
        self.list.complete(prefix)
    }
}
