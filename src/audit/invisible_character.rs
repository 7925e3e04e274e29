//! `invisible-character`: characters in a headword that a person cannot see or tell from a space.
//!
//! Reported: zero-width and other default-invisible format characters, spaces other than U+0020
//! (no-break, thin, em ...), control characters (general category Cc) and the explicit
//! bidirectional formatting characters of UAX #9 (Unicode Bidirectional Algorithm, Table 1).
//! Let through, because scripts need them: ZERO WIDTH JOINER / NON-JOINER right after a virama
//! (RFC 5892, "The Unicode Code Points and IDNA", Appendix A.1 and A.2), ZERO WIDTH NON-JOINER
//! between letters of a cursive-joining script such as Arabic (a simplification of RFC 5892 A.1's
//! joining-type rule), and ZERO WIDTH JOINER inside emoji sequences. The classifier is public
//! because `audit --fix` drops exactly what this check reports.

use super::{Check, Context, Finding, Severity};
use unicode_normalization::char::canonical_combining_class;
use unicode_script::{Script, UnicodeScript};

/// The kind of an invisible character.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Invisible {
    /// A zero-width or other invisible format character (dropped by the fix).
    ZeroWidth,
    /// A space other than U+0020, or a whitespace control such as TAB (replaced by a space).
    Space,
    /// A control character that is not whitespace (dropped by the fix).
    Control,
    /// A bidirectional formatting character (dropped by the fix).
    Bidi,
}

/// Names of the reported characters that are not controls (the Unicode character names).
const NAMED: &[(char, &str, Invisible)] = &[
    ('\u{00A0}', "NO-BREAK SPACE", Invisible::Space),
    ('\u{00AD}', "SOFT HYPHEN", Invisible::ZeroWidth),
    ('\u{061C}', "ARABIC LETTER MARK", Invisible::Bidi),
    ('\u{1680}', "OGHAM SPACE MARK", Invisible::Space),
    ('\u{180E}', "MONGOLIAN VOWEL SEPARATOR", Invisible::ZeroWidth),
    ('\u{2000}', "EN QUAD", Invisible::Space),
    ('\u{2001}', "EM QUAD", Invisible::Space),
    ('\u{2002}', "EN SPACE", Invisible::Space),
    ('\u{2003}', "EM SPACE", Invisible::Space),
    ('\u{2004}', "THREE-PER-EM SPACE", Invisible::Space),
    ('\u{2005}', "FOUR-PER-EM SPACE", Invisible::Space),
    ('\u{2006}', "SIX-PER-EM SPACE", Invisible::Space),
    ('\u{2007}', "FIGURE SPACE", Invisible::Space),
    ('\u{2008}', "PUNCTUATION SPACE", Invisible::Space),
    ('\u{2009}', "THIN SPACE", Invisible::Space),
    ('\u{200A}', "HAIR SPACE", Invisible::Space),
    ('\u{200B}', "ZERO WIDTH SPACE", Invisible::ZeroWidth),
    ('\u{200C}', "ZERO WIDTH NON-JOINER", Invisible::ZeroWidth),
    ('\u{200D}', "ZERO WIDTH JOINER", Invisible::ZeroWidth),
    ('\u{200E}', "LEFT-TO-RIGHT MARK", Invisible::Bidi),
    ('\u{200F}', "RIGHT-TO-LEFT MARK", Invisible::Bidi),
    ('\u{2028}', "LINE SEPARATOR", Invisible::Space),
    ('\u{2029}', "PARAGRAPH SEPARATOR", Invisible::Space),
    ('\u{202A}', "LEFT-TO-RIGHT EMBEDDING", Invisible::Bidi),
    ('\u{202B}', "RIGHT-TO-LEFT EMBEDDING", Invisible::Bidi),
    ('\u{202C}', "POP DIRECTIONAL FORMATTING", Invisible::Bidi),
    ('\u{202D}', "LEFT-TO-RIGHT OVERRIDE", Invisible::Bidi),
    ('\u{202E}', "RIGHT-TO-LEFT OVERRIDE", Invisible::Bidi),
    ('\u{202F}', "NARROW NO-BREAK SPACE", Invisible::Space),
    ('\u{205F}', "MEDIUM MATHEMATICAL SPACE", Invisible::Space),
    ('\u{2060}', "WORD JOINER", Invisible::ZeroWidth),
    ('\u{2061}', "FUNCTION APPLICATION", Invisible::ZeroWidth),
    ('\u{2062}', "INVISIBLE TIMES", Invisible::ZeroWidth),
    ('\u{2063}', "INVISIBLE SEPARATOR", Invisible::ZeroWidth),
    ('\u{2064}', "INVISIBLE PLUS", Invisible::ZeroWidth),
    ('\u{2066}', "LEFT-TO-RIGHT ISOLATE", Invisible::Bidi),
    ('\u{2067}', "RIGHT-TO-LEFT ISOLATE", Invisible::Bidi),
    ('\u{2068}', "FIRST STRONG ISOLATE", Invisible::Bidi),
    ('\u{2069}', "POP DIRECTIONAL ISOLATE", Invisible::Bidi),
    ('\u{3000}', "IDEOGRAPHIC SPACE", Invisible::Space),
    ('\u{FEFF}', "ZERO WIDTH NO-BREAK SPACE (byte order mark)", Invisible::ZeroWidth),
];

