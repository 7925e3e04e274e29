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
