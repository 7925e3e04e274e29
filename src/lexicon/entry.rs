//! One row of the lexicon store: a headword with one pronunciation and its bookkeeping.
//!
//! This module owns [`Entry`] and [`Status`]. It knows nothing about phone symbols beyond the
//! store's convention that a pronunciation is phone tokens separated by single spaces.

use compact_str::CompactString;
use std::fmt;
use std::str::FromStr;

/// Where an entry stands in the maintainer's workflow.
///
/// The CSV store writes the lower-case names; anything else in the `status` column is a load error.
///
/// ```
/// use orthoepy::lexicon::Status;
/// assert_eq!("accepted".parse::<Status>().unwrap(), Status::Accepted);
/// assert_eq!(Status::Deprecated.to_string(), "deprecated");
/// assert!("aproved".parse::<Status>().is_err());
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Status {
    /// Came in from an external file and has not been reviewed by a person.
    Imported,
    /// Reviewed and accepted by a person.
    Accepted,
    /// Proposed by a machine (guesser, variant rules) and waiting for review.
    Proposed,
    /// Kept for the record but left out of every export.
    Deprecated,
}

impl Status {
    /// Every status, in the order they are documented.
    pub const ALL: [Status; 4] = [Status::Imported, Status::Accepted, Status::Proposed, Status::Deprecated];

    /// The name used in the store.
    pub fn as_str(self) -> &'static str {
        match self {
            Status::Imported => "imported",
            Status::Accepted => "accepted",
            Status::Proposed => "proposed",
            Status::Deprecated => "deprecated",
        }
    }
}

impl fmt::Display for Status {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The error of parsing a [`Status`] name.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("unknown status {0:?}; expected one of imported, accepted, proposed, deprecated")]
pub struct UnknownStatus(pub String);

impl FromStr for Status {
    type Err = UnknownStatus;
    fn from_str(s: &str) -> Result<Status, UnknownStatus> {
        Status::ALL.into_iter().find(|st| st.as_str() == s).ok_or_else(|| UnknownStatus(s.to_string()))
    }
}

/// One (headword, pronunciation) row of the lexicon.
///
/// ```
/// use orthoepy::lexicon::{Entry, Status};
/// let entry = Entry::new("harbour", "HH AA1 R B ER0");
/// assert_eq!(entry.phones().collect::<Vec<_>>(), ["HH", "AA1", "R", "B", "ER0"]);
/// assert_eq!(entry.status, Status::Accepted);
/// ```
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Entry {
    /// The headword exactly as written (the index uses its normalised form).
    pub word: CompactString,
    /// Phone symbols, stress marks included, separated by single spaces.
    pub pronunciation: CompactString,
    /// Workflow status.
    pub status: Status,
    /// Where the pronunciation came from (free text such as `cmudict`, `review`, `g2p`).
    pub source: CompactString,
    /// An optional confidence or probability.
    pub score: Option<f64>,
    /// A free-text note.
    pub note: CompactString,
    /// Values of extra columns the store does not know, in the file's header order. A boxed
    /// slice (two words, no allocation when empty, as it almost always is) rather than a `Vec`.
    #[serde(skip_serializing_if = "<[String]>::is_empty")]
    pub extra: Box<[String]>,
    /// The 1-based line of the file this entry was read from; 0 when it was not read from a file.
    pub line: usize,
}

impl Entry {
    /// An accepted entry with no source, score or note. Runs of whitespace in the pronunciation
    /// are folded to single spaces.
    pub fn new(word: &str, pronunciation: &str) -> Entry {
        Entry {
            word: CompactString::from(word),
            pronunciation: join_phones(pronunciation.split_whitespace()).into(),
            status: Status::Accepted,
            source: CompactString::default(),
            score: None,
            note: CompactString::default(),
            extra: Box::default(),
            line: 0,
        }
    }

    /// The phone tokens of the pronunciation (stress marks still attached).
    pub fn phones(&self) -> impl Iterator<Item = &str> {
        self.pronunciation.split(' ').filter(|p| !p.is_empty())
    }
}

/// Joins phone tokens with single spaces, the store's pronunciation convention.
///
/// ```
/// assert_eq!(orthoepy::lexicon::join_phones(["K", "AA1", "R"]), "K AA1 R");
/// ```
pub fn join_phones<'a>(phones: impl IntoIterator<Item = &'a str>) -> String {
    let mut out = String::new();
    for phone in phones {
        if !out.is_empty() {
            out.push(' ');
        }
        out.push_str(phone);
    }
    out
}
