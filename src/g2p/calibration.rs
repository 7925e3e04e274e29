//! Calibration of candidate scores: maps a raw score (a model's posterior) to the probability
//! that the candidate is right, with stress as written, and measures how well scores are
//! calibrated (reliability table, expected calibration error).
//!
//! **Method.** Isotonic regression fitted by pool-adjacent-violators (Zadrozny & Elkan,
//! "Transforming classifier scores into accurate multiclass probability estimates", KDD 2002),
//! one map per rank group: the top hypothesis of a word and the lower-ranked ones (a
//! hypothesis's rank changes what a given posterior means, since a second guess with posterior
//! 0.4 competes with a first guess of at least 0.4). Isotonic regression was chosen over Platt's
//! sigmoid (Platt 1999) because the measured miscalibration of the joint-sequence posterior is
//! not sigmoid-shaped (over-confident near 1, roughly right in the middle) and the held-out
//! part of a lexicon of any useful size has thousands of words, enough for a non-parametric fit
//! without over-fitting; it keeps the order of the scores (a monotone map), so rankings within
//! a rank group do not change. Between the fitted blocks the map interpolates linearly, so
//! distinct posteriors keep distinct scores.
//!
//! **Measure.** The reliability table puts scores in ten equal-width bins and compares each
//! bin's mean score with the share of right candidates in it; the expected calibration error is
//! the count-weighted mean of their absolute differences (Guo et al., "On calibration of modern
//! neural networks", ICML 2017).
//!
//! This module knows nothing about models or files; it only fits, applies and measures.

use serde::Serialize;

/// A monotone map from a raw score in 0..=1 to a probability, as (raw, calibrated) knots with
/// raw strictly increasing and calibrated non-decreasing.
#[derive(Clone, Debug, PartialEq)]
pub struct IsotonicMap {
    knots: Vec<(f64, f64)>,
}

impl IsotonicMap {
    /// Fits the map by pool-adjacent-violators on (raw score, right) observations. Returns
    /// `None` when there are no observations.
    ///
    /// ```
    /// use orthoepy::g2p::IsotonicMap;
    /// // A worked example: the violators 0.6 → right, 0.7 → wrong are pooled into one block
    /// // with share right 1/2 at raw score 0.65.
    /// let map = IsotonicMap::fit(&[(0.2, false), (0.6, true), (0.7, false), (0.9, true)]).unwrap();
    /// let expected = [(0.2, 0.0), (0.65, 0.5), (0.9, 1.0)];
    /// assert_eq!(map.knots().len(), expected.len());
    /// for (&(x, y), (ex, ey)) in map.knots().iter().zip(expected) {
    ///     assert!((x - ex).abs() < 1e-12 && (y - ey).abs() < 1e-12, "{:?}", map.knots());
    /// }
    /// assert!((map.apply(0.65) - 0.5).abs() < 1e-12);
    /// ```
    pub fn fit(observations: &[(f64, bool)]) -> Option<IsotonicMap> {
        let mut sorted: Vec<(f64, bool)> = observations.iter().copied().filter(|(x, _)| x.is_finite()).collect();
        sorted.sort_by(|a, b| a.0.total_cmp(&b.0));
        // Blocks of (sum of raw scores, right count, observations); equal raw scores start pooled.
        let mut blocks: Vec<(f64, f64, f64)> = Vec::new();
        for (x, right) in sorted {
            let y = f64::from(u8::from(right));
            match blocks.last_mut() {
                Some(last) if last.0 / last.2 == x => *last = (last.0 + x, last.1 + y, last.2 + 1.0),
                _ => blocks.push((x, y, 1.0)),
            }
            while blocks.len() >= 2 {
                let (b, a) = (blocks[blocks.len() - 1], blocks[blocks.len() - 2]);
                if a.1 / a.2 < b.1 / b.2 {
                    break;
                }
                blocks.pop();
                *blocks.last_mut()? = (a.0 + b.0, a.1 + b.1, a.2 + b.2);
            }
        }
        let knots: Vec<(f64, f64)> = blocks.iter().map(|&(sx, sy, n)| (sx / n, sy / n)).collect();
        IsotonicMap::from_knots(knots)
    }

    /// A map from stored knots; `None` unless there is at least one knot, every value is in
    /// 0..=1, raw scores strictly increase and calibrated ones do not decrease.
    pub fn from_knots(knots: Vec<(f64, f64)>) -> Option<IsotonicMap> {
        let in_range = |v: f64| (0.0..=1.0).contains(&v);
        let ordered = knots.windows(2).all(|w| w[0].0 < w[1].0 && w[0].1 <= w[1].1);
        (!knots.is_empty() && ordered && knots.iter().all(|&(x, y)| in_range(x) && in_range(y))).then_some(IsotonicMap { knots })
    }

    /// The (raw, calibrated) knots, raw score increasing.
    pub fn knots(&self) -> &[(f64, f64)] {
        &self.knots
    }

