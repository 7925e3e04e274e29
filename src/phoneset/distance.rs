//! Feature distance: a weighted feature mismatch in 0..=1 between phones, and lookups by
//! feature bundle (exact and nearest). The weights and scales come from the schema (see
//! `phonesets/ipa-chart.schema.toml`, after G. Kondrak, "A new algorithm for the alignment of
//! phonetic sequences", NAACL 2000). This file computes; it does not parse.
//!
//! The distance of two bundles sums, over every feature either bundle has, the feature's
//! weight times its mismatch (a feature only one bundle has mismatches fully), and divides by
//! the sum of those weights. A syllabicity term (the schema's `syllabic_weight`) is added to
//! both sums. Consonants and vowels share no feature, so their distance is 1. A diphthong is
//! compared as its sequence of vowel targets: both sequences are stretched to the longer
//! length and the terms of the aligned pairs are summed.

use super::phone::{Features, Phone, CLASS_FEATURE, SYLLABIC_FEATURE};
use super::schema::Schema;
use super::{PhoneId, Phoneset};

/// (weighted mismatch, total weight) of two bundles.
fn bundle_terms(schema: &Schema, a: &Features, b: &Features) -> (f32, f32) {
    let mut num = 0.0;
    let mut den = 0.0;
    for def in schema.features() {
        match (a.get(&def.name), b.get(&def.name)) {
            (Some(va), Some(vb)) => {
                num += def.weight * def.mismatch(va, vb);
                den += def.weight;
            }
            (Some(_), None) | (None, Some(_)) => {
                num += def.weight;
                den += def.weight;
            }
            (None, None) => {}
        }
    }
    (num, den)
}

/// Distance of two quality sequences; `syllabic` gives both sides' syllabicity when known.
fn sequence_distance(
    schema: &Schema,
    qa: &[Features],
    qb: &[Features],
    syllabic: Option<(bool, bool)>,
) -> f32 {
    let m = qa.len().max(qb.len());
    let (mut num, mut den) = (0.0, 0.0);
    for k in 0..m {
        let (Some(a), Some(b)) = (qa.get(k * qa.len() / m), qb.get(k * qb.len() / m)) else {
            continue;
        };
        let (n, d) = bundle_terms(schema, a, b);
        num += n;
        den += d;
        if let Some((sa, sb)) = syllabic {
            den += schema.syllabic_weight();
            if sa != sb {
                num += schema.syllabic_weight();
            }
        }
    }
    if den > 0.0 {
        (num / den).clamp(0.0, 1.0)
    } else {
        0.0
    }
}

/// Feature distance of two phones described with `schema` (they may come from different
/// phonesets sharing the schema).
pub(crate) fn phone_distance(schema: &Schema, a: &Phone, b: &Phone) -> f32 {
    sequence_distance(
        schema,
        a.qualities(),
        b.qualities(),
        Some((a.syllabic, b.syllabic)),
    )
}

/// The `n` phones of `to` nearest to `phone` (described with `schema`) by feature distance,
/// nearest first (ties in `to`'s order); empty when `to` uses another schema.
pub(crate) fn nearest_across(schema: &Schema, phone: &Phone, to: &Phoneset, n: usize) -> Vec<(PhoneId, f32)> {
    if schema.name() != to.schema.name() {
        return Vec::new();
    }
    let mut scored: Vec<(PhoneId, f32)> =
        to.phones.iter().enumerate().map(|(i, q)| (i as PhoneId, phone_distance(&to.schema, phone, q))).collect();
    scored.sort_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
    scored.truncate(n);
    scored
}

impl Phoneset {
    /// Weighted feature mismatch of two phones in 0..=1 (0 on the same phone, 1 between a
    /// consonant and a vowel). Ids not of this phoneset give 1.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let id = |s| set.lookup(s).unwrap();
    /// assert_eq!(set.distance(id("P"), id("P")), 0.0);
    /// assert!(set.distance(id("P"), id("B")) < set.distance(id("P"), id("S")));
    /// assert_eq!(set.distance(id("P"), id("AA")), 1.0);
    /// ```
    pub fn distance(&self, a: PhoneId, b: PhoneId) -> f32 {
        let n = self.phones.len();
        let (a, b) = (a as usize, b as usize);
        if a >= n || b >= n {
            return 1.0;
        }
        self.distances.get(a * n + b).copied().unwrap_or(1.0)
    }

