//! Reading queue files line by line with a length cap, so a hostile file cannot make us allocate
//! without bound (the journal scans its bytes itself, as it must tell torn lines from damaged
//! ones). Writing goes through [`crate::safe_io`].
//!
//! Owns no format; callers decide what a line means.

use std::io::{self, BufRead, Read};

use crate::support::read::{Limit, MIB};

/// The largest queue file read (a queue of 100,000 items is some tens of MiB).
pub const MAX_QUEUE: Limit = Limit { bytes: 256 * MIB, what: "review queue" };

/// The largest journal read (each decision is one line of a few hundred bytes).
pub const MAX_JOURNAL: Limit = Limit { bytes: 256 * MIB, what: "review journal" };

/// Longest line we accept in a queue or journal file (1 MiB).
pub const MAX_LINE: usize = 1 << 20;

/// One raw line of a file.
pub struct RawLine {
    /// 1-based line number.
    pub number: usize,
    /// The text without its line ending.
    pub text: String,
}

/// Why a line could not be read.
#[derive(Debug)]
pub enum LineError {
    /// Reading failed.
    Io(io::Error),
    /// A line was longer than [`MAX_LINE`] bytes (line number).
    TooLong(usize),
    /// A line was not valid UTF-8 (line number).
    NotUtf8(usize),
}

/// Read every line of `reader`, refusing lines longer than [`MAX_LINE`].
pub fn read_lines(reader: impl Read) -> Result<Vec<RawLine>, LineError> {
    let mut reader = io::BufReader::new(reader);
    let mut out = Vec::new();
    loop {
        let mut buf = Vec::new();
        let n = (&mut reader)
            .take(MAX_LINE as u64 + 1)
            .read_until(b'\n', &mut buf)
            .map_err(LineError::Io)?;
        if n == 0 {
            return Ok(out);
        }
        let number = out.len() + 1;
        let terminated = buf.last() == Some(&b'\n');
        if !terminated && buf.len() > MAX_LINE {
            return Err(LineError::TooLong(number));
        }
        if terminated {
            buf.pop();
            if buf.last() == Some(&b'\r') {
                buf.pop();
            }
        }
        let text = String::from_utf8(buf).map_err(|_| LineError::NotUtf8(number))?;
        out.push(RawLine { number, text });
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lines_lose_their_endings_and_are_numbered() {
        let lines = read_lines("a\r\nbc\nd".as_bytes()).unwrap();
        assert_eq!(lines.len(), 3);
        assert_eq!(lines[0].text, "a");
        assert_eq!((lines[1].number, lines[1].text.as_str()), (2, "bc"));
        assert_eq!(lines[2].text, "d");
    }

    #[test]
    fn overlong_line_is_refused() {
        let long = vec![b'x'; MAX_LINE + 10];
        assert!(matches!(read_lines(&long[..]), Err(LineError::TooLong(1))));
    }
}
