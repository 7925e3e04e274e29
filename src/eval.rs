//! Held-out evaluation of pronunciation guessers: the deterministic word-level train/test
//! split, phone and word error rates (with and without stress), a breakdown by word length and
//! the most frequent phone confusions. Owns scoring only; the guesser is any function from a
//! word to its top pronunciation (e.g. [`crate::g2p::Model::guess`]).
//!
//! **Split.** A word's bucket is `FNV-1a-64(NFC(lowercase(word))) mod 100` (FNV-1a with the
//! standard 64-bit offset basis 0xcbf29ce484222325 and prime 0x100000001b3, over the UTF-8
//! bytes); the word is a test word when its bucket is below the test percentage. All
//! pronunciation variants of a word therefore fall on the same side. The split itself lives in
//! [`crate::support::split`] (the trainer uses it too) and is re-exported here.
//!
//! **PER.** For each word, the edit distance (Levenshtein, unit costs) from the top hypothesis
//! to the reference variant closest to it, summed over words, divided by the summed lengths of
//! those closest references. **WER.** A word is right when its top hypothesis equals any
//! reference variant. "Unstressed" figures strip stress from both sides first
//! ([`crate::g2p::strip_stress`]).
//!
//! **Calibration.** For a model, the top hypothesis's score (its calibrated probability of
//! being right) is compared with whether it is right (stress as written) in a reliability
//! table of ten equal-width bins with the expected calibration error (Guo et al. 2017; see
//! [`crate::g2p::reliability`]). For the hybrid guesser's rule-based sources, every candidate of
//! each source is compared the same way, one table per source ([`evaluate_sources`]).

use std::collections::BTreeMap;

use rayon::prelude::*;
use serde::Serialize;
use unicode_normalization::UnicodeNormalization;

use crate::g2p::hybrid::HybridGuesser;
use crate::g2p::{reliability, strip_stress, DecodeOptions, Model, Reliability, SymbolOptions};
use crate::support::align::{align as align_positions, closest};

pub use crate::support::split::{is_test_word, split_by_word, word_hash};

