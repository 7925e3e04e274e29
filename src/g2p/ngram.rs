//! The n-gram model over graphone sequences: evidence (count distributions of n-grams from the
//! E-step), smoothing, discount tuning on held-out evidence, and the compact back-off form used
//! for look-ups. It owns no graphone spelling and no lattice; symbols are plain `u32` ids where
//! `0..vocab-1` are graphones and `vocab-1` is the end-of-word symbol.
//!
//! Smoothing is interpolated modified Kneser–Ney on expected counts (Kneser & Ney, "Improved
//! backing-off for m-gram language modeling", ICASSP 1995; Chen & Goodman, "An empirical study
//! of smoothing techniques for language modeling", TR-10-98, Harvard, 1998, for the three
//! discounts per order; Zhang & Chiang, "Kneser-Ney smoothing on expected counts", ACL 2014,
//! for evidence that is uncertain). The E-step does not give an n-gram a count but a chance of
//! occurring in each word, so its count is a random variable; each n-gram keeps the expected
//! count `E[c]` and the probabilities of counts 0, 1 and 2 ([`Count`]). Each order has three
//! discounts `D₁, D₂, D₃₊` and an n-gram loses their expectation
//! `D(c) = D₁·P(c=1) + D₂·P(c=2) + D₃₊·P(c≥3)`. For a history `h` with total `T(h) = Σ_q E[c(h,q)]`:
//!
//! `p(q|h) = (E[c(h,q)] - D(c(h,q))) / T(h) + γ(h) · p(q|h')`, `γ(h) = Σ_q D(c(h,q)) / T(h)`,
//!
//! where `h'` drops the oldest graphone. The lower-order evidence is the mass the discounts
//! moved down: each `(x, h', q)` hands `(h', q)` an event of its own whose expected count is `D(c(x h', q))`,
//! so `E[c(h', q)] = Σ_x D(c(x h', q))`; for whole counts and `D ≤ 1` this is proportional to
//! the Kneser–Ney continuation count. (Measured on CMUdict, see BENCHMARKS.md: expected
//! continuation counts `Σ_x P(c(x h', q) ≥ 1)` in their place gave a worse held-out
//! likelihood and more word errors.) On counts known for certain, the discounts are those of
//! ordinary modified Kneser–Ney.
//!
//! Word starts: histories are padded with `order-1` start symbols, so an n-gram near the start
//! of a word such as `(S, S, S, a, b)` is the same event as `(S, a, b)`. Such padded n-grams
//! (two leading start symbols) are not estimated at their own order — they hand their whole
//! count down and form no history there — so each word-start event is smoothed once, at
//! the shortest order holding it, like the `<s>` n-grams of Kneser–Ney, which have no
//! continuation counts. (Counting them at every order discounts the same evidence again at
//! each level.) An n-gram `(S, a, b)` passes only its discounted mass to `(a, b)`, since `a`
//! also occurs after other graphones. The order-1 distribution is interpolated with the uniform
//! distribution over the vocabulary, so every symbol has non-zero probability and each
//! conditional distribution sums to one.

use rayon::prelude::*;

use crate::support::hash::FastMap;

/// Highest supported n-gram order.
pub const MAX_ORDER: usize = 9;
/// Longest history (graphones before the predicted one).
pub const MAX_HISTORY: usize = MAX_ORDER - 1;
/// Padding of unused slots in histories and keys.
pub const NONE: u32 = u32::MAX;
/// Start-of-word padding symbol inside histories.
pub const START: u32 = u32::MAX - 1;

/// An n-gram: `order-1` history symbols (oldest first), then the predicted symbol, then [`NONE`].
pub type Key = [u32; MAX_ORDER];
/// A history of up to [`MAX_HISTORY`] symbols (oldest first), padded with [`NONE`].
pub type History = [u32; MAX_HISTORY];

/// The start history of a model of `order`: `order-1` start symbols.
pub fn start_history(order: usize) -> History {
    let mut h = [NONE; MAX_HISTORY];
    for slot in h.iter_mut().take(order.saturating_sub(1)) {
        *slot = START;
    }
    h
}

/// Appends `symbol` to a full history of `order-1` symbols, dropping the oldest.
#[inline]
pub fn push_history(history: &History, order: usize, symbol: u32) -> History {
    let len = order.saturating_sub(1);
    let mut h = *history;
    if len > 0 {
        h.copy_within(1..len, 0);
        h[len - 1] = symbol;
    }
    h
}

