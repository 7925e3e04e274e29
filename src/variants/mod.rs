//! Variant pronunciations from articulatory-feature rewrite rules: the rule language
//! ([`syntax`]), rule-set files and the shipped sets ([`RuleSet`]), accent profiles
//! ([`Profile`]), generation of weighted variants over words and lexicons ([`Generator`]) and
//! the aligned feature view ([`feature_view`]). This module must not read the lexicon file
//! itself (it takes a loaded [`crate::lexicon::Lexicon`]) and prints nothing.
//!
//! ```
//! use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
//! use orthoepy::phoneset::Phoneset;
//! use orthoepy::variants::{Generator, Options, Profile};
//! let arpa = Phoneset::shipped("en-arpa").unwrap();
//! let profile = Profile::shipped("london-vernacular", &arpa).unwrap();
//! let lexicon = Lexicon::from_entries(vec![Entry::new("house", "HH AW1 S")], HeadwordPolicy::default());
//! let run = Generator::new(&arpa, &profile, Options::default()).run(&lexicon, None);
//! assert_eq!(run.variants[0].pronunciation, "AW1 S");
//! ```

mod apply;
mod bits;
mod compile;
mod error;
mod generate;
mod profile;
mod ruleset;
mod source;
pub mod syntax;
mod view;

pub use compile::{Mode, Rule, CLASS_WORDS};
pub use error::{NoPhoneWithFeatures, VariantsError};
pub use generate::{FiredRule, Generation, Generator, Options, Skipped, Variant, MIN_PROBABILITY_FLOOR};
pub use profile::{Profile, ProfileUse};
pub use ruleset::RuleSet;
pub use view::{feature_view, Column, Edit, FeatureRow, FeatureView};

use crate::phoneset::{Phone, PhoneId, Phoneset};

/// The (name, value) features of a phone.
fn phone_features(phone: &Phone) -> Vec<(String, String)> {
    phone.features.clone()
}

/// The phone with exactly these features, if the phoneset has one.
fn find_phone_with(set: &Phoneset, features: &[(String, String)]) -> Option<PhoneId> {
    set.find_by_features(&features.to_vec())
}

/// The `n` phones nearest to a feature bundle (share of mismatching features), closest first.
fn nearest_phones(set: &Phoneset, features: &[(String, String)], n: usize) -> Vec<String> {
    let mut scored: Vec<(usize, &str)> = set
        .phones()
        .iter()
        .map(|p| {
            let own = phone_features(p);
            let missing = features.iter().filter(|f| !own.contains(f)).count();
            let extra = own.iter().filter(|f| !features.contains(f)).count();
            (missing + extra, p.symbol.as_str())
        })
        .collect();
    scored.sort();
    scored.into_iter().take(n).map(|(_, s)| s.to_string()).collect()
}
