//! Driving the real `orthoepy` binary from integration tests: one place for the command
//! builders every CLI test uses.

use assert_cmd::Command;
use std::path::Path;

/// `orthoepy` with no working folder set.
pub fn bin() -> Command {
    Command::cargo_bin("orthoepy").expect("the orthoepy binary is built for integration tests")
}

/// `orthoepy` run inside `dir`.
pub fn orthoepy(dir: &Path) -> Command {
    let mut cmd = bin();
    cmd.current_dir(dir);
    cmd
}

/// `orthoepy ARGS... --project DIR` (the option is global, so it may come last).
pub fn in_project(dir: &Path, args: &[&str]) -> Command {
    let mut cmd = bin();
    cmd.args(args).arg("--project").arg(dir);
    cmd
}

/// A small project in `dir`: orthoepy.toml (en-arpa, `queue.jsonl`, `journal.jsonl`) and a
/// lexicon store holding the header and `rows` (CSV lines, each ending in a newline).
pub fn write_project(dir: &Path, rows: &str) {
    std::fs::write(
        dir.join("orthoepy.toml"),
        "lexicon = \"lexicon.csv\"\nphoneset = \"en-arpa\"\nqueue = \"queue.jsonl\"\njournal = \"journal.jsonl\"\n",
    )
    .unwrap();
    std::fs::write(dir.join("lexicon.csv"), format!("word,pronunciation,status,source,score,note\n{rows}")).unwrap();
}
