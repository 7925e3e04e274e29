//! The project lock: at most one orthoepy command writes a project's lexicon, queue or journal
//! at a time.
//!
//! This module owns the advisory lock file `.orthoepy.lock` in the project folder: taking it
//! atomically (the complete file is written under a temporary name and hard-linked into place,
//! which fails when a lock exists), saying who holds it when it is taken, taking over a lock
//! whose process is gone from this host, and releasing it when the holder is dropped. It also
//! removes the temporary files killed saves left behind, which is only safe while the lock is
//! held. Readers never need the lock. This module must not read or write the lexicon, the queue
//! or the journal themselves, and it never takes over a lock of another host or one it cannot
//! read: those are for a person to clear.
//!
//! A lock counts as gone when its host is this host and either the machine was restarted since
//! (Linux boot id), or no process has its PID, or that process has exited and waits to be
//! collected by its parent (a zombie), or the process with its PID started at another moment
//! than the holder did (PID reuse; states and start times from `/proc/PID/stat`).
//!
//! The locks this process holds are also kept in a list, so a handler for a termination signal
//! can release them before exiting ([`release_held_locks`]).

use std::fs;
use std::io::{self, Read};
use std::path::{Path, PathBuf};
use std::sync::{Mutex, PoisonError};

use serde::{Deserialize, Serialize};

use crate::project::Project;
use crate::safe_io;

/// The lock file's name in the project folder.
pub const LOCK_FILE: &str = ".orthoepy.lock";

/// Format version written into every lock file.
const LOCK_FORMAT: u32 = 1;

/// Lock files larger than this are not ours (bytes).
const MAX_LOCK_BYTES: u64 = 64 * 1024;

/// The locks this process holds: each lock file with the bytes we wrote into it.
static HELD: Mutex<Vec<(PathBuf, Vec<u8>)>> = Mutex::new(Vec::new());

/// Removes every lock this process holds (each only if it still holds our own bytes), for a
/// process about to exit without running its destructors. Call it while holding
/// [`safe_io::hold_writes`], so no write of the lock's holder runs after the lock is gone.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// let lock = orthoepy::lock::ProjectLock::acquire(dir.path(), "apply").unwrap();
/// let held = orthoepy::safe_io::hold_writes();
/// orthoepy::lock::release_held_locks();
/// assert!(!lock.path().exists());
/// # drop(held);
/// ```
pub fn release_held_locks() {
    let held = HELD.lock().unwrap_or_else(PoisonError::into_inner);
    for (path, contents) in held.iter() {
        let _ = remove_if_holding(path, contents);
    }
}

/// Who holds (or held) a project lock.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct LockHolder {
    /// The holder's process id.
    pub pid: u32,
    /// The host it runs on.
    pub host: String,
    /// The host's boot id when it took the lock (Linux), to tell a lock from before a restart.
    #[serde(default)]
    pub boot_id: Option<String>,
    /// When the process started, in clock ticks after boot (Linux `/proc/PID/stat`, field 22).
    #[serde(default)]
    pub process_start: Option<u64>,
    /// When the lock was taken, in seconds since 1970-01-01 UTC.
    pub since: u64,
    /// The command that took it, e.g. `review`.
    pub command: String,
}

#[derive(Serialize, Deserialize)]
struct LockFile {
    orthoepy_lock: u32,
    #[serde(flatten)]
    holder: LockHolder,
}

impl LockHolder {
    /// This process, about to run `command`.
    fn current(command: &str) -> LockHolder {
        let pid = std::process::id();
        LockHolder {
            pid,
            host: host_name(),
            boot_id: boot_id(),
            process_start: process_start(pid),
            since: crate::support::clock::now_secs(),
            command: command.to_string(),
        }
    }

    fn to_bytes(&self) -> io::Result<Vec<u8>> {
        let mut bytes = serde_json::to_vec(&LockFile { orthoepy_lock: LOCK_FORMAT, holder: self.clone() })?;
        bytes.push(b'\n');
        Ok(bytes)
    }