/// One reported character of a headword.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct InvisibleChar {
    /// 0-based position in characters.
    pub index: usize,
    /// The character.
    pub ch: char,
    /// Its kind.
    pub kind: Invisible,
}

impl InvisibleChar {
    /// `U+200B ZERO WIDTH SPACE`; controls get their alias or the `<control-XXXX>` code point
    /// label (The Unicode Standard, section 4.8, "Name", code point labels).
    pub fn label(&self) -> String {
        let name = match self.ch {
            '\t' => "CHARACTER TABULATION".to_string(),
            '\n' => "LINE FEED".to_string(),
            '\r' => "CARRIAGE RETURN".to_string(),
            '\u{0}' => "NULL".to_string(),
            '\u{1B}' => "ESCAPE".to_string(),
            '\u{7F}' => "DELETE".to_string(),
            '\u{85}' => "NEXT LINE".to_string(),
            c => NAMED
                .iter()
                .find(|(n, _, _)| *n == c)
                .map(|(_, name, _)| name.to_string())
                .unwrap_or_else(|| format!("<control-{:04X}>", c as u32)),
        };
        format!("U+{:04X} {name}", self.ch as u32)
    }
}

/// The characters of `word` this check reports, in order.
///
/// ```
/// use orthoepy::audit::{invisible_characters, Invisible};
/// let found = invisible_characters("pier\u{200B}");
/// assert_eq!(found[0].kind, Invisible::ZeroWidth);
/// assert_eq!(found[0].label(), "U+200B ZERO WIDTH SPACE");
/// // ZWNJ after the Devanagari virama is part of the spelling (RFC 5892, Appendix A.1).
/// assert!(invisible_characters("क्\u{200C}ष").is_empty());
/// ```
pub fn invisible_characters(word: &str) -> Vec<InvisibleChar> {
    if word.bytes().all(|b| (0x20..0x7F).contains(&b)) {
        return Vec::new(); // printable ASCII: the common case, nothing to find
    }
    let chars: Vec<char> = word.chars().collect();
    let mut found = Vec::new();
    for (index, &ch) in chars.iter().enumerate() {
        let kind = if ch.is_control() {
            if ch.is_whitespace() {
                Invisible::Space
            } else {
                Invisible::Control
            }
        } else if let Some((_, _, kind)) = NAMED.iter().find(|(n, _, _)| *n == ch) {
            *kind
        } else {
            continue;
        };
        let before = index.checked_sub(1).and_then(|i| chars.get(i)).copied();
        let after = chars.get(index + 1).copied();
        if !joiner_is_part_of_spelling(ch, before, after) {
            found.push(InvisibleChar { index, ch, kind });
        }
    }
    found
}

