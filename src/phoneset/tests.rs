//! Unit tests of the phoneset module: parsing errors and suggestions, self-check failures on
//! small inline files, distance properties, feature lookups, phonotactics and mapping.

use super::*;
use crate::support::located::{Located, Position};
use crate::support::read::ReadError;

fn arpa() -> Phoneset {
    Phoneset::shipped("en-arpa").expect("shipped en-arpa loads")
}

fn id(set: &Phoneset, s: &str) -> PhoneId {
    set.lookup(s)
        .unwrap_or_else(|| panic!("{s} in {}", set.id()))
}

fn token_error(set: &Phoneset, text: &str) -> TokenProblem {
    match set.parse(text) {
        Err(PronunciationError::Token(p)) => p,
        other => panic!("expected a token error for {text:?}, got {other:?}"),
    }
}

/// A minimal valid file; tests append or replace lines to break it.
const TINY: &str = r#"id = "tiny"
name = "Tiny"
schema = "ipa-chart"

[stress]
required = true
marks = [{ mark = "1", level = "primary" }, { mark = "0", level = "unstressed" }]

[[phone]]
symbol = "p"
ipa = "p"
xsampa = "p"
class = "consonant"
features = { place = "bilabial", manner = "stop", voicing = "voiceless" }

[[phone]]
symbol = "a"
ipa = "a"
xsampa = "a"
class = "vowel"
features = { height = "open", backness = "front", rounding = "unrounded" }
"#;

fn problems(text: &str) -> Vec<Located<CheckProblem>> {
    match Phoneset::from_toml_str(text, "test.toml") {
        Err(PhonesetError::Invalid(problems)) => problems,
        other => panic!("expected self-check problems, got {other:?}"),
    }
}

#[test]
fn shipped_sets_load() {
    for sid in Phoneset::shipped_ids() {
        let set = Phoneset::shipped(sid).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(set.id(), *sid);
    }
    assert!(matches!(
        Phoneset::shipped("xx"),
        Err(PhonesetError::UnknownShipped { .. })
    ));
}

#[test]
fn en_arpa_has_the_39_phonemes_and_marked_allophones() {
    // The 39 phones of CMUdict (cmudict.phones, common practice for US ARPAbet lexicons).
    let set = arpa();
    let phonemes: Vec<&str> = set
        .phones()
        .iter()
        .filter(|p| !p.is_allophone())
        .map(|p| p.symbol.as_str())
        .collect();
    assert_eq!(phonemes.len(), 39);
    for a in ["DX", "Q", "EL", "EM", "EN", "RT", "RD", "AX"] {
        assert!(set.phone(id(&set, a)).is_allophone(), "{a}");
    }
    assert_eq!(set.phone(id(&set, "AX")).allophone_of, ["AH"]);
}

#[test]
fn parse_accepts_stress_and_renders_back() {
    let set = arpa();
    let p = set.parse("HH AH0 L OW1").unwrap();
    assert_eq!(p.phones[1].stress, Some(StressLevel::Unstressed));
    assert_eq!(p.phones[0].stress, None);
    assert_eq!(p.render(&set), "HH AH0 L OW1");
    assert_eq!(p.without_stress().render(&set), "HH AH L OW");
    // Syllabic consonants are nuclei and carry stress.
    assert!(set.parse("B AA1 T EL0").is_ok());
}

#[test]
fn unknown_symbol_names_index_column_and_suggestions() {
    let set = arpa();
    let e = token_error(&set, "HH AH0 L OWW1");
    assert_eq!(e.kind, TokenProblemKind::UnknownSymbol);
    assert_eq!((e.index, e.column, e.token.as_str()), (3, 10, "OWW1"));
    assert_eq!(e.suggestions.first().map(String::as_str), Some("OW1"));
    // Case slip: the exact symbol comes first, with its mark kept.
    assert_eq!(token_error(&set, "hh AH0").suggestions[0], "HH");
    assert_eq!(token_error(&set, "K aa1 T").suggestions[0], "AA1");
    // A stressed unknown token gets vowel suggestions first.
    let e = token_error(&set, "K AXE1");
    assert!(
        e.suggestions.iter().all(|s| s.ends_with('1')),
        "{:?}",
        e.suggestions
    );
}

#[test]
fn columns_count_characters_not_bytes() {
    let es = Phoneset::shipped("es-ipa").unwrap();
    // "ʝ" and "ɲ" are two bytes each; the bad token starts at character 11 (byte 13).
    let e = token_error(&es, "ʝ a1 ɲ o0 qq");
    assert_eq!((e.index, e.column), (4, 11));
}

