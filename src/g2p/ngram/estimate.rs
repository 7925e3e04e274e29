//! The training-only half of the n-gram code: the evidence of n-grams as count distributions
//! (expected counts from the E-step), interpolated modified Kneser–Ney smoothing of that
//! evidence into a back-off [`NgramModel`], and the tuning of the discounts on held-out
//! evidence. The formulas and their sources are in the parent module's documentation. A
//! decoder never needs this file; it must not be needed to load or run a model.

use rayon::prelude::*;

use super::model::Entry;
use super::{Discount, History, Key, NgramModel, StoredContext, DISCOUNT_CLASSES, MAX_HISTORY, MAX_ORDER, NONE, START};
use crate::support::hash::FastMap;

/// The evidence of one n-gram: a distribution over its count rather than a single fractional
/// count (Zhang & Chiang, "Kneser-Ney smoothing on expected counts", ACL 2014). Each
/// training word adds the n-gram's expected count in that word as independent events (see
/// [`Count::from_expected`]); the sum over words is kept as the mean and the probabilities
/// that the count is exactly 0, 1 or 2, which is all modified Kneser–Ney needs.
///
/// ```
/// use orthoepy::g2p::Count;
/// let mut c = Count::from_expected(0.5);
/// c.add(&Count::from_expected(0.5));
/// assert_eq!(c.mean, 1.0);
/// assert_eq!(c.p, [0.25, 0.5, 0.25]); // two coin flips
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Count {
    /// Expected count.
    pub mean: f64,
    /// Probabilities that the count is 0, 1 and 2.
    pub p: [f64; 3],
}

impl Default for Count {
    fn default() -> Self {
        Count { mean: 0.0, p: [1.0, 0.0, 0.0] }
    }
}

impl Count {
    /// One word's expected count `e` of an n-gram: a single event of probability `e` when
    /// `e ≤ 1`, otherwise `⌈e⌉` independent events of probability `e/⌈e⌉` each (an n-gram that
    /// can occur more than once in a word).
    ///
    /// ```
    /// use orthoepy::g2p::Count;
    /// assert_eq!(Count::from_expected(0.25).p, [0.75, 0.25, 0.0]);
    /// let twice = Count::from_expected(2.0); // certainly seen twice
    /// assert_eq!((twice.mean, twice.p), (2.0, [0.0, 0.0, 1.0]));
    /// ```
    pub fn from_expected(e: f64) -> Count {
        let e = e.max(0.0);
        if e <= 1.0 {
            return Count { mean: e, p: [1.0 - e, e, 0.0] };
        }
        let n = e.ceil();
        let (p, q) = (e / n, 1.0 - e / n);
        let q2 = q.powi(n as i32 - 2);
        Count { mean: e, p: [q2 * q * q, n * p * q2 * q, n * (n - 1.0) / 2.0 * p * p * q2] }
    }

    /// Adds an independent count (the distributions are convolved).
    ///
    /// ```
    /// use orthoepy::g2p::Count;
    /// let mut c = Count::from_expected(1.0); // seen once for certain
    /// c.add(&Count::from_expected(0.25));
    /// assert_eq!((c.mean, c.p), (1.25, [0.0, 0.75, 0.25]));
    /// ```
    pub fn add(&mut self, other: &Count) {
        let [a0, a1, a2] = self.p;
        let [b0, b1, b2] = other.p;
        self.p = [a0 * b0, a1 * b0 + a0 * b1, a2 * b0 + a1 * b1 + a0 * b2];
        self.mean += other.mean;
    }

    /// Probabilities of the three discount classes: count 1, count 2, count 3 or more.
    fn classes(&self) -> [f64; DISCOUNT_CLASSES] {
        let [p0, p1, p2] = self.p;
        [p1, p2, (1.0 - p0 - p1 - p2).max(0.0)]
    }
}

/// The evidence of every n-gram of one order (all keys have the same length).
pub type Evidence = FastMap<Key, Count>;

/// Adds `other` into `into`.
pub fn merge_evidence(into: &mut Evidence, other: Evidence) {
    for (k, v) in other {
        into.entry(k).or_default().add(&v);
    }
}

impl Discount {
    /// The expected mass moved from an n-gram with count distribution `c` to the lower order,
    /// never more than its expected count.
    #[inline]
    pub fn moved(&self, c: &Count) -> f64 {
        let q = c.classes();
        (self.0[0] * q[0] + self.0[1] * q[1] + self.0[2] * q[2]).min(c.mean)
    }
}

fn drop_oldest(key: &Key) -> Key {
    let mut k = [NONE; MAX_ORDER];
    k[..MAX_ORDER - 1].copy_from_slice(&key[1..]);
    k
}

