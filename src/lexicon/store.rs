//! The lexicon store: a UTF-8 CSV file with a header, one row per (word, pronunciation).
//!
//! This module owns reading the file into [`Entry`] values and writing it back. The columns
//! `word, pronunciation, status, source, score, note` are required; any further columns are kept
//! as they are and written back after the known ones. Rows are saved sorted by normalised headword,
//! then by their order within the word (the variant rank), so loading and saving an unedited store
//! gives back the same bytes and diffs between versions stay small. Saving is atomic and keeps one
//! `.bak`; it refuses to overwrite a file whose content changed since it was loaded. A failed load
//! writes nothing. The module must not interpret phone symbols: that is the phoneset's job.

use super::entry::{Entry, Status};
use super::normalize::{check_controls, check_headword, find_control, normalize_key, HeadwordError, HeadwordPolicy};
use crate::safe_io::{self, Fingerprint};
use crate::support::located::{line_column, origin_of, Located, Position};
use crate::support::read::{read_capped, Limit, ReadError, MIB};
use rayon::prelude::*;
use std::borrow::Cow;
use std::fmt;
use std::path::{Path, PathBuf};

/// The required columns, in the order they are written.
pub const COLUMNS: [&str; 6] = ["word", "pronunciation", "status", "source", "score", "note"];

/// The largest lexicon file accepted; larger files are refused after at most this many bytes.
/// (CMUdict, 135k entries, is about 3.5 MiB.)
pub const MAX_LEXICON: Limit = Limit { bytes: 512 * MIB, what: "lexicon" };

/// What is wrong at one place of a lexicon file.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ParseProblem {
    /// Bytes that are not UTF-8.
    #[error("invalid UTF-8; re-save the file as UTF-8")]
    BadUtf8,
    /// The header lacks a required column.
    #[error("header has no {0:?} column; the header must name word, pronunciation, status, source, score, note")]
    MissingColumn(&'static str),
    /// A column name appears twice in the header.
    #[error("header names column {0:?} twice; rename or remove one")]
    DuplicateColumn(String),
    /// The file has no header line at all.
    #[error("the file is empty; a lexicon needs at least the header line `word,pronunciation,status,source,score,note`")]
    NoHeader,
    /// The headword cannot be used.
    #[error("{0}")]
    Headword(HeadwordError),
    /// The status column holds an unknown name.
    #[error("unknown status {0:?}; use one of imported, accepted, proposed, deprecated")]
    UnknownStatus(String),
    /// The score column holds something that is not a number.
    #[error("score {0:?} is not a number; leave it empty or write a decimal such as 0.85")]
    BadScore(String),
    /// The row has a different number of fields from the header.
    #[error("row has {found} fields but the header has {expected}; quote fields that contain commas")]
    FieldCount {
        /// Fields in the header.
        expected: usize,
        /// Fields in this row.
        found: usize,
    },
    /// A quoted field is still open at the end of the file.
    #[error("the quoted field that starts here is never closed; add the closing `\"` (a quote inside a quoted field is written `\"\"`)")]
    UnterminatedQuote,
    /// A pronunciation holds a control character (tab, newline, NUL, ...).
    #[error("pronunciation holds the control character U+{:04X}; phones are separated by single spaces, remove it", *.0 as u32)]
    ControlInPronunciation(char),
    /// Any other CSV syntax problem.
    #[error("{0}")]
    Csv(String),
}

/// Errors of loading or saving a lexicon store.
#[derive(Debug, thiserror::Error)]
pub enum LexiconError {
    /// The file could not be read, or is larger than [`MAX_LEXICON`].
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The file could not be written (or re-read to check it is unchanged).
    #[error("{}: {reason}", path.display())]
    Io {
        /// The file concerned.
        path: PathBuf,
        /// What the system said.
        reason: std::io::Error,
    },
    /// The content is malformed at a known place.
    #[error("{0}")]
    Parse(Located<ParseProblem>),
    /// The file changed on disk since it was loaded; nothing was written.
    #[error("{}: changed on disk since it was loaded; nothing was written. Reload it and redo the change", path.display())]
    ChangedOnDisk {
        /// The file concerned.
        path: PathBuf,
    },
    /// The file changed on disk while a command was reading it (written in place, not replaced).
    #[error("{}: changed on disk while it was being read; run the command again", path.display())]
    ChangedWhileRead {
        /// The file concerned.
        path: PathBuf,
    },
    /// `save` was called on a lexicon that was not loaded from a file.
    #[error("this lexicon was not loaded from a file; save it with save_as")]
    NoPath,
}

