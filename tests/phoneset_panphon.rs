//! External checks of the shipped phonesets against panphon 0.22.2 (D. R. Mortensen et al.,
//! "PanPhon: A Resource for Mapping IPA Segments to Articulatory Feature Vectors", COLING
//! 2016), copied unchanged into tests/reference/panphon-0.22.2/:
//! - `ipa_bases.csv`: every ipa-broad phone agrees on syllabicity, voicing, nasality,
//!   laterality, continuancy, place class (consonants), height class, front/back and rounding
//!   (vowels);
//! - `ipa-xsampa.csv` (first two columns): the X-SAMPA of every phone of every shipped set.

use std::collections::HashMap;

use orthoepy::phoneset::{Phone, PhoneClass, Phoneset};
use unicode_normalization::UnicodeNormalization;

const BASES: &str = include_str!("reference/panphon-0.22.2/ipa_bases.csv");
const XSAMPA: &str = include_str!("reference/panphon-0.22.2/ipa-xsampa.csv");

/// Combining syllabic mark (U+0329).
const SYLLABIC: char = '\u{329}';
/// Combining inverted breve below, the non-syllabic mark (U+032F).
const NON_SYLLABIC: char = '\u{32f}';
/// The length mark (U+02D0).
const LONG: char = 'ː';
/// Combining double inverted breve, the affricate tie bar (U+0361).
const TIE: char = '\u{361}';

/// panphon writes some segments decomposed (ç as c + U+0327); compare in NFC.
fn nfc(s: &str) -> String {
    s.nfc().collect()
}

/// Phones panphon's segment table does not list, with the reason.
const NOT_IN_PANPHON: &[(&str, &str)] = &[
    ("ⱱ", "labiodental flap: not in panphon 0.22.2 ipa_bases.csv"),
    (
        "ɚ",
        "rhotic vowel: panphon builds it from ə and a diacritic, no base row",
    ),
    (
        "ɝ",
        "rhotic vowel: panphon builds it from ɜ and a diacritic, no base row",
    ),
];

/// Single feature values where panphon 0.22.2 contradicts itself, skipped for that segment:
/// (segment, panphon feature, why).
const PANPHON_SLIPS: &[(&str, &str, &str)] = &[(
    "ɮ",
    "ant",
    "panphon gives ɬ +ant but its voiced partner ɮ −ant; the IPA chart (2020) puts both in the alveolar column",
)];

/// panphon rows by segment; a segment listed twice (ɘ ɵ ɞ in 0.22.2) keeps all its rows.
fn panphon_rows() -> HashMap<String, Vec<HashMap<String, String>>> {
    let mut lines = BASES.lines();
    let header: Vec<&str> = lines.next().expect("header").split(',').collect();
    let mut rows: HashMap<String, Vec<HashMap<String, String>>> = HashMap::new();
    for line in lines.filter(|l| !l.trim().is_empty()) {
        let cells: Vec<&str> = line.split(',').collect();
        let row = header
            .iter()
            .zip(&cells)
            .map(|(h, c)| (h.to_string(), c.to_string()))
            .collect();
        rows.entry(nfc(cells[0])).or_default().push(row);
    }
    rows
}

