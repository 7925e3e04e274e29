//! Phonesets: the inventory of phones a lexicon may use, each described by articulatory
//! features; parsing and validating pronunciations against it; feature distance and
//! nearest-symbol suggestions; phonotactic constraints; mapping pronunciations between
//! phonesets. This module owns phoneset files and must not know about lexicons.
//!
//! # Phoneset file format (TOML)
//!
//! ```toml
//! id = "en-arpa"                 # short name, used by `Phoneset::resolve`
//! name = "US English ARPAbet"    # human-readable name
//! description = "..."            # optional
//! schema = "ipa-chart"           # feature schema: a shipped one, or the name of the
//!                                # inline schema given by [[feature]] tables in this file
//!
//! [stress]                       # optional; marks are suffixes on nucleus symbols
//! required = true                # every nucleus must carry a mark
//! marks = [ { mark = "1", level = "primary" },
//!           { mark = "2", level = "secondary" },
//!           { mark = "0", level = "unstressed" } ]
//!
//! [[phone]]
//! symbol = "AA"                  # as written in pronunciations, unique, no whitespace
//! ipa = "ɑ"                      # required
//! xsampa = "A"                   # required
//! class = "vowel"                # consonant | vowel | diphthong
//! features = { height = "open", backness = "back", rounding = "unrounded" }
//! # allophone_of = ["AH"]        # marks a phone as an allophone of others
//! # syllabic = true              # default: true for vowels and diphthongs, else false
//! # by_stress = [ { level = "unstressed", ipa = "ə", xsampa = "@" } ]
//! #                              # renderings at one stress level (nuclei only)
//!
//! [[phone]]
//! symbol = "AY"
//! ipa = "aɪ"
//! xsampa = "aI"
//! class = "diphthong"            # a diphthong has vowel targets instead of features
//! targets = [ { height = "open", backness = "front", rounding = "unrounded" },
//!             { height = "near-close", backness = "near-front", rounding = "unrounded" } ]
//!
//! [[constraint]]                 # phonotactic constraint: a forbidden sequence
//! id = "en-no-initial-velar-nasal"
//! pattern = "# [place=velar nasal=nasal]"   # `#` word boundary, symbols, [feature classes]
//! message = "English words do not begin with the velar nasal NG"
//! source = "P. Roach, English Phonetics and Phonology (2009)"  # or "common practice"
//! ```
//!
//! An inline schema is a list of `[[feature]]` tables (the shipped `ipa-chart` schema in
//! `phonesets/ipa-chart.schema.toml` has the same shape, with `name` and an optional
//! `syllabic_weight` at top level):
//!
//! ```toml
//! [[feature]]
//! name = "place"
//! classes = ["consonant"]        # classes it describes; diphthong targets use "vowel"
//! required = true                # or: default = "..." (filled in when left out)
//! weight = 40.0                  # salience in the feature distance
//! values = ["bilabial", "labiodental", "dental"]
//! scale = [1.0, 0.95, 0.9]       # optional ordinal points in 0..=1 for graded mismatch
//! ```
//!
//! The shipped `ipa-chart` schema follows the IPA chart (2020): consonants have `place`
//! (bilabial … glottal, ordinal), `manner` (stop, affricate, fricative, trill, tap,
//! approximant; ordinal), `voicing`, and defaulted `nasal` (oral), `lateral` (central),
//! `sibilant` (no), `secondary` (none, labialised, palatalised, velarised, pharyngealised);
//! vowels have `height` (close … open, seven levels, ordinal), `backness` (front, near-front,
//! central, near-back, back; ordinal), `rounding`, and defaulted `rhotic` (no) and `length`
//! (short). The names `class` and `syllabic` are reserved: every phone answers them.
//!
//! Loading checks the file and reports every problem with line and column: unique symbols;
//! feature names and values in the schema; required features present per class; no two phones
//! with the same class, features, targets and syllabicity unless one is an allophone of the
//! other; `ipa` and `xsampa` given; stress marks non-empty, unique, not symbols themselves and
//! not able to make a symbol ambiguous; constraints well formed. Files over
//! [`MAX_FILE`] are refused before parsing.

