//! The expectation step of joint-sequence training (Bisani & Ney 2008, section 3.2): for each
//! (spelling, pronunciation) pair, forward–backward over *all* segmentations into graphones
//! under the current n-gram model, giving n-gram evidence: each pair adds, for every n-gram, its
//! expected count in that pair as one word's count distribution (see `ngram::Count`), which the
//! smoothing's expected discounts need. With an order-1 model the lattice has one state per
//! (letter, phone) position and the sums are exact; for higher orders a state also carries the
//! graphone history, and each position keeps only its best states (beam on the forward score),
//! so the sums run over the surviving segmentations.
//! Runs in parallel over samples with rayon. Owns no smoothing and no decoding.

use rayon::prelude::*;

use super::graphone::Inventory;
use crate::support::hash::FastMap;
use super::ngram::{key_of, push_history, start_history, Count, Evidence, History, Key, NgramModel, MAX_HISTORY};

/// One training pair after interning: letter ids and phone ids.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Sample {
    /// Letter ids of the spelling.
    pub letters: Vec<u32>,
    /// Phone ids of one pronunciation variant.
    pub phones: Vec<u32>,
}

/// Pruning of the training lattice for models of order ≥ 2.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LatticeBeam {
    /// Most history states kept per (letter, phone) position.
    pub max_states: usize,
    /// States whose forward log-score is more than this below the position's best are dropped.
    pub log_beam: f64,
    /// Arc posteriors below this are not added to the evidence (evidence trimming).
    pub evidence_floor: f64,
}

impl Default for LatticeBeam {
    fn default() -> Self {
        LatticeBeam { max_states: 24, log_beam: 12.0, evidence_floor: 1e-4 }
    }
}

/// Result of one expectation pass.
#[derive(Debug, Default)]
pub struct Expectation {
    /// Evidence of the requested order.
    pub evidence: Evidence,
    /// Sum over aligned samples of `ln P(spelling, pronunciation)`.
    pub log_likelihood: f64,
    /// Samples with no segmentation into known graphones (skipped).
    pub unaligned: usize,
}

impl Expectation {
    fn merge(mut self, other: Expectation) -> Expectation {
        let (big, small) = if self.evidence.len() >= other.evidence.len() { (&mut self.evidence, other.evidence) } else {
            let mine = std::mem::replace(&mut self.evidence, other.evidence);
            (&mut self.evidence, mine)
        };
        super::ngram::merge_evidence(big, small);
        self.log_likelihood += other.log_likelihood;
        self.unaligned += other.unaligned;
        self
    }
}

/// `ln(e^a + e^b)` without overflow.
#[inline]
pub(crate) fn log_add(a: f64, b: f64) -> f64 {
    if a == f64::NEG_INFINITY {
        return b;
    }
    if b == f64::NEG_INFINITY {
        return a;
    }
    let (hi, lo) = if a > b { (a, b) } else { (b, a) };
    hi + (lo - hi).exp().ln_1p()
}

struct State {
    history: History,
    alpha: f64,
    beta: f64,
}

struct Arc {
    from: u32,
    to: u32,
    symbol: u32,
    log_prob: f64,
}

/// Reusable per-thread buffers of one lattice.
#[derive(Default)]
struct Lattice {
    states: Vec<State>,
    at: Vec<Vec<u32>>,
    lookup: FastMap<(u32, History), u32>,
    arcs: Vec<Arc>,
    finals: Vec<(u32, f64)>,
    candidates: Vec<(u32, usize, usize)>,
    /// Expected count of each n-gram in the current sample.
    word: FastMap<Key, f64>,
}

/// Shape of the lattice: which graphone lengths exist and the order of the evidence.
#[derive(Clone, Copy)]
struct Shape {
    max_letters: usize,
    max_phones: usize,
    order: usize,
    end: u32,
}

impl Lattice {
    fn state(&mut self, pos: u32, history: History) -> u32 {
        let next = self.states.len() as u32;
        let id = *self.lookup.entry((pos, history)).or_insert(next);
        if id == next {
            self.states.push(State { history, alpha: f64::NEG_INFINITY, beta: f64::NEG_INFINITY });
            self.at[pos as usize].push(id);
        }
        id
    }

