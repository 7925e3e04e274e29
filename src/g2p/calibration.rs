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
//! a rank group do not change. The model's maps are smoothed ([`IsotonicMap::fit_smoothed`]):
//! one knot per pooled block at its members' mean posterior, linear between them, since a
//! posterior is continuous and a wide block's lowest members are right less often than its
//! highest. The sources' maps are step functions ([`IsotonicMap::fit`]): the pooled block's
//! share right over the block's whole range of raw scores, linear only in the gaps between
//! blocks, because their features take few distinct values (one over a word's length) and
//! interpolating between block means would move a large block towards its neighbours' shares.
//!
//! **Sources without a model.** The hybrid guesser's rule-based sources (initialisms,
//! compounds, derivations, letter-to-sound rules) get a [`SourceCalibration`]: per source one
//! isotonic map, by the same method, from a feature of the candidate to P(right), fitted on the
//! same held-out words as the model's (the features are the guesser's, see
//! [`crate::g2p::hybrid`]). A source with fewer than [`MIN_SOURCE_OBSERVATIONS`] held-out
//! candidates gets no map and keeps its configured constant.
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
    /// // with share right 1/2 over raw scores 0.6 to 0.7.
    /// let map = IsotonicMap::fit(&[(0.2, false), (0.6, true), (0.7, false), (0.9, true)]).unwrap();
    /// let expected = [(0.2, 0.0), (0.6, 0.5), (0.7, 0.5), (0.9, 1.0)];
    /// assert_eq!(map.knots().len(), expected.len());
    /// for (&(x, y), (ex, ey)) in map.knots().iter().zip(expected) {
    ///     assert!((x - ex).abs() < 1e-12 && (y - ey).abs() < 1e-12, "{:?}", map.knots());
    /// }
    /// assert!((map.apply(0.65) - 0.5).abs() < 1e-12);
    /// assert!((map.apply(0.8) - 0.75).abs() < 1e-12); // linear in the gap between blocks
    /// ```
    pub fn fit(observations: &[(f64, bool)]) -> Option<IsotonicMap> {
        // The fitted function is the block's share right over the block's whole range of raw
        // scores: a knot at each end of the range (one for a block of equal scores).
        let mut knots: Vec<(f64, f64)> = Vec::new();
        for block in pooled_blocks(observations) {
            knots.push((block.lowest, block.share_right()));
            if block.highest > block.lowest {
                knots.push((block.highest, block.share_right()));
            }
        }
        IsotonicMap::from_knots(knots)
    }

    /// Fits by pool-adjacent-violators like [`fit`](Self::fit), but places one knot per block at
    /// the mean raw score of its members and interpolates linearly between block means, the
    /// smoothed isotonic map for a continuous raw score (a posterior): a wide block's lowest
    /// members, which are right less often than its highest in unseen data, are no longer all
    /// given the block's mean share. Use [`fit`](Self::fit) for a feature with few distinct
    /// values, where interpolating would move a block towards its neighbours' shares.
    ///
    /// ```
    /// use orthoepy::g2p::IsotonicMap;
    /// // Worked example: blocks {0.2: wrong}, {0.6: right, 0.7: wrong} (pooled, mean raw 0.65,
    /// // share 1/2) and {0.9: right}.
    /// let map = IsotonicMap::fit_smoothed(&[(0.2, false), (0.6, true), (0.7, false), (0.9, true)]).unwrap();
    /// assert_eq!(map.knots().len(), 3);
    /// assert!((map.apply(0.65) - 0.5).abs() < 1e-12);
    /// assert!((map.apply(0.6) - 0.5 * 0.4 / 0.45).abs() < 1e-12); // between 0.2 → 0 and 0.65 → 0.5
    /// assert_eq!(map.apply(0.1), 0.0);
    /// ```
    pub fn fit_smoothed(observations: &[(f64, bool)]) -> Option<IsotonicMap> {
        IsotonicMap::from_knots(pooled_blocks(observations).iter().map(|b| (b.raw_sum / b.count, b.share_right())).collect())
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

/// One block of pool-adjacent-violators: observations pooled because their shares right would
/// otherwise decrease with the raw score.
#[derive(Clone, Copy)]
struct Block {
    right: f64,
    count: f64,
    raw_sum: f64,
    lowest: f64,
    highest: f64,
}

impl Block {
    fn share_right(&self) -> f64 {
        self.right / self.count
    }
}

/// The blocks of pool-adjacent-violators (Zadrozny & Elkan 2002) over (raw score, right)
/// observations, raw score increasing; equal raw scores always share a block, so blocks never
/// overlap and their shares right strictly increase.
fn pooled_blocks(observations: &[(f64, bool)]) -> Vec<Block> {
    let mut sorted: Vec<(f64, bool)> = observations.iter().copied().filter(|(x, _)| x.is_finite()).collect();
    sorted.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut blocks: Vec<Block> = Vec::new();
    for (x, right) in sorted {
        let y = f64::from(u8::from(right));
        match blocks.last_mut() {
            Some(last) if last.highest == x => {
                last.right += y;
                last.count += 1.0;
                last.raw_sum += x;
            }
            _ => blocks.push(Block { right: y, count: 1.0, raw_sum: x, lowest: x, highest: x }),
        }
        while let [.., a, b] = blocks[..] {
            if a.share_right() < b.share_right() {
                break;
            }
            blocks.pop();
            if let Some(last) = blocks.last_mut() {
                *last = Block { right: a.right + b.right, count: a.count + b.count, raw_sum: a.raw_sum + b.raw_sum, lowest: a.lowest, highest: b.highest };
            }
        }
    }
    blocks
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
    /// have at least [`MIN_MODEL_OBSERVATIONS`] (the model's posteriors are then used as they are).
    pub fn fit(observations: &[(usize, f64, bool)]) -> Option<Calibration> {
        let group = |top: bool| observations.iter().filter(|o| (o.0 == 0) == top).map(|o| (o.1, o.2)).collect::<Vec<_>>();
        let (top, rest) = (group(true), group(false));
        if top.len() < MIN_MODEL_OBSERVATIONS || rest.len() < MIN_MODEL_OBSERVATIONS {
            return None;
        }
        Some(Calibration { top: IsotonicMap::fit_smoothed(&top)?, rest: IsotonicMap::fit_smoothed(&rest)? })
    }

    /// The calibrated probability of a hypothesis of 0-based `rank` with `posterior`.
    pub fn apply(&self, rank: usize, posterior: f64) -> f64 {
        if rank == 0 { &self.top } else { &self.rest }.apply(posterior)
    }

    /// The calibrated probabilities of one word's N-best list (`posteriors` best first): each
    /// hypothesis through the map of its rank, then made non-increasing down the list by pooling
    /// adjacent violators (the same PAV step as the fit, Zadrozny & Elkan 2002), so a hypothesis
    /// the model ranks lower is never scored above one it ranks higher. The two maps are fitted
    /// apart and can cross where one of them is thin (a second guess at posterior 0.45 read
    /// above a first guess at 0.50); pooling replaces each such run by its mean, which keeps the
    /// list's total and the model's order.
    ///
    /// ```
    /// use orthoepy::g2p::{Calibration, IsotonicMap};
    /// let top = IsotonicMap::from_knots(vec![(0.0, 0.0), (1.0, 0.8)]).unwrap();
    /// let rest = IsotonicMap::from_knots(vec![(0.0, 0.0), (1.0, 1.0)]).unwrap();
    /// let calibration = Calibration { top, rest };
    /// assert!((calibration.apply(0, 0.5) - 0.4).abs() < 1e-12);
    /// assert!((calibration.apply(1, 0.45) - 0.45).abs() < 1e-12); // above the first: crossed
    /// let list = calibration.apply_nbest(&[0.5, 0.45, 0.05]);
    /// assert!((list[0] - 0.425).abs() < 1e-12 && (list[1] - 0.425).abs() < 1e-12);
    /// assert!((list[2] - 0.05).abs() < 1e-12);
    /// ```
    pub fn apply_nbest(&self, posteriors: &[f64]) -> Vec<f64> {
        // Blocks of (sum, count), means non-increasing from left to right.
        let mut blocks: Vec<(f64, usize)> = Vec::with_capacity(posteriors.len());
        for (rank, &posterior) in posteriors.iter().enumerate() {
            blocks.push((self.apply(rank, posterior), 1));
            while let [.., (left_sum, left_count), (right_sum, right_count)] = blocks[..] {
                if left_sum / left_count as f64 >= right_sum / right_count as f64 {
                    break;
                }
                blocks.pop();
                if let Some(last) = blocks.last_mut() {
                    *last = (left_sum + right_sum, left_count + right_count);
                }
            }
        }
        blocks.into_iter().flat_map(|(sum, count)| std::iter::repeat(sum / count as f64).take(count)).collect()
    }
}

/// The fewest held-out hypotheses each of a model's two maps needs. An isotonic map fitted on a
/// few dozen words pools them into a handful of blocks whose shares are far from the truth at
/// the top (a map fitted on 29 held-out words of a 429-word lexicon read a wrong guess as a 0.96
/// chance); with 200, a block of 50 at p = 0.9 has a standard error of about 0.04.
pub const MIN_MODEL_OBSERVATIONS: usize = 200;

/// The fewest held-out candidates a source needs for a fitted map: below this the share right
/// has a standard error above 0.09 at p = 0.5 (√(0.25/30)), no better than the configured
/// constant it would replace.
pub const MIN_SOURCE_OBSERVATIONS: usize = 30;

/// One source's fitted map.
#[derive(Clone, Debug, PartialEq)]
pub struct SourceFit {
    /// The source's name (`initialism`, `compound`, `derivation`, `rules`).
    pub source: String,
    /// Held-out candidates the map was fitted on.
    pub observations: u32,
    /// Feature → probability right.
    pub map: IsotonicMap,
}

/// Calibration of rule-based candidate sources: one isotonic map per source, from a feature of
/// its candidate to the probability that the candidate is right.
///
/// ```
/// use orthoepy::g2p::SourceCalibration;
/// // 40 rule candidates: 30 with feature 0.5, 20 of them right; 10 with feature 0.25, all wrong.
/// let mut obs = vec![("rules", 0.5, true); 20];
/// obs.extend(vec![("rules", 0.5, false); 10]);
/// obs.extend(vec![("rules", 0.25, false); 10]);
/// obs.push(("compound", 1.0, true)); // one compound: too few to fit
/// let fitted = SourceCalibration::fit(&obs);
/// let rules = fitted.get("rules").unwrap();
/// assert_eq!(rules.observations, 40);
/// assert!((rules.map.apply(0.5) - 2.0 / 3.0).abs() < 1e-12);
/// assert!(fitted.get("compound").is_none());
/// ```
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SourceCalibration {
    fits: Vec<SourceFit>,
}

impl SourceCalibration {
    /// Fits a map per source on (source, feature, right) observations; sources with fewer than
    /// [`MIN_SOURCE_OBSERVATIONS`] get none.
    pub fn fit(observations: &[(&str, f64, bool)]) -> SourceCalibration {
        let mut names: Vec<&str> = observations.iter().map(|o| o.0).collect();
        names.sort_unstable();
        names.dedup();
        let fits = names
            .into_iter()
            .filter_map(|name| {
                let own: Vec<(f64, bool)> = observations.iter().filter(|o| o.0 == name).map(|o| (o.1, o.2)).collect();
                let map = IsotonicMap::fit(&own).filter(|_| own.len() >= MIN_SOURCE_OBSERVATIONS)?;
                Some(SourceFit { source: name.to_string(), observations: u32::try_from(own.len()).unwrap_or(u32::MAX), map })
            })
            .collect();
        SourceCalibration { fits }
    }

    /// A calibration from stored fits; `None` unless the source names are strictly increasing.
    pub fn from_fits(fits: Vec<SourceFit>) -> Option<SourceCalibration> {
        fits.windows(2).all(|w| w[0].source < w[1].source).then_some(SourceCalibration { fits })
    }

    /// The fits, by source name.
    pub fn fits(&self) -> &[SourceFit] {
        &self.fits
    }

    /// The fit of one source, if it has one.
    pub fn get(&self, source: &str) -> Option<&SourceFit> {
        self.fits.iter().find(|f| f.source == source)
    }

    /// True when no source has a fit.
    pub fn is_empty(&self) -> bool {
        self.fits.is_empty()
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
    fn many_equal_raw_scores_still_give_increasing_knots() {
        // A feature with few distinct values (one over a word's length): each value's map is
        // its own block's share right, not moved towards a neighbour's by interpolating
        // between block means.
        let mut obs: Vec<(f64, bool)> = (0..700).map(|i| (1.0 / 7.0, i % 3 == 0)).collect();
        obs.extend((0..700).map(|i| (1.0 / 6.0, i % 2 == 0)));
        obs.extend((0..500).map(|i| (0.125, i % 5 == 0)));
        let map = IsotonicMap::fit(&obs).expect("a map");
        assert_eq!(map.knots().len(), 3, "{:?}", map.knots());
        assert!((map.apply(1.0 / 6.0) - 0.5).abs() < 1e-12);
        assert!((map.apply(1.0 / 7.0) - 234.0 / 700.0).abs() < 1e-12);
        assert!((map.apply(0.125) - 0.2).abs() < 1e-12);
    }

    #[test]
    fn stored_knots_are_checked() {
        assert!(IsotonicMap::from_knots(vec![(0.5, 0.4), (0.5, 0.6)]).is_none());
        assert!(IsotonicMap::from_knots(vec![(0.1, 0.6), (0.5, 0.4)]).is_none());
        assert!(IsotonicMap::from_knots(vec![(0.1, 1.5)]).is_none());
        assert!(IsotonicMap::from_knots(Vec::new()).is_none());
    }
}
