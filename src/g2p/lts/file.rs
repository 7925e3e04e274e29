//! Reading a letter-to-sound rule file (TOML) into checked, compiled rules.
//!
//! Owns the file schema, the rule-line syntax `LETTERS -> PHONES [/ LEFT _ RIGHT]`, and turning
//! byte offsets into file:line:column for every error. Phones are validated against the
//! phoneset here, once, so transcription never meets an unknown symbol, a stress mark on a
//! consonant or an empty output; letters must be the alphabet's; a rule with the same letters
//! and contexts as an earlier one (which always wins) is refused. It must not apply rules.

use std::collections::BTreeMap;

use serde::Deserialize;
use toml::Spanned;

use super::pattern::{LetterContext, PatternError, Side};
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
    reduce: Vec<Spanned<(String, String)>>,
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
    let alphabet: Vec<char> = raw.alphabet.get_ref().chars().filter(|c| !c.is_whitespace()).collect();
    if let Some(upper) = alphabet.iter().find(|c| c.to_lowercase().ne(std::iter::once(**c))) {
        return Err(located(
            raw.alphabet.span().start,
            format!("letter `{upper}` of the alphabet is not lower case; words are lower-cased before the rules run, so write it in lower case"),
        ));
    }
    // Rules from all sections keep the order they have in the file.
    let mut lines: Vec<&Spanned<String>> = raw.rules.values().flatten().collect();
    lines.sort_by_key(|l| l.span().start);
    let mut rules: Vec<Rule> = Vec::with_capacity(lines.len());
    for (order, line) in lines.into_iter().enumerate() {
        let start = line.span().start;
        let mut rule = parse_rule(line.get_ref(), &classes, &alphabet, phoneset)
            .map_err(|(column, message)| located(start + 1 + column, message))?;
        rule.order = order;
        rule.line = line_column(text.as_bytes(), start).0;
        if let Some(earlier) = rules.iter().find(|r| r.letters == rule.letters && r.left == rule.left && r.right == rule.right) {
            return Err(located(
                start + 1,
                format!(
                    "this rule has the same letters and context as the rule on line {}, which always wins, so it can never fire; remove one or give it another context",
                    earlier.line
                ),
            ));
        }
        rules.push(rule);
    }
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
    for pair in &raw.stress.get_ref().reduce {
        let (full, reduced) = pair.get_ref();
        for symbol in [full, reduced] {
            let consonant = phoneset.lookup(symbol).is_some_and(|id| !phoneset.phone(id).is_nucleus());
            if consonant {
                return Err(located(
                    pair.span().start,
                    format!("reduce pair [{full:?}, {reduced:?}]: `{symbol}` is not a vowel (reduction turns an unstressed vowel into another vowel); name two vowels of {}", phoneset.id()),
                ));
            }
        }
    }
    let reduce: Vec<(String, String)> = raw.stress.get_ref().reduce.iter().map(|p| p.get_ref().clone()).collect();
    let stress = StressMethod::from_parts(
        &raw.stress.get_ref().method,
        &raw.stress.get_ref().accented,
        &raw.stress.get_ref().penultimate_after,
        &raw.stress.get_ref().onsets,
        &reduce,
        phoneset,
    )
    .map_err(|message| located(stress_span, message))?;
    Ok(ParsedFile { language: raw.language, description: raw.description, alphabet, rules, stress })
}

