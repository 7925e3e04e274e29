//! `orthoepy audit` end to end: report formats, exit codes (0 clean, 1 findings at or above
//! --fail-on, 2 could not run), project defaults, check selection, and --fix (safe repairs only,
//! printed, saved with a backup, idempotent).

mod common;
use common::cli::orthoepy;
use predicates::prelude::*;
use std::path::Path;

const HEADER: &str = "word,pronunciation,status,source,score,note\n";


fn store(dir: &Path, rows: &str) -> std::path::PathBuf {
    let path = dir.join("lexicon.csv");
    std::fs::write(&path, format!("{HEADER}{rows}")).unwrap();
    path
}

#[test]
fn a_clean_lexicon_exits_zero() {
    let dir = tempfile::tempdir().unwrap();
    let path = store(dir.path(), "ferry,F EH1 R IY0,accepted,,,\nquay,K IY1,accepted,,,\n");
    orthoepy(dir.path())
        .arg("audit")
        .arg(&path)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("2 entries, 14 checks: 0 errors, 0 warnings, 0 notes"));
}

#[test]
fn errors_exit_one_with_file_line_and_fix() {
    let dir = tempfile::tempdir().unwrap();
    let path = store(dir.path(), "pier,P IH1 XR,accepted,,,\nquay,K IY1,accepted,,,\n");
    orthoepy(dir.path())
        .arg("audit")
        .arg(&path)
        .assert()
        .code(1)
        .stdout(
            predicate::str::contains("unknown-phone (error, 1)")
                .and(predicate::str::contains("lexicon.csv:2: pier [P IH1 XR]: `XR` (phone 3, column 7)"))
                .and(predicate::str::contains("      fix: nearest symbols: ")),
        );
}

#[test]
fn fail_on_sets_the_threshold() {
    let dir = tempfile::tempdir().unwrap();
    // Only a warning: a consonant-only pronunciation.
    let path = store(dir.path(), "shh,SH,accepted,,,\n");
    orthoepy(dir.path()).arg("audit").arg(&path).assert().code(0);
    orthoepy(dir.path()).arg("audit").arg(&path).args(["--fail-on", "warning"]).assert().code(1);
}

#[test]
fn json_is_one_object_with_summary_and_findings() {
    let dir = tempfile::tempdir().unwrap();
    let path = store(dir.path(), "quay,K IY1,accepted,,,\nquay,K IY1,accepted,,,\n");
    let out = orthoepy(dir.path()).arg("audit").arg(&path).args(["--format", "json"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["summary"]["entries"], 2);
    let finding = &json["findings"][0];
    assert_eq!(finding["check"], "duplicate-entry");
    assert_eq!(finding["severity"], "error");
    assert_eq!((finding["word"].as_str(), finding["line"].as_u64(), finding["entry"].as_u64()), (Some("quay"), Some(3), Some(1)));
    assert_eq!(finding["pronunciation"], "K IY1");
    assert!(finding["message"].as_str().unwrap().contains("line 2"));
    assert!(finding["suggestion"].is_string());
}

#[test]
fn checks_can_be_chosen_and_unknown_ids_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = store(dir.path(), "quay,K IY1,accepted,,,\nquay,K IY1,accepted,,,\npier,P IH1 XR,accepted,,,\n");
    let out = orthoepy(dir.path()).arg("audit").arg(&path).args(["--checks", "duplicate-entry", "--format", "json"]).output().unwrap();
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["findings"].as_array().map(Vec::len), Some(1));
    orthoepy(dir.path())
        .arg("audit")
        .arg(&path)
        .args(["--checks", "duplicate-entries"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("did you mean \"duplicate-entry\""));
}

