//! The rewrite-rule language: turns one rule string such as
//! `[consonant, place=alveolar, manner=stop] -> DX / [vowel] _ [vowel, unstressed]` into a syntax
//! tree ([`RuleAst`]). It owns tokenising, the grammar and column-exact syntax errors; it must not
//! look at a phoneset (symbols and feature names are checked later, by `compile`).
//!
//! The notation follows the classical form `A -> B / C _ D` of N. Chomsky & M. Halle,
//! *The Sound Pattern of English* (1968): braces `{X | Y}` for alternatives, parentheses `(X)`
//! for an optional element, `#` for a word boundary, `0` or `∅` for the empty string. `X*` (zero
//! or more) stands in for SPE's subscript `C₀`.

use std::fmt;

/// A half-open range of character offsets (not bytes) inside the rule text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Span {
    /// First character, 0-based.
    pub start: usize,
    /// One past the last character.
    pub end: usize,
}

/// A syntax error with the character column (0-based) where it was found.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SyntaxError {
    /// Character offset in the rule text.
    pub column: usize,
    /// What is wrong and what was expected.
    pub message: String,
}

impl fmt::Display for SyntaxError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.message)
    }
}

/// One term of a feature bundle.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Term {
    /// A class word: `consonant`, `vowel`, `diphthong`, `monophthong`, `nucleus`, `syllabic`.
    Class(String),
    /// `name=v1|v2` (any of the values) or, when `negated`, `name!=v1|v2` (none of them).
    Feature {
        /// Feature name, e.g. `place`.
        name: String,
        /// Accepted (or, negated, refused) values.
        values: Vec<String>,
        /// `!=` instead of `=`.
        negated: bool,
    },
}

/// A bundle `[t1, t2, ...]`; every term must hold.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Bundle {
    /// The terms with their spans.
    pub terms: Vec<(Term, Span)>,
}

/// Something that matches exactly one phone.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Segment {
    /// A phone symbol, possibly with a stress mark (`AH0`): resolved by the phoneset.
    Phone(String, Span),
    /// A feature bundle.
    Bundle(Bundle, Span),
}

/// One element of a context.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Element {
    /// `#`: the word edge.
    Boundary,
    /// One phone.
    Segment(Segment),
    /// `{X | Y | ...}`: any one of the alternatives.
    Choice(Vec<Element>),
    /// `(X)`: X or nothing.
    Optional(Box<Element>),
    /// `X*`: zero or more X.
    Repeat(Box<Element>),
}

/// What the rule rewrites.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Target {
    /// `0`/`∅`: insertion between two phones.
    Empty,
    /// One phone matching any of these segments (`{A | B}` or a single `A`).
    Segments(Vec<Segment>),
}

/// What the target becomes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Change {
    /// `0`/`∅`: the target is deleted.
    Delete,
    /// A phone symbol (without stress mark).
    Phone(String, Span),
    /// `[name=value, ...]`: these features are set, the others kept.
    Features(Vec<(String, String, Span)>),
}

/// A parsed rule `target -> change / left _ right`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RuleAst {
    /// The rewritten phone (or the empty string for insertion).
    pub target: Target,
    /// The replacement.
    pub change: Change,
    /// Left context, in reading order (the element next to the target is last).
    pub left: Vec<Element>,
    /// Right context, in reading order.
    pub right: Vec<Element>,
}

#[derive(Debug, Clone, PartialEq)]
enum Tok {
    LBracket,
    RBracket,
    LBrace,
    RBrace,
    LParen,
    RParen,
    Pipe,
    Comma,
    Slash,
    Focus,
    Hash,
    Star,
    Arrow,
    Equals,
    NotEquals,
    Null,
    Word(String),
}

fn describe(tok: Option<&Tok>) -> String {
    match tok {
        None => "the end of the rule".to_string(),
        Some(Tok::Word(w)) => format!("`{w}`"),
        Some(t) => format!("`{}`", symbol_of(t)),
    }
}

