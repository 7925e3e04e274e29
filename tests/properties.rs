//! Property tests of the round trips the rest of the tool relies on: the store (save → load
//! identity, and agreement with the `csv` crate's RFC 4180 writer), headword normalisation
//! (idempotent, and NFC per Unicode UAX #15), PLS export → import (W3C PLS 1.0), and the review
//! journal (append → reopen gives the same records; replaying records twice gives the same
//! decisions in force as replaying them once).
//!
//! Case counts are kept small so `cargo test` stays fast; the fuzz targets in `fuzz/` explore
//! the same round trips on arbitrary bytes for as long as one cares to run them.

use std::collections::HashSet;
use std::path::Path;

use orthoepy::lexicon::{normalize_headword, normalize_key, Entry, HeadwordPolicy, Lexicon, LoadMode, Status, COLUMNS};
use orthoepy::phoneset::Phoneset;
use orthoepy::pls::{read_pls, write_pls, Alphabet};
use orthoepy::queue::{Action, Decision, Journal, Ledger, Logged, Record};
use proptest::prelude::*;
use unicode_normalization::{is_nfc, UnicodeNormalization};

/// Letters from several scripts, combining marks (so NFD spellings occur), and the punctuation
/// that CSV and XML must quote or escape. No control characters and no whitespace.
fn word_char() -> impl Strategy<Value = char> {
    prop_oneof![
        4 => proptest::char::range('a', 'z'),
        1 => proptest::char::range('A', 'Z'),
        1 => proptest::char::range('\u{e0}', '\u{ff}'),    // Latin-1 letters
        1 => proptest::char::range('\u{300}', '\u{36f}'),   // combining diacritics
        1 => proptest::char::range('\u{391}', '\u{3c9}'),   // Greek
        1 => proptest::char::range('\u{410}', '\u{44f}'),   // Cyrillic
        1 => proptest::char::range('\u{ac00}', '\u{ac20}'), // Hangul syllables (NFD-decomposable)
        1 => proptest::sample::select(vec!['\'', '-', ',', '"', '&', '<', '>', '.', 'ß', 'İ', 'ǅ', '😀']),
    ]
}

/// A headword the strict loader accepts: 1 to 12 of [`word_char`] (a word of combining marks
/// only is allowed: it is not empty and has no surrounding whitespace).
fn headword() -> impl Strategy<Value = String> {
    proptest::collection::vec(word_char(), 1..12).prop_map(String::from_iter)
}

/// Free text with the characters RFC 4180 makes a writer quote: commas, double quotes, CR, LF
/// (section 2, rules 6 and 7), plus tabs and non-ASCII.
fn free_text() -> impl Strategy<Value = String> {
    let c = prop_oneof![
        4 => proptest::char::range('a', 'z'),
        1 => proptest::sample::select(vec![',', '"', '\n', '\r', '\t', ' ', ';', 'é', '—', '\'']),
    ];
    proptest::collection::vec(c, 0..16).prop_map(String::from_iter)
}

/// en-arpa phones that are not allophones, split into nuclei and the rest.
fn en_arpa_phones() -> (Vec<String>, Vec<String>) {
    let set = Phoneset::shipped("en-arpa").expect("shipped phoneset");
    let mut nuclei = Vec::new();
    let mut others = Vec::new();
    for phone in set.phones().iter().filter(|p| p.allophone_of.is_empty()) {
        if phone.is_nucleus() {
            nuclei.push(phone.symbol.clone());
        } else {
            others.push(phone.symbol.clone());
        }
    }
    (nuclei, others)
}

/// A well-formed en-arpa pronunciation: 1 to 7 phones, every nucleus with a stress digit.
fn pronunciation() -> impl Strategy<Value = String> {
    let (nuclei, others) = en_arpa_phones();
    let phone = prop_oneof![
        (proptest::sample::select(nuclei), 0u8..3).prop_map(|(v, s)| format!("{v}{s}")),
        proptest::sample::select(others),
    ];
    proptest::collection::vec(phone, 1..8).prop_map(|p| p.join(" "))
}