    /// The calibrated probability of a raw score: linear between knots, flat beyond the ends.
    pub fn apply(&self, raw: f64) -> f64 {
        let i = self.knots.partition_point(|k| k.0 < raw);
        match (i.checked_sub(1).and_then(|j| self.knots.get(j)), self.knots.get(i)) {
            (Some(&(x0, y0)), Some(&(x1, y1))) => y0 + (y1 - y0) * (raw - x0) / (x1 - x0),
            (None, Some(&(_, y))) | (Some(&(_, y)), None) => y,
            (None, None) => raw.clamp(0.0, 1.0),
        }
    }
}

/// Calibration of a model's N-best posteriors: one map for the top hypothesis, one for the
/// hypotheses below it.
#[derive(Clone, Debug, PartialEq)]
pub struct Calibration {
    /// Map for rank 0 (the best hypothesis).
    pub top: IsotonicMap,
    /// Map for ranks 1 and below.
    pub rest: IsotonicMap,
}

impl Calibration {
    /// Fits both maps on (rank, posterior, right) observations; `None` unless both rank groups
    /// have observations.
    pub fn fit(observations: &[(usize, f64, bool)]) -> Option<Calibration> {
        let group = |top: bool| observations.iter().filter(|o| (o.0 == 0) == top).map(|o| (o.1, o.2)).collect::<Vec<_>>();
        Some(Calibration { top: IsotonicMap::fit(&group(true))?, rest: IsotonicMap::fit(&group(false))? })
    }

    /// The calibrated probability of a hypothesis of 0-based `rank` with `posterior`.
    pub fn apply(&self, rank: usize, posterior: f64) -> f64 {
        if rank == 0 { &self.top } else { &self.rest }.apply(posterior)
    }
}

/// One bin of a reliability table.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct ReliabilityBin {
    /// Lower edge of the bin's score range.
    pub from: f64,
    /// Upper edge (the last bin includes 1).
    pub to: f64,
    /// Candidates with a score in the bin.
    pub count: usize,
    /// Their mean score (0 when empty).
    pub mean_score: f64,
    /// Share of them that are right (0 when empty).
    pub share_right: f64,
}

/// A reliability table with its expected calibration error (Guo et al. 2017).
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Reliability {
    /// Equal-width bins, lowest first.
    pub bins: Vec<ReliabilityBin>,
    /// Σ (bin count / total) · |mean score − share right|.
    pub expected_calibration_error: f64,
}

/// Number of equal-width bins in a reliability table (Guo et al. 2017 use fifteen for
/// networks; ten is the common choice for tables meant to be read).
pub const RELIABILITY_BINS: usize = 10;

/// The reliability table of (score, right) pairs over [`RELIABILITY_BINS`] equal-width bins.
///
/// ```
/// use orthoepy::g2p::reliability;
/// // Worked example: scores 0.95 (right) and 0.95 (wrong) share a bin whose mean score is 0.95
/// // and share right 0.5; 0.15 wrong is alone. ECE = 2/3·0.45 + 1/3·0.15 = 0.35.
/// let r = reliability(&[(0.95, true), (0.95, false), (0.15, false)]);
/// assert_eq!(r.bins[9].count, 2);
/// assert!((r.expected_calibration_error - 0.35).abs() < 1e-12);
/// ```
pub fn reliability(scored: &[(f64, bool)]) -> Reliability {
    let width = 1.0 / RELIABILITY_BINS as f64;
    let mut sums = vec![(0usize, 0.0f64, 0usize); RELIABILITY_BINS];
    for &(score, right) in scored {
        let bin = ((score.clamp(0.0, 1.0) / width) as usize).min(RELIABILITY_BINS - 1);
        let s = &mut sums[bin];
        *s = (s.0 + 1, s.1 + score, s.2 + usize::from(right));
    }
    let total = scored.len().max(1) as f64;
    let mut ece = 0.0;
    let bins = sums
        .iter()
        .enumerate()
        .map(|(i, &(count, sum, right))| {
            let n = count.max(1) as f64;
            let (mean_score, share_right) = (sum / n, right as f64 / n);
            ece += count as f64 / total * (mean_score - share_right).abs();
            ReliabilityBin { from: i as f64 * width, to: (i + 1) as f64 * width, count, mean_score, share_right }
        })
        .collect();
    Reliability { bins, expected_calibration_error: ece }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pooled_map_is_monotone_and_matches_block_shares() {
        // Pool-adjacent-violators (Zadrozny & Elkan 2002): the fitted values are the shares
        // right of the pooled blocks, non-decreasing in the raw score.
        let obs: Vec<(f64, bool)> = (0..100).map(|i| (i as f64 / 100.0, (i * 7919) % 10 < i / 10)).collect();
        let map = IsotonicMap::fit(&obs).unwrap();
        assert!(map.knots().windows(2).all(|w| w[0].1 <= w[1].1));
    }

    #[test]
    fn stored_knots_are_checked() {
        assert!(IsotonicMap::from_knots(vec![(0.5, 0.4), (0.5, 0.6)]).is_none());
        assert!(IsotonicMap::from_knots(vec![(0.1, 0.6), (0.5, 0.4)]).is_none());
        assert!(IsotonicMap::from_knots(vec![(0.1, 1.5)]).is_none());
        assert!(IsotonicMap::from_knots(Vec::new()).is_none());
    }
}
