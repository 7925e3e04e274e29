//! The lexicon commands end to end: import, export, find, stats, and the error contract
//! (exit 2 with file, line and column; nothing written).

mod common;
use common::cli::bin as orthoepy;
use predicates::prelude::*;
use std::path::Path;


fn write(path: &Path, text: &str) {
    std::fs::write(path, text).unwrap();
}

const PLAIN: &str = "# a small harbour lexicon\nquay  K IY1\nferry F EH1 R IY0\nferry(2) F EH1 R IY2 # rare\npier P IH1 R\npeer P IH1 R\nlonely\n";

#[test]
fn import_keeps_good_lines_and_names_bad_ones() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("harbour.dict");
    write(&input, PLAIN);
    let out = dir.path().join("lexicon.csv");
    orthoepy()
        .args(["import", "plain"])
        .arg(&input)
        .arg("-o")
        .arg(&out)
        .assert()
        .success()
        .stderr(predicate::str::contains("harbour.dict:7:7:").and(predicate::str::contains("no pronunciation")));
    let csv = std::fs::read_to_string(&out).unwrap();
    assert_eq!(
        csv,
        "word,pronunciation,status,source,score,note\n\
         ferry,F EH1 R IY0,imported,harbour,,\n\
         ferry,F EH1 R IY2,imported,harbour,,rare\n\
         peer,P IH1 R,imported,harbour,,\n\
         pier,P IH1 R,imported,harbour,,\n\
         quay,K IY1,imported,harbour,,\n"
    );
    // Refuses to replace an existing store without --force.
    orthoepy().args(["import", "plain"]).arg(&input).arg("-o").arg(&out).assert().code(2);
    // --strict writes nothing when a line is bad.
    let strict_out = dir.path().join("strict.csv");
    orthoepy().args(["import", "plain", "--strict"]).arg(&input).arg("-o").arg(&strict_out).assert().code(2);
    assert!(!strict_out.exists());
}

#[test]
fn find_stats_and_export() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("harbour.dict");
    write(&input, PLAIN);
    let lexicon = dir.path().join("lexicon.csv");
    orthoepy().args(["import", "plain"]).arg(&input).arg("-o").arg(&lexicon).assert().success();

    orthoepy().arg("find").arg("FERRY").arg("-l").arg(&lexicon).assert().success().stdout("ferry\tF EH1 R IY0\timported\tharbour\nferry\tF EH1 R IY2\timported\tharbour\n");
    orthoepy().args(["find", "--sounds-like", "pier", "-l"]).arg(&lexicon).assert().success().stdout(predicate::str::starts_with("peer\t"));
    orthoepy().args(["find", "--fuzzy", "1", "qay", "-l"]).arg(&lexicon).assert().success().stdout(predicate::str::starts_with("quay\t"));
    orthoepy().args(["find", "--prefix", "pe", "-l"]).arg(&lexicon).assert().success().stdout(predicate::str::starts_with("peer\t"));
    orthoepy().args(["find", "ship", "-l"]).arg(&lexicon).assert().code(1);

    let out = orthoepy().args(["stats", "--format", "json"]).arg(&lexicon).assert().success().get_output().stdout.clone();
    let stats: serde_json::Value = serde_json::from_slice(&out).unwrap();
    assert_eq!(stats["entries"], 5);
    assert_eq!(stats["words"], 4);
    assert_eq!(stats["variants_per_word"]["2"], 1);
    assert_eq!(stats["phone_frequencies"]["P"], 2);

    let build = dir.path().join("build.txt");
    let phones = dir.path().join("phones.txt");
    orthoepy().arg("export").arg(&lexicon).args(["--format", "plain", "--strip-stress", "-o"]).arg(&build).arg("--phones").arg(&phones).assert().success();
    assert_eq!(std::fs::read_to_string(&build).unwrap(), "ferry F EH R IY\npeer P IH R\npier P IH R\nquay K IY\n");
    assert_eq!(std::fs::read_to_string(&phones).unwrap(), "EH\nF\nIH\nIY\nK\nP\nR\n");
}

#[test]
fn bad_store_exits_2_with_file_line_column() {
    let dir = tempfile::tempdir().unwrap();
    let lexicon = dir.path().join("lexicon.csv");
    write(&lexicon, "word,pronunciation,status,source,score,note\nquay,K IY1,accepted,,,\nferry,F EH1 R IY0,aproved,,,\n");
    orthoepy()
        .arg("stats")
        .arg(&lexicon)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("lexicon.csv:3:19: unknown status \"aproved\""));
}

#[test]
fn project_file_is_found_upwards() {
    let dir = tempfile::tempdir().unwrap();
    write(&dir.path().join("orthoepy.toml"), "lexicon = \"words.csv\"\n");
    write(&dir.path().join("words.csv"), "word,pronunciation,status,source,score,note\nquay,K IY1,accepted,,,\n");
    let nested = dir.path().join("a/b");
    std::fs::create_dir_all(&nested).unwrap();
    orthoepy().current_dir(&nested).args(["find", "quay"]).assert().success();
    orthoepy().args(["find", "quay", "--project"]).arg(dir.path()).assert().success();
    let typo = tempfile::tempdir().unwrap();
    write(&typo.path().join("orthoepy.toml"), "lexicon = \"words.csv\"\nfold-case = true\n");
    orthoepy().args(["find", "quay", "--project"]).arg(typo.path()).assert().code(2).stderr(predicate::str::contains("orthoepy.toml:2:1"));
}
