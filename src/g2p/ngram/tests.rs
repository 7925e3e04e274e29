//! Unit tests of the n-gram code, training and runtime halves together (a model to query is
//! made by estimating one).

use super::estimate::{heldout_log_likelihood, history_of, Levels};
use super::*;

fn flat(ds: &[f64]) -> Vec<Discount> {
    ds.iter().map(|&d| Discount::flat(d)).collect()
}

fn bigram_evidence() -> Evidence {
    // A toy corpus over symbols 0,1 and end symbol 2, order 2 (hand-made).
    let mut e = Evidence::default();
    let mut add = |h: u32, q: u32, c: f64| {
        let mut k = [NONE; MAX_ORDER];
        k[0] = h;
        k[1] = q;
        e.insert(k, Count::from_expected(c));
    };
    add(START, 0, 3.0);
    add(START, 1, 1.0);
    add(0, 1, 2.5);
    add(0, 2, 0.5);
    add(1, 2, 3.5);
    add(1, 0, 0.25);
    e
}

#[test]
fn conditional_distributions_sum_to_one() {
    // Property of interpolated absolute discounting (Kneser & Ney 1995): for every history
    // the probabilities over the whole vocabulary sum to 1.
    let e = bigram_evidence();
    let m = NgramModel::estimate(&e, &flat(&[0.4, 0.7]), 3);
    for h in [START, 0, 1] {
        let ctx = m.context(&[h]);
        let total: f64 = (0..3).map(|q| f64::from(m.log_prob(ctx, q)).exp()).sum();
        assert!((total - 1.0).abs() < 1e-5, "history {h}: sum {total}");
    }
    let uni: f64 = m.unigram().iter().map(|&lp| f64::from(lp).exp()).sum();
    assert!((uni - 1.0).abs() < 1e-5);
}

#[test]
fn trigram_sums_to_one_with_unseen_history() {
    let mut e = Evidence::default();
    for (a, b, q, c) in [(START, START, 0, 2.0), (START, 0, 1, 2.0), (0, 1, 2, 1.5), (0, 1, 0, 0.5), (1, 0, 2, 0.5)] {
        let mut k = [NONE; MAX_ORDER];
        k[..3].copy_from_slice(&[a, b, q]);
        e.insert(k, Count::from_expected(c));
    }
    let m = NgramModel::estimate(&e, &flat(&[0.3, 0.6, 0.9]), 3);
    for (a, b) in [(START, START), (0, 1), (1, 1), (1, 0)] {
        let ctx = m.context(&[a, b]);
        let total: f64 = (0..3).map(|q| f64::from(m.log_prob(ctx, q)).exp()).sum();
        assert!((total - 1.0).abs() < 1e-5, "history ({a},{b}): sum {total}");
    }
}

/// Order-5 evidence as the E-step makes it: each "word" (a symbol sequence ending in the
/// end symbol 3) contributes its padded n-grams with a fractional weight (hand-made).
fn padded_evidence(order: usize) -> Evidence {
    let words: [(&[u32], f64); 5] = [(&[0, 1, 2, 3], 0.7), (&[0, 1, 2, 3], 0.3), (&[1, 1, 0, 2, 3], 1.0), (&[2, 0, 3], 0.45), (&[0, 2, 1, 1, 2, 0, 3], 2.2)];
    let mut e = Evidence::default();
    for (word, weight) in words {
        let mut h = start_history(order);
        for &q in word {
            e.entry(key_of(&h, order, q)).or_default().add(&Count::from_expected(weight));
            h = push_history(&h, order, q);
        }
    }
    e
}

#[test]
fn high_order_fractional_distributions_sum_to_one() {
    // Every conditional distribution of an interpolated model sums to 1 over the
    // vocabulary (Kneser & Ney 1995), here at order 5 with fractional evidence, padded word
    // starts, discounts above 1 and different discounts per evidence class (Chen &
    // Goodman 1998); and the back-off form returns the interpolated value.
    let order = 5;
    let e = padded_evidence(order);
    let by_class = vec![Discount([0.2, 0.9, 1.7]); order];
    for discounts in [flat(&[0.3, 0.5, 0.7, 0.8, 0.9]), flat(&[0.1, 1.5, 0.2, 2.5, 0.6]), by_class] {
        let m = NgramModel::estimate(&e, &discounts, 4);
        let mut histories: Vec<History> = e.keys().map(|k| history_of(k, order - 1)).collect();
        histories.push(history_of(&[2, 2, 2, 2, 0, NONE, NONE, NONE, NONE], order - 1));
        let keys: Vec<Key> = histories.iter().flat_map(|h| (0..4).map(|q| key_of(h, order, q))).collect();
        let (levels, chains) = Levels::derive(&e, &discounts, &keys);
        for (hi, h) in histories.into_iter().enumerate() {
            let ctx = m.context(&h[..order - 1]);
            let total: f64 = (0..4).map(|q| f64::from(m.log_prob(ctx, q)).exp()).sum();
            assert!((total - 1.0).abs() < 1e-5, "history {h:?}: sum {total} with {discounts:?}");
            for q in 0..4 {
                let direct = levels.prob(&discounts, 4, &chains[hi * 4 + q as usize], order);
                let stored = f64::from(m.log_prob(ctx, q)).exp();
                assert!((direct - stored).abs() < 1e-5 * direct.max(1e-3), "{h:?} {q}: {direct} vs {stored}");
            }
        }
    }
}

