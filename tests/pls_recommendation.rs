//! PLS import and export against hand-written documents that follow the structure of the W3C
//! Pronunciation Lexicon Specification 1.0 (Recommendation, 14 October 2008), kept in
//! tests/fixtures/pls/. The Recommendation's section is named beside each check; section
//! numbers are from memory. Places of located messages are found in the documents by plain text
//! search here, independently of the reader.

mod common;

use orthoepy::lexicon::{Entry, HeadwordPolicy, Status};
use orthoepy::phoneset::Phoneset;
use orthoepy::pls::{read_pls, write_pls, Alphabet, PlsImport, ALIAS_SOURCE};
use orthoepy::support::located::Located;
use std::path::{Path, PathBuf};

fn fixture_path(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/pls").join(name)
}

fn fixture(name: &str) -> String {
    std::fs::read_to_string(fixture_path(name)).expect("fixture")
}

fn arpa() -> Phoneset {
    Phoneset::shipped("en-arpa").unwrap()
}

fn read(name: &str, set: &Phoneset) -> PlsImport {
    read_pls(fixture(name).as_bytes(), name, set, "fixture").unwrap()
}

fn pairs(entries: &[Entry]) -> Vec<(&str, &str)> {
    entries.iter().map(|e| (e.word.as_str(), e.pronunciation.as_str())).collect()
}

/// 1-based line and character column of the first `needle` after the first `anchor` in `text`.
fn place_of(text: &str, anchor: &str, needle: &str) -> (Option<usize>, Option<usize>) {
    let start = text.find(anchor).expect("anchor in the fixture");
    let at = start + text[start..].find(needle).expect("needle after the anchor");
    let before = &text[..at];
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().unwrap_or("").chars().count() + 1;
    (Some(line), Some(column))
}

fn place(located: &Located) -> (Option<usize>, Option<usize>) {
    (located.line(), located.column())
}

/// Section 4.7 (`<alias>`) and the abbreviation/acronym examples: an alias is kept as an entry
/// of its own with source `pls-alias`, pronounced as the alias's own lexeme in the document
/// (after it, too); one nothing pronounces is kept with an empty pronunciation and a located
/// note. `<meta>`, `<metadata>` (4.2, 4.3) and `<example>` (4.8) give no entries.
#[test]
fn aliases_are_kept_as_entries_with_their_own_source() {
    let text = fixture("aliases.pls");
    let import = read("aliases.pls", &arpa());
    assert!(import.rejected.is_empty(), "{:?}", import.rejected);
    assert_eq!(
        pairs(&import.entries),
        [
            ("W3C", ""),
            ("Dr.", "D AA1 K T ER0"),
            ("St.", "S T R IY1 T"),
            ("St.", "S EY1 N T"),
            ("doctor", "D AA1 K T ER0"),
            ("street", "S T R IY1 T"),
            ("saint", "S EY1 N T"),
        ]
    );
    let dr = &import.entries[1];
    assert_eq!((dr.source.as_str(), dr.status, dr.note.as_str()), (ALIAS_SOURCE, Status::Proposed, "alias: Doctor"));
    assert_eq!(import.entries[4].source, "fixture");
    assert_eq!(import.notes.len(), 1);
    assert!(import.notes[0].message.contains("World Wide Web Consortium"), "{}", import.notes[0]);
    assert_eq!(place(&import.notes[0]), place_of(&text, "<grapheme>W3C", "<alias>"));
}

/// Section 4.7 both ways: the export writes the alias entries back as `<alias>` (the preferred
/// one with prefer="true", 4.6), so import → export → import keeps every entry.
#[test]
fn aliases_survive_export_and_import() {
    let set = arpa();
    let first = read("aliases.pls", &set);
    let keep = |import: &PlsImport| {
        let mut rows: Vec<(String, String, String, String, Status)> = import
            .entries
            .iter()
            .map(|e| (e.word.to_string(), e.pronunciation.to_string(), e.source.to_string(), e.note.to_string(), e.status))
            .collect();
        rows.sort();
        rows
    };
    for alphabet in [Alphabet::Ipa, Alphabet::XSampa, Alphabet::Symbols] {
        let xml = write_pls(&first.entries, &HeadwordPolicy::default(), &set, alphabet, "en-US").unwrap();
        assert!(xml.contains("<grapheme>St.</grapheme><alias prefer=\"true\">street</alias><alias>saint</alias>"), "{xml}");
        let again = read_pls(xml.as_bytes(), "again.pls", &set, "fixture").unwrap();
        assert_eq!(keep(&again), keep(&first), "{alphabet:?}\n{xml}");
        assert_eq!(again.notes.len(), 1, "{alphabet:?}");
    }
}

