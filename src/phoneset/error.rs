//! Errors of the phoneset module: loading a phoneset file (I/O, size, TOML syntax, self-check
//! problems with line and column) and unknown shipped names. Pronunciation parsing errors live
//! in [`super::pronunciation`]; mapping errors in [`super::mapping`].

use thiserror::Error;

use crate::support::located::Located;
use crate::support::read::ReadError;

/// An error while loading or checking a phoneset file.
#[derive(Debug, Error)]
pub enum PhonesetError {
    /// The file could not be read, is larger than [`super::MAX_FILE`] or is not UTF-8.
    #[error(transparent)]
    Read(#[from] ReadError),
    /// Phoneset text held in memory is larger than [`super::MAX_FILE`].
    #[error("{0}")]
    TooLarge(Located),
    /// The file is not valid TOML, or a table has a field of the wrong type or an unknown field.
    #[error("{0}")]
    Syntax(Located),
    /// The file parsed but failed the self-check; every problem found is listed, in file order
    /// (never empty).
    #[error("{}", render_problems(.0))]
    Invalid(Vec<Located<CheckProblem>>),
    /// `Phoneset::shipped` was asked for a name that is not shipped.
    #[error("no shipped phoneset is called `{id}`; shipped ones: {known}")]
    UnknownShipped {
        /// The requested name.
        id: String,
        /// The shipped names, comma separated.
        known: String,
    },
}

fn render_problems(problems: &[Located<CheckProblem>]) -> String {
    let file = problems.first().map_or("", |p| p.origin.as_str());
    let mut out = format!("{file}: {} problem(s) found by the phoneset self-check", problems.len());
    for p in problems {
        out.push_str(&format!("\n  {p}"));
    }
    out
}

/// One thing the phoneset self-check rejects. Each message says what to do.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum CheckProblem {
    /// `schema = "..."` names no shipped schema and the file defines no `[[feature]]` tables.
    #[error("unknown schema `{name}`: use a shipped schema ({known}) or define [[feature]] tables in this file")]
    UnknownSchema {
        /// The name given.
        name: String,
        /// Shipped schema names.
        known: String,
    },
    /// An inline schema reuses the name of a shipped schema.
    #[error("inline schema is called `{name}` like a shipped schema; give it a name of its own")]
    SchemaShadowsShipped {
        /// The name.
        name: String,
    },
    /// Two `[[feature]]` tables share a name.
    #[error("feature `{name}` is defined twice; merge the two definitions")]
    DuplicateFeature {
        /// The feature name.
        name: String,
    },
    /// A feature uses a name the module reserves (`class`, `syllabic`).
    #[error("`{name}` is a reserved name (it is a property of every phone); rename the feature")]
    ReservedFeature {
        /// The feature name.
        name: String,
    },
    /// A feature definition is inconsistent (empty values, bad scale, bad weight, ...).
    #[error("feature `{feature}`: {message}")]
    BadFeature {
        /// The feature name.
        feature: String,
        /// What is wrong, and what to do.
        message: String,
    },
    /// A phone class name other than consonant, vowel, diphthong.
    #[error("unknown phone class `{value}`: use consonant, vowel or diphthong")]
    UnknownClass {
        /// The value given.
        value: String,
    },
    /// A symbol is empty or contains whitespace.
    #[error("symbol `{symbol}` is empty or contains whitespace; symbols are separated by spaces in pronunciations")]
    BadSymbol {
        /// The symbol.
        symbol: String,
    },
    /// A symbol is declared twice.
    #[error("symbol `{symbol}` is already declared on line {first_line}; symbols must be unique")]
    DuplicateSymbol {
        /// The symbol.
        symbol: String,
        /// Line of the first declaration.
        first_line: usize,
    },
    /// A phone lacks a required text field (`ipa`, `xsampa`).
    #[error("phone `{phone}` has no `{field}`; add its {field} transcription")]
    MissingField {
        /// The phone's symbol.
        phone: String,
        /// The field.
        field: &'static str,
    },
    /// A feature name that the schema does not have.
    #[error("unknown feature `{feature}`; the schema has: {known}")]
    UnknownFeature {
        /// The name given.
        feature: String,
        /// The schema's feature names.
        known: String,
    },
    /// A feature that the schema does not define for this class.
    #[error("feature `{feature}` does not apply to a {class}; remove it")]
    FeatureNotForClass {
        /// The feature.
        feature: String,
        /// The class.
        class: &'static str,
    },
    /// A value that the feature does not have.
    #[error("`{value}` is not a value of feature `{feature}`; allowed: {allowed}")]
    UnknownValue {
        /// The feature.
        feature: String,
        /// The value given.
        value: String,
        /// The allowed values.
        allowed: String,
    },
    /// A required feature is missing.
    #[error("phone `{phone}` lacks feature `{feature}`, required for a {class}")]
    MissingFeature {
        /// The phone's symbol.
        phone: String,
        /// The missing feature.
        feature: String,
        /// The class that requires it.
        class: &'static str,
    },
    /// Diphthong targets missing, or targets on a non-diphthong.
    #[error("phone `{phone}`: {message}")]
    BadTargets {
        /// The phone's symbol.
        phone: String,
        /// What is wrong.
        message: &'static str,
    },
    /// A `by_stress` rendering is unusable (unknown level, given twice, empty, or on a phone
    /// that cannot carry stress).
    #[error("phone `{phone}`: by_stress: {message}")]
    BadStressedForm {
        /// The phone's symbol.
        phone: String,
        /// What is wrong, and what to do.
        message: String,
    },
    /// Two phones share a feature bundle and neither is an allophone of the other.
    #[error("phone `{symbol}` has the same features as `{other}` (line {other_line}); change one, or mark one `allophone_of` the other")]
    SameBundle {
        /// The later phone.
        symbol: String,
        /// The earlier phone.
        other: String,
        /// Line of the earlier phone.
        other_line: usize,
    },
    /// `allophone_of` names an unknown symbol or the phone itself.
    #[error("`allophone_of` of `{phone}` names `{base}`, which is {why}")]
    BadAllophoneBase {
        /// The allophone.
        phone: String,
        /// The base named.
        base: String,
        /// "not a symbol of this phoneset" or "the phone itself".
        why: &'static str,
    },
    /// More phones than a [`super::PhoneId`] can number.
    #[error("{count} phones is more than the {max} a phoneset may have")]
    TooManyPhones {
        /// Phones found.
        count: usize,
        /// The maximum.
        max: usize,
    },
    /// A stress mark is badly formed or clashes with a symbol.
    #[error("stress mark `{mark}`: {message}")]
    BadStressMark {
        /// The mark.
        mark: String,
        /// What is wrong, and what to do.
        message: String,
    },
    /// A phonotactic constraint is badly formed.
    #[error("constraint `{id}`: {message}")]
    BadConstraint {
        /// The constraint id (may be empty).
        id: String,
        /// What is wrong, and what to do.
        message: String,
    },
}
