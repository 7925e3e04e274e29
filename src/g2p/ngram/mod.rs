//! The n-gram model over graphone sequences: evidence (count distributions of n-grams from the
//! E-step), smoothing, discount tuning on held-out evidence, and the compact back-off form used
//! for look-ups. It owns no graphone spelling and no lattice; symbols are plain `u32` ids where
//! `0..vocab-1` are graphones and `vocab-1` is the end-of-word symbol.
//!
//! The code is split by who needs it: this file holds what both halves share (keys, histories,
//! the discounts stored in a model); [`model`] is the runtime half the decoder and the model
//! file need (the back-off model and its look-ups); [`estimate`] is the training-only half
//! (evidence, expected counts, smoothing into a model, discount tuning). The runtime half must
//! not depend on the training half.
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

mod estimate;
mod model;
#[cfg(test)]
mod tests;

pub use estimate::{merge_evidence, tune_discounts, Count, Evidence};
pub use model::{NgramError, NgramModel, StoredContext};

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

    /// Whether every discount is finite.
    pub(super) fn is_finite(&self) -> bool {
        self.0.iter().all(|d| d.is_finite())
    }
}
