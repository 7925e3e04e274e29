//! One shape for "a problem at a place in a file": [`Located`] holds where (the file's path or
//! an origin such as `shipped:en`, and a [`Position`] when one is known) and what (a message,
//! or a typed problem). Every reader's error that is about a place in a file carries this, so
//! every such message reads `origin:line:column: message` the same way, and a problem with no
//! known place reads `origin: message` — never with a made-up `1:1` or `0:0`.
//!
//! It also owns the arithmetic of positions: a byte offset turned into the 1-based line and
//! character column people see in their editor ([`line_column`]), and a TOML parser error
//! turned into a located one ([`Located::from_toml`]). It must not decide what is wrong with a
//! file; callers bring the message.

use std::fmt;
use std::path::Path;

/// 1-based line and character column of byte `offset` in `bytes` (clamped to the end). Columns
/// count Unicode scalar values; bytes that are not UTF-8 count one each.
///
/// ```
/// use orthoepy::support::located::line_column;
/// assert_eq!(line_column(b"quay\nf\xc3\xa9rry", 9), (2, 4)); // after "fér"
/// assert_eq!(line_column(b"quay", 99), (1, 5));
/// ```
pub fn line_column(bytes: &[u8], offset: usize) -> (usize, usize) {
    let before = &bytes[..offset.min(bytes.len())];
    let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
    let start = before.iter().rposition(|&b| b == b'\n').map_or(0, |i| i + 1);
    let column = String::from_utf8_lossy(&before[start..]).chars().count() + 1;
    (line, column)
}

/// Line and column of byte offsets asked for in increasing order, counted on from the last one:
/// a reader that places many items of one large text (a document on a single line of 256 MiB)
/// pays one pass over it, not one per item. An offset before the last one counts again from
/// the start. Agrees with [`line_column`] on UTF-8 text.
///
/// ```
/// use orthoepy::support::located::{Cursor, Position};
/// let text = "quay\nfé rry";
/// let mut cursor = Cursor::new(text.as_bytes());
/// assert_eq!(cursor.position(2), Position::new(1, 3));
/// assert_eq!(cursor.position(text.find('r').unwrap()), Position::new(2, 4));
/// assert_eq!(cursor.position(0), Position::new(1, 1));
/// ```
#[derive(Debug, Clone)]
pub struct Cursor<'a> {
    text: &'a [u8],
    offset: usize,
    line: usize,
    column: usize,
}

impl<'a> Cursor<'a> {
    /// A cursor at the start of `text`.
    pub fn new(text: &'a [u8]) -> Cursor<'a> {
        Cursor { text, offset: 0, line: 1, column: 1 }
    }

    /// The position of byte `offset` (clamped to the end).
    pub fn position(&mut self, offset: usize) -> Position {
        let offset = offset.min(self.text.len());
        if offset < self.offset {
            *self = Cursor::new(self.text);
        }
        for &byte in &self.text[self.offset..offset] {
            if byte == b'\n' {
                self.line += 1;
                self.column = 1;
            } else if byte & 0xC0 != 0x80 {
                // Every byte but a UTF-8 continuation byte starts a character.
                self.column += 1;
            }
        }
        self.offset = offset;
        Position::new(self.line, self.column)
    }
}

/// A place in a text file: a 1-based line and, where known, a 1-based character column.
///
/// ```
/// use orthoepy::support::located::Position;
/// assert_eq!(Position::new(3, 7).to_string(), "3:7");
/// assert_eq!(Position::line(3).to_string(), "3");
/// assert_eq!(Position::at_offset(b"a\nbc", 3), Position::new(2, 2));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Position {
    /// 1-based line.
    pub line: usize,
    /// 1-based character column; `None` when the problem concerns the whole line.
    pub column: Option<usize>,
}

impl Position {
    /// Line and column.
    pub fn new(line: usize, column: usize) -> Position {
        Position { line, column: Some(column) }
    }

    /// A whole line.
    pub fn line(line: usize) -> Position {
        Position { line, column: None }
    }

    /// The position of byte `offset` in `text` (see [`line_column`]).
    pub fn at_offset(text: &[u8], offset: usize) -> Position {
        let (line, column) = line_column(text, offset);
        Position::new(line, column)
    }
}

impl fmt::Display for Position {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.column {
            Some(column) => write!(f, "{}:{column}", self.line),
            None => write!(f, "{}", self.line),
        }
    }
}

/// A problem at a place in a file: `origin:line:column: message` when displayed.
///
/// `origin` names the file as the user knows it: its path as given, or `shipped:<id>` for a
/// file built into the program. `position` is `None` when the problem has no single place (a
/// missing key, a mismatch of the whole file); it is then displayed as `origin: message`.
/// The message is a `String` by default, or a typed problem (`Located<ParseProblem>`) where
/// callers match on what went wrong.
///
/// ```
/// use orthoepy::support::located::Located;
/// let e = Located::at("accents/harbour.toml", 4, 9, "unknown phone `XX`");
/// assert_eq!(e.to_string(), "accents/harbour.toml:4:9: unknown phone `XX`");
/// let whole = Located::whole("shipped:en", "written for phoneset `es-ipa`");
/// assert_eq!(whole.to_string(), "shipped:en: written for phoneset `es-ipa`");
/// assert_eq!(whole.line(), None);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct Located<M = String> {
    /// The file's path as given, or `shipped:<id>`.
    pub origin: String,
    /// Where in the file, when known.
    pub position: Option<Position>,
    /// What is wrong and what to do.
    pub message: M,
}