/// Parses one rule line. Errors carry the byte offset within the line; the caller sets
/// `order` and `line`.
fn parse_rule(
    line: &str,
    classes: &BTreeMap<char, Vec<char>>,
    alphabet: &[char],
    phoneset: &Phoneset,
) -> Result<Rule, (usize, String)> {
    let arrow = line.find("->").ok_or((0, "a rule reads `LETTERS -> PHONES [/ LEFT _ RIGHT]`; `->` is missing".to_string()))?;
    let (letters_text, rest) = (&line[..arrow], &line[arrow + 2..]);
    let letters: Vec<char> = letters_text.chars().filter(|c| !c.is_whitespace()).collect();
    if letters.is_empty() {
        return Err((0, "the letters before `->` are empty".to_string()));
    }
    if let Some((column, letter)) = letters_text.char_indices().find(|(_, c)| !c.is_whitespace() && !alphabet.contains(c)) {
        return Err((column, not_a_letter(letter)));
    }
    let (phones_text, context_text, context_offset) = match rest.find('/') {
        Some(slash) => (&rest[..slash], Some(&rest[slash + 1..]), arrow + 2 + slash + 1),
        None => (rest, None, line.len()),
    };
    let (left, right) = match context_text {
        None => (LetterContext::default(), LetterContext::default()),
        Some(ctx) => {
            let underscore = ctx.find('_').ok_or((context_offset, "the context after `/` needs `_` where the letters stand".to_string()))?;
            let pattern = |text: &str, side: Side, base: usize| {
                LetterContext::parse(text, side, classes, alphabet).map_err(|e| match e {
                    PatternError::UnknownClass { name, column } => {
                        (base + column, format!("letter class `{name}` is not declared under [classes]"))
                    }
                    PatternError::DanglingRepeat { column } => (base + column, "`*` or `+` must follow a letter or class".to_string()),
                    PatternError::RepeatedBoundary { column } => (base + column, "the boundary `#` cannot repeat".to_string()),
                    PatternError::MisplacedBoundary { column } => (
                        base + column,
                        "the word edge `#` can only stand at the outer end of a context (`# ... _` or `_ ... #`), once".to_string(),
                    ),
                    PatternError::SecondPlaceholder { column } => {
                        (base + column, "a second `_`; the context has exactly one `_`, where the letters stand".to_string())
                    }
                    PatternError::NotALetter { letter, column } => (base + column, not_a_letter(letter)),
                })
            };
            (
                pattern(&ctx[..underscore], Side::Left, context_offset)?,
                pattern(&ctx[underscore + 1..], Side::Right, context_offset + underscore + 1)?,
            )
        }
    };
    let mut output = Vec::new();
    let phones_offset = arrow + 2;
    let written: Vec<(usize, &str)> = tokens(phones_text).collect();
    if written.is_empty() {
        return Err((phones_offset, "the rule writes nothing; write `-` if the letters are silent".to_string()));
    }
    for (token_start, token) in written.iter().copied() {
        let column = phones_offset + token_start;
        match token {
            "-" if written.len() == 1 => {}
            "-" => return Err((column, "`-` (silent) stands alone; remove it or the phones beside it".to_string())),
            "^" => output.push(Output::StressBefore),
            _ => {
                let (symbol, stress) = phoneset.split_stress(token);
                let id = phoneset.lookup(symbol).ok_or_else(|| {
                    let near = phoneset.suggest(symbol, 3);
                    let hint = if near.is_empty() { String::new() } else { format!("; did you mean {}?", near.join(", ")) };
                    (column, format!("phone `{token}` is not in phoneset {}{hint}", phoneset.id()))
                })?;
                if stress.is_some() && !phoneset.phone(id).is_nucleus() {
                    return Err((column, format!("`{token}`: `{symbol}` is not a vowel and cannot carry stress; write `{symbol}` without the mark")));
                }
                output.push(Output::Phone { id, stress: stress.map(|s| s.level) });
            }
        }
    }
    Ok(Rule { letters, left, right, output, order: 0, line: 0 })
}

fn not_a_letter(letter: char) -> String {
    format!("`{letter}` is not a letter of the alphabet (nor `#`, `*`, `+` or a class); add it to `alphabet` with a fallback rule, or remove it")
}