mod build;
mod convert;
mod distance;
mod error;
mod mapping;
mod phone;
mod phonotactics;
mod pronunciation;
mod raw;
mod schema;
mod stress;
mod suggest;
mod transcribe;

use std::collections::HashMap;
use std::path::Path;

pub use convert::{parse_overrides, ConvertError, Converter, MatchKind, PhoneRule};
pub use error::{CheckProblem, PhonesetError};
pub use mapping::{map_pronunciation, MappingError};
pub use phone::{Features, Phone, PhoneClass, StressedForm};
pub use transcribe::{Alphabet, Onsets, TranscriptionError};
pub use phonotactics::{PhonotacticConstraint, PhonotacticViolation};
pub use pronunciation::{
    PhoneToken, Pronunciation, PronunciationError, TokenProblem, TokenProblemKind,
};
pub use schema::{FeatureDef, Schema};
pub use stress::{Stress, StressLevel};

use stress::StressMarks;

use crate::support::located::origin_of;
use crate::support::read::{read_capped_string, Limit, MIB};

/// Index of a phone in its phoneset's [`Phoneset::phones`].
pub type PhoneId = u16;

/// Largest phoneset file accepted (4 MiB; the shipped ones are some tens of KiB).
pub const MAX_FILE: Limit = Limit { bytes: 4 * MIB, what: "phoneset file" };

/// The shipped phonesets: (id, TOML text).
const SHIPPED: &[(&str, &str)] = &[
    ("en-arpa", include_str!("../../phonesets/en-arpa.toml")),
    ("ipa-broad", include_str!("../../phonesets/ipa-broad.toml")),
    ("es-ipa", include_str!("../../phonesets/es-ipa.toml")),
];

/// The ids of the shipped phonesets.
const SHIPPED_IDS: &[&str] = &["en-arpa", "ipa-broad", "es-ipa"];

/// A checked phoneset: phones with features, stress marks, constraints, and lookup tables.
#[derive(Debug, Clone)]
pub struct Phoneset {
    id: String,
    name: String,
    description: String,
    source: String,
    schema: Schema,
    phones: Vec<Phone>,
    by_symbol: HashMap<String, PhoneId>,
    by_ipa: HashMap<String, PhoneId>,
    max_ipa_chars: usize,
    stress: StressMarks,
    constraints: Vec<PhonotacticConstraint>,
    /// Row-major phone × phone feature distances.
    distances: Vec<f32>,
    /// IPA and X-SAMPA reading tables.
    forms: transcribe::Forms,
}

impl Phoneset {
    /// A phoneset shipped with orthoepy (embedded in the binary).
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// assert_eq!(set.id(), "en-arpa");
    /// assert!(Phoneset::shipped("klingon").is_err());
    /// ```
    pub fn shipped(id: &str) -> Result<Phoneset, PhonesetError> {
        let Some((_, text)) = SHIPPED.iter().find(|(i, _)| *i == id) else {
            return Err(PhonesetError::UnknownShipped {
                id: id.to_string(),
                known: SHIPPED_IDS.join(", "),
            });
        };
        build::from_text(text, &format!("phonesets/{id}.toml (shipped)"))
    }

