//! A store file opened for look-ups: checksummed in one streamed pass (the key its index cache
//! must carry), then read only where a command asks — a few records by byte range, or all of it,
//! once, when every entry is needed. A look-up in a large store therefore never holds the store in
//! memory: at 2,000,000 entries that is 112 MB not read, not copied and not freed per command.
//!
//! Every read comes from the handle opened first, so a save that renames a new file over the
//! path meanwhile (as `Lexicon::save` and most editors do) changes nothing here. A file changed in
//! place is caught: ranged reads compare the file's length and modification time with those seen
//! after the checksum, and the whole bytes are checked against the checksum itself; either way
//! the command gets [`LexiconError::ChangedWhileRead`] instead of a mixture of two versions. (A
//! change in place that keeps the length and lands within one tick of the file system's clock
//! escapes the ranged check: the look-up then shows the changed rows as they are now, and the
//! index cache still checks that each row parsed alone leads back to its entry.)

use super::store::{LexiconError, MAX_LEXICON};
use crate::support::read::{checksum_capped, read_capped_from, read_capped_rest};
use std::fs::File;
use std::io::{Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex, OnceLock};
use std::time::SystemTime;

/// A store file, open, with its length and CRC-32; its bytes are read on demand.
#[derive(Debug)]
pub(super) struct StoreFile {
    path: PathBuf,
    file: Mutex<File>,
    length: u64,
    crc: u32,
    modified: Option<SystemTime>,
    whole: OnceLock<Arc<Vec<u8>>>,
}

impl StoreFile {
    /// Opens the store at `path` and checksums it (refused over [`MAX_LEXICON`] like a full read).
    /// A store that is not a regular file (a pipe such as `/dev/stdin`) cannot be read twice,
    /// so it is read whole at once and every later read is served from those bytes.
    pub(super) fn open(path: &Path) -> Result<StoreFile, LexiconError> {
        let regular = std::fs::metadata(path).map(|m| m.is_file()).unwrap_or(true);
        if !regular {
            let file = File::open(path).map_err(|reason| LexiconError::Io { path: path.to_path_buf(), reason })?;
            let bytes = read_capped_rest(&file, path, MAX_LEXICON)?;
            let (length, crc) = (bytes.len() as u64, crc32fast::hash(&bytes));
            let whole = OnceLock::from(Arc::new(bytes));
            return Ok(StoreFile { path: path.to_path_buf(), file: Mutex::new(file), length, crc, modified: None, whole });
        }
        let sum = checksum_capped(path, MAX_LEXICON)?;
        let modified = sum.file.metadata().and_then(|m| m.modified()).ok();
        Ok(StoreFile { path: path.to_path_buf(), file: Mutex::new(sum.file), length: sum.length, crc: sum.crc, modified, whole: OnceLock::new() })
    }

    /// The file's path, as given.
    pub(super) fn path(&self) -> &Path {
        &self.path
    }

    /// Bytes in the file when it was checksummed.
    pub(super) fn length(&self) -> u64 {
        self.length
    }

    /// CRC-32 of those bytes.
    pub(super) fn crc(&self) -> u32 {
        self.crc
    }

    /// All the file's bytes, read once (later calls share them) and checked against the checksum.
    pub(super) fn whole(&self) -> Result<Arc<Vec<u8>>, LexiconError> {
        if let Some(bytes) = self.whole.get() {
            return Ok(Arc::clone(bytes));
        }
        let bytes = self.read_whole()?;
        Ok(Arc::clone(self.whole.get_or_init(|| Arc::new(bytes))))
    }

    /// All the file's bytes, checked against the checksum, for the caller alone (not kept).
    pub(super) fn read_whole(&self) -> Result<Vec<u8>, LexiconError> {
        if let Some(bytes) = self.whole.get() {
            return Ok(bytes.to_vec());
        }
        let bytes = {
            let file = self.file.lock().unwrap_or_else(|poisoned| poisoned.into_inner());
            read_capped_from(&file, &self.path, MAX_LEXICON)?
        };
        if bytes.len() as u64 != self.length || crc32fast::hash(&bytes) != self.crc {
            return Err(self.changed());
        }
        Ok(bytes)
    }

    /// The bytes `start..end` of each range, in order, read from the file (or from the whole
    /// bytes when they were read already). A range past the end is an error of its own.
    pub(super) fn ranges(&self, ranges: &[(u64, u64)]) -> Result<Vec<Vec<u8>>, LexiconError> {
        if let Some(bytes) = self.whole.get() {
            return ranges.iter().map(|&(start, end)| slice(bytes, start, end).map(<[u8]>::to_vec).ok_or_else(|| self.changed())).collect();
        }
        let io = |reason| LexiconError::Io { path: self.path.clone(), reason };
        let mut file = self.file.lock().unwrap_or_else(|poisoned| poisoned.into_inner());
        let mut out = Vec::with_capacity(ranges.len());
        for &(start, end) in ranges {
            if start > end || end > self.length {
                return Err(self.changed());
            }
            let mut bytes = vec![0; usize::try_from(end - start).map_err(|_| self.changed())?];
            file.seek(SeekFrom::Start(start)).map_err(io)?;
            match file.read_exact(&mut bytes) {
                Ok(()) => out.push(bytes),
                Err(err) if err.kind() == std::io::ErrorKind::UnexpectedEof => return Err(self.changed()),
                Err(err) => return Err(io(err)),
            }
        }
        let now = file.metadata().map_err(io)?;
        if now.len() != self.length || now.modified().ok() != self.modified {
            return Err(self.changed());
        }
        Ok(out)
    }

