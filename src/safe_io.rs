//! Safe file writing shared by every store that holds a user's data.
//!
//! This module owns the one way orthoepy replaces a file: write the new bytes to a temporary file
//! in the same folder, fsync it, keep the previous content as `NAME.bak`, rename the temporary
//! file over the target and fsync the folder. A reader never sees a half-written file and a crash
//! at any moment leaves either the old or the new content. It also owns [`Fingerprint`], the
//! record of what a file held when it was read, used to refuse overwriting a file that someone else
//! changed in the meantime. It must not know what the bytes mean.

use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};

/// What a file held when it was read: its length and a CRC-32 of its bytes.
///
/// ```
/// use orthoepy::safe_io::Fingerprint;
/// let a = Fingerprint::of(b"word,pronunciation\n");
/// assert_eq!(a, Fingerprint::of(b"word,pronunciation\n"));
/// assert_ne!(a, Fingerprint::of(b"word,pronunciation\r\n"));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Fingerprint {
    len: u64,
    crc: u32,
}

impl Fingerprint {
    /// The fingerprint of some bytes.
    pub fn of(bytes: &[u8]) -> Fingerprint {
        Fingerprint { len: bytes.len() as u64, crc: crc32fast::hash(bytes) }
    }

    /// The fingerprint of a file as it is on disk now, or `None` when it does not exist.
    pub fn of_file(path: &Path) -> io::Result<Option<Fingerprint>> {
        match fs::read(path) {
            Ok(bytes) => Ok(Some(Fingerprint::of(&bytes))),
            Err(err) if err.kind() == io::ErrorKind::NotFound => Ok(None),
            Err(err) => Err(err),
        }
    }
}

/// The path of the one backup kept beside `path`: `NAME.bak`.
///
/// ```
/// use std::path::Path;
/// assert_eq!(orthoepy::safe_io::backup_path(Path::new("dir/lexicon.csv")),
///            Path::new("dir/lexicon.csv.bak"));
/// ```
pub fn backup_path(path: &Path) -> PathBuf {
    let mut name = path.file_name().map(|n| n.to_os_string()).unwrap_or_default();
    name.push(".bak");
    path.with_file_name(name)
}

/// Replaces the content of `path` with `bytes` atomically.
///
/// When `keep_backup` is set and the file exists, its previous content is first saved (itself
/// atomically) as [`backup_path`]. The temporary file lives in the same folder so the final rename
/// never crosses file systems.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("a.txt");
/// orthoepy::safe_io::atomic_write(&path, b"one\n", true).unwrap();
/// orthoepy::safe_io::atomic_write(&path, b"two\n", true).unwrap();
/// assert_eq!(std::fs::read(&path).unwrap(), b"two\n");
/// assert_eq!(std::fs::read(dir.path().join("a.txt.bak")).unwrap(), b"one\n");
/// ```
pub fn atomic_write(path: &Path, bytes: &[u8], keep_backup: bool) -> io::Result<()> {
    if keep_backup {
        match fs::read(path) {
            Ok(previous) => replace_file(&backup_path(path), &previous)?,
            Err(err) if err.kind() == io::ErrorKind::NotFound => {}
            Err(err) => return Err(err),
        }
    }
    replace_file(path, bytes)
}

fn replace_file(path: &Path, bytes: &[u8]) -> io::Result<()> {
    let folder = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let temp = folder.join(format!(".{name}.{}.tmp", std::process::id()));
    let result = (|| {
        let mut file = OpenOptions::new().write(true).create(true).truncate(true).open(&temp)?;
        file.write_all(bytes)?;
        file.sync_all()?;
        drop(file);
        fs::rename(&temp, path)?;
        sync_folder(&folder)
    })();
    if result.is_err() {
        let _ = fs::remove_file(&temp);
    }
    result
}

/// Appends one line to `path` and syncs it to disk before returning.
///
/// Used by append-only journals: once this returns, the line survives a crash or a `kill -9`.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("journal");
/// orthoepy::safe_io::append_synced(&path, b"first\n").unwrap();
/// orthoepy::safe_io::append_synced(&path, b"second\n").unwrap();
/// assert_eq!(std::fs::read_to_string(&path).unwrap(), "first\nsecond\n");
/// ```
pub fn append_synced(path: &Path, line: &[u8]) -> io::Result<()> {
    let existed = path.exists();
    let mut file = OpenOptions::new().create(true).append(true).open(path)?;
    file.write_all(line)?;
    file.sync_data()?;
    if !existed {
        if let Some(folder) = path.parent().filter(|p| !p.as_os_str().is_empty()) {
            sync_folder(folder)?;
        }
    }
    Ok(())
}

fn sync_folder(folder: &Path) -> io::Result<()> {
    // Folders can be opened read-only and synced on Unix; elsewhere this is best effort.
    match File::open(folder) {
        Ok(dir) => match dir.sync_all() {
            Ok(()) => Ok(()),
            Err(err) if cfg!(unix) => Err(err),
            Err(_) => Ok(()),
        },
        Err(err) if cfg!(unix) => Err(err),
        Err(_) => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failed_write_leaves_no_temp_file_and_old_content() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("missing-folder").join("x.csv");
        assert!(atomic_write(&path, b"data", true).is_err());
        assert!(!path.exists());
    }

    #[test]
    fn fingerprint_of_missing_file_is_none() {
        let dir = tempfile::tempdir().unwrap();
        assert_eq!(Fingerprint::of_file(&dir.path().join("nope")).unwrap(), None);
    }

    #[test]
    fn backup_keeps_only_the_previous_version() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        for text in ["1", "2", "3"] {
            atomic_write(&path, text.as_bytes(), true).unwrap();
        }
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"2");
        let names: Vec<_> = fs::read_dir(dir.path()).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 2, "only the file and one backup remain: {names:?}");
    }
}
