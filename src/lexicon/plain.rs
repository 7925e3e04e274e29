//! Plain-text interchange: the common one-pronunciation-per-line layout used by build systems.
//!
//! A line is a headword, whitespace, then phone symbols separated by whitespace. A headword may
//! carry a `(2)`-style variant suffix, text after `#` is a comment, and blank lines are skipped.
//! Reading keeps every line it can split into a headword and phones, whatever the phones are (the
//! audit judges them), and reports each line it cannot take with its number. Writing produces the
//! deterministic build lexicon: sorted, one line per pronunciation, stress kept or stripped, and the
//! phone inventory that goes with it. This module does not validate phones against a phoneset.

use super::entry::{join_phones, Entry, Status};
use super::index::IndexOptions;
use super::normalize::{find_control, normalize_key, HeadwordPolicy};
use super::store::MAX_LEXICON;
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped, Limit, ReadError};
use std::collections::BTreeSet;
use std::path::Path;

/// The result of reading a plain-text lexicon.
#[derive(Debug, Clone, Default)]
pub struct PlainImport {
    /// Entries read, in file order, with status `imported`.
    pub entries: Vec<Entry>,
    /// Lines that could not be read, each at its line and column of the file.
    pub rejected: Vec<Located>,
    /// Lines that held an entry or a rejected entry (not blank, not comment-only).
    pub content_lines: usize,
}

/// The largest plain-layout file [`read_plain_file`] accepts: the store's limit, as both hold a
/// whole lexicon.
pub const MAX_PLAIN: Limit = Limit { bytes: MAX_LEXICON.bytes, what: "plain lexicon" };

/// Reads the plain-layout file at `path` (at most [`MAX_PLAIN`]); see [`read_plain`].
///
/// ```
/// use orthoepy::lexicon::plain::read_plain_file;
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("words.dict");
/// std::fs::write(&path, "quay K IY1\nferry\n").unwrap();
/// let import = read_plain_file(&path, "harbour").unwrap();
/// assert_eq!(import.entries.len(), 1);
/// assert!(import.rejected[0].to_string().starts_with(&format!("{}:2:6: ", path.display())));
/// ```
pub fn read_plain_file(path: &Path, source: &str) -> Result<PlainImport, ReadError> {
    let bytes = read_capped(path, MAX_PLAIN)?;
    Ok(read_plain(&bytes, &origin_of(path), source))
}

/// Reads the plain layout; `origin` names the file in the rejected lines and `source` is
/// written into every entry's `source` column.
///
/// ```
/// use orthoepy::lexicon::plain::read_plain;
/// let text = b"# harbour words\nquay  K IY1\nquay(2) K EY1 # rare\n\nferry\n";
/// let import = read_plain(text, "harbour.dict", "harbour");
/// assert_eq!(import.entries.len(), 2);
/// assert_eq!(import.entries[1].note, "rare");
/// assert_eq!(import.rejected[0].line(), Some(5)); // a word with no phones
/// ```
pub fn read_plain(bytes: &[u8], origin: &str, source: &str) -> PlainImport {
    let mut import = PlainImport::default();
    let body = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    for (number, raw) in body.split(|&b| b == b'\n').enumerate() {
        let line = number + 1;
        let raw = raw.strip_suffix(b"\r").unwrap_or(raw);
        let text = match std::str::from_utf8(raw) {
            Ok(t) => t,
            Err(err) => {
                import.content_lines += 1;
                let column = crate::support::located::line_column(raw, err.valid_up_to()).1;
                import.rejected.push(Located::at(origin, line, column, "invalid UTF-8; re-save the file as UTF-8"));
                continue;
            }
        };
        let (content, comment) = match text.find('#') {
            Some(i) => (&text[..i], text[i + 1..].trim()),
            None => (text, ""),
        };
        if content.trim().is_empty() {
            continue;
        }
        import.content_lines += 1;
        match parse_line(content) {
            Ok((word, phones)) => {
                let mut entry = Entry::new(word, phones);
                entry.status = Status::Imported;
                entry.source = source.to_string();
                entry.note = comment.to_string();
                entry.line = line;
                import.entries.push(entry);
            }
            Err((column, problem)) => import.rejected.push(Located::at(origin, line, column, problem)),
        }
    }
    import
}

fn parse_line(content: &str) -> Result<(&str, &str), (usize, String)> {
    let start = content.len() - content.trim_start().len();
    let rest = &content[start..];
    let split = rest.find(char::is_whitespace).unwrap_or(rest.len());
    let (head, phones) = rest.split_at(split);
    let column = content[..start].chars().count() + 1;
    let word = strip_variant_suffix(head);
    if word.is_empty() {
        return Err((column, format!("headword {head:?} is only a variant number; write the word before it")));
    }
    if phones.trim().is_empty() {
        let at = column + head.chars().count();
        return Err((at, format!("{word:?} has no pronunciation; add phones after the word or delete the line")));
    }
    // Whitespace (tabs included) separates the fields; any other control character would reach
    // the store and every export.
    let rest_column = column + head.chars().count();
    for (offset, text) in [(column, head), (rest_column, phones)] {
        if let Some((at, control)) = find_control(text).filter(|(_, c)| !c.is_whitespace()) {
            let what = if offset == column { "headword" } else { "pronunciation" };
            return Err((offset + at, format!("{what} holds the control character U+{:04X}; remove it", control as u32)));
        }
    }
    Ok((word, phones.trim()))
}

/// Removes a `(N)` variant suffix: `quay(2)` → `quay`.
///
/// ```
/// use orthoepy::lexicon::plain::strip_variant_suffix;
/// assert_eq!(strip_variant_suffix("quay(2)"), "quay");
/// assert_eq!(strip_variant_suffix("(x)"), "(x)");
/// ```
pub fn strip_variant_suffix(head: &str) -> &str {
    if let Some(inner) = head.strip_suffix(')') {
        if let Some(open) = inner.rfind('(') {
            let digits = &inner[open + 1..];
            if !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit()) {
                return &head[..open];
            }
        }
    }
    head
}

