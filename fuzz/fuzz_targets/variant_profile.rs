//! Accent profiles (`variants::Profile::parse`, no folder, so only shipped rule sets can be
//! named) on arbitrary text, against en-arpa: it never panics, and a profile it accepts
//! generates well-formed variants (see `check_variants`).
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::variants::Profile;
use orthoepy_fuzz::{check_variants, phoneset};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let set = phoneset("en-arpa");
    let Ok(profile) = Profile::parse(text, "fuzz.toml", None, set) else { return };
    check_variants(set, &profile);
});