fn symbol_of(tok: &Tok) -> &'static str {
    match tok {
        Tok::LBracket => "[",
        Tok::RBracket => "]",
        Tok::LBrace => "{",
        Tok::RBrace => "}",
        Tok::LParen => "(",
        Tok::RParen => ")",
        Tok::Pipe => "|",
        Tok::Comma => ",",
        Tok::Slash => "/",
        Tok::Focus => "_",
        Tok::Hash => "#",
        Tok::Star => "*",
        Tok::Arrow => "->",
        Tok::Equals => "=",
        Tok::NotEquals => "!=",
        Tok::Null => "0",
        Tok::Word(_) => "word",
    }
}

fn is_word_char(c: char) -> bool {
    !c.is_whitespace() && !"[]{}()|,/#*=!→∅".contains(c)
}

fn tokenize(text: &str) -> Result<Vec<(Tok, Span)>, SyntaxError> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let mut i = 0;
    while let Some(&c) = chars.get(i) {
        let next = chars.get(i + 1).copied();
        let single = match c {
            '[' => Some(Tok::LBracket),
            ']' => Some(Tok::RBracket),
            '{' => Some(Tok::LBrace),
            '}' => Some(Tok::RBrace),
            '(' => Some(Tok::LParen),
            ')' => Some(Tok::RParen),
            '|' => Some(Tok::Pipe),
            ',' => Some(Tok::Comma),
            '/' => Some(Tok::Slash),
            '#' => Some(Tok::Hash),
            '*' => Some(Tok::Star),
            '=' => Some(Tok::Equals),
            '→' => Some(Tok::Arrow),
            '∅' => Some(Tok::Null),
            _ => None,
        };
        if let Some(tok) = single {
            out.push((tok, Span { start: i, end: i + 1 }));
            i += 1;
        } else if c.is_whitespace() {
            i += 1;
        } else if c == '-' && next == Some('>') {
            out.push((Tok::Arrow, Span { start: i, end: i + 2 }));
            i += 2;
        } else if c == '!' && next == Some('=') {
            out.push((Tok::NotEquals, Span { start: i, end: i + 2 }));
            i += 2;
        } else if c == '!' {
            return Err(SyntaxError { column: i, message: "`!` must be followed by `=` (as in `place!=velar`)".into() });
        } else {
            let start = i;
            while let Some(&w) = chars.get(i) {
                let arrow_ahead = w == '-' && chars.get(i + 1) == Some(&'>');
                if !is_word_char(w) || arrow_ahead {
                    break;
                }
                i += 1;
            }
            let word: String = chars[start..i].iter().collect();
            let tok = match word.as_str() {
                "0" => Tok::Null,
                "_" => Tok::Focus,
                _ => Tok::Word(word),
            };
            out.push((tok, Span { start, end: i }));
        }
    }
    Ok(out)
}

struct Parser {
    toks: Vec<(Tok, Span)>,
    pos: usize,
    len_chars: usize,
}

impl Parser {
    fn peek(&self) -> Option<&Tok> {
        self.toks.get(self.pos).map(|(t, _)| t)
    }
    fn column(&self) -> usize {
        self.toks.get(self.pos).map_or(self.len_chars, |(_, s)| s.start)
    }
    fn span(&self) -> Span {
        self.toks.get(self.pos).map_or(Span { start: self.len_chars, end: self.len_chars }, |(_, s)| *s)
    }
    fn error<T>(&self, expected: &str) -> Result<T, SyntaxError> {
        Err(SyntaxError { column: self.column(), message: format!("expected {expected}, found {}", describe(self.peek())) })
    }
    fn eat(&mut self, tok: &Tok) -> bool {
        if self.peek() == Some(tok) {
            self.pos += 1;
            true
        } else {
            false
        }
    }
    fn expect(&mut self, tok: &Tok, expected: &str) -> Result<Span, SyntaxError> {
        let span = self.span();
        if self.eat(tok) {
            Ok(span)
        } else {
            self.error(expected)
        }
    }
    fn word(&mut self, expected: &str) -> Result<(String, Span), SyntaxError> {
        match self.toks.get(self.pos) {
            Some((Tok::Word(w), s)) => {
                let out = (w.clone(), *s);
                self.pos += 1;
                Ok(out)
            }
            _ => self.error(expected),
        }
    }