    fn changed(&self) -> LexiconError {
        LexiconError::ChangedWhileRead { path: self.path.clone() }
    }
}

/// `bytes[start..end]`, if it lies inside.
fn slice(bytes: &[u8], start: u64, end: u64) -> Option<&[u8]> {
    bytes.get(usize::try_from(start).ok()?..usize::try_from(end).ok()?)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn stored(body: &[u8]) -> (tempfile::TempDir, PathBuf) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, body).unwrap();
        (dir, path)
    }

    #[test]
    fn checksum_and_reads_agree_with_a_full_read() {
        let body = b"word,pronunciation\nquay,K IY1\n";
        let (_dir, path) = stored(body);
        let file = StoreFile::open(&path).unwrap();
        assert_eq!((file.length(), file.crc()), (body.len() as u64, crc32fast::hash(body)));
        assert_eq!(file.ranges(&[(0, 4), (19, 23)]).unwrap(), [b"word".to_vec(), b"quay".to_vec()]);
        assert_eq!(file.whole().unwrap().as_slice(), body);
        // From the whole bytes now: the same answers.
        assert_eq!(file.ranges(&[(19, 23)]).unwrap(), [b"quay".to_vec()]);
        assert!(matches!(file.ranges(&[(19, 99)]), Err(LexiconError::ChangedWhileRead { .. })));
    }

    #[test]
    fn a_pipe_is_read_once_and_served_from_its_bytes() {
        // A pipe cannot be read twice nor seek (POSIX lseek: ESPIPE): `find --lexicon /dev/stdin`.
        let body = b"word,pronunciation\nquay,K IY1\n";
        let mut ends = [0; 2];
        // SAFETY: pipe(2) fills the two descriptors of the array it is given.
        assert_eq!(unsafe { libc::pipe(ends.as_mut_ptr()) }, 0);
        // SAFETY: the write end was just opened by pipe(2) and is owned here alone.
        let mut writer = unsafe { <File as std::os::fd::FromRawFd>::from_raw_fd(ends[1]) };
        std::io::Write::write_all(&mut writer, body).unwrap();
        drop(writer);
        let opened = StoreFile::open(Path::new(&format!("/proc/self/fd/{}", ends[0])));
        // SAFETY: the read end is ours; StoreFile opened its own descriptor for it.
        unsafe { libc::close(ends[0]) };
        let file = opened.unwrap();
        assert_eq!((file.length(), file.crc()), (body.len() as u64, crc32fast::hash(body)));
        assert_eq!(file.ranges(&[(19, 23)]).unwrap(), [b"quay".to_vec()]);
        assert_eq!(file.read_whole().unwrap(), body);
        assert_eq!(file.whole().unwrap().as_slice(), body);
    }

    #[test]
    fn a_save_by_rename_leaves_the_open_file_as_it_was() {
        let (dir, path) = stored(b"word,pronunciation\nquay,K IY1\n");
        let file = StoreFile::open(&path).unwrap();
        let replacement = dir.path().join("new.csv");
        std::fs::write(&replacement, b"word,pronunciation\nquay,K EY1\nkey,K IY1\n").unwrap();
        std::fs::rename(&replacement, &path).unwrap();
        assert_eq!(file.ranges(&[(24, 29)]).unwrap(), [b"K IY1".to_vec()]);
        assert_eq!(file.whole().unwrap().as_slice(), b"word,pronunciation\nquay,K IY1\n");
    }

    #[test]
    fn a_change_in_place_is_an_error_not_a_mixture() {
        let (_dir, path) = stored(b"word,pronunciation\nquay,K IY1\n");
        let file = StoreFile::open(&path).unwrap();
        // Same length, other bytes, written into the same file (not renamed over it).
        let mut handle = std::fs::OpenOptions::new().write(true).open(&path).unwrap();
        std::io::Write::write_all(&mut handle, b"word,pronunciation\nquay,K EY1\n").unwrap();
        drop(handle);
        assert!(matches!(file.whole(), Err(LexiconError::ChangedWhileRead { .. })));
        let grown = std::fs::OpenOptions::new().append(true).open(&path).unwrap();
        std::io::Write::write_all(&mut &grown, b"key,K IY1\n").unwrap();
        assert!(matches!(file.ranges(&[(19, 23)]), Err(LexiconError::ChangedWhileRead { .. })));
    }
}
