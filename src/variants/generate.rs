//! Variant generation over words and lexicons: applies a profile to every canonical
//! pronunciation, merges identical outcomes, drops what the lexicon already has, ranks by
//! probability and caps per word, in parallel over words (rayon). Owns [`Variant`] and
//! [`Generator`]; must not read or write the lexicon file (it takes a loaded [`Lexicon`]).

use std::collections::{HashMap, HashSet};

use rayon::prelude::*;

use crate::lexicon::normalize_key;
use crate::lexicon::{Lexicon, Status};
use crate::phoneset::{PhoneToken, Phoneset, Pronunciation};

use super::apply::{expand, Limits, Tok, Weighted};
use super::compile::{stress_code, stress_level};
use super::profile::Profile;

/// A rule that fired to make a variant.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FiredRule {
    /// Rule id inside its set.
    pub rule_id: String,
    /// Rule set id.
    pub rule_set: String,
    /// 0-based index of the canonical phone rewritten (for an insertion: the canonical phone the
    /// new one stands before; the phone count when at the end).
    pub position: usize,
}

/// One proposed variant pronunciation.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Variant {
    /// The headword as written in the lexicon.
    pub word: String,
    /// The canonical pronunciation it was derived from.
    pub canonical: String,
    /// The variant.
    pub pronunciation: String,
    /// Probability that a speaker of the profile says this (sum over the derivations giving it).
    pub probability: f64,
    /// The rules of the most probable derivation, in the order they applied.
    pub fired: Vec<FiredRule>,
}

/// Limits on what is generated.
#[derive(Debug, Clone, PartialEq)]
pub struct Options {
    /// At most this many variants per word (the most probable ones).
    pub max_per_word: usize,
    /// Variants less probable than this are pruned (and never expanded further); raised to
    /// [`MIN_PROBABILITY_FLOOR`] if lower.
    pub min_probability: f64,
}

/// The lowest pruning threshold: it bounds the work per word to about 1/floor outcomes.
pub const MIN_PROBABILITY_FLOOR: f64 = 1e-4;

impl Default for Options {
    fn default() -> Options {
        Options { max_per_word: 5, min_probability: 0.01 }
    }
}

/// An entry whose pronunciation does not parse against the phoneset (the audit's to report).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Skipped {
    /// Headword.
    pub word: String,
    /// 1-based line in the lexicon file (0: not from a file).
    pub line: usize,
    /// The parse error.
    pub message: String,
}

/// Result of a lexicon-wide run.
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct Generation {
    /// Variants, grouped by word in lexicon order, most probable first within a word.
    pub variants: Vec<Variant>,
    /// Entries that could not be used.
    pub skipped: Vec<Skipped>,
}

/// Applies one profile; cheap to build, shareable across threads.
pub struct Generator<'a> {
    phoneset: &'a Phoneset,
    rules: Vec<Weighted<'a>>,
    options: Options,
}

