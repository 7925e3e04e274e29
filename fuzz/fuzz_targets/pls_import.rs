//! PLS import (`read_pls`) on arbitrary bytes, against the shipped phonesets: it never panics,
//! and what it accepts, written back as PLS (IPA, X-SAMPA and phoneset symbols) and read again, is the
//! same document on a second pass.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::lexicon::{Entry, HeadwordPolicy};
use orthoepy::phoneset::Phoneset;
use orthoepy::pls::{read_pls, write_pls, Alphabet};
use orthoepy_fuzz::phoneset;

fn pairs(entries: &[Entry]) -> Vec<(String, String)> {
    entries.iter().map(|e| (e.word.clone(), e.pronunciation.clone())).collect()
}

fuzz_target!(|data: &[u8]| {
    for id in ["en-arpa", "ipa-broad", "es-ipa"] {
        round_trip(data, phoneset(id));
    }
});

fn round_trip(data: &[u8], set: &Phoneset) {
    let Ok(import) = read_pls(data, "fuzz", set, "fuzz") else { return };
    let policy = HeadwordPolicy::default();
    for alphabet in [Alphabet::Ipa, Alphabet::XSampa, Alphabet::Symbols] {
        let Ok(first) = write_pls(&import.entries, &policy, set, alphabet, "en-US") else { continue };
        let again = match read_pls(first.as_bytes(), "fuzz", set, "fuzz") {
            Ok(i) => i,
            Err(e) => panic!("written PLS does not read again: {e}\n{first}"),
        };
        let second = write_pls(&again.entries, &policy, set, alphabet, "en-US")
            .unwrap_or_else(|e| panic!("entries read from our own PLS cannot be written: {e}"));
        assert_eq!(first, second, "PLS changed on a second pass");
        let third = read_pls(second.as_bytes(), "fuzz", set, "fuzz").map(|i| pairs(&i.entries)).ok();
        assert_eq!(Some(pairs(&again.entries)), third);
    }
}