fn status() -> impl Strategy<Value = Status> {
    proptest::sample::select(Status::ALL.to_vec())
}

fn score() -> impl Strategy<Value = Option<f64>> {
    proptest::option::of(any::<f64>().prop_filter("the store holds finite scores", |s| s.is_finite()))
}

fn entry(extra_columns: usize) -> impl Strategy<Value = Entry> {
    (
        headword(),
        pronunciation(),
        status(),
        "[a-z:-]{0,10}",
        score(),
        free_text(),
        proptest::collection::vec(free_text(), extra_columns),
    )
        .prop_map(|(word, pronunciation, status, source, score, note, extra)| Entry {
            word: word.into(),
            pronunciation: pronunciation.into(),
            status,
            source: source.into(),
            score,
            note: note.into(),
            extra: extra.into(),
            line: 0,
        })
}

/// Names for extra columns: distinct, and none of the store's own columns.
fn extra_column_names() -> impl Strategy<Value = Vec<String>> {
    proptest::collection::vec("[a-z][a-z ,\"é]{0,8}", 0..3).prop_map(|names| {
        let mut seen = HashSet::new();
        names.into_iter().filter(|n| !COLUMNS.contains(&n.as_str()) && seen.insert(n.clone())).collect()
    })
}

fn lexicon_with_extras() -> impl Strategy<Value = (Vec<String>, Vec<Entry>)> {
    extra_column_names().prop_flat_map(|names| {
        let n = names.len();
        (Just(names), proptest::collection::vec(entry(n), 0..24))
    })
}

/// What the store holds of an entry, line number aside; scores compared bit for bit.
type Content = (String, String, Status, String, Option<u64>, String, Vec<String>);

fn content(e: &Entry) -> Content {
    (
        e.word.to_string(),
        e.pronunciation.to_string(),
        e.status,
        e.source.to_string(),
        e.score.map(f64::to_bits),
        e.note.to_string(),
        e.extra.to_vec(),
    )
}

