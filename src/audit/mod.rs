//! The lexicon audit: checks that find what is really wrong with entries, a report for people and
//! machines, and the few repairs that are safe to make without asking.
//!
//! Every check is one small type in its own file behind the [`Check`] trait. The per-entry work
//! every check needs (headword keys, word groups, phone parses) is done once by [`Context::new`]
//! and shared; checks run in parallel. A check must not cry wolf: each one documents what it
//! deliberately lets through. [`Finding`] is a plain serialisable value carrying the entry index, so
//! other modules (the review queue) can take findings as work items. This module never writes a
//! file itself: [`fix`] edits a [`Lexicon`](crate::lexicon::Lexicon) in memory and the caller saves
//! it with [`Lexicon::save`](crate::lexicon::Lexicon::save).
//!
//! ```
//! use orthoepy::audit::{self, Context, Severity};
//! use orthoepy::lexicon::{Entry, HeadwordPolicy};
//! use orthoepy::phoneset::Phoneset;
//! use orthoepy::audit::StressPolicy;
//!
//! let entries = vec![Entry::new("quay", "K IY1"), Entry::new("quay", "K IY1"), Entry::new("pier", "P IH1 XR")];
//! let phoneset = Phoneset::shipped("en-arpa").unwrap();
//! let stress = StressPolicy::default();
//! let context = Context::new(&entries, HeadwordPolicy::default(), &phoneset, &stress);
//! let report = audit::run(&context, &audit::all_checks(), None);
//! let checks: Vec<&str> = report.findings.iter().map(|f| &*f.check).collect();
//! assert_eq!(checks, ["unknown-phone", "duplicate-entry"]);
//! assert_eq!(report.count_at_least(Severity::Error), 2);
//! ```

mod bad_stress_mark;
mod context;
mod duplicate_entry;
mod empty_pronunciation;
pub mod fix;
mod headword_form;
mod invisible_character;
mod length_outlier;
mod missing_primary_stress;
mod mixed_script;
mod multiple_primary_stress;
mod no_nucleus;
mod normalization_duplicate;
mod phonotactic;
mod policy;
mod redundant_variant;
mod report;
mod unknown_phone;
mod unlikely;

pub use context::{spelling_key, Context, ParsedEntry, Token, Tokens};
pub use invisible_character::{invisible_characters, Invisible, InvisibleChar};
pub use mixed_script::is_mixed_script;
pub use policy::{PrimaryStressPolicy, StressPolicy};
pub use report::{CheckSummary, Report, Summary};
pub use unlikely::{unlikely_cache_folder, unlikely_pronunciations, UnlikelyError, UnlikelyOptions, UnlikelyPronunciation, UNLIKELY_PRONUNCIATION};

use compact_str::CompactString;
use crate::lexicon::{Entry, EntryId};
use std::borrow::Cow;
use std::fmt;
use std::str::FromStr;

/// How bad a finding is. Ordered: `Info < Warning < Error`.
///
/// ```
/// use orthoepy::audit::Severity;
/// assert!(Severity::Error > Severity::Warning);
/// assert_eq!("warning".parse::<Severity>().unwrap(), Severity::Warning);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    /// Worth knowing; usually legitimate.
    Info,
    /// Probably wrong; a person should look.
    Warning,
    /// Wrong: a build using this entry will misbehave.
    Error,
}

impl Severity {
    /// The lower-case name used in reports.
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Info => "info",
            Severity::Warning => "warning",
            Severity::Error => "error",
        }
    }
}

impl fmt::Display for Severity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The error of parsing a severity name.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("unknown severity {0:?}; use error, warning or info")]
pub struct UnknownSeverity(pub String);

impl FromStr for Severity {
    type Err = UnknownSeverity;
    fn from_str(s: &str) -> Result<Severity, UnknownSeverity> {
        [Severity::Info, Severity::Warning, Severity::Error]
            .into_iter()
            .find(|v| v.as_str() == s)
            .ok_or_else(|| UnknownSeverity(s.to_string()))
    }
}

/// One problem with one entry: what, where, why, and how to fix it when that is known.
///
/// A plain value (serialisable both ways) so findings can be stored or queued for review.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Finding {
    /// The stable kebab-case id of the check, e.g. `unknown-phone` (borrowed from the check, owned
    /// when read back).
    pub check: Cow<'static, str>,
    /// How bad it is.
    pub severity: Severity,
    /// Index of the entry in [`Lexicon::entries`](crate::lexicon::Lexicon::entries).
    pub entry: EntryId,
    /// The headword as written.
    pub word: CompactString,
    /// The 1-based line of the entry in its file (0 when not read from a file).
    pub line: usize,
    /// The pronunciation as written.
    pub pronunciation: CompactString,
    /// What is wrong, in a sentence.
    pub message: String,
    /// The repair to make, when the check knows one.
    /// (Borrowed when it is a fixed text, as the suggestions of most checks are.)
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub suggestion: Option<Cow<'static, str>>,
    /// Other entries involved (the earlier duplicate, the other spelling, ...).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub related: Vec<EntryId>,
}

