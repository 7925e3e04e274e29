//! Safe file writing shared by every store that holds a user's data.
//!
//! This module owns the one way orthoepy replaces a file: write the new bytes to a temporary file
//! `.NAME.PID.tmp` in the same folder, fsync it, keep the previous content as `NAME.bak`, rename
//! the temporary file over the target and fsync the folder. A reader never sees a half-written
//! file and a crash at any moment leaves either the old or the new content. It also owns
//! [`Fingerprint`], the record of what a file held when it was read: [`replace_if_unchanged`]
//! compares it again after the new content is on disk, just before the backup and the rename, so
//! an edit made by someone else meanwhile is refused rather than lost. Temporary files left by a
//! killed save are recognised by their exact name pattern and removed by
//! [`remove_leftover_temps`]. Files that belong together (a build lexicon and its phone list) are
//! replaced by [`replace_together`], which vouches for the set with a checksum list written last.
//! Every write step of this process is one critical section ([`hold_writes`]), so a signal handler
//! can wait for the step in progress and then stop the process between steps. It must not know
//! what the bytes mean.

use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::{Mutex, MutexGuard, PoisonError};

/// Held by every write step of this process: a replace, an append, taking or releasing the
/// project lock.
static WRITING: Mutex<()> = Mutex::new(());

/// Waits until the write step in progress in this process (if any) has ended, and keeps every
/// later one from starting while the returned guard lives.
///
/// A step is one call of [`atomic_write`], [`replace_if_unchanged`], [`replace_together`],
/// [`append_synced`], or taking or releasing the project lock; when it ends, its temporary files
/// are renamed into place or removed. The binary's handler for SIGTERM, SIGHUP and SIGINT takes
/// this guard, releases the project lock
/// ([`release_held_locks`](crate::lock::release_held_locks)) and exits, so a signal leaves every
/// file old or new and no temporary file behind. Never call it from a thread that is inside a
/// step (it would wait for itself).
///
/// ```
/// let held = orthoepy::safe_io::hold_writes();
/// // ... no write of this process can start here ...
/// drop(held);
/// ```
pub fn hold_writes() -> MutexGuard<'static, ()> {
    WRITING.lock().unwrap_or_else(PoisonError::into_inner)
}

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

/// Why [`replace_if_unchanged`] or [`append_synced`] did not write.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The file no longer holds what was read (or is gone, or has another length); nothing was
    /// written.
    #[error("changed on disk since it was read; nothing was written")]
    Changed,
    /// Reading or writing failed.
    #[error(transparent)]
    Io(#[from] io::Error),
}

/// Replaces the content of `path` with `bytes` atomically.
///
/// When `keep_backup` is set and the file exists, its previous content is kept as
/// [`backup_path`] (a hard link to the old file where the file system allows, else a synced
/// copy). The temporary file lives in the same folder so the final rename never crosses file
/// systems. Use [`replace_if_unchanged`] for a file that others may edit.
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
    let _step = hold_writes();
    match replace(path, bytes, None, keep_backup) {
        Ok(()) => Ok(()),
        Err(WriteError::Io(err)) => Err(err),
        // Only a replace given an expected fingerprint reports a change; kept for completeness.
        Err(WriteError::Changed) => Err(io::Error::other("changed on disk while saving")),
    }
}

/// Replaces `path` with `bytes` through a temporary file and a rename, without syncing: for
/// derived files that carry their own integrity check and can be rebuilt from the data they
/// derive from (the index cache beside a store, checked by CRC-32 on every open). A crash may
/// leave such a file torn or empty; the next reader detects it and rebuilds, so the two
/// fsyncs of [`atomic_write`] (about 12 ms for a 12 MB cache here) would buy nothing. Never
/// use it for a user's data.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("derived.bin");
/// orthoepy::safe_io::replace_derived(&path, b"v1").unwrap();
/// orthoepy::safe_io::replace_derived(&path, b"v2").unwrap();
/// assert_eq!(std::fs::read(&path).unwrap(), b"v2");
/// assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1, "no temporary file left");
/// ```
pub fn replace_derived(path: &Path, bytes: &[u8]) -> io::Result<()> {
    let _step = hold_writes();
    let temp = temp_path(path, std::process::id());
    let result = fs::write(&temp, bytes).and_then(|()| fs::rename(&temp, path));
    if result.is_err() {
        let _ = fs::remove_file(&temp);
    }
    result
}