#[test]
fn padded_word_starts_are_estimated_once() {
    // (S, S, S, S, 0) predicts the same event as (S, 0) (Kneser & Ney 1995 give `<s>`
    // n-grams no continuation counts): no stored history may start with two paddings, and
    // the start of a word is looked up in the one-padding context.
    let e = padded_evidence(5);
    let m = NgramModel::estimate(&e, &flat(&[0.3, 0.5, 0.7, 0.8, 0.9]), 4);
    assert!(m.contexts().iter().all(|c| !c.history.starts_with(&[START, START])));
    let h = start_history(5);
    assert_eq!(m.contexts()[m.context(&h[..4]) as usize - 1].history, [START]);
}

#[test]
fn group_bounds_hold_in_every_context() {
    // The bound of a symbol group is never below the true best member in any context.
    let e = padded_evidence(5);
    let m = NgramModel::estimate(&e, &[Discount([0.2, 0.9, 1.7]); 5], 4);
    for group in [vec![0], vec![1, 3], vec![0, 1, 2, 3]] {
        let bounds = m.group_bounds(&group);
        for ctx in 0..=m.contexts().len() as u32 {
            let best = group.iter().map(|&q| m.log_prob(ctx, q)).fold(f32::NEG_INFINITY, f32::max);
            assert!(bounds[ctx as usize] >= best - 1e-6, "context {ctx}, group {group:?}: {} < {best}", bounds[ctx as usize]);
        }
    }
}

#[test]
fn next_context_equals_a_full_lookup() {
    // The prefix closure makes the incremental context look-up exact: walk every sequence
    // of up to six symbols and compare with the look-up from the whole history.
    let order = 5;
    let e = padded_evidence(order);
    let m = NgramModel::estimate(&e, &[Discount([0.2, 0.9, 1.7]); 5], 4);
    let mut frontier = vec![(start_history(order), m.context(&start_history(order)[..order - 1]))];
    for _ in 0..6 {
        let mut next = Vec::new();
        for (h, ctx) in frontier {
            for q in 0..3 {
                let h2 = push_history(&h, order, q);
                let full = m.context(&h2[..order - 1]);
                assert_eq!(m.next_context(ctx, &h2[..order - 1]), full, "{h2:?}");
                next.push((h2, full));
            }
        }
        frontier = next;
    }
}

#[test]
fn expected_discounts_reduce_to_modified_kneser_ney_on_whole_counts() {
    // Zhang & Chiang 2014: on counts known for certain, the expected discount is Chen &
    // Goodman's D(c); on uncertain counts it is the discount averaged over the count's
    // distribution. Two words each holding the n-gram with probability 0.5 give counts
    // 0, 1, 2 with probabilities 1/4, 1/2, 1/4 (a binomial, worked by hand).
    let d = Discount([0.5, 1.0, 2.0]);
    let certain = |n: usize| {
        let mut c = Count::default();
        (0..n).for_each(|_| c.add(&Count::from_expected(1.0)));
        c
    };
    assert_eq!([1, 2, 3, 40].map(|n| d.moved(&certain(n))), [0.5, 1.0, 2.0, 2.0]);
    let mut c = Count::from_expected(0.5);
    c.add(&Count::from_expected(0.5));
    assert!((d.moved(&c) - (0.5 * 0.5 + 1.0 * 0.25)).abs() < 1e-12);
    // A single uncertain event loses the singleton discount in proportion to its chance.
    assert!((d.moved(&Count::from_expected(0.3)) - 0.15).abs() < 1e-12);
    // One word with an expected count of 1.5: two events of 0.75 each.
    let c = Count::from_expected(1.5);
    assert!((c.p[0] - 0.0625).abs() < 1e-12 && (c.p[1] - 0.375).abs() < 1e-12 && (c.p[2] - 0.5625).abs() < 1e-12);
}