#[test]
fn stress_problems_are_specific() {
    let set = arpa();
    let e = token_error(&set, "T1 AA1");
    assert_eq!(
        e.kind,
        TokenProblemKind::StressOnNonNucleus { mark: "1".into() }
    );
    assert_eq!(e.suggestions, ["T"]);
    let e = token_error(&set, "T AA3");
    assert!(matches!(&e.kind, TokenProblemKind::UndeclaredMark { mark, .. } if mark == "3"));
    assert_eq!(e.suggestions, ["AA1", "AA2", "AA0"]);
    let e = token_error(&set, "T AA");
    assert_eq!(e.kind, TokenProblemKind::MissingStress);
    // An undeclared mark on a consonant is a stress-on-consonant problem.
    assert!(matches!(
        token_error(&set, "T7 AA1").kind,
        TokenProblemKind::StressOnNonNucleus { .. }
    ));
    // Spanish declares no secondary stress.
    let es = Phoneset::shipped("es-ipa").unwrap();
    assert!(matches!(
        token_error(&es, "k a2 s a0").kind,
        TokenProblemKind::UndeclaredMark { .. }
    ));
    assert_eq!(set.parse("  "), Err(PronunciationError::Empty));
}

#[test]
fn check_tokens_reports_every_problem_in_order() {
    let set = arpa();
    let found = set.check_tokens(" HH AH3\tL1 OW ");
    let cols: Vec<usize> = found.iter().map(|p| p.column).collect();
    assert_eq!(cols, [1, 5, 8, 9, 12, 14]);
    assert_eq!(found[0].kind, TokenProblemKind::Spacing);
    assert_eq!(found[5].kind, TokenProblemKind::Spacing);
    assert!(set.check_tokens("HH AH0 L OW1").is_empty());
    assert_eq!(set.check_tokens("")[0].kind, TokenProblemKind::Empty);
    // Display names the token and offers the fix.
    let text = found[1].to_string();
    assert!(text.contains("AH3") && text.contains("AH1"), "{text}");
}

#[test]
fn suggestions_use_ipa_xsampa_and_features() {
    let set = arpa();
    assert_eq!(set.suggest("ʃ", 1), ["SH"]); // IPA of SH
    assert_eq!(set.suggest("S", 1), ["S"]); // exact symbol wins over X-SAMPA S (= SH)
    assert_eq!(set.suggest("ɾ", 1), ["DX"]);
    // [x] is not in en-arpa but in ipa-broad: the nearest phones by features are fricatives.
    let x = set.suggest("x", 3);
    assert_eq!(x.len(), 3);
    for s in &x {
        assert_eq!(
            set.phone(id(&set, s)).feature("manner"),
            Some("fricative"),
            "{x:?}"
        );
    }
    assert!(set.suggest("QQQQQQ", 3).len() <= 1);
}

#[test]
fn distance_is_a_bounded_symmetric_premetric() {
    for sid in Phoneset::shipped_ids() {
        let set = Phoneset::shipped(sid).unwrap();
        let n = set.phones().len() as PhoneId;
        for a in 0..n {
            assert_eq!(set.distance(a, a), 0.0);
            for b in 0..n {
                let d = set.distance(a, b);
                assert!((0.0..=1.0).contains(&d));
                assert_eq!(d, set.distance(b, a));
                if a != b {
                    // Distinct phones differ unless they share a bundle as allophones.
                    let (pa, pb) = (set.phone(a), set.phone(b));
                    let same = pa.features == pb.features
                        && pa.targets == pb.targets
                        && pa.syllabic == pb.syllabic;
                    assert_eq!(d == 0.0, same, "{} {}", pa.symbol, pb.symbol);
                }
            }
        }
    }
}

#[test]
fn distance_grades_along_the_chart() {
    let set = arpa();
    let d = |a, b| set.distance(id(&set, a), id(&set, b));
    // Voicing alone is a small step; manner and place more (Kondrak 2000 saliences).
    assert!(d("P", "B") < d("P", "S"));
    // Place is ordinal: bilabial–alveolar nearer than bilabial–velar.
    assert!(d("P", "T") < d("P", "K"));
    // Height is ordinal: close i, near-close ɪ, open-mid ɛ, near-open æ.
    assert!(d("IY", "IH") < d("IY", "EH") && d("IY", "EH") < d("IY", "AE"));
    // Consonant vs vowel is maximal.
    assert_eq!(d("P", "AA"), 1.0);
    assert_eq!(d("S", "AY"), 1.0);
    // A diphthong is nearer its own targets' vowels.
    assert!(d("AY", "IH") < d("AY", "UW"));
    // Syllabic and plain l differ only in syllabicity.
    assert!(d("L", "EL") > 0.0 && d("L", "EL") < d("L", "R"));
}