/// Writes a store with the `csv` crate's writer (RFC 4180 quoting), independently of
/// `Lexicon::to_csv_bytes`.
fn csv_crate_store(names: &[String], entries: &[Entry]) -> Vec<u8> {
    let mut writer = csv::WriterBuilder::new().from_writer(Vec::new());
    let mut header: Vec<String> = COLUMNS.iter().map(|c| c.to_string()).collect();
    header.extend(names.iter().cloned());
    writer.write_record(&header).expect("in-memory write");
    for e in entries {
        let mut row = vec![
            e.word.to_string(),
            e.pronunciation.to_string(),
            e.status.as_str().to_string(),
            e.source.to_string(),
            e.score.map(|s| s.to_string()).unwrap_or_default(),
            e.note.to_string(),
        ];
        row.extend(e.extra.iter().cloned());
        writer.write_record(&row).expect("in-memory write");
    }
    writer.into_inner().expect("in-memory write")
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    /// A store written by the `csv` crate (RFC 4180) loads into exactly the entries written,
    /// extra columns included, and saving that lexicon and loading it again changes nothing
    /// but the order (saving sorts).
    #[test]
    fn store_written_by_the_csv_crate_loads_and_survives_save(
        (names, entries) in lexicon_with_extras(),
        fold_case in any::<bool>(),
    ) {
        let policy = HeadwordPolicy { fold_case };
        let bytes = csv_crate_store(&names, &entries);
        let path = Path::new("generated.csv");
        let mut first = Lexicon::parse(&bytes, path, policy, LoadMode::Strict)
            .map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert_eq!(first.extra_columns(), &names[..]);
        let want: Vec<Content> = entries.iter().map(content).collect();
        let got: Vec<Content> = first.entries().iter().map(content).collect();
        prop_assert_eq!(&want, &got);

        let saved = first.to_csv_bytes();
        let second = Lexicon::parse(&saved, path, policy, LoadMode::Strict)
            .map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert_eq!(first.extra_columns(), second.extra_columns());
        let sorted: Vec<Content> = first.entries().iter().map(content).collect();
        let again: Vec<Content> = second.entries().iter().map(content).collect();
        prop_assert_eq!(sorted, again);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(16))]

    /// `save_as` then `load` through a real file gives back every entry, in store order.
    #[test]
    fn store_save_as_then_load_is_identity(entries in proptest::collection::vec(entry(0), 0..24)) {
        let dir = tempfile::tempdir().expect("temporary folder");
        let path = dir.path().join("lexicon.csv");
        let policy = HeadwordPolicy::default();
        let mut lexicon = Lexicon::from_entries(entries.clone(), policy);
        lexicon.save_as(&path).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        let loaded = Lexicon::load(&path, policy).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        let saved: Vec<Content> = lexicon.entries().iter().map(content).collect();
        let read: Vec<Content> = loaded.entries().iter().map(content).collect();
        prop_assert_eq!(&saved, &read);
        // Nothing lost or invented: the same multiset as generated.
        let mut generated: Vec<Content> = entries.iter().map(content).collect();
        let mut back = read;
        generated.sort_by(|a, b| format!("{a:?}").cmp(&format!("{b:?}")));
        back.sort_by(|a, b| format!("{a:?}").cmp(&format!("{b:?}")));
        prop_assert_eq!(generated, back);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// The key is NFC (UAX #15, section 1.2: the canonical composition form), and normalising
    /// a key again changes nothing, with and without case folding, on arbitrary strings.
    #[test]
    fn normalisation_is_idempotent_and_nfc(word in any::<String>(), fold_case in any::<bool>()) {
        let policy = HeadwordPolicy { fold_case };
        let key = normalize_key(&word, &policy).into_owned();
        prop_assert!(is_nfc(&key), "key {:?} of {:?} is not NFC", key, word);
        prop_assert_eq!(normalize_key(&key, &policy).into_owned(), key.clone());
        // Independent of the input's form: NFD, NFC and NFKC-unrelated spellings of one text
        // that are canonically equivalent give one key (UAX #15, section 1.1).
        let nfd: String = word.nfd().collect();
        prop_assert_eq!(normalize_key(&nfd, &policy).into_owned(), key.clone());
        if let Ok(checked) = normalize_headword(&word, &policy) {
            prop_assert_eq!(checked, key);
        }
    }

    /// The same on the headword alphabet the other properties use (more combining marks and
    /// case pairs per case than arbitrary strings give).
    #[test]
    fn normalisation_is_idempotent_on_headwords(word in headword(), fold_case in any::<bool>()) {
        let policy = HeadwordPolicy { fold_case };
        let key = normalize_headword(&word, &policy).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert!(is_nfc(&key), "key {:?} of {:?} is not NFC", key, word);
        prop_assert_eq!(normalize_headword(&key, &policy).ok(), Some(key));
    }
}

