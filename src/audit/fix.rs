//! Safe repairs: the changes `audit --fix` makes without asking a person.
//!
//! Only repairs whose result is certain are made: invisible characters are dropped (spaces other
//! than U+0020 become U+0020), surrounding whitespace is trimmed, inner runs of whitespace become
//! one space, the headword is put in NFC (UAX #15), and a row that repeats an earlier row in every
//! column is dropped. Nothing that needs judgement (which of two spellings differing in case is
//! right, which of two differing duplicates to keep) is touched. Running the repairs twice changes
//! nothing the second time. This module edits entries in memory only; the caller saves with
//! [`Lexicon::save`], which is atomic, keeps a backup and refuses a file changed on disk.

use super::context::collapse_whitespace;
use super::invisible_character::{invisible_characters, Invisible};
use crate::lexicon::{Entry, Lexicon};
use std::collections::HashMap;
use std::fmt;
use unicode_normalization::{is_nfc_quick, IsNormalized, UnicodeNormalization};

/// One change made by [`apply`].
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Change {
    /// A headword was rewritten.
    Headword {
        /// The entry's line in the file.
        line: usize,
        /// The headword before.
        before: String,
        /// The headword after.
        after: String,
        /// What was done, in order: `dropped U+200B ZERO WIDTH SPACE`, `trimmed`, ...
        repairs: Vec<String>,
    },
    /// A row that repeated an earlier row in every column was removed.
    DroppedDuplicate {
        /// The removed row's line.
        line: usize,
        /// The line of the row that was kept.
        kept_line: usize,
        /// Its headword.
        word: String,
        /// Its pronunciation.
        pronunciation: String,
    },
}

impl fmt::Display for Change {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Change::Headword { line, before, after, repairs } => {
                write!(f, "line {line}: headword {before:?} -> {after:?} ({})", repairs.join(", "))
            }
            Change::DroppedDuplicate { line, kept_line, word, pronunciation } => {
                write!(f, "line {line}: dropped {word:?} [{pronunciation}], an exact copy of line {kept_line}")
            }
        }
    }
}

/// The headword with every safe repair made.
///
/// ```
/// use orthoepy::audit::fix::repaired_headword;
/// assert_eq!(repaired_headword(" new\u{a0}\u{a0}york\u{200b} "), "new york");
/// assert_eq!(repaired_headword("Cafe\u{301}"), "Café");
/// ```
pub fn repaired_headword(word: &str) -> String {
    repair_headword(word).0
}

/// True when the headword needs no repair (fast for the common tidy case).
pub(super) fn is_tidy(word: &str) -> bool {
    let quick = invisible_characters(word).is_empty()
        && matches!(collapse_whitespace(word), std::borrow::Cow::Borrowed(_))
        && is_nfc_quick(word.chars()) == IsNormalized::Yes;
    quick || repaired_headword(word) == word
}

/// The repaired headword and the list of repairs made (empty when it was already right).
fn repair_headword(word: &str) -> (String, Vec<String>) {
    let mut repairs = Vec::new();
    let invisible = invisible_characters(word);
    let mut text = if invisible.is_empty() {
        word.to_string()
    } else {
        let mut out = String::with_capacity(word.len());
        let mut next = invisible.iter().peekable();
        for (index, ch) in word.chars().enumerate() {
            match next.peek() {
                Some(found) if found.index == index => {
                    if found.kind == Invisible::Space {
                        out.push(' ');
                        repairs.push(format!("replaced {} by a space", found.label()));
                    } else {
                        repairs.push(format!("dropped {}", found.label()));
                    }
                    next.next();
                }
                _ => out.push(ch),
            }
        }
        out
    };
    if text.trim() != text {
        repairs.push("trimmed surrounding whitespace".to_string());
    }
    if let std::borrow::Cow::Owned(tidy) = collapse_whitespace(&text) {
        if tidy.len() + (text.len() - text.trim().len()) != text.len() {
            repairs.push("folded repeated spaces".to_string());
        }
        text = tidy;
    }
    if is_nfc_quick(text.chars()) != IsNormalized::Yes {
        let nfc: String = text.nfc().collect();
        if nfc != text {
            repairs.push("composed to Unicode NFC".to_string());
            text = nfc;
        }
    }
    (text, repairs)
}

