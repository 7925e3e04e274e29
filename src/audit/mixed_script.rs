//! `mixed-script`: a headword whose letters come from scripts that do not belong together, such as
//! a Cyrillic `а` inside a Latin word — usually a keyboard or copy-paste accident that makes the
//! word unfindable.
//!
//! The test is the mixed-script detection of UTS #39 (Unicode Security Mechanisms, section 5.1):
//! intersect the Script_Extensions of all characters, where Common and Inherited characters
//! (apostrophes, digits, hyphens, combining accents) belong to every script, and augment Han,
//! Hiragana, Katakana, Hangul and Bopomofo so that Japanese and Korean writing, which mixes them by
//! design, is one script set. The word is mixed when the intersection is empty. Characters of
//! unknown script (unassigned, private use) are ignored. When each odd letter has a look-alike in
//! the word's main script, the finding suggests the corrected spelling.

use super::{Check, Context, Finding, Severity};
use std::collections::HashMap;
use unicode_script::{Script, ScriptExtension, UnicodeScript};

/// Cyrillic and Greek letters that look like Latin ones: a small subset of the UTS #39
/// confusables data, from memory (pairs of visually identical capital and small letters).
const LOOKALIKES: &[(char, char)] = &[
    ('а', 'a'), ('е', 'e'), ('о', 'o'), ('р', 'p'), ('с', 'c'), ('у', 'y'), ('х', 'x'), ('і', 'i'), ('ј', 'j'),
    ('ѕ', 's'), ('ԁ', 'd'), ('һ', 'h'), ('ԛ', 'q'), ('ԝ', 'w'), ('А', 'A'), ('В', 'B'), ('Е', 'E'), ('К', 'K'),
    ('М', 'M'), ('Н', 'H'), ('О', 'O'), ('Р', 'P'), ('С', 'C'), ('Т', 'T'), ('Х', 'X'), ('І', 'I'), ('Ј', 'J'),
    ('Ѕ', 'S'), ('ο', 'o'), ('ν', 'v'), ('ι', 'i'), ('Α', 'A'), ('Β', 'B'), ('Ε', 'E'), ('Ζ', 'Z'), ('Η', 'H'),
    ('Ι', 'I'), ('Κ', 'K'), ('Μ', 'M'), ('Ν', 'N'), ('Ο', 'O'), ('Ρ', 'P'), ('Τ', 'T'), ('Υ', 'Y'), ('Χ', 'X'),
];

/// True when `word` mixes scripts in the sense of UTS #39, section 5.1.
///
/// ```
/// use orthoepy::audit::is_mixed_script;
/// assert!(is_mixed_script("pаrk"));            // Cyrillic U+0430 inside Latin
/// assert!(!is_mixed_script("o'brien-2nd"));    // apostrophe, hyphen, digits are Common
/// assert!(!is_mixed_script("東京タワー"));      // Han + Katakana is Japanese
/// ```
pub fn is_mixed_script(word: &str) -> bool {
    if word.is_ascii() {
        return false;
    }
    let known = || word.chars().filter(|c| c.script() != Script::Unknown).map(|c| c.script_extension());
    let plain = known().fold(ScriptExtension::default(), |acc, ext| acc.intersection(ext));
    if !plain.is_empty() {
        return false;
    }
    // UTS #39 augmentation: Han with Hiragana/Katakana (Jpan), with Hangul (Kore), with Bopomofo (Hanb).
    let han = ScriptExtension::from(Script::Han);
    let combos = [
        han.union(Script::Hiragana.into()).union(Script::Katakana.into()),
        han.union(Script::Hangul.into()),
        han.union(Script::Bopomofo.into()),
    ];
    !combos.iter().any(|&combo| known().all(|ext| !ext.intersection(combo).is_empty()))
}

/// Reports headwords mixing scripts, naming the odd letters.
pub struct MixedScript;

