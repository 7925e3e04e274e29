//! Moving lexicons between systems, through the real binary: `show` (IPA and X-SAMPA checked
//! against panphon 0.22.2's ipa-xsampa.csv, a copy in tests/reference/panphon-0.22.2/).

mod common;

use common::cli::{in_project, write_project};
use orthoepy::phoneset::{Phoneset, StressLevel};
use std::collections::HashMap;

const XSAMPA: &str = include_str!("reference/panphon-0.22.2/ipa-xsampa.csv");

/// panphon's IPA → X-SAMPA rows (read with the csv crate), including the stress marks and the
/// syllable break.
fn panphon_xsampa() -> HashMap<Vec<char>, String> {
    let mut reader = csv::Reader::from_reader(XSAMPA.as_bytes());
    reader
        .records()
        .map(|r| r.expect("panphon row"))
        .filter(|r| !r[0].is_empty() && !r[1].is_empty())
        .map(|r| (r[0].chars().collect(), r[1].to_string()))
        .collect()
}

/// IPA spelled out in panphon's X-SAMPA, longest row first; `None` when a character has no row.
fn to_xsampa(ipa: &str, table: &HashMap<Vec<char>, String>) -> Option<String> {
    let chars: Vec<char> = ipa.chars().collect();
    let longest = table.keys().map(Vec::len).max().unwrap_or(1);
    let mut out = String::new();
    let mut at = 0;
    while at < chars.len() {
        let len = (1..=longest.min(chars.len() - at)).rev().find(|&n| table.contains_key(&chars[at..at + n]))?;
        out.push_str(&table[&chars[at..at + len]]);
        at += len;
    }
    Some(out)
}

/// One entry per phone of en-arpa: a nucleus alone at each stress level, a consonant before AA1.
fn every_phone_rows(set: &Phoneset) -> (String, Vec<(String, String)>) {
    let mut rows = String::new();
    let mut words = Vec::new();
    for (i, p) in set.phones().iter().enumerate() {
        let prons: Vec<String> = if p.is_nucleus() {
            StressLevel::ALL.iter().filter_map(|&l| set.mark_for(l)).map(|m| format!("{}{m}", p.symbol)).collect()
        } else {
            vec![format!("{} AA1", p.symbol)]
        };
        for (j, pron) in prons.into_iter().enumerate() {
            let word = format!("w{i}x{j}");
            rows.push_str(&format!("{word},{pron},accepted,test,,\n"));
            words.push((word, pron));
        }
    }
    (rows, words)
}

#[test]
fn show_writes_every_phone_in_ipa_and_x_sampa_as_panphon_spells_it() {
    let set = Phoneset::shipped("en-arpa").unwrap();
    let dir = tempfile::tempdir().unwrap();
    let (rows, words) = every_phone_rows(&set);
    write_project(dir.path(), &rows);
    let names: Vec<&str> = words.iter().map(|(w, _)| w.as_str()).collect();
    let out = in_project(dir.path(), &[&["show"], names.as_slice()].concat()).assert().success().get_output().stdout.clone();
    let out = String::from_utf8(out).unwrap();
    let table = panphon_xsampa();
    let lines: Vec<Vec<&str>> = out.lines().map(|l| l.split('\t').collect()).collect();
    assert_eq!(lines.len(), words.len(), "{out}");
    for (cells, (word, pron)) in lines.iter().zip(&words) {
        assert_eq!((cells[0], cells[1]), (word.as_str(), pron.as_str()));
        let ipa = cells[2].trim_matches('/');
        assert_eq!(to_xsampa(ipa, &table).as_deref(), Some(cells[3]), "{pron}: IPA {ipa} against panphon 0.22.2");
    }
    // The reduced vowels (IPA Handbook 1999, illustration of American English; from memory).
    let ipa_of = |pron: &str| lines.iter().find(|c| c[1] == pron).map(|c| c[2]).unwrap();
    assert_eq!([ipa_of("AH0"), ipa_of("AH1"), ipa_of("ER0"), ipa_of("ER2")], ["/ə/", "/ˈʌ/", "/ɚ/", "/ˌɝ/"]);
}

#[test]
fn show_exits_1_for_a_missing_word() {
    let dir = tempfile::tempdir().unwrap();
    write_project(dir.path(), "sofa,S OW1 F AH0,accepted,test,,\n");
    let assert = in_project(dir.path(), &["show", "sofa", "settee"]).assert().code(1);
    let out = String::from_utf8_lossy(&assert.get_output().stdout).into_owned();
    assert_eq!(out, "sofa\tS OW1 F AH0\t/ˈsoʊfə/\t\"soUf@\taccepted\n");
}

/// The exit codes of the standard diff tools (POSIX diff: 0 same, 1 different, >1 trouble).
#[test]
fn diff_exits_0_1_2_and_aligns_changed_pronunciations() {
    let dir = tempfile::tempdir().unwrap();
    let header = "word,pronunciation,status,source,score,note\n";
    let old = dir.path().join("old.csv");
    let new = dir.path().join("new.csv");
    std::fs::write(&old, format!("{header}tomato,T AH0 M EY1 T OW2,accepted,t,,\nferry,F EH1 R IY0,accepted,t,,\n")).unwrap();
    std::fs::write(&new, format!("{header}tomato,T AH0 M AA1 T OW2,accepted,t,,\nquay,K IY1,accepted,t,,\n")).unwrap();
    let bin = || common::cli::orthoepy(dir.path());
    bin().args(["diff", "old.csv", "old.csv"]).assert().code(0).stdout("");
    let out = bin().args(["diff", "old.csv", "new.csv"]).assert().code(1).get_output().stdout.clone();
    assert_eq!(
        String::from_utf8(out).unwrap(),
        "- ferry\tF EH1 R IY0\n+ quay\tK IY1\n~ tomato\tT AH0 M EY1 T OW2\tT AH0 M AA1 T OW2\tT AH0 M EY1>AA1 T OW2\n"
    );
    bin().args(["diff", "old.csv", "missing.csv"]).assert().code(2);
}

#[test]
fn convert_reports_non_exact_mappings_and_writes_the_target_set() {
    let dir = tempfile::tempdir().unwrap();
    write_project(dir.path(), "butter,B AH1 DX ER0,accepted,t,,\nsofa,S OW1 F AH0,accepted,t,,\n");
    std::fs::write(dir.path().join("map.txt"), "# the flap as a plain t\nDX t\n").unwrap();
    let (map, out_csv) = (dir.path().join("map.txt"), dir.path().join("out.csv"));
    let (map, out_csv) = (map.to_str().unwrap(), out_csv.to_str().unwrap());
    let out = in_project(dir.path(), &["convert", "--to", "ipa-broad", "--overrides", map, "-o", out_csv])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    assert_eq!(String::from_utf8(out).unwrap(), "DX\tt\toverride\t1\tbutter\n");
    let written = std::fs::read_to_string(dir.path().join("out.csv")).unwrap();
    assert!(written.contains("butter,b ʌˈ t ɚ,") && written.contains("sofa,s oˈ ʊ̯ f ə,"), "{written}");
    // Refuses to overwrite.
    in_project(dir.path(), &["convert", "--to", "ipa-broad", "-o", out_csv]).assert().code(2);
}
