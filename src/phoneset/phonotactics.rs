//! Phonotactic constraints: forbidden sequences declared in a phoneset file (`[[constraint]]`),
//! their small pattern language, and finding violations in a pronunciation. It reports; it
//! never changes a pronunciation.
//!
//! A pattern is a space-separated sequence of elements:
//! - `#` — a word boundary, only first (word start) or last (word end);
//! - a phone symbol, e.g. `NG`;
//! - a feature class in brackets, e.g. `[place=velar nasal=nasal]`: every condition must hold;
//!   a condition may list alternatives, `[manner=stop|affricate]`, and may use the reserved
//!   names `class` (consonant, vowel, diphthong) and `syllabic` (yes, no).

use std::collections::HashMap;

use super::error::CheckProblem;
use super::phone::{Phone, PhoneClass, CLASS_FEATURE, SYLLABIC_FEATURE};
use super::pronunciation::Pronunciation;
use super::raw::{Problems, RawConstraint};
use super::schema::Schema;
use super::{PhoneId, Phoneset};
use toml::Spanned;

/// A declared phonotactic constraint: a forbidden sequence.
#[derive(Debug, Clone, PartialEq)]
pub struct PhonotacticConstraint {
    /// Identifier, unique in the phoneset, e.g. `en-no-initial-velar-nasal`.
    pub id: String,
    /// The pattern as written.
    pub pattern: String,
    /// What to tell the user when it matches.
    pub message: String,
    /// Where the constraint comes from: a published work, or "common practice".
    pub source: String,
    at_start: bool,
    at_end: bool,
    elements: Vec<Element>,
}

/// One match of a constraint in a pronunciation.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PhonotacticViolation {
    /// The constraint's id.
    pub constraint_id: String,
    /// 0-based index of the first phone matched.
    pub position: usize,
    /// The constraint's message.
    pub message: String,
}

#[derive(Debug, Clone, PartialEq)]
enum Element {
    Symbol(PhoneId),
    Class(Vec<(String, Vec<String>)>),
}

impl Element {
    fn matches(&self, id: PhoneId, phone: &Phone) -> bool {
        match self {
            Element::Symbol(want) => *want == id,
            Element::Class(conds) => conds.iter().all(|(name, values)| {
                phone
                    .feature(name)
                    .is_some_and(|v| values.iter().any(|x| x == v))
            }),
        }
    }
}

impl PhonotacticConstraint {
    fn matches_at(&self, set: &Phoneset, pron: &Pronunciation, start: usize) -> bool {
        let len = pron.phones.len();
        if (self.at_start && start != 0) || (self.at_end && start + self.elements.len() != len) {
            return false;
        }
        self.elements.iter().enumerate().all(|(k, el)| {
            pron.phones
                .get(start + k)
                .and_then(|t| set.get(t.phone).map(|p| (t.phone, p)))
                .is_some_and(|(id, p)| el.matches(id, p))
        })
    }
}

impl Phoneset {
    /// The phonotactic constraints declared in the file.
    pub fn constraints(&self) -> &[PhonotacticConstraint] {
        &self.constraints
    }

    /// Every match of every declared constraint in `pron`, by constraint then position.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let bad = set.parse("NG AA1 T").unwrap();
    /// let found = set.phonotactic_violations(&bad);
    /// assert_eq!(found[0].constraint_id, "en-no-initial-velar-nasal");
    /// assert_eq!(found[0].position, 0);
    /// assert!(set.phonotactic_violations(&set.parse("S IH1 NG").unwrap()).is_empty());
    /// ```
    pub fn phonotactic_violations(&self, pron: &Pronunciation) -> Vec<PhonotacticViolation> {
        let mut out = Vec::new();
        for c in &self.constraints {
            let last = pron.phones.len().saturating_sub(c.elements.len());
            if c.elements.len() > pron.phones.len() {
                continue;
            }
            for start in 0..=last {
                if c.matches_at(self, pron, start) {
                    out.push(PhonotacticViolation {
                        constraint_id: c.id.clone(),
                        position: start,
                        message: c.message.clone(),
                    });
                }
            }
        }
        out
    }
}

