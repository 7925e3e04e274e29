//! The `unlikely-pronunciation` check: entries that are well formed but probably wrong, found by
//! k-fold cross-validation (Stone, "Cross-validatory choice and assessment of statistical
//! predictions", 1974). The words are split into `k` folds by a hash of their normalised
//! spelling; for each fold a joint-sequence model is trained on the other folds (the project's
//! own training code, `g2p::train`) and every entry of the fold is scored under a model that
//! never saw its word. An entry is flagged when its listed pronunciation is far less likely than
//! the model's best guess for the word: the listed pronunciation's posterior (read from the
//! N-best list, or bounded above by the probability mass the N-best list leaves over) is at most
//! [`UnlikelyOptions::ratio`] times the best guess's, while the best guess is itself confident
//! (posterior at least [`UnlikelyOptions::min_best`]). The finding's message gives both as
//! calibrated probabilities of being right (the fold model's own calibration, fitted on words it
//! held out, so on the scale of every other score) beside their posteriors, and the best guess
//! as the suggestion. By default the models are trained and
//! compare without stress marks, so the check looks at the phones; stress is the stress checks'
//! job. Words with another listed pronunciation
//! equal to the best guess are left alone: a less likely variant beside the likely one is what
//! variants are.
//!
//! It trains `k` models, so it runs only when asked (`audit --checks unlikely-pronunciation` or
//! `audit --model-check`). Results are cached per fold beside the lexicon, keyed by a
//! fingerprint of the training data and the options, so a run that is stopped resumes with the
//! folds already done and an unchanged lexicon is not trained on again.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use rayon::prelude::*;
use serde::{Deserialize, Serialize};

use super::{Check, Context, Finding, Severity};
use crate::g2p::{train, training_pairs, DecodeOptions, TrainError, TrainOptions};
use crate::lexicon::{normalize_key, Entry, HeadwordPolicy};
use crate::support::hash::{fnv1a_64, fnv1a_64_continue};

/// The check's id, as `--checks` and reports name it.
pub const UNLIKELY_PRONUNCIATION: &str = "unlikely-pronunciation";

/// How the cross-validation runs and when an entry is flagged.
#[derive(Debug, Clone)]
pub struct UnlikelyOptions {
    /// Number of folds (at least 2).
    pub folds: u32,
    /// Hypotheses decoded per word.
    pub nbest: usize,
    /// Flag when the listed pronunciation's posterior is at most this times the best guess's.
    pub ratio: f64,
    /// Flag only when the best guess's posterior is at least this.
    pub min_best: f64,
    /// Training settings of the fold models.
    pub train: TrainOptions,
}

impl Default for UnlikelyOptions {
    fn default() -> Self {
        // Stress is stripped for the fold models: on a CMUdict slice (tests/audit_unlikely.rs) a
        // model with stress flagged 5.6% of the untouched entries for 21.5% of the planted
        // errors, one without 3.8% for 32.3% (same thresholds); stress errors are the stress
        // checks' job. The thresholds are the best trade-off measured there.
        let symbols = crate::g2p::SymbolOptions { strip_stress: true, ..crate::g2p::SymbolOptions::default() };
        UnlikelyOptions { folds: 5, nbest: 10, ratio: 0.02, min_best: 0.6, train: TrainOptions { symbols, ..TrainOptions::default() } }
    }
}

/// Errors of the check.
#[derive(Debug, thiserror::Error)]
pub enum UnlikelyError {
    /// Fewer than two folds were asked for.
    #[error("cross-validation needs at least 2 folds, not {0}")]
    Folds(u32),
    /// A fold model could not be trained.
    #[error("cannot train the model for fold {fold}: {source}")]
    Train {
        /// The fold (1-based).
        fold: u32,
        /// Why.
        #[source]
        source: TrainError,
    },
}

/// What the model said about one entry.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
struct Scored {
    /// Index of the entry.
    entry: usize,
    /// The model's best guess.
    best: String,
    /// Its posterior.
    best_posterior: f64,
    /// The listed pronunciation's posterior, exact when it is in the N-best list.
    listed_posterior: f64,
    /// Whether `listed_posterior` is exact (`false`: an upper bound).
    exact: bool,
    /// The best guess's calibrated probability of being right (the fold model's calibration).
    best_chance: f64,
    /// The listed pronunciation's calibrated probability (an upper bound when not `exact`).
    listed_chance: f64,
    /// Whether the best guess is one of the word's listed pronunciations.
    best_is_listed: bool,
}

/// One fold's results as cached on disk.
#[derive(Debug, Serialize, Deserialize)]
struct FoldCache {
    fingerprint: u64,
    fold: u32,
    scored: Vec<Scored>,
}

