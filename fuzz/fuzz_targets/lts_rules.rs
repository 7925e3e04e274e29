//! Letter-to-sound rule files (`g2p::lts::LetterToSoundRules::parse`) on arbitrary text, against en-arpa
//! and es-ipa: it never panics; with a rule set it accepts, a word the rules cover transcribes
//! (as `covers` promises), the result renders into something the phoneset parses, and `trace`
//! accounts for the word's letters.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::g2p::lts::LetterToSoundRules;
use orthoepy_fuzz::{phoneset, PROBE_WORDS};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    for id in ["en-arpa", "es-ipa"] {
        let set = phoneset(id);
        let Ok(rules) = LetterToSoundRules::parse(text, "fuzz.toml", set) else { continue };
        for word in PROBE_WORDS {
            let covered = rules.covers(word);
            match rules.transcribe(word) {
                Ok(p) => {
                    let rendered = p.render(set);
                    if !p.phones.is_empty() {
                        assert!(set.parse(&rendered).is_ok(), "{word:?} → {rendered:?} does not parse");
                    }
                }
                Err(e) => assert!(!covered, "{word:?} is covered but does not transcribe: {e}"),
            }
            if covered {
                let traced: usize = rules.trace(word).iter().map(|(letters, _)| letters.chars().count()).sum();
                let letters: String = word.to_lowercase();
                assert!(traced <= letters.chars().count() + 4, "trace of {word:?} longer than the word");
            }
        }
    }
});