/// How strictly headwords are checked while loading.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LoadMode {
    /// Refuse rows whose headword has surrounding whitespace (the normal mode).
    Strict,
    /// Keep such rows so that the audit can report them and `audit --fix` can trim them.
    Repair,
}

#[derive(Debug, Clone)]
struct Origin {
    path: PathBuf,
    fingerprint: Fingerprint,
    had_bom: bool,
}

/// A lexicon: entries in store order, the extra column names, and the headword policy.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("lexicon.csv");
/// let mut lexicon = Lexicon::from_entries(vec![Entry::new("quay", "K IY1")], HeadwordPolicy::default());
/// lexicon.push(Entry::new("ferry", "F EH1 R IY0"));
/// lexicon.save_as(&path).unwrap();
/// let again = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
/// assert_eq!(again.entries()[0].word, "ferry"); // saved sorted
/// assert_eq!(again.entries().len(), 2);
/// ```
#[derive(Debug, Clone)]
pub struct Lexicon {
    entries: Vec<Entry>,
    extra_columns: Vec<String>,
    policy: HeadwordPolicy,
    origin: Option<Origin>,
}

impl Lexicon {
    /// An in-memory lexicon with no file behind it.
    pub fn from_entries(entries: Vec<Entry>, policy: HeadwordPolicy) -> Lexicon {
        Lexicon { entries, extra_columns: Vec::new(), policy, origin: None }
    }

    /// Loads a store, refusing malformed rows (see [`LoadMode::Strict`]).
    pub fn load(path: &Path, policy: HeadwordPolicy) -> Result<Lexicon, LexiconError> {
        Lexicon::load_with(path, policy, LoadMode::Strict)
    }

    /// Loads a store with the given strictness.
    pub fn load_with(path: &Path, policy: HeadwordPolicy, mode: LoadMode) -> Result<Lexicon, LexiconError> {
        let bytes = read_capped(path, MAX_LEXICON)?;
        Lexicon::from_file_bytes(&bytes, path, policy, mode)
    }

    /// Parses `bytes`, which were just read from `path`, and remembers them as what the file
    /// holds, so that [`save`](Self::save) refuses if the file changes afterwards.
    pub fn from_file_bytes(bytes: &[u8], path: &Path, policy: HeadwordPolicy, mode: LoadMode) -> Result<Lexicon, LexiconError> {
        let mut lexicon = Lexicon::parse(bytes, path, policy, mode)?;
        lexicon.origin = Some(Origin {
            path: path.to_path_buf(),
            fingerprint: Fingerprint::of(bytes),
            had_bom: bytes.starts_with(BOM),
        });
        Ok(lexicon)
    }

    /// Parses store bytes; `path` is used only in error messages.
    pub fn parse(bytes: &[u8], path: &Path, policy: HeadwordPolicy, mode: LoadMode) -> Result<Lexicon, LexiconError> {
        Lexicon::parse_in_chunks(bytes, path, policy, mode, PARALLEL_CHUNK_BYTES)
    }

    /// [`parse`](Self::parse) with the bodies of stores larger than `chunk_bytes` cut into pieces
    /// of about that size, parsed in parallel. The result is the same for every chunk size (the
    /// cuts are made exactly where an RFC 4180 reader ends a record); `parse` uses 1 MiB. Tests
    /// pass small sizes to check that.
    ///
    /// ```
    /// use orthoepy::lexicon::{HeadwordPolicy, LoadMode, Lexicon};
    /// let text = "word,pronunciation,status,source,score,note\nfo\"o,F UW1,imported,,,\"a\nb\"\nquay,K IY1,imported,,,\n";
    /// let path = std::path::Path::new("l.csv");
    /// let whole = Lexicon::parse_in_chunks(text.as_bytes(), path, HeadwordPolicy::default(), LoadMode::Strict, 1 << 20).unwrap();
    /// let cut = Lexicon::parse_in_chunks(text.as_bytes(), path, HeadwordPolicy::default(), LoadMode::Strict, 1).unwrap();
    /// assert_eq!(whole.entries(), cut.entries());
    /// assert_eq!(cut.entries()[0].note, "a\nb");
    /// ```
    pub fn parse_in_chunks(
        bytes: &[u8],
        path: &Path,
        policy: HeadwordPolicy,
        mode: LoadMode,
        chunk_bytes: usize,
    ) -> Result<Lexicon, LexiconError> {
        let body = bytes.strip_prefix(BOM).unwrap_or(bytes);
        let text = std::str::from_utf8(body).map_err(|err| {
            let (line, column) = line_column(body, err.valid_up_to());
            parse_error(path, line, column, ParseProblem::BadUtf8)
        })?;
        let fail = |line: usize, column: usize, problem| parse_error(path, line, column, problem);
        if text.is_empty() {
            return Err(fail(1, 1, ParseProblem::NoHeader));
        }
        let mut reader = csv::ReaderBuilder::new().has_headers(true).flexible(true).from_reader(text.as_bytes());
        let header = reader.headers().map_err(|err| csv_error(err, path, text, 0))?.clone();
        let layout = ColumnLayout::from_header(&header).map_err(|problem| fail(1, 1, problem))?;
        let body_start = reader.position().byte() as usize;
        let body = text.get(body_start..).unwrap_or("");
        let first_line = text[..body_start.min(text.len())].matches('\n').count() + 1;
        let rows = RowParser { text, path, mode, layout: &layout, fields: header.len() };
        // Large stores are cut at record boundaries and parsed on all cores; the first error in
        // file order is the one reported.
        let chunks = split_records(body, first_line, chunk_bytes.max(1)).map_err(|quote| {
            let (line, column) = line_column(text.as_bytes(), body_start + quote);
            fail(line, column, ParseProblem::UnterminatedQuote)
        })?;
        let parsed: Vec<Result<Vec<Entry>, LexiconError>> =
            chunks.par_iter().map(|&(chunk, line)| rows.parse(chunk, line)).collect();
        let mut entries = Vec::with_capacity(parsed.iter().map(|p| p.as_ref().map_or(0, Vec::len)).sum());
        for part in parsed {
            entries.extend(part?);
        }
        let extra_columns = layout.extra.iter().map(|&i| header.get(i).unwrap_or("").to_string()).collect();
        Ok(Lexicon { entries, extra_columns, policy, origin: None })
    }

