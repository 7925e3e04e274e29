//! Plain-text interchange: the common one-pronunciation-per-line layout used by build systems.
//!
//! A line is a headword, whitespace, then phone symbols separated by whitespace. A headword may
//! carry a `(2)`-style variant suffix, text after `#` is a comment, and blank lines are skipped.
//! A line whose second field is a decimal number (`0.25`, `.5`, `1`, `2e-3`) is in the layout
//! with a pronunciation-probability column that recogniser builds take (word, probability,
//! phones; common practice): the number, which must lie in 0..=1, becomes the entry's score.
//! Phone symbols are never numbers, so a lexicon without the column reads as before.
//! Reading keeps every line it can split into a headword and phones, whatever the phones are (the
//! audit judges them), and reports each line it cannot take with its number. Writing produces the
//! deterministic build lexicon: sorted, one line per pronunciation, stress kept or stripped, with
//! or without the probability column, and the phone inventory that goes with it. This module
//! does not validate phones against a phoneset.

use super::entry::{join_phones, Entry, Status};
use super::index::IndexOptions;
use super::normalize::{normalize_key, HeadwordPolicy};
use super::order::HeadwordGroups;
use super::store::MAX_LEXICON;
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped, Limit, ReadError};
use std::borrow::Cow;
use std::collections::BTreeSet;
use rayon::prelude::*;
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
/// let with = read_plain(b"quay\t0.75\tK IY1\nquay\t0.25\tK EY1\n", "p.dict", "p");
/// assert_eq!((with.entries[1].pronunciation.as_str(), with.entries[1].score), ("K EY1", Some(0.25)));
/// ```
pub fn read_plain(bytes: &[u8], origin: &str, source: &str) -> PlainImport {
    let body = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    // Cut after line feeds into pieces of about PIECE_BYTES, read in parallel; each piece knows
    // the number of its first line, so the result is that of one pass over the file.
    let mut pieces = Vec::new();
    let mut start = 0;
    while start < body.len() {
        let end = (start + PIECE_BYTES).min(body.len());
        let end = body[end..].iter().position(|&b| b == b'\n').map_or(body.len(), |at| end + at + 1);
        pieces.push(&body[start..end]);
        start = end;
    }
    let newlines: Vec<usize> = pieces.par_iter().map(|piece| piece.iter().filter(|&&b| b == b'\n').count()).collect();
    let mut first_line = 1;
    let starts: Vec<usize> = newlines
        .iter()
        .map(|n| {
            let line = first_line;
            first_line += n;
            line
        })
        .collect();
    let parts: Vec<PlainImport> =
        pieces.par_iter().zip(starts).map(|(piece, first_line)| read_piece(piece, first_line, origin, source)).collect();
    let mut import = PlainImport {
        entries: Vec::with_capacity(parts.iter().map(|p| p.entries.len()).sum()),
        ..PlainImport::default()
    };
    for part in parts {
        import.entries.extend(part.entries);
        import.rejected.extend(part.rejected);
        import.content_lines += part.content_lines;
    }
    import
}

/// Bytes of the plain layout one parallel task reads.
const PIECE_BYTES: usize = 1 << 20;

/// Reads `piece`, whole lines of a plain-layout file, the first of which is line `first_line`.
fn read_piece(piece: &[u8], first_line: usize, origin: &str, source: &str) -> PlainImport {
    let mut import = PlainImport::default();
    // A piece ends with its line feed; the empty text after it is no line of the file.
    let piece = piece.strip_suffix(b"\n").unwrap_or(piece);
    for (number, raw) in piece.split(|&b| b == b'\n').enumerate() {
        let line = first_line + number;
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
            Ok((word, probability, phones)) => {
                let mut entry = Entry::new(word, phones);
                entry.score = probability;
                entry.status = Status::Imported;
                entry.source = source.into();
                entry.note = comment.into();
                entry.line = line;
                import.entries.push(entry);
            }
            Err((column, problem)) => import.rejected.push(Located::at(origin, line, column, problem)),
        }
    }
    import
}

/// A content line's headword, probability (when the line has the column) and phones; or the
/// character column and message of why it cannot be read.
fn parse_line(content: &str) -> Result<(&str, Option<f64>, &str), (usize, String)> {
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
        // Every control character is looked at, not only the first: `\x0c\x00` (a form feed,
        // which is whitespace, then a NUL) let the NUL through (found by the plain_import fuzz
        // target; input kept in fuzz/regressions/plain_import/).
        let bad = text.chars().enumerate().find(|(_, c)| c.is_control() && !c.is_whitespace());
        if let Some((at, control)) = bad {
            let what = if offset == column { "headword" } else { "pronunciation" };
            return Err((offset + at, format!("{what} holds the control character U+{:04X}; remove it", control as u32)));
        }
    }
    let (probability, phones) = split_probability(word, phones, rest_column)?;
    Ok((word, probability, phones))
}

