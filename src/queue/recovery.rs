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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::queue::{Action, Decision, Journal, Record};

    fn decide(word: &str) -> Record {
        Record::Decide(Decision { item: format!("new:{word}"), word: word.into(), action: Action::Reject, note: String::new() })
    }

    /// A journal of `n` decisions, with every decision up to `applied` merged.
    fn journal(n: usize, applied: u64) -> (tempfile::TempDir, PathBuf) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("j.jsonl");
        let (mut j, _) = Journal::open(&path).unwrap();
        for i in 0..n {
            j.append(decide(&format!("w{i}"))).unwrap();
            if i as u64 + 1 == applied {
                j.append(Record::Applied { through: applied }).unwrap();
            }
        }
        (dir, path)
    }

    /// Replaces line `number` (1-based) of the file with `text`.
    fn replace_line(path: &Path, number: usize, text: &str) {
        let old = std::fs::read_to_string(path).unwrap();
        let lines: Vec<&str> = old.lines().enumerate().map(|(i, l)| if i + 1 == number { text } else { l }).collect();
        std::fs::write(path, lines.join("\n") + "\n").unwrap();
    }

    fn side_files(dir: &Path) -> Vec<PathBuf> {
        let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().path())
            .filter(|p| p.file_name().unwrap().to_string_lossy().contains(".jsonl."))
            .collect();
        v.sort();
        v
    }

    #[test]
    fn clean_journal_reports_its_state() {
        let (_dir, path) = journal(3, 2);
        let report = check_journal(&path).unwrap();
        assert!(report.is_clean());
        // Lines: decide 1, decide 2, applied 3, decide 4.
        assert_eq!((report.records, report.last_seq, report.applied_through, report.pending), (4, 4, 2, 1));
        assert_eq!(report.tail, None);
        assert_eq!(repair_journal(&path, &report).unwrap(), None);
    }

    #[test]
    fn missing_journal_is_clean_and_empty() {
        let dir = tempfile::tempdir().unwrap();
        let report = check_journal(&dir.path().join("none.jsonl")).unwrap();
        assert!(report.is_clean() && !report.exists);
        assert_eq!(repair_journal(&dir.path().join("none.jsonl"), &report).unwrap(), None);
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn check_lists_every_bad_line_and_changes_nothing() {
        let (_dir, path) = journal(6, 0);
        replace_line(&path, 3, "{\"seq\":3,\"garbled");
        let text = std::fs::read_to_string(&path).unwrap();
        let dup = text.lines().nth(3).unwrap().to_string();
        replace_line(&path, 5, &dup); // line 5 repeats line 4's sequence number
        let before = std::fs::read(&path).unwrap();
        let report = check_journal(&path).unwrap();
        let lines: Vec<usize> = report.problems.iter().map(|p| p.line).collect();
        // Line 6 (sequence number 6) then does not follow line 5's 4 either.
        assert_eq!(lines, [3, 5, 6]);
        assert!(report.problems[1].message.contains("repeats"), "{:?}", report.problems);
        assert!(report.problems[2].message.contains("does not follow 4"), "{:?}", report.problems);
        let tail = report.tail.clone().unwrap();
        // Lines 3..=6 move: line 4, 5 and 6 are whole records on their own.
        assert_eq!((tail.from_line, tail.lines, tail.records, tail.kind), (3, 4, 3, ProblemKind::Damaged));
        assert_eq!((report.records, report.last_seq), (2, 2));
        assert_eq!(std::fs::read(&path).unwrap(), before);
    }

    #[test]
    fn repair_moves_the_tail_aside_and_loses_no_byte() {
        let (dir, path) = journal(5, 0);
        replace_line(&path, 3, "{\"seq\":3,\"record\":{\"op\":\"revoke\",\"seq\":1},\"crc\":\"00000000\"}");
        let before = std::fs::read(&path).unwrap();
        let report = check_journal(&path).unwrap();
        let repaired = repair_journal(&path, &report).unwrap().unwrap();
        assert_eq!(repaired.kept_records, 2);
        assert!(repaired.side_file.file_name().unwrap().to_string_lossy().starts_with("j.jsonl.damaged-"));
        let mut joined = std::fs::read(&path).unwrap();
        joined.extend(std::fs::read(&repaired.side_file).unwrap());
        assert_eq!(joined, before, "good prefix + side file = the journal as it was");
        assert!(check_journal(&path).unwrap().is_clean());
        let (mut j, warnings) = Journal::open(&path).unwrap();
        assert!(warnings.is_empty());
        assert_eq!(j.append(decide("again")).unwrap(), 3);
        assert_eq!(side_files(dir.path()), [repaired.side_file]);
    }

    #[test]
    fn torn_tail_repairs_into_a_torn_side_file() {
        let (_dir, path) = journal(2, 0);
        let mut bytes = std::fs::read(&path).unwrap();
        bytes.truncate(bytes.len() - 5);
        std::fs::write(&path, &bytes).unwrap();
        let report = check_journal(&path).unwrap();
        assert_eq!(report.tail.as_ref().map(|t| t.kind), Some(ProblemKind::Torn));
        let repaired = repair_journal(&path, &report).unwrap().unwrap();
        assert!(repaired.side_file.file_name().unwrap().to_string_lossy().starts_with("j.jsonl.torn-"));
    }

    #[test]
    fn repair_refuses_a_file_changed_since_the_check() {
        let (dir, path) = journal(3, 0);
        replace_line(&path, 2, "garbage");
        let report = check_journal(&path).unwrap();
        let mut bytes = std::fs::read(&path).unwrap();
        bytes.extend_from_slice(b"more\n");
        std::fs::write(&path, &bytes).unwrap();
        assert!(matches!(repair_journal(&path, &report), Err(JournalError::Changed { .. })));
        assert_eq!(std::fs::read(&path).unwrap(), bytes);
        assert!(side_files(dir.path()).is_empty());
    }

    #[test]
    fn not_a_journal_cannot_be_checked_or_repaired() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("j.jsonl");
        std::fs::write(&path, b"my notes\n").unwrap();
        assert!(matches!(check_journal(&path), Err(JournalError::NotAJournal { line: 1, .. })));
        assert_eq!(std::fs::read(&path).unwrap(), b"my notes\n");
    }

    #[test]
    fn only_the_first_problems_are_listed() {
        let (_dir, path) = journal(1, 0);
        let mut text = std::fs::read_to_string(&path).unwrap();
        for _ in 0..40 {
            text.push_str("{\"seq\":9,\"bad\n");
        }
        std::fs::write(&path, text).unwrap();
        let report = check_journal(&path).unwrap();
        assert_eq!(report.problems.len() + report.unlisted_problems, 40);
        assert_eq!(report.problems.len(), 21);
    }
}