    /// The entries, in store order. An [`EntryId`](super::EntryId) is an index into this slice.
    pub fn entries(&self) -> &[Entry] {
        &self.entries
    }

    /// The entries for editing. Indexes built before the edit are stale afterwards.
    pub fn entries_mut(&mut self) -> &mut Vec<Entry> {
        &mut self.entries
    }

    /// Adds an entry at the end (it moves to its sorted place on save).
    pub fn push(&mut self, entry: Entry) {
        self.entries.push(entry);
    }

    /// Names of the extra columns kept from the file's header.
    pub fn extra_columns(&self) -> &[String] {
        &self.extra_columns
    }

    /// The headword policy.
    pub fn policy(&self) -> &HeadwordPolicy {
        &self.policy
    }

    /// The file this lexicon was loaded from or last saved to.
    pub fn path(&self) -> Option<&Path> {
        self.origin.as_ref().map(|o| o.path.as_path())
    }

    /// True when the file on disk still holds what was loaded (or last saved).
    pub fn unchanged_on_disk(&self) -> Result<bool, LexiconError> {
        let Some(origin) = &self.origin else { return Ok(false) };
        let now = Fingerprint::of_file(&origin.path)
            .map_err(|reason| LexiconError::Io { path: origin.path.clone(), reason })?;
        Ok(now == Some(origin.fingerprint))
    }

    /// Sorts the entries into store order: normalised headword, then variant rank (the order in
    /// which a word's rows stand now). Saving does this too.
    pub fn sort(&mut self) {
        let policy = self.policy;
        let keys: Vec<Cow<'_, str>> = self.entries.par_iter().map(|e| normalize_key(e.word.trim(), &policy)).collect();
        // A loaded store is in order already: one pass, nothing moved.
        if keys.par_windows(2).all(|pair| pair[0] <= pair[1]) {
            return;
        }
        // By key, then by position: the order of a stable sort by key.
        let mut order: Vec<usize> = (0..keys.len()).collect();
        order.par_sort_unstable_by(|&a, &b| keys[a].cmp(&keys[b]).then(a.cmp(&b)));
        drop(keys);
        // Entry k takes the entry at order[k]: each cycle of the permutation is walked once with
        // swaps, so no second list of entries is held.
        let mut placed = vec![false; order.len()];
        for start in 0..order.len() {
            let mut at = start;
            while !placed[at] {
                placed[at] = true;
                let from = order[at];
                if from == start {
                    break;
                }
                self.entries.swap(at, from);
                at = from;
            }
        }
    }