/// Replaces `path` with `bytes` only if it still holds what was read, whose [`Fingerprint`] is
/// `expected`.
///
/// The slow part (writing and syncing the new content to a temporary file) happens first; then
/// the file is compared again. With `keep_backup` the current file is hard-linked as the backup
/// and its content checked through that link, so an edit made in place after the check lands in
/// the backup rather than being lost, and an edit that replaced the file is refused. Only the
/// moment between the last look at the file and the final rename cannot be covered by a
/// check; it is a few system calls long.
///
/// ```
/// use orthoepy::safe_io::{replace_if_unchanged, Fingerprint, WriteError};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("lexicon.csv");
/// std::fs::write(&path, b"old\n").unwrap();
/// let read = Fingerprint::of(b"old\n");
/// std::fs::write(&path, b"someone else's edit\n").unwrap();
/// assert!(matches!(replace_if_unchanged(&path, b"mine\n", read, true), Err(WriteError::Changed)));
/// assert_eq!(std::fs::read(&path).unwrap(), b"someone else's edit\n");
/// ```
pub fn replace_if_unchanged(path: &Path, bytes: &[u8], expected: Fingerprint, keep_backup: bool) -> Result<(), WriteError> {
    let _step = hold_writes();
    replace(path, bytes, Some(expected), keep_backup)
}