#[test]
fn missing_files_and_bad_phonesets_exit_two() {
    let dir = tempfile::tempdir().unwrap();
    orthoepy(dir.path()).args(["audit", "nowhere.csv"]).assert().code(2).stderr(predicate::str::contains("nowhere.csv"));
    let path = store(dir.path(), "quay,K IY1,accepted,,,\n");
    orthoepy(dir.path()).arg("audit").arg(&path).args(["--phoneset", "klingon"]).assert().code(2);
    orthoepy(dir.path()).arg("audit").assert().code(2).stderr(predicate::str::contains("orthoepy.toml"));
}

#[test]
fn the_project_supplies_lexicon_and_stress_policy() {
    let dir = tempfile::tempdir().unwrap();
    store(dir.path(), "abs,EY1 B IY1 EH1 S,accepted,,,\n");
    std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\n").unwrap();
    orthoepy(dir.path()).args(["audit", "--fail-on", "warning"]).assert().code(1).stdout(predicate::str::contains("multiple-primary-stress"));
    std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\n[stress]\nprimary = \"at-least-one\"\n").unwrap();
    orthoepy(dir.path()).args(["audit", "--fail-on", "warning"]).assert().code(0);
}

#[test]
fn fix_makes_safe_repairs_prints_them_keeps_a_backup_and_is_idempotent() {
    let dir = tempfile::tempdir().unwrap();
    let rows = "quay ,K IY1,accepted,,,\nquay,K IY1,accepted,,,\n\"new  york\",N UW1 Y AO1 R K,accepted,,,\npier\u{200B},P IH1 R,accepted,,,\nFerry,F EH1 R IY0,accepted,,,\nferry,F EH1 R IY0,accepted,,,\n";
    let path = store(dir.path(), rows);
    let original = std::fs::read(&path).unwrap();
    orthoepy(dir.path())
        .arg("audit")
        .arg(&path)
        .arg("--fix")
        .assert()
        .code(1) // "Ferry" / "ferry" needs a person: case is not a safe repair
        .stdout(
            predicate::str::contains("line 2: headword \"quay \" -> \"quay\" (trimmed surrounding whitespace)")
                .and(predicate::str::contains("folded repeated spaces"))
                .and(predicate::str::contains("dropped U+200B ZERO WIDTH SPACE"))
                .and(predicate::str::contains("line 3: dropped \"quay\" [K IY1], an exact copy of line 2"))
                .and(predicate::str::contains("4 safe repairs saved"))
                .and(predicate::str::contains("normalization-duplicate (error, 1)")),
        );
    let backup = orthoepy::safe_io::backup_path(&path);
    assert_eq!(std::fs::read(&backup).unwrap(), original);
    let fixed = std::fs::read_to_string(&path).unwrap();
    assert_eq!(
        fixed,
        format!("{HEADER}Ferry,F EH1 R IY0,accepted,,,\nferry,F EH1 R IY0,accepted,,,\nnew york,N UW1 Y AO1 R K,accepted,,,\npier,P IH1 R,accepted,,,\nquay,K IY1,accepted,,,\n")
    );
    orthoepy(dir.path()).arg("audit").arg(&path).arg("--fix").assert().code(1).stdout(predicate::str::contains("nothing to fix safely"));
    assert_eq!(std::fs::read_to_string(&path).unwrap(), fixed, "a second --fix changes nothing");
}

#[test]
fn saving_repairs_refuses_a_file_changed_on_disk() {
    use orthoepy::lexicon::{HeadwordPolicy, Lexicon, LexiconError, LoadMode};
    let dir = tempfile::tempdir().unwrap();
    let path = store(dir.path(), "quay ,K IY1,accepted,,,\n");
    let mut lexicon = Lexicon::load_with(&path, HeadwordPolicy::default(), LoadMode::Repair).unwrap();
    assert_eq!(orthoepy::audit::fix::apply(&mut lexicon).len(), 1);
    let theirs = format!("{HEADER}pier,P IH1 R,accepted,,,\n");
    std::fs::write(&path, &theirs).unwrap();
    assert!(matches!(lexicon.save(), Err(LexiconError::ChangedOnDisk { .. })));
    assert_eq!(std::fs::read_to_string(&path).unwrap(), theirs);
}