    /// The bytes [`save`](Self::save) would write: header, then rows in store order.
    pub fn to_csv_bytes(&mut self) -> Vec<u8> {
        self.sort();
        let mut out = Vec::with_capacity(self.entries.len() * 48);
        if self.origin.as_ref().is_some_and(|o| o.had_bom) {
            out.extend_from_slice(BOM);
        }
        let mut writer = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(out);
        let mut row: Vec<String> = COLUMNS.iter().map(|c| c.to_string()).collect();
        row.extend(self.extra_columns.iter().cloned());
        // Writing into a Vec cannot fail; the csv writer's only errors are I/O errors.
        let _ = writer.write_record(&row);
        for entry in &self.entries {
            row.clear();
            row.push(entry.word.to_string());
            row.push(entry.pronunciation.to_string());
            row.push(entry.status.as_str().to_string());
            row.push(entry.source.to_string());
            row.push(entry.score.map(|s| s.to_string()).unwrap_or_default());
            row.push(entry.note.to_string());
            for i in 0..self.extra_columns.len() {
                row.push(entry.extra.get(i).cloned().unwrap_or_default());
            }
            let _ = writer.write_record(&row);
        }
        writer.into_inner().unwrap_or_default()
    }

    /// Saves to the file it was loaded from: atomically, keeping one `.bak`, and only if the file
    /// still holds what was loaded. The comparison is made after the new content is written and
    /// synced, right before the backup and the rename (see [`safe_io::replace_if_unchanged`]), so
    /// an edit someone makes while the lexicon is being saved is refused, not lost.
    pub fn save(&mut self) -> Result<(), LexiconError> {
        let origin = self.origin.clone().ok_or(LexiconError::NoPath)?;
        let bytes = self.to_csv_bytes();
        safe_io::replace_if_unchanged(&origin.path, &bytes, origin.fingerprint, true).map_err(|err| match err {
            safe_io::WriteError::Changed => LexiconError::ChangedOnDisk { path: origin.path.clone() },
            safe_io::WriteError::Io(reason) => LexiconError::Io { path: origin.path.clone(), reason },
        })?;
        self.origin = Some(Origin { fingerprint: Fingerprint::of(&bytes), ..origin });
        Ok(())
    }

    /// Saves to `path` (atomically, with a `.bak` if it exists) and makes it this lexicon's file.
    /// Refuses when `path` is this lexicon's own file and changed on disk.
    pub fn save_as(&mut self, path: &Path) -> Result<(), LexiconError> {
        if self.path() == Some(path) {
            return self.save();
        }
        let had_bom = self.origin.as_ref().is_some_and(|o| o.had_bom);
        self.write_to(path, had_bom)
    }

    fn write_to(&mut self, path: &Path, had_bom: bool) -> Result<(), LexiconError> {
        self.origin = Some(Origin { path: path.to_path_buf(), fingerprint: Fingerprint::of(b""), had_bom });
        let bytes = self.to_csv_bytes();
        safe_io::atomic_write(path, &bytes, true)
            .map_err(|reason| LexiconError::Io { path: path.to_path_buf(), reason })?;
        self.origin = Some(Origin { path: path.to_path_buf(), fingerprint: Fingerprint::of(&bytes), had_bom });
        Ok(())
    }
}

const BOM: &[u8] = b"\xEF\xBB\xBF";

/// Stores larger than this are parsed in chunks of about this size in parallel.
const PARALLEL_CHUNK_BYTES: usize = 1 << 20;

/// Cuts `body` (which starts on line `first_line`) into pieces of at least `chunk` bytes that end
/// at record boundaries: line feeds that end a record for an RFC 4180 reader (Y. Shafranovich,
/// *Common Format and MIME Type for CSV Files*, 2005) as the `csv` crate reads it with its
/// defaults, so each piece reads exactly as it would in the whole file. Returns each piece with
/// its first line, or the byte offset of the quote that opens a field still open at the end of
/// `body`.
///
/// The rules, as that reader applies them: a quote opens a quoted field only at a field's start
/// (the body's start or just after a comma, CR or LF); elsewhere it is an ordinary character
/// (`fo"o` is four letters). Inside a quoted field, commas and line ends belong to the field and
/// a doubled quote is one quote; a single quote closes the quoted part, and whatever follows up to
/// the next comma or line end continues the field unquoted. The scan jumps between quotes and line
/// feeds with `memchr` instead of stepping through every byte: a lexicon has few quotes, so this
/// runs at memory speed on the one thread that must see the whole body before the parallel parse.
fn split_records(body: &str, first_line: usize, chunk: usize) -> Result<Vec<(&str, usize)>, usize> {
    let bytes = body.as_bytes();
    let mut pieces = Vec::new();
    let (mut start, mut line, mut newlines) = (0, first_line, 0);
    let mut at = 0;
    while let Some(found) = memchr::memchr2(b'"', b'\n', &bytes[at..]) {
        let i = at + found;
        if bytes[i] == b'\n' {
            newlines += 1;
            if i + 1 - start >= chunk {
                pieces.push((&body[start..=i], line));
                line += newlines;
                newlines = 0;
                start = i + 1;
            }
            at = i + 1;
            continue;
        }
        let opens_field = i == 0 || matches!(bytes[i - 1], b',' | b'\r' | b'\n');
        if !opens_field {
            at = i + 1;
            continue;
        }
        // Find the quote that closes the field: the first one not doubled.
        let mut inside = i + 1;
        let close = loop {
            match memchr::memchr(b'"', &bytes[inside..]) {
                None => return Err(i),
                Some(q) if bytes.get(inside + q + 1) == Some(&b'"') => inside += q + 2,
                Some(q) => break inside + q,
            }
        };
        newlines += memchr::memchr_iter(b'\n', &bytes[i + 1..close]).count();
        at = close + 1;
    }
    if start < bytes.len() || pieces.is_empty() {
        pieces.push((&body[start..], line));
    }
    Ok(pieces)
}