/// Our features as the panphon values they imply: (panphon feature, accepted values).
/// The correspondence follows panphon's own feature definitions (Hayes, "Introductory
/// Phonology", 2009, which panphon cites), and the IPA chart (2020) for place and height:
/// - voicing → voi; `nasal` → nas; `lateral` → lat; syllabic → syl;
/// - continuancy: stops (oral and nasal) and affricates are −cont, other manners +cont;
/// - place (consonants): labials +lab −cor; dental +cor +ant +distr; alveolar +cor +ant −distr;
///   postalveolar +cor −ant +distr; retroflex +cor −ant, distr not + (panphon writes ɳ distr 0);
///   palatal +hi −back; velar +hi, back not − (panphon writes ʟ ɰ back 0); uvular −hi −lo +back;
///   pharyngeal +lo; glottal −lab −cor −hi −lo −back. Secondary labialised → +lab,
///   velarised → +back; otherwise non-labial places are −lab.
/// - height (vowels): close, near-close → +hi −lo; close-mid, mid, open-mid → −hi −lo;
///   open → −hi +lo; near-open → −hi with lo either way (panphon: æ +lo, ɐ −lo);
/// - backness: front, near-front → −back; back, near-back → +back; central is not compared,
///   because panphon codes central vowels both ways (ə ɨ ɜ ɐ +back, ʉ −back);
/// - rounding → round.
fn expectations(p: &Phone) -> Vec<(&'static str, &'static [&'static str])> {
    let pm = |b: bool| -> &'static [&'static str] {
        if b {
            &["+"]
        } else {
            &["-"]
        }
    };
    let f = |name: &str| p.feature(name).unwrap_or("");
    let mut out = vec![("syl", pm(p.syllabic))];
    match p.class {
        PhoneClass::Consonant => {
            out.push(("voi", pm(f("voicing") == "voiced")));
            out.push(("nas", pm(f("nasal") == "nasal")));
            out.push(("lat", pm(f("lateral") == "lateral")));
            out.push(("cont", pm(!matches!(f("manner"), "stop" | "affricate"))));
            let place = f("place");
            let labial = matches!(place, "bilabial" | "labiodental");
            out.push(("lab", pm(labial || f("secondary") == "labialised")));
            if f("secondary") == "velarised" {
                out.push(("back", &["+"]));
            }
            match place {
                "bilabial" | "labiodental" => out.push(("cor", &["-"])),
                "dental" => out.extend([("cor", pm(true)), ("ant", pm(true)), ("distr", pm(true))]),
                "alveolar" => {
                    out.extend([("cor", pm(true)), ("ant", pm(true)), ("distr", pm(false))])
                }
                "postalveolar" => {
                    out.extend([("cor", pm(true)), ("ant", pm(false)), ("distr", pm(true))])
                }
                "retroflex" => out.extend([
                    ("cor", pm(true)),
                    ("ant", pm(false)),
                    ("distr", &["-", "0"]),
                ]),
                "palatal" => out.extend([("hi", pm(true)), ("back", pm(false))]),
                "velar" => out.extend([("hi", pm(true)), ("back", &["+", "0"])]),
                "uvular" => out.extend([("hi", pm(false)), ("lo", pm(false)), ("back", pm(true))]),
                "pharyngeal" => out.push(("lo", pm(true))),
                "glottal" => out.extend([
                    ("cor", pm(false)),
                    ("hi", pm(false)),
                    ("lo", pm(false)),
                    ("back", pm(false)),
                ]),
                other => panic!(
                    "place {other} of {} has no panphon correspondence",
                    p.symbol
                ),
            }
        }
        PhoneClass::Vowel => {
            out.extend([
                ("voi", pm(true)),
                ("nas", pm(false)),
                ("lat", pm(false)),
                ("cont", pm(true)),
            ]);
            match f("height") {
                "close" | "near-close" => out.extend([("hi", pm(true)), ("lo", pm(false))]),
                "close-mid" | "mid" | "open-mid" => {
                    out.extend([("hi", pm(false)), ("lo", pm(false))])
                }
                "near-open" => out.push(("hi", pm(false))),
                "open" => out.extend([("hi", pm(false)), ("lo", pm(true))]),
                other => panic!("height {other} of {}", p.symbol),
            }
            match f("backness") {
                "front" | "near-front" => out.push(("back", pm(false))),
                "back" | "near-back" => out.push(("back", pm(true))),
                _ => {}
            }
            out.push(("round", pm(f("rounding") == "rounded")));
        }
        PhoneClass::Diphthong => panic!("ipa-broad has no diphthongs"),
    }
    out
}

#[test]
fn ipa_broad_features_agree_with_panphon() {
    let set = Phoneset::shipped("ipa-broad").unwrap();
    let rows = panphon_rows();
    let mut checked = 0;
    let mut disagreements = Vec::new();
    for p in set.phones() {
        // Syllabic consonants: panphon lists the base; syllabicity is checked on our side.
        // Non-syllabic vowels (diphthong offglides) and long vowels likewise.
        let base = p.ipa.trim_end_matches(SYLLABIC).trim_end_matches(NON_SYLLABIC).trim_end_matches(LONG);
        let long = p.feature("length") == Some("long");
        assert_eq!(long, p.ipa.ends_with(LONG), "{} is long exactly when it has the length mark", p.ipa);
        let Some(candidates) = rows.get(base) else {
            assert!(
                NOT_IN_PANPHON.iter().any(|(s, _)| *s == p.ipa),
                "{} is not in panphon and not exempted",
                p.ipa
            );
            continue;
        };
        let mut expected = expectations(p);
        if base != p.ipa && !long {
            assert_eq!(p.syllabic, p.ipa.ends_with(SYLLABIC), "{} has the (non-)syllabic mark", p.ipa);
            expected.retain(|(f, _)| *f != "syl");
        }
        expected.retain(|(f, _)| {
            !PANPHON_SLIPS
                .iter()
                .any(|(seg, feat, _)| *seg == base && feat == f)
        });
        // panphon 0.22.2 lists ɘ ɵ ɞ twice with different values; one agreeing row suffices.
        let agrees = |row: &HashMap<String, String>| {
            expected
                .iter()
                .all(|(f, ok)| ok.contains(&row[*f].as_str()))
        };
        if !candidates.iter().any(agrees) {
            let row = &candidates[0];
            let wrong: Vec<String> = expected
                .iter()
                .filter(|(f, ok)| !ok.contains(&row[*f].as_str()))
                .map(|(f, ok)| format!("{f}: panphon {} vs ours {:?}", row[*f], ok))
                .collect();
            disagreements.push(format!("{} ({}): {}", p.ipa, p.symbol, wrong.join("; ")));
        }
        checked += 1;
    }
    assert!(
        disagreements.is_empty(),
        "disagreements with panphon:\n{}",
        disagreements.join("\n")
    );
    // The pulmonic chart has 59 consonant symbols and 28 vowels; nearly all are in panphon.
    assert!(checked >= 95, "only {checked} phones compared");
}