/// Builds and checks the `[[constraint]]` tables.
pub(crate) fn build(
    raw: &[Spanned<RawConstraint>],
    symbols: &HashMap<String, PhoneId>,
    schema: &Schema,
    problems: &mut Problems<'_>,
) -> Vec<PhonotacticConstraint> {
    let mut out: Vec<PhonotacticConstraint> = Vec::new();
    for c in raw {
        let c = c.get_ref();
        let id = c.id.get_ref().trim().to_string();
        let mut fail = |span: std::ops::Range<usize>, message: &str| {
            problems.add(
                span,
                CheckProblem::BadConstraint {
                    id: id.clone(),
                    message: message.to_string(),
                },
            )
        };
        if id.is_empty() {
            fail(c.id.span(), "the id is empty");
        } else if out.iter().any(|o| o.id == id) {
            fail(c.id.span(), "the id is used twice");
        }
        if c.message.get_ref().trim().is_empty() {
            fail(c.message.span(), "the message is empty; say what is wrong");
        }
        if c.source.get_ref().trim().is_empty() {
            fail(
                c.source.span(),
                "the source is empty; cite a published work or write \"common practice\"",
            );
        }
        match parse_pattern(c.pattern.get_ref(), symbols, schema) {
            Ok((at_start, elements, at_end)) => out.push(PhonotacticConstraint {
                id,
                pattern: c.pattern.get_ref().clone(),
                message: c.message.get_ref().clone(),
                source: c.source.get_ref().clone(),
                at_start,
                at_end,
                elements,
            }),
            Err(message) => fail(c.pattern.span(), &message),
        }
    }
    out
}

type Parsed = (bool, Vec<Element>, bool);

fn parse_pattern(
    pattern: &str,
    symbols: &HashMap<String, PhoneId>,
    schema: &Schema,
) -> Result<Parsed, String> {
    let parts = split_pattern(pattern)?;
    let n = parts.len();
    let mut elements = Vec::new();
    let (mut at_start, mut at_end) = (false, false);
    for (i, part) in parts.iter().enumerate() {
        if *part == "#" {
            match i {
                0 => at_start = true,
                _ if i + 1 == n => at_end = true,
                _ => return Err("`#` (word boundary) may only stand first or last".into()),
            }
        } else if let Some(inner) = part.strip_prefix('[').and_then(|p| p.strip_suffix(']')) {
            elements.push(Element::Class(parse_class(inner, schema)?));
        } else if let Some(&id) = symbols.get(*part) {
            elements.push(Element::Symbol(id));
        } else {
            return Err(format!("`{part}` is not a phone symbol; write feature classes in brackets, e.g. [place=velar]"));
        }
    }
    if elements.is_empty() {
        return Err("the pattern has no phone element".into());
    }
    Ok((at_start, elements, at_end))
}

/// Splits a pattern into elements, keeping bracketed classes whole.
fn split_pattern(pattern: &str) -> Result<Vec<&str>, String> {
    let mut parts = Vec::new();
    let mut rest = pattern.trim_start();
    while !rest.is_empty() {
        let end = if rest.starts_with('[') {
            rest.find(']')
                .map(|i| i + 1)
                .ok_or("a `[` has no closing `]`")?
        } else {
            rest.find(char::is_whitespace).unwrap_or(rest.len())
        };
        parts.push(&rest[..end]);
        rest = rest[end..].trim_start();
    }
    Ok(parts)
}

fn parse_class(inner: &str, schema: &Schema) -> Result<Vec<(String, Vec<String>)>, String> {
    let mut conds = Vec::new();
    for cond in inner.split_whitespace() {
        let (name, values) = cond
            .split_once('=')
            .ok_or_else(|| format!("`{cond}` should be name=value"))?;
        let values: Vec<String> = values.split('|').map(str::to_string).collect();
        for v in &values {
            let ok = match name {
                CLASS_FEATURE => PhoneClass::from_name(v).is_some(),
                SYLLABIC_FEATURE => v == "yes" || v == "no",
                _ => schema
                    .feature(name)
                    .ok_or_else(|| {
                        format!(
                            "unknown feature `{name}`; the schema has: {}",
                            schema.names()
                        )
                    })?
                    .has_value(v),
            };
            if !ok {
                return Err(format!("`{v}` is not a value of `{name}`"));
            }
        }
        conds.push((name.to_string(), values));
    }
    if conds.is_empty() {
        return Err("an empty class `[]` matches everything; give at least one condition".into());
    }
    Ok(conds)
}
