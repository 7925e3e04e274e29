//! Suggestions for a symbol that is not in a phoneset: exact matches ignoring case, phones
//! whose IPA or X-SAMPA the user typed (and their nearest neighbours by features, also for IPA
//! symbols that only the shipped `ipa-broad` set knows), then string similarity
//! (normalised Damerau–Levenshtein from `strsim`). It ranks; it never decides validity.

use std::sync::OnceLock;

use super::distance::phone_distance;
use super::phone::Phone;
use super::{PhoneId, Phoneset};

/// String-similarity suggestions below this normalised score are dropped as noise.
const MIN_SIMILARITY: f64 = 0.3;

/// The shipped IPA reference set, loaded once, used to read IPA typed into other sets.
fn ipa_reference() -> Option<&'static Phoneset> {
    static REFERENCE: OnceLock<Option<Phoneset>> = OnceLock::new();
    REFERENCE
        .get_or_init(|| Phoneset::shipped("ipa-broad").ok())
        .as_ref()
}

impl Phoneset {
    /// Up to `n` symbols of this phoneset that the user may have meant by `bad_symbol`
    /// (given without stress mark), best first.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// assert_eq!(set.suggest("aa", 1), ["AA"]);          // case
    /// assert_eq!(set.suggest("ə", 1), ["AX"]);           // IPA of a phone
    /// assert!(set.suggest("SHH", 3).contains(&"SH".to_string())); // spelling
    /// ```
    pub fn suggest(&self, bad_symbol: &str, n: usize) -> Vec<String> {
        self.suggest_ids(bad_symbol, n, false)
            .into_iter()
            .filter_map(|id| self.get(id).map(|p| p.symbol.clone()))
            .collect()
    }

    /// Suggested phone ids; with `prefer_nucleus` (the token carried a stress mark) phones
    /// that can carry stress come first.
    pub(crate) fn suggest_ids(&self, bad: &str, n: usize, prefer_nucleus: bool) -> Vec<PhoneId> {
        let mut out: Vec<PhoneId> = Vec::new();
        let lower = bad.to_lowercase();
        out.extend(self.ids().filter(|&id| {
            self.get(id)
                .is_some_and(|p| p.symbol.to_lowercase() == lower)
        }));
        if let Some(anchor) = self.feature_anchor(bad) {
            let mut near: Vec<(PhoneId, f32)> = self
                .ids()
                .filter_map(|id| {
                    self.get(id)
                        .map(|p| (id, phone_distance(&self.schema, anchor, p)))
                })
                .collect();
            near.sort_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
            out.extend(near.into_iter().take(n).map(|(id, _)| id));
        }
        let mut similar: Vec<(PhoneId, f64, f64)> = self
            .ids()
            .filter_map(|id| {
                let sym = self.get(id)?.symbol.to_lowercase();
                let score = strsim::normalized_damerau_levenshtein(&lower, &sym);
                (score >= MIN_SIMILARITY).then(|| (id, score, strsim::jaro_winkler(&lower, &sym)))
            })
            .collect();
        similar.sort_by(|a, b| {
            b.1.total_cmp(&a.1)
                .then(b.2.total_cmp(&a.2))
                .then(a.0.cmp(&b.0))
        });
        out.extend(similar.into_iter().map(|(id, _, _)| id));
        let mut seen = std::collections::HashSet::new();
        out.retain(|id| seen.insert(*id));
        if prefer_nucleus {
            let (mut nuclei, rest): (Vec<_>, Vec<_>) = out
                .into_iter()
                .partition(|&id| self.get(id).is_some_and(Phone::is_nucleus));
            nuclei.extend(rest);
            out = nuclei;
        }
        out.truncate(n);
        out
    }

    /// A phone described by `bad` read as IPA or X-SAMPA: of this set, else of `ipa-broad`
    /// when both sets share a schema.
    fn feature_anchor(&self, bad: &str) -> Option<&Phone> {
        let own = self.phones.iter().find(|p| p.ipa == bad || p.xsampa == bad);
        own.or_else(|| {
            let reference = ipa_reference()?;
            if reference.schema.name() != self.schema.name() {
                return None;
            }
            reference
                .phones
                .iter()
                .find(|p| p.symbol == bad || p.ipa == bad || p.xsampa == bad)
        })
    }

    /// All phone ids in order.
    fn ids(&self) -> impl Iterator<Item = PhoneId> + '_ {
        (0..self.phones.len()).map(|i| i as PhoneId)
    }
}