pub(super) fn history_of(key: &Key, len: usize) -> History {
    let mut h = [NONE; MAX_HISTORY];
    h[..len].copy_from_slice(&key[..len]);
    h
}

/// Whether an n-gram starts with two start paddings: it is then the same event as the
/// n-gram one shorter (the padding only fills the history), so it is estimated once, at the
/// shortest order that holds it (see the module docs).
fn padded(key: &Key) -> bool {
    key[0] == START && key[1] == START
}

/// One order's evidence in flat form: its n-grams in a fixed order, their counts, and by
/// index the n-gram one order lower and the history of each, so that re-deriving the lower
/// orders under new discounts (done many times while tuning) needs no hashing.
#[derive(Default)]
pub(super) struct Level {
    pub(super) keys: Vec<Key>,
    pub(super) counts: Vec<Count>,
    /// Per n-gram: index in the level below of the n-gram without its oldest symbol.
    lower: Vec<u32>,
    /// Per n-gram: index of its history in `totals`; [`NONE`] for padded n-grams.
    history: Vec<u32>,
    /// Per history: `(T(h), Σ_q D(c(h,q)))`, both expectations.
    totals: Vec<(f64, f64)>,
}

/// Where the model finds an n-gram of the top order and each of its suffixes: per order `j`
/// (slot `j-1`), the index of the suffix of length `j` in that level and the index of the
/// suffix's history, each [`NONE`] where the level does not hold it.
type Chain = [(u32, u32); MAX_ORDER];

/// Evidence of every order derived from the top order, plus per-history totals
/// (`levels[k-1]` is order `k`).
pub(super) struct Levels {
    pub(super) levels: Vec<Level>,
}

impl Levels {
    /// Derives the lower orders from `top` (evidence of order `discounts.len()`, see module
    /// docs) and returns the chains of the top-order n-grams `lookups`.
    pub(super) fn derive(top: &Evidence, discounts: &[Discount], lookups: &[Key]) -> (Levels, Vec<Chain>) {
        let order = discounts.len();
        let mut levels: Vec<Level> = (0..order).map(|_| Level::default()).collect();
        let mut histories: Vec<FastMap<History, u32>> = vec![FastMap::default(); order];
        levels[order - 1].keys = top.keys().copied().collect();
        levels[order - 1].counts = top.values().copied().collect();
        for k in (1..=order).rev() {
            let (below, here) = levels.split_at_mut(k - 1);
            let level = &mut here[0];
            let map = &mut histories[k - 1];
            level.history = level
                .keys
                .iter()
                .map(|key| {
                    if padded(key) {
                        return NONE;
                    }
                    let next = map.len() as u32;
                    *map.entry(history_of(key, k - 1)).or_insert(next)
                })
                .collect();
            level.totals = vec![(0.0, 0.0); map.len()];
            if k > 1 {
                let lower = &mut below[k - 2];
                let mut index: FastMap<Key, u32> = FastMap::default();
                level.lower = level
                    .keys
                    .iter()
                    .map(|key| {
                        let short = drop_oldest(key);
                        *index.entry(short).or_insert_with(|| {
                            lower.keys.push(short);
                            (lower.keys.len() - 1) as u32
                        })
                    })
                    .collect();
                lower.counts = vec![Count::default(); lower.keys.len()];
            }
        }
        let chains = chains_of(&levels, &histories, lookups);
        let mut levels = Levels { levels };
        levels.rederive(discounts, order);
        (levels, chains)
    }

    /// Recomputes what the discounts of `changed` (1-based) and below determine: the evidence
    /// of every lower order and the totals of `changed` and below. Higher orders are kept, so
    /// tuning one order's discounts costs only the orders beneath it.
    fn rederive(&mut self, discounts: &[Discount], changed: usize) {
        for k in (2..=changed).rev() {
            let d = discounts[k - 1];
            let (below, here) = self.levels.split_at_mut(k - 1);
            let (upper, lower) = (&here[0], &mut below[k - 2]);
            lower.counts.iter_mut().for_each(|c| *c = Count::default());
            for ((c, &to), &history) in upper.counts.iter().zip(&upper.lower).zip(&upper.history) {
                let passed = if history == NONE { *c } else { Count::from_expected(d.moved(c)) };
                lower.counts[to as usize].add(&passed);
            }
        }
        for k in 1..=changed {
            let d = discounts[k - 1];
            let level = &mut self.levels[k - 1];
            level.totals.iter_mut().for_each(|t| *t = (0.0, 0.0));
            for (c, &history) in level.counts.iter().zip(&level.history) {
                if let Some(t) = level.totals.get_mut(history as usize) {
                    t.0 += c.mean;
                    t.1 += d.moved(c);
                }
            }
        }
    }