    /// Forward pass with pruning; returns `ln Z` (−∞ if no segmentation survives).
    fn forward(&mut self, sample: &Sample, inventory: &Inventory, model: &NgramModel, shape: Shape, beam: &LatticeBeam) -> f64 {
        let (n, m) = (sample.letters.len(), sample.phones.len());
        let width = m + 1;
        self.states.clear();
        self.lookup.clear();
        self.arcs.clear();
        self.finals.clear();
        self.at.iter_mut().for_each(Vec::clear);
        self.at.resize_with((n + 1) * width, Vec::new);
        let s0 = self.state(0, start_history(shape.order));
        self.states[s0 as usize].alpha = 0.0;
        let hist_len = shape.order - 1;
        let mut log_z = f64::NEG_INFINITY;
        let mut ids: Vec<u32> = Vec::new();
        for i in 0..=n {
            for j in 0..=m {
                let pos = i * width + j;
                ids.clear();
                ids.extend_from_slice(&self.at[pos]);
                if ids.is_empty() {
                    continue;
                }
                ids.sort_by(|&a, &b| self.states[b as usize].alpha.total_cmp(&self.states[a as usize].alpha));
                let best = self.states[ids[0] as usize].alpha;
                let keep = ids.iter().take(beam.max_states).take_while(|&&s| self.states[s as usize].alpha >= best - beam.log_beam).count();
                ids.truncate(keep.max(1));
                self.candidates.clear();
                for a in 0..=shape.max_letters.min(n - i) {
                    for b in 0..=shape.max_phones.min(m - j) {
                        if a + b == 0 {
                            continue;
                        }
                        if let Some(g) = inventory.lookup(&sample.letters[i..i + a], &sample.phones[j..j + b]) {
                            self.candidates.push((g, a, b));
                        }
                    }
                }
                let is_final = i == n && j == m;
                for &s in &ids {
                    let (history, alpha) = {
                        let st = &self.states[s as usize];
                        (st.history, st.alpha)
                    };
                    let ctx = model.context(&history[..hist_len]);
                    if is_final {
                        let lp = f64::from(model.log_prob(ctx, shape.end));
                        self.finals.push((s, lp));
                        log_z = log_add(log_z, alpha + lp);
                        continue;
                    }
                    for c in 0..self.candidates.len() {
                        let (g, a, b) = self.candidates[c];
                        let lp = f64::from(model.log_prob(ctx, g));
                        let target = ((i + a) * width + j + b) as u32;
                        let t = self.state(target, push_history(&history, shape.order, g));
                        let st = &mut self.states[t as usize];
                        st.alpha = log_add(st.alpha, alpha + lp);
                        self.arcs.push(Arc { from: s, to: t, symbol: g, log_prob: lp });
                    }
                }
            }
        }
        log_z
    }

    /// Backward pass and evidence collection for a lattice whose forward pass gave `log_z`:
    /// the expected count of every n-gram in this sample is added to `evidence` as one
    /// word's count distribution (see [`Count::from_expected`]).
    fn collect(&mut self, log_z: f64, shape: Shape, floor: f64, evidence: &mut Evidence) {
        self.word.clear();
        for &(s, lp) in &self.finals {
            let st = &mut self.states[s as usize];
            st.beta = lp;
            let post = (st.alpha + lp - log_z).exp();
            if post >= floor {
                *self.word.entry(key_of(&st.history, shape.order, shape.end)).or_insert(0.0) += post;
            }
        }
        for arc in self.arcs.iter().rev() {
            let beta_t = self.states[arc.to as usize].beta;
            if beta_t == f64::NEG_INFINITY {
                continue;
            }
            let from = &mut self.states[arc.from as usize];
            from.beta = log_add(from.beta, arc.log_prob + beta_t);
            let post = (from.alpha + arc.log_prob + beta_t - log_z).exp();
            if post >= floor {
                *self.word.entry(key_of(&from.history, shape.order, arc.symbol)).or_insert(0.0) += post;
            }
        }
        for (key, &e) in &self.word {
            evidence.entry(*key).or_default().add(&Count::from_expected(e));
        }
    }
}

