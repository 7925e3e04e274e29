//! The G2P decoder (`Model::guess`, demo model) and the hybrid guesser built on it, on arbitrary
//! Unicode: neither panics; hypotheses are at most N, best first, with posteriors in 0..=1
//! summing to at most 1, finite log probabilities, and alignments whose letters concatenate to
//! the normalised word and whose phones are the hypothesis; hybrid candidates are at most
//! `limit`, best first, scored in 0..=1.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig};
use orthoepy_fuzz::{demo_index, demo_lexicon, demo_model, phoneset};

fuzz_target!(|data: &[u8]| {
    let word = String::from_utf8_lossy(data);
    let model = demo_model();
    let n = 4;
    let guess = model.guess(&word, n);
    assert!(guess.hypotheses.len() <= n);
    let letters: String = model.symbol_options().letters(&word).concat();
    let mut total = 0.0;
    for (i, h) in guess.hypotheses.iter().enumerate() {
        assert!(h.log_prob.is_finite() && h.log_prob <= 1e-9, "log_prob {}", h.log_prob);
        assert!((0.0..=1.0 + 1e-9).contains(&h.posterior), "posterior {}", h.posterior);
        total += h.posterior;
        if let Some(next) = guess.hypotheses.get(i + 1) {
            assert!(h.log_prob >= next.log_prob - 1e-9, "not best first");
        }
        let aligned: String = h.alignment.iter().map(|p| p.letters.as_str()).collect();
        assert_eq!(aligned, letters, "alignment letters");
        let phones: Vec<&str> = h.alignment.iter().flat_map(|p| p.phones.iter().map(String::as_str)).collect();
        assert_eq!(phones, h.phones.iter().map(String::as_str).collect::<Vec<_>>(), "alignment phones");
    }
    assert!(total <= 1.0 + 1e-6, "posteriors sum to {total}");

    let set = phoneset("en-arpa");
    let Ok(config) = LanguageConfig::shipped("en", set) else { return };
    let guesser = HybridGuesser::new(demo_lexicon(), demo_index(), set, &config).with_model(model);
    let candidates = guesser.guess(&word, n);
    assert!(candidates.len() <= n);
    for pair in candidates.windows(2) {
        assert!(pair[0].score >= pair[1].score, "not best first");
    }
    for c in &candidates {
        assert!((0.0..=1.0).contains(&c.score), "score {}", c.score);
    }
});