/// RFC 5892 Appendix A.1/A.2 (simplified) plus emoji ZWJ sequences.
fn joiner_is_part_of_spelling(ch: char, before: Option<char>, after: Option<char>) -> bool {
    const ZWNJ: char = '\u{200C}';
    const ZWJ: char = '\u{200D}';
    if ch != ZWNJ && ch != ZWJ {
        return false;
    }
    let Some(before) = before else { return false };
    if canonical_combining_class(before) == 9 {
        return true; // virama
    }
    if ch == ZWJ {
        let pictographic = |c: char| matches!(c as u32, 0x1F000..=0x1FAFF | 0x2600..=0x27BF | 0xFE0F);
        return pictographic(before) && after.is_some_and(pictographic);
    }
    let joining = |c: char| {
        c.is_alphabetic()
            && matches!(
                c.script(),
                Script::Arabic
                    | Script::Syriac
                    | Script::Nko
                    | Script::Mongolian
                    | Script::Mandaic
                    | Script::Manichaean
                    | Script::Phags_Pa
                    | Script::Adlam
                    | Script::Hanifi_Rohingya
                    | Script::Psalter_Pahlavi
            )
    };
    joining(before) && after.is_some_and(joining)
}

/// Reports headwords holding invisible characters, naming each by code point and name.
pub struct InvisibleCharacter;

impl Check for InvisibleCharacter {
    fn id(&self) -> &'static str {
        "invisible-character"
    }
    fn severity(&self) -> Severity {
        Severity::Error
    }
    fn description(&self) -> &'static str {
        "zero-width, non-breaking space, control or bidi-control characters in a headword"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        context.each_entry(|id, entry, out| {
            let found = invisible_characters(&entry.word);
            if found.is_empty() {
                return;
            }
            let listed: Vec<String> = found.iter().map(|c| format!("{} at character {}", c.label(), c.index + 1)).collect();
            let message = format!("the headword holds {}", listed.join(", "));
            let finding = Finding::new(self.id(), self.severity(), id, entry, message)
                .suggest(format!("write it as {:?} (`orthoepy audit --fix` does this)", super::fix::repaired_headword(&entry.word)));
            out.push(finding);
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn each_kind_is_found_and_named() {
        let kinds = |w: &str| invisible_characters(w).into_iter().map(|c| c.kind).collect::<Vec<_>>();
        assert_eq!(kinds("new\u{a0}york"), [Invisible::Space]);
        assert_eq!(kinds("\u{feff}quay"), [Invisible::ZeroWidth]);
        assert_eq!(kinds("pi\u{7}er"), [Invisible::Control]);
        assert_eq!(kinds("quay\t"), [Invisible::Space]);
        assert_eq!(kinds("\u{202e}yauq"), [Invisible::Bidi]);
        let labels: Vec<String> = invisible_characters("a\u{7}\u{200f}").iter().map(InvisibleChar::label).collect();
        assert_eq!(labels, ["U+0007 <control-0007>", "U+200F RIGHT-TO-LEFT MARK"]);
    }

    #[test]
    fn script_joiners_are_not_reported() {
        // Persian "می‌خواهم" uses ZWNJ between Arabic-script letters (common practice in Persian
        // orthography); ZWJ joins emoji in a family sequence (Unicode TR #51, ZWJ sequences).
        assert!(invisible_characters("می\u{200C}خواهم").is_empty());
        assert!(invisible_characters("\u{1F468}\u{200D}\u{1F469}").is_empty());
        // The same joiner inside a Latin word is an accident.
        assert_eq!(invisible_characters("qu\u{200C}ay").len(), 1);
    }

    #[test]
    fn ordinary_words_pass() {
        let rows = entries(&[("Ålesund", "AO1 L AH0 S UH2 N"), ("new york", "N UW1 Y AO1 R K"), ("café", "K AE0 F EY1")]);
        assert!(with(&rows, |c| InvisibleCharacter.run(c)).is_empty());
    }

    #[test]
    fn finding_lists_code_points_and_a_repair() {
        let rows = entries(&[("new\u{a0}york\u{200b}", "N UW1 Y AO1 R K")]);
        let found = with(&rows, |c| InvisibleCharacter.run(c));
        assert_eq!(found.len(), 1);
        assert!(found[0].message.contains("U+00A0 NO-BREAK SPACE at character 4"), "{}", found[0].message);
        assert!(found[0].message.contains("U+200B ZERO WIDTH SPACE at character 9"));
        assert_eq!(found[0].suggestion.as_deref(), Some("write it as \"new york\" (`orthoepy audit --fix` does this)"));
    }
}