/// Makes every safe repair to `lexicon` in memory and returns the changes, in file order.
/// A headword that would become empty is left alone (the audit keeps reporting it).
///
/// ```
/// use orthoepy::audit::fix;
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// let mut lexicon = Lexicon::from_entries(
///     vec![Entry::new("quay", "K IY1"), Entry::new("quay\u{200b}", "K IY1")],
///     HeadwordPolicy::default(),
/// );
/// let changes = fix::apply(&mut lexicon);
/// assert_eq!(changes.len(), 2); // the ZWSP dropped, then the now-identical row removed
/// assert_eq!(lexicon.entries().len(), 1);
/// assert!(fix::apply(&mut lexicon).is_empty());
/// ```
pub fn apply(lexicon: &mut Lexicon) -> Vec<Change> {
    let mut changes = Vec::new();
    for entry in lexicon.entries_mut().iter_mut() {
        let (after, repairs) = repair_headword(&entry.word);
        if !repairs.is_empty() && !after.is_empty() {
            let before = std::mem::replace(&mut entry.word, after.as_str().into());
            changes.push(Change::Headword { line: entry.line, before: before.into(), after, repairs });
        }
    }
    let entries = lexicon.entries_mut();
    let mut first_of: HashMap<(String, String), usize> = HashMap::with_capacity(entries.len());
    let mut drop = vec![false; entries.len()];
    for (i, entry) in entries.iter().enumerate() {
        let key = (entry.word.to_string(), crate::lexicon::join_phones(entry.phones()));
        match first_of.get(&key) {
            Some(&first) if same_row(&entries[first], entry) => {
                drop[i] = true;
                changes.push(Change::DroppedDuplicate {
                    line: entry.line,
                    kept_line: entries[first].line,
                    word: entry.word.to_string(),
                    pronunciation: entry.pronunciation.to_string(),
                });
            }
            Some(_) => {}
            None => {
                first_of.insert(key, i);
            }
        }
    }
    let mut index = 0;
    entries.retain(|_| {
        index += 1;
        !drop[index - 1]
    });
    changes
}

/// Two rows with equal headword and phones are the same row when nothing else differs either.
fn same_row(a: &Entry, b: &Entry) -> bool {
    a.status == b.status && a.source == b.source && a.score == b.score && a.note == b.note && a.extra == b.extra
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{HeadwordPolicy, Status};

    fn lexicon(rows: &[(&str, &str)]) -> Lexicon {
        let entries = rows
            .iter()
            .enumerate()
            .map(|(i, (w, p))| {
                let mut e = Entry::new(w, p);
                e.word = (*w).into();
                e.line = i + 2;
                e
            })
            .collect();
        Lexicon::from_entries(entries, HeadwordPolicy::default())
    }

    #[test]
    fn each_repair_is_named() {
        let (_, r) = repair_headword("  quay ");
        assert_eq!(r, ["trimmed surrounding whitespace"]);
        let (_, r) = repair_headword("new  york");
        assert_eq!(r, ["folded repeated spaces"]);
        let (w, r) = repair_headword("new\tyork");
        assert_eq!((w.as_str(), r.len()), ("new york", 1));
        let (_, r) = repair_headword("e\u{301}t\u{e9}");
        assert_eq!(r, ["composed to Unicode NFC"]);
        assert!(repair_headword("new york").1.is_empty());
    }

    #[test]
    fn duplicates_differing_in_other_columns_are_kept() {
        let mut lex = lexicon(&[("quay", "K IY1"), ("quay", "K IY1"), ("quay", "K IY1")]);
        lex.entries_mut()[1].status = Status::Proposed;
        let changes = apply(&mut lex);
        assert_eq!(changes.len(), 1);
        assert!(matches!(&changes[0], Change::DroppedDuplicate { line: 4, kept_line: 2, .. }));
        assert_eq!(lex.entries().len(), 2);
    }

    #[test]
    fn repairs_are_idempotent_and_keep_legitimate_text() {
        let mut lex = lexicon(&[(" Quay", "K IY1"), ("Quay", "K IY1"), ("\u{645}\u{6cc}\u{200C}\u{62e}", "M IY1"), ("\u{200b}", "K")]);
        let first = apply(&mut lex);
        assert_eq!(first.len(), 2, "{first:?}"); // trim, then the duplicate; the ZWNJ and the lone ZWSP stay
        let words: Vec<&str> = lex.entries().iter().map(|e| e.word.as_str()).collect();
        assert_eq!(words, ["Quay", "\u{645}\u{6cc}\u{200C}\u{62e}", "\u{200b}"]);
        assert!(apply(&mut lex).is_empty());
    }
}