/// Turns data rows into entries; shared by all chunks of one file.
struct RowParser<'a> {
    text: &'a str,
    path: &'a Path,
    mode: LoadMode,
    layout: &'a ColumnLayout,
    fields: usize,
}

impl RowParser<'_> {
    fn fail(&self, line: usize, field: usize, problem: ParseProblem) -> LexiconError {
        let column = field_column(self.text, line, field);
        parse_error(self.path, line, column, problem)
    }

    fn parse(&self, chunk: &str, first_line: usize) -> Result<Vec<Entry>, LexiconError> {
        let layout = self.layout;
        let mut reader = csv::ReaderBuilder::new().has_headers(false).flexible(true).from_reader(chunk.as_bytes());
        let mut entries = Vec::with_capacity(chunk.len() / 32);
        let mut record = csv::StringRecord::new();
        // Lines are counted here from each record's byte offset (line feeds before it), so CR,
        // LF and CRLF files all report the line an editor shows.
        let (mut counted_to, mut line) = (0usize, first_line);
        loop {
            match reader.read_record(&mut record) {
                Ok(true) => {}
                Ok(false) => break,
                Err(err) => return Err(csv_error(err, self.path, self.text, first_line - 1)),
            }
            let mut start = record.position().map_or(counted_to, |p| p.byte() as usize).clamp(counted_to, chunk.len());
            // After a CR the reader may place the next record at the LF it has yet to skip.
            start += chunk.as_bytes()[start..].iter().take_while(|&&b| b == b'\r' || b == b'\n').count();
            line += chunk.as_bytes()[counted_to..start].iter().filter(|&&b| b == b'\n').count();
            counted_to = start;
            let line = line;
            if record.len() != self.fields {
                if record.len() == 1 && record.get(0) == Some("") {
                    continue; // a blank line
                }
                return Err(self.fail(line, 0, ParseProblem::FieldCount { expected: self.fields, found: record.len() }));
            }
            let field = |i: usize| record.get(i).unwrap_or("");
            let word = field(layout.word);
            let headword_check = match self.mode {
                LoadMode::Strict => check_headword(word),
                LoadMode::Repair if word.is_empty() => Err(HeadwordError::Empty),
                LoadMode::Repair => check_controls(word),
            };
            headword_check.map_err(|e| self.fail(line, layout.word, ParseProblem::Headword(e)))?;
            let pronunciation = field(layout.pronunciation);
            if let Some((_, control)) = find_control(pronunciation) {
                return Err(self.fail(line, layout.pronunciation, ParseProblem::ControlInPronunciation(control)));
            }
            let status_text = field(layout.status);
            let status = status_text
                .parse::<Status>()
                .map_err(|_| self.fail(line, layout.status, ParseProblem::UnknownStatus(status_text.to_string())))?;
            let score_text = field(layout.score);
            let score = if score_text.is_empty() {
                None
            } else {
                match score_text.parse::<f64>() {
                    Ok(v) if v.is_finite() => Some(v),
                    _ => return Err(self.fail(line, layout.score, ParseProblem::BadScore(score_text.to_string()))),
                }
            };
            entries.push(Entry {
                word: word.into(),
                pronunciation: pronunciation.into(),
                status,
                source: field(layout.source).into(),
                score,
                note: field(layout.note).into(),
                extra: layout.extra.iter().map(|&i| field(i).to_string()).collect(),
                line,
            });
        }
        Ok(entries)
    }
}

struct ColumnLayout {
    word: usize,
    pronunciation: usize,
    status: usize,
    source: usize,
    score: usize,
    note: usize,
    extra: Vec<usize>,
}