/// panphon's IPA → X-SAMPA table (first two columns).
fn xsampa_table() -> HashMap<String, String> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(true)
        .from_reader(XSAMPA.as_bytes());
    let mut table = HashMap::new();
    for record in reader.records() {
        let record = record.expect("readable csv row");
        if let (Some(ipa), Some(xs)) = (record.get(0), record.get(1)) {
            table.entry(nfc(ipa)).or_insert_with(|| xs.to_string());
        }
    }
    table
}

/// X-SAMPA of an IPA string, spelled from the table longest match first (segments, then
/// combining diacritics such as ̪ → _d and ̩ → =). X-SAMPA writes affricates as two symbols
/// without a tie (the table's own t͡ʃ → tS), so an unmatched tie bar is dropped. `None` if some
/// part is not in the table.
fn spell(ipa: &str, table: &HashMap<String, String>) -> Option<String> {
    let chars: Vec<char> = ipa.chars().collect();
    let mut out = String::new();
    let mut at = 0;
    while at < chars.len() {
        let found = (1..=chars.len() - at).rev().find_map(|len| {
            let piece: String = chars[at..at + len].iter().collect();
            table.get(&piece).map(|xs| (len, xs))
        });
        match found {
            Some((len, xs)) => {
                out.push_str(xs);
                at += len;
            }
            None if chars[at] == TIE => at += 1,
            None => return None,
        }
    }
    Some(out)
}

#[test]
fn xsampa_agrees_with_panphon_table() {
    let table = xsampa_table();
    let mut wrong = Vec::new();
    let mut checked = 0;
    for sid in Phoneset::shipped_ids() {
        let set = Phoneset::shipped(sid).unwrap();
        for p in set.phones() {
            match spell(&p.ipa, &table) {
                Some(xs) => {
                    checked += 1;
                    if xs != p.xsampa {
                        wrong.push(format!(
                            "{sid} {} ({}): ours {} vs panphon {xs}",
                            p.symbol, p.ipa, p.xsampa
                        ));
                    }
                }
                // ⱱ: X-SAMPA (Wells 1995) has no symbol; the file documents its own choice.
                None => assert_eq!(
                    p.ipa, "ⱱ",
                    "{sid} {}: IPA {} not in panphon's table",
                    p.symbol, p.ipa
                ),
            }
        }
    }
    assert!(
        wrong.is_empty(),
        "X-SAMPA disagreements:\n{}",
        wrong.join("\n")
    );
    assert!(checked > 150, "{checked}");
}

#[test]
fn ipa_broad_covers_the_ipa_chart() {
    // Pulmonic consonants and vowels of the IPA chart (revised to 2020), transcribed from the
    // chart (from memory of its layout).
    let chart = "p b t d ʈ ɖ c ɟ k ɡ q ɢ ʔ m ɱ n ɳ ɲ ŋ ɴ ʙ r ʀ ⱱ ɾ ɽ ɸ β f v θ ð s z ʃ ʒ ʂ ʐ ç ʝ x ɣ χ ʁ ħ ʕ h ɦ \
                 ɬ ɮ ʋ ɹ ɻ j ɰ l ɭ ʎ ʟ i y ɨ ʉ ɯ u ɪ ʏ ʊ e ø ɘ ɵ ɤ o ə ɛ œ ɜ ɞ ʌ ɔ æ ɐ a ɶ ɑ ɒ";
    let set = Phoneset::shipped("ipa-broad").unwrap();
    for s in chart.split_whitespace() {
        assert!(set.lookup(s).is_some(), "{s} missing from ipa-broad");
    }
    assert_eq!(chart.split_whitespace().count(), 59 + 28);
}