#[test]
fn feature_lookups() {
    let set = arpa();
    let t = set.phone(id(&set, "T")).features.clone();
    assert_eq!(set.find_by_features(&t), Some(id(&set, "T")));
    assert_eq!(
        set.find_by_features(&t.clone().with("voicing", "voiced")),
        Some(id(&set, "D"))
    );
    assert_eq!(
        set.find_by_features(&t.clone().with("place", "uvular")),
        None
    );
    // Defaulted features may be left out of a query.
    let partial = Features::new()
        .with("place", "velar")
        .with("manner", "stop")
        .with("voicing", "voiced")
        .with("nasal", "nasal");
    assert_eq!(set.find_by_features(&partial), Some(id(&set, "NG")));
    let n = set.phone(id(&set, "N")).features.clone();
    assert_eq!(
        set.find_by_features(&n.clone().with("syllabic", "yes")),
        Some(id(&set, "EN"))
    );
    assert_eq!(set.find_by_features(&n.with("class", "vowel")), None);
    assert_eq!(set.find_by_features(&Features::new()), None);
    let near = set.nearest_by_features(&set.phone(id(&set, "IY")).features.clone(), 2);
    assert_eq!(near[0], (id(&set, "IY"), 0.0));
    assert_eq!(near.len(), 2);
}

#[test]
fn phonotactic_violations() {
    let set = arpa();
    let v = set.phonotactic_violations(&set.parse("NG AA1 HH").unwrap());
    let got: Vec<(&str, usize)> = v
        .iter()
        .map(|v| (v.constraint_id.as_str(), v.position))
        .collect();
    assert_eq!(
        got,
        [("en-no-initial-velar-nasal", 0), ("en-no-final-h", 2)]
    );
    assert!(set
        .phonotactic_violations(&set.parse("HH AE1 NG").unwrap())
        .is_empty());
    let es = Phoneset::shipped("es-ipa").unwrap();
    let v = es.phonotactic_violations(&es.parse("s k u0 e1 l a0").unwrap());
    assert_eq!(v[0].constraint_id, "es-no-initial-s-cluster");
    assert!(es
        .phonotactic_violations(&es.parse("e0 s k u e1 l a0").unwrap_or_default())
        .is_empty());
    for c in set.constraints() {
        assert!(!c.source.is_empty() && !c.message.is_empty());
    }
}

#[test]
fn mapping_round_trips_every_en_arpa_phone_through_ipa() {
    let arpa = arpa();
    let ipa = Phoneset::shipped("ipa-broad").unwrap();
    for (i, p) in arpa.phones().iter().enumerate() {
        let one = Pronunciation {
            phones: vec![PhoneToken {
                phone: i as PhoneId,
                stress: None,
            }],
        };
        let there = map_pronunciation(&arpa, &ipa, &one).unwrap_or_else(|e| panic!("{e}"));
        let mapped: Vec<&Phone> = there.phones.iter().map(|t| ipa.phone(t.phone)).collect();
        // The mapped phones describe the same sounds: same features (targets for diphthongs).
        if p.class == PhoneClass::Diphthong {
            let feats: Vec<&Features> = mapped.iter().map(|m| &m.features).collect();
            assert_eq!(feats, p.targets.iter().collect::<Vec<_>>(), "{}", p.symbol);
        } else {
            assert_eq!(mapped.len(), 1, "{}", p.symbol);
            assert_eq!(mapped[0].features, p.features, "{}", p.symbol);
            assert_eq!(mapped[0].syllabic, p.syllabic, "{}", p.symbol);
        }
        let back = map_pronunciation(&ipa, &arpa, &there).unwrap();
        assert_eq!(back, one, "{}", p.symbol);
    }
}

#[test]
fn mapping_carries_stress_and_reports_gaps() {
    let arpa = arpa();
    let es = Phoneset::shipped("es-ipa").unwrap();
    let ipa = Phoneset::shipped("ipa-broad").unwrap();
    let casa = es.parse("k a1 s a0").unwrap();
    let m = map_pronunciation(&es, &ipa, &casa).unwrap();
    assert_eq!(m.render(&ipa), "k aˈ s a");
    // Secondary stress falls back to unstressed in Spanish, which declares no secondary.
    let p = arpa.parse("S IY2 M AH0").unwrap();
    let err = map_pronunciation(&arpa, &es, &p).unwrap_err();
    assert!(
        matches!(&err, MappingError::Unmappable { index: 3, symbol, nearest, .. } if symbol == "AH" && !nearest.is_empty()),
        "{err}"
    );
    let p = arpa.parse("S IY2 M IY0").unwrap();
    assert_eq!(
        map_pronunciation(&arpa, &es, &p).unwrap().render(&es),
        "s i0 m i0"
    );
}

