//! Store CSV (`Lexicon::parse`) on arbitrary bytes, in both load modes: it never panics, and a
//! store it accepts survives save → load unchanged (same entries, same extra columns).
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon, LoadMode};
use orthoepy_fuzz::content;

fuzz_target!(|data: &[u8]| {
    let path = Path::new("fuzz.csv");
    for mode in [LoadMode::Strict, LoadMode::Repair] {
        for fold_case in [false, true] {
            let policy = HeadwordPolicy { fold_case };
            let Ok(mut first) = Lexicon::parse(data, path, policy, mode) else { continue };
            let bytes = first.to_csv_bytes();
            let second = match Lexicon::parse(&bytes, path, policy, mode) {
                Ok(l) => l,
                Err(e) => panic!("saved store does not load again: {e}\n{}", String::from_utf8_lossy(&bytes)),
            };
            assert_eq!(first.extra_columns(), second.extra_columns());
            let a: Vec<_> = first.entries().iter().map(content).collect();
            let b: Vec<_> = second.entries().iter().map(content).collect();
            assert_eq!(a, b, "save → load changed the entries");
        }
    }
});