    fn from_bytes(bytes: &[u8]) -> Result<LockHolder, String> {
        if bytes.is_empty() {
            return Err("the file is empty (a command killed while taking the lock?)".into());
        }
        let file: LockFile = serde_json::from_slice(bytes).map_err(|e| format!("not an orthoepy lock ({e})"))?;
        if file.orthoepy_lock != LOCK_FORMAT {
            return Err(format!("lock format {} is not the {LOCK_FORMAT} this version writes", file.orthoepy_lock));
        }
        if file.holder.pid == 0 || i32::try_from(file.holder.pid).is_err() {
            return Err(format!("process id {} is not a process id", file.holder.pid));
        }
        Ok(file.holder)
    }
}

impl std::fmt::Display for LockHolder {
    /// `process 4242 on host "quay" (orthoepy review, since 2024-05-01 09:30:00 UTC)`
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "process {} on host {:?} (orthoepy {}, since {})", self.pid, self.host, self.command, crate::support::clock::utc(self.since))
    }
}

/// Why the lock could not be taken.
#[derive(Debug, thiserror::Error)]
pub enum LockError {
    /// Another process on this host holds the lock and is running.
    #[error(
        "{}: the project is in use by {holder}; wait for that command to finish. \
         If that process is not running any more, remove the lock with `rm {}`",
        path.display(), path.display()
    )]
    Held {
        /// The lock file.
        path: PathBuf,
        /// Who holds it.
        holder: Box<LockHolder>,
    },
    /// The lock belongs to a process on another host, which cannot be checked from here.
    #[error(
        "{}: the project is in use by {holder}, and this is host {this_host:?}, so orthoepy cannot tell \
         whether it is still running. If no orthoepy command runs on {:?}, remove the lock with `rm {}`",
        path.display(), holder.host, path.display()
    )]
    HeldElsewhere {
        /// The lock file.
        path: PathBuf,
        /// Who holds it.
        holder: Box<LockHolder>,
        /// This host.
        this_host: String,
    },
    /// The lock file exists but cannot be read as one.
    #[error(
        "{}: {problem}. If no orthoepy command is working on this project, remove it with `rm {}`",
        path.display(), path.display()
    )]
    Damaged {
        /// The lock file.
        path: PathBuf,
        /// What is wrong with it.
        problem: String,
    },
    /// The lock file could not be read, written or removed.
    #[error("{}: {source} (check the project folder's permissions)", path.display())]
    Io {
        /// The file concerned.
        path: PathBuf,
        /// What the system said.
        #[source]
        source: io::Error,
    },
}

/// Something the caller should tell the user after taking the lock.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum LockNote {
    /// A lock whose process had gone was taken over.
    TookOver {
        /// The lock file.
        path: PathBuf,
        /// Who held it.
        previous: LockHolder,
    },
    /// A temporary file of a killed save was removed.
    RemovedLeftover(PathBuf),
}

impl std::fmt::Display for LockNote {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            LockNote::TookOver { path, previous } => {
                write!(f, "{}: took over the lock of {previous}, which is no longer running", path.display())
            }
            LockNote::RemovedLeftover(path) => {
                write!(f, "removed {}, left behind by a save that was interrupted", path.display())
            }
        }
    }
}

/// The project lock, held until dropped (or [`release`](ProjectLock::release)d).
///
/// ```
/// use orthoepy::lock::{LockError, ProjectLock};
/// let dir = tempfile::tempdir().unwrap();
/// let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
/// assert!(matches!(ProjectLock::acquire(dir.path(), "review"), Err(LockError::Held { .. })));
/// drop(lock);
/// assert!(ProjectLock::acquire(dir.path(), "review").is_ok());
/// ```
#[derive(Debug)]
pub struct ProjectLock {
    path: PathBuf,
    contents: Vec<u8>,
    holder: LockHolder,
    notes: Vec<LockNote>,
    released: bool,
}

/// How a lock's holder stands, seen from this process.
#[derive(Debug, PartialEq, Eq)]
enum Standing {
    Running,
    Gone,
    Elsewhere,
}