fn folder_of(path: &Path) -> PathBuf {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// The temporary file a save of `path` by process `pid` writes: `.NAME.PID.tmp` beside it.
pub(crate) fn temp_path(path: &Path, pid: u32) -> PathBuf {
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    folder_of(path).join(format!(".{name}.{pid}.tmp"))
}

fn write_synced(path: &Path, bytes: &[u8]) -> io::Result<()> {
    let mut file = OpenOptions::new().write(true).create(true).truncate(true).open(path)?;
    file.write_all(bytes)?;
    file.sync_all()
}

fn replace(path: &Path, bytes: &[u8], expected: Option<Fingerprint>, keep_backup: bool) -> Result<(), WriteError> {
    let temp = temp_path(path, std::process::id());
    let result = write_synced(&temp, bytes).map_err(WriteError::from).and_then(|()| {
        hook::run(hook::Stage::TempSynced);
        commit(path, &temp, expected, keep_backup)
    });
    if result.is_err() {
        let _ = fs::remove_file(&temp);
    }
    result
}

/// Replaces several files that belong together (a build lexicon and its phone list) and writes
/// `manifest` last: a checksum list in the format of GNU coreutils `sha256sum` (one line per file,
/// `HEX  NAME`; SHA-256 of FIPS 180-4) that `sha256sum -c` checks.
///
/// Each file alone is replaced atomically. The set is vouched for by the list: the old list is
/// removed before the first file changes and the new one is put in place (atomically) after the
/// last, so whenever a list exists it matches every file in it. A process killed between the
/// renames leaves no list, and a reader that checks it (`cd FOLDER && sha256sum -c MANIFEST`)
/// refuses the mixed set. A file in the manifest's folder is listed by its name, any other by its
/// absolute path. Names with a newline or a backslash are refused (`sha256sum` would escape them).
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let (words, phones) = (dir.path().join("words.txt"), dir.path().join("phones.txt"));
/// let manifest = dir.path().join("words.txt.sha256");
/// orthoepy::safe_io::replace_together(&[(&words, b"abc"), (&phones, b"")], &manifest).unwrap();
/// // FIPS 180-2, Appendix B.1 ("abc"); the empty message's digest is the one every
/// // implementation prints for an empty file (common practice, `sha256sum /dev/null`).
/// assert_eq!(std::fs::read_to_string(&manifest).unwrap(),
///     "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad  words.txt\n\
///      e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  phones.txt\n");
/// ```
pub fn replace_together(files: &[(&Path, &[u8])], manifest: &Path) -> io::Result<()> {
    let _step = hold_writes();
    let listing = checksum_list(files, &folder_of(manifest))?;
    let pid = std::process::id();
    let temps: Vec<PathBuf> = files.iter().map(|(path, _)| temp_path(path, pid)).collect();
    let result = (|| {
        for ((_, bytes), temp) in files.iter().zip(&temps) {
            write_synced(temp, bytes)?;
        }
        // From here until the new list is in place, no list vouches for the set.
        match fs::remove_file(manifest) {
            Ok(()) => sync_folder(&folder_of(manifest))?,
            Err(err) if err.kind() == io::ErrorKind::NotFound => {}
            Err(err) => return Err(err),
        }
        for ((path, _), temp) in files.iter().zip(&temps) {
            fs::rename(temp, path)?;
            sync_folder(&folder_of(path))?;
            hook::run(hook::Stage::MemberRenamed);
        }
        Ok(())
    })();
    if result.is_err() {
        for temp in &temps {
            let _ = fs::remove_file(temp);
        }
    }
    result?;
    match replace(manifest, listing.as_bytes(), None, false) {
        Ok(()) => Ok(()),
        Err(WriteError::Io(err)) => Err(err),
        Err(WriteError::Changed) => Err(io::Error::other("changed on disk while saving")),
    }
}

/// The `sha256sum` lines for `files` as seen from `folder`.
fn checksum_list(files: &[(&Path, &[u8])], folder: &Path) -> io::Result<String> {
    use sha2::Digest;
    let here = fs::canonicalize(folder)?;
    let mut listing = String::new();
    for (path, bytes) in files {
        let name = path.file_name().ok_or_else(|| io::Error::new(io::ErrorKind::InvalidInput, "no file name"))?;
        let own_folder = fs::canonicalize(folder_of(path))?;
        let shown = if own_folder == here { PathBuf::from(name) } else { own_folder.join(name) };
        let shown = shown.to_str().filter(|s| !s.contains(['\n', '\r', '\\'])).ok_or_else(|| {
            io::Error::new(
                io::ErrorKind::InvalidInput,
                format!("{}: a file listed in a checksum list needs a UTF-8 name without line breaks or backslashes", path.display()),
            )
        })?;
        let digest = sha2::Sha256::digest(bytes);
        for byte in digest {
            listing.push_str(&format!("{byte:02x}"));
        }
        listing.push_str("  ");
        listing.push_str(shown);
        listing.push('\n');
    }
    Ok(listing)
}

/// What identifies a file's current version cheaply: which inode, how long, when last written.
#[derive(Debug, PartialEq)]
struct Version {
    #[cfg(unix)]
    inode: (u64, u64),
    len: u64,
    modified: Option<std::time::SystemTime>,
}

impl Version {
    fn of(meta: &fs::Metadata) -> Version {
        Version {
            #[cfg(unix)]
            inode: {
                use std::os::unix::fs::MetadataExt;
                (meta.dev(), meta.ino())
            },
            len: meta.len(),
            modified: meta.modified().ok(),
        }
    }

    /// The version of `path` now, `None` when it does not exist.
    fn of_path(path: &Path) -> io::Result<Option<Version>> {
        match fs::metadata(path) {
            Ok(meta) => Ok(Some(Version::of(&meta))),
            Err(err) if err.kind() == io::ErrorKind::NotFound => Ok(None),
            Err(err) => Err(err),
        }
    }
}

/// Compares, keeps the backup and renames `temp` over `path`.
fn commit(path: &Path, temp: &Path, expected: Option<Fingerprint>, keep_backup: bool) -> Result<(), WriteError> {
    let folder = folder_of(path);
    if keep_backup {
        if let Some((staged, version)) = stage_backup(path, expected)? {
            hook::run(hook::Stage::BackupStaged);
            // Last look: the file must still be the version whose content was checked.
            if expected.is_some() && Version::of_path(path)?.as_ref() != Some(&version) {
                let _ = fs::remove_file(&staged);
                return Err(WriteError::Changed);
            }
            if let Err(err) = fs::rename(&staged, backup_path(path)) {
                let _ = fs::remove_file(&staged);
                return Err(err.into());
            }
            // When the backup already is this very file (a save killed after keeping its backup,
            // before its last rename, leaves them linked), rename(2) does nothing and leaves the
            // staged name behind (POSIX.1-2017, rename: "different directory entries for the
            // same existing file ... shall return successfully and perform no other action").
            match fs::remove_file(&staged) {
                Ok(()) => {}
                Err(err) if err.kind() == io::ErrorKind::NotFound => {}
                Err(err) => return Err(err.into()),
            }
            hook::run(hook::Stage::BackupKept);
        }
    } else if let Some(expected) = expected {
        if Fingerprint::of_file(path)? != Some(expected) {
            return Err(WriteError::Changed);
        }
    }
    fs::rename(temp, path)?;
    sync_folder(&folder)?;
    Ok(())
}

/// Puts the current content of `path` into a temporary backup file beside it and checks it
/// against `expected`. Returns the staged file and the version of `path` it was taken from, or
/// `None` when there is nothing to back up.
fn stage_backup(path: &Path, expected: Option<Fingerprint>) -> Result<Option<(PathBuf, Version)>, WriteError> {
    let staged = temp_path(&backup_path(path), std::process::id());
    match fs::remove_file(&staged) {
        Ok(()) => {}
        Err(err) if err.kind() == io::ErrorKind::NotFound => {}
        Err(err) => return Err(err.into()),
    }
    let outcome = (|| {
        let before = match Version::of_path(path)? {
            Some(v) => v,
            None if expected.is_some() => return Err(WriteError::Changed),
            None => return Ok(None),
        };
        let bytes = match fs::hard_link(path, &staged) {
            // The link and the file are one inode: read it through the link, so what is
            // checked is exactly what becomes the backup.
            Ok(()) => fs::read(&staged)?,
            Err(err) if err.kind() == io::ErrorKind::NotFound => return Err(WriteError::Changed),
            // File systems without hard links get a copy.
            Err(_) => {
                let bytes = match fs::read(path) {
                    Ok(b) => b,
                    Err(err) if err.kind() == io::ErrorKind::NotFound => return Err(WriteError::Changed),
                    Err(err) => return Err(err.into()),
                };
                write_synced(&staged, &bytes)?;
                bytes
            }
        };
        if expected.is_some_and(|want| Fingerprint::of(&bytes) != want) {
            return Err(WriteError::Changed);
        }
        // Written to while it was read: a later look could not tell, so refuse now.
        if expected.is_some() && Version::of_path(path)?.as_ref() != Some(&before) {
            return Err(WriteError::Changed);
        }
        Ok(Some((staged.clone(), before)))
    })();
    if !matches!(outcome, Ok(Some(_))) {
        let _ = fs::remove_file(&staged);
    }
    outcome
}

/// Removes what saves of `target` (and of its backup) killed before they finished left behind:
/// files named exactly `.NAME.PID.tmp` or `.NAME.bak.PID.tmp` in its folder whose PID is not a
/// live process according to `is_live`. Returns the files removed.
///
/// Call it only while holding the project lock, so no other orthoepy process is saving; the
/// lock's [`clean_leftovers`](crate::lock::ProjectLock::clean_leftovers) does.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let target = dir.path().join("lexicon.csv");
/// std::fs::write(dir.path().join(".lexicon.csv.4242.tmp"), b"half a save").unwrap();
/// std::fs::write(dir.path().join(".lexicon.csv.notes.tmp"), b"not ours").unwrap();
/// let removed = orthoepy::safe_io::remove_leftover_temps(&target, |pid| pid != 4242).unwrap();
/// assert_eq!(removed, vec![dir.path().join(".lexicon.csv.4242.tmp")]);
/// assert!(dir.path().join(".lexicon.csv.notes.tmp").exists());
/// ```
pub fn remove_leftover_temps(target: &Path, is_live: impl Fn(u32) -> bool) -> io::Result<Vec<PathBuf>> {
    let Some(name) = target.file_name().and_then(|n| n.to_str()) else { return Ok(Vec::new()) };
    let folder = folder_of(target);
    let entries = match fs::read_dir(&folder) {
        Ok(entries) => entries,
        Err(err) if err.kind() == io::ErrorKind::NotFound => return Ok(Vec::new()),
        Err(err) => return Err(err),
    };
    let backup = format!("{name}.bak");
    let mut removed = Vec::new();
    for entry in entries {
        let entry = entry?;
        let file_name = entry.file_name();
        let Some(file_name) = file_name.to_str() else { continue };
        let pid = temp_pid(file_name, name).or_else(|| temp_pid(file_name, &backup));
        let Some(pid) = pid else { continue };
        if is_live(pid) || !entry.file_type()?.is_file() {
            continue;
        }
        match fs::remove_file(entry.path()) {
            Ok(()) => removed.push(entry.path()),
            Err(err) if err.kind() == io::ErrorKind::NotFound => {}
            Err(err) => return Err(err),
        }
    }
    removed.sort();
    Ok(removed)
}

/// The PID in `file_name` when it is exactly `.{name}.{PID}.tmp` (PID: ASCII digits, no sign,
/// no leading zero, fits a `u32`).
fn temp_pid(file_name: &str, name: &str) -> Option<u32> {
    let digits = file_name.strip_prefix('.')?.strip_prefix(name)?.strip_prefix('.')?.strip_suffix(".tmp")?;
    let well_formed = !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit()) && !digits.starts_with('0');
    if well_formed {
        digits.parse().ok()
    } else {
        None
    }
}

