//! Pronunciations as sequences of phone tokens: strict parsing ([`Phoneset::parse`]), the
//! lenient per-token check that reports every problem of a line ([`Phoneset::check_tokens`]),
//! and rendering back to text. Suggestions for bad tokens come from `suggest.rs`.
//!
//! Tokens are separated by whitespace. Both `parse` and `check_tokens` accept any run of
//! whitespace between tokens; `check_tokens` additionally reports spacing that is not a single
//! space between tokens, since lexicon files store single spaces.

use std::fmt;

use thiserror::Error;

use super::stress::StressLevel;
use super::{PhoneId, Phoneset};

/// Characters that look like a stress mark when they trail a token, declared or not.
const MARK_LIKE: &str = "0123456789ˈˌ'\"%";

/// How many suggestions a token problem carries.
const SUGGESTIONS: usize = 3;

/// One phone of a pronunciation with its stress.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct PhoneToken {
    /// The phone, an id of the phoneset that parsed it.
    pub phone: PhoneId,
    /// Its stress mark's level, if it carries one.
    pub stress: Option<StressLevel>,
}

/// A pronunciation: phone tokens in order.
#[derive(Debug, Clone, Default, PartialEq, Eq, Hash)]
pub struct Pronunciation {
    /// The tokens.
    pub phones: Vec<PhoneToken>,
}

impl Pronunciation {
    /// The pronunciation as text in `set`: symbols with their stress marks, single spaces.
    /// Ids not of `set` render as `?`; a level `set` declares no mark for renders bare.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let p = set.parse("HH  AH0 L OW1").unwrap();
    /// assert_eq!(p.render(&set), "HH AH0 L OW1");
    /// ```
    pub fn render(&self, set: &Phoneset) -> String {
        let mut out = String::new();
        for (i, t) in self.phones.iter().enumerate() {
            if i > 0 {
                out.push(' ');
            }
            out.push_str(set.get(t.phone).map_or("?", |p| p.symbol.as_str()));
            if let Some(mark) = t.stress.and_then(|l| set.stress.mark_for(l)) {
                out.push_str(mark);
            }
        }
        out
    }

    /// The same phones with every stress mark removed.
    pub fn without_stress(&self) -> Pronunciation {
        Pronunciation {
            phones: self
                .phones
                .iter()
                .map(|t| PhoneToken {
                    phone: t.phone,
                    stress: None,
                })
                .collect(),
        }
    }
}

/// What is wrong with one token (or with the spacing before it).
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TokenProblemKind {
    /// The pronunciation has no tokens at all.
    Empty,
    /// The symbol is not in the phoneset.
    UnknownSymbol,
    /// The token ends in something that looks like a stress mark but is not declared.
    UndeclaredMark {
        /// The trailing mark.
        mark: String,
        /// The declared marks, space separated (or "none").
        declared: String,
    },
    /// A stress mark on a phone that cannot be a syllable nucleus.
    StressOnNonNucleus {
        /// The mark.
        mark: String,
    },
    /// A nucleus without a stress mark where the phoneset requires one.
    MissingStress,
    /// Whitespace other than one space between tokens (only from `check_tokens`).
    Spacing,
}

/// One problem found in a pronunciation, with its position and suggested replacements.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TokenProblem {
    /// 0-based index of the token (for `Spacing`: of the token after the whitespace).
    pub index: usize,
    /// 1-based character column where the token (or whitespace) starts.
    pub column: usize,
    /// The token as written (for `Spacing`: the whitespace).
    pub token: String,
    /// What is wrong.
    pub kind: TokenProblemKind,
    /// Replacement tokens to offer, best first (may be empty).
    pub suggestions: Vec<String>,
}

impl fmt::Display for TokenProblem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let at = format!(
            "token {} `{}` (column {})",
            self.index + 1,
            self.token,
            self.column
        );
        match &self.kind {
            TokenProblemKind::Empty => {
                write!(f, "empty pronunciation: write at least one phone symbol")?
            }
            TokenProblemKind::UnknownSymbol => write!(f, "{at}: unknown phone symbol")?,
            TokenProblemKind::UndeclaredMark { mark, declared } => write!(
                f,
                "{at}: `{mark}` is not a declared stress mark (declared: {declared})"
            )?,
            TokenProblemKind::StressOnNonNucleus { mark } => write!(
                f,
                "{at}: stress mark `{mark}` on a phone that is not a syllable nucleus"
            )?,
            TokenProblemKind::MissingStress => write!(f, "{at}: this vowel needs a stress mark")?,
            TokenProblemKind::Spacing => write!(
                f,
                "column {}: separate phones by exactly one space",
                self.column
            )?,
        }
        if !self.suggestions.is_empty() {
            write!(f, "; did you mean {}?", self.suggestions.join(", "))?;
        }
        Ok(())
    }
}