/// One step of an alignment between a hypothesis and a reference.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum EditOp<'a> {
    /// Same symbol on both sides.
    Match(&'a str),
    /// Reference symbol replaced by a hypothesis symbol.
    Substitute {
        /// Reference symbol.
        reference: &'a str,
        /// Hypothesis symbol.
        hypothesis: &'a str,
    },
    /// Hypothesis symbol with no reference counterpart.
    Insert(&'a str),
    /// Reference symbol missing from the hypothesis.
    Delete(&'a str),
}

/// A minimal-cost alignment (Levenshtein, unit costs) of `hyp` against `reference`, in order.
///
/// ```
/// use orthoepy::eval::{align, EditOp};
/// let (h, r) = (["K", "AE", "T", "S"], ["K", "AA", "T"]);
/// let ops = align(&h, &r);
/// assert_eq!(ops[1], EditOp::Substitute { reference: "AA", hypothesis: "AE" });
/// assert_eq!(ops[3], EditOp::Insert("S"));
/// ```
pub fn align<'a, S: AsRef<str>>(hyp: &'a [S], reference: &'a [S]) -> Vec<EditOp<'a>> {
    let found = align_positions(hyp.len(), reference.len(), 1usize, |i, j| usize::from(hyp[i].as_ref() != reference[j].as_ref()));
    found
        .pairs
        .into_iter()
        .filter_map(|pair| match pair {
            (Some(i), Some(j)) => {
                let (h, r) = (hyp[i].as_ref(), reference[j].as_ref());
                Some(if h == r { EditOp::Match(r) } else { EditOp::Substitute { reference: r, hypothesis: h } })
            }
            (Some(i), None) => Some(EditOp::Insert(hyp[i].as_ref())),
            (None, Some(j)) => Some(EditOp::Delete(reference[j].as_ref())),
            (None, None) => None,
        })
        .collect()
}

/// One scored word: its top hypothesis and all reference variants.
#[derive(Clone, Debug, PartialEq)]
pub struct Scored {
    /// The word.
    pub word: String,
    /// Top hypothesis (empty if the guesser had none).
    pub hypothesis: Vec<String>,
    /// Every reference pronunciation of the word.
    pub references: Vec<Vec<String>>,
}

/// Error rates of one setting (stress kept or stripped).
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Rates {
    /// Words scored.
    pub words: usize,
    /// Words whose top hypothesis matches no reference.
    pub word_errors: usize,
    /// Summed edit distance to the closest reference.
    pub phone_errors: usize,
    /// Summed length of the closest references.
    pub reference_phones: usize,
    /// `word_errors / words`.
    pub wer: f64,
    /// `phone_errors / reference_phones`.
    pub per: f64,
}

impl Rates {
    fn add(&mut self, hyp: &[String], refs: &[Vec<String>]) {
        self.words += 1;
        if !refs.iter().any(|r| r == hyp) {
            self.word_errors += 1;
        }
        if let Some((i, d)) = closest(hyp, refs) {
            self.phone_errors += d;
            self.reference_phones += refs[i].len();
        }
    }

    fn finish(&mut self) {
        self.wer = self.word_errors as f64 / self.words.max(1) as f64;
        self.per = self.phone_errors as f64 / self.reference_phones.max(1) as f64;
    }
}

/// Error rates of the words with a given number of letters.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LengthBreakdown {
    /// Letters (code points) in the word; the last bucket holds this many or more.
    pub letters: usize,
    /// Rates with stress kept.
    pub rates: Rates,
}

/// How often a phone confusion occurred (stress kept).
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Confusion {
    /// Reference phone (`None` for an insertion).
    pub reference: Option<String>,
    /// Hypothesis phone (`None` for a deletion).
    pub hypothesis: Option<String>,
    /// Occurrences.
    pub count: usize,
}

/// Longest word length with its own breakdown bucket.
const LENGTH_BUCKETS: usize = 15;
/// Confusions listed.
const TOP_CONFUSIONS: usize = 25;

/// A complete evaluation report.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Evaluation {
    /// Rates with stress marks as written.
    pub stressed: Rates,
    /// Rates with stress stripped from hypotheses and references.
    pub unstressed: Rates,
    /// Rates by word length (stress kept).
    pub by_length: Vec<LengthBreakdown>,
    /// Most frequent confusions against the closest reference, most frequent first.
    pub confusions: Vec<Confusion>,
    /// Every word whose hypothesis matches none of its references (stress as written), in the
    /// order the words were scored (left out of JSON when empty).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub errors: Vec<WordError>,
    /// Reliability of the top hypotheses' scores (only when a model was evaluated).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub calibration: Option<Reliability>,
    /// Reliability of each rule-based source of the hybrid guesser (only when measured).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub sources: Vec<SourceReliability>,
}

/// How well one rule-based source's scores match how often its candidates are right.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SourceReliability {
    /// The source's calibration name (`initialism`, `vowelless`, `compound`, `derivation`,
    /// `rules`).
    pub source: String,
    /// Whether its scores come from a map fitted with the model (else the configured constant).
    pub fitted: bool,
    /// Candidates it made for the test words.
    pub candidates: usize,
    /// Their mean score.
    pub mean_score: f64,
    /// The share of them that are right (stress as written).
    pub share_right: f64,
    /// The reliability table of their scores.
    pub reliability: Reliability,
}

