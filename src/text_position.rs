//! Positions in text files for error messages: a byte offset turned into the 1-based line and
//! character column people see in their editor.
//!
//! Every reader of untrusted files (lexicon store, project, phoneset, rule files, PLS) reports its
//! errors through this one function, so they all count lines and columns the same way.

/// 1-based line and character column of byte `offset` in `bytes` (clamped to the end). Columns
/// count Unicode scalar values; bytes that are not UTF-8 count one each.
///
/// ```
/// use orthoepy::text_position::line_column;
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
