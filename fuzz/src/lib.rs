//! Shared pieces of the fuzz targets: the shipped phonesets, the demo model, and comparisons
//! that treat two parses as equal when they mean the same thing.
//!
//! Owns no parsing of its own: every target calls the library's public readers and writers. It
//! must not read files at run time (the demo model is embedded), so a target's behaviour depends
//! on its input alone.

use std::sync::OnceLock;

use orthoepy::g2p::Model;
use orthoepy::lexicon::Entry;
use orthoepy::phoneset::Phoneset;

/// The shipped phoneset `id` (one of [`Phoneset::shipped_ids`]), parsed once per process.
pub fn phoneset(id: &str) -> &'static Phoneset {
    static SETS: OnceLock<Vec<Phoneset>> = OnceLock::new();
    let sets = SETS.get_or_init(|| {
        Phoneset::shipped_ids().iter().map(|id| Phoneset::shipped(id).expect("shipped phoneset loads")).collect()
    });
    sets.iter().find(|s| s.id() == id).expect("a shipped phoneset id")
}

/// The demo project's trained model (`demo-lexicon/model.g2p`), embedded and loaded once.
pub fn demo_model() -> &'static Model {
    static MODEL: OnceLock<Model> = OnceLock::new();
    MODEL.get_or_init(|| {
        Model::from_bytes(include_bytes!("../../demo-lexicon/model.g2p")).expect("the demo model loads")
    })
}

/// The demo lexicon (`demo-lexicon/lexicon.csv`), embedded and loaded once.
pub fn demo_lexicon() -> &'static orthoepy::lexicon::Lexicon {
    static LEXICON: OnceLock<orthoepy::lexicon::Lexicon> = OnceLock::new();
    LEXICON.get_or_init(|| {
        orthoepy::lexicon::Lexicon::parse(
            include_bytes!("../../demo-lexicon/lexicon.csv"),
            std::path::Path::new("demo-lexicon/lexicon.csv"),
            orthoepy::lexicon::HeadwordPolicy::default(),
            orthoepy::lexicon::LoadMode::Strict,
        )
        .expect("the demo lexicon loads")
    })
}

/// An entry's stored content: everything the store file holds, without the line it came from
/// (saving sorts rows, so lines move). The score is compared by its bits, so NaN equals NaN.
pub fn content(e: &Entry) -> (String, String, &'static str, String, Option<u64>, String, Vec<String>) {
    (
        e.word.clone(),
        e.pronunciation.clone(),
        e.status.as_str(),
        e.source.clone(),
        e.score.map(f64::to_bits),
        e.note.clone(),
        e.extra.clone(),
    )
}

/// The FST index of [`demo_lexicon`], built once.
pub fn demo_index() -> &'static orthoepy::lexicon::LexiconIndex {
    static INDEX: OnceLock<orthoepy::lexicon::LexiconIndex> = OnceLock::new();
    INDEX.get_or_init(|| demo_lexicon().index())
}

/// Canonical pronunciations to derive variants from: the first demo entries that parse in `set`.
pub fn demo_canonicals(set: &Phoneset) -> Vec<(String, orthoepy::phoneset::Pronunciation)> {
    demo_lexicon()
        .entries()
        .iter()
        .filter_map(|e| set.parse(&e.pronunciation).ok().map(|p| (e.word.clone(), p)))
        .take(24)
        .collect()
}

/// Words to run letter-to-sound rules and guessers on: English, Spanish, marks, apostrophes,
/// digits and characters no rule file covers.
pub const PROBE_WORDS: &[&str] = &[
    "harbour", "quay", "Saltmarsh", "knight", "thought", "BBC", "niño", "acción", "guerra", "pingüino",
    "o'clock", "x", "a", "straße", "ǅemal", "42", "e\u{301}", "",
];

/// Checks the variants a generator gives for the demo canonicals: each is a pronunciation of
/// `set` with a probability in 0..=1, at most `max` per word, none equal to its canonical.
pub fn check_variants(set: &Phoneset, profile: &orthoepy::variants::Profile) {
    use orthoepy::variants::{feature_view, Generator, Options};
    let max = 6;
    let generator = Generator::new(set, profile, Options { max_per_word: max, min_probability: 0.01 });
    for (word, canonical) in demo_canonicals(set).iter().take(8) {
        let variants = generator.variants_of(word, canonical);
        assert!(variants.len() <= max, "{} variants of {word} (max {max})", variants.len());
        for v in &variants {
            assert!((0.0..=1.0 + 1e-9).contains(&v.probability), "probability {} of {:?}", v.probability, v.pronunciation);
            let parsed = match set.parse(&v.pronunciation) {
                Ok(p) => p,
                Err(e) => panic!("variant {:?} of {word} is not a pronunciation: {e}", v.pronunciation),
            };
            assert_ne!(&parsed, canonical, "variant equal to its canonical");
            let _ = feature_view(set, canonical, &parsed).render_text();
        }
    }
}