/// Every rule-based source's candidates for the test words ([`HybridGuesser::source_candidates`]),
/// each compared with the word's references normalised by `symbols` (as the model was trained),
/// one reliability table per source, sources in name order.
pub fn evaluate_sources(guesser: &HybridGuesser<'_>, test: &[(String, Vec<String>)], symbols: SymbolOptions) -> Vec<SourceReliability> {
    let mut by_source: BTreeMap<&'static str, Vec<(f64, bool)>> = BTreeMap::new();
    for (word, refs) in group_references(test) {
        let references: Vec<Vec<String>> = refs.iter().map(|r| r.iter().map(|p| symbols.phone(p)).collect()).collect();
        for c in guesser.source_candidates(&word) {
            let phones: Vec<String> = c.pronunciation.split(' ').map(|p| symbols.phone(p)).collect();
            by_source.entry(c.calibration).or_default().push((c.score, references.contains(&phones)));
        }
    }
    by_source
        .into_iter()
        .map(|(source, scored)| {
            let n = scored.len().max(1) as f64;
            SourceReliability {
                source: source.to_string(),
                fitted: guesser.calibration().is_some_and(|c| c.get(source).is_some()),
                candidates: scored.len(),
                mean_score: scored.iter().map(|s| s.0).sum::<f64>() / n,
                share_right: scored.iter().filter(|s| s.1).count() as f64 / n,
                reliability: reliability(&scored),
            }
        })
        .collect()
}

/// One wrongly guessed word.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct WordError {
    /// The word.
    pub word: String,
    /// What the model guessed, phones separated by spaces.
    pub hypothesis: String,
    /// Every reference pronunciation of the word.
    pub references: Vec<String>,
    /// Phone edits against the closest reference.
    pub phone_errors: usize,
}

/// Scores words (see the module docs for the definitions).
///
/// ```
/// use orthoepy::eval::{score, Scored};
/// let p = |s: &str| s.split(' ').map(String::from).collect::<Vec<_>>();
/// let words = vec![
///     Scored { word: "either".into(), hypothesis: p("IY1 DH ER0"), references: vec![p("IY1 DH ER0"), p("AY1 DH ER0")] },
///     Scored { word: "tomato".into(), hypothesis: p("T AH0 M EY1 T OW2"), references: vec![p("T AH0 M EY1 T OW0")] },
/// ];
/// let e = score(&words);
/// assert_eq!(e.stressed.word_errors, 1);
/// assert_eq!(e.unstressed.word_errors, 0);
/// assert_eq!(e.stressed.phone_errors, 1);
/// assert_eq!(e.errors.len(), 1);
/// assert_eq!(e.errors[0].word, "tomato");
/// assert_eq!(e.errors[0].references, ["T AH0 M EY1 T OW0"]);
/// ```
pub fn score(words: &[Scored]) -> Evaluation {
    let mut eval = Evaluation::default();
    let mut lengths: BTreeMap<usize, Rates> = BTreeMap::new();
    let mut confusions: BTreeMap<(Option<String>, Option<String>), usize> = BTreeMap::new();
    for w in words {
        eval.stressed.add(&w.hypothesis, &w.references);
        let bare = |p: &[String]| p.iter().map(|s| strip_stress(s)).collect::<Vec<_>>();
        let bare_refs: Vec<Vec<String>> = w.references.iter().map(|r| bare(r)).collect();
        eval.unstressed.add(&bare(&w.hypothesis), &bare_refs);
        let letters = w.word.nfc().count().min(LENGTH_BUCKETS);
        lengths.entry(letters).or_default().add(&w.hypothesis, &w.references);
        if !w.references.contains(&w.hypothesis) {
            eval.errors.push(WordError {
                word: w.word.clone(),
                hypothesis: w.hypothesis.join(" "),
                references: w.references.iter().map(|r| r.join(" ")).collect(),
                phone_errors: closest(&w.hypothesis, &w.references).map_or(w.hypothesis.len(), |(_, d)| d),
            });
        }
        if let Some((i, _)) = closest(&w.hypothesis, &w.references) {
            for op in align(&w.hypothesis, &w.references[i]) {
                let key = match op {
                    EditOp::Match(_) => continue,
                    EditOp::Substitute { reference, hypothesis } => (Some(reference.to_string()), Some(hypothesis.to_string())),
                    EditOp::Insert(h) => (None, Some(h.to_string())),
                    EditOp::Delete(r) => (Some(r.to_string()), None),
                };
                *confusions.entry(key).or_insert(0) += 1;
            }
        }
    }
    eval.stressed.finish();
    eval.unstressed.finish();
    eval.by_length = lengths
        .into_iter()
        .map(|(letters, mut rates)| {
            rates.finish();
            LengthBreakdown { letters, rates }
        })
        .collect();
    let mut list: Vec<Confusion> = confusions.into_iter().map(|((reference, hypothesis), count)| Confusion { reference, hypothesis, count }).collect();
    list.sort_by_key(|c| std::cmp::Reverse(c.count));
    list.truncate(TOP_CONFUSIONS);
    eval.confusions = list;
    eval
}