/// Why [`Phoneset::parse`] rejected a pronunciation.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
pub enum PronunciationError {
    /// No tokens.
    #[error("empty pronunciation: write at least one phone symbol")]
    Empty,
    /// The first bad token.
    #[error("{0}")]
    Token(TokenProblem),
}

/// A whitespace-separated token with its 1-based character column.
struct Piece<'a> {
    text: &'a str,
    column: usize,
}

/// Splits `text` into tokens and the whitespace runs that are not a single inner space.
fn split<'a>(text: &'a str) -> (Vec<Piece<'a>>, Vec<Piece<'a>>) {
    let (mut tokens, mut gaps) = (Vec::new(), Vec::new());
    // A whitespace run is irregular unless it is one space between two tokens.
    let mut push = |piece: Piece<'a>, space: bool, at_edge: bool| {
        if !space {
            tokens.push(piece);
        } else if piece.text != " " || at_edge {
            gaps.push(piece);
        }
    };
    let mut run: Option<(usize, usize, bool)> = None; // (start byte, start column, is whitespace)
    for (column, (byte, ch)) in text.char_indices().enumerate() {
        let space = ch.is_whitespace();
        match run {
            Some((_, _, s)) if s == space => {}
            _ => {
                if let Some((b, c, s)) = run {
                    push(
                        Piece {
                            text: &text[b..byte],
                            column: c,
                        },
                        s,
                        b == 0,
                    );
                }
                run = Some((byte, column + 1, space));
            }
        }
    }
    if let Some((b, c, s)) = run {
        push(
            Piece {
                text: &text[b..],
                column: c,
            },
            s,
            true,
        );
    }
    (tokens, gaps)
}

impl Phoneset {
    /// Parses a pronunciation strictly: every token must be a symbol of this phoneset, with a
    /// declared stress mark only on a nucleus, and on every nucleus if the phoneset requires
    /// it. The error names the first bad token's index and column and suggests replacements.
    ///
    /// ```
    /// use orthoepy::phoneset::{Phoneset, PronunciationError, StressLevel};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let p = set.parse("HH AH0 L OW1").unwrap();
    /// assert_eq!(p.phones.len(), 4);
    /// assert_eq!(p.phones[3].stress, Some(StressLevel::Primary));
    ///
    /// let Err(PronunciationError::Token(bad)) = set.parse("HH AH0 L OWW1") else { panic!() };
    /// assert_eq!((bad.index, bad.column), (3, 10));
    /// assert_eq!(bad.suggestions[0], "OW1");
    /// ```
    pub fn parse(&self, text: &str) -> Result<Pronunciation, PronunciationError> {
        let (tokens, _) = split(text);
        if tokens.is_empty() {
            return Err(PronunciationError::Empty);
        }
        let mut phones = Vec::with_capacity(tokens.len());
        for (index, piece) in tokens.iter().enumerate() {
            match self.classify(piece.text) {
                Ok(t) => phones.push(t),
                Err(kind) => {
                    return Err(PronunciationError::Token(self.problem(index, piece, kind)))
                }
            }
        }
        Ok(Pronunciation { phones })
    }

    /// Checks every token of `text` and reports all problems, spacing included, in column
    /// order. An empty result means [`Phoneset::parse`] accepts the text and it is spaced
    /// the way lexicon files store it.
    ///
    /// ```
    /// use orthoepy::phoneset::{Phoneset, TokenProblemKind};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let found = set.check_tokens("HH AH3  L1 OW");
    /// let kinds: Vec<_> = found.iter().map(|p| &p.kind).collect();
    /// assert!(matches!(kinds[0], TokenProblemKind::UndeclaredMark { .. }));
    /// assert_eq!(kinds[1], &TokenProblemKind::Spacing);
    /// assert!(matches!(kinds[2], TokenProblemKind::StressOnNonNucleus { .. }));
    /// assert_eq!(kinds[3], &TokenProblemKind::MissingStress);
    /// ```
    pub fn check_tokens(&self, text: &str) -> Vec<TokenProblem> {
        let (tokens, gaps) = split(text);
        if tokens.is_empty() {
            return vec![TokenProblem {
                index: 0,
                column: 1,
                token: String::new(),
                kind: TokenProblemKind::Empty,
                suggestions: Vec::new(),
            }];
        }
        let mut out: Vec<TokenProblem> = tokens
            .iter()
            .enumerate()
            .filter_map(|(index, piece)| {
                self.classify(piece.text)
                    .err()
                    .map(|kind| self.problem(index, piece, kind))
            })
            .collect();
        for gap in gaps {
            let index = tokens.iter().filter(|t| t.column < gap.column).count();
            out.push(TokenProblem {
                index,
                column: gap.column,
                token: gap.text.to_string(),
                kind: TokenProblemKind::Spacing,
                suggestions: Vec::new(),
            });
        }
        out.sort_by_key(|p| p.column);
        out
    }