    /// The phone whose bundle is exactly `features`, after filling in schema defaults the
    /// query leaves out. The reserved names `class` and `syllabic` may constrain the match.
    /// When several phones match, a phoneme is preferred over a marked allophone. Diphthongs
    /// have no bundle of their own and are never found.
    ///
    /// ```
    /// use orthoepy::phoneset::{Features, Phoneset};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// // /t/ with its manner changed to tap is the flap DX.
    /// let mut f = set.phone(set.lookup("T").unwrap()).features.clone();
    /// f.set("manner", "tap");
    /// f.set("voicing", "voiced");
    /// assert_eq!(set.find_by_features(&f), set.lookup("DX"));
    /// // L and EL share features; asking for a syllabic one gives EL.
    /// let l = set.phone(set.lookup("L").unwrap()).features.clone();
    /// assert_eq!(set.find_by_features(&l), set.lookup("L"));
    /// assert_eq!(set.find_by_features(&l.with("syllabic", "yes")), set.lookup("EL"));
    /// ```
    pub fn find_by_features(&self, features: &Features) -> Option<PhoneId> {
        if features
            .iter()
            .all(|(k, _)| k == CLASS_FEATURE || k == SYLLABIC_FEATURE)
        {
            return None;
        }
        let mut best: Option<(usize, &Phone)> = None;
        for (i, p) in self.phones.iter().enumerate() {
            if !p.targets.is_empty() || !reserved_match(features, p) {
                continue;
            }
            if self.schema.complete(features, p.class).as_ref() != Some(&p.features) {
                continue;
            }
            let replace = match best {
                None => true,
                Some((_, b)) => b.is_allophone() && !p.is_allophone(),
            };
            if replace {
                best = Some((i, p));
            }
        }
        best.map(|(i, _)| i as PhoneId)
    }

    /// The `n` phones nearest to `features` by feature distance, nearest first, with their
    /// distances (ties in phoneset order). Defaults are filled in per candidate class; the
    /// reserved `class` and `syllabic` names take part when given.
    ///
    /// ```
    /// use orthoepy::phoneset::{Features, Phoneset};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// // A dental [d̪] is not an English phoneme; alveolar D, then retroflex RD, are nearest.
    /// let dental_d = Features::new().with("place", "dental").with("manner", "stop").with("voicing", "voiced");
    /// let near = set.nearest_by_features(&dental_d, 2);
    /// let names: Vec<&str> = near.iter().map(|(id, _)| set.phone(*id).symbol.as_str()).collect();
    /// assert_eq!(names, ["D", "RD"]);
    /// ```
    pub fn nearest_by_features(&self, features: &Features, n: usize) -> Vec<(PhoneId, f32)> {
        let syllabic = features.get(SYLLABIC_FEATURE).map(|v| v == "yes");
        let mut scored: Vec<(PhoneId, f32)> = self
            .phones
            .iter()
            .enumerate()
            .map(|(i, p)| {
                let d = if features
                    .get(CLASS_FEATURE)
                    .is_some_and(|c| c != p.class.as_str())
                {
                    1.0
                } else {
                    let q = self
                        .schema
                        .complete(features, p.class.target_class())
                        .unwrap_or_else(|| strip_reserved(features));
                    sequence_distance(
                        &self.schema,
                        std::slice::from_ref(&q),
                        p.qualities(),
                        syllabic.map(|s| (s, p.syllabic)),
                    )
                };
                (i as PhoneId, d)
            })
            .collect();
        scored.sort_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
        scored.truncate(n);
        scored
    }
}

/// True when the reserved `class` / `syllabic` entries of `query` (if any) fit `phone`.
fn reserved_match(query: &Features, phone: &Phone) -> bool {
    [CLASS_FEATURE, SYLLABIC_FEATURE]
        .iter()
        .all(|k| match query.get(k) {
            None => true,
            Some(v) => phone.feature(k) == Some(v),
        })
}

fn strip_reserved(query: &Features) -> Features {
    query
        .iter()
        .filter(|(k, _)| *k != CLASS_FEATURE && *k != SYLLABIC_FEATURE)
        .collect()
}
