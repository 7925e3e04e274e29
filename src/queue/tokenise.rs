//! Corpus tokenising: turning running text into counted word candidates for the queue.
//!
//! The rule (configurable through [`TokenRule`]):
//! * A token is a maximal run of letters (Unicode `Alphabetic`), combining marks and digits.
//!   A hyphen or an apostrophe (`'` U+0027, `’` U+2019, `ʼ` U+02BC) belongs to a token only when
//!   it stands between two such characters; anywhere else it separates tokens. Curly and
//!   modifier apostrophes are written as `'`.
//! * [`Apostrophe::Keep`] keeps `o'clock` whole; `Split` yields `o` and `clock`; `Drop` writes
//!   `oclock`.
//! * [`Hyphen::Keep`] keeps `ferry-port` whole; `Split` yields `ferry` and `port`.
//! * [`Digits::Skip`] drops tokens containing a digit (`10:45`, `A9`); `Keep` keeps them.
//! * [`Case::Fold`] counts `Quay` and `quay` together and reports the most frequent spelling
//!   (ties: the first seen); `Keep` counts them apart.
//!
//! Each counted word keeps the first line it was seen in as its example context. This file
//! knows nothing about lexicons: the caller says which words are already known.

use std::collections::HashMap;

/// What to do with an apostrophe inside a word.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Apostrophe {
    /// Keep it: `o'clock`.
    #[default]
    Keep,
    /// Split there: `o`, `clock`.
    Split,
    /// Remove it: `oclock`.
    Drop,
}

/// What to do with a hyphen inside a word.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Hyphen {
    /// Split there: `ferry`, `port`.
    #[default]
    Split,
    /// Keep it: `ferry-port`.
    Keep,
}

/// What to do with tokens that contain digits.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Digits {
    /// Leave them out (times, platform numbers, service codes).
    #[default]
    Skip,
    /// Keep them.
    Keep,
}

/// Whether spellings differing only in case count as one word.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Case {
    /// Count together, report the most frequent spelling.
    #[default]
    Fold,
    /// Count apart.
    Keep,
}

/// The tokenising rule; see the module documentation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct TokenRule {
    /// Apostrophes inside words.
    pub apostrophe: Apostrophe,
    /// Hyphens inside words.
    pub hyphen: Hyphen,
    /// Tokens with digits.
    pub digits: Digits,
    /// Case folding.
    pub case: Case,
}

/// A word counted in a corpus.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Counted {
    /// The spelling to queue.
    pub word: String,
    /// How often it occurred.
    pub count: u64,
    /// The first line it occurred in, trimmed (at most [`MAX_CONTEXT`] characters).
    pub context: String,
}

/// Longest context line kept, in characters.
pub const MAX_CONTEXT: usize = 160;

fn is_apostrophe(c: char) -> bool {
    matches!(c, '\'' | '\u{2019}' | '\u{02BC}')
}

fn is_hyphen(c: char) -> bool {
    matches!(c, '-' | '\u{2010}' | '\u{2011}')
}

fn is_word_char(c: char) -> bool {
    c.is_alphabetic() || c.is_numeric() || is_mark(c)
}

fn is_mark(c: char) -> bool {
    // Combining diacritical marks blocks (Unicode 15, chart U+0300..U+036F and U+1AB0..U+1AFF,
    // U+1DC0..U+1DFF, U+20D0..U+20FF, U+FE20..U+FE2F).
    matches!(c as u32, 0x0300..=0x036F | 0x1AB0..=0x1AFF | 0x1DC0..=0x1DFF | 0x20D0..=0x20FF | 0xFE20..=0xFE2F)
}

/// Split one line into tokens under `rule`.
///
/// ```
/// use orthoepy::queue::{tokens, TokenRule};
/// let words = tokens("Two returns to St. Aldwyn's at 10:45, ferry-port side.", &TokenRule::default());
/// assert_eq!(words, vec!["Two", "returns", "to", "St", "Aldwyn's", "at", "ferry", "port", "side"]);
/// ```
pub fn tokens(line: &str, rule: &TokenRule) -> Vec<String> {
    let chars: Vec<char> = line.chars().collect();
    let mut out = Vec::new();
    let mut cur = String::new();
    let flush = |cur: &mut String, out: &mut Vec<String>| {
        if !cur.is_empty() {
            let tok = std::mem::take(cur);
            if rule.digits == Digits::Keep || !tok.chars().any(|c| c.is_numeric()) {
                out.push(tok);
            }
        }
    };
    for (i, &c) in chars.iter().enumerate() {
        if is_word_char(c) {
            cur.push(c);
            continue;
        }
        let inside = !cur.is_empty() && chars.get(i + 1).is_some_and(|&n| is_word_char(n));
        if inside && is_apostrophe(c) {
            match rule.apostrophe {
                Apostrophe::Keep => cur.push('\''),
                Apostrophe::Drop => {}
                Apostrophe::Split => flush(&mut cur, &mut out),
            }
        } else if inside && is_hyphen(c) && rule.hyphen == Hyphen::Keep {
            cur.push('-');
        } else {
            flush(&mut cur, &mut out);
        }
    }
    flush(&mut cur, &mut out);
    out
}