impl ColumnLayout {
    fn from_header(header: &csv::StringRecord) -> Result<ColumnLayout, ParseProblem> {
        let names: Vec<&str> = header.iter().collect();
        for (i, name) in names.iter().enumerate() {
            if names[..i].contains(name) {
                return Err(ParseProblem::DuplicateColumn(name.to_string()));
            }
        }
        let find = |col: &'static str| names.iter().position(|n| *n == col).ok_or(ParseProblem::MissingColumn(col));
        let [word, pronunciation, status, source, score, note] = [
            find("word")?,
            find("pronunciation")?,
            find("status")?,
            find("source")?,
            find("score")?,
            find("note")?,
        ];
        let extra = (0..names.len()).filter(|&i| !COLUMNS.contains(&names[i])).collect();
        Ok(ColumnLayout { word, pronunciation, status, source, score, note, extra })
    }
}

/// A csv error as a located parse error; `lines_before` is added to the reader's line numbers.
fn csv_error(err: csv::Error, path: &Path, text: &str, lines_before: usize) -> LexiconError {
    let line = err.position().map(|p| p.line() as usize).unwrap_or(1) + lines_before;
    let problem = match err.kind() {
        csv::ErrorKind::UnequalLengths { expected_len, len, .. } => {
            ParseProblem::FieldCount { expected: *expected_len as usize, found: *len as usize }
        }
        _ => ParseProblem::Csv(err.to_string()),
    };
    parse_error(path, line, field_column(text, line, 0), problem)
}

/// A located parse error in the file at `path`.
fn parse_error(path: &Path, line: usize, column: usize, problem: ParseProblem) -> LexiconError {
    LexiconError::Parse(Located::new(origin_of(path), Some(Position::new(line, column)), problem))
}

/// The 1-based character column where field `index` starts on `line` of `text`.
fn field_column(text: &str, line: usize, index: usize) -> usize {
    let Some(raw) = text.lines().nth(line.saturating_sub(1)) else { return 1 };
    let mut field = 0;
    let mut quoted = false;
    for (column, ch) in raw.chars().enumerate() {
        if field == index {
            return column + 1;
        }
        match ch {
            '"' => quoted = !quoted,
            ',' if !quoted => field += 1,
            _ => {}
        }
    }
    raw.chars().count() + 1
}

