//! Context patterns of letter-to-sound rules: parsing the left/right context notation and
//! matching it against the letters around a rule's graphemes.
//!
//! A context is a sequence of elements written without separators (spaces are ignored):
//! a letter of the rule file's alphabet stands for itself, an ASCII upper-case letter names a
//! letter class declared in the rule file, `#` is the word boundary (only at the outer end: first
//! in a left context, last in a right one), and `*` / `+` after a letter or class mean "zero or
//! more" / "one or more". Anything else (a second `_`, punctuation, a letter outside the alphabet)
//! is refused, since it could never match a word. This module knows nothing about phones or rule
//! files.

use std::collections::BTreeMap;

/// One element of a context pattern.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Element {
    /// Exactly this letter.
    Letter(char),
    /// Any letter of the class.
    Class(Vec<char>),
    /// The word boundary (before the first or after the last letter).
    Boundary,
}

/// How often an element may repeat.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Repeat {
    Once,
    ZeroOrMore,
    OneOrMore,
}

/// A parsed context: elements in reading order (left to right as written).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub(crate) struct LetterContext {
    items: Vec<(Element, Repeat)>,
}

/// Which side of the `_` a context stands on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Side {
    Left,
    Right,
}

/// Why a context could not be parsed; the byte column (0-based, within the context text) is given.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum PatternError {
    UnknownClass { name: char, column: usize },
    DanglingRepeat { column: usize },
    RepeatedBoundary { column: usize },
    /// A `#` that is not at the outer end of its context (`##`, `a # b`, `_ # a`).
    MisplacedBoundary { column: usize },
    /// A second `_` (the first one splits left from right).
    SecondPlaceholder { column: usize },
    /// A character that is neither a letter of the alphabet nor pattern notation.
    NotALetter { letter: char, column: usize },
}

impl LetterContext {
    /// Parses `text`, the context on `side` of the `_`, using the declared letter classes and
    /// the file's alphabet.
    pub(crate) fn parse(
        text: &str,
        side: Side,
        classes: &BTreeMap<char, Vec<char>>,
        alphabet: &[char],
    ) -> Result<LetterContext, PatternError> {
        let mut items: Vec<(Element, Repeat)> = Vec::new();
        for (column, c) in text.char_indices() {
            let after_right_edge = side == Side::Right && items.last().is_some_and(|(e, _)| *e == Element::Boundary);
            if after_right_edge && !c.is_whitespace() && !matches!(c, '*' | '+') {
                return Err(PatternError::MisplacedBoundary { column });
            }
            match c {
                c if c.is_whitespace() => {}
                '_' => return Err(PatternError::SecondPlaceholder { column }),
                '#' if side == Side::Left && !items.is_empty() => return Err(PatternError::MisplacedBoundary { column }),
                '*' | '+' => {
                    let repeat = if c == '*' { Repeat::ZeroOrMore } else { Repeat::OneOrMore };
                    match items.last_mut() {
                        Some((Element::Boundary, _)) => return Err(PatternError::RepeatedBoundary { column }),
                        Some((_, r @ Repeat::Once)) => *r = repeat,
                        _ => return Err(PatternError::DanglingRepeat { column }),
                    }
                }
                '#' => items.push((Element::Boundary, Repeat::Once)),
                c if c.is_ascii_uppercase() => match classes.get(&c) {
                    Some(members) => items.push((Element::Class(members.clone()), Repeat::Once)),
                    None => return Err(PatternError::UnknownClass { name: c, column }),
                },
                c if alphabet.contains(&c) => items.push((Element::Letter(c), Repeat::Once)),
                letter => return Err(PatternError::NotALetter { letter, column }),
            }
        }
        Ok(LetterContext { items })
    }

    /// True when this context, read rightwards, matches the letters starting at `start`.
    pub(crate) fn matches_right(&self, letters: &[char], start: usize) -> bool {
        let items: Vec<&(Element, Repeat)> = self.items.iter().collect();
        match_from(&items, letters, Cursor::Right(start))
    }

    /// True when this context, read leftwards, matches the letters ending just before `end`.
    pub(crate) fn matches_left(&self, letters: &[char], end: usize) -> bool {
        let items: Vec<&(Element, Repeat)> = self.items.iter().rev().collect();
        match_from(&items, letters, Cursor::Left(end))
    }
}

/// A reading position: `Right(i)` reads `letters[i]` next, `Left(i)` reads `letters[i - 1]` next.
#[derive(Debug, Clone, Copy)]
enum Cursor {
    Right(usize),
    Left(usize),
}

impl Cursor {
    fn next_letter(self, letters: &[char]) -> Option<(char, Cursor)> {
        match self {
            Cursor::Right(i) => letters.get(i).map(|&c| (c, Cursor::Right(i + 1))),
            Cursor::Left(0) => None,
            Cursor::Left(i) => letters.get(i - 1).map(|&c| (c, Cursor::Left(i - 1))),
        }
    }

