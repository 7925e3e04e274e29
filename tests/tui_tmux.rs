//! End to end in a real terminal: the binary runs inside tmux (send-keys types, capture-pane
//! reads the screen). Open the demo, accept two words, edit a third, kill -9 the process,
//! reopen, and find all three decisions kept; then merge them with `apply`.
//! Skips (with a message) when tmux is not installed.

mod common;

use common::tmux::{have_tmux, Session};
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_orthoepy")
}

/// A fresh copy of the demo project in a temporary folder (kept while the first value lives).
fn demo_project() -> (tempfile::TempDir, PathBuf) {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("coast");
    let made = Command::new(bin()).args(["demo", "--no-review"]).arg(&dir).output().unwrap();
    assert!(made.status.success(), "{}", String::from_utf8_lossy(&made.stderr));
    (tmp, dir)
}

fn review_command(dir: &Path) -> String {
    format!("exec {} review --project {} --reviewer tester", bin(), dir.display())
}

#[test]
fn decisions_survive_kill_9() {
    if !have_tmux() {
        eprintln!("SKIPPED decisions_survive_kill_9: tmux is not installed (apt-get install tmux)");
        return;
    }
    let (_tmp, dir) = demo_project();

    let name = format!("orthoepy-e2e-{}", std::process::id());
    let s = Session::start(&name, &review_command(&dir));
    // Demo queue order: most frequent first (Kelport ×10, then Brannoch ×4 ...).
    s.wait_for("Kelport");
    s.keys(&["Enter"]);
    s.wait_for("saved ✓ #1");
    s.keys(&["Enter"]);
    s.wait_for("saved ✓ #2");
    let third = s.screen();
    s.keys(&["e"]);
    s.wait_for("editing");
    s.keys(&["C-u"]); // not an editor key: ignored
    let backspaces = vec!["BSpace"; 40];
    s.keys(&backspaces);
    s.literal("K W IH1 L HH EY2 V AH0 N");
    s.keys(&["Enter"]);
    s.wait_for("saved ✓ #3");
    assert!(third.contains("Quillhaven"), "third item is Quillhaven:\n{third}");

    let pid = s.pid();
    let killed = Command::new("kill").args(["-9", &pid]).status().unwrap();
    assert!(killed.success());
    drop(s);

    let s = Session::start(&format!("{name}-b"), &review_command(&dir));
    let screen = s.wait_for("3/");
    assert!(screen.contains("3 decision(s) from the journal not yet applied"), "{screen}");
    s.keys(&["q"]);
    drop(s);

    let listed = Command::new(bin()).args(["queue", "list", "--format", "json", "--project"]).arg(&dir).output().unwrap();
    let items: serde_json::Value = serde_json::from_slice(&listed.stdout).unwrap();
    let decided: Vec<&str> = items
        .as_array()
        .unwrap()
        .iter()
        .filter(|i| i["state"] == "decided")
        .filter_map(|i| i["word"].as_str())
        .collect();
    assert_eq!(decided, vec!["Kelport", "Brannoch", "Quillhaven"]);

    let applied = Command::new(bin()).args(["apply", "--project"]).arg(&dir).output().unwrap();
    assert!(applied.status.success(), "{}", String::from_utf8_lossy(&applied.stderr));
    let lexicon = std::fs::read_to_string(dir.join("lexicon.csv")).unwrap();
    assert!(lexicon.contains("Quillhaven,K W IH1 L HH EY2 V AH0 N,accepted,review,"), "{lexicon}");
    assert!(lexicon.lines().any(|l| l.starts_with("Kelport,") && l.contains(",accepted,")));
    assert!(dir.join("lexicon.csv.bak").exists());
}

/// The pid of the process whose parent is `parent` (read from /proc/PID/stat, field 4).
fn child_of(parent: &str) -> Option<String> {
    let start = Instant::now();
    while start.elapsed() < Duration::from_secs(10) {
        for entry in std::fs::read_dir("/proc").ok()?.flatten() {
            let Ok(stat) = std::fs::read_to_string(entry.path().join("stat")) else { continue };
            // "PID (COMMAND) STATE PPID ...": the command may hold spaces, so split after ')'.
            let ppid = stat.rsplit_once(')').and_then(|(_, rest)| rest.split_whitespace().nth(1).map(str::to_string));
            if ppid.as_deref() == Some(parent) {
                return Some(entry.file_name().to_string_lossy().into_owned());
            }
        }
        std::thread::sleep(Duration::from_millis(100));
    }
    None
}

