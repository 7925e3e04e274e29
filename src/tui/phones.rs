//! What the review screen needs to know about phone symbols: whether a token is a phone of the
//! project's phoneset, which symbols are near a bad one, and which symbols complete a prefix
//! (for Tab in the phone editor).
//!
//! The screen asks through the [`PhoneCheck`] trait so that it stays a pure function of its
//! state; the terminal loop hands in an implementation backed by the project's phoneset, which
//! also runs the audit's per-entry pronunciation checks (the same check types, selected by
//! [`PRONUNCIATION_CHECKS`]) and writes pronunciations in IPA as the PLS export does.

use std::collections::BTreeSet;
use std::sync::{Arc, OnceLock};

use crate::audit::{Check, Context, Severity, StressPolicy};
use crate::lexicon::{Entry, HeadwordPolicy, Lexicon};
use crate::phoneset::Phoneset;
use crate::phoneset::{Alphabet, Onsets};
use crate::queue::PRONUNCIATION_CHECKS;

/// One audit check's verdict on a pronunciation, as the editor and status line show it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CheckVerdict {
    /// The audit check's id ("missing-primary-stress").
    pub check: &'static str,
    /// The first finding's message; `None` when the check passes.
    pub problem: Option<String>,
    /// Whether the finding is an error (saving is refused) rather than a warning.
    pub error: bool,
}

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
    /// The audit's per-entry pronunciation checks on `word` /`pronunciation`/, one verdict per
    /// check in report order (none without a phoneset).
    fn audit(&self, _word: &str, _pronunciation: &str) -> Vec<CheckVerdict> {
        Vec::new()
    }
    /// The pronunciation in IPA, if the phone knowledge has IPA and every phone is known.
    fn ipa(&self, _pronunciation: &str) -> Option<String> {
        None
    }
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
/// assert!(matches!(check.check("XQ"), TokenVerdict::Unknown(_)));
/// assert!(check.complete("S").contains(&"SH".to_string()));
/// ```
pub struct PhonesetCheck {
    set: Phoneset,
    list: SymbolList,
    stress: StressPolicy,
    checks: Vec<Box<dyn Check>>,
    /// The lexicon whose word-initial clusters give the onsets, and the onsets themselves,
    /// worked out on the first IPA rendering (a pass over every entry: ~50 ms on CMUdict, kept
    /// off the review screen's start).
    lexicon: Option<Arc<Lexicon>>,
    onsets: OnceLock<Onsets>,
}

impl PhonesetCheck {
    /// Wrap a phoneset, with the default stress policy and no lexicon (IPA stress marks then
    /// go before the nucleus's nearest consonant; see [`with_project`](Self::with_project)).
    pub fn new(set: Phoneset) -> PhonesetCheck {
        PhonesetCheck::with_project(set, StressPolicy::default(), None)
    }

    /// Wrap a phoneset with the project's stress policy and its lexicon (whose word-initial
    /// clusters are the legal onsets for IPA stress placement, as in the PLS export; read on
    /// the first IPA rendering).
    ///
    /// ```
    /// use orthoepy::audit::{PrimaryStressPolicy, StressPolicy};
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::tui::{PhoneCheck, PhonesetCheck};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let check = PhonesetCheck::with_project(set, StressPolicy::default(), None);
    /// let verdicts = check.audit("kelport", "K EH0 L P AO0 R T");
    /// assert!(verdicts.iter().any(|v| v.check == "missing-primary-stress" && v.problem.is_some()));
    /// assert_eq!(check.ipa("K IY1").as_deref(), Some("ˈki"));
    /// ```
    pub fn with_project(set: Phoneset, stress: StressPolicy, lexicon: Option<Arc<Lexicon>>) -> PhonesetCheck {
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
        // The ids are the queue's own constants, all registered audit checks.
        let checks = crate::audit::select_checks(&PRONUNCIATION_CHECKS).unwrap_or_default();
        PhonesetCheck { set, list, stress, checks, lexicon, onsets: OnceLock::new() }
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

    fn audit(&self, word: &str, pronunciation: &str) -> Vec<CheckVerdict> {
        let entries = [Entry::new(word, pronunciation)];
        let context = Context::new(&entries, HeadwordPolicy { fold_case: true }, &self.set, &self.stress);
        self.checks
            .iter()
            .map(|check| {
                let found = check.run(&context).into_iter().next();
                CheckVerdict {
                    check: check.id(),
                    error: found.as_ref().is_some_and(|f| f.severity == Severity::Error),
                    problem: found.map(|f| f.message),
                }
            })
            .collect()
    }

    fn ipa(&self, pronunciation: &str) -> Option<String> {
        let pron = self.set.parse(pronunciation).ok()?;
        let onsets = self.onsets.get_or_init(|| {
            let entries = self.lexicon.as_deref().map_or(&[][..], Lexicon::entries);
            crate::pls::lexicon_onsets(entries, &self.set)
        });
        Some(self.set.render_with(&pron, Alphabet::Ipa, onsets))
    }
}