    fn at_boundary(self, letters: &[char]) -> bool {
        match self {
            Cursor::Right(i) => i >= letters.len(),
            Cursor::Left(i) => i == 0,
        }
    }
}

fn element_accepts(element: &Element, letter: char) -> bool {
    match element {
        Element::Letter(c) => *c == letter,
        Element::Class(members) => members.contains(&letter),
        Element::Boundary => false,
    }
}

/// Backtracking matcher; patterns are a handful of elements, so the search stays tiny.
fn match_from(items: &[&(Element, Repeat)], letters: &[char], cursor: Cursor) -> bool {
    let Some(((element, repeat), rest)) = items.split_first().map(|(first, rest)| (*first, rest)) else {
        return true;
    };
    if *element == Element::Boundary {
        return cursor.at_boundary(letters) && match_from(rest, letters, cursor);
    }
    let mut taken = 0usize;
    let mut position = cursor;
    loop {
        let enough = match repeat {
            Repeat::Once | Repeat::OneOrMore => taken >= 1,
            Repeat::ZeroOrMore => true,
        };
        if enough && match_from(rest, letters, position) {
            return true;
        }
        if *repeat == Repeat::Once && taken == 1 {
            return false;
        }
        match position.next_letter(letters) {
            Some((letter, next)) if element_accepts(element, letter) => {
                taken += 1;
                position = next;
            }
            _ => return false,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn classes() -> BTreeMap<char, Vec<char>> {
        let mut c = BTreeMap::new();
        c.insert('V', "aeiou".chars().collect());
        c.insert('C', "bcdfghjklmnpqrstvwxz".chars().collect());
        c
    }

    fn word(s: &str) -> Vec<char> {
        s.chars().collect()
    }

    const ALPHABET: &[char] = &['a', 'b', 'e', 'k', 'm', 'r', 's', 't', 'i', 'o'];

    fn parse_right(text: &str) -> Result<LetterContext, PatternError> {
        LetterContext::parse(text, Side::Right, &classes(), ALPHABET)
    }

    fn parse_left(text: &str) -> Result<LetterContext, PatternError> {
        LetterContext::parse(text, Side::Left, &classes(), ALPHABET)
    }

    #[test]
    fn right_context_with_class_and_boundary() {
        let ctx = parse_right("C e #").unwrap();
        // "make": after 'a' (index 1) comes "ke" and the end.
        assert!(ctx.matches_right(&word("make"), 2));
        assert!(!ctx.matches_right(&word("makes"), 2));
    }

    #[test]
    fn left_context_reads_backwards() {
        let ctx = parse_left("# C").unwrap();
        assert!(ctx.matches_left(&word("ba"), 1));
        assert!(!ctx.matches_left(&word("aba"), 2));
        let boundary = parse_left("#").unwrap();
        assert!(boundary.matches_left(&word("ab"), 0));
        assert!(!boundary.matches_left(&word("ab"), 1));
    }

    #[test]
    fn repeats_backtrack() {
        let ctx = parse_right("C* e #").unwrap();
        assert!(ctx.matches_right(&word("ae"), 1));
        assert!(ctx.matches_right(&word("arte"), 1));
        assert!(!ctx.matches_right(&word("arta"), 1));
        let plus = parse_right("V+ #").unwrap();
        assert!(!plus.matches_right(&word("b"), 1));
        assert!(plus.matches_right(&word("bio"), 1));
        let left = parse_left("# C+").unwrap();
        assert!(left.matches_left(&word("stra"), 3));
        assert!(!left.matches_left(&word("astra"), 4));
    }

    #[test]
    fn errors_name_the_column() {
        assert_eq!(parse_right("a Q"), Err(PatternError::UnknownClass { name: 'Q', column: 2 }));
        assert_eq!(parse_right("*a"), Err(PatternError::DanglingRepeat { column: 0 }));
        assert_eq!(parse_right("#+"), Err(PatternError::RepeatedBoundary { column: 1 }));
    }

    #[test]
    fn boundaries_only_at_the_outer_end_and_one_placeholder() {
        assert_eq!(parse_right("##"), Err(PatternError::MisplacedBoundary { column: 1 }));
        assert_eq!(parse_right(" # a"), Err(PatternError::MisplacedBoundary { column: 3 }));
        assert_eq!(parse_left("a #"), Err(PatternError::MisplacedBoundary { column: 2 }));
        assert_eq!(parse_right(" _ #"), Err(PatternError::SecondPlaceholder { column: 1 }));
        assert_eq!(parse_right("e [s #"), Err(PatternError::NotALetter { letter: '[', column: 2 }));
        assert!(parse_left("# C").is_ok() && parse_right("C e #").is_ok());
    }
}