/// Groups (word, pronunciation) pairs by word (NFC + lower case), keeping variants in order.
pub fn group_references(pairs: &[(String, Vec<String>)]) -> Vec<(String, Vec<Vec<String>>)> {
    let mut grouped: BTreeMap<String, (String, Vec<Vec<String>>)> = BTreeMap::new();
    for (word, phones) in pairs {
        let key: String = word.nfc().collect::<String>().to_lowercase();
        grouped.entry(key).or_insert_with(|| (word.clone(), Vec::new())).1.push(phones.clone());
    }
    grouped.into_values().collect()
}

/// Decodes every test word with `model` (in parallel on the current rayon pool) and scores its
/// top hypothesis against all its variants. References are normalised like the model's
/// training data (stress stripped if the model was trained without stress). The search is the
/// default one, N-best list included, so the top's score is the one a guess shows (calibrated
/// over its list, [`crate::g2p::Calibration::apply_nbest`]).
pub fn evaluate_model(model: &Model, test: &[(String, Vec<String>)]) -> Evaluation {
    evaluate_model_with(model, test, &DecodeOptions::default())
}

/// [`evaluate_model`] with explicit search settings (e.g. a wider beam, to measure how many
/// errors the default beam's search adds).
pub fn evaluate_model_with(model: &Model, test: &[(String, Vec<String>)], search: &DecodeOptions) -> Evaluation {
    let opts = model.symbol_options();
    let (words, scores): (Vec<Scored>, Vec<(f64, bool)>) = group_references(test)
        .into_par_iter()
        .map(|(word, refs)| {
            let top = model.guess_with(&word, search).hypotheses.into_iter().next();
            let probability = top.as_ref().map_or(0.0, |h| h.score);
            let hypothesis = top.map(|h| h.phones).unwrap_or_default();
            let references: Vec<Vec<String>> = refs.iter().map(|r| r.iter().map(|p| opts.phone(p)).collect()).collect();
            let right = references.contains(&hypothesis);
            (Scored { word, hypothesis, references }, (probability, right))
        })
        .unzip();
    let mut evaluation = score(&words);
    evaluation.calibration = Some(reliability(&scores));
    evaluation
}

#[cfg(test)]
mod tests {
    use super::*;

    fn p(s: &str) -> Vec<String> {
        s.split_whitespace().map(String::from).collect()
    }

    #[test]
    fn alignment_ops_reproduce_distance() {
        let (h, r) = (p("K AE T S"), p("K AA T"));
        let ops = align(&h, &r);
        let cost = ops.iter().filter(|o| !matches!(o, EditOp::Match(_))).count();
        assert_eq!(cost, crate::support::align::levenshtein(&h, &r));
        assert_eq!(cost, 2);
    }

    #[test]
    fn per_uses_closest_variant_length() {
        // PER definition in the module docs: distance to the closest variant / its length.
        let words = vec![Scored { word: "route".into(), hypothesis: p("R UW1 T"), references: vec![p("R AW1 T"), p("R UW1 T S")] }];
        let e = score(&words);
        assert_eq!(e.stressed.phone_errors, 1);
        assert_eq!(e.stressed.reference_phones, 3);
        assert_eq!(e.stressed.word_errors, 1);
    }
}