/// Whitespace-separated tokens with their byte offsets.
fn tokens(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.split_whitespace().map(move |t| (t.as_ptr() as usize - text.as_ptr() as usize, t))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn en() -> Phoneset {
        Phoneset::shipped("en-arpa").unwrap()
    }

    /// A small rule file around `rules` (one list), with fallbacks for every letter.
    fn with_rules(rules: &str) -> String {
        format!(
            "language = \"t\"\nphoneset = \"en-arpa\"\nalphabet = \"aehtz\"\n[stress]\nmethod = \"english\"\n[rules]\n\
             extra = [{rules}]\nfallback = [\"a -> AE\", \"e -> EH\", \"h -> HH\", \"t -> T\", \"z -> Z\"]\n"
        )
    }

    /// `(line, column, message)` of the refusal of `text`.
    fn refusal(text: &str) -> (usize, usize, String) {
        match parse(text, "t.toml", &en()) {
            Err(LtsError::Syntax(at)) => (at.line().unwrap_or(0), at.column().unwrap_or(0), at.message),
            Err(other) => panic!("unexpected {other}"),
            Ok(_) => panic!("accepted: {text}"),
        }
    }

    #[test]
    fn malformed_contexts_of_the_issue_are_refused_where_they_go_wrong() {
        // `the -> DH AH0 / # _ _ #`: a second placeholder, at line 7, column 31 of the file.
        let (line, column, message) = refusal(&with_rules("\"the -> DH AH0 / # _ _ #\""));
        assert_eq!((line, column), (7, 31), "{message}");
        assert!(message.contains("second `_`"), "{message}");
        let (line, column, message) = refusal(&with_rules("\"t -> T / zz _ ##\""));
        assert_eq!((line, column), (7, 26), "{message}");
        assert!(message.contains("outer end"), "{message}");
    }

    #[test]
    fn empty_outputs_stray_silence_and_unknown_letters_are_refused() {
        let (_, column, message) = refusal(&with_rules("\"ea ->  / _ t\""));
        assert_eq!(column, 16);
        assert!(message.contains("writes nothing"), "{message}");
        assert!(refusal(&with_rules("\"th -> - TH\"")).2.contains("stands alone"));
        assert!(refusal(&with_rules("\"a -> EY / _ [t\"")).2.contains("`[` is not a letter"));
        assert!(refusal(&with_rules("\"A -> EY\"")).2.contains("`A` is not a letter"));
        let duplicate = refusal(&with_rules("\"th -> TH / _ e\", \"th -> DH / _ e\""));
        assert!(duplicate.2.contains("same letters and context as the rule on line 7"), "{}", duplicate.2);
        assert!(parse(&with_rules("\"th -> TH / _ e\", \"th -> DH\", \"h -> - / t _\""), "t.toml", &en()).is_ok());
    }

    #[test]
    fn fuzz_regressions_are_refused_with_their_place() {
        // fuzz/regressions/lts_rules: accepted at load, then gave transcriptions that do not
        // parse in en-arpa. The second file puts a stress mark on a consonant (`gu -> G0`, line
        // 228); its first fault now refused is a second `/` on line 71.
        let second = include_str!("../../../fuzz/regressions/lts_rules/output-does-not-parse-2.toml");
        assert_eq!(refusal(second).0, 71);
        let text = with_rules("\"gu -> G0/ # _ a\", \"g -> G\", \"u -> AH\"").replace("aehtz", "aeghtuz");
        let (line, column, message) = refusal(&text);
        assert!(message.contains("`G0`: `G` is not a vowel"), "{message}");
        assert_eq!((line, column), (7, 17), "{message}");
        // The first file has a `reduce` pair whose target is a consonant (`["EH", "CH"]`); with
        // its rule lines fixed it is that pair that is refused.
        let first = include_str!("../../../fuzz/regressions/lts_rules/output-does-not-parse-1.toml");
        assert!(parse(first, "r.toml", &en()).is_err());
        let reduce = with_rules("").replace("method = \"english\"", "method = \"english\"\nreduce = [[\"AE\", \"AH\"], [\"EH\", \"CH\"]]");
        let (line, column, message) = refusal(&reduce);
        assert_eq!((line, column), (6, 25), "{message}");
        assert!(message.contains("`CH` is not a vowel"), "{message}");
    }
}