    /// Reads one token, or says what is wrong with it (without suggestions).
    fn classify(&self, token: &str) -> Result<PhoneToken, TokenProblemKind> {
        let (bare, mark) = self.stress.split(token, &self.by_symbol);
        let mark = mark.and_then(|i| self.stress.marks.get(i));
        if let Some(id) = self.lookup(bare) {
            let nucleus = self.get(id).is_some_and(|p| p.is_nucleus());
            return match mark {
                Some(m) if !nucleus => Err(TokenProblemKind::StressOnNonNucleus {
                    mark: m.mark.clone(),
                }),
                Some(m) => Ok(PhoneToken {
                    phone: id,
                    stress: Some(m.level),
                }),
                None if nucleus && self.stress.required => Err(TokenProblemKind::MissingStress),
                None => Ok(PhoneToken {
                    phone: id,
                    stress: None,
                }),
            };
        }
        if mark.is_none() {
            if let Some((base, suffix)) = self.undeclared_mark(token) {
                let nucleus = self
                    .lookup(base)
                    .and_then(|id| self.get(id))
                    .is_some_and(|p| p.is_nucleus());
                return Err(if nucleus {
                    TokenProblemKind::UndeclaredMark {
                        mark: suffix.to_string(),
                        declared: self.declared_marks(),
                    }
                } else {
                    TokenProblemKind::StressOnNonNucleus {
                        mark: suffix.to_string(),
                    }
                });
            }
        }
        Err(TokenProblemKind::UnknownSymbol)
    }

    /// `token` split into a known symbol and a trailing run of mark-like characters.
    fn undeclared_mark<'a>(&self, token: &'a str) -> Option<(&'a str, &'a str)> {
        let base = token.trim_end_matches(|c: char| {
            MARK_LIKE.contains(c) || self.stress.marks.iter().any(|m| m.mark.contains(c))
        });
        let suffix = &token[base.len()..];
        (!base.is_empty() && !suffix.is_empty() && self.lookup(base).is_some())
            .then_some((base, suffix))
    }

    fn declared_marks(&self) -> String {
        if self.stress.marks.is_empty() {
            return "none".into();
        }
        self.stress
            .marks
            .iter()
            .map(|m| m.mark.as_str())
            .collect::<Vec<_>>()
            .join(" ")
    }

    /// A located problem with suggestions for `piece`.
    fn problem(&self, index: usize, piece: &Piece<'_>, kind: TokenProblemKind) -> TokenProblem {
        let suggestions = match &kind {
            TokenProblemKind::UnknownSymbol => self.suggest_tokens(piece.text),
            TokenProblemKind::StressOnNonNucleus { mark } => {
                vec![piece
                    .text
                    .strip_suffix(mark.as_str())
                    .unwrap_or(piece.text)
                    .to_string()]
            }
            TokenProblemKind::UndeclaredMark { mark, .. } => {
                self.with_marks(piece.text.strip_suffix(mark.as_str()).unwrap_or(piece.text))
            }
            TokenProblemKind::MissingStress => self.with_marks(piece.text),
            TokenProblemKind::Empty | TokenProblemKind::Spacing => Vec::new(),
        };
        TokenProblem {
            index,
            column: piece.column,
            token: piece.text.to_string(),
            kind,
            suggestions,
        }
    }

    /// `symbol` with each declared mark, in declaration order.
    fn with_marks(&self, symbol: &str) -> Vec<String> {
        self.stress
            .marks
            .iter()
            .map(|m| format!("{symbol}{}", m.mark))
            .collect()
    }

    /// Replacement tokens for an unknown token: nearest symbols, with the token's declared
    /// stress mark kept on those that can carry it.
    fn suggest_tokens(&self, token: &str) -> Vec<String> {
        let (bare, mark) = self.stress.split(token, &self.by_symbol);
        let mark = mark
            .and_then(|i| self.stress.marks.get(i))
            .map(|m| m.mark.as_str());
        self.suggest_ids(bare, SUGGESTIONS, mark.is_some())
            .into_iter()
            .filter_map(|id| self.get(id))
            .map(|p| match mark {
                Some(m) if p.is_nucleus() => format!("{}{m}", p.symbol),
                _ if p.is_nucleus() && self.stress.required => {
                    format!(
                        "{}{}",
                        p.symbol,
                        self.stress.marks.first().map_or("", |m| m.mark.as_str())
                    )
                }
                _ => p.symbol.clone(),
            })
            .collect()
    }
}