    fn bundle(&mut self) -> Result<(Bundle, Span), SyntaxError> {
        let open = self.expect(&Tok::LBracket, "`[`")?;
        let mut terms = Vec::new();
        if self.peek() == Some(&Tok::RBracket) {
            return self.error("a feature term (an empty bundle `[]` would match every phone)");
        }
        loop {
            let (name, name_span) = self.word("a class word or `feature=value`")?;
            let term = match self.peek() {
                Some(Tok::Equals) | Some(Tok::NotEquals) => {
                    let negated = self.peek() == Some(&Tok::NotEquals);
                    self.pos += 1;
                    let mut values = vec![self.word("a feature value")?.0];
                    while self.eat(&Tok::Pipe) {
                        values.push(self.word("a feature value after `|`")?.0);
                    }
                    Term::Feature { name, values, negated }
                }
                _ => Term::Class(name),
            };
            let end = self.toks.get(self.pos.saturating_sub(1)).map_or(name_span.end, |(_, s)| s.end);
            terms.push((term, Span { start: name_span.start, end }));
            if self.eat(&Tok::Comma) {
                continue;
            }
            let close = self.expect(&Tok::RBracket, "`,` or `]`")?;
            return Ok((Bundle { terms }, Span { start: open.start, end: close.end }));
        }
    }

    fn segment(&mut self) -> Result<Segment, SyntaxError> {
        match self.peek() {
            Some(Tok::LBracket) => {
                let (b, s) = self.bundle()?;
                Ok(Segment::Bundle(b, s))
            }
            Some(Tok::Word(_)) => {
                let (w, s) = self.word("a phone")?;
                Ok(Segment::Phone(w, s))
            }
            _ => self.error("a phone symbol or a feature bundle `[...]`"),
        }
    }

    fn element(&mut self) -> Result<Element, SyntaxError> {
        let base = match self.peek() {
            Some(Tok::Hash) => {
                self.pos += 1;
                Element::Boundary
            }
            Some(Tok::LBrace) => {
                self.pos += 1;
                let mut alts = vec![self.element()?];
                while self.eat(&Tok::Pipe) {
                    alts.push(self.element()?);
                }
                self.expect(&Tok::RBrace, "`|` or `}`")?;
                Element::Choice(alts)
            }
            Some(Tok::LParen) => {
                self.pos += 1;
                let inner = self.element()?;
                self.expect(&Tok::RParen, "`)`")?;
                Element::Optional(Box::new(inner))
            }
            _ => Element::Segment(self.segment()?),
        };
        if self.eat(&Tok::Star) {
            if matches!(base, Element::Boundary) {
                return Err(SyntaxError { column: self.column().saturating_sub(1), message: "`#*` is meaningless: a boundary cannot repeat".into() });
            }
            return Ok(Element::Repeat(Box::new(base)));
        }
        Ok(base)
    }

    fn context_until(&mut self, stop: Option<&Tok>) -> Result<Vec<Element>, SyntaxError> {
        let mut out = Vec::new();
        while self.peek().is_some() && self.peek() != stop {
            out.push(self.element()?);
        }
        Ok(out)
    }

    fn target(&mut self) -> Result<Target, SyntaxError> {
        if self.eat(&Tok::Null) {
            return Ok(Target::Empty);
        }
        if self.eat(&Tok::LBrace) {
            let mut segs = vec![self.segment()?];
            while self.eat(&Tok::Pipe) {
                segs.push(self.segment()?);
            }
            self.expect(&Tok::RBrace, "`|` or `}`")?;
            return Ok(Target::Segments(segs));
        }
        Ok(Target::Segments(vec![self.segment()?]))
    }

    fn change(&mut self) -> Result<Change, SyntaxError> {
        match self.peek() {
            Some(Tok::Null) => {
                self.pos += 1;
                Ok(Change::Delete)
            }
            Some(Tok::Word(_)) => {
                let (w, s) = self.word("a phone")?;
                Ok(Change::Phone(w, s))
            }
            Some(Tok::LBracket) => {
                let (bundle, _) = self.bundle()?;
                let mut sets = Vec::new();
                for (term, span) in bundle.terms {
                    match term {
                        Term::Feature { name, mut values, negated: false } if values.len() == 1 => {
                            sets.push((name, values.remove(0), span))
                        }
                        _ => {
                            return Err(SyntaxError {
                                column: span.start,
                                message: "a change bundle may only hold `feature=value` terms with one value each".into(),
                            })
                        }
                    }
                }
                Ok(Change::Features(sets))
            }
            _ => self.error("a phone, a feature change `[feature=value]` or `0` for deletion"),
        }
    }
}

