//! The serde shapes of phoneset and schema files, exactly as written in TOML, with source spans
//! kept for error positions. No checking happens here (that is `schema.rs` and `build.rs`), and
//! nothing outside the phoneset module sees these types.

use crate::support::located::line_column;
use std::collections::BTreeMap;
use std::ops::Range;

use serde::Deserialize;
use toml::Spanned;

use super::error::{CheckProblem, PhonesetError};
use crate::support::located::{Located, Position};

/// A phoneset file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawPhoneset {
    pub id: Spanned<String>,
    pub name: Spanned<String>,
    #[serde(default)]
    pub description: Option<String>,
    pub schema: Spanned<String>,
    #[serde(default)]
    pub syllabic_weight: Option<Spanned<f64>>,
    #[serde(default)]
    pub feature: Vec<Spanned<RawFeature>>,
    #[serde(default)]
    pub stress: Option<Spanned<RawStress>>,
    #[serde(default)]
    pub phone: Vec<Spanned<RawPhone>>,
    #[serde(default)]
    pub constraint: Vec<Spanned<RawConstraint>>,
}

/// A schema file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawSchemaFile {
    pub name: Spanned<String>,
    #[serde(default)]
    pub syllabic_weight: Option<Spanned<f64>>,
    #[serde(default)]
    pub feature: Vec<Spanned<RawFeature>>,
}

/// One `[[feature]]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawFeature {
    pub name: Spanned<String>,
    pub classes: Spanned<Vec<Spanned<String>>>,
    #[serde(default)]
    pub required: bool,
    #[serde(default)]
    pub default: Option<Spanned<String>>,
    pub weight: Spanned<f64>,
    pub values: Spanned<Vec<Spanned<String>>>,
    #[serde(default)]
    pub scale: Option<Spanned<Vec<f64>>>,
}

/// The `[stress]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawStress {
    #[serde(default)]
    pub required: bool,
    #[serde(default)]
    pub marks: Vec<Spanned<RawMark>>,
}

/// One stress mark declaration.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawMark {
    pub mark: Spanned<String>,
    pub level: Spanned<String>,
}

/// A bundle as written: feature name → value.
pub(crate) type RawBundle = Spanned<BTreeMap<String, Spanned<String>>>;

/// One `[[phone]]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawPhone {
    pub symbol: Spanned<String>,
    #[serde(default)]
    pub ipa: Option<Spanned<String>>,
    #[serde(default)]
    pub xsampa: Option<Spanned<String>>,
    pub class: Spanned<String>,
    #[serde(default)]
    pub features: Option<RawBundle>,
    #[serde(default)]
    pub targets: Option<Spanned<Vec<RawBundle>>>,
    #[serde(default)]
    pub allophone_of: Vec<Spanned<String>>,
    #[serde(default)]
    pub syllabic: Option<bool>,
    #[serde(default)]
    pub by_stress: Vec<Spanned<RawStressedForm>>,
}

/// One `by_stress` entry of a phone: how it is written at one stress level.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawStressedForm {
    pub level: Spanned<String>,
    pub ipa: Spanned<String>,
    pub xsampa: Spanned<String>,
}

/// One `[[constraint]]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawConstraint {
    pub id: Spanned<String>,
    pub pattern: Spanned<String>,
    pub message: Spanned<String>,
    pub source: Spanned<String>,
}

/// Parses `text` as TOML into `T`, turning parser errors into [`PhonesetError::Syntax`].
pub(crate) fn parse_toml<T: serde::de::DeserializeOwned>(
    text: &str,
    file: &str,
) -> Result<T, PhonesetError> {
    toml::from_str(text).map_err(|e| PhonesetError::Syntax(Located::from_toml(file, text, &e)))
}



/// Collects self-check problems with positions in one source text.
pub(crate) struct Problems<'t> {
    text: &'t str,
    found: Vec<(usize, Position, CheckProblem)>,
}

impl<'t> Problems<'t> {
    /// A collector for problems in `text`.
    pub fn new(text: &'t str) -> Problems<'t> {
        Problems {
            text,
            found: Vec::new(),
        }
    }

    /// Records `problem` at byte span `span`.
    pub fn add(&mut self, span: Range<usize>, problem: CheckProblem) {
        self.found.push((span.start, Position::at_offset(self.text.as_bytes(), span.start), problem));
    }

    /// The 1-based line of byte span `span`.
    pub fn line_of(&self, span: &Range<usize>) -> usize {
        line_column(self.text.as_bytes(), span.start).0
    }

    /// Finishes: `Ok` when no problem was recorded, else [`PhonesetError::Invalid`] in file order.
    pub fn finish(mut self, file: &str) -> Result<(), PhonesetError> {
        if self.found.is_empty() {
            return Ok(());
        }
        self.found.sort_by_key(|(at, _, _)| *at);
        Err(PhonesetError::Invalid(self.found.into_iter().map(|(_, position, problem)| Located::new(file, Some(position), problem)).collect()))
    }
}
