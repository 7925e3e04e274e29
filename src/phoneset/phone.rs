//! Phones and their feature bundles: [`Phone`], [`PhoneClass`] and [`Features`]. This file only
//! holds data and simple accessors; checking bundles against a schema is done by `schema.rs`.

use std::collections::BTreeMap;

use super::stress::StressLevel;

/// Reserved pseudo-feature: the phone's class (`consonant`, `vowel`, `diphthong`).
pub const CLASS_FEATURE: &str = "class";
/// Reserved pseudo-feature: `yes` when the phone can be a syllable nucleus, else `no`.
pub const SYLLABIC_FEATURE: &str = "syllabic";

/// The broad class of a phone.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum PhoneClass {
    /// A consonant: described by place, manner, voicing, ...
    Consonant,
    /// A monophthong: described by height, backness, rounding, ...
    Vowel,
    /// A diphthong: a sequence of vowel targets.
    Diphthong,
}

impl PhoneClass {
    /// All classes, in file-format order.
    pub const ALL: [PhoneClass; 3] = [
        PhoneClass::Consonant,
        PhoneClass::Vowel,
        PhoneClass::Diphthong,
    ];

    /// The name used in phoneset files: `consonant`, `vowel` or `diphthong`.
    pub fn as_str(self) -> &'static str {
        match self {
            PhoneClass::Consonant => "consonant",
            PhoneClass::Vowel => "vowel",
            PhoneClass::Diphthong => "diphthong",
        }
    }

    /// Reads a class name as written in phoneset files.
    ///
    /// ```
    /// use orthoepy::phoneset::PhoneClass;
    /// assert_eq!(PhoneClass::from_name("vowel"), Some(PhoneClass::Vowel));
    /// assert_eq!(PhoneClass::from_name("glide"), None);
    /// ```
    pub fn from_name(name: &str) -> Option<PhoneClass> {
        PhoneClass::ALL.into_iter().find(|c| c.as_str() == name)
    }

    /// The class whose features describe one vowel target of this class (diphthongs: vowel).
    pub(crate) fn target_class(self) -> PhoneClass {
        match self {
            PhoneClass::Diphthong => PhoneClass::Vowel,
            other => other,
        }
    }
}

/// A feature bundle: feature name → value, e.g. `place = "velar"`.
///
/// Bundles stored in a [`Phone`] are complete: schema defaults are filled in at load. Bundles
/// built by callers (variant rules, queries) may leave defaulted features out; lookups such as
/// [`super::Phoneset::find_by_features`] fill them in.
///
/// ```
/// use orthoepy::phoneset::Features;
/// let mut f = Features::new().with("place", "alveolar").with("manner", "stop");
/// f.set("voicing", "voiced");
/// assert_eq!(f.get("voicing"), Some("voiced"));
/// assert_eq!(f.len(), 3);
/// ```
#[derive(Debug, Clone, Default, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Features(BTreeMap<String, String>);

impl Features {
    /// An empty bundle.
    pub fn new() -> Features {
        Features(BTreeMap::new())
    }

    /// Returns the bundle with `name` set to `value` (builder style).
    pub fn with(mut self, name: &str, value: &str) -> Features {
        self.set(name, value);
        self
    }

    /// Sets `name` to `value`, returning the previous value.
    pub fn set(&mut self, name: &str, value: &str) -> Option<String> {
        self.0.insert(name.to_string(), value.to_string())
    }

    /// Removes `name`, returning its value.
    pub fn remove(&mut self, name: &str) -> Option<String> {
        self.0.remove(name)
    }

    /// The value of `name`, if set.
    pub fn get(&self, name: &str) -> Option<&str> {
        self.0.get(name).map(String::as_str)
    }

    /// Feature names and values in name order.
    pub fn iter(&self) -> impl Iterator<Item = (&str, &str)> {
        self.0.iter().map(|(k, v)| (k.as_str(), v.as_str()))
    }

    /// Number of features set.
    pub fn len(&self) -> usize {
        self.0.len()
    }

    /// True when no feature is set.
    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }
}

impl<K: Into<String>, V: Into<String>> FromIterator<(K, V)> for Features {
    fn from_iter<I: IntoIterator<Item = (K, V)>>(iter: I) -> Features {
        Features(
            iter.into_iter()
                .map(|(k, v)| (k.into(), v.into()))
                .collect(),
        )
    }
}

