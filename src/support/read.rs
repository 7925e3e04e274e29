//! The one size-capped file read. Every file reader of the library reads through
//! [`read_capped`] (or [`read_capped_string`], [`read_capped_from`] for a file already open, or
//! [`checksum_capped`], which hashes a file without keeping it), so a file that is far too large for its format
//! — or no file at all, such as `/dev/zero` or a pipe that never ends — is refused after at
//! most `limit + 1` bytes with an error naming the file and the limit, instead of exhausting
//! memory.
//!
//! The length the file system reports is never trusted to accept a file: the bytes are read
//! through [`Read::take`]`(limit + 1)`, so a device or a file that grows while it is read is
//! caught too. The reported length is used only to refuse a regular file at once when it is
//! already over the limit, and as an allocation hint no larger than the limit. The caps of the
//! formats (project file, phoneset, rule files, lexicon, model, ...) are chosen by the modules
//! that own them; DEVELOPERS.md lists them. This module must not interpret the bytes.

use std::fmt;
use std::fs::File;
use std::io::{self, Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};

use super::located::{origin_of, Located};

/// One mebibyte (2^20 bytes), the unit the caps are written in.
pub const MIB: u64 = 1 << 20;

/// The most bytes a reader accepts, and what kind of file it expects (for the message).
///
/// ```
/// use orthoepy::support::read::{Limit, MIB};
/// const RULES: Limit = Limit { bytes: MIB, what: "letter-to-sound rule file" };
/// assert_eq!(RULES.to_string(), "1 MiB");
/// assert_eq!(Limit { bytes: 1024 * MIB, what: "model file" }.to_string(), "1 GiB");
/// assert_eq!(Limit { bytes: 1500, what: "test" }.to_string(), "1500 bytes");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Limit {
    /// The most bytes accepted.
    pub bytes: u64,
    /// What the file should be, with its article dropped ("phoneset file", "lexicon").
    pub what: &'static str,
}

impl fmt::Display for Limit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.bytes >= 1024 * MIB && self.bytes % (1024 * MIB) == 0 {
            write!(f, "{} GiB", self.bytes / (1024 * MIB))
        } else if self.bytes >= MIB && self.bytes % MIB == 0 {
            write!(f, "{} MiB", self.bytes / MIB)
        } else if self.bytes >= 1024 && self.bytes % 1024 == 0 {
            write!(f, "{} KiB", self.bytes / 1024)
        } else {
            write!(f, "{} bytes", self.bytes)
        }
    }
}

/// Why a file could not be read. The messages are complete (the system's reason included), so
/// none of the fields is an error `source` and a chain printer shows each reason once.
#[derive(Debug, thiserror::Error)]
pub enum ReadError {
    /// The file could not be opened or read.
    #[error("{}: {reason}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// What the system said.
        reason: io::Error,
    },
    /// The file is larger than the limit for its format.
    #[error("{}: larger than {limit}, the most accepted for a {}; check that this is the right file", path.display(), limit.what)]
    TooLarge {
        /// The file.
        path: PathBuf,
        /// The limit it broke.
        limit: Limit,
    },
    /// The file is not valid UTF-8 (placed at the first bad byte).
    #[error("{0}")]
    NotUtf8(Located),
}

impl ReadError {
    /// True if the file does not exist (readers of optional files treat that as empty).
    ///
    /// ```
    /// use orthoepy::support::read::{read_capped, Limit};
    /// let err = read_capped("no/such/file".as_ref(), Limit { bytes: 10, what: "test" }).unwrap_err();
    /// assert!(err.is_not_found());
    /// ```
    pub fn is_not_found(&self) -> bool {
        matches!(self, ReadError::Io { reason, .. } if reason.kind() == io::ErrorKind::NotFound)
    }

    /// The file concerned, as a display origin.
    pub fn origin(&self) -> String {
        match self {
            ReadError::Io { path, .. } | ReadError::TooLarge { path, .. } => origin_of(path),
            ReadError::NotUtf8(at) => at.origin.clone(),
        }
    }
}