impl ProjectLock {
    /// Takes the lock of the project folder `root` for `command` (shown to anyone refused).
    ///
    /// Refuses at once when a running process holds it, when it belongs to another host, or
    /// when the lock file cannot be read; takes over a lock whose process has gone (see
    /// [`notes`](Self::notes)).
    pub fn acquire(root: &Path, command: &str) -> Result<ProjectLock, LockError> {
        let step = safe_io::hold_writes();
        let path = root.join(LOCK_FILE);
        let io_err = |source| LockError::Io { path: path.clone(), source };
        let holder = LockHolder::current(command);
        let contents = holder.to_bytes().map_err(io_err)?;
        let mut notes = Vec::new();
        // Each round either takes the lock, refuses, or removes a lock that has gone; a few
        // rounds are only needed when other processes race for the same lock.
        for _ in 0..4 {
            if create_exclusive(&path, &contents).map_err(io_err)? {
                HELD.lock().unwrap_or_else(PoisonError::into_inner).push((path.clone(), contents.clone()));
                // Dropping the lock below (when cleaning fails) takes the step itself.
                drop(step);
                let mut lock = ProjectLock { path, contents, holder, notes, released: false };
                // Our own lock's temporary file, left by a process killed while taking it.
                let own = lock.path.clone();
                lock.clean_leftovers(&[own.as_path()])?;
                return Ok(lock);
            }
            let Some(existing) = read_capped(&path).map_err(io_err)? else { continue };
            let previous = LockHolder::from_bytes(&existing)
                .map_err(|problem| LockError::Damaged { path: path.clone(), problem })?;
            match standing(&previous) {
                Standing::Running => return Err(LockError::Held { path, holder: Box::new(previous) }),
                Standing::Elsewhere => {
                    return Err(LockError::HeldElsewhere { path, holder: Box::new(previous), this_host: holder.host })
                }
                Standing::Gone => {
                    if take_away(&path, &existing).map_err(io_err)? {
                        notes.push(LockNote::TookOver { path: path.clone(), previous });
                    }
                }
            }
        }
        Err(io_err(io::Error::other("the lock kept changing while it was being taken; try again")))
    }

    /// Takes the lock of `project` for `command` and removes what killed saves left beside the
    /// project's lexicon, queue and journal (each removal is a note).
    ///
    /// This is the call every command that writes a project makes before it reads what it will
    /// write; keep the returned lock alive until the last write is done.
    ///
    /// ```
    /// let dir = tempfile::tempdir().unwrap();
    /// std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\n").unwrap();
    /// let project = orthoepy::project::Project::load(dir.path()).unwrap();
    /// let lock = orthoepy::lock::ProjectLock::acquire_for(&project, "apply").unwrap();
    /// for note in lock.notes() {
    ///     eprintln!("note: {note}");
    /// }
    /// ```
    pub fn acquire_for(project: &Project, command: &str) -> Result<ProjectLock, LockError> {
        let mut lock = ProjectLock::acquire(&project.root, command)?;
        lock.clean_leftovers(&[project.lexicon.as_path(), project.queue.as_path(), project.journal.as_path()])?;
        Ok(lock)
    }

    /// Removes temporary files of saves of `targets` (and of their backups) whose process is not
    /// running (see [`safe_io::remove_leftover_temps`]); each removal is added to the notes and
    /// returned.
    pub fn clean_leftovers(&mut self, targets: &[&Path]) -> Result<Vec<PathBuf>, LockError> {
        let mut removed = Vec::new();
        for target in targets {
            let gone = safe_io::remove_leftover_temps(target, process_running)
                .map_err(|source| LockError::Io { path: target.to_path_buf(), source })?;
            removed.extend(gone);
        }
        self.notes.extend(removed.iter().cloned().map(LockNote::RemovedLeftover));
        Ok(removed)
    }

    /// What the caller should tell the user: a lock taken over, leftovers removed.
    pub fn notes(&self) -> &[LockNote] {
        &self.notes
    }

    /// This process as written into the lock.
    pub fn holder(&self) -> &LockHolder {
        &self.holder
    }

    /// The lock file.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Releases the lock now, reporting a failure to remove it (dropping the lock releases it
    /// too, silently). A lock file that is no longer ours is left alone.
    pub fn release(mut self) -> Result<(), LockError> {
        self.released = true;
        self.remove_if_ours().map_err(|source| LockError::Io { path: self.path.clone(), source })
    }

    fn remove_if_ours(&self) -> io::Result<()> {
        let _step = safe_io::hold_writes();
        HELD.lock().unwrap_or_else(PoisonError::into_inner).retain(|(path, _)| *path != self.path);
        remove_if_holding(&self.path, &self.contents)
    }
}