#[test]
fn self_check_accepts_the_minimal_file() {
    let set = Phoneset::from_toml_str(TINY, "tiny.toml").unwrap();
    assert_eq!(set.phones().len(), 2);
}

#[test]
fn self_check_rejects_duplicate_symbols_with_lines() {
    let text = format!("{TINY}\n[[phone]]\nsymbol = \"p\"\nipa = \"b\"\nxsampa = \"b\"\nclass = \"consonant\"\nfeatures = {{ place = \"bilabial\", manner = \"stop\", voicing = \"voiced\" }}\n");
    let p = problems(&text);
    assert_eq!(
        p[0].message,
        CheckProblem::DuplicateSymbol {
            symbol: "p".into(),
            first_line: 10
        }
    );
    assert_eq!(p[0].position, Some(Position::new(24, 10)));
}

#[test]
fn self_check_rejects_bad_features() {
    let unknown = TINY.replace(
        "voicing = \"voiceless\"",
        "voicing = \"voiceless\", aspiration = \"yes\"",
    );
    assert!(
        matches!(&problems(&unknown)[0].message, CheckProblem::UnknownFeature { feature, .. } if feature == "aspiration")
    );
    let value = TINY.replace("place = \"bilabial\"", "place = \"labial\"");
    let p = problems(&value);
    assert!(matches!(&p[0].message, CheckProblem::UnknownValue { value, .. } if value == "labial"));
    assert_eq!(p[0].position, Some(Position::new(14, 22)));
    let missing = TINY.replace(", voicing = \"voiceless\"", "");
    assert!(
        matches!(&problems(&missing)[0].message, CheckProblem::MissingFeature { feature, .. } if feature == "voicing")
    );
    let wrong_class = TINY.replace(
        "rounding = \"unrounded\"",
        "rounding = \"unrounded\", place = \"velar\"",
    );
    assert!(matches!(
        &problems(&wrong_class)[0].message,
        CheckProblem::FeatureNotForClass { .. }
    ));
}

#[test]
fn self_check_rejects_same_bundle_unless_allophone() {
    let twin = "\n[[phone]]\nsymbol = \"P\"\nipa = \"p\"\nxsampa = \"p\"\nclass = \"consonant\"\nfeatures = { place = \"bilabial\", manner = \"stop\", voicing = \"voiceless\" }\n";
    let p = problems(&format!("{TINY}{twin}"));
    assert!(
        matches!(&p[0].message, CheckProblem::SameBundle { symbol, other, .. } if symbol == "P" && other == "p")
    );
    let ok = format!("{TINY}{twin}allophone_of = [\"p\"]\n");
    assert!(Phoneset::from_toml_str(&ok, "t").is_ok());
    let bad_base = format!("{TINY}{twin}allophone_of = [\"pp\"]\n");
    assert!(problems(&bad_base)
        .iter()
        .any(|l| matches!(l.message, CheckProblem::BadAllophoneBase { .. })));
}

#[test]
fn self_check_rejects_missing_transcriptions() {
    let p = problems(&TINY.replace("xsampa = \"p\"\n", ""));
    assert_eq!(
        p[0].message,
        CheckProblem::MissingField {
            phone: "p".into(),
            field: "xsampa"
        }
    );
    let p = problems(&TINY.replace("ipa = \"a\"", "ipa = \" \""));
    assert_eq!(
        p[0].message,
        CheckProblem::MissingField {
            phone: "a".into(),
            field: "ipa"
        }
    );
}

#[test]
fn self_check_rejects_bad_stress_marks() {
    let is_mark = |text: &str| {
        problems(text)
            .iter()
            .any(|l| matches!(l.message, CheckProblem::BadStressMark { .. }))
    };
    assert!(is_mark(&TINY.replace("mark = \"0\"", "mark = \"p\"")));
    assert!(is_mark(&TINY.replace("mark = \"0\"", "mark = \"1\"")));
    assert!(is_mark(&TINY.replace("mark = \"0\"", "mark = \"\"")));
    assert!(is_mark(
        &TINY.replace("level = \"unstressed\"", "level = \"tertiary\"")
    ));
    // `a1` would read both as a + mark 1 and as a symbol of its own.
    let ambiguous = TINY.replace("symbol = \"p\"", "symbol = \"a1\"");
    assert!(is_mark(&ambiguous));
    assert!(is_mark(&TINY.replace(
        "marks = [{ mark = \"1\", level = \"primary\" }, { mark = \"0\", level = \"unstressed\" }]",
        "marks = []"
    )));
}