/// Reads the whole file at `path`, refusing it once more than `limit.bytes` bytes have come.
///
/// ```
/// use orthoepy::support::read::{read_capped, Limit, ReadError};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("small.txt");
/// std::fs::write(&path, b"quay\n").unwrap();
/// assert_eq!(read_capped(&path, Limit { bytes: 5, what: "test file" }).unwrap(), b"quay\n");
/// let err = read_capped(&path, Limit { bytes: 4, what: "test file" }).unwrap_err();
/// assert!(matches!(err, ReadError::TooLarge { .. }));
/// assert!(err.to_string().ends_with("small.txt: larger than 4 bytes, the most accepted for a test file; check that this is the right file"));
/// ```
pub fn read_capped(path: &Path, limit: Limit) -> Result<Vec<u8>, ReadError> {
    let file = File::open(path).map_err(|reason| ReadError::Io { path: path.to_path_buf(), reason })?;
    read_capped_rest(&file, path, limit)
}

/// [`read_capped`] of a file already open (read from its start), so that the bytes come from
/// the very file that was opened, even if another has been renamed over its path since.
/// `path` only names it in errors.
///
/// ```
/// use orthoepy::support::read::{read_capped_from, Limit};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("store.csv");
/// std::fs::write(&path, b"old\n").unwrap();
/// let file = std::fs::File::open(&path).unwrap();
/// std::fs::write(dir.path().join("new"), b"new\n").unwrap();
/// std::fs::rename(dir.path().join("new"), &path).unwrap();
/// assert_eq!(read_capped_from(&file, &path, Limit { bytes: 10, what: "test" }).unwrap(), b"old\n");
/// ```
pub fn read_capped_from(file: &File, path: &Path, limit: Limit) -> Result<Vec<u8>, ReadError> {
    let mut reader = file;
    reader.seek(SeekFrom::Start(0)).map_err(|reason| ReadError::Io { path: path.to_path_buf(), reason })?;
    read_capped_rest(file, path, limit)
}

/// The rest of a file already open, from where it stands (a pipe or a device cannot seek),
/// capped like [`read_capped`]; `path` only names it in errors.
pub fn read_capped_rest(file: &File, path: &Path, limit: Limit) -> Result<Vec<u8>, ReadError> {
    let io = |reason| ReadError::Io { path: path.to_path_buf(), reason };
    let hint = reported_length(file, path, limit)?;
    let reader = file;
    let mut bytes = Vec::with_capacity(usize::try_from(hint).unwrap_or(0));
    reader.take(limit.bytes.saturating_add(1)).read_to_end(&mut bytes).map_err(io)?;
    if bytes.len() as u64 > limit.bytes {
        return Err(ReadError::TooLarge { path: path.to_path_buf(), limit });
    }
    Ok(bytes)
}

/// The length a regular file reports, refused at once when over `limit` (0 for other files).
fn reported_length(file: &File, path: &Path, limit: Limit) -> Result<u64, ReadError> {
    let reported = file.metadata().ok().filter(|m| m.is_file()).map(|m| m.len());
    if reported.is_some_and(|len| len > limit.bytes) {
        return Err(ReadError::TooLarge { path: path.to_path_buf(), limit });
    }
    Ok(reported.unwrap_or(0))
}

/// The length and CRC-32 (ISO-HDLC, as in zlib and PNG) of a file, and the file itself, open.
#[derive(Debug)]
pub struct Checksummed {
    /// The file, open for reading (at its end).
    pub file: File,
    /// Bytes read.
    pub length: u64,
    /// CRC-32 of those bytes.
    pub crc: u32,
}

/// Opens the file at `path` and checksums it in one pass through a small buffer, holding none of
/// it in memory; refused like [`read_capped`] once more than `limit.bytes` bytes have come.
/// The checksum equals `crc32fast::hash` of what [`read_capped`] returns.
///
/// ```
/// use orthoepy::support::read::{checksum_capped, Limit};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("check.txt");
/// std::fs::write(&path, b"123456789").unwrap();
/// let sum = checksum_capped(&path, Limit { bytes: 100, what: "test" }).unwrap();
/// // The CRC-32 check value of "123456789" (Williams, "A Painless Guide to CRC Error Detection
/// // Algorithms", 1993, the CRC-32 parameter model).
/// assert_eq!((sum.length, sum.crc), (9, 0xCBF4_3926));
/// ```
pub fn checksum_capped(path: &Path, limit: Limit) -> Result<Checksummed, ReadError> {
    /// Small enough to stay in the processor's cache, large enough to need few reads.
    const CHUNK: usize = 256 * 1024;
    let io = |reason| ReadError::Io { path: path.to_path_buf(), reason };
    let file = File::open(path).map_err(io)?;
    reported_length(&file, path, limit)?;
    let mut hasher = crc32fast::Hasher::new();
    let mut length = 0u64;
    let mut buffer = vec![0u8; CHUNK];
    let mut reader = &file;
    loop {
        let got = match reader.read(&mut buffer) {
            Ok(0) => break,
            Ok(got) => got,
            Err(err) if err.kind() == io::ErrorKind::Interrupted => continue,
            Err(err) => return Err(io(err)),
        };
        hasher.update(&buffer[..got]);
        length += got as u64;
        if length > limit.bytes {
            return Err(ReadError::TooLarge { path: path.to_path_buf(), limit });
        }
    }
    Ok(Checksummed { file, length, crc: hasher.finalize() })
}

