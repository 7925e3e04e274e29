//! Variant rule files (`variants::VariantRuleSet::parse`) on arbitrary text, against en-arpa: it never
//! panics, and a rule set it accepts generates well-formed variants (see `check_variants`).
#![no_main]

use libfuzzer_sys::fuzz_target;
use orthoepy::variants::{Profile, VariantRuleSet};
use orthoepy_fuzz::{check_variants, phoneset};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let set = phoneset("en-arpa");
    let Ok(rules) = VariantRuleSet::parse(text, "fuzz.toml", set) else { return };
    check_variants(set, &Profile::from_rule_sets(vec![rules]));
});