impl Drop for ProjectLock {
    fn drop(&mut self) {
        if !self.released {
            let _ = self.remove_if_ours();
        }
    }
}

/// Removes the lock file at `path` if it holds `contents`.
fn remove_if_holding(path: &Path, contents: &[u8]) -> io::Result<()> {
    if read_capped(path)?.as_deref() == Some(contents) {
        match fs::remove_file(path) {
            Err(err) if err.kind() != io::ErrorKind::NotFound => return Err(err),
            _ => {}
        }
    }
    Ok(())
}

/// Whether a process with this id runs on this host: it exists and has not exited (a zombie
/// waiting to be collected does not count). Temporary files named after a running process are
/// never removed as leftovers.
///
/// ```
/// assert!(orthoepy::lock::process_running(std::process::id()));
/// ```
pub fn process_running(pid: u32) -> bool {
    !process_gone(pid) && !process_exited(pid)
}

/// Creates `path` holding `contents` only if it does not exist. Returns whether it was created.
///
/// The content is written and synced under a temporary name first and then hard-linked to
/// `path`, so a lock file is never seen half-written; file systems without hard links get an
/// exclusive create followed by the write.
fn create_exclusive(path: &Path, contents: &[u8]) -> io::Result<bool> {
    let temp = safe_io::temp_path(path, std::process::id());
    {
        let mut file = fs::OpenOptions::new().write(true).create(true).truncate(true).open(&temp)?;
        io::Write::write_all(&mut file, contents)?;
        file.sync_all()?;
    }
    let linked = fs::hard_link(&temp, path);
    let _ = fs::remove_file(&temp);
    match linked {
        Ok(()) => {}
        Err(err) if err.kind() == io::ErrorKind::AlreadyExists => return Ok(false),
        Err(_) => match fs::OpenOptions::new().write(true).create_new(true).open(path) {
            Ok(mut file) => {
                io::Write::write_all(&mut file, contents)?;
                file.sync_all()?;
            }
            Err(err) if err.kind() == io::ErrorKind::AlreadyExists => return Ok(false),
            Err(err) => return Err(err),
        },
    }
    if let Some(folder) = path.parent().filter(|p| !p.as_os_str().is_empty()) {
        safe_io::sync_folder(folder)?;
    }
    Ok(true)
}

/// The lock file's bytes, `None` when it does not exist. Larger files are cut at the cap, which
/// makes them fail to parse.
fn read_capped(path: &Path) -> io::Result<Option<Vec<u8>>> {
    match fs::File::open(path) {
        Ok(file) => {
            let mut bytes = Vec::new();
            file.take(MAX_LOCK_BYTES).read_to_end(&mut bytes)?;
            Ok(Some(bytes))
        }
        Err(err) if err.kind() == io::ErrorKind::NotFound => Ok(None),
        Err(err) => Err(err),
    }
}

/// Removes the lock at `path` if it still holds `stale`. Returns whether it did.
///
/// The lock is first renamed to a name of our own, which only one process can do; if what was
/// renamed is not the stale lock (another process took over first and its new lock was renamed),
/// it is linked back in place.
fn take_away(path: &Path, stale: &[u8]) -> io::Result<bool> {
    let mut name = path.file_name().map(|n| n.to_os_string()).unwrap_or_default();
    name.push(format!(".stale-{}", std::process::id()));
    let aside = path.with_file_name(name);
    match fs::rename(path, &aside) {
        Ok(()) => {}
        Err(err) if err.kind() == io::ErrorKind::NotFound => return Ok(false),
        Err(err) => return Err(err),
    }
    let moved = read_capped(&aside)?;
    if moved.as_deref() == Some(stale) {
        fs::remove_file(&aside)?;
        return Ok(true);
    }
    // Not the lock we judged: put it back unless a newer one took its place meanwhile.
    match fs::hard_link(&aside, path) {
        Ok(()) => {}
        Err(err) if err.kind() == io::ErrorKind::AlreadyExists => {}
        Err(err) => return Err(err),
    }
    fs::remove_file(&aside)?;
    Ok(false)
}