impl fmt::Display for Lexicon {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.path() {
            Some(p) => write!(f, "{} ({} entries)", p.display(), self.entries.len()),
            None => write!(f, "in-memory lexicon ({} entries)", self.entries.len()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const HEADER: &str = "word,pronunciation,status,source,score,note\n";

    fn parse(text: &str) -> Result<Lexicon, LexiconError> {
        Lexicon::parse(text.as_bytes(), Path::new("l.csv"), HeadwordPolicy::default(), LoadMode::Strict)
    }

    fn problem_at(text: &str) -> (usize, usize, ParseProblem) {
        match parse(text) {
            Err(LexiconError::Parse(at)) => (at.line().unwrap_or(0), at.column().unwrap_or(0), at.message),
            other => panic!("expected a parse error, got {other:?}"),
        }
    }

    #[test]
    fn round_trip_is_byte_identical() {
        let text = format!("{HEADER}ferry,F EH1 R IY0,accepted,review,0.5,\"a note, with comma\"\nquay,K IY1,imported,cmudict,,\nquay,K EY1,imported,cmudict,,\n");
        let mut lexicon = parse(&text).unwrap();
        assert_eq!(String::from_utf8(lexicon.to_csv_bytes()).unwrap(), text);
    }

    #[test]
    fn save_sorts_by_key_and_keeps_variant_order() {
        let text = format!("{HEADER}quay,K IY1,imported,,,\nFerry,F EH1 R IY0,imported,,,\nquay,K EY1,imported,,,\n");
        let mut lexicon = parse(&text).unwrap();
        let out = String::from_utf8(lexicon.to_csv_bytes()).unwrap();
        assert_eq!(out, format!("{HEADER}Ferry,F EH1 R IY0,imported,,,\nquay,K IY1,imported,,,\nquay,K EY1,imported,,,\n"));
    }

    #[test]
    fn sort_is_a_stable_sort_by_key() {
        // Keys in a scrambled order with repeats (several cycles in the permutation, and
        // variants whose relative order must be kept); checked against the standard library's
        // stable sort.
        let entries: Vec<Entry> = (0..500u32)
            .map(|i| {
                let mut entry = Entry::new(&format!("w{}", (i * 7919) % 97), "K IY1");
                entry.note = i.to_string().into();
                entry
            })
            .collect();
        let mut expected = entries.clone();
        expected.sort_by_key(|e| e.word.clone());
        let mut lexicon = Lexicon::from_entries(entries, HeadwordPolicy::default());
        lexicon.sort();
        assert_eq!(lexicon.entries(), expected.as_slice());
    }

    #[test]
    fn extra_columns_survive() {
        let text = "word,pos,pronunciation,status,source,score,note,region\nquay,noun,K IY1,accepted,,,,north\n";
        let mut lexicon = parse(text).unwrap();
        assert_eq!(lexicon.extra_columns(), ["pos", "region"]);
        let out = String::from_utf8(lexicon.to_csv_bytes()).unwrap();
        assert_eq!(out, "word,pronunciation,status,source,score,note,pos,region\nquay,K IY1,accepted,,,,noun,north\n");
    }

    #[test]
    fn errors_name_line_column_and_problem() {
        let (line, column, problem) = problem_at(&format!("{HEADER}ok,K,accepted,,,\nbad,K,aproved,,,\n"));
        assert_eq!((line, column), (3, 7));
        assert_eq!(problem, ParseProblem::UnknownStatus("aproved".into()));

        let (line, column, problem) = problem_at(&format!("{HEADER},K,accepted,,,\n"));
        assert_eq!((line, column, problem), (2, 1, ParseProblem::Headword(HeadwordError::Empty)));

        let (line, _, problem) = problem_at(&format!("{HEADER}quay ,K,accepted,,,\n"));
        assert_eq!(line, 2);
        assert!(matches!(problem, ParseProblem::Headword(HeadwordError::SurroundingWhitespace(_))));

        let (_, column, problem) = problem_at(&format!("{HEADER}quay,K,accepted,,high,\n"));
        assert_eq!((column, problem), (18, ParseProblem::BadScore("high".into())));

        let (line, _, problem) = problem_at("word,pronunciation,status,source,note\n");
        assert_eq!((line, problem), (1, ParseProblem::MissingColumn("score")));

        let (line, _, problem) = problem_at(&format!("{HEADER}quay,K,accepted\n"));
        assert_eq!((line, problem), (2, ParseProblem::FieldCount { expected: 6, found: 3 }));

        let (_, _, problem) = problem_at("");
        assert_eq!(problem, ParseProblem::NoHeader);
    }

    #[test]
    fn bad_utf8_is_located() {
        let mut bytes = format!("{HEADER}ok,K,accepted,,,\nca").into_bytes();
        bytes.extend_from_slice(b"\xff,K,accepted,,,\n");
        match Lexicon::parse(&bytes, Path::new("l.csv"), HeadwordPolicy::default(), LoadMode::Strict) {
            Err(LexiconError::Parse(at)) if at.message == ParseProblem::BadUtf8 => {
                assert_eq!(at.position, Some(Position::new(3, 3)));
            }
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn repair_mode_keeps_whitespace_headwords() {
        let text = format!("{HEADER}quay ,K IY1,accepted,,,\n");
        let lexicon = Lexicon::parse(text.as_bytes(), Path::new("l.csv"), HeadwordPolicy::default(), LoadMode::Repair).unwrap();
        assert_eq!(lexicon.entries()[0].word, "quay ");
    }

    #[test]
    fn save_refuses_a_file_changed_on_disk_and_writes_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, format!("{HEADER}quay,K IY1,accepted,,,\n")).unwrap();
        let mut lexicon = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
        let theirs = format!("{HEADER}pier,P IH1 R,accepted,,,\n");
        std::fs::write(&path, &theirs).unwrap();
        lexicon.push(crate::lexicon::Entry::new("ferry", "F EH1 R IY0"));
        assert!(matches!(lexicon.save(), Err(LexiconError::ChangedOnDisk { .. })));
        assert_eq!(std::fs::read_to_string(&path).unwrap(), theirs);
    }

    #[test]
    fn edit_made_while_saving_is_refused_and_kept_in_the_file() {
        // The race of issue 16: someone edits the lexicon after the save began. The edit must
        // survive in the lexicon (or its .bak); here it is refused and stays in the lexicon.
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, format!("{HEADER}quay,K IY1,accepted,,,\n")).unwrap();
        let mut lexicon = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
        lexicon.push(crate::lexicon::Entry::new("ferry", "F EH1 R IY0"));
        let theirs = format!("{HEADER}pier,P IH1 R,accepted,,,\nquay,K IY1,accepted,,,\n");
        let (target, edit) = (path.clone(), theirs.clone());
        let result = crate::safe_io::with_hook(
            move |stage| {
                if stage == crate::safe_io::HookStage::TempSynced {
                    std::fs::write(&target, &edit).unwrap();
                }
            },
            || lexicon.save(),
        );
        assert!(matches!(result, Err(LexiconError::ChangedOnDisk { .. })), "{result:?}");
        assert_eq!(std::fs::read_to_string(&path).unwrap(), theirs);
        assert!(!crate::safe_io::backup_path(&path).exists());
        let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(left.len(), 1, "no temporary file is left: {left:?}");
    }