/// Splits a leading probability off `rest` (what follows the headword, starting at character
/// `column`) when its first field is a number; the number must be a probability and be followed
/// by phones that do not start with a second number.
fn split_probability<'a>(word: &str, rest: &'a str, column: usize) -> Result<(Option<f64>, &'a str), (usize, String)> {
    let trimmed = rest.trim_start();
    let column = column + rest[..rest.len() - trimmed.len()].chars().count();
    let end = trimmed.find(char::is_whitespace).unwrap_or(trimmed.len());
    let (field, phones) = (&trimmed[..end], trimmed[end..].trim());
    let Some(value) = number(field) else { return Ok((None, trimmed.trim_end())) };
    if !(0.0..=1.0).contains(&value) {
        return Err((column, format!("{field} after {word:?} reads as a pronunciation probability but is not in 0 to 1; write a probability, or remove the column")));
    }
    let phones_column = column + field.chars().count() + trimmed[end..].chars().take_while(|c| c.is_whitespace()).count();
    match phones.split_whitespace().next() {
        None => Err((phones_column, format!("{word:?} has a probability but no pronunciation; add phones after it or delete the line"))),
        Some(next) if number(next).is_some() => Err((
            phones_column,
            format!("{next} is a second number after the probability of {word:?}; this layout is WORD PROBABILITY PHONES with one number (other columns are not read)"),
        )),
        Some(_) => Ok((Some(value), phones)),
    }
}

/// `field` as a number when it is written as one: an optional sign, digits with an optional
/// decimal point (`1`, `0.25`, `.5`, `1.`), an optional exponent (`2e-3`). Nothing else, so no
/// phone symbol is ever taken for one.
fn number(field: &str) -> Option<f64> {
    let unsigned = field.strip_prefix(['+', '-']).unwrap_or(field);
    let (mantissa, exponent) = match unsigned.find(['e', 'E']) {
        Some(i) => (&unsigned[..i], Some(&unsigned[i + 1..])),
        None => (unsigned, None),
    };
    let digits = |s: &str| !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit());
    let mantissa_ok = match mantissa.split_once('.') {
        Some((whole, fraction)) => (digits(whole) || digits(fraction)) && [whole, fraction].iter().all(|p| p.is_empty() || digits(p)),
        None => digits(mantissa),
    };
    let exponent_ok = exponent.map_or(true, |e| digits(e.strip_prefix(['+', '-']).unwrap_or(e)));
    (mantissa_ok && exponent_ok).then(|| field.parse().ok()).flatten()
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
    /// Write `WORD<TAB>PROBABILITY<TAB>PHONES` (see [`write_plain`]).
    pub probability: bool,
    /// How stress marks are written (used when `strip_stress` is set).
    pub index_options: IndexOptions,
}

/// Decimal places of a written pronunciation probability.
pub const PROBABILITY_DECIMALS: usize = 4;

/// The probabilities of a word's pronunciations are written as whole multiples of one in this.
const PROBABILITY_UNITS: u32 = 10u32.pow(PROBABILITY_DECIMALS as u32);

/// The build lexicon: its text and the phone inventory it uses.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BuildLexicon {
    /// One line per pronunciation: normalised headword, a space (a tab, the probability and a
    /// tab with [`PlainExport::probability`]), phones.
    pub text: String,
    /// Every phone symbol used, sorted by code point.
    pub phones: BTreeSet<String>,
    /// Lines written.
    pub lines: usize,
}

impl BuildLexicon {
    fn push_line(&mut self, word: &str, rank: usize, units: Option<u32>, phones: &str, variant_suffix: bool) {
        self.text.push_str(word);
        if variant_suffix && rank > 0 {
            self.text.push_str(&format!("({})", rank + 1));
        }
        match units {
            Some(units) => self.text.push_str(&format!("\t{}\t", probability_text(units))),
            None => self.text.push(' '),
        }
        self.text.push_str(phones);
        self.text.push('\n');
        self.lines += 1;
        for phone in phones.split(' ') {
            if !self.phones.contains(phone) {
                self.phones.insert(phone.to_string());
            }
        }
    }
}

