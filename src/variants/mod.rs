//! Variant pronunciations from articulatory-feature rewrite rules: the rule language
//! ([`syntax`]), rule-set files and the shipped sets ([`VariantRuleSet`]), accent profiles
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
pub use ruleset::{VariantRuleSet, MAX_RULE_FILE};
pub use view::{feature_view, Column, Edit, FeatureRow, FeatureView};

use crate::phoneset::{Features, Phone, PhoneId, Phoneset};

/// The (name, value) features of a phone, defaults filled in; a syllabic phone also carries
/// `syllabic=yes` so that feature changes keep it syllabic.
fn phone_features(phone: &Phone) -> Vec<(String, String)> {
    let mut out: Vec<(String, String)> = phone.features.iter().map(|(n, v)| (n.to_string(), v.to_string())).collect();
    if phone.syllabic && matches!(phone.class, crate::phoneset::PhoneClass::Consonant) {
        out.push(("syllabic".into(), "yes".into()));
    }
    out
}

fn to_features(pairs: &[(String, String)]) -> Features {
    pairs.iter().fold(Features::new(), |f, (n, v)| f.with(n, v))
}

/// The phone with exactly these features, if the phoneset has one.
fn find_phone_with(set: &Phoneset, features: &[(String, String)]) -> Option<PhoneId> {
    set.find_by_features(&to_features(features))
}

/// The `n` phones nearest to a feature bundle by feature distance, closest first.
fn nearest_phones(set: &Phoneset, features: &[(String, String)], n: usize) -> Vec<String> {
    set.nearest_by_features(&to_features(features), n).into_iter().map(|(id, _)| set.phone(id).symbol.clone()).collect()
}