impl Finding {
    /// A finding about `entries[id]` with no suggestion.
    pub fn new(check: &'static str, severity: Severity, id: EntryId, entry: &Entry, message: String) -> Finding {
        Finding {
            check: Cow::Borrowed(check),
            severity,
            entry: id,
            word: entry.word.clone(),
            line: entry.line,
            pronunciation: entry.pronunciation.clone(),
            message,
            suggestion: None,
            related: Vec::new(),
        }
    }

    /// The same finding with a suggested repair.
    pub fn suggest(mut self, suggestion: impl Into<Cow<'static, str>>) -> Finding {
        self.suggestion = Some(suggestion.into());
        self
    }

    /// The same finding naming other entries involved.
    pub fn relate(mut self, related: Vec<EntryId>) -> Finding {
        self.related = related;
        self
    }
}

/// One audit check: a small type with a stable id that looks at the prepared [`Context`] and
/// returns its findings. Checks must be cheap to construct and hold no per-run state.
///
/// ```
/// use orthoepy::audit::{Check, Context, Finding, Severity};
///
/// /// Flags headwords longer than 40 characters.
/// struct LongWord;
/// impl Check for LongWord {
///     fn id(&self) -> &'static str { "long-word" }
///     fn severity(&self) -> Severity { Severity::Info }
///     fn description(&self) -> &'static str { "headwords over 40 characters" }
///     fn run(&self, context: &Context<'_>) -> Vec<Finding> {
///         context.each_entry(|id, entry, out| {
///             if entry.word.chars().count() > 40 {
///                 out.push(Finding::new(self.id(), self.severity(), id, entry, "very long headword".into()));
///             }
///         })
///     }
/// }
/// assert_eq!(LongWord.id(), "long-word");
/// ```
pub trait Check: Send + Sync {
    /// Stable kebab-case id used in reports, `--checks` and by other tools.
    fn id(&self) -> &'static str;
    /// The severity of this check's findings (the highest one, when it reports several).
    fn severity(&self) -> Severity;
    /// What the check looks for, in a short phrase.
    fn description(&self) -> &'static str;
    /// Examines the context and returns the findings, in any order.
    fn run(&self, context: &Context<'_>) -> Vec<Finding>;
}

/// Every check, in report order.
pub fn all_checks() -> Vec<Box<dyn Check>> {
    vec![
        Box::new(unknown_phone::UnknownPhone),
        Box::new(bad_stress_mark::BadStressMark),
        Box::new(empty_pronunciation::EmptyPronunciation),
        Box::new(missing_primary_stress::MissingPrimaryStress),
        Box::new(multiple_primary_stress::MultiplePrimaryStress),
        Box::new(no_nucleus::NoNucleus),
        Box::new(phonotactic::Phonotactic),
        Box::new(duplicate_entry::DuplicateEntry),
        Box::new(normalization_duplicate::NormalizationDuplicate),
        Box::new(headword_form::HeadwordForm),
        Box::new(invisible_character::InvisibleCharacter),
        Box::new(mixed_script::MixedScript),
        Box::new(redundant_variant::RedundantVariant),
        Box::new(length_outlier::LengthOutlier),
    ]
}

/// Errors of choosing checks.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum AuditError {
    /// A check id that no check has.
    #[error("no check is called {id:?}{}; the checks are: {known}", suggestion.as_ref().map(|s| format!(" (did you mean {s:?}?)")).unwrap_or_default())]
    UnknownCheck {
        /// The id asked for.
        id: String,
        /// The closest real id, when one is close.
        suggestion: Option<String>,
        /// Every id, comma-separated.
        known: String,
    },
}

/// The checks named by `ids` (in report order), or an error naming the first unknown id.
///
/// ```
/// let checks = orthoepy::audit::select_checks(&["duplicate-entry", "unknown-phone"]).unwrap();
/// assert_eq!(checks.iter().map(|c| c.id()).collect::<Vec<_>>(), ["unknown-phone", "duplicate-entry"]);
/// assert!(orthoepy::audit::select_checks(&["unknown-phones"]).is_err());
/// ```
pub fn select_checks(ids: &[&str]) -> Result<Vec<Box<dyn Check>>, AuditError> {
    let all = all_checks();
    if let Some(bad) = ids.iter().find(|id| !all.iter().any(|c| c.id() == **id)) {
        let suggestion = all
            .iter()
            .map(|c| (strsim::levenshtein(c.id(), bad), c.id()))
            .filter(|(d, _)| *d <= 3)
            .min()
            .map(|(_, id)| id.to_string());
        let known = all.iter().map(|c| c.id()).collect::<Vec<_>>().join(", ");
        return Err(AuditError::UnknownCheck { id: bad.to_string(), suggestion, known });
    }
    Ok(all.into_iter().filter(|c| ids.contains(&c.id())).collect())
}

/// Runs `checks` over the prepared context (each in parallel) and gathers the report. `file` names the
/// lexicon in text output.
pub fn run(context: &Context<'_>, checks: &[Box<dyn Check>], file: Option<&str>) -> Report {
    // One check at a time (each runs on all cores itself), its findings moved into the report
    // before the next runs: only one check's working memory is held beside the findings so far.
    Report::new(file, context.entries().len(), checks, checks.iter().map(|check| check.run(context)))
}