impl Check for MixedScript {
    fn id(&self) -> &'static str {
        "mixed-script"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "headwords mixing writing systems, such as a Cyrillic letter in a Latin word"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        context.each_entry(|id, entry, out| {
            if !is_mixed_script(&entry.word) {
                return;
            }
            let main = main_script(&entry.word);
            let odd: Vec<char> = entry
                .word
                .chars()
                .filter(|c| c.script() != Script::Unknown && !c.script_extension().contains_script(main))
                .collect();
            let listed: Vec<String> =
                odd.iter().map(|c| format!("{c:?} (U+{:04X}, {})", *c as u32, c.script().full_name())).collect();
            let message = format!("the headword is mostly {} but holds {}", main.full_name(), listed.join(", "));
            let mut finding = Finding::new(self.id(), self.severity(), id, entry, message);
            if let Some(fixed) = lookalike_spelling(&entry.word, main) {
                finding = finding.suggest(format!("if this is a typing accident, write it as {fixed:?}"));
            }
            out.push(finding);
        })
    }
}

/// The script with the most letters in `word` (the earliest on a tie).
fn main_script(word: &str) -> Script {
    let mut counts: HashMap<Script, (usize, usize)> = HashMap::new();
    for (position, c) in word.chars().enumerate() {
        let script = c.script();
        if !matches!(script, Script::Common | Script::Inherited | Script::Unknown) {
            let slot = counts.entry(script).or_insert((0, position));
            slot.0 += 1;
        }
    }
    counts
        .into_iter()
        .max_by(|a, b| a.1 .0.cmp(&b.1 .0).then(b.1 .1.cmp(&a.1 .1)))
        .map(|(s, _)| s)
        .unwrap_or(Script::Common)
}

/// `word` with each letter outside `main` replaced by its look-alike in `main`, when every such
/// letter has one (Latin words with Cyrillic/Greek look-alikes, and the reverse for Cyrillic).
fn lookalike_spelling(word: &str, main: Script) -> Option<String> {
    word.chars()
        .map(|c| {
            if c.script() == Script::Unknown || c.script_extension().contains_script(main) {
                return Some(c);
            }
            LOOKALIKES.iter().find_map(|&(other, latin)| match main {
                Script::Latin if other == c => Some(latin),
                Script::Cyrillic | Script::Greek if latin == c && other.script() == main => Some(other),
                _ => None,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn look_alike_letters_are_found_and_corrected() {
        // UTS #39, section 5.1: Latin + Cyrillic has an empty resolved script set.
        let rows = entries(&[("pаrk", "P AA1 R K"), ("mоscow", "M AA1 S K OW0")]);
        let found = with(&rows, |c| MixedScript.run(c));
        assert_eq!(found.len(), 2);
        assert!(found[0].message.contains("U+0430, Cyrillic"), "{}", found[0].message);
        assert_eq!(found[0].suggestion.as_deref(), Some("if this is a typing accident, write it as \"park\""));
        // A Cyrillic word with one Latin "o".
        assert_eq!(lookalike_spelling("мoсква", Script::Cyrillic).as_deref(), Some("москва"));
    }

    #[test]
    fn common_and_inherited_characters_do_not_cry_wolf() {
        // Common: apostrophes, hyphens, digits, periods; Inherited: combining marks (UAX #24).
        for word in ["o'brien", "rock-'n'-roll", "3d", "a.m.", "cafe\u{301}", "naïve", "Ålesund", "Zürich", "ŁÓDŹ"] {
            assert!(!is_mixed_script(word), "{word}");
        }
        // Greek with a Greek accent and a Greek question mark stays one script.
        assert!(!is_mixed_script("ποιος;"));
    }

    #[test]
    fn scripts_written_together_by_design_pass() {
        // UTS #39, section 5.1 augmentation: Jpan = Han + Hiragana + Katakana; Kore = Han + Hangul.
        assert!(!is_mixed_script("日本語のテキスト"));
        assert!(!is_mixed_script("韓國어"));
        assert!(is_mixed_script("ひらがな한글"));
    }
}
