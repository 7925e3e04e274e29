//! Errors of the queue module: every one names the file (and line, column where there is one)
//! and says what to do.

use std::path::PathBuf;

use super::fileio::LineError;

/// Everything that can go wrong reading or writing a queue, or applying decisions (the journal
/// has its own [`JournalError`](super::JournalError)).
#[derive(Debug, thiserror::Error)]
pub enum QueueError {
    /// The file could not be read or written.
    #[error("{path}: {source} (check the path and its permissions)")]
    Io {
        /// The file.
        path: PathBuf,
        /// What the system said.
        #[source]
        source: std::io::Error,
    },
    /// A line could not be parsed.
    #[error("{path}:{line}:{column}: {message}")]
    Parse {
        /// The file.
        path: PathBuf,
        /// 1-based line.
        line: usize,
        /// 1-based column (0 = whole line).
        column: usize,
        /// What is wrong and what to do.
        message: String,
    },
}

impl QueueError {
    pub(crate) fn io(path: &std::path::Path, source: std::io::Error) -> QueueError {
        QueueError::Io { path: path.to_path_buf(), source }
    }

    pub(crate) fn parse(path: &std::path::Path, line: usize, column: usize, message: String) -> QueueError {
        QueueError::Parse { path: path.to_path_buf(), line, column, message }
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