/// Section 2 and 4.1 (the lexicon's `alphabet`, here "x-sampa") and 4.6 (a phoneme's own
/// `alphabet` overrides it): X-SAMPA is read through the phoneset's X-SAMPA column (values after
/// Wells 1995); the length mark `:` is read only where the phoneset has the long vowel.
#[test]
fn x_sampa_is_read_on_the_lexicon_and_on_one_phoneme() {
    let text = fixture("x-sampa.pls");
    let import = read("x-sampa.pls", &arpa());
    assert_eq!(
        pairs(&import.entries),
        [
            ("sofa", "S OW1 F AH0"),
            ("butter", "B AH1 T ER0"),
            ("thing", "TH IH1 NG"),
            ("church", "CH ER1 CH"),
            ("undertake", "AH2 N D ER0 T EY1 K"),
            ("about", "AH0 B AW1 T"),
        ]
    );
    assert_eq!(import.rejected.len(), 1);
    let seat = &import.rejected[0];
    assert_eq!(place(seat), place_of(&text, "seat", ":"));
    assert!(seat.message.contains("en-arpa has no phone written \"i:\""), "{seat}");
    let broad = read("x-sampa.pls", &Phoneset::shipped("ipa-broad").unwrap());
    assert!(pairs(&broad.entries).contains(&("seat", "s iːˈ t")), "{:?}", broad.entries);
}

/// Section 4.6: of several pronunciations the one with prefer="true" is used (the first such in
/// document order when several are marked); it becomes the word's first entry, the others
/// follow in document order. Several graphemes in one lexeme (4.5) each get every
/// pronunciation; a phoneme in an alphabet the reader does not know is rejected at its place.
#[test]
fn the_preferred_pronunciation_comes_first() {
    let text = fixture("prefer.pls");
    let import = read("prefer.pls", &arpa());
    assert_eq!(
        pairs(&import.entries),
        [
            ("tomato", "T AH0 M AA1 T OW0"),
            ("tomato", "T AH0 M EY1 T OW0"),
            ("either", "IY1 DH ER0"),
            ("either", "AY1 DH ER0"),
            ("route", "R AW1 T"),
            ("route", "R UW1 T"),
            ("colour", "K AH1 L ER0"),
            ("color", "K AH1 L ER0"),
        ]
    );
    assert_eq!(import.rejected.len(), 1);
    assert_eq!(place(&import.rejected[0]), place_of(&text, "colour", "<phoneme alphabet=\"x-arpabet\""));
    assert!(import.rejected[0].message.contains("\"x-arpabet\""), "{}", import.rejected[0]);
}

/// Section 4.6 on export: a word with several pronunciations has its first (the store's
/// primary) marked prefer="true"; reading that back keeps the order.
#[test]
fn export_marks_the_primary_pronunciation_preferred() {
    let set = arpa();
    let first = read("prefer.pls", &set);
    let xml = write_pls(&first.entries, &HeadwordPolicy::default(), &set, Alphabet::Ipa, "en-US").unwrap();
    assert!(xml.contains("<grapheme>tomato</grapheme><phoneme prefer=\"true\">təˈmɑtoʊ</phoneme><phoneme>təˈmeɪtoʊ</phoneme>"), "{xml}");
    assert_eq!(xml.matches("prefer=").count(), 3, "one per word with two pronunciations: {xml}");
    let again = read_pls(xml.as_bytes(), "again.pls", &set, "fixture").unwrap();
    let mut want = pairs(&first.entries);
    want.sort_by_key(|(word, _)| word.to_lowercase());
    assert_eq!(pairs(&again.entries), want);
}

/// The IPA length mark ː (IPA chart 2020, suprasegmentals) is read where the phoneset has the
/// long vowel (ipa-broad lists iː ɑː ɔː ɜː uː, the IPA Handbook 1999 British English vowels, from
/// memory); en-arpa has none, so each long vowel is refused at its line and column with the
/// symbol and the phoneset named (after the vowel when en-arpa has the short one; ɜ it lacks
/// too), and the other lexemes are read.
#[test]
fn length_marks_are_read_where_the_phoneset_has_the_long_vowel() {
    let text = fixture("long-vowels.pls");
    let broad = read("long-vowels.pls", &Phoneset::shipped("ipa-broad").unwrap());
    assert!(broad.rejected.is_empty(), "{:?}", broad.rejected);
    assert_eq!(
        pairs(&broad.entries),
        [("sea", "s iːˈ"), ("car", "k ɑːˈ"), ("law", "l ɔːˈ"), ("bird", "b ɜːˈ d"), ("food", "f uːˈ d"), ("bit", "b ɪˈ t")]
    );
    let arpa = read("long-vowels.pls", &arpa());
    assert_eq!(pairs(&arpa.entries), [("bit", "B IH1 T")]);
    let refused = [
        ("sea", "ː", "\"ː\" (U+02D0) after \"i\" at character 4: en-arpa has no phone written \"iː\""),
        ("car", "ː", "\"ː\" (U+02D0) after \"ɑ\" at character 4: en-arpa has no phone written \"ɑː\""),
        ("law", "ː", "\"ː\" (U+02D0) after \"ɔ\" at character 4: en-arpa has no phone written \"ɔː\""),
        ("bird", "ɜ", "\"ɜː\" (U+025C U+02D0) at character 3 matches no phone of en-arpa"),
        ("food", "ː", "\"ː\" (U+02D0) after \"u\" at character 4: en-arpa has no phone written \"uː\""),
    ];
    assert_eq!(arpa.rejected.len(), refused.len());
    for ((word, at, message), rejected) in refused.iter().zip(&arpa.rejected) {
        assert_eq!(place(rejected), place_of(&text, &format!("<grapheme>{word}<"), at), "{rejected}");
        assert!(rejected.message.contains(message), "{rejected}");
    }
}