#[test]
fn self_check_rejects_bad_schema_and_constraints() {
    let p = problems(&TINY.replace("schema = \"ipa-chart\"", "schema = \"nope\""));
    assert!(matches!(p[0].message, CheckProblem::UnknownSchema { .. }));
    let constraint = |pattern: &str| {
        format!("{TINY}\n[[constraint]]\nid = \"c\"\npattern = \"{pattern}\"\nmessage = \"m\"\nsource = \"common practice\"\n")
    };
    assert!(Phoneset::from_toml_str(&constraint("# [place=bilabial] a"), "t").is_ok());
    for bad in [
        "# zz",
        "p # a",
        "[place=labial]",
        "[colour=red]",
        "[place=bilabial",
        "#",
        "[]",
    ] {
        let p = problems(&constraint(bad));
        assert!(
            matches!(p[0].message, CheckProblem::BadConstraint { .. }),
            "{bad}"
        );
    }
}

#[test]
fn inline_schemas_are_checked() {
    let inline = r#"id = "x"
name = "X"
schema = "two-way"
[[feature]]
name = "height"
classes = ["vowel"]
required = true
weight = 1.0
values = ["high", "low"]
scale = [1.0, 1.0]
[[phone]]
symbol = "i"
ipa = "i"
xsampa = "i"
class = "vowel"
features = { height = "high" }
"#;
    let p = problems(inline);
    assert!(
        matches!(&p[0].message, CheckProblem::BadFeature { feature, .. } if feature == "height")
    );
    let fixed = inline.replace("scale = [1.0, 1.0]", "scale = [1.0, 0.0]");
    let set = Phoneset::from_toml_str(&fixed, "t").unwrap();
    assert_eq!(set.schema().name(), "two-way");
    let shadow = fixed.replace("schema = \"two-way\"", "schema = \"ipa-chart\"");
    assert!(matches!(
        problems(&shadow)[0].message,
        CheckProblem::SchemaShadowsShipped { .. }
    ));
}

#[test]
fn malformed_and_huge_files_error_cleanly() {
    match Phoneset::from_toml_str("id = \"x\"\nname = [", "bad.toml") {
        Err(PhonesetError::Syntax(at)) => {
            assert_eq!((at.line(), at.origin.as_str()), (Some(2), "bad.toml"))
        }
        other => panic!("{other:?}"),
    }
    match Phoneset::from_toml_str(
        &TINY.replace("class = \"vowel\"", "class = \"vowel\"\ncolour = \"red\""),
        "t",
    ) {
        Err(PhonesetError::Syntax(at)) => {
            assert!(at.message.contains("colour") && at.line().is_some(), "{at}")
        }
        other => panic!("{other:?}"),
    }
    let huge = "#".repeat(MAX_FILE.bytes as usize + 1);
    assert!(matches!(
        Phoneset::from_toml_str(&huge, "h"),
        Err(PhonesetError::TooLarge { .. })
    ));
    let nested = format!("id = {}{}", "[".repeat(10_000), "]".repeat(10_000));
    assert!(Phoneset::from_toml_str(&nested, "n").is_err());
}

#[test]
fn load_refuses_large_and_non_utf8_files() {
    let dir = tempfile::tempdir().unwrap();
    let big = dir.path().join("big.toml");
    std::fs::write(&big, vec![b'#'; MAX_FILE.bytes as usize + 10]).unwrap();
    assert!(matches!(
        Phoneset::load(&big),
        Err(PhonesetError::Read(ReadError::TooLarge { .. }))
    ));
    let latin1 = dir.path().join("latin1.toml");
    std::fs::write(&latin1, b"id = \"x\"\nname = \"caf\xe9\"\n").unwrap();
    assert!(matches!(
        Phoneset::load(&latin1),
        Err(PhonesetError::Read(ReadError::NotUtf8(at))) if at.position == Some(Position::new(2, 12))
    ));
    let good = dir.path().join("tiny.toml");
    std::fs::write(&good, TINY).unwrap();
    assert_eq!(
        Phoneset::resolve("tiny.toml", dir.path()).unwrap().id(),
        "tiny"
    );
    assert_eq!(
        Phoneset::resolve("es-ipa", dir.path()).unwrap().id(),
        "es-ipa"
    );
}