    /// The chain of the n-gram at `index` in order `k`: itself, then its suffixes.
    fn chain_of_entry(&self, k: usize, index: usize) -> Chain {
        let mut chain = [(NONE, NONE); MAX_ORDER];
        let mut i = index;
        for j in (1..=k).rev() {
            let level = &self.levels[j - 1];
            chain[j - 1] = (i as u32, level.history[i]);
            if j > 1 {
                i = level.lower[i] as usize;
            }
        }
        chain
    }

    /// Interpolated probability of the n-gram of length `n` whose chain is `chain`.
    pub(super) fn prob(&self, discounts: &[Discount], vocab: usize, chain: &Chain, n: usize) -> f64 {
        let mut p = 1.0 / vocab as f64;
        for (j, &(entry, history)) in chain.iter().enumerate().take(n) {
            let level = &self.levels[j];
            let Some(&(total, kept)) = level.totals.get(history as usize) else { continue };
            if total > 0.0 {
                let c = level.counts.get(entry as usize).copied().unwrap_or_default();
                p = (c.mean - discounts[j].moved(&c)) / total + kept / total * p;
            }
        }
        p
    }

    /// Log-likelihood of held-out evidence (chains of top-order n-grams with their expected
    /// counts), computed in parallel.
    fn log_likelihood(&self, heldout: &[(Chain, f64)], discounts: &[Discount], vocab: usize) -> f64 {
        let n = self.levels.len();
        heldout.par_iter().map(|(chain, mean)| mean * self.prob(discounts, vocab, chain, n).max(1e-300).ln()).sum()
    }
}

/// Finds the chains of the top-order n-grams `lookups` in `levels`, whose histories are
/// indexed by `histories`.
fn chains_of(levels: &[Level], histories: &[FastMap<History, u32>], lookups: &[Key]) -> Vec<Chain> {
    let n = levels.len();
    let mut chains = vec![[(NONE, NONE); MAX_ORDER]; lookups.len()];
    for j in 1..=n {
        let suffix = |key: &Key| {
            let mut sub = [NONE; MAX_ORDER];
            sub[..j].copy_from_slice(&key[n - j..n]);
            sub
        };
        let mut wanted: FastMap<Key, u32> = lookups.iter().map(|key| (suffix(key), NONE)).collect();
        for (i, key) in levels[j - 1].keys.iter().enumerate() {
            if let Some(slot) = wanted.get_mut(key) {
                *slot = i as u32;
            }
        }
        for (chain, key) in chains.iter_mut().zip(lookups) {
            let sub = suffix(key);
            let history = if padded(&sub) { None } else { histories[j - 1].get(&history_of(&sub, j - 1)) };
            chain[j - 1] = (wanted.get(&sub).copied().unwrap_or(NONE), history.copied().unwrap_or(NONE));
        }
    }
    chains
}

/// Derives the levels of `top` and the held-out n-grams ready to score: their chains with
/// their expected counts.
fn derive_for_scoring(top: &Evidence, heldout: &Evidence, discounts: &[Discount]) -> (Levels, Vec<(Chain, f64)>) {
    let (keys, means): (Vec<Key>, Vec<f64>) = heldout.iter().map(|(k, c)| (*k, c.mean)).unzip();
    let (levels, chains) = Levels::derive(top, discounts, &keys);
    (levels, chains.into_iter().zip(means).collect())
}

/// Log-likelihood of `heldout` evidence under the model smoothed from `top` with `discounts`.
#[cfg(test)]
pub(super) fn heldout_log_likelihood(top: &Evidence, heldout: &Evidence, discounts: &[Discount], vocab: usize) -> f64 {
    let (levels, scored) = derive_for_scoring(top, heldout, discounts);
    levels.log_likelihood(&scored, discounts, vocab)
}

/// Lowest and highest value tried for each discount class when tuning: a count of `r` is
/// never discounted by more than `r`, as in Kneser–Ney. (Wider ranges, up to 1.5, 2.5 and
/// 6.0, gave the same held-out likelihood and error on CMUdict, see BENCHMARKS.md.)
const DISCOUNT_RANGES: [(f64, f64); DISCOUNT_CLASSES] = [(0.02, 1.0), (0.02, 2.0), (0.02, 3.0)];