#[test]
fn sigterm_and_sighup_restore_the_terminal_and_keep_the_journal_whole() {
    if !have_tmux() {
        eprintln!("SKIPPED sigterm_and_sighup_restore_the_terminal: tmux is not installed (apt-get install tmux)");
        return;
    }
    for signal in ["TERM", "HUP"] {
        let (_tmp, dir) = demo_project();
        // The shell stays after the screen closes, to show the terminal's state: `stty -a`
        // prints "icanon" and "echo" (not "-icanon", "-echo") once raw mode is off.
        let command = format!(
            "{} review --project {} --reviewer tester; echo \"closed with $?\"; stty -a; sleep 60",
            bin(),
            dir.display()
        );
        let name = format!("orthoepy-sig{signal}-{}", std::process::id());
        let s = Session::start(&name, &command);
        s.wait_for("Kelport");
        s.keys(&["Enter"]);
        s.wait_for("saved ✓ #1");
        let screen_pid = child_of(&s.pid()).expect("the review process");
        let sent = Command::new("kill").args([&format!("-{signal}"), &screen_pid]).status().unwrap();
        assert!(sent.success());
        let after = s.wait_for("closed with 0");
        assert!(!after.contains("Kelport") && !after.contains("candidates"), "SIG{signal}: the frame is gone:\n{after}");
        assert!(after.contains(" icanon") && after.contains(" echo "), "SIG{signal}: raw mode off:\n{after}");
        assert!(after.contains("decision(s) in"), "SIG{signal}: closed as q closes:\n{after}");
        drop(s);
        // Nothing half-written: the journal checks clean and holds the decision.
        let check = Command::new(bin()).args(["journal", "check", "--project"]).arg(&dir).output().unwrap();
        assert!(check.status.success(), "SIG{signal}: {}", String::from_utf8_lossy(&check.stdout));
        let journal = std::fs::read_to_string(dir.join("journal.jsonl")).unwrap();
        assert_eq!(journal.lines().count(), 1, "{journal}");
        assert!(!dir.join(".orthoepy.lock").exists(), "SIG{signal}: the lock is released");
    }
}

/// A terminal that goes away (the window closed: here the tmux session is killed, which closes
/// the pane's pseudo-terminal) ends the screen as `q` does: the process exits, the lock is
/// released and the journal keeps the decision. Before this was handled the screen kept running
/// on a core at 100% for good, since the terminal library's wait retried a dead terminal.
#[test]
fn a_terminal_that_hangs_up_ends_the_screen() {
    if !have_tmux() {
        eprintln!("SKIPPED a_terminal_that_hangs_up_ends_the_screen: tmux is not installed (apt-get install tmux)");
        return;
    }
    let (_tmp, dir) = demo_project();
    let s = Session::start(&format!("orthoepy-hangup-{}", std::process::id()), &review_command(&dir));
    s.wait_for("Kelport");
    s.keys(&["Enter"]);
    s.wait_for("saved ✓ #1");
    let pid: i32 = s.pid().parse().unwrap();
    drop(s); // kill-session: the pseudo-terminal closes
    let start = Instant::now();
    // SAFETY: signal 0 only asks whether the process exists.
    while unsafe { libc::kill(pid, 0) } == 0 {
        if start.elapsed() > Duration::from_secs(10) {
            // SAFETY: ends the process this test started.
            unsafe { libc::kill(pid, libc::SIGKILL) };
            panic!("the review screen still runs 10 s after its terminal hung up");
        }
        std::thread::sleep(Duration::from_millis(50));
    }
    assert!(!dir.join(".orthoepy.lock").exists(), "the lock is released");
    let check = Command::new(bin()).args(["journal", "check", "--project"]).arg(&dir).output().unwrap();
    assert!(check.status.success(), "{}", String::from_utf8_lossy(&check.stdout));
    assert_eq!(std::fs::read_to_string(dir.join("journal.jsonl")).unwrap().lines().count(), 1);
}
