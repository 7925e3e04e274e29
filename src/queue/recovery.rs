//! Checking and repairing a journal: the library side of `orthoepy journal check` and
//! `orthoepy journal repair`.
//!
//! This module owns the report of a journal's state (records, last sequence number, what is
//! applied, every bad line with its number) and the one repair there is: the tail from the first
//! bad line on moves into a side file `NAME.damaged-UNIXTIME` (or `NAME.torn-UNIXTIME` for a
//! write cut short) and the journal is cut back to its good prefix, atomically. The good prefix
//! and the side file together hold exactly the bytes the journal held, so the tool never deletes
//! a decision. It must not decide for the user: the caller asks for confirmation between
//! [`check_journal`] and [`repair_journal`], and the repair refuses when the file changed in
//! between.

use std::path::{Path, PathBuf};

use serde::Serialize;

use super::journal::{move_tail_aside, read_journal, scan, JournalError, JournalProblem, ProblemKind};
use super::ledger::Ledger;
use crate::safe_io::Fingerprint;

/// The bad end of a journal: from its first bad line to the end of the file.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct DamagedTail {
    /// 1-based line where it starts.
    pub from_line: usize,
    /// Byte offset where it starts.
    pub offset: u64,
    /// Its length in bytes.
    pub bytes: u64,
    /// Lines in it.
    pub lines: usize,
    /// Records in it that are good on their own (they move aside with the rest).
    pub records: usize,
    /// Whether it is only a write cut short (which any writing command also keeps aside) or damage.
    pub kind: ProblemKind,
}

/// What `orthoepy journal check` reports about a journal.
#[derive(Debug, Clone, Serialize)]
pub struct JournalReport {
    /// The journal file.
    pub path: PathBuf,
    /// Whether it exists (a missing journal is clean and empty).
    pub exists: bool,
    /// Its size in bytes.
    pub bytes: u64,
    /// Lines in it.
    pub lines: usize,
    /// Good records before the first problem.
    pub records: usize,
    /// Sequence number of the last good record (0 = none).
    pub last_seq: u64,
    /// Highest sequence number marked as merged into the lexicon (0 = none).
    pub applied_through: u64,
    /// Decisions in force that are not merged yet.
    pub pending: usize,
    /// Bad lines: the first one, then up to twenty more.
    pub problems: Vec<JournalProblem>,
    /// Bad lines found but not listed.
    pub unlisted_problems: usize,
    /// The part a repair would move into a side file.
    pub tail: Option<DamagedTail>,
    #[serde(skip)]
    fingerprint: Option<Fingerprint>,
}

impl JournalReport {
    /// True when every line is a good record.
    pub fn is_clean(&self) -> bool {
        self.problems.is_empty()
    }
}

/// Reads and checks a journal without changing anything.
///
/// ```
/// use orthoepy::queue::{check_journal, Record, Journal};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("journal.jsonl");
/// let (mut journal, _) = Journal::open(&path).unwrap();
/// journal.append(Record::Applied { through: 0 }).unwrap();
/// let mut bytes = std::fs::read(&path).unwrap();
/// bytes.extend_from_slice(b"{\"seq\":2,\"rec"); // a write cut short
/// std::fs::write(&path, &bytes).unwrap();
/// let report = check_journal(&path).unwrap();
/// assert_eq!((report.records, report.last_seq), (1, 1));
/// assert_eq!(report.problems[0].line, 2);
/// assert!(!report.is_clean());
/// ```
pub fn check_journal(path: &Path) -> Result<JournalReport, JournalError> {
    let Some(bytes) = read_journal(path)? else {
        return Ok(JournalReport {
            path: path.to_path_buf(),
            exists: false,
            bytes: 0,
            lines: 0,
            records: 0,
            last_seq: 0,
            applied_through: 0,
            pending: 0,
            problems: Vec::new(),
            unlisted_problems: 0,
            tail: None,
            fingerprint: None,
        });
    };
    let scan = scan(path, &bytes)?;
    let ledger = Ledger::replay(&scan.records);
    let tail = scan.problems.first().map(|first| DamagedTail {
        from_line: first.line,
        offset: first.offset,
        bytes: bytes.len() as u64 - first.offset,
        lines: scan.lines + 1 - first.line,
        records: scan.tail_records,
        kind: if scan.problems.iter().any(|p| p.kind == ProblemKind::Damaged) {
            ProblemKind::Damaged
        } else {
            ProblemKind::Torn
        },
    });
    Ok(JournalReport {
        path: path.to_path_buf(),
        exists: true,
        bytes: bytes.len() as u64,
        lines: scan.lines,
        records: scan.records.len(),
        last_seq: scan.records.last().map_or(0, |r| r.seq),
        applied_through: ledger.applied_through(),
        pending: ledger.unapplied().len(),
        problems: scan.problems,
        unlisted_problems: scan.unlisted,
        tail,
        fingerprint: Some(Fingerprint::of(&bytes)),
    })
}

/// What a repair did.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Repaired {
    /// The side file now holding the tail.
    pub side_file: PathBuf,
    /// The tail that moved.
    pub moved: DamagedTail,
    /// Good records left in the journal.
    pub kept_records: usize,
}

/// Moves the bad tail found by `checked` (from [`check_journal`], after the user agreed) into a
/// side file and cuts the journal back to its good prefix. Returns `None` when there was nothing
/// to repair. Refuses, changing nothing, when the file is no longer what was checked. The
/// caller holds the project lock.
///
/// ```
/// use orthoepy::queue::{check_journal, repair_journal, Journal, Record};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("journal.jsonl");
/// let (mut journal, _) = Journal::open(&path).unwrap();
/// journal.append(Record::Applied { through: 0 }).unwrap();
/// let good = std::fs::read(&path).unwrap();
/// let mut bytes = good.clone();
/// bytes.extend_from_slice(b"not a record\n");
/// std::fs::write(&path, &bytes).unwrap();
/// let report = check_journal(&path).unwrap();
/// let repaired = repair_journal(&path, &report).unwrap().unwrap();
/// assert_eq!(std::fs::read(&path).unwrap(), good);
/// assert_eq!(std::fs::read(&repaired.side_file).unwrap(), b"not a record\n");
/// ```
pub fn repair_journal(path: &Path, checked: &JournalReport) -> Result<Option<Repaired>, JournalError> {
    let changed = || JournalError::Changed { path: path.to_path_buf() };
    let bytes = read_journal(path)?;
    let now = bytes.as_deref().map(Fingerprint::of);
    if now != checked.fingerprint || checked.path != path {
        return Err(changed());
    }
    let (Some(bytes), Some(tail)) = (bytes, &checked.tail) else { return Ok(None) };
    let label = match tail.kind {
        ProblemKind::Torn => "torn",
        ProblemKind::Damaged => "damaged",
    };
    let side_file = move_tail_aside(path, &bytes, tail.offset, label)?;
    Ok(Some(Repaired { side_file, moved: tail.clone(), kept_records: checked.records }))
}