/// [`read_capped`], then checked to be UTF-8; a bad byte is reported at its line and column.
///
/// ```
/// use orthoepy::support::read::{read_capped_string, Limit, ReadError};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("rules.toml");
/// std::fs::write(&path, b"id = \"x\"\nnote = \"caf\xe9\"\n").unwrap();
/// let err = read_capped_string(&path, Limit { bytes: 100, what: "rule file" }).unwrap_err();
/// assert!(matches!(&err, ReadError::NotUtf8(at) if at.line() == Some(2) && at.column() == Some(12)));
/// ```
pub fn read_capped_string(path: &Path, limit: Limit) -> Result<String, ReadError> {
    let bytes = read_capped(path, limit)?;
    String::from_utf8(bytes).map_err(|e| {
        let offset = e.utf8_error().valid_up_to();
        ReadError::NotUtf8(Located::at_offset(origin_of(path), e.as_bytes(), offset, "not valid UTF-8; save the file as UTF-8"))
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_endless_device_is_refused_after_the_limit() {
        // /dev/zero reports length 0 and never ends (POSIX; Linux man page null(4)).
        let zero = Path::new("/dev/zero");
        if zero.exists() {
            let err = read_capped(zero, Limit { bytes: 4096, what: "lexicon" }).unwrap_err();
            assert!(matches!(err, ReadError::TooLarge { .. }), "{err}");
            assert_eq!(err.to_string(), "/dev/zero: larger than 4 KiB, the most accepted for a lexicon; check that this is the right file");
        }
    }

    #[test]
    fn a_pipe_is_read_from_where_it_stands() {
        // A pipe cannot seek (POSIX lseek: ESPIPE); `orthoepy queue add --words /dev/stdin` reads one.
        let mut ends = [0; 2];
        // SAFETY: pipe(2) fills the two descriptors of the array it is given.
        assert_eq!(unsafe { libc::pipe(ends.as_mut_ptr()) }, 0);
        // SAFETY: the write end was just opened by pipe(2) and is owned here alone.
        let mut writer = unsafe { <File as std::os::fd::FromRawFd>::from_raw_fd(ends[1]) };
        std::io::Write::write_all(&mut writer, b"quay\nkey\n").unwrap();
        drop(writer);
        let path = PathBuf::from(format!("/proc/self/fd/{}", ends[0]));
        let read = read_capped(&path, Limit { bytes: 100, what: "word list" });
        // SAFETY: the read end is ours and no longer used after this.
        unsafe { libc::close(ends[0]) };
        assert_eq!(read.unwrap(), b"quay\nkey\n");
    }

    #[test]
    fn exact_limit_is_accepted_and_one_more_byte_refused() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("f");
        std::fs::write(&path, vec![b'x'; 100]).unwrap();
        assert_eq!(read_capped(&path, Limit { bytes: 100, what: "t" }).unwrap().len(), 100);
        assert!(read_capped(&path, Limit { bytes: 99, what: "t" }).is_err());
    }

    #[test]
    fn io_errors_name_the_file_and_the_reason_once() {
        let err = read_capped(Path::new("no-such.csv"), Limit { bytes: 1, what: "lexicon" }).unwrap_err();
        let text = err.to_string();
        assert!(text.starts_with("no-such.csv: "), "{text}");
        assert_eq!(text.matches("os error").count(), 1, "{text}");
        assert!(std::error::Error::source(&err).is_none());
    }
}