/// Writes the build lexicon from entries: deprecated entries are left out; headwords are written as
/// their normalised key (NFC, case-folded when the policy folds case); lines are sorted by headword,
/// then by the order of the word's pronunciations in `entries`.
///
/// With [`PlainExport::probability`] each line is `WORD<TAB>PROBABILITY<TAB>PHONES`: an entry
/// weighs its score (below zero counts as zero), an entry without a score weighs 1, lines that
/// are one pronunciation (after stress is stripped, say) add their weights, and each word's
/// weights are normalised to sum to 1 (all zero: equal shares). Probabilities are written with
/// [`PROBABILITY_DECIMALS`] decimals, rounded so that a word's written values sum to exactly 1
/// (largest remainders) and a pronunciation of weight above zero never shows 0.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy};
/// use orthoepy::lexicon::plain::{write_plain, PlainExport};
/// let entries = [Entry::new("Quay", "K IY1"), Entry::new("ferry", "F EH1 R IY0"), Entry::new("quay", "K IY0")];
/// let options = PlainExport { strip_stress: true, ..Default::default() };
/// let build = write_plain(&entries, &HeadwordPolicy::default(), &options);
/// assert_eq!(build.text, "ferry F EH R IY\nquay K IY\n");
/// assert_eq!(build.phones.into_iter().collect::<Vec<_>>(), ["EH", "F", "IY", "K", "R"]);
/// let options = PlainExport { probability: true, ..Default::default() };
/// let build = write_plain(&entries, &HeadwordPolicy::default(), &options);
/// assert_eq!(build.text, "ferry\t1.0000\tF EH1 R IY0\nquay\t0.5000\tK IY1\nquay\t0.5000\tK IY0\n");
/// ```
pub fn write_plain(entries: &[Entry], policy: &HeadwordPolicy, options: &PlainExport) -> BuildLexicon {
    let groups = HeadwordGroups::new(entries, policy, |e| e.status != Status::Deprecated && !e.pronunciation.trim().is_empty());
    // Reserved once (see write_pls): word, phones, and room for a suffix or probability column.
    let room: usize = groups.iter().flatten().map(|&id| entries[id].word.len() + entries[id].pronunciation.len() + 16).sum();
    let mut build = BuildLexicon { text: String::with_capacity(room), phones: BTreeSet::new(), lines: 0 };
    let mut rows: Vec<(Cow<'_, str>, f64)> = Vec::new();
    for group in groups.iter() {
        rows.clear();
        rows.extend(group.iter().map(|&id| {
            let entry = &entries[id];
            let phones = if options.strip_stress {
                Cow::Owned(options.index_options.strip_stress(&entry.pronunciation))
            } else {
                single_spaced(&entry.pronunciation)
            };
            (phones, weight(entry))
        }));
        let lines = merged(&rows);
        let units = options.probability.then(|| shares(&lines.iter().map(|l| l.1).collect::<Vec<_>>()));
        let word = normalize_key(entries[group[0]].word.trim(), policy);
        for (rank, (phones, _)) in lines.iter().enumerate() {
            let share = units.as_ref().and_then(|u| u.get(rank).copied());
            build.push_line(&word, rank, share, phones, options.variant_suffix);
        }
    }
    build
}

/// The phones of `pronunciation` joined by single spaces; borrowed when they already are.
fn single_spaced(pronunciation: &str) -> Cow<'_, str> {
    let tidy = !pronunciation.starts_with(' ')
        && !pronunciation.ends_with(' ')
        && !pronunciation.contains("  ")
        && !pronunciation.chars().any(|c| c.is_whitespace() && c != ' ');
    if tidy {
        Cow::Borrowed(pronunciation)
    } else {
        Cow::Owned(join_phones(pronunciation.split_whitespace()))
    }
}

/// The weight of an entry's pronunciation: its score (at least 0), else 1.
fn weight(entry: &Entry) -> f64 {
    entry.score.filter(|s| s.is_finite()).map_or(1.0, |s| s.max(0.0))
}