impl<'a> Generator<'a> {
    /// A generator for `profile` over `phoneset`.
    pub fn new(phoneset: &'a Phoneset, profile: &'a Profile, options: Options) -> Generator<'a> {
        Generator { phoneset, rules: profile.weighted_rules(), options }
    }

    fn limits(&self) -> Limits {
        Limits {
            min_probability: self.options.min_probability.max(MIN_PROBABILITY_FLOOR),
            beam: (self.options.max_per_word * 8).max(64),
        }
    }

    /// All variants of one canonical pronunciation (not the canonical itself), most probable
    /// first, capped at `max_per_word`.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::variants::{Generator, Options, Profile, VariantRuleSet};
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let profile = Profile::from_rule_sets(vec![VariantRuleSet::shipped("flapping", &arpa).unwrap()]);
    /// let generator = Generator::new(&arpa, &profile, Options::default());
    /// let water = arpa.parse("W AO1 T ER0").unwrap();
    /// let variants = generator.variants_of("water", &water);
    /// assert_eq!(variants[0].pronunciation, "W AO1 DX ER0");
    /// assert_eq!(variants[0].fired[0].rule_id, "t-d-flap");
    /// assert_eq!(variants[0].fired[0].position, 2);
    /// ```
    pub fn variants_of(&self, word: &str, canonical: &Pronunciation) -> Vec<Variant> {
        let mut out = self.uncapped(word, canonical);
        rank_and_cap(&mut out, self.options.max_per_word);
        out
    }

    fn uncapped(&self, word: &str, canonical: &Pronunciation) -> Vec<Variant> {
        let toks: Vec<Tok> = canonical
            .phones
            .iter()
            .enumerate()
            .map(|(i, t)| Tok { phone: t.phone, stress: stress_code(t.stress), origin: u16::try_from(i).unwrap_or(u16::MAX) })
            .collect();
        let canonical_text = canonical.render(self.phoneset);
        let limits = self.limits();
        expand(self.phoneset, &self.rules, toks, &limits)
            .into_iter()
            .filter(|o| !o.fired.is_empty() && o.probability >= limits.min_probability)
            .filter_map(|o| {
                let pronunciation = render(self.phoneset, &o.toks);
                (pronunciation != canonical_text).then(|| Variant {
                    word: word.to_string(),
                    canonical: canonical_text.clone(),
                    pronunciation,
                    probability: o.probability,
                    fired: o
                        .fired
                        .iter()
                        .filter_map(|&(rule, position)| {
                            self.rules.get(rule).map(|w| FiredRule {
                                rule_id: w.rule.id.clone(),
                                rule_set: w.set_id.to_string(),
                                position: usize::from(position),
                            })
                        })
                        .collect(),
                })
            })
            .collect()
    }

    /// Variants for every word of `lexicon` (or only `words`, compared by the lexicon's headword
    /// policy). Every non-deprecated entry is a canonical; pronunciations any entry of the word
    /// already has (deprecated ones included) are not proposed again.
    pub fn run(&self, lexicon: &Lexicon, words: Option<&[String]>) -> Generation {
        let policy = lexicon.policy();
        let wanted: Option<HashSet<String>> = words.map(|ws| ws.iter().map(|w| normalize_key(w, policy).into_owned()).collect());
        let mut order: Vec<String> = Vec::new();
        let mut groups: HashMap<String, Vec<usize>> = HashMap::new();
        for (i, e) in lexicon.entries().iter().enumerate() {
            let key = normalize_key(&e.word, policy);
            if wanted.as_ref().is_some_and(|w| !w.contains(key.as_ref())) {
                continue;
            }
            match groups.get_mut(key.as_ref()) {
                Some(g) => g.push(i),
                None => {
                    order.push(key.to_string());
                    groups.insert(key.into_owned(), vec![i]);
                }
            }
        }
        let per_word: Vec<Generation> = order
            .par_iter()
            .map(|key| self.word_group(lexicon, groups.get(key).map_or(&[][..], Vec::as_slice)))
            .collect();
        let mut all = Generation::default();
        for g in per_word {
            all.variants.extend(g.variants);
            all.skipped.extend(g.skipped);
        }
        all
    }

    fn word_group(&self, lexicon: &Lexicon, ids: &[usize]) -> Generation {
        let mut out = Generation::default();
        let mut known: HashSet<String> = HashSet::new();
        let mut canonicals = Vec::new();
        for e in ids.iter().filter_map(|&i| lexicon.entries().get(i)) {
            match self.phoneset.parse(&e.pronunciation) {
                Ok(p) => {
                    known.insert(p.render(self.phoneset));
                    if e.status != Status::Deprecated {
                        canonicals.push((e, p));
                    }
                }
                Err(err) => {
                    known.insert(e.phones().collect::<Vec<_>>().join(" "));
                    out.skipped.push(Skipped { word: e.word.to_string(), line: e.line, message: err.to_string() });
                }
            }
        }
        let mut best: HashMap<String, Variant> = HashMap::new();
        for (e, p) in &canonicals {
            for v in self.uncapped(&e.word, p) {
                if known.contains(&v.pronunciation) {
                    continue;
                }
                match best.get(&v.pronunciation) {
                    Some(old) if old.probability >= v.probability => {}
                    _ => {
                        best.insert(v.pronunciation.clone(), v);
                    }
                }
            }
        }
        out.variants = best.into_values().collect();
        rank_and_cap(&mut out.variants, self.options.max_per_word);
        out
    }
}

/// Most probable first (ties: by pronunciation, for stable output), at most `cap`.
fn rank_and_cap(variants: &mut Vec<Variant>, cap: usize) {
    variants.sort_by(|a, b| b.probability.total_cmp(&a.probability).then_with(|| a.pronunciation.cmp(&b.pronunciation)));
    variants.truncate(cap);
}

fn render(set: &Phoneset, toks: &[Tok]) -> String {
    let pron = Pronunciation { phones: toks.iter().map(|t| PhoneToken { phone: t.phone, stress: stress_level(t.stress) }).collect() };
    pron.render(set)
}