impl<M> Located<M> {
    /// A problem `message` at `position` (or nowhere in particular) of `origin`.
    pub fn new(origin: impl Into<String>, position: Option<Position>, message: M) -> Located<M> {
        Located { origin: origin.into(), position, message }
    }

    /// The 1-based line, when known.
    pub fn line(&self) -> Option<usize> {
        self.position.map(|p| p.line)
    }

    /// The 1-based character column, when known.
    pub fn column(&self) -> Option<usize> {
        self.position.and_then(|p| p.column)
    }

    /// The same place with the message transformed.
    ///
    /// ```
    /// use orthoepy::support::located::Located;
    /// let e = Located::at("a.toml", 1, 2, "bad").map(|m| m.len());
    /// assert_eq!(e.message, 3);
    /// ```
    pub fn map<N>(self, f: impl FnOnce(M) -> N) -> Located<N> {
        Located { origin: self.origin, position: self.position, message: f(self.message) }
    }
}

impl Located<String> {
    /// A problem at a line and column.
    pub fn at(origin: impl Into<String>, line: usize, column: usize, message: impl Into<String>) -> Located {
        Located::new(origin, Some(Position::new(line, column)), message.into())
    }

    /// A problem with a whole line.
    pub fn at_line(origin: impl Into<String>, line: usize, message: impl Into<String>) -> Located {
        Located::new(origin, Some(Position::line(line)), message.into())
    }

    /// A problem with no single place in the file.
    pub fn whole(origin: impl Into<String>, message: impl Into<String>) -> Located {
        Located::new(origin, None, message.into())
    }

    /// A problem at byte `offset` of the file's bytes `text`.
    ///
    /// ```
    /// use orthoepy::support::located::Located;
    /// let text = "id = \"x\"\nrule = 3\n";
    /// let e = Located::at_offset("r.toml", text.as_bytes(), text.find('3').unwrap(), "not a string");
    /// assert_eq!(e.to_string(), "r.toml:2:8: not a string");
    /// ```
    pub fn at_offset(origin: impl Into<String>, text: &[u8], offset: usize, message: impl Into<String>) -> Located {
        Located::new(origin, Some(Position::at_offset(text, offset)), message.into())
    }

    /// A TOML parse or shape error of the file `text`: placed at the start of the span the
    /// parser reports, or nowhere when it reports none; the message is the parser's own.
    ///
    /// ```
    /// use orthoepy::support::located::Located;
    /// let text = "id = \"x\"\nweight = \"heavy\"\n";
    /// #[derive(serde::Deserialize)]
    /// struct File { id: String, weight: f64 }
    /// let err = toml::from_str::<File>(text).err().unwrap();
    /// let e = Located::from_toml("r.toml", text, &err);
    /// assert_eq!(e.line(), Some(2));
    /// assert!(e.to_string().starts_with("r.toml:2:10: "));
    /// ```
    pub fn from_toml(origin: impl Into<String>, text: &str, error: &toml::de::Error) -> Located {
        let position = error.span().map(|span| Position::at_offset(text.as_bytes(), span.start));
        Located::new(origin, position, error.message().trim_end().to_string())
    }
}

/// The origin naming a file on disk: its path as given.
///
/// ```
/// use orthoepy::support::located::origin_of;
/// assert_eq!(origin_of(std::path::Path::new("rules/en.toml")), "rules/en.toml");
/// ```
pub fn origin_of(path: &Path) -> String {
    path.display().to_string()
}

impl<M: fmt::Display> fmt::Display for Located<M> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.position {
            Some(position) => write!(f, "{}:{position}: {}", self.origin, self.message),
            None => write!(f, "{}: {}", self.origin, self.message),
        }
    }
}

impl<M: fmt::Display + fmt::Debug> std::error::Error for Located<M> {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn positions_count_lines_and_characters() {
        // Lines are counted by LF (a CR of CRLF is part of the line); columns count Unicode
        // scalar values, as editors that report "column" by character do (common practice).
        assert_eq!(line_column(b"", 0), (1, 1));
        assert_eq!(line_column(b"ab\r\ncd", 5), (2, 2));
        assert_eq!(line_column("é€x".as_bytes(), 5), (1, 3));
        assert_eq!(line_column(b"\xffab", 2), (1, 3));
    }

    #[test]
    fn the_cursor_agrees_with_line_column() {
        let text = "é\nab\r\n€x\n\nq".as_bytes();
        let mut cursor = Cursor::new(text);
        for offset in 0..=text.len() + 2 {
            let (line, column) = line_column(text, offset);
            assert_eq!(cursor.position(offset), Position::new(line, column), "offset {offset}");
        }
    }

    #[test]
    fn unknown_positions_display_without_numbers() {
        let e = Located::new("q.jsonl", Some(Position::line(7)), "not valid UTF-8".to_string());
        assert_eq!(e.to_string(), "q.jsonl:7: not valid UTF-8");
        assert_eq!(e.column(), None);
        let e = Located::whole("q.jsonl", "empty");
        assert!(!e.to_string().contains(":0") && !e.to_string().contains(":1:1"));
    }

    #[test]
    fn toml_errors_are_placed_by_their_span() {
        let text = "a = 1\nb = [1,\n";
        let err = text.parse::<toml::Table>().err().unwrap();
        let e = Located::from_toml("x.toml", text, &err);
        assert!(e.line().is_some());
        assert!(e.to_string().starts_with("x.toml:"));
        assert!(!e.message.is_empty());
    }
}