/// Runs the check over `entries` (entries the training code would not use, such as rejected
/// or empty ones, are not scored). `cache` is a folder for the per-fold results (created if
/// missing; `None` keeps nothing); `progress(folds_done, folds)` is called as folds finish.
///
/// ```
/// use orthoepy::audit::{unlikely_pronunciations, UnlikelyOptions};
/// use orthoepy::g2p::TrainOptions;
/// use orthoepy::lexicon::{Entry, HeadwordPolicy};
/// let entries: Vec<Entry> = ["cat K AE1 T", "bat B AE1 T", "hat HH AE1 T", "mat M AE1 T", "rat R AE1 T",
///     "sat S AE1 T", "pat P AE1 T", "fat F AE1 T", "vat V AE1 T", "tat T AE1 T", "gat K IY1 Z"]
///     .iter().map(|l| { let (w, p) = l.split_once(' ').unwrap(); Entry::new(w, p) }).collect();
/// let opts = UnlikelyOptions { folds: 2, train: TrainOptions { order: 2, heldout_percent: 0, ..TrainOptions::default() }, ..UnlikelyOptions::default() };
/// let findings = unlikely_pronunciations(&entries, HeadwordPolicy::default(), &opts, None, &mut |_, _| {}).unwrap();
/// assert!(findings.iter().all(|f| f.check == "unlikely-pronunciation"));
/// ```
pub fn unlikely_pronunciations(
    entries: &[Entry],
    policy: HeadwordPolicy,
    opts: &UnlikelyOptions,
    cache: Option<&Path>,
    progress: &mut dyn FnMut(u32, u32),
) -> Result<Vec<Finding>, UnlikelyError> {
    if opts.folds < 2 {
        return Err(UnlikelyError::Folds(opts.folds));
    }
    let keys: Vec<String> = entries.iter().map(|e| normalize_key(e.word.trim(), &policy).into_owned()).collect();
    let fold_of = |i: usize| (fnv1a_64(keys[i].as_bytes()) % u64::from(opts.folds)) as u32;
    let usable: Vec<usize> = (0..entries.len()).filter(|&i| !training_pairs(std::slice::from_ref(&entries[i])).is_empty()).collect();
    let fingerprint = fingerprint(entries, &usable, opts);
    let mut scored: Vec<Scored> = Vec::new();
    progress(0, opts.folds);
    for fold in 0..opts.folds {
        let cached = cache.and_then(|dir| read_fold(dir, fingerprint, fold));
        let results = match cached {
            Some(results) => results,
            None => {
                let results = score_fold(entries, &usable, &keys, fold, &fold_of, opts)?;
                if let Some(dir) = cache {
                    // A cache that cannot be written only costs time on the next run.
                    let _ = write_fold(dir, fingerprint, fold, &results);
                }
                results
            }
        };
        scored.extend(results);
        progress(fold + 1, opts.folds);
    }
    Ok(findings(entries, scored, opts))
}

/// Trains on every fold but `fold` and scores the entries of `fold`.
fn score_fold(
    entries: &[Entry],
    usable: &[usize],
    keys: &[String],
    fold: u32,
    fold_of: &dyn Fn(usize) -> u32,
    opts: &UnlikelyOptions,
) -> Result<Vec<Scored>, UnlikelyError> {
    let training: Vec<Entry> = usable.iter().filter(|&&i| fold_of(i) != fold).map(|&i| entries[i].clone()).collect();
    let model = train(&training_pairs(&training), &opts.train, &mut |_| {})
        .map_err(|source| UnlikelyError::Train { fold: fold + 1, source })?;
    let symbols = model.symbol_options();
    let mut by_word: HashMap<&str, Vec<usize>> = HashMap::new();
    for &i in usable.iter().filter(|&&i| fold_of(i) == fold) {
        by_word.entry(keys[i].as_str()).or_default().push(i);
    }
    let mut words: Vec<(&str, Vec<usize>)> = by_word.into_iter().collect();
    words.sort();
    let search = DecodeOptions { nbest: opts.nbest, ..DecodeOptions::default() };
    let scored = words
        .par_iter()
        .flat_map_iter(|(_, ids)| {
            let guess = model.guess_with(&entries[ids[0]].word, &search);
            let hypotheses: Vec<(String, f64, f64)> = guess.hypotheses.iter().map(|h| (h.phones.join(" "), h.posterior, h.score)).collect();
            let left_over = (1.0 - hypotheses.iter().map(|(_, p, _)| p).sum::<f64>()).max(0.0);
            // A pronunciation below the list is at best the next rank with all the mass left over.
            let mut with_rest: Vec<f64> = hypotheses.iter().map(|(_, p, _)| *p).collect();
            with_rest.push(left_over);
            let rest_chance = model.calibrated_nbest(&with_rest).last().copied().unwrap_or(left_over);
            let listed = |i: usize| -> String {
                entries[i].phones().map(|p| symbols.phone(p)).filter(|p| !p.is_empty()).collect::<Vec<_>>().join(" ")
            };
            let all_listed: Vec<String> = ids.iter().map(|&i| listed(i)).collect();
            ids.iter()
                .zip(&all_listed)
                .filter_map(|(&i, mine)| {
                    let (best, best_posterior, best_chance) = hypotheses.first()?.clone();
                    let found = hypotheses.iter().find(|(p, _, _)| p == mine).map(|(_, q, chance)| (*q, *chance));
                    let best_is_listed = all_listed.contains(&best);
                    let (listed_posterior, listed_chance) = found.unwrap_or((left_over, rest_chance));
                    let exact = found.is_some();
                    Some(Scored { entry: i, best, best_posterior, listed_posterior, exact, best_chance, listed_chance, best_is_listed })
                })
                .collect::<Vec<_>>()
        })
        .collect();
    Ok(scored)
}