/// A test-only pause inside a replace, so a test can act as another program at an exact moment.
mod hook {
    /// Where a replace is.
    #[derive(Debug, Clone, Copy, PartialEq, Eq)]
    pub(crate) enum Stage {
        /// The new content is in the temporary file and synced; nothing else happened yet.
        TempSynced,
        /// The backup is staged and checked; the last look and the renames come next.
        BackupStaged,
        /// The backup is in place (one file with the target until the next rename).
        BackupKept,
        /// One file of a [`replace_together`](super::replace_together) set was renamed into place.
        MemberRenamed,
    }

    /// What a test runs at each stage.
    #[cfg(test)]
    type Hook = Box<dyn FnMut(Stage)>;

    #[cfg(test)]
    thread_local! {
        static HOOK: std::cell::RefCell<Option<Hook>> = std::cell::RefCell::new(None);
    }

    /// Runs `body` with `hook` called at every stage of replaces on this thread.
    #[cfg(test)]
    pub(crate) fn with<R>(hook: impl FnMut(Stage) + 'static, body: impl FnOnce() -> R) -> R {
        HOOK.with(|h| *h.borrow_mut() = Some(Box::new(hook)));
        let out = body();
        HOOK.with(|h| *h.borrow_mut() = None);
        out
    }

    #[cfg(test)]
    pub(crate) fn run(stage: Stage) {
        HOOK.with(|h| {
            if let Some(f) = h.borrow_mut().as_mut() {
                f(stage);
            }
        });
    }