    /// The ids [`Phoneset::shipped`] accepts.
    pub fn shipped_ids() -> &'static [&'static str] {
        SHIPPED_IDS
    }

    /// Loads and checks a phoneset file. Files over [`MAX_FILE`] are refused.
    ///
    /// ```
    /// use orthoepy::phoneset::{Phoneset, PhonesetError};
    /// let err = Phoneset::load(std::path::Path::new("no/such/file.toml")).unwrap_err();
    /// assert!(matches!(err, PhonesetError::Read(e) if e.is_not_found()));
    /// ```
    pub fn load(path: &Path) -> Result<Phoneset, PhonesetError> {
        let text = read_capped_string(path, MAX_FILE)?;
        build::from_text(&text, &origin_of(path))
    }

    /// Parses and checks phoneset TOML held in memory; `label` names it in errors.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let text = r#"
    /// id = "tiny"
    /// name = "Tiny"
    /// schema = "ipa-chart"
    /// [[phone]]
    /// symbol = "p"
    /// ipa = "p"
    /// xsampa = "p"
    /// class = "consonant"
    /// features = { place = "bilabial", manner = "stop", voicing = "voiceless" }
    /// "#;
    /// let set = Phoneset::from_toml_str(text, "tiny.toml").unwrap();
    /// assert_eq!(set.phones().len(), 1);
    /// ```
    pub fn from_toml_str(text: &str, label: &str) -> Result<Phoneset, PhonesetError> {
        build::from_text(text, label)
    }

    /// A shipped id, else a path (relative paths are taken from `base_dir`). A bare name that is
    /// neither shipped nor an existing file is an unknown id, and the error lists the shipped ones.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let err = Phoneset::resolve("en-arpabet", std::path::Path::new(".")).unwrap_err();
    /// assert!(err.to_string().contains("en-arpa, "), "{err}");
    /// ```
    pub fn resolve(spec: &str, base_dir: &Path) -> Result<Phoneset, PhonesetError> {
        let path = base_dir.join(spec);
        let names_a_file = spec.contains('/') || spec.contains('\\') || spec.ends_with(".toml") || path.is_file();
        if SHIPPED_IDS.contains(&spec) || !names_a_file {
            return Phoneset::shipped(spec);
        }
        Phoneset::load(&path)
    }

    /// The phoneset's id.
    pub fn id(&self) -> &str {
        &self.id
    }

    /// The phoneset's human-readable name.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The optional description.
    pub fn description(&self) -> &str {
        &self.description
    }

    /// Where it was loaded from (a path, or `phonesets/<id>.toml (shipped)`).
    pub fn source(&self) -> &str {
        &self.source
    }

    /// The feature schema.
    pub fn schema(&self) -> &Schema {
        &self.schema
    }

    /// All phones, indexed by [`PhoneId`].
    pub fn phones(&self) -> &[Phone] {
        &self.phones
    }

    /// The phone with id `id`.
    ///
    /// # Panics
    /// If `id` is not an id of this phoneset; use [`Phoneset::get`] for ids of unknown origin.
    pub fn phone(&self, id: PhoneId) -> &Phone {
        &self.phones[id as usize]
    }

    /// The phone with id `id`, if it exists.
    pub fn get(&self, id: PhoneId) -> Option<&Phone> {
        self.phones.get(id as usize)
    }

    /// The id of a bare symbol (no stress mark).
    ///
    /// ```
    /// let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    /// assert!(set.lookup("AA").is_some());
    /// assert_eq!(set.lookup("AA1"), None);
    /// ```
    pub fn lookup(&self, symbol: &str) -> Option<PhoneId> {
        self.by_symbol.get(symbol).copied()
    }

    /// Splits a declared stress mark off the end of `token`. Purely lexical: the bare part
    /// need not be a valid symbol. A token that is itself a symbol is not split.
    ///
    /// ```
    /// use orthoepy::phoneset::{Phoneset, StressLevel};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let (bare, stress) = set.split_stress("AA1");
    /// assert_eq!((bare, stress.map(|s| s.level)), ("AA", Some(StressLevel::Primary)));
    /// assert_eq!(set.split_stress("T").1, None);
    /// ```
    pub fn split_stress<'a>(&self, token: &'a str) -> (&'a str, Option<Stress>) {
        let (bare, mark) = self.stress.split(token, &self.by_symbol);
        (bare, mark.and_then(|i| self.stress.marks.get(i)).cloned())
    }

    /// The declared stress marks, in declaration order.
    pub fn stress_marks(&self) -> &[Stress] {
        &self.stress.marks
    }

    /// Whether every nucleus must carry a stress mark.
    pub fn stress_required(&self) -> bool {
        self.stress.required
    }

    /// The mark written for `level`, if one is declared.
    pub fn mark_for(&self, level: StressLevel) -> Option<&str> {
        self.stress.mark_for(level)
    }
}

#[cfg(test)]
mod tests;
