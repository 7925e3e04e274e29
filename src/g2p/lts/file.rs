//! Reading a letter-to-sound rule file (TOML) into checked, compiled rules.
//!
//! Owns the file schema, the rule-line syntax `LETTERS -> PHONES [/ LEFT _ RIGHT]`, and turning
//! byte offsets into file:line:column for every error. Phones are validated against the
//! phoneset here, once, so transcription never meets an unknown symbol. It must not apply rules.

use std::collections::BTreeMap;

use serde::Deserialize;
use toml::Spanned;

use super::pattern::{LetterContext, PatternError};
use super::stress::StressMethod;
use super::{LtsError, Output, Rule};
use crate::phoneset::Phoneset;
use crate::support::located::{line_column, Located};

/// The TOML document as written.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    language: String,
    phoneset: Spanned<String>,
    #[serde(default)]
    description: String,
    alphabet: Spanned<String>,
    #[serde(default)]
    classes: BTreeMap<String, Spanned<String>>,
    stress: Spanned<RawStress>,
    rules: BTreeMap<String, Vec<Spanned<String>>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStress {
    method: String,
    #[serde(default)]
    accented: String,
    #[serde(default)]
    penultimate_after: String,
    #[serde(default)]
    onsets: Vec<String>,
    #[serde(default)]
    reduce: Vec<(String, String)>,
}

/// Everything a rule file declares, validated.
pub(super) struct ParsedFile {
    pub(super) language: String,
    pub(super) description: String,
    pub(super) alphabet: Vec<char>,
    pub(super) rules: Vec<Rule>,
    pub(super) stress: StressMethod,
}

/// Parses and validates a rule file; `origin` names it in errors (a path or `shipped:en`).
pub(super) fn parse(text: &str, origin: &str, phoneset: &Phoneset) -> Result<ParsedFile, LtsError> {
    let raw: RawFile = toml::from_str(text).map_err(|e| LtsError::Syntax(Located::from_toml(origin, text, &e)))?;
    let located = |offset: usize, message: String| LtsError::Syntax(Located::at_offset(origin, text.as_bytes(), offset, message));
    if raw.phoneset.get_ref() != phoneset.id() {
        let declared = raw.phoneset.get_ref();
        return Err(LtsError::PhonesetMismatch(Located::at_offset(
            origin,
            text.as_bytes(),
            raw.phoneset.span().start,
            format!("the rules are written for phoneset `{declared}` but `{}` was given; load them with `{declared}`", phoneset.id()),
        )));
    }
    let mut classes = BTreeMap::new();
    for (name, members) in &raw.classes {
        let mut chars = name.chars();
        match (chars.next(), chars.next()) {
            (Some(c), None) if c.is_ascii_uppercase() => {
                classes.insert(c, members.get_ref().chars().filter(|c| !c.is_whitespace()).collect());
            }
            _ => {
                return Err(located(
                    members.span().start,
                    format!("class name `{name}` must be one upper-case letter A-Z"),
                ))
            }
        }
    }
    // Rules from all sections keep the order they have in the file.
    let mut lines: Vec<&Spanned<String>> = raw.rules.values().flatten().collect();
    lines.sort_by_key(|l| l.span().start);
    let mut rules = Vec::with_capacity(lines.len());
    for (order, line) in lines.into_iter().enumerate() {
        let start = line.span().start;
        let mut rule = parse_rule(line.get_ref(), &classes, phoneset)
            .map_err(|(column, message)| located(start + 1 + column, message))?;
        rule.order = order;
        rule.line = line_column(text.as_bytes(), start).0;
        rules.push(rule);
    }
    let alphabet: Vec<char> = raw.alphabet.get_ref().chars().filter(|c| !c.is_whitespace()).collect();
    for letter in &alphabet {
        let covered = rules.iter().any(|r| r.letters.len() == 1 && r.letters.first() == Some(letter) && r.is_context_free());
        if !covered {
            return Err(located(
                raw.alphabet.span().start,
                format!("letter `{letter}` of the alphabet has no context-free single-letter rule; add `{letter} -> ...` as its fallback"),
            ));
        }
    }
    let stress_span = raw.stress.span().start;
    let stress = StressMethod::from_parts(
        &raw.stress.get_ref().method,
        &raw.stress.get_ref().accented,
        &raw.stress.get_ref().penultimate_after,
        &raw.stress.get_ref().onsets,
        &raw.stress.get_ref().reduce,
        phoneset,
    )
    .map_err(|message| located(stress_span, message))?;
    Ok(ParsedFile { language: raw.language, description: raw.description, alphabet, rules, stress })
}

/// Parses one rule line. Errors carry the byte offset within the line; the caller sets
/// `order` and `line`.
fn parse_rule(line: &str, classes: &BTreeMap<char, Vec<char>>, phoneset: &Phoneset) -> Result<Rule, (usize, String)> {
    let arrow = line.find("->").ok_or((0, "a rule reads `LETTERS -> PHONES [/ LEFT _ RIGHT]`; `->` is missing".to_string()))?;
    let (letters_text, rest) = (&line[..arrow], &line[arrow + 2..]);
    let letters: Vec<char> = letters_text.chars().filter(|c| !c.is_whitespace()).collect();
    if letters.is_empty() {
        return Err((0, "the letters before `->` are empty".to_string()));
    }
    let (phones_text, context_text, context_offset) = match rest.find('/') {
        Some(slash) => (&rest[..slash], Some(&rest[slash + 1..]), arrow + 2 + slash + 1),
        None => (rest, None, line.len()),
    };
    let (left, right) = match context_text {
        None => (LetterContext::default(), LetterContext::default()),
        Some(ctx) => {
            let underscore = ctx.find('_').ok_or((context_offset, "the context after `/` needs `_` where the letters stand".to_string()))?;
            let pattern = |text: &str, base: usize| {
                LetterContext::parse(text, classes).map_err(|e| match e {
                    PatternError::UnknownClass { name, column } => {
                        (base + column, format!("letter class `{name}` is not declared under [classes]"))
                    }
                    PatternError::DanglingRepeat { column } => (base + column, "`*` or `+` must follow a letter or class".to_string()),
                    PatternError::RepeatedBoundary { column } => (base + column, "the boundary `#` cannot repeat".to_string()),
                })
            };
            (
                pattern(&ctx[..underscore], context_offset)?,
                pattern(&ctx[underscore + 1..], context_offset + underscore + 1)?,
            )
        }
    };
    let mut output = Vec::new();
    let phones_offset = arrow + 2;
    for (token_start, token) in tokens(phones_text) {
        let column = phones_offset + token_start;
        match token {
            "-" => {}
            "^" => output.push(Output::StressBefore),
            _ => {
                let (symbol, stress) = phoneset.split_stress(token);
                let id = phoneset.lookup(symbol).ok_or_else(|| {
                    let near = phoneset.suggest(symbol, 3);
                    let hint = if near.is_empty() { String::new() } else { format!("; did you mean {}?", near.join(", ")) };
                    (column, format!("phone `{token}` is not in phoneset {}{hint}", phoneset.id()))
                })?;
                output.push(Output::Phone { id, stress: stress.map(|s| s.level) });
            }
        }
    }
    Ok(Rule { letters, left, right, output, order: 0, line: 0 })
}

/// Whitespace-separated tokens with their byte offsets.
fn tokens(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.split_whitespace().map(move |t| (t.as_ptr() as usize - text.as_ptr() as usize, t))
}