    #[cfg(not(test))]
    #[inline(always)]
    pub(crate) fn run(_stage: Stage) {}
}

#[cfg(test)]
pub(crate) use hook::{with as with_hook, Stage as HookStage};

/// Appends one line to `path` (creating it when missing) if the file is `expected_len` bytes
/// long, and syncs it to disk before returning its new length.
///
/// Used by append-only journals: once this returns, the line survives a crash or a `kill -9`.
/// A file of another length was written by someone else since it was read, and is refused
/// ([`WriteError::Changed`]) rather than appended to. When the write fails halfway, the part
/// written is cut off again where possible, so a later append does not start mid-line.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("journal");
/// let len = orthoepy::safe_io::append_synced(&path, 0, b"first\n").unwrap();
/// orthoepy::safe_io::append_synced(&path, len, b"second\n").unwrap();
/// assert_eq!(std::fs::read_to_string(&path).unwrap(), "first\nsecond\n");
/// assert!(orthoepy::safe_io::append_synced(&path, len, b"stale\n").is_err());
/// ```
pub fn append_synced(path: &Path, expected_len: u64, line: &[u8]) -> Result<u64, WriteError> {
    let _step = hold_writes();
    let mut file = OpenOptions::new().create(true).append(true).open(path)?;
    if file.metadata()?.len() != expected_len {
        return Err(WriteError::Changed);
    }
    if let Err(err) = file.write_all(line).and_then(|()| file.sync_data()) {
        let _ = file.set_len(expected_len);
        return Err(err.into());
    }
    if expected_len == 0 {
        sync_folder(&folder_of(path))?;
    }
    Ok(expected_len + line.len() as u64)
}