/// The findings for the scored entries, in entry order.
fn findings(entries: &[Entry], mut scored: Vec<Scored>, opts: &UnlikelyOptions) -> Vec<Finding> {
    scored.sort_by_key(|s| s.entry);
    scored
        .into_iter()
        .filter(|s| !s.best_is_listed && s.best_posterior >= opts.min_best && s.listed_posterior <= opts.ratio * s.best_posterior)
        .map(|s| {
            let entry = &entries[s.entry];
            let bound = if s.exact { "" } else { "at most " };
            let message = format!(
                "a model that never saw this word gives /{}/ a {:.2} chance of being right and the listed pronunciation {bound}{:.2} (posteriors {:.3} and {bound}{:.3}); check it",
                s.best, s.best_chance, s.listed_chance, s.best_posterior, s.listed_posterior
            );
            let mut finding = Finding::new(UNLIKELY_PRONUNCIATION, Severity::Warning, s.entry, entry, message);
            finding.suggestion = Some(s.best.into());
            finding
        })
        .collect()
}

/// A fingerprint of what the fold models depend on: the scored entries and the options.
fn fingerprint(entries: &[Entry], usable: &[usize], opts: &UnlikelyOptions) -> u64 {
    let mut h = fnv1a_64(format!("{}|{}|{:?}", opts.folds, opts.nbest, opts.train).as_bytes());
    for &i in usable {
        h = fnv1a_64_continue(h, entries[i].word.as_bytes());
        h = fnv1a_64_continue(h, b"\t");
        h = fnv1a_64_continue(h, entries[i].pronunciation.as_bytes());
        h = fnv1a_64_continue(h, b"\n");
    }
    h
}

/// The folder where the check caches its folds for the lexicon at `lexicon_path`: beside it, in
/// the index cache folder.
///
/// ```
/// use orthoepy::audit::unlikely_cache_folder;
/// let dir = unlikely_cache_folder(std::path::Path::new("/p/lexicon.csv"));
/// assert_eq!(dir, std::path::Path::new("/p/.orthoepy-index/lexicon.unlikely"));
/// ```
pub fn unlikely_cache_folder(lexicon_path: &Path) -> PathBuf {
    let stem = lexicon_path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_default();
    let folder = lexicon_path.parent().unwrap_or(Path::new("."));
    folder.join(crate::lexicon::CACHE_FOLDER).join(format!("{stem}.unlikely"))
}

fn fold_file(dir: &Path, fold: u32) -> PathBuf {
    dir.join(format!("unlikely-fold-{fold}.json"))
}

fn read_fold(dir: &Path, fingerprint: u64, fold: u32) -> Option<Vec<Scored>> {
    let bytes = crate::support::read::read_capped(&fold_file(dir, fold), crate::lexicon::MAX_LEXICON).ok()?;
    let cache: FoldCache = serde_json::from_slice(&bytes).ok()?;
    (cache.fingerprint == fingerprint && cache.fold == fold).then_some(cache.scored)
}

fn write_fold(dir: &Path, fingerprint: u64, fold: u32, scored: &[Scored]) -> std::io::Result<()> {
    std::fs::create_dir_all(dir)?;
    let bytes = serde_json::to_vec(&FoldCache { fingerprint, fold, scored: scored.to_vec() }).map_err(std::io::Error::other)?;
    crate::safe_io::atomic_write(&fold_file(dir, fold), &bytes, false)
}

/// The check as the audit runs it: the cross-validation runs in [`compute`](Self::compute)
/// (where it can fail and report progress), and [`Check::run`] hands its findings to the report.
#[derive(Debug, Clone)]
pub struct UnlikelyPronunciation {
    findings: Vec<Finding>,
}

impl UnlikelyPronunciation {
    /// Runs [`unlikely_pronunciations`] and keeps its findings for the report.
    pub fn compute(
        entries: &[Entry],
        policy: HeadwordPolicy,
        opts: &UnlikelyOptions,
        cache: Option<&Path>,
        progress: &mut dyn FnMut(u32, u32),
    ) -> Result<UnlikelyPronunciation, UnlikelyError> {
        Ok(UnlikelyPronunciation { findings: unlikely_pronunciations(entries, policy, opts, cache, progress)? })
    }
}

impl Check for UnlikelyPronunciation {
    fn id(&self) -> &'static str {
        UNLIKELY_PRONUNCIATION
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "well-formed pronunciations far less likely than a cross-validated model's guess"
    }
    fn run(&self, _context: &Context<'_>) -> Vec<Finding> {
        self.findings.clone()
    }
}