    #[test]
    fn save_keeps_a_backup_and_can_save_again() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        let first = format!("{HEADER}quay,K IY1,accepted,,,\n");
        std::fs::write(&path, &first).unwrap();
        let mut lexicon = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
        lexicon.push(crate::lexicon::Entry::new("ferry", "F EH1 R IY0"));
        lexicon.save().unwrap();
        lexicon.push(crate::lexicon::Entry::new("pier", "P IH1 R"));
        lexicon.save().unwrap();
        assert_eq!(std::fs::read_to_string(crate::safe_io::backup_path(&path)).unwrap().lines().count(), 3);
        assert_eq!(std::fs::read_to_string(&path).unwrap().lines().count(), 4);
    }

    #[test]
    fn failed_load_writes_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, "not,a,lexicon\n").unwrap();
        assert!(Lexicon::load(&path, HeadwordPolicy::default()).is_err());
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn records_split_only_outside_quotes() {
        let body = "a,\"x\ny\",1\nb,2\nc,3\n";
        let pieces = split_records(body, 2, 1).unwrap();
        assert_eq!(pieces, [("a,\"x\ny\",1\n", 2), ("b,2\n", 4), ("c,3\n", 5)]);
        assert_eq!(split_records("", 2, 1).unwrap(), [("", 2)]);
        // A quote inside an unquoted field is an ordinary character (as the csv crate reads it);
        // one after a closing quote continues the field unquoted.
        let stray = "fo\"o,1\nb,\"x\ny\"z\"\nc,3\n";
        assert_eq!(split_records(stray, 2, 1).unwrap(), [("fo\"o,1\n", 2), ("b,\"x\ny\"z\"\n", 3), ("c,3\n", 5)]);
        assert_eq!(split_records("a,\"open\nb,2\n", 2, 1), Err(2));
    }

    #[test]
    fn unterminated_quote_at_the_end_is_refused_at_its_start() {
        let (line, column, problem) = problem_at(&format!("{HEADER}ok,K,accepted,,,\nquay,K IY1,accepted,,,\"never closed\n"));
        assert_eq!((line, column, problem), (3, 23, ParseProblem::UnterminatedQuote));
    }

    #[test]
    fn control_characters_in_words_and_pronunciations_are_refused() {
        let (line, column, problem) = problem_at(&format!("{HEADER}ok,K,accepted,,,\nqu\u{0}ay,K IY1,accepted,,,\n"));
        assert_eq!((line, column), (3, 1));
        assert!(matches!(problem, ParseProblem::Headword(HeadwordError::ControlCharacter { character: '\u{0}', .. })));
        let (_, _, problem) = problem_at(&format!("{HEADER}\"new\nyork\",N UW1,accepted,,,\n"));
        assert!(matches!(problem, ParseProblem::Headword(HeadwordError::ControlCharacter { character: '\n', .. })));
        let (line, column, problem) = problem_at(&format!("{HEADER}quay,\"K\tIY1\",accepted,,,\n"));
        assert_eq!((line, column, problem), (2, 6, ParseProblem::ControlInPronunciation('\t')));
        let repair = Lexicon::parse(format!("{HEADER}\"a\tb\",K,accepted,,,\n").as_bytes(), Path::new("l.csv"), HeadwordPolicy::default(), LoadMode::Repair);
        assert!(repair.is_err());
    }

    #[test]
    fn chunked_parse_reports_file_lines() {
        let mut text = String::from(HEADER);
        for i in 0..40_000 {
            text.push_str(&format!("w{i:05},K IY1,accepted,,,\"note with\nnewline\"\n"));
        }
        text.push_str("last,K IY1,bogus,,,\n");
        match parse(&text) {
            Err(LexiconError::Parse(at)) if matches!(at.message, ParseProblem::UnknownStatus(_)) => assert_eq!(at.line(), Some(80_002)),
            other => panic!("{other:?}"),
        }
        text.truncate(text.len() - "last,K IY1,bogus,,,\n".len());
        let mut lexicon = parse(&text).unwrap();
        assert_eq!(lexicon.entries().len(), 40_000);
        assert_eq!(lexicon.entries()[39_999].line, 80_000);
        assert_eq!(lexicon.to_csv_bytes(), text.as_bytes());
    }

    #[test]
    fn byte_order_mark_is_kept() {
        let text = format!("\u{feff}{HEADER}quay,K IY1,accepted,,,\n");
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, &text).unwrap();
        let mut lexicon = Lexicon::load(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(lexicon.to_csv_bytes(), text.as_bytes());
    }
}