/// Options of the build lexicon writer.
#[derive(Debug, Clone, Default)]
pub struct PlainExport {
    /// Remove stress marks (lines that become identical are written once).
    pub strip_stress: bool,
    /// Mark second and later pronunciations of a word with `(2)`, `(3)`, ...
    pub variant_suffix: bool,
    /// How stress marks are written (used when `strip_stress` is set).
    pub index_options: IndexOptions,
}

/// The build lexicon: its text and the phone inventory it uses.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BuildLexicon {
    /// One line per pronunciation: normalised headword, a space, phones.
    pub text: String,
    /// Every phone symbol used, sorted by code point.
    pub phones: BTreeSet<String>,
    /// Lines written.
    pub lines: usize,
}

/// Writes the build lexicon from entries: deprecated entries are left out; headwords are written as
/// their normalised key (NFC, case-folded when the policy folds case); lines are sorted by headword,
/// then by the order of the word's pronunciations in `entries`.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy};
/// use orthoepy::lexicon::plain::{write_plain, PlainExport};
/// let entries = [Entry::new("Quay", "K IY1"), Entry::new("ferry", "F EH1 R IY0"), Entry::new("quay", "K IY0")];
/// let options = PlainExport { strip_stress: true, ..Default::default() };
/// let build = write_plain(&entries, &HeadwordPolicy::default(), &options);
/// assert_eq!(build.text, "ferry F EH R IY\nquay K IY\n");
/// assert_eq!(build.phones.into_iter().collect::<Vec<_>>(), ["EH", "F", "IY", "K", "R"]);
/// ```
pub fn write_plain(entries: &[Entry], policy: &HeadwordPolicy, options: &PlainExport) -> BuildLexicon {
    let mut rows: Vec<(String, usize, String)> = entries
        .iter()
        .enumerate()
        .filter(|(_, e)| e.status != Status::Deprecated && !e.pronunciation.trim().is_empty())
        .map(|(i, e)| {
            let phones = if options.strip_stress {
                options.index_options.strip_stress(&e.pronunciation)
            } else {
                join_phones(e.pronunciation.split_whitespace())
            };
            (normalize_key(e.word.trim(), policy).into_owned(), i, phones)
        })
        .collect();
    rows.sort();
    let mut build = BuildLexicon { text: String::new(), phones: BTreeSet::new(), lines: 0 };
    let mut seen_for_word: Vec<&str> = Vec::new();
    let mut current: Option<&str> = None;
    for (word, _, phones) in &rows {
        if current != Some(word.as_str()) {
            current = Some(word);
            seen_for_word.clear();
        }
        if seen_for_word.contains(&phones.as_str()) {
            continue;
        }
        seen_for_word.push(phones);
        build.text.push_str(word);
        if options.variant_suffix && seen_for_word.len() > 1 {
            build.text.push_str(&format!("({})", seen_for_word.len()));
        }
        build.text.push(' ');
        build.text.push_str(phones);
        build.text.push('\n');
        build.lines += 1;
        build.phones.extend(phones.split(' ').map(str::to_string));
    }
    build
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn comments_blank_lines_and_tabs() {
        let import = read_plain(b"a\tAH0\n   \n# only a comment\n  b  B IY1   # letter\r\n", "t.dict", "t");
        assert_eq!(import.entries.len(), 2);
        assert_eq!(import.entries[1].pronunciation, "B IY1");
        assert_eq!(import.entries[1].line, 4);
        assert_eq!(import.content_lines, 2);
        assert!(import.rejected.is_empty());
    }

    #[test]
    fn bad_lines_are_reported_with_line_and_column() {
        let import = read_plain(b"ok OW1 K EY1\nlonely\n(3) AH0\nbad\xff W\n", "t.dict", "t");
        assert_eq!(import.entries.len(), 1);
        let found: Vec<(usize, usize)> = import.rejected.iter().map(|r| (r.line().unwrap_or(0), r.column().unwrap_or(0))).collect();
        assert_eq!(found, [(2, 7), (3, 1), (4, 4)]);
    }

    #[test]
    fn control_characters_are_rejected_with_their_column() {
        let import = read_plain(b"qu\0ay K IY1\nferry F EH1\x01 R IY0\nok\tOW1 K EY1\n", "t.dict", "t");
        let found: Vec<(usize, usize)> = import.rejected.iter().map(|r| (r.line().unwrap_or(0), r.column().unwrap_or(0))).collect();
        assert_eq!(found, [(1, 3), (2, 12)]);
        assert_eq!(import.entries.len(), 1, "a tab only separates");
    }

    #[test]
    fn odd_phones_are_kept_for_the_audit() {
        let import = read_plain(b"ferry F EH1 R IY9 XX\n", "t.dict", "t");
        assert_eq!(import.entries[0].pronunciation, "F EH1 R IY9 XX");
    }

    #[test]
    fn export_is_sorted_deduplicated_and_skips_deprecated() {
        let mut old = Entry::new("pier", "P IY1 R");
        old.status = Status::Deprecated;
        let entries = [Entry::new("quay", "K IY1"), Entry::new("quay", "K EY1"), old, Entry::new("pier", "P IH1 R")];
        let options = PlainExport { variant_suffix: true, ..Default::default() };
        let build = write_plain(&entries, &HeadwordPolicy::default(), &options);
        assert_eq!(build.text, "pier P IH1 R\nquay K IY1\nquay(2) K EY1\n");
        assert_eq!(build.lines, 3);
    }
}
