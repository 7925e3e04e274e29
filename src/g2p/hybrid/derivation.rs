//! Derivation: a word that is a lexicon stem plus a suffix rule of the language configuration.
//!
//! The stem is recovered by undoing the spelling changes the rule declares (y→i: carri-ed ←
//! carry; e-drop: bak-ed ← bake; consonant doubling: stopp-ed ← stop), and the suffix's
//! allomorph is chosen from the FEATURES of the stem's final phone as the phoneset describes
//! them — for English plural/3sg [IH0 Z] after sibilants, [S] after other voiceless sounds, [Z]
//! elsewhere; past [IH0 D] after alveolar stops, [T] after voiceless, [D] elsewhere (the
//! standard textbook rule; common practice). Must not know phone symbols itself.

use super::{LanguageConfig, Lookup, Raw, Source, Suffix, DERIVATION};
use crate::phoneset::{Phoneset, Pronunciation};

/// Candidates for `word` (lower-cased) from every suffix rule whose ending it has, with the
/// configured score (`scores.derivation`, times `scores.alternative` for each further one) and
/// the feature the fitted calibration reads: `1/(rank + 1)`, the candidate's place among them.
pub(super) fn candidates(word: &str, lookup: &Lookup<'_>, config: &LanguageConfig) -> Vec<Raw> {
    let mut out = Vec::new();
    let mut score = config.scores.derivation;
    for suffix in &config.suffixes {
        let Some(stripped) = word.strip_suffix(suffix.ending.as_str()).filter(|s| !s.is_empty()) else {
            continue;
        };
        for stem in stems(stripped, suffix) {
            let Some(mut pronunciation) = lookup.first(&stem) else { continue };
            let Some(allomorph) = choose(suffix, &pronunciation, lookup.phoneset) else { continue };
            pronunciation.phones.extend(allomorph.phones.iter().copied());
            let feature = 1.0 / (out.len() + 1) as f64;
            out.push(Raw { pronunciation, prior: score, feature, key: DERIVATION, source: Source::Derivation { stem, suffix: suffix.name.clone() } });
            score *= config.scores.alternative;
        }
    }
    out
}

/// Possible stems of a stripped word, most likely first: declared spelling changes, the
/// stripped form itself, then the form with a doubled final consonant undone.
fn stems(stripped: &str, suffix: &Suffix) -> Vec<String> {
    let mut stems: Vec<String> = suffix
        .stem_endings
        .iter()
        .filter_map(|(from, to)| stripped.strip_suffix(from.as_str()).map(|base| format!("{base}{to}")))
        .collect();
    stems.push(stripped.to_string());
    let mut tail = stripped.chars().rev();
    if let (Some(a), Some(b)) = (tail.next(), tail.next()) {
        if a == b && suffix.undouble.contains(&a) {
            stems.push(stripped[..stripped.len() - a.len_utf8()].to_string());
        }
    }
    stems.dedup();
    stems
}

/// The first allomorph whose feature conditions hold for the stem's final phone.
fn choose<'s>(suffix: &'s Suffix, stem: &Pronunciation, phoneset: &Phoneset) -> Option<&'s Pronunciation> {
    let last = phoneset.phone(stem.phones.last()?.phone);
    suffix
        .allomorphs
        .iter()
        .find(|a| a.when.iter().all(|(feature, values)| last.feature(feature).is_some_and(|v| values.iter().any(|x| x == v))))
        .map(|a| &a.phones)
}