/// Parses one rule string.
///
/// ```
/// use orthoepy::variants::syntax::{parse_rule, Change, Element, Target};
/// let rule = parse_rule("[consonant, place=alveolar, manner=stop] -> DX / [vowel] _ [vowel, unstressed]").unwrap();
/// assert!(matches!(rule.change, Change::Phone(ref p, _) if p == "DX"));
/// assert_eq!(rule.left.len(), 1);
/// let insertion = parse_rule("0 -> T / N _ S").unwrap();
/// assert_eq!(insertion.target, Target::Empty);
/// let bad = parse_rule("R -> 0 / [vowel _").unwrap_err();
/// assert_eq!(bad.column, 16);
/// ```
pub fn parse_rule(text: &str) -> Result<RuleAst, SyntaxError> {
    let toks = tokenize(text)?;
    let mut p = Parser { toks, pos: 0, len_chars: text.chars().count() };
    let target = p.target()?;
    p.expect(&Tok::Arrow, "`->` (or `→`) after the target")?;
    let change = p.change()?;
    if matches!(target, Target::Empty) && !matches!(change, Change::Phone(..)) {
        return Err(SyntaxError { column: 0, message: "an insertion `0 -> B` needs a phone symbol as B".into() });
    }
    let (mut left, mut right) = (Vec::new(), Vec::new());
    if p.eat(&Tok::Slash) {
        left = p.context_until(Some(&Tok::Focus))?;
        p.expect(&Tok::Focus, "`_` marking the target's place in the context")?;
        right = p.context_until(None)?;
    }
    if p.peek().is_some() {
        return p.error("the end of the rule (or `/` before a context)");
    }
    if matches!(target, Target::Empty) && left.is_empty() && right.is_empty() {
        return Err(SyntaxError { column: 0, message: "an insertion needs a context (`0 -> B / C _ D`)".into() });
    }
    Ok(RuleAst { target, change, left, right })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_full_rule_with_choice_and_boundary() {
        let r = parse_rule("R -> ∅ / [vowel] _ {[consonant] | #}").unwrap();
        assert_eq!(r.change, Change::Delete);
        assert!(matches!(r.right.as_slice(), [Element::Choice(alts)] if alts.len() == 2 && alts[1] == Element::Boundary));
    }

    #[test]
    fn parses_feature_change_and_negation() {
        let r = parse_rule("[consonant, voicing=voiced, manner!=nasal|approximant] → [voicing=voiceless] / _ #").unwrap();
        let Change::Features(f) = &r.change else { panic!("expected features") };
        assert_eq!(f[0].0, "voicing");
        let Target::Segments(segs) = &r.target else { panic!("expected a target") };
        let Segment::Bundle(b, _) = &segs[0] else { panic!("expected bundle") };
        assert!(matches!(&b.terms[2].0, Term::Feature { negated: true, values, .. } if values.len() == 2));
    }

    #[test]
    fn optional_and_repeat_elements() {
        let r = parse_rule("T -> 0 / [consonant]* (S) _ #").unwrap();
        assert!(matches!(r.left[0], Element::Repeat(_)));
        assert!(matches!(r.left[1], Element::Optional(_)));
    }

    #[test]
    fn rule_without_context_is_context_free() {
        let r = parse_rule("TH->T").unwrap();
        assert!(r.left.is_empty() && r.right.is_empty());
    }

    #[test]
    fn errors_point_at_the_column() {
        assert_eq!(parse_rule("T -> D / _ _").unwrap_err().column, 11);
        assert_eq!(parse_rule("T D").unwrap_err().column, 2);
        assert_eq!(parse_rule("[] -> D").unwrap_err().column, 1);
        assert!(parse_rule("0 -> 0 / N _ S").is_err());
        assert!(parse_rule("0 -> T").is_err());
        assert!(parse_rule("T -> [voicing]").is_err());
        assert!(parse_rule("T -> D / # * _").is_err());
    }
}