/// What a PLS export of `entries` should read back as: one lexeme per headword key (NFC; the
/// policy here does not fold case), its grapheme the first spelling, each distinct
/// pronunciation once, deprecated entries left out, lexemes in key order.
fn expected_pls(entries: &[Entry], policy: &HeadwordPolicy) -> Vec<(String, String)> {
    let mut keyed: Vec<(String, usize, &Entry)> = entries
        .iter()
        .enumerate()
        .filter(|(_, e)| e.status != Status::Deprecated)
        .map(|(i, e)| (normalize_key(&e.word, policy).into_owned(), i, e))
        .collect();
    keyed.sort_by(|a, b| (&a.0, a.1).cmp(&(&b.0, b.1)));
    let mut out: Vec<(String, String)> = Vec::new();
    let mut i = 0;
    while let Some((key, _, first)) = keyed.get(i) {
        let mut seen: Vec<&str> = Vec::new();
        while let Some((_, _, e)) = keyed.get(i).filter(|(k, _, _)| k == key) {
            if !seen.contains(&e.pronunciation.as_str()) {
                seen.push(&e.pronunciation);
                out.push((first.word.to_string(), e.pronunciation.to_string()));
            }
            i += 1;
        }
    }
    out
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    /// W3C PLS 1.0 export → import: in both alphabets (IPA, section 4.5 `alphabet="ipa"`, and
    /// the phoneset's own symbols), every lexeme's grapheme and phonemes come back as written
    /// (graphemes with `&`, `<`, `"` escaped and unescaped per XML 1.0).
    #[test]
    fn pls_export_then_import_round_trips(entries in proptest::collection::vec(entry(0), 0..16)) {
        let set = Phoneset::shipped("en-arpa").expect("shipped phoneset");
        let policy = HeadwordPolicy { fold_case: false };
        let want = expected_pls(&entries, &policy);
        for alphabet in [Alphabet::Symbols, Alphabet::Ipa] {
            let xml = write_pls(&entries, &policy, &set, alphabet, "en-GB")
                .map_err(|e| TestCaseError::fail(format!("{e}")))?;
            let import = read_pls(xml.as_bytes(), "round-trip.pls", &set, "pls").map_err(|e| TestCaseError::fail(format!("{e}\n{xml}")))?;
            prop_assert!(import.rejected.is_empty(), "{:?}\n{}", import.rejected, xml);
            let got: Vec<(String, String)> =
                import.entries.iter().map(|e| (e.word.to_string(), e.pronunciation.to_string())).collect();
            prop_assert_eq!(&want, &got, "alphabet {:?}\n{}", alphabet, xml);
        }
    }
}

fn action() -> impl Strategy<Value = Action> {
    prop_oneof![
        (pronunciation(), "[a-z:]{0,8}", proptest::option::of(0.0f64..1.0), any::<bool>())
            .prop_map(|(pronunciation, source, score, edited)| Action::Accept { pronunciation, source, score, edited }),
        Just(Action::Reject),
        Just(Action::SetAside),
    ]
}

/// Journal records as a review session makes them: decisions on a handful of items, revokes of
/// earlier sequence numbers, and applied marks up to the latest one.
fn records() -> impl Strategy<Value = Vec<Record>> {
    let step = prop_oneof![
        6 => (0usize..4, headword(), action(), free_text()).prop_map(|(item, word, action, note)| {
            (0u8, item as u64, Some(Record::Decide(Decision { item: format!("new:{item}"), word, action, note })))
        }),
        2 => (0u64..8).prop_map(|back| (1u8, back, None)),
        1 => (0u64..8).prop_map(|back| (2u8, back, None)),
    ];
    proptest::collection::vec(step, 0..12).prop_map(|steps| {
        let mut out = Vec::new();
        for (kind, back, record) in steps {
            let seq = out.len() as u64 + 1;
            let earlier = seq.saturating_sub(1 + back % seq.max(1)).max(1);
            match (kind, record) {
                (0, Some(r)) => out.push(r),
                (1, _) if seq > 1 => out.push(Record::Revoke { seq: earlier }),
                (2, _) if seq > 1 => out.push(Record::Applied { through: earlier }),
                _ => {}
            }
        }
        out
    })
}

/// Applied mark, last sequence number, pending decisions, and per item: the decision in force
/// and whether it is applied.
type LedgerState = (u64, u64, Vec<(u64, Decision)>, Vec<(String, Option<(u64, Decision)>, bool)>);

