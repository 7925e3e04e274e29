//! End to end in a real terminal: the binary runs inside tmux (send-keys types, capture-pane
//! reads the screen). Open the demo, accept two words, edit a third, kill -9 the process,
//! reopen, and find all three decisions kept; then merge them with `apply`.
//! Skips (with a message) when tmux is not installed.

mod common;

use common::tmux::{have_tmux, Session};
use std::path::Path;
use std::process::Command;

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_orthoepy")
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
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("coast");
    let made = Command::new(bin()).args(["demo", "--no-review"]).arg(&dir).output().unwrap();
    assert!(made.status.success(), "{}", String::from_utf8_lossy(&made.stderr));

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