#[test]
fn lower_orders_receive_the_discounted_mass() {
    // Symbol 2 follows 0 (one word, expected count 0.5) and 1 (one word, 3.5: four events
    // of 0.875, so counts 0..2 have probabilities 0.125⁴, 4·0.875·0.125³, 6·0.875²·0.125²
    // and 3 or more the rest), so with discounts (0.4, 0.6, 0.9) the unigram evidence of 2
    // is 0.4·0.5 + the expected discount of the second (worked by hand from the binomial).
    let e = bigram_evidence();
    let discounts = [Discount::flat(0.5), Discount([0.4, 0.6, 0.9])];
    let (levels, _) = Levels::derive(&e, &discounts, &[]);
    let first = &levels.levels[0];
    let unigram = |q: u32| first.keys.iter().position(|k| k[0] == q).map_or(Count::default(), |i| first.counts[i]);
    let (p, q) = (0.875f64, 0.125f64);
    let (p1, p2) = (4.0 * p * q.powi(3), 6.0 * p * p * q * q);
    let p3 = 1.0 - q.powi(4) - p1 - p2;
    let expected = 0.4 * 0.5 + (0.4 * p1 + 0.6 * p2 + 0.9 * p3);
    assert!((unigram(2).mean - expected).abs() < 1e-12, "{} vs {expected}", unigram(2).mean);
    // Symbol 0 follows START (one padding only, so it is discounted: a count of 3 loses
    // 0.9) and 1 (0.25, a single uncertain event: 0.4·0.25).
    assert!((unigram(0).mean - (0.9 + 0.1)).abs() < 1e-12);
}

#[test]
fn class_discounts_are_tuned_separately() {
    // Held-out evidence that repeats only the frequent training n-gram and adds an unseen
    // one: the best model discounts rare evidence more than frequent evidence, which one
    // flat discount cannot express, so tuning the classes must beat the best flat value.
    let mut e = Evidence::default();
    let mut held = Evidence::default();
    let key = |h: u32, q: u32| {
        let mut k = [NONE; MAX_ORDER];
        k[0] = h;
        k[1] = q;
        k
    };
    for q in 0..8 {
        e.insert(key(0, q), Count::from_expected(1.0));
    }
    e.insert(key(0, 8), Count::from_expected(30.0));
    held.insert(key(0, 8), Count::from_expected(30.0));
    held.insert(key(0, 9), Count::from_expected(3.0));
    let (_, flat_best) = (1..300).map(|i| f64::from(i) * 0.02).map(|d| (d, heldout_log_likelihood(&e, &held, &flat(&[0.5, d]), 10))).fold((0.0, f64::MIN), |a, b| if b.1 > a.1 { b } else { a });
    let (tuned, ll) = tune_discounts(&e, &held, &flat(&[0.5, 0.5]), 10, 20);
    assert!(ll > flat_best + 1e-3, "{ll} vs flat {flat_best}, {tuned:?}");
    assert!(tuned[1].0[0] >= 0.9, "singletons never recur, so they should pass down: {tuned:?}");
}

#[test]
fn tuning_improves_heldout_likelihood() {
    let e = bigram_evidence();
    let mut heldout = Evidence::default();
    let mut k = [NONE; MAX_ORDER];
    k[0] = 1;
    k[1] = 1;
    heldout.insert(k, Count::from_expected(1.0)); // an n-gram unseen in training: favours larger discounts
    let before = heldout_log_likelihood(&e, &heldout, &flat(&[0.05, 0.05]), 3);
    let (d, after) = tune_discounts(&e, &heldout, &flat(&[0.05, 0.05]), 3, 12);
    assert!(after > before, "{after} <= {before} with {d:?}");
}

#[test]
fn from_parts_rejects_bad_contexts() {
    let bad = StoredContext { history: vec![7], backoff: 0.0, entries: vec![] };
    assert!(NgramModel::from_parts(2, flat(&[0.5, 0.5]), vec![-1.0; 3], vec![bad]).is_err());
    let unsorted = StoredContext { history: vec![0], backoff: 0.0, entries: vec![(1, -1.0), (0, -1.0)] };
    assert!(NgramModel::from_parts(2, flat(&[0.5, 0.5]), vec![-1.0; 3], vec![unsorted]).is_err());
}