/// The observable state of a ledger over the items of `records`.
fn ledger_state(ledger: &Ledger, records: &[Logged]) -> LedgerState {
    let unapplied = ledger.unapplied().into_iter().map(|(s, d)| (s, d.clone())).collect();
    let mut items: Vec<String> = records
        .iter()
        .filter_map(|r| match &r.record {
            Record::Decide(d) => Some(d.item.clone()),
            _ => None,
        })
        .collect();
    items.sort();
    items.dedup();
    let current = items
        .into_iter()
        .map(|k| {
            let now = ledger.current(&k).map(|(s, d)| (s, d.clone()));
            let applied = ledger.is_applied(&k);
            (k, now, applied)
        })
        .collect();
    (ledger.applied_through(), ledger.last_seq(), unapplied, current)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(24))]

    /// Appending records and reopening the journal gives them back, numbered 1, 2, ... with no
    /// warning, and a second `open` appends after them.
    #[test]
    fn journal_append_then_reopen_gives_the_same_records(records in records()) {
        let dir = tempfile::tempdir().expect("temporary folder");
        let path = dir.path().join("journal.jsonl");
        let (mut journal, warnings) = Journal::open(&path).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert!(warnings.is_empty());
        for r in &records {
            journal.append(r.clone()).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        }
        let (read, warnings) = Journal::read(&path).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert!(warnings.is_empty(), "{:?}", warnings);
        let want: Vec<Logged> = records.iter().enumerate()
            .map(|(i, r)| Logged { seq: i as u64 + 1, record: r.clone() })
            .collect();
        prop_assert_eq!(&read, &want);
        let (reopened, warnings) = Journal::open(&path).map_err(|e| TestCaseError::fail(format!("{e}")))?;
        prop_assert!(warnings.is_empty());
        prop_assert_eq!(reopened.records(), &want[..]);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    /// Replaying a journal's records a second time (as a screen that re-reads the journal
    /// would) leaves the decisions in force, the applied mark and the pending list exactly as
    /// one replay left them.
    #[test]
    fn replaying_records_twice_gives_the_same_ledger_as_once(records in records()) {
        let logged: Vec<Logged> = records.into_iter().enumerate()
            .map(|(i, record)| Logged { seq: i as u64 + 1, record })
            .collect();
        let once = Ledger::replay(&logged);
        let mut twice = Ledger::replay(&logged);
        for r in &logged {
            twice.record(r.seq, &r.record);
        }
        prop_assert_eq!(ledger_state(&once, &logged), ledger_state(&twice, &logged));
    }
}

/// One raw CSV field as a hand-written (or hand-broken) file holds it: unquoted text that may
/// hold stray quotes (`fo"o`), a quoted field with commas, doubled quotes and line breaks, or a
/// quoted part followed by more text (`"ab"cd`, which an RFC 4180 reader such as the `csv`
/// crate reads as `abcd`). `multiline` allows line breaks inside quotes (not in headwords, which
/// the loader refuses with control characters).
fn raw_field(multiline: bool) -> impl Strategy<Value = String> {
    let letters = proptest::collection::vec(proptest::char::range('a', 'e'), 1..6).prop_map(String::from_iter);
    let inner = proptest::collection::vec(
        prop_oneof![
            4 => proptest::char::range('a', 'e').prop_map(|c| c.to_string()),
            1 => Just(",".to_string()),
            1 => Just("\"\"".to_string()),
            1 => Just(if multiline { "\n" } else { "x" }.to_string()),
            1 => Just(if multiline { "\r\n" } else { "y" }.to_string()),
        ],
        1..8,
    )
    .prop_map(|parts| parts.concat());
    prop_oneof![
        3 => letters.clone(),
        2 => (letters.clone(), letters.clone()).prop_map(|(a, b)| format!("{a}\"{b}")),
        2 => inner.clone().prop_map(|t| format!("\"{t}\"")),
        1 => (inner, letters).prop_map(|(t, rest)| format!("\"{t}\"{rest}")),
    ]
}