/// Runs the expectation step over `samples`, collecting evidence of `order` (1..=model order+1)
/// under `model`; graphones are looked up in `inventory`, whose size is the end symbol's id.
pub fn expectation(samples: &[Sample], inventory: &Inventory, model: &NgramModel, order: usize, beam: &LatticeBeam) -> Expectation {
    let shape = Shape {
        max_letters: inventory.max_letters(),
        max_phones: inventory.max_phones(),
        order: order.clamp(1, MAX_HISTORY + 1),
        end: inventory.len() as u32,
    };
    let chunk = (samples.len() / (4 * rayon::current_num_threads().max(1))).max(64);
    samples
        .par_iter()
        .with_min_len(chunk)
        .fold(
            || (Lattice::default(), Expectation::default()),
            |(mut lattice, mut acc), sample| {
                let log_z = lattice.forward(sample, inventory, model, shape, beam);
                if log_z.is_finite() {
                    lattice.collect(log_z, shape, beam.evidence_floor, &mut acc.evidence);
                    acc.log_likelihood += log_z;
                } else {
                    acc.unaligned += 1;
                }
                (lattice, acc)
            },
        )
        .map(|(_, acc)| acc)
        .reduce(Expectation::default, Expectation::merge)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::g2p::ngram::{MAX_ORDER, NONE};

    fn unigram_key(g: u32) -> [u32; MAX_ORDER] {
        let mut k = [NONE; MAX_ORDER];
        k[0] = g;
        k
    }

    /// Hand-checkable E-step. Letters {a=0, b=1}, phones {A=0, B=1}; one sample "ab" → A B;
    /// all 8 graphones with at most one letter and one phone, plus the end symbol: 9 symbols,
    /// each with probability 1/9 under the uniform model. A segmentation into k graphones then
    /// has probability (1/9)^(k+1) (the +1 is the end symbol).
    /// The segmentations are the monotone paths from (0,0) to (2,2) with steps (1,0) letter:ε,
    /// (0,1) ε:phone and (1,1) letter:phone. With d diagonal steps a path has 4−d steps and
    /// there are 1 (d=2), 3!/(1!1!1!) = 6 (d=1) and 4!/(2!2!) = 6 (d=0) paths, so
    /// Z = 9^-3 + 6·9^-4 + 6·9^-5.
    /// The paths through a:A are a:A followed by a path from (1,1) to (2,2): b:B (2 graphones
    /// in all) or b:ε ε:B / ε:B b:ε (3 graphones), so E[a:A] = (9^-3 + 2·9^-4) / Z.
    #[test]
    fn uniform_posterior_of_diagonal_graphone() {
        let mut inv = Inventory::default();
        for l in [vec![], vec![0], vec![1]] {
            for p in [vec![], vec![0], vec![1]] {
                if !(l.is_empty() && p.is_empty()) {
                    inv.intern(&l, &p);
                }
            }
        }
        assert_eq!(inv.len(), 8);
        let model = NgramModel::uniform(9);
        let sample = Sample { letters: vec![0, 1], phones: vec![0, 1] };
        let beam = LatticeBeam { evidence_floor: 0.0, ..LatticeBeam::default() };
        let e = expectation(std::slice::from_ref(&sample), &inv, &model, 1, &beam);
        let p = 1.0f64 / 9.0;
        let z = p.powi(3) + 6.0 * p.powi(4) + 6.0 * p.powi(5);
        assert!((e.log_likelihood - z.ln()).abs() < 1e-5, "{} vs {}", e.log_likelihood, z.ln());
        let a_a = inv.lookup(&[0], &[0]).map(unigram_key);
        let expected = (p.powi(3) + 2.0 * p.powi(4)) / z;
        let got = a_a.and_then(|k| e.evidence.get(&k)).map_or(0.0, |c| c.mean);
        assert!((got - expected).abs() < 1e-5, "{got} vs {expected}");
        // The end symbol is used exactly once per aligned sample.
        let end = e.evidence.get(&unigram_key(8)).map_or(0.0, |c| c.mean);
        assert!((end - 1.0).abs() < 1e-9);
    }

    /// Two words sharing a letter: "a" → A and "aa" → A A. After one EM step from uniform,
    /// the graphone a:A must gain the most evidence of all graphones (it is used by the only
    /// one-graphone segmentation of "a" and by the only two-graphone one of "aa").
    #[test]
    fn em_prefers_consistent_graphone() {
        let mut inv = Inventory::default();
        for (l, p) in [(vec![0], vec![0]), (vec![0], vec![]), (vec![], vec![0])] {
            inv.intern(&l, &p);
        }
        let samples = vec![Sample { letters: vec![0], phones: vec![0] }, Sample { letters: vec![0, 0], phones: vec![0, 0] }];
        let beam = LatticeBeam { evidence_floor: 0.0, ..LatticeBeam::default() };
        let e = expectation(&samples, &inv, &NgramModel::uniform(4), 1, &beam);
        let get = |g: u32| e.evidence.get(&unigram_key(g)).map_or(0.0, |c| c.mean);
        assert!(get(0) > get(1) && get(0) > get(2));
        // Total graphone evidence equals the expected number of graphones; end once per word.
        assert!((get(3) - 2.0).abs() < 1e-9);
    }
}
