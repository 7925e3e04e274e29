//! Language configurations (`g2p::hybrid::LanguageConfig::parse`) on arbitrary text, against
//! en-arpa and es-ipa: it never panics, and the hybrid guesser built with a configuration it
//! accepts (over the demo lexicon, with the shipped letter-to-sound rules) returns at most
//! `limit` candidates, best first, with scores in 0..=1 and pronunciations the phoneset parses.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::g2p::hybrid::{HybridGuesser, LanguageConfig};
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy_fuzz::{demo_index, demo_lexicon, phoneset, PROBE_WORDS};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    for (id, lts) in [("en-arpa", "en"), ("es-ipa", "es")] {
        let set = phoneset(id);
        let Ok(config) = LanguageConfig::parse(text, "fuzz.toml", set) else { continue };
        let Ok(rules) = LetterToSoundRules::shipped(lts, set) else { continue };
        let guesser = HybridGuesser::new(demo_lexicon(), demo_index(), set, &config).with_rules(&rules);
        let limit = 4;
        for word in PROBE_WORDS {
            let candidates = guesser.guess(word, limit);
            assert!(candidates.len() <= limit);
            for pair in candidates.windows(2) {
                assert!(pair[0].score >= pair[1].score, "not best first");
            }
            for c in &candidates {
                assert!((0.0..=1.0).contains(&c.score), "score {} for {word:?}", c.score);
                assert!(!c.sources.is_empty());
                if !c.pronunciation.is_empty() {
                    assert!(set.parse(&c.pronunciation).is_ok(), "{word:?} → {:?} does not parse", c.pronunciation);
                }
            }
        }
    }
});