/// A raw store: header, rows of six fields (valid status, empty score), LF or CRLF line ends,
/// and sometimes a last row whose note opens a quote that is never closed.
fn raw_store() -> impl Strategy<Value = (Vec<u8>, bool)> {
    let row = (raw_field(false), raw_field(false), raw_field(true), raw_field(true), any::<bool>());
    (proptest::collection::vec(row, 0..40), any::<bool>(), proptest::bool::weighted(0.15)).prop_map(|(rows, crlf, open)| {
        let mut text = String::from("word,pronunciation,status,source,score,note\n");
        for (word, pronunciation, source, note, row_crlf) in rows {
            text.push_str(&format!("{word},{pronunciation},imported,{source},,{note}"));
            text.push_str(if crlf && row_crlf { "\r\n" } else { "\n" });
        }
        if open {
            text.push_str("last,K IY1,imported,,,\"open note\nnever closed\n");
        }
        (text.into_bytes(), open)
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    /// The store loader reads exactly what the `csv` crate's serial reader (RFC 4180) reads, at
    /// every chunk size around the file's length (1 byte, a few records, just under, at and over
    /// the whole body), and refuses a quote still open at the end wherever the cuts fall.
    #[test]
    fn chunked_store_loading_reads_what_a_serial_rfc4180_reader_reads((bytes, open) in raw_store()) {
        let mut reader = csv::ReaderBuilder::new().has_headers(true).flexible(true).from_reader(&bytes[..]);
        let serial: Vec<Vec<String>> = reader
            .records()
            .map(|r| r.map(|r| r.iter().map(str::to_string).collect()))
            .collect::<Result<_, _>>()
            .map_err(|e| TestCaseError::fail(format!("csv crate: {e}")))?;
        let len = bytes.len();
        for chunk in [1, 2, 16, len / 3, len / 2, len.saturating_sub(1), len, len + 1] {
            let parsed = Lexicon::parse_in_chunks(&bytes, Path::new("g.csv"), HeadwordPolicy::default(), LoadMode::Strict, chunk.max(1));
            if open {
                let refused = matches!(&parsed, Err(orthoepy::lexicon::LexiconError::Parse(at))
                    if at.message == orthoepy::lexicon::ParseProblem::UnterminatedQuote);
                prop_assert!(refused, "chunk {}: {:?}", chunk, parsed.map(|l| l.entries().len()));
                continue;
            }
            let lexicon = parsed.map_err(|e| TestCaseError::fail(format!("chunk {chunk}: {e}")))?;
            let got: Vec<Vec<String>> = lexicon
                .entries()
                .iter()
                .map(|e| vec![e.word.to_string(), e.pronunciation.to_string(), e.status.as_str().to_string(), e.source.to_string(), String::new(), e.note.to_string()])
                .collect();
            prop_assert_eq!(&got, &serial, "chunk {}", chunk);
        }
    }
}

/// The reproduction of the phantom rows: a stray quote in an unquoted headword, 36,154 plain rows
/// (over the 1 MiB at which loading goes parallel), then a note that is a quoted field spanning
/// ten lines. The `csv` crate's serial reader is the reference for the count.
#[test]
fn stray_quote_before_a_multi_line_note_makes_no_phantom_rows() {
    let mut text = String::from("word,pronunciation,status,source,score,note\nfo\"o,F UW1,imported,x,,\n");
    for i in 0..36_154 {
        text.push_str(&format!("word{i:06},W ER1 D,imported,cmudict,,\n"));
    }
    text.push_str("last,L AE1 S T,imported,x,,\"line 1\nline 2\nline 3\nline 4\nline 5\nline 6\nline 7\nline 8\nline 9\nline 10\"\n");
    assert!(text.len() > 1 << 20, "the file must be over the parallel threshold");
    let serial = csv::Reader::from_reader(text.as_bytes()).records().count();
    let lexicon = Lexicon::parse(text.as_bytes(), Path::new("big.csv"), HeadwordPolicy::default(), LoadMode::Strict).unwrap();
    assert_eq!(serial, 36_156);
    assert_eq!(lexicon.entries().len(), serial);
    assert_eq!(lexicon.entries()[0].word, "fo\"o");
    assert_eq!(lexicon.entries()[36_155].note.lines().count(), 10);
}
