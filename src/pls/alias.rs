//! PLS `<alias>` elements (W3C PLS 1.0 section 4.7, from memory: an orthography whose
//! pronunciation stands for the grapheme's, as "World Wide Web Consortium" for "W3C") kept in the
//! store as entries of their own: source [`ALIAS_SOURCE`], status `proposed` (a pronunciation no
//! person gave for this word, so model training leaves it out), note [`ALIAS_NOTE`] followed by
//! the alias text. Their pronunciation is the primary one of the lexeme in the same document
//! whose grapheme is the alias (compared in NFC, case folded); an alias that no lexeme of the
//! document pronounces keeps an empty pronunciation and gets a note at its place. The export
//! writes such entries back as `<alias>`.

use crate::lexicon::{normalize_key, Entry, HeadwordPolicy, Status};
use crate::support::located::{Located, Position};
use std::collections::{HashMap, HashSet};

/// The `source` of an entry made from a PLS `<alias>`.
pub const ALIAS_SOURCE: &str = "pls-alias";

/// The start of the `note` of an entry made from a PLS `<alias>`; the alias text follows.
pub const ALIAS_NOTE: &str = "alias: ";

/// The alias text of an entry made from a PLS `<alias>` (source [`ALIAS_SOURCE`] and a note
/// starting [`ALIAS_NOTE`]); `None` for every other entry.
///
/// ```
/// use orthoepy::lexicon::Entry;
/// use orthoepy::pls::{alias_of, ALIAS_SOURCE};
/// let mut entry = Entry::new("W3C", "");
/// entry.note = "alias: World Wide Web Consortium".into();
/// assert_eq!(alias_of(&entry), None);
/// entry.source = ALIAS_SOURCE.into();
/// assert_eq!(alias_of(&entry), Some("World Wide Web Consortium"));
/// ```
pub fn alias_of(entry: &Entry) -> Option<&str> {
    (entry.source == ALIAS_SOURCE).then(|| entry.note.strip_prefix(ALIAS_NOTE)).flatten()
}

/// The entry for `word` aliased to `text` (its pronunciation is filled in by [`resolve`]).
pub(super) fn alias_entry(word: &str, text: &str, line: usize) -> Entry {
    let mut entry = Entry::new(word, "");
    entry.status = Status::Proposed;
    entry.source = ALIAS_SOURCE.into();
    entry.note = compact_str::format_compact!("{ALIAS_NOTE}{text}");
    entry.line = line;
    entry
}

/// Gives each alias entry (index into `entries`, place of its `<alias>`) the first pronunciation
/// of the alias text among the other entries; the ones left without get a note.
pub(super) fn resolve(entries: &mut [Entry], aliases: &[(usize, Position)], origin: &str) -> Vec<Located> {
    if aliases.is_empty() {
        return Vec::new();
    }
    let wanted: HashSet<String> = aliases.iter().filter_map(|&(i, _)| entries.get(i)).filter_map(alias_of).map(key).collect();
    let mut primary: HashMap<String, String> = HashMap::new();
    for entry in entries.iter().filter(|e| alias_of(e).is_none()) {
        let word = key(&entry.word);
        if wanted.contains(&word) {
            primary.entry(word).or_insert_with(|| entry.pronunciation.to_string());
        }
    }
    let mut notes = Vec::new();
    for &(i, place) in aliases {
        let Some(entry) = entries.get_mut(i) else { continue };
        let Some(text) = alias_of(entry).map(str::to_string) else { continue };
        match primary.get(&key(&text)) {
            Some(pronunciation) => entry.pronunciation = pronunciation.as_str().into(),
            None => notes.push(Located::new(
                origin,
                Some(place),
                format!(
                    "{:?}: no lexeme of this document pronounces the alias {text:?}; kept as a {ALIAS_SOURCE} entry with an empty pronunciation (give it one; export writes the <alias> back)",
                    entry.word
                ),
            )),
        }
    }
    notes
}

/// The key aliases are matched by: NFC, case folded.
fn key(text: &str) -> String {
    normalize_key(text.trim(), &HeadwordPolicy { fold_case: true }).into_owned()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn aliases_take_the_first_pronunciation_of_their_word_in_any_case() {
        let mut entries = vec![
            alias_entry("Mr", "Mister", 1),
            Entry::new("mister", "M IH1 S T ER0"),
            Entry::new("mister", "M IH1 S T AH0"),
            alias_entry("W3C", "World Wide Web Consortium", 4),
        ];
        let notes = resolve(&mut entries, &[(0, Position::new(1, 9)), (3, Position::new(4, 5))], "t.pls");
        assert_eq!(entries[0].pronunciation, "M IH1 S T ER0");
        assert_eq!(entries[3].pronunciation, "");
        assert_eq!(notes.len(), 1);
        assert_eq!((notes[0].line(), notes[0].column()), (Some(4), Some(5)));
        assert!(notes[0].message.contains("World Wide Web Consortium"), "{}", notes[0]);
    }

    #[test]
    fn an_alias_never_takes_another_alias_pronunciation() {
        let mut entries = vec![alias_entry("a", "b", 1), alias_entry("b", "a", 2)];
        let notes = resolve(&mut entries, &[(0, Position::line(1)), (1, Position::line(2))], "t.pls");
        assert_eq!(notes.len(), 2);
    }
}