/// One word's distinct phone strings in order, each with the sum of its rows' weights.
fn merged<'r>(rows: &'r [(Cow<'_, str>, f64)]) -> Vec<(&'r str, f64)> {
    let mut lines: Vec<(&str, f64)> = Vec::new();
    for (phones, weight) in rows {
        match lines.iter_mut().find(|(p, _)| *p == phones.as_ref()) {
            Some(line) => line.1 += weight,
            None => lines.push((phones, *weight)),
        }
    }
    lines
}

/// Weights as shares of [`PROBABILITY_UNITS`] that sum to it exactly: each share rounded down,
/// the units left over given to the largest remainders (first in order on a tie), then every
/// share of a weight above zero raised to at least one unit, taken from the largest share.
fn shares(weights: &[f64]) -> Vec<u32> {
    let top = weights.iter().copied().fold(0.0, f64::max);
    // Scaled by the largest first, so sums of huge scores do not overflow.
    let scaled: Vec<f64> = weights.iter().map(|&w| if top > 0.0 { w / top } else { 1.0 }).collect();
    let total: f64 = scaled.iter().sum();
    let exact: Vec<f64> = scaled.iter().map(|w| w / total * f64::from(PROBABILITY_UNITS)).collect();
    let mut units: Vec<u32> = exact.iter().map(|x| x.floor() as u32).collect();
    let short = PROBABILITY_UNITS.saturating_sub(units.iter().sum());
    let mut by_remainder: Vec<usize> = (0..units.len()).collect();
    by_remainder.sort_by(|&a, &b| (exact[b] - exact[b].floor()).total_cmp(&(exact[a] - exact[a].floor())).then(a.cmp(&b)));
    for &i in by_remainder.iter().cycle().take(short as usize) {
        units[i] += 1;
    }
    for i in 0..units.len() {
        let largest = (0..units.len()).max_by_key(|&j| (units[j], std::cmp::Reverse(j)));
        if let Some(j) = largest.filter(|&j| units[i] == 0 && scaled[i] > 0.0 && units[j] > 1) {
            units[j] -= 1;
            units[i] = 1;
        }
    }
    units
}

/// A share of [`PROBABILITY_UNITS`] as a decimal: `2500` → `0.2500`.
fn probability_text(units: u32) -> String {
    let scale = PROBABILITY_UNITS;
    format!("{}.{:0width$}", units / scale, units % scale, width = PROBABILITY_DECIMALS)
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
    fn pieces_read_in_parallel_keep_file_lines() {
        // More than one piece of PIECE_BYTES: line numbers, rejected lines and entry order must
        // be those of one pass.
        let mut text = String::from("\u{feff}");
        for i in 0..150_000 {
            match i {
                90_000 => text.push_str("lonely\n"),
                120_000 => text.push_str("\n# a comment\r\n"),
                _ => text.push_str(&format!("w{i:06} K IY1\r\n")),
            }
        }
        assert!(text.len() > 2 * PIECE_BYTES);
        let import = read_plain(text.as_bytes(), "t.dict", "t");
        assert_eq!(import.entries.len(), 149_998);
        assert_eq!(import.content_lines, 149_999);
        assert_eq!(import.rejected.iter().map(|r| r.line()).collect::<Vec<_>>(), [Some(90_001)]);
        let last = &import.entries[149_997];
        assert_eq!((last.word.as_str(), last.line), ("w149999", 150_001));
        assert!(import.entries.windows(2).all(|w| w[0].line < w[1].line));
    }

    #[test]
    fn bad_lines_are_reported_with_line_and_column() {
        let import = read_plain(b"ok OW1 K EY1\nlonely\n(3) AH0\nbad\xff W\n", "t.dict", "t");
        assert_eq!(import.entries.len(), 1);
        let found: Vec<(usize, usize)> = import.rejected.iter().map(|r| (r.line().unwrap_or(0), r.column().unwrap_or(0))).collect();
        assert_eq!(found, [(2, 7), (3, 1), (4, 4)]);
    }

    #[test]
    fn a_control_character_after_a_whitespace_one_is_rejected() {
        let import = read_plain(b"afte\x0c\x00oon AE2 F T ER0 N UW1 N\n", "t.dict", "t");
        assert!(import.entries.is_empty(), "{:?}", import.entries);
        assert!(import.rejected[0].message.contains("U+0000"), "{:?}", import.rejected);
    }

    #[test]
    fn fuzz_regressions_write_build_lexicons_that_read_back() {
        // The plain_import fuzz target's property on the inputs it found: what was read, written
        // as a build lexicon, reads back with no line rejected.
        let inputs: [&[u8]; 3] = [
            include_bytes!("../../fuzz/regressions/plain_import/formfeed-then-nul.txt"),
            include_bytes!("../../fuzz/regressions/plain_import/vertical-tab-then-nul.txt"),
            include_bytes!("../../fuzz/regressions/plain_import/formfeed-nul-many.txt"),
        ];
        for input in inputs {
            let first = read_plain(input, "fuzz", "fuzz");
            let written = write_plain(&first.entries, &HeadwordPolicy::default(), &PlainExport::default());
            let again = read_plain(written.text.as_bytes(), "fuzz", "fuzz");
            assert!(again.rejected.is_empty(), "{:?}", again.rejected);
        }
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

    #[test]
    fn a_number_after_the_word_is_a_probability() {
        let import = read_plain(b"quay\t0.75\tK IY1\nquay .25 K EY1\nferry F EH1 R IY0\npier 1 P IH1 R\n", "t.dict", "t");
        assert!(import.rejected.is_empty(), "{:?}", import.rejected);
        let got: Vec<(&str, Option<f64>)> = import.entries.iter().map(|e| (e.pronunciation.as_str(), e.score)).collect();
        assert_eq!(got, [("K IY1", Some(0.75)), ("K EY1", Some(0.25)), ("F EH1 R IY0", None), ("P IH1 R", Some(1.0))]);
    }

    #[test]
    fn numbers_that_are_not_a_probability_are_rejected_where_they_stand() {
        let import = read_plain(b"quay 1.5 K IY1\nquay 0.5\nquay 0.5 0.1 K IY1\nquay -0.2 K IY1\n", "t.dict", "t");
        assert!(import.entries.is_empty());
        let found: Vec<(usize, usize)> = import.rejected.iter().map(|r| (r.line().unwrap_or(0), r.column().unwrap_or(0))).collect();
        assert_eq!(found, [(1, 6), (2, 9), (3, 10), (4, 6)]);
        assert!(import.rejected[0].message.contains("not in 0 to 1"), "{}", import.rejected[0]);
        assert!(import.rejected[1].message.contains("no pronunciation"), "{}", import.rejected[1]);
        assert!(import.rejected[2].message.contains("second number"), "{}", import.rejected[2]);
    }

    #[test]
    fn only_numbers_written_as_numbers_are_taken() {
        for (field, value) in [("0.25", Some(0.25)), (".5", Some(0.5)), ("1.", Some(1.0)), ("1e-4", Some(0.0001)), ("+1", Some(1.0))] {
            assert_eq!(number(field), value, "{field}");
        }
        // Phone symbols of the shipped sets (AH0, ˈa) and things Rust's float parser would take.
        for not in ["AH0", "1a", ".", "e5", "", "0.5.1", "inf", "NaN", "1e", "-", "ˈa", "1_000"] {
            assert_eq!(number(not), None, "{not}");
        }
    }

    #[test]
    fn shares_sum_to_one_and_keep_small_ones_visible() {
        let sum = |u: &[u32]| u.iter().sum::<u32>();
        assert_eq!(shares(&[1.0, 1.0, 1.0]), [3334, 3333, 3333]);
        assert_eq!(shares(&[0.0, 0.0]), [5000, 5000]);
        assert_eq!(shares(&[1.0, 0.0]), [10_000, 0]);
        let tiny = shares(&[1.0, 1e-9, 1e-9]);
        assert_eq!(tiny, [9998, 1, 1]);
        let huge = shares(&[f64::MAX, f64::MAX, 1.0]);
        assert_eq!((sum(&huge), huge[0] + huge[1], huge[2]), (10_000, 9999, 1));
        let odd = shares(&[0.2857, 0.7143]);
        assert_eq!(odd, [2857, 7143]);
        assert_eq!(probability_text(2857), "0.2857");
        assert_eq!(probability_text(10_000), "1.0000");
    }

    #[test]
    fn probabilities_come_from_scores_and_merged_lines_add() {
        let mut variant = Entry::new("butter", "B AH1 DX ER0");
        variant.score = Some(0.25);
        let entries = [Entry::new("butter", "B AH1 T ER0"), variant, Entry::new("quay", "K IY1"), Entry::new("quay", "K IY0"), Entry::new("quay", "K EY1")];
        let options = PlainExport { probability: true, ..Default::default() };
        let build = write_plain(&entries, &HeadwordPolicy::default(), &options);
        assert_eq!(build.text, "butter\t0.8000\tB AH1 T ER0\nbutter\t0.2000\tB AH1 DX ER0\nquay\t0.3334\tK IY1\nquay\t0.3333\tK IY0\nquay\t0.3333\tK EY1\n");
        let stripped = PlainExport { strip_stress: true, variant_suffix: true, ..options };
        let build = write_plain(&entries, &HeadwordPolicy::default(), &stripped);
        assert!(build.text.ends_with("quay\t0.6667\tK IY\nquay(2)\t0.3333\tK EY\n"), "{}", build.text);
    }
}