fn standing(holder: &LockHolder) -> Standing {
    if holder.host != host_name() {
        return Standing::Elsewhere;
    }
    if let (Some(then), Some(now)) = (&holder.boot_id, boot_id()) {
        if *then != now {
            return Standing::Gone;
        }
    }
    if !process_running(holder.pid) {
        return Standing::Gone;
    }
    match (holder.process_start, process_start(holder.pid)) {
        (Some(then), Some(now)) if then != now => Standing::Gone,
        _ => Standing::Running,
    }
}

/// True when no process with this id exists on this host (a process of another user exists).
#[cfg(unix)]
fn process_gone(pid: u32) -> bool {
    let Ok(pid) = libc::pid_t::try_from(pid) else { return true };
    if pid <= 0 {
        return true;
    }
    // SAFETY: kill with signal 0 sends nothing; it only checks that the process exists and may
    // be signalled. The pid is positive, so it names one process, never a group.
    let result = unsafe { libc::kill(pid, 0) };
    result != 0 && io::Error::last_os_error().raw_os_error() == Some(libc::ESRCH)
}

/// Without a way to ask, every process counts as running (a lock is then never taken over).
#[cfg(not(unix))]
fn process_gone(_pid: u32) -> bool {
    false
}

/// The start time of a process in clock ticks after boot (field 22 of `/proc/PID/stat`, see
/// proc(5)), where the system offers it.
fn process_start(pid: u32) -> Option<u64> {
    start_from_stat(&fs::read_to_string(format!("/proc/{pid}/stat")).ok()?)
}

/// Whether the process has exited and only waits for its parent to collect it (state `Z`
/// zombie or `X` dead in `/proc/PID/stat`, field 3); such a process still answers `kill(pid, 0)`.
fn process_exited(pid: u32) -> bool {
    fs::read_to_string(format!("/proc/{pid}/stat"))
        .ok()
        .and_then(|stat| stat_field(&stat, 3).map(|state| matches!(state, "Z" | "X")))
        .unwrap_or(false)
}

/// Field 22 (start time) of a `/proc/PID/stat` line.
fn start_from_stat(stat: &str) -> Option<u64> {
    stat_field(stat, 22)?.parse().ok()
}

/// Field `n` (1-based, `n >= 3`) of a `/proc/PID/stat` line. Field 2 is the command name in
/// parentheses and may itself hold spaces and parentheses, so fields are counted from the last `)`.
fn stat_field(stat: &str, n: usize) -> Option<&str> {
    let (_, after_name) = stat.rsplit_once(')')?;
    after_name.split_whitespace().nth(n.checked_sub(3)?)
}

/// The Linux boot id, which changes at every restart.
fn boot_id() -> Option<String> {
    let id = fs::read_to_string("/proc/sys/kernel/random/boot_id").ok()?;
    Some(id.trim().to_string()).filter(|s| !s.is_empty())
}

/// This host's name.
#[cfg(unix)]
fn host_name() -> String {
    let mut buf = [0u8; 256];
    // SAFETY: the buffer is valid for its whole length, which is what we pass.
    let result = unsafe { libc::gethostname(buf.as_mut_ptr().cast(), buf.len()) };
    if result != 0 {
        return String::new();
    }
    let end = buf.iter().position(|&b| b == 0).unwrap_or(buf.len());
    String::from_utf8_lossy(buf.get(..end).unwrap_or_default()).into_owned()
}

