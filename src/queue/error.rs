//! Errors of the queue module: every one names the file (and line, column where there is one)
//! and says what to do.

use std::path::PathBuf;

use super::fileio::LineError;
use crate::support::located::{origin_of, Located, Position};
use crate::support::read::ReadError;

/// Everything that can go wrong reading or writing a queue, or applying decisions (the journal
/// has its own [`JournalError`](super::JournalError)).
#[derive(Debug, thiserror::Error)]
pub enum QueueError {
    /// The journal could not be read or written, or is damaged.
    #[error(transparent)]
    Journal(#[from] super::journal::JournalError),
    /// The file could not be read, or is larger than its limit
    /// ([`MAX_QUEUE`](super::MAX_QUEUE), [`MAX_JOURNAL`](super::MAX_JOURNAL)).
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The file could not be written.
    #[error("{}: {reason} (check the path and its permissions)", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// What the system said.
        reason: std::io::Error,
    },
    /// A line could not be parsed (placed at the line, and the column where one is known).
    #[error("{0}")]
    Parse(Located),
}

impl QueueError {
    pub(crate) fn io(path: &std::path::Path, reason: std::io::Error) -> QueueError {
        QueueError::Io { path: path.to_path_buf(), reason }
    }

    /// A parse error at `line`; `column` 0 means the whole line (serde_json also reports 0 when
    /// it has no column).
    pub(crate) fn parse(path: &std::path::Path, line: usize, column: usize, message: String) -> QueueError {
        let position = if column == 0 { Position::line(line) } else { Position::new(line, column) };
        QueueError::Parse(Located::new(origin_of(path), Some(position), message))
    }

    pub(crate) fn from_lines(path: &std::path::Path, err: LineError) -> QueueError {
        match err {
            LineError::Io(e) => QueueError::io(path, e),
            LineError::TooLong(line) => QueueError::parse(
                path,
                line,
                0,
                format!("line longer than {} bytes; this is not a queue file", super::fileio::MAX_LINE),
            ),
            LineError::NotUtf8(line) => {
                QueueError::parse(path, line, 0, "not valid UTF-8; save the file as UTF-8".into())
            }
        }
    }
}