/// Other IPA diacritics (IPA chart 2020: nasalised U+0303, half-long ˑ, syllabic U+0329; X-SAMPA
/// `~ :\ =`, Wells 1995) are read where the phoneset lists the phone with them, whether the
/// document writes a character precomposed or decomposed (canonical equivalence, Unicode UAX
/// #15); a diacritic on a phone the set lacks is refused at its place, naming both.
#[test]
fn diacritics_are_read_where_the_phoneset_lists_them() {
    let text = fixture("diacritics.pls");
    let set = Phoneset::load(&fixture_path("diacritics.toml")).unwrap();
    let import = read("diacritics.pls", &set);
    assert_eq!(
        pairs(&import.entries),
        [
            ("bon", "b \u{254}\u{303}ˈ"),
            ("pen", "p \u{1ebd}ˈ"),
            ("beet", "b eˑˈ t"),
            ("biit", "b iːˈ t"),
            ("batn", "b aˈ t n\u{329}"),
            ("sampa", "b eˑˈ t n\u{329}"),
        ]
    );
    assert_eq!(import.rejected.len(), 2, "{:?}", import.rejected);
    let (bone, tap) = (&import.rejected[0], &import.rejected[1]);
    assert_eq!(place(bone), place_of(&text, "bone", "\u{303}"));
    assert!(bone.message.contains("(U+0303) after \"o\"") && bone.message.contains("diacritic-test has no phone written"), "{bone}");
    assert_eq!(place(tap), place_of(&text, "<grapheme>tap", "ʰ"));
    assert!(tap.message.contains("\"ʰ\" (U+02B0) after \"t\""), "{tap}");
}

/// Through the binary: `import pls` prints rejected elements and alias notes as
/// FILE:LINE:COLUMN (a note is not a rejection, so --strict passes on aliases alone), and
/// export → import keeps the aliases (section 4.7).
#[test]
fn import_and_export_commands_keep_aliases_and_locate_problems() {
    let dir = tempfile::tempdir().unwrap();
    let bin = || common::cli::orthoepy(dir.path());
    let aliases = fixture_path("aliases.pls");
    let assert = bin().args(["import", "pls"]).arg(&aliases).args(["-o", "a.csv", "--strict"]).assert().success();
    let stderr = String::from_utf8_lossy(&assert.get_output().stderr).into_owned();
    let (line, column) = place_of(&fixture("aliases.pls"), "<grapheme>W3C", "<alias>");
    assert!(stderr.contains(&format!("aliases.pls:{}:{}: \"W3C\": no lexeme", line.unwrap(), column.unwrap())), "{stderr}");
    bin().args(["export", "a.csv", "--format", "pls", "--alphabet", "x-sampa", "-o", "a.pls"]).assert().success();
    let exported = std::fs::read_to_string(dir.path().join("a.pls")).unwrap();
    assert!(exported.contains("alphabet=\"x-sampa\"") && exported.contains("<alias>Doctor</alias>"), "{exported}");
    bin().args(["import", "pls", "a.pls", "-o", "b.csv", "--source", "fixture"]).assert().success();
    let csv = |name: &str| {
        let mut rows: Vec<String> = std::fs::read_to_string(dir.path().join(name)).unwrap().lines().map(str::to_string).collect();
        rows.sort();
        rows
    };
    let a: Vec<String> = csv("a.csv").into_iter().map(|row| row.replace(",aliases,", ",fixture,")).collect();
    assert_eq!(a, csv("b.csv"));
    let long = fixture_path("long-vowels.pls");
    let assert = bin().args(["import", "pls"]).arg(&long).args(["-o", "c.csv", "--strict"]).assert().code(2);
    let stderr = String::from_utf8_lossy(&assert.get_output().stderr).into_owned();
    let (line, column) = place_of(&fixture("long-vowels.pls"), "<grapheme>sea<", "ː");
    assert!(stderr.contains(&format!("long-vowels.pls:{}:{}: phoneme \"ˈsiː\"", line.unwrap(), column.unwrap())), "{stderr}");
    assert!(!dir.path().join("c.csv").exists(), "--strict writes nothing");
}