/// This host's name.
#[cfg(not(unix))]
fn host_name() -> String {
    std::env::var("COMPUTERNAME").unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A process id that is certainly not running: a child that has exited and been reaped.
    fn dead_pid() -> u32 {
        let mut child = std::process::Command::new("true").spawn().unwrap();
        let pid = child.id();
        child.wait().unwrap();
        pid
    }

    fn write_lock(dir: &Path, holder: &LockHolder) -> Vec<u8> {
        let bytes = holder.to_bytes().unwrap();
        fs::write(dir.join(LOCK_FILE), &bytes).unwrap();
        bytes
    }

    fn someone(pid: u32) -> LockHolder {
        LockHolder { pid, host: host_name(), boot_id: boot_id(), process_start: None, since: 1_714_555_800, command: "review".into() }
    }

    #[test]
    fn second_writer_in_the_same_process_is_refused_with_the_holder_named() {
        let dir = tempfile::tempdir().unwrap();
        let first = ProjectLock::acquire(dir.path(), "review").unwrap();
        assert!(first.notes().is_empty());
        let err = ProjectLock::acquire(dir.path(), "apply").unwrap_err();
        let LockError::Held { holder, .. } = &err else { panic!("{err:?}") };
        assert_eq!(**holder, *first.holder());
        let text = err.to_string();
        for part in [&format!("process {}", std::process::id()), "orthoepy review", "since ", "UTC", "rm "] {
            assert!(text.contains(part), "{part:?} missing from {text}");
        }
    }

    #[test]
    fn lock_of_a_process_that_is_gone_is_taken_over_with_a_note() {
        let dir = tempfile::tempdir().unwrap();
        let gone = someone(dead_pid());
        write_lock(dir.path(), &gone);
        let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
        assert_eq!(lock.notes(), [LockNote::TookOver { path: dir.path().join(LOCK_FILE), previous: gone }]);
        assert!(lock.notes()[0].to_string().contains("no longer running"));
        let now: LockFile = serde_json::from_slice(&fs::read(dir.path().join(LOCK_FILE)).unwrap()).unwrap();
        assert_eq!(now.holder, *lock.holder());
    }

    #[test]
    fn lock_of_an_exited_process_not_yet_collected_is_gone() {
        // A child that has exited but is not waited for stays a zombie (proc(5), state Z).
        let mut child = std::process::Command::new("true").spawn().unwrap();
        let pid = child.id();
        let deadline = std::time::Instant::now() + std::time::Duration::from_secs(10);
        while !process_exited(pid) && std::time::Instant::now() < deadline && process_start(pid).is_some() {
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
        if process_exited(pid) {
            assert!(!process_gone(pid), "kill(pid, 0) still finds a zombie");
            let dir = tempfile::tempdir().unwrap();
            write_lock(dir.path(), &someone(pid));
            let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
            assert!(matches!(lock.notes(), [LockNote::TookOver { .. }]), "{:?}", lock.notes());
        }
        child.wait().unwrap();
    }

    #[test]
    fn reused_pid_is_told_apart_by_its_start_time() {
        let me = std::process::id();
        let Some(start) = process_start(me) else { return }; // only where /proc offers start times
        let dir = tempfile::tempdir().unwrap();
        // Our own PID, but a process that started at another moment: the PID was reused.
        write_lock(dir.path(), &LockHolder { process_start: Some(start + 1), ..someone(me) });
        let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
        assert!(matches!(lock.notes(), [LockNote::TookOver { .. }]), "{:?}", lock.notes());
        drop(lock);
        // The same PID with the same start time is this very process: running.
        write_lock(dir.path(), &LockHolder { process_start: Some(start), ..someone(me) });
        assert!(matches!(ProjectLock::acquire(dir.path(), "apply"), Err(LockError::Held { .. })));
    }

    #[test]
    fn lock_from_before_a_restart_is_gone() {
        let Some(boot) = boot_id() else { return }; // only where the system has a boot id
        let dir = tempfile::tempdir().unwrap();
        let before_restart = format!("{boot}-before");
        // Our own running PID, but written before the host was restarted.
        write_lock(dir.path(), &LockHolder { boot_id: Some(before_restart), ..someone(std::process::id()) });
        let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
        assert!(matches!(lock.notes(), [LockNote::TookOver { .. }]));
    }

    #[test]
    fn lock_of_another_host_is_never_taken_over() {
        let dir = tempfile::tempdir().unwrap();
        let elsewhere = LockHolder { host: format!("{}-other", host_name()), ..someone(dead_pid()) };
        let bytes = write_lock(dir.path(), &elsewhere);
        let err = ProjectLock::acquire(dir.path(), "apply").unwrap_err();
        assert!(matches!(err, LockError::HeldElsewhere { .. }), "{err:?}");
        assert!(err.to_string().contains("cannot tell"), "{err}");
        assert_eq!(fs::read(dir.path().join(LOCK_FILE)).unwrap(), bytes);
    }

    #[test]
    fn damaged_lock_file_is_refused_and_left_alone() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(LOCK_FILE);
        let long = vec![b'x'; MAX_LOCK_BYTES as usize + 10];
        let zero_pid = br#"{"orthoepy_lock":1,"pid":0,"host":"h","since":0,"command":"x"}"#.to_vec();
        let garbage: [&[u8]; 5] = [b"", b"\xff\xfe garbage\n", b"{\"pid\":12}\n", &long, &zero_pid];
        for content in garbage {
            fs::write(&path, content).unwrap();
            let err = ProjectLock::acquire(dir.path(), "apply").unwrap_err();
            assert!(matches!(err, LockError::Damaged { .. }), "{err:?}");
            assert!(err.to_string().contains(&format!("rm {}", path.display())), "{err}");
            assert_eq!(fs::read(&path).unwrap(), content);
        }
    }

    #[test]
    fn drop_removes_only_our_own_lock() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(LOCK_FILE);
        drop(ProjectLock::acquire(dir.path(), "apply").unwrap());
        assert!(!path.exists());
        let lock = ProjectLock::acquire(dir.path(), "apply").unwrap();
        // Someone removed our lock by hand and another command took the project.
        let theirs = write_lock(dir.path(), &someone(dead_pid()));
        lock.release().unwrap();
        assert_eq!(fs::read(&path).unwrap(), theirs);
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 1, "no temporary file is left");
    }

    #[test]
    fn taking_away_what_is_not_the_stale_lock_puts_it_back() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(LOCK_FILE);
        fs::write(&path, b"a newer lock\n").unwrap();
        assert!(!take_away(&path, b"the stale lock\n").unwrap());
        assert_eq!(fs::read(&path).unwrap(), b"a newer lock\n");
        assert!(take_away(&path, b"a newer lock\n").unwrap());
        assert!(!path.exists());
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn leftovers_of_killed_saves_are_removed_under_the_lock() {
        let dir = tempfile::tempdir().unwrap();
        fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\njournal = \"j/journal.jsonl\"\n").unwrap();
        fs::create_dir(dir.path().join("j")).unwrap();
        let dead = dead_pid();
        let leftovers =
            [dir.path().join(format!(".lexicon.csv.{dead}.tmp")), dir.path().join(format!("j/.journal.jsonl.{dead}.tmp"))];
        for f in &leftovers {
            fs::write(f, b"half").unwrap();
        }
        let running = dir.path().join(format!(".lexicon.csv.{}.tmp", std::process::id()));
        fs::write(&running, b"a save in progress").unwrap();
        let project = Project::load(dir.path()).unwrap();
        let lock = ProjectLock::acquire_for(&project, "apply").unwrap();
        let notes: Vec<LockNote> = leftovers.iter().cloned().map(LockNote::RemovedLeftover).collect();
        assert_eq!(lock.notes(), notes.as_slice());
        assert!(leftovers.iter().all(|f| !f.exists()));
        assert!(running.exists(), "a live process's temporary file is kept");
    }

    #[test]
    fn utc_dates_match_known_instants() {
        // Unix time 0 is 1970-01-01 00:00:00 UTC (POSIX.1-2017, 4.16); 951_782_400 is the leap
        // day 2000-02-29 (common practice, e.g. `date -u -d @951782400`).
        assert_eq!(crate::support::clock::utc(0), "1970-01-01 00:00:00 UTC");
        assert_eq!(crate::support::clock::utc(951_782_400), "2000-02-29 00:00:00 UTC");
        assert_eq!(crate::support::clock::utc(1_714_555_800), "2024-05-01 09:30:00 UTC");
    }

    #[test]
    fn start_time_field_is_read_after_a_name_with_parentheses() {
        // proc(5): "(1) pid", "(2) comm ... in parentheses", "(3) state", ..., "(22) starttime".
        let mut fields: Vec<String> = (3..=52).map(|n| n.to_string()).collect();
        fields[0] = "S".into();
        fields[22 - 3] = "987654".into();
        let line = format!("4242 (odd) name (x) {}\n", fields.join(" "));
        assert_eq!(start_from_stat(&line), Some(987_654));
        assert_eq!(start_from_stat("4242 (truncated"), None);
        assert_eq!(start_from_stat("4242 (short) S 1 2\n"), None);
        assert_eq!(stat_field(&line, 3), Some("S"));
    }
}