/// The n-gram key of predicting `symbol` after a full history of a model of `order`.
#[inline]
pub fn key_of(history: &History, order: usize, symbol: u32) -> Key {
    let len = order.saturating_sub(1);
    let mut k = [NONE; MAX_ORDER];
    k[..len].copy_from_slice(&history[..len]);
    k[len] = symbol;
    k
}

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

/// Number of evidence classes with their own discount in each order.
pub const DISCOUNT_CLASSES: usize = 3;

/// The discounts of one order: for a count of 1, of 2 and of 3 or more (the three discounts
/// of modified Kneser–Ney, Chen & Goodman 1998). On a count distribution the discount is its
/// expectation, `D₁·P(c=1) + D₂·P(c=2) + D₃₊·P(c≥3)` (Zhang & Chiang 2014).
///
/// ```
/// use orthoepy::g2p::{Count, Discount};
/// let d = Discount([0.7, 1.1, 1.4]);
/// assert_eq!(d.moved(&Count::from_expected(1.0)), 0.7);
/// assert!((d.moved(&Count::from_expected(0.5)) - 0.35).abs() < 1e-12);
/// assert!((d.moved(&Count::from_expected(2.0)) - 1.1).abs() < 1e-12);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Discount(pub [f64; DISCOUNT_CLASSES]);

impl Discount {
    /// The same discount for every count class (plain absolute discounting).
    pub fn flat(d: f64) -> Discount {
        Discount([d; DISCOUNT_CLASSES])
    }

    /// The expected mass moved from an n-gram with count distribution `c` to the lower order,
    /// never more than its expected count.
    #[inline]
    pub fn moved(&self, c: &Count) -> f64 {
        let q = c.classes();
        (self.0[0] * q[0] + self.0[1] * q[1] + self.0[2] * q[2]).min(c.mean)
    }

    /// Whether every discount is finite.
    fn is_finite(&self) -> bool {
        self.0.iter().all(|d| d.is_finite())
    }
}

fn drop_oldest(key: &Key) -> Key {
    let mut k = [NONE; MAX_ORDER];
    k[..MAX_ORDER - 1].copy_from_slice(&key[1..]);
    k
}

