//! Errors of the variants module: every problem found while reading a rule-set or profile file
//! names the file, line and column and says what to do. This file owns only the error type.

use crate::support::located::{Located, Position};
use crate::support::read::ReadError;

/// A problem with a rule set, a profile, or the data handed to generation.
#[derive(Debug, thiserror::Error)]
pub enum VariantsError {
    /// A rule file or profile could not be read, or is larger than
    /// [`MAX_RULE_FILE`](super::MAX_RULE_FILE).
    #[error(transparent)]
    Read(#[from] ReadError),
    /// Anything wrong at a place in a file: TOML syntax, rule syntax, unknown phone or feature
    /// (the origin is the file's path, or `rules/variants/ID.toml` for a shipped file).
    #[error("{0}")]
    Invalid(Located),
    /// A feature change leads to a feature bundle no phone of the phoneset has.
    #[error("{0}")]
    NoPhoneWithFeatures(Box<Located<NoPhoneWithFeatures>>),
    /// A rule-set or profile id that is neither shipped nor a readable file.
    #[error("unknown {kind} `{id}`; shipped ones are: {}; or give a path to a .toml file", known.join(", "))]
    Unknown {
        /// `rule set` or `profile`.
        kind: &'static str,
        /// What was asked for.
        id: String,
        /// Shipped ids.
        known: Vec<String>,
    },
}

/// Details of [`VariantsError::NoPhoneWithFeatures`] (the place is in the [`Located`] around it).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct NoPhoneWithFeatures {
    /// The phone the change was applied to.
    pub from: String,
    /// The change as written.
    pub change: String,
    /// The resulting bundle, `name=value` joined by commas.
    pub features: String,
    /// Phoneset id.
    pub phoneset: String,
    /// Nearest phone symbols, closest first.
    pub nearest: Vec<String>,
}

impl std::fmt::Display for NoPhoneWithFeatures {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "changing {} by [{}] gives {{{}}}, which no phone in phoneset {} has; nearest by feature distance: {}; restrict the target or name the result phone",
            self.from, self.change, self.features, self.phoneset, self.nearest.join(", ")
        )
    }
}

impl VariantsError {
    /// Builds a located error.
    pub(crate) fn at(file: &str, (line, column): (usize, usize), message: impl Into<String>) -> VariantsError {
        VariantsError::Invalid(Located::new(file, Some(Position::new(line, column)), message.into()))
    }
}