/// One phone of a phoneset.
#[derive(Debug, Clone, PartialEq)]
pub struct Phone {
    /// The symbol written in pronunciations (without stress mark), e.g. `AA`.
    pub symbol: String,
    /// IPA transcription, e.g. `ɑ`; diphthongs and affricates may take several characters.
    pub ipa: String,
    /// X-SAMPA transcription, e.g. `A`.
    pub xsampa: String,
    /// Broad class.
    pub class: PhoneClass,
    /// Feature bundle, defaults filled in. Empty for diphthongs (see [`Phone::targets`]).
    pub features: Features,
    /// Symbols of the phones this one is a marked allophone of (empty for phonemes).
    pub allophone_of: Vec<String>,
    /// True when the phone can be a syllable nucleus (and so carry stress).
    pub syllabic: bool,
    /// Vowel targets of a diphthong, in order; empty for other classes.
    pub targets: Vec<Features>,
    /// Renderings that replace `ipa` and `xsampa` at one stress level (en-arpa: unstressed
    /// `AH` is written ə); at most one per level, only on nuclei.
    pub by_stress: Vec<StressedForm>,
}

/// How a phone is written at one stress level, when that differs from its plain IPA/X-SAMPA.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StressedForm {
    /// The stress level the rendering applies to.
    pub level: StressLevel,
    /// IPA at that level, e.g. `ə`.
    pub ipa: String,
    /// X-SAMPA at that level, e.g. `@`.
    pub xsampa: String,
}

impl Phone {
    /// True when the phone can carry a stress mark: vowels, diphthongs, syllabic consonants.
    ///
    /// ```
    /// let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    /// let el = set.lookup("EL").unwrap();
    /// assert!(set.phone(el).is_nucleus());
    /// assert!(!set.phone(set.lookup("L").unwrap()).is_nucleus());
    /// ```
    pub fn is_nucleus(&self) -> bool {
        self.syllabic
    }

    /// True when the phone is a marked allophone of another phone.
    pub fn is_allophone(&self) -> bool {
        !self.allophone_of.is_empty()
    }

    /// The value of feature `name`. The reserved names `class` and `syllabic` answer the
    /// phone's class and `yes`/`no`.
    ///
    /// ```
    /// let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    /// let ng = set.phone(set.lookup("NG").unwrap());
    /// assert_eq!(ng.feature("place"), Some("velar"));
    /// assert_eq!(ng.feature("class"), Some("consonant"));
    /// assert_eq!(ng.feature("syllabic"), Some("no"));
    /// ```
    pub fn feature(&self, name: &str) -> Option<&str> {
        match name {
            CLASS_FEATURE => Some(self.class.as_str()),
            SYLLABIC_FEATURE => Some(if self.syllabic { "yes" } else { "no" }),
            _ => self.features.get(name),
        }
    }

    /// The IPA written for the phone at stress `level` (its `by_stress` form, else `ipa`).
    ///
    /// ```
    /// use orthoepy::phoneset::{Phoneset, StressLevel};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let ah = set.phone(set.lookup("AH").unwrap());
    /// assert_eq!(ah.ipa_at(Some(StressLevel::Unstressed)), "ə");
    /// assert_eq!(ah.ipa_at(Some(StressLevel::Primary)), "ʌ");
    /// ```
    pub fn ipa_at(&self, level: Option<StressLevel>) -> &str {
        self.form_at(level).map_or(&self.ipa, |f| &f.ipa)
    }

    /// The X-SAMPA written for the phone at stress `level` (its `by_stress` form, else `xsampa`).
    pub fn xsampa_at(&self, level: Option<StressLevel>) -> &str {
        self.form_at(level).map_or(&self.xsampa, |f| &f.xsampa)
    }

    fn form_at(&self, level: Option<StressLevel>) -> Option<&StressedForm> {
        level.and_then(|l| self.by_stress.iter().find(|f| f.level == l))
    }

    /// The vowel qualities of the phone as a sequence: the targets of a diphthong, otherwise
    /// the phone's own bundle alone.
    pub(crate) fn qualities(&self) -> &[Features] {
        if self.targets.is_empty() {
            std::slice::from_ref(&self.features)
        } else {
            &self.targets
        }
    }
}
