//! Queue filters typed after `f`: space-separated terms, all of which must hold. [`TERMS`] is
//! the one description of each term: the help overlay draws it, the README repeats it as its
//! filter table (a test keeps the two in step), and the parser's error lists its forms.
//!
//! An empty filter shows everything. Parsing is pure; the app applies it.

use crate::queue::{Item, ItemState};

/// `(term, what it shows)` for every filter term, in the order help and README list them.
pub const TERMS: &[(&str, &str)] = &[
    ("source=TEXT", "items whose best candidate's source contains TEXT (any case)"),
    ("origin=TEXT", "items whose origin contains TEXT (any case)"),
    ("kind=new|variant|audit", "items of that kind"),
    ("score<X", "items whose best candidate's score is below X (no score: never shown)"),
    ("score>X", "items whose best candidate's score is above X (no score: never shown)"),
    ("state=pending|decided|aside|applied|all", "items in that review state (default all)"),
];

/// Why filter text could not be parsed: the term at fault and what is allowed there.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum FilterError {
    /// `kind=` with a value other than new, variant, audit.
    #[error("`{term}`: kind is new, variant or audit")]
    Kind {
        /// The term as typed.
        term: String,
    },
    /// `score<` or `score>` without a finite number.
    #[error("`{term}`: score needs a number, e.g. score<0.5")]
    Score {
        /// The term as typed.
        term: String,
    },
    /// `state=` with an unknown state.
    #[error("`{term}`: state is pending, decided, aside, applied or all")]
    State {
        /// The term as typed.
        term: String,
    },
    /// A term of no known form.
    #[error("`{term}`: use {}", TERMS.iter().map(|(t, _)| *t).collect::<Vec<_>>().join(", "))]
    Unknown {
        /// The term as typed.
        term: String,
    },
}

/// One parsed filter term.
#[derive(Debug, Clone, PartialEq)]
enum Term {
    Source(String),
    Origin(String),
    Kind(String),
    ScoreBelow(f64),
    ScoreAbove(f64),
    State(Option<ItemState>),
}

/// A parsed filter.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Filter {
    terms: Vec<Term>,
    text: String,
}

impl Filter {
    /// Parse filter text; the error says which term is wrong and what is allowed.
    ///
    /// ```
    /// use orthoepy::tui::{Filter, FilterError};
    /// assert!(Filter::parse("source=g2p score<0.5").is_ok());
    /// let err = Filter::parse("colour=red").unwrap_err();
    /// assert_eq!(err, FilterError::Unknown { term: "colour=red".into() });
    /// assert!(err.to_string().contains("source="));
    /// ```
    pub fn parse(text: &str) -> Result<Filter, FilterError> {
        let mut terms = Vec::new();
        for word in text.split_whitespace() {
            let term = if let Some(v) = word.strip_prefix("source=") {
                Term::Source(v.to_lowercase())
            } else if let Some(v) = word.strip_prefix("origin=") {
                Term::Origin(v.to_lowercase())
            } else if let Some(v) = word.strip_prefix("kind=") {
                match v {
                    "new" | "variant" | "audit" => Term::Kind(v.to_string()),
                    _ => return Err(FilterError::Kind { term: word.to_string() }),
                }
            } else if let Some(v) = word.strip_prefix("score<") {
                Term::ScoreBelow(parse_score(word, v)?)
            } else if let Some(v) = word.strip_prefix("score>") {
                Term::ScoreAbove(parse_score(word, v)?)
            } else if let Some(v) = word.strip_prefix("state=") {
                Term::State(match v {
                    "pending" => Some(ItemState::Pending),
                    "decided" => Some(ItemState::Decided),
                    "aside" => Some(ItemState::Aside),
                    "applied" => Some(ItemState::Applied),
                    "all" => None,
                    _ => return Err(FilterError::State { term: word.to_string() }),
                })
            } else {
                return Err(FilterError::Unknown { term: word.to_string() });
            };
            terms.push(term);
        }
        Ok(Filter { terms, text: text.trim().to_string() })
    }

    /// The text the filter was parsed from.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// Whether an item in the given state passes. Source and score are those of the best
    /// (first) candidate, as [`TERMS`] says.
    pub fn matches(&self, item: &Item, state: ItemState) -> bool {
        let best = item.candidates.first();
        let score = best.and_then(|c| c.score);
        self.terms.iter().all(|t| match t {
            Term::Source(s) => best.is_some_and(|c| c.source.to_lowercase().contains(s.as_str())),
            Term::Origin(s) => item.origin.to_lowercase().contains(s.as_str()),
            Term::Kind(k) => item.kind.tag() == k,
            Term::ScoreBelow(x) => score.is_some_and(|b| b < *x),
            Term::ScoreAbove(x) => score.is_some_and(|b| b > *x),
            Term::State(want) => want.map_or(true, |w| w == state),
        })
    }
}

fn parse_score(word: &str, v: &str) -> Result<f64, FilterError> {
    v.parse::<f64>().ok().filter(|x| x.is_finite()).ok_or_else(|| FilterError::Score { term: word.to_string() })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::queue::Candidate;

    #[test]
    fn terms_combine() {
        let mut item = Item::new_word("kelport");
        let mut c = Candidate::new("K EH1 L P AO2 R T", "g2p");
        c.score = Some(0.4);
        item.candidates.push(c);
        item.origin = "corpus:queries.txt".into();
        let f = Filter::parse("source=G2P score<0.5 origin=corpus").unwrap();
        assert!(f.matches(&item, ItemState::Pending));
        assert!(!Filter::parse("score>0.5").unwrap().matches(&item, ItemState::Pending));
        assert!(!Filter::parse("state=aside").unwrap().matches(&item, ItemState::Pending));
        assert!(Filter::parse("state=all kind=new").unwrap().matches(&item, ItemState::Aside));
        assert_eq!(Filter::parse("score<x"), Err(FilterError::Score { term: "score<x".into() }));
        assert!(matches!(Filter::parse("kind=other"), Err(FilterError::Kind { .. })));
        assert!(matches!(Filter::parse("state=done"), Err(FilterError::State { .. })));
    }

    #[test]
    fn source_is_the_best_candidates_only() {
        let mut item = Item::new_word("kelport");
        item.candidates.push(Candidate::new("K EH1 L P ER0 T", "rules:en"));
        item.candidates.push(Candidate::new("K EH1 L P AO2 R T", "g2p"));
        assert!(!Filter::parse("source=g2p").unwrap().matches(&item, ItemState::Pending));
        assert!(Filter::parse("source=rules").unwrap().matches(&item, ItemState::Pending));
        assert!(!Filter::parse("source=g2p").unwrap().matches(&Item::new_word("x"), ItemState::Pending));
    }
}