/// Count the words of a corpus that `is_known` does not know, most frequent first (ties in
/// alphabetical order of the reported spelling).
///
/// ```
/// use orthoepy::queue::{count_unknown, TokenRule};
/// let text = "Is the Kelport ferry late?\nKelport or Saltmarsh first?\nthe kelport one";
/// let counted = count_unknown(text, &TokenRule::default(), |w| {
///     ["is", "the", "ferry", "late", "or", "first", "one"].contains(&w.to_lowercase().as_str())
/// });
/// assert_eq!(counted[0].word, "Kelport");
/// assert_eq!(counted[0].count, 3);
/// assert_eq!(counted[0].context, "Is the Kelport ferry late?");
/// assert_eq!(counted[1].word, "Saltmarsh");
/// ```
pub fn count_unknown(text: &str, rule: &TokenRule, is_known: impl Fn(&str) -> bool) -> Vec<Counted> {
    struct Tally {
        count: u64,
        context: String,
        spellings: Vec<(String, u64)>,
        first_seen: usize,
    }
    let mut tallies: HashMap<String, Tally> = HashMap::new();
    let mut order = 0usize;
    for line in text.lines() {
        for tok in tokens(line, rule) {
            let key = match rule.case {
                Case::Fold => tok.to_lowercase(),
                Case::Keep => tok.clone(),
            };
            let tally = tallies.entry(key).or_insert_with(|| {
                order += 1;
                Tally { count: 0, context: clip(line.trim()), spellings: Vec::new(), first_seen: order }
            });
            tally.count += 1;
            match tally.spellings.iter_mut().find(|(s, _)| *s == tok) {
                Some((_, n)) => *n += 1,
                None => tally.spellings.push((tok, 1)),
            }
        }
    }
    let mut out: Vec<(usize, Counted)> = tallies
        .into_values()
        .filter_map(|t| {
            // max_by_key returns the last maximum; iterate reversed so ties go to the first seen.
            let word = t.spellings.iter().rev().max_by_key(|(_, n)| *n).map(|(s, _)| s.clone())?;
            (!is_known(&word)).then_some((t.first_seen, Counted { word, count: t.count, context: t.context }))
        })
        .collect();
    out.sort_by(|(_, a), (_, b)| b.count.cmp(&a.count).then_with(|| a.word.cmp(&b.word)));
    out.into_iter().map(|(_, c)| c).collect()
}

fn clip(line: &str) -> String {
    let collapsed: String = line.split_whitespace().collect::<Vec<_>>().join(" ");
    if collapsed.chars().count() <= MAX_CONTEXT {
        collapsed
    } else {
        let mut s: String = collapsed.chars().take(MAX_CONTEXT - 1).collect();
        s.push('…');
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn apostrophe_modes() {
        let line = "It’s o'clock 'quoted'";
        let keep = tokens(line, &TokenRule::default());
        assert_eq!(keep, vec!["It's", "o'clock", "quoted"]);
        let split = tokens(line, &TokenRule { apostrophe: Apostrophe::Split, ..TokenRule::default() });
        assert_eq!(split, vec!["It", "s", "o", "clock", "quoted"]);
        let drop = tokens(line, &TokenRule { apostrophe: Apostrophe::Drop, ..TokenRule::default() });
        assert_eq!(drop, vec!["Its", "oclock", "quoted"]);
    }

    #[test]
    fn hyphen_and_digit_modes() {
        let line = "day-return on the 7-day A9 -- ok";
        assert_eq!(tokens(line, &TokenRule::default()), vec!["day", "return", "on", "the", "day", "ok"]);
        let keep = TokenRule { hyphen: Hyphen::Keep, digits: Digits::Keep, ..TokenRule::default() };
        assert_eq!(tokens(line, &keep), vec!["day-return", "on", "the", "7-day", "A9", "ok"]);
    }

    #[test]
    fn case_keep_counts_apart_and_fold_picks_majority() {
        let text = "quay Quay quay";
        let fold = count_unknown(text, &TokenRule::default(), |_| false);
        assert_eq!(fold, vec![Counted { word: "quay".into(), count: 3, context: "quay Quay quay".into() }]);
        let keep = count_unknown(text, &TokenRule { case: Case::Keep, ..TokenRule::default() }, |_| false);
        assert_eq!(keep.len(), 2);
        assert_eq!(keep[0].count, 2);
    }

    #[test]
    fn combining_marks_stay_in_words() {
        // "é" written as e + U+0301 must stay one token.
        assert_eq!(tokens("cafe\u{301} bar", &TokenRule::default()), vec!["cafe\u{301}", "bar"]);
    }

    #[test]
    fn long_context_is_clipped() {
        let line = format!("zork {}", "word ".repeat(100));
        let c = count_unknown(&line, &TokenRule::default(), |w| w != "zork");
        assert_eq!(c[0].context.chars().count(), MAX_CONTEXT);
    }
}