/// Syncs a folder so that a rename or a new file in it survives a crash (best effort where
/// folders cannot be opened).
pub(crate) fn sync_folder(folder: &Path) -> io::Result<()> {
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

    /// Lists the names in a folder, sorted.
    fn names(dir: &Path) -> Vec<String> {
        let mut names: Vec<String> =
            fs::read_dir(dir).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
        names.sort();
        names
    }

    #[test]
    fn temporary_file_is_named_dot_name_pid_tmp() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        let folder = dir.path().to_path_buf();
        let seen = std::rc::Rc::new(std::cell::RefCell::new(Vec::new()));
        let log = seen.clone();
        with_hook(move |stage| if stage == HookStage::TempSynced { log.borrow_mut().extend(names(&folder)) }, || {
            atomic_write(&path, b"x", false).unwrap()
        });
        assert_eq!(*seen.borrow(), vec![format!(".l.csv.{}.tmp", std::process::id())]);
        assert_eq!(names(dir.path()), ["l.csv"]);
    }

    #[test]
    fn leftovers_match_only_our_exact_pattern_and_dead_pids() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("lexicon.csv");
        for name in [
            ".lexicon.csv.100.tmp",      // ours, dead: removed
            ".lexicon.csv.bak.101.tmp",  // backup staging, dead: removed
            ".lexicon.csv.200.tmp",      // ours, live: kept
            ".lexicon.csv.0100.tmp",     // leading zero: not a PID we write
            ".lexicon.csv.+100.tmp",     // sign: not ours
            ".lexicon.csv..tmp",         // no PID
            ".lexicon.csv.100.tmp~",     // editor backup of a temp: not ours
            ".lexicon.csvx.100.tmp",     // another file's temp
            "lexicon.csv.100.tmp",       // no leading dot
            ".lexicon.csv.99999999999.tmp", // does not fit a PID
        ] {
            fs::write(dir.path().join(name), b"").unwrap();
        }
        fs::create_dir(dir.path().join(".lexicon.csv.102.tmp")).unwrap(); // a folder: never removed
        let removed = remove_leftover_temps(&target, |pid| pid == 200).unwrap();
        let removed: Vec<String> = removed.iter().map(|p| p.file_name().unwrap().to_string_lossy().into_owned()).collect();
        assert_eq!(removed, [".lexicon.csv.100.tmp", ".lexicon.csv.bak.101.tmp"]);
        assert_eq!(names(dir.path()).len(), 9);
    }

    #[test]
    fn edit_in_place_after_the_temp_is_written_is_refused_and_kept() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        atomic_write(&path, b"v1\n", true).unwrap();
        atomic_write(&path, b"v2\n", true).unwrap();
        let read = Fingerprint::of(b"v2\n");
        let target = path.clone();
        let result = with_hook(
            move |stage| {
                if stage == HookStage::TempSynced {
                    fs::write(&target, b"their edit\n").unwrap(); // truncates and rewrites the same file
                }
            },
            || replace_if_unchanged(&path, b"mine\n", read, true),
        );
        assert!(matches!(result, Err(WriteError::Changed)), "{result:?}");
        assert_eq!(fs::read(&path).unwrap(), b"their edit\n");
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"v1\n");
        assert_eq!(names(dir.path()), ["l.csv", "l.csv.bak"]);
    }

    #[test]
    fn file_replaced_after_the_backup_is_staged_is_refused_and_kept() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        atomic_write(&path, b"v1\n", true).unwrap();
        atomic_write(&path, b"v2\n", true).unwrap();
        let target = path.clone();
        let result = with_hook(
            move |stage| {
                if stage == HookStage::BackupStaged {
                    // An editor's save: a new file renamed over the old one.
                    let other = target.with_file_name("editor-save");
                    fs::write(&other, b"v2\n").unwrap(); // same bytes, other file
                    fs::rename(&other, &target).unwrap();
                }
            },
            || replace_if_unchanged(&path, b"mine\n", Fingerprint::of(b"v2\n"), true),
        );
        assert!(matches!(result, Err(WriteError::Changed)), "{result:?}");
        assert_eq!(fs::read(&path).unwrap(), b"v2\n");
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"v1\n");
        assert_eq!(names(dir.path()), ["l.csv", "l.csv.bak"]);
    }

    #[test]
    fn edit_in_place_in_the_last_moment_survives_in_the_backup() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        atomic_write(&path, b"v1\n", false).unwrap();
        let target = path.clone();
        let result = with_hook(
            move |stage| {
                if stage == HookStage::BackupKept {
                    fs::write(&target, b"their edit\n").unwrap();
                }
            },
            || replace_if_unchanged(&path, b"mine\n", Fingerprint::of(b"v1\n"), true),
        );
        result.unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"mine\n");
        // The backup is the very file that was edited, so the edit is not lost.
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"their edit\n");
    }

    #[test]
    fn save_after_one_killed_between_its_backup_and_its_rename_leaves_no_temp_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        fs::write(&path, b"v1\n").unwrap();
        // What a save killed after keeping its backup leaves: the backup linked to the file.
        fs::hard_link(&path, backup_path(&path)).unwrap();
        replace_if_unchanged(&path, b"v2\n", Fingerprint::of(b"v1\n"), true).unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"v2\n");
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"v1\n");
        assert_eq!(names(dir.path()), ["l.csv", "l.csv.bak"]);
    }

    #[test]
    fn unchanged_file_is_replaced_with_its_backup() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        fs::write(&path, b"old\n").unwrap();
        replace_if_unchanged(&path, b"new\n", Fingerprint::of(b"old\n"), true).unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"new\n");
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"old\n");
        replace_if_unchanged(&path, b"newer\n", Fingerprint::of(b"new\n"), false).unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"newer\n");
        assert_eq!(fs::read(backup_path(&path)).unwrap(), b"old\n");
    }

    #[test]
    fn between_the_renames_of_a_set_no_checksum_list_vouches_for_it() {
        let dir = tempfile::tempdir().unwrap();
        let (words, phones) = (dir.path().join("w.txt"), dir.path().join("p.txt"));
        let manifest = dir.path().join("w.txt.sha256");
        replace_together(&[(&words, b"old words\n"), (&phones, b"old phones\n")], &manifest).unwrap();
        let seen = std::rc::Rc::new(std::cell::RefCell::new(Vec::new()));
        let log = seen.clone();
        let (w, p, m) = (words.clone(), phones.clone(), manifest.clone());
        with_hook(
            move |stage| {
                if stage == HookStage::MemberRenamed {
                    log.borrow_mut().push((fs::read(&w).unwrap(), fs::read(&p).unwrap(), m.exists()));
                }
            },
            || replace_together(&[(&words, b"new words\n"), (&phones, b"new phones\n")], &manifest).unwrap(),
        );
        // What a kill after the first rename leaves: a new lexicon, an old phone list, and no list.
        let first = (b"new words\n".to_vec(), b"old phones\n".to_vec(), false);
        let second = (b"new words\n".to_vec(), b"new phones\n".to_vec(), false);
        assert_eq!(*seen.borrow(), vec![first, second]);
        let listing = fs::read_to_string(&manifest).unwrap();
        let want = checksum_list(&[(&words, b"new words\n"), (&phones, b"new phones\n")], dir.path()).unwrap();
        assert_eq!(listing, want);
        assert!(listing.ends_with("  p.txt\n"), "{listing}");
        assert_eq!(names(dir.path()), ["p.txt", "w.txt", "w.txt.sha256"]);
    }

    #[test]
    fn set_that_cannot_be_written_changes_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let (words, elsewhere) = (dir.path().join("w.txt"), dir.path().join("sub").join("p.txt"));
        let manifest = dir.path().join("w.txt.sha256");
        fs::create_dir(dir.path().join("sub")).unwrap();
        replace_together(&[(&words, b"old\n"), (&elsewhere, b"old\n")], &manifest).unwrap();
        let listing = fs::read_to_string(&manifest).unwrap();
        let absolute = fs::canonicalize(dir.path().join("sub")).unwrap().join("p.txt");
        assert!(listing.ends_with(&format!("  {}\n", absolute.display())), "{listing}");
        fs::remove_dir_all(dir.path().join("sub")).unwrap();
        assert!(replace_together(&[(&words, b"new\n"), (&elsewhere, b"new\n")], &manifest).is_err());
        assert_eq!(fs::read(&words).unwrap(), b"old\n");
        assert_eq!(fs::read_to_string(&manifest).unwrap(), listing);
        assert_eq!(names(dir.path()), ["w.txt", "w.txt.sha256"]);
    }

    #[test]
    fn vanished_file_is_a_change() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("l.csv");
        for keep in [true, false] {
            let result = replace_if_unchanged(&path, b"new\n", Fingerprint::of(b"old\n"), keep);
            assert!(matches!(result, Err(WriteError::Changed)), "{result:?}");
            assert!(names(dir.path()).is_empty());
        }
    }
}