fn history_of(key: &Key, len: usize) -> History {
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
struct Level {
    keys: Vec<Key>,
    counts: Vec<Count>,
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
struct Levels {
    levels: Vec<Level>,
}

impl Levels {
    /// Derives the lower orders from `top` (evidence of order `discounts.len()`, see module
    /// docs) and returns the chains of the top-order n-grams `lookups`.
    fn derive(top: &Evidence, discounts: &[Discount], lookups: &[Key]) -> (Levels, Vec<Chain>) {
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
    fn prob(&self, discounts: &[Discount], vocab: usize, chain: &Chain, n: usize) -> f64 {
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
fn heldout_log_likelihood(top: &Evidence, heldout: &Evidence, discounts: &[Discount], vocab: usize) -> f64 {
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

/// An explicit successor of a history: `(symbol, ln p)`.
type Entry = (u32, f32);

/// One stored history of the back-off model.
#[derive(Clone, Debug, PartialEq)]
pub struct StoredContext {
    /// The history symbols, oldest first (may start with [`START`]).
    pub history: Vec<u32>,
    /// Natural log of the back-off weight γ(h).
    pub backoff: f32,
    /// Explicit successors `(symbol, ln p)`, sorted by symbol.
    pub entries: Vec<(u32, f32)>,
}

#[derive(Clone, Debug)]
struct Node {
    backoff: f32,
    suffix: u32,
    first: u32,
    end: u32,
    /// History length.
    len: u8,
}

/// The smoothed n-gram model in back-off form: explicit probabilities for seen n-grams, and a
/// back-off weight per history. Context id 0 is the empty history (dense unigram table).
///
/// Besides the stored contexts, every proper prefix of a stored history is a context too (with
/// no entries and back-off weight 1, so it answers exactly as its longest stored suffix). With
/// that closure the context after one more symbol is a suffix of the previous context plus
/// that symbol, which lets [`NgramModel::next_context`] find it with one or two look-ups.
#[derive(Clone, Debug)]
pub struct NgramModel {
    order: usize,
    discounts: Vec<Discount>,
    unigram: Vec<f32>,
    contexts: Vec<StoredContext>,
    nodes: Vec<Node>,
    symbols: Vec<u32>,
    logps: Vec<f32>,
    index: FastMap<History, u32>,
}

/// Why a set of model parts does not form a valid model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum NgramError {
    /// The order is 0 or above [`MAX_ORDER`], or discounts do not match it.
    #[error("n-gram order {0} is not in 1..={MAX_ORDER} or does not match the discounts")]
    Order(usize),
    /// The unigram table is empty or holds a non-finite or positive log-probability.
    #[error("unigram table is empty or holds an invalid log-probability")]
    Unigram,
    /// A context is malformed.
    #[error("context {index}: {reason}")]
    InvalidContext {
        /// Position of the context in the list.
        index: usize,
        /// What is wrong.
        reason: &'static str,
    },
}

fn valid_logp(x: f32) -> bool {
    x.is_finite() && x <= 1e-4
}

impl NgramModel {
    /// The uniform model over `vocab` symbols, of order 1.
    pub fn uniform(vocab: usize) -> NgramModel {
        let lp = -(vocab.max(1) as f32).ln();
        NgramModel::from_parts(1, vec![Discount::flat(0.5)], vec![lp; vocab.max(1)], Vec::new())
            .unwrap_or_else(|_| unreachable!("uniform model parts are valid by construction"))
    }

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

    /// Assembles a model from stored parts, validating every field (used by the model file).
    pub fn from_parts(order: usize, discounts: Vec<Discount>, unigram: Vec<f32>, contexts: Vec<StoredContext>) -> Result<NgramModel, NgramError> {
        if order == 0 || order > MAX_ORDER || discounts.len() != order || discounts.iter().any(|d| !d.is_finite()) {
            return Err(NgramError::Order(order));
        }
        if unigram.is_empty() || !unigram.iter().all(|&x| valid_logp(x)) {
            return Err(NgramError::Unigram);
        }
        let vocab = unigram.len() as u32;
        let mut index = FastMap::default();
        let mut nodes = vec![Node { backoff: 0.0, suffix: 0, first: 0, end: 0, len: 0 }];
        let mut histories: Vec<History> = vec![[NONE; MAX_HISTORY]];
        let mut symbols = Vec::new();
        let mut logps = Vec::new();
        for (i, c) in contexts.iter().enumerate() {
            let bad = |reason| Err(NgramError::InvalidContext { index: i, reason });
            if c.history.is_empty() || c.history.len() >= order {
                return bad("history length must be in 1..order");
            }
            if c.history.iter().any(|&s| s >= vocab && s != START) {
                return bad("history symbol out of range");
            }
            if !(c.backoff.is_finite() && c.backoff <= 1e-4) {
                return bad("invalid back-off weight");
            }
            if c.entries.windows(2).any(|w| w[0].0 >= w[1].0) {
                return bad("entries not strictly sorted");
            }
            if c.entries.iter().any(|&(s, lp)| s >= vocab || !valid_logp(lp)) {
                return bad("entry symbol or log-probability invalid");
            }
            let mut h = [NONE; MAX_HISTORY];
            h[..c.history.len()].copy_from_slice(&c.history);
            if index.insert(h, (i + 1) as u32).is_some() {
                return bad("history repeated");
            }
            let first = symbols.len() as u32;
            for &(s, lp) in &c.entries {
                symbols.push(s);
                logps.push(lp);
            }
            nodes.push(Node { backoff: c.backoff, suffix: 0, first, end: symbols.len() as u32, len: c.history.len() as u8 });
            histories.push(h);
        }
        for c in &contexts {
            for len in 1..c.history.len() {
                let mut h = [NONE; MAX_HISTORY];
                h[..len].copy_from_slice(&c.history[..len]);
                if let std::collections::hash_map::Entry::Vacant(slot) = index.entry(h) {
                    slot.insert(nodes.len() as u32);
                    nodes.push(Node { backoff: 0.0, suffix: 0, first: 0, end: 0, len: len as u8 });
                    histories.push(h);
                }
            }
        }
        let mut model = NgramModel { order, discounts, unigram, contexts, nodes, symbols, logps, index };
        for (i, h) in histories.iter().enumerate().skip(1) {
            let len = model.nodes[i].len as usize;
            let suffix = model.longest_context(h, 1, len);
            model.nodes[i].suffix = suffix;
        }
        Ok(model)
    }

    fn longest_context(&self, history: &History, from: usize, len: usize) -> u32 {
        for start in from..len {
            let mut key = [NONE; MAX_HISTORY];
            key[..len - start].copy_from_slice(&history[start..len]);
            if let Some(&id) = self.index.get(&key) {
                return id;
            }
        }
        0
    }

    /// The context id to use after `history` (oldest first, any length): the longest suffix of
    /// its last `order-1` symbols that the model stores (0 = the empty history).
    #[inline]
    pub fn context(&self, history: &[u32]) -> u32 {
        self.longest_tail_context(history, MAX_HISTORY)
    }

    /// The longest stored context among the last `most` (and at most `order-1`) symbols of
    /// `history`.
    #[inline]
    fn longest_tail_context(&self, history: &[u32], most: usize) -> u32 {
        let take = history.len().min(self.order - 1).min(most).min(MAX_HISTORY);
        let mut arr = [NONE; MAX_HISTORY];
        arr[..take].copy_from_slice(&history[history.len() - take..]);
        self.longest_context(&arr, 0, take)
    }

    /// The context id after `history` (its last `order-1` symbols, newest last) when `previous`
    /// was the context id of the history one symbol shorter: the same as
    /// [`Self::context`]`(history)`, found from the longest candidate the prefix closure allows
    /// (one more symbol than `previous`) instead of from the whole history.
    #[inline]
    pub fn next_context(&self, previous: u32, history: &[u32]) -> u32 {
        let previous_len = self.nodes.get(previous as usize).map_or(0, |n| usize::from(n.len));
        self.longest_tail_context(history, previous_len + 1)
    }

    /// Natural-log probability of `symbol` in context `context` (ids from [`Self::context`]).
    #[inline]
    pub fn log_prob(&self, context: u32, symbol: u32) -> f32 {
        let mut acc = 0.0f32;
        let mut c = context as usize;
        loop {
            let Some(node) = self.nodes.get(c).filter(|_| c != 0) else {
                return acc + self.unigram.get(symbol as usize).copied().unwrap_or(f32::NEG_INFINITY);
            };
            let range = node.first as usize..node.end as usize;
            if let Ok(pos) = self.symbols[range.clone()].binary_search(&symbol) {
                return acc + self.logps[range.start + pos];
            }
            acc += node.backoff;
            c = node.suffix as usize;
        }
    }

    /// For every symbol, an upper bound of its log-probability in any context: the larger of
    /// its unigram value and its largest explicit value (back-off weights are ≤ 0).
    pub fn upper_bounds(&self) -> Vec<f32> {
        let mut bounds = self.unigram.clone();
        for (&s, &lp) in self.symbols.iter().zip(&self.logps) {
            if let Some(b) = bounds.get_mut(s as usize) {
                *b = b.max(lp);
            }
        }
        bounds
    }

    /// For every context id, an upper bound of the largest log-probability of any symbol of
    /// `set` in that context: the larger of the best explicit entry of `set` there and the
    /// back-off weight plus the bound of the suffix context (exact when no symbol of `set` is
    /// both explicit and best at the suffix). Lets a search skip a whole group of symbols,
    /// e.g. all phone insertions, with one comparison.
    pub fn group_bounds(&self, set: &[u32]) -> Vec<f32> {
        let mut member = vec![false; self.unigram.len()];
        for &s in set {
            if let Some(m) = member.get_mut(s as usize) {
                *m = true;
            }
        }
        let mut bounds = vec![f32::NEG_INFINITY; self.nodes.len()];
        bounds[0] = set.iter().filter_map(|&s| self.unigram.get(s as usize)).fold(f32::NEG_INFINITY, |a, &b| a.max(b));
        // Suffix contexts have shorter histories, so visiting by history length sees them first.
        let mut by_length: Vec<usize> = (1..self.nodes.len()).collect();
        by_length.sort_by_key(|&i| self.nodes[i].len);
        for i in by_length {
            let node = &self.nodes[i];
            let range = node.first as usize..node.end as usize;
            let explicit = self.symbols[range.clone()]
                .iter()
                .zip(&self.logps[range])
                .filter(|(&s, _)| member.get(s as usize).copied().unwrap_or(false))
                .fold(f32::NEG_INFINITY, |a, (_, &lp)| a.max(lp));
            bounds[i] = explicit.max(node.backoff + bounds[node.suffix as usize]);
        }
        bounds
    }

    /// Model order (history length + 1).
    pub fn order(&self) -> usize {
        self.order
    }

    /// The discounts of each order, lowest first.
    pub fn discounts(&self) -> &[Discount] {
        &self.discounts
    }

    /// The unigram log-probabilities.
    pub fn unigram(&self) -> &[f32] {
        &self.unigram
    }

    /// All stored contexts (for the model file).
    pub fn contexts(&self) -> &[StoredContext] {
        &self.contexts
    }

    /// Number of explicit n-grams of order ≥ 2.
    pub fn explicit_ngrams(&self) -> usize {
        self.symbols.len()
    }
}

#[cfg(test)]
mod tests {
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
}
