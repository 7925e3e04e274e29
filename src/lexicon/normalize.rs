//! Headword normalisation: the key under which a spelling is indexed and compared.
//!
//! The key is the Unicode NFC form (UAX #15, Unicode Normalization Forms) of the headword, lower-cased
//! when the project folds case. The original spelling is never changed by this module; callers
//! keep it in [`Entry::word`](super::Entry::word). Surrounding whitespace and empty headwords are
//! refused, because they are almost always pasting accidents and silently trimming them would hide
//! a duplicate.

use std::borrow::Cow;
use unicode_normalization::{is_nfc_quick, IsNormalized, UnicodeNormalization};

/// How headwords are compared: the per-project policy read from `orthoepy.toml`.
///
/// ```
/// use orthoepy::lexicon::HeadwordPolicy;
/// assert!(HeadwordPolicy::default().fold_case);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct HeadwordPolicy {
    /// Compare headwords case-insensitively ("Ferry" and "ferry" are the same word).
    pub fold_case: bool,
}

impl Default for HeadwordPolicy {
    fn default() -> Self {
        HeadwordPolicy { fold_case: true }
    }
}

/// Why a headword cannot be normalised.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum HeadwordError {
    /// The headword is empty.
    #[error("empty headword; every row needs a word")]
    Empty,
    /// The headword starts or ends with whitespace.
    #[error("headword {0:?} has surrounding whitespace; remove it (`orthoepy audit --fix` trims it)")]
    SurroundingWhitespace(String),
    /// The headword holds a control character (NUL, tab, newline, ...), which no export or
    /// build lexicon can carry.
    #[error("headword {word:?} holds the control character {}; remove it (control characters cannot be exported)", code_point(*character))]
    ControlCharacter {
        /// The headword as written.
        word: String,
        /// The first control character in it.
        character: char,
    },
}

/// `U+0009`-style name of a character, for messages.
fn code_point(c: char) -> String {
    format!("U+{:04X}", c as u32)
}

/// The first control character (Unicode general category Cc: U+0000–U+001F, U+007F–U+009F) in
/// `text`, with its 0-based character index. Headwords and pronunciations must have none: a tab,
/// newline or NUL would split or corrupt a line of every exported lexicon.
///
/// ```
/// use orthoepy::lexicon::find_control;
/// assert_eq!(find_control("quay"), None);
/// assert_eq!(find_control("qu\u{0}ay"), Some((2, '\u{0}')));
/// ```
pub fn find_control(text: &str) -> Option<(usize, char)> {
    text.chars().enumerate().find(|(_, c)| c.is_control())
}

/// The index key of a headword: NFC, lower-cased when the policy folds case.
///
/// ```
/// use orthoepy::lexicon::{normalize_headword, HeadwordPolicy};
/// let fold = HeadwordPolicy { fold_case: true };
/// // "é" written as e + combining acute (NFD) and as one code point (NFC) give one key.
/// assert_eq!(normalize_headword("Cafe\u{301}", &fold).unwrap(), "café");
/// assert_eq!(normalize_headword("Café", &HeadwordPolicy { fold_case: false }).unwrap(), "Café");
/// assert!(normalize_headword(" pier", &fold).is_err());
/// ```
pub fn normalize_headword(word: &str, policy: &HeadwordPolicy) -> Result<String, HeadwordError> {
    check_headword(word)?;
    Ok(normalize_key(word, policy).into_owned())
}

/// The checks of [`normalize_headword`] without computing the key: not empty, no surrounding
/// whitespace, no control character.
///
/// ```
/// use orthoepy::lexicon::{check_headword, HeadwordError};
/// assert!(check_headword("quay").is_ok());
/// assert_eq!(check_headword(""), Err(HeadwordError::Empty));
/// ```
pub fn check_headword(word: &str) -> Result<(), HeadwordError> {
    if word.is_empty() {
        return Err(HeadwordError::Empty);
    }
    if word.trim() != word {
        return Err(HeadwordError::SurroundingWhitespace(word.to_string()));
    }
    check_controls(word)
}

/// Refuses a headword holding a control character (see [`find_control`]); the only check the
/// store's repair mode keeps besides emptiness.
pub fn check_controls(word: &str) -> Result<(), HeadwordError> {
    match find_control(word) {
        Some((_, character)) => Err(HeadwordError::ControlCharacter { word: word.to_string(), character }),
        None => Ok(()),
    }
}

/// The key without the whitespace checks, for callers that already validated the headword or that
/// must index an entry the audit will report. Borrowed when nothing changes (the common case).
pub fn normalize_key<'a>(word: &'a str, policy: &HeadwordPolicy) -> Cow<'a, str> {
    let nfc: Cow<str> = match is_nfc_quick(word.chars()) {
        IsNormalized::Yes => Cow::Borrowed(word),
        _ => Cow::Owned(word.nfc().collect()),
    };
    if !policy.fold_case {
        return nfc;
    }
    if nfc.is_ascii() {
        if nfc.bytes().any(|b| b.is_ascii_uppercase()) {
            Cow::Owned(nfc.to_ascii_lowercase())
        } else {
            nfc
        }
    } else {
        // Lower-casing can denormalise (rare); renormalise to keep the key NFC.
        let lower = nfc.to_lowercase();
        match is_nfc_quick(lower.chars()) {
            IsNormalized::Yes => Cow::Owned(lower),
            _ => Cow::Owned(lower.nfc().collect()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const FOLD: HeadwordPolicy = HeadwordPolicy { fold_case: true };
    const KEEP: HeadwordPolicy = HeadwordPolicy { fold_case: false };

    #[test]
    fn nfd_and_nfc_spellings_share_a_key() {
        // UAX #15: U+00E9 is the canonical composition of U+0065 U+0301.
        assert_eq!(normalize_key("e\u{301}", &KEEP), "\u{e9}");
    }

    #[test]
    fn case_folding_follows_policy() {
        assert_eq!(normalize_key("Ferry", &FOLD), "ferry");
        assert_eq!(normalize_key("Ferry", &KEEP), "Ferry");
        assert_eq!(normalize_key("ÅLESUND", &FOLD), "ålesund");
    }

    #[test]
    fn whitespace_and_empty_are_refused() {
        assert_eq!(normalize_headword("", &FOLD), Err(HeadwordError::Empty));
        assert!(matches!(normalize_headword("quay ", &FOLD), Err(HeadwordError::SurroundingWhitespace(_))));
        assert!(matches!(normalize_headword("\u{a0}quay", &FOLD), Err(HeadwordError::SurroundingWhitespace(_))));
        assert_eq!(normalize_headword("new york", &FOLD).unwrap(), "new york");
    }

    #[test]
    fn control_characters_are_refused() {
        // Unicode general category Cc (The Unicode Standard, ch. 4.5): C0, DEL and C1 controls.
        for word in ["qu\u{0}ay", "new\nyork", "a\tb", "x\u{7f}", "x\u{85}y"] {
            assert!(matches!(check_headword(word), Err(HeadwordError::ControlCharacter { .. })), "{word:?}");
        }
        assert!(check_headword("caf\u{e9}").is_ok());
    }

    #[test]
    fn unchanged_words_are_borrowed() {
        assert!(matches!(normalize_key("pier", &FOLD), Cow::Borrowed(_)));
    }
}