/// Tunes the discounts (one coordinate sweep, highest order first and within an order the
/// class of the largest counts first, golden-section search of `steps` evaluations each) to
/// maximise the held-out log-likelihood; returns the tuned discounts and that log-likelihood.
/// `initial.len()` is the order.
pub fn tune_discounts(top: &Evidence, heldout: &Evidence, initial: &[Discount], vocab: usize, steps: usize) -> (Vec<Discount>, f64) {
    let mut discounts: Vec<Discount> = initial.iter().map(|d| Discount(std::array::from_fn(|c| d.0[c].clamp(DISCOUNT_RANGES[c].0, DISCOUNT_RANGES[c].1)))).collect();
    if heldout.is_empty() {
        return (discounts, 0.0);
    }
    let (mut levels, heldout) = derive_for_scoring(top, heldout, &discounts);
    let phi = (5f64.sqrt() - 1.0) / 2.0;
    for k in (0..discounts.len()).rev() {
        for class in (0..DISCOUNT_CLASSES).rev() {
            let mut eval = |d: f64, ds: &mut Vec<Discount>| {
                ds[k].0[class] = d;
                levels.rederive(ds, k + 1);
                levels.log_likelihood(&heldout, ds, vocab)
            };
            let (mut lo, mut hi) = DISCOUNT_RANGES[class];
            let mut x1 = hi - phi * (hi - lo);
            let mut x2 = lo + phi * (hi - lo);
            let mut f1 = eval(x1, &mut discounts);
            let mut f2 = eval(x2, &mut discounts);
            for _ in 0..steps {
                if f1 > f2 {
                    hi = x2;
                    x2 = x1;
                    f2 = f1;
                    x1 = hi - phi * (hi - lo);
                    f1 = eval(x1, &mut discounts);
                } else {
                    lo = x1;
                    x1 = x2;
                    f1 = f2;
                    x2 = lo + phi * (hi - lo);
                    f2 = eval(x2, &mut discounts);
                }
            }
            discounts[k].0[class] = if f1 > f2 { x1 } else { x2 };
            levels.rederive(&discounts, k + 1);
        }
    }
    let ll = levels.log_likelihood(&heldout, &discounts, vocab);
    (discounts, ll)
}

impl NgramModel {
    /// Smooths `top` (evidence of order `discounts.len()`) into a model; see the module docs.
    pub fn estimate(top: &Evidence, discounts: &[Discount], vocab: usize) -> NgramModel {
        let order = discounts.len();
        let (levels, _) = Levels::derive(top, discounts, &[]);
        // Order 1 has one history, the empty one (index 0 once any unigram exists).
        let first = &levels.levels[0];
        let empty_history = if first.totals.is_empty() { NONE } else { 0 };
        let mut index_of = vec![NONE; vocab];
        for (i, key) in first.keys.iter().enumerate() {
            if let Some(slot) = index_of.get_mut(key[0] as usize) {
                *slot = i as u32;
            }
        }
        let unigram: Vec<f32> = index_of
            .iter()
            .map(|&entry| {
                let mut chain = [(NONE, NONE); MAX_ORDER];
                chain[0] = (entry, empty_history);
                (levels.prob(discounts, vocab, &chain, 1).max(1e-300).ln()) as f32
            })
            .collect();
        // Keyed by (order, history index): the history's symbols and its explicit entries.
        let mut by_history: FastMap<(usize, u32), (History, Vec<Entry>)> = FastMap::default();
        for k in 2..=order {
            let d = discounts[k - 1];
            let level = &levels.levels[k - 1];
            for (i, (key, c)) in level.keys.iter().zip(&level.counts).enumerate() {
                if c.mean - d.moved(c) <= 0.0 || level.history[i] == NONE {
                    continue;
                }
                let lp = levels.prob(discounts, vocab, &levels.chain_of_entry(k, i), k).max(1e-300).ln() as f32;
                by_history.entry((k, level.history[i])).or_insert_with(|| (history_of(key, k - 1), Vec::new())).1.push((key[k - 1], lp));
            }
        }
        let mut contexts: Vec<StoredContext> = by_history
            .into_iter()
            .map(|((k, index), (history, mut entries))| {
                entries.sort_by_key(|e| e.0);
                let (total, kept) = levels.levels[k - 1].totals[index as usize];
                let backoff = if total > 0.0 { (kept / total).max(1e-300).ln() as f32 } else { 0.0 };
                StoredContext { history: history[..k - 1].to_vec(), backoff, entries }
            })
            .collect();
        contexts.sort_by(|a, b| (a.history.len(), &a.history).cmp(&(b.history.len(), &b.history)));
        NgramModel::from_parts(order, discounts.to_vec(), unigram, contexts)
            .unwrap_or_else(|_| unreachable!("estimated model parts are valid by construction"))
    }
}
