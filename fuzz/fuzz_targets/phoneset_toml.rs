//! Phoneset TOML (`Phoneset::from_toml_str`) on arbitrary text: it never panics; a phoneset it
//! accepts can parse and render each of its own phones, finds each symbol again, and gives
//! feature distances in 0..=1 that are 0 from a phone to itself.
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::phoneset::Phoneset;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(set) = Phoneset::from_toml_str(text, "fuzz.toml") else { return };
    let count = set.phones().len().min(64);
    for (i, phone) in set.phones().iter().take(count).enumerate() {
        let id = u16::try_from(i).expect("at most 64 phones are looked at");
        assert_eq!(set.lookup(&phone.symbol), Some(id), "symbol {:?} not found again", phone.symbol);
        if let Ok(p) = set.parse(&phone.symbol) {
            let rendered = p.render(&set);
            assert!(set.parse(&rendered).is_ok(), "rendered {rendered:?} does not parse");
        }
        let d = set.distance(id, id);
        assert!(d.abs() < 1e-6, "distance of {:?} to itself is {d}", phone.symbol);
        for j in 0..count {
            let other = u16::try_from(j).expect("at most 64 phones");
            let d = set.distance(id, other);
            assert!((0.0..=1.0).contains(&d), "distance {d} outside 0..=1");
        }
        let _ = set.suggest(&phone.symbol, 3);
    }
});
