//! Converting pronunciations to another phoneset through the feature tables. Each source phone,
//! at each stress level, gets a rule, tried in this order: an override given by the user; the
//! target phone written with the same IPA at that level (en-arpa unstressed `AH`, ə, is ipa-broad
//! ə and back); the target phone with exactly the same features; for a diphthong, the target
//! vowels with exactly its targets' features (the offglides non-syllabic where the target set has
//! such vowels); else the nearest target phone by feature distance. A nucleus followed by
//! non-syllabic vowels whose features are exactly a target diphthong's targets becomes that
//! diphthong. Every conversion reports which rule it used, so callers can list the non-exact ones.
//! Stress moves to the first nucleus produced (see [`super::map_pronunciation`] for the IPA-only
//! mapping); nuclei left without stress get the unstressed mark when the target declares one.

use std::collections::HashMap;

use thiserror::Error;

use super::distance::nearest_across;
use super::phone::{Features, Phone, PhoneClass, CLASS_FEATURE, SYLLABIC_FEATURE};
use super::pronunciation::{PhoneToken, Pronunciation};
use super::stress::StressLevel;
use super::{PhoneId, Phoneset};

/// How a source phone found its target.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "kind")]
pub enum MatchKind {
    /// Given in the override file.
    Override,
    /// The same IPA (possibly a stress-dependent rendering).
    SameIpa,
    /// The same feature bundle.
    SameFeatures,
    /// A diphthong written as its vowel targets, each an exact feature match.
    Split,
    /// A nucleus and offglides read as one diphthong with exactly their features.
    Merged,
    /// No exact match: the phone nearest by feature distance.
    Nearest {
        /// Its feature distance in 0..=1.
        distance: f32,
    },
}

impl MatchKind {
    /// True for the kinds that keep the phone's features unchanged.
    pub fn is_exact(self) -> bool {
        !matches!(self, MatchKind::Override | MatchKind::Nearest { .. })
    }
}

/// The rule for one source phone at one stress level.
#[derive(Debug, Clone, PartialEq)]
pub struct PhoneRule {
    /// Source symbols (more than one for a merge).
    pub from: Vec<PhoneId>,
    /// The source stress level the rule is for.
    pub level: Option<StressLevel>,
    /// Target phones produced.
    pub to: Vec<PhoneId>,
    /// The level the target rendering implies (a stress-dependent IPA match), if any.
    implied: Option<StressLevel>,
    /// How the target was found.
    pub kind: MatchKind,
}

/// Why a conversion cannot be set up.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
pub enum ConvertError {
    /// The two phonesets describe phones with different feature schemas.
    #[error("{from} uses feature schema {from_schema} and {to} uses {to_schema}; conversion needs one schema")]
    SchemaMismatch {
        /// Source id.
        from: String,
        /// Its schema.
        from_schema: String,
        /// Target id.
        to: String,
        /// Its schema.
        to_schema: String,
    },
    /// An override line names a symbol the phoneset does not have.
    #[error("override line {line}: `{symbol}` is not a phone of {phoneset}")]
    BadOverride {
        /// 1-based line of the override text.
        line: usize,
        /// The symbol.
        symbol: String,
        /// The phoneset it should be in.
        phoneset: String,
    },
}

/// A set-up conversion from one phoneset to another.
#[derive(Debug, Clone)]
pub struct Converter<'s> {
    from: &'s Phoneset,
    to: &'s Phoneset,
    rules: HashMap<(PhoneId, Option<StressLevel>), PhoneRule>,
    /// Target diphthongs by their targets: (diphthong, targets).
    diphthongs: Vec<(PhoneId, &'s [Features])>,
}

/// Reads override text: one `SOURCE TARGET...` per line (bare symbols, no stress marks), `#`
/// starting a comment. An empty target list deletes the phone.
///
/// ```
/// use orthoepy::phoneset::{parse_overrides, Phoneset};
/// let arpa = Phoneset::shipped("en-arpa").unwrap();
/// let ipa = Phoneset::shipped("ipa-broad").unwrap();
/// let o = parse_overrides("# flap as t\nDX t\n", &arpa, &ipa).unwrap();
/// assert_eq!(o.len(), 1);
/// assert!(parse_overrides("DX tt\n", &arpa, &ipa).is_err());
/// ```
pub fn parse_overrides(text: &str, from: &Phoneset, to: &Phoneset) -> Result<HashMap<PhoneId, Vec<PhoneId>>, ConvertError> {
    let mut overrides = HashMap::new();
    for (i, line) in text.lines().enumerate() {
        let line_text = line.split('#').next().unwrap_or("");
        let mut words = line_text.split_whitespace();
        let Some(source) = words.next() else { continue };
        let bad = |symbol: &str, set: &Phoneset| ConvertError::BadOverride { line: i + 1, symbol: symbol.to_string(), phoneset: set.id().to_string() };
        let source = from.lookup(source).ok_or_else(|| bad(source, from))?;
        let targets = words.map(|w| to.lookup(w).ok_or_else(|| bad(w, to))).collect::<Result<Vec<_>, _>>()?;
        overrides.insert(source, targets);
    }
    Ok(overrides)
}

impl<'s> Converter<'s> {
    /// Sets up the rules from `from` to `to`; `overrides` come from [`parse_overrides`].
    ///
    /// ```
    /// use orthoepy::phoneset::{Converter, Phoneset};
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let ipa = Phoneset::shipped("ipa-broad").unwrap();
    /// let there = Converter::new(&arpa, &ipa, &Default::default()).unwrap();
    /// let back = Converter::new(&ipa, &arpa, &Default::default()).unwrap();
    /// let sofa = arpa.parse("S OW1 F AH0").unwrap();
    /// let (in_ipa, _) = there.convert(&sofa);
    /// assert_eq!(in_ipa.render(&ipa), "s oˈ ʊ̯ f ə");
    /// assert_eq!(back.convert(&in_ipa).0, sofa);
    /// ```
    pub fn new(from: &'s Phoneset, to: &'s Phoneset, overrides: &HashMap<PhoneId, Vec<PhoneId>>) -> Result<Converter<'s>, ConvertError> {
        if from.schema.name() != to.schema.name() {
            return Err(ConvertError::SchemaMismatch {
                from: from.id.clone(),
                from_schema: from.schema.name().to_string(),
                to: to.id.clone(),
                to_schema: to.schema.name().to_string(),
            });
        }
        let mut rules = HashMap::new();
        for (i, phone) in from.phones.iter().enumerate() {
            let id = i as PhoneId;
            let levels: &[Option<StressLevel>] = if phone.is_nucleus() {
                &[None, Some(StressLevel::Primary), Some(StressLevel::Secondary), Some(StressLevel::Unstressed)]
            } else {
                &[None]
            };
            for &level in levels {
                let rule = match overrides.get(&id) {
                    Some(to_ids) => PhoneRule { from: vec![id], level, to: to_ids.clone(), implied: None, kind: MatchKind::Override },
                    None => rule_for(from, to, id, phone, level),
                };
                rules.insert((id, level), rule);
            }
        }
        let diphthongs = to
            .phones
            .iter()
            .enumerate()
            .filter(|(_, p)| p.class == PhoneClass::Diphthong)
            .map(|(i, p)| (i as PhoneId, p.targets.as_slice()))
            .collect();
        Ok(Converter { from, to, rules, diphthongs })
    }

    /// Converts `pron`, returning the result and the rule used for each step.
    pub fn convert(&self, pron: &Pronunciation) -> (Pronunciation, Vec<PhoneRule>) {
        let mut out: Vec<PhoneToken> = Vec::new();
        let mut used = Vec::new();
        let mut i = 0;
        while let Some(token) = pron.phones.get(i) {
            let (rule, consumed) = match self.merge_at(pron, i) {
                Some(rule) => {
                    let n = rule.from.len();
                    (rule, n)
                }
                None => match self.rules.get(&(token.phone, token.stress)) {
                    Some(rule) => (rule.clone(), 1),
                    None => {
                        i += 1; // an id that is not a phone of the source set
                        continue;
                    }
                },
            };
            let level = token.stress.and_then(|l| target_level(self.to, l)).or(rule.implied);
            let mut placed = false;
            for &phone in &rule.to {
                let nucleus = self.to.get(phone).is_some_and(Phone::is_nucleus);
                let stress = if nucleus && !placed {
                    placed = true;
                    level.or_else(|| self.unstressed())
                } else if nucleus {
                    self.unstressed()
                } else {
                    None
                };
                out.push(PhoneToken { phone, stress });
            }
            used.push(rule);
            i += consumed;
        }
        (Pronunciation { phones: out }, used)
    }

    /// The unstressed level when the target declares a mark for it.
    fn unstressed(&self) -> Option<StressLevel> {
        self.to.mark_for(StressLevel::Unstressed).map(|_| StressLevel::Unstressed)
    }

    /// A target diphthong spelled exactly by the nucleus at `at` and the non-syllabic vowels
    /// after it.
    fn merge_at(&self, pron: &Pronunciation, at: usize) -> Option<PhoneRule> {
        let first = self.from.get(pron.phones.get(at)?.phone)?;
        if first.class != PhoneClass::Vowel || !first.syllabic {
            return None;
        }
        self.diphthongs.iter().find_map(|&(diphthong, targets)| {
            let tokens = pron.phones.get(at..at + targets.len())?;
            let fits = tokens.iter().zip(targets).enumerate().all(|(k, (t, target))| {
                self.from.get(t.phone).is_some_and(|p| p.class == PhoneClass::Vowel && (k == 0) == p.syllabic && &p.features == target)
            });
            fits.then(|| PhoneRule {
                from: tokens.iter().map(|t| t.phone).collect(),
                level: tokens.first().and_then(|t| t.stress),
                to: vec![diphthong],
                implied: None,
                kind: MatchKind::Merged,
            })
        })
    }
}

/// The rule for `phone` at `level` when no override is given.
fn rule_for(from: &Phoneset, to: &Phoneset, id: PhoneId, phone: &Phone, level: Option<StressLevel>) -> PhoneRule {
    let rule = |to_ids: Vec<PhoneId>, implied: Option<StressLevel>, kind: MatchKind| PhoneRule { from: vec![id], level, to: to_ids, implied, kind };
    if let Some((target, implied)) = same_ipa(to, phone.ipa_at(level)) {
        return rule(vec![target], implied, MatchKind::SameIpa);
    }
    if phone.class == PhoneClass::Diphthong {
        if let Some(vowels) = split(to, &phone.targets) {
            return rule(vowels, None, MatchKind::Split);
        }
    } else if let Some(target) = to.find_by_features(&with_reserved(&phone.features, phone)) {
        return rule(vec![target], None, MatchKind::SameFeatures);
    }
    match nearest_across(&from.schema, phone, to, 1).first() {
        Some(&(target, distance)) => rule(vec![target], None, MatchKind::Nearest { distance }),
        None => rule(Vec::new(), None, MatchKind::Nearest { distance: 1.0 }),
    }
}

/// The target phone written `ipa` (a phoneme before an allophone, a plain rendering before a
/// stress-dependent one) and the level a stress-dependent rendering implies.
fn same_ipa(to: &Phoneset, ipa: &str) -> Option<(PhoneId, Option<StressLevel>)> {
    let mut best: Option<((bool, bool), PhoneId, Option<StressLevel>)> = None;
    for (i, p) in to.phones.iter().enumerate() {
        let plain = (p.ipa == ipa).then_some(None);
        let stressed = p.by_stress.iter().find(|f| f.ipa == ipa).map(|f| Some(f.level));
        let Some(implied) = plain.or(stressed) else { continue };
        let rank = (p.is_allophone(), implied.is_some());
        if best.as_ref().map_or(true, |(r, _, _)| rank < *r) {
            best = Some((rank, i as PhoneId, implied));
        }
    }
    best.map(|(_, id, implied)| (id, implied))
}

/// The target vowels with exactly the features of `targets`: the first syllabic, the others
/// non-syllabic where `to` has such a vowel.
fn split(to: &Phoneset, targets: &[Features]) -> Option<Vec<PhoneId>> {
    targets
        .iter()
        .enumerate()
        .map(|(k, features)| {
            let vowel = features.clone().with(CLASS_FEATURE, PhoneClass::Vowel.as_str());
            let offglide = (k > 0).then(|| to.find_by_features(&vowel.clone().with(SYLLABIC_FEATURE, "no"))).flatten();
            offglide.or_else(|| to.find_by_features(&vowel.with(SYLLABIC_FEATURE, "yes")))
        })
        .collect()
}

/// `features` constrained to the phone's class and syllabicity.
fn with_reserved(features: &Features, phone: &Phone) -> Features {
    features.clone().with(CLASS_FEATURE, phone.class.as_str()).with(SYLLABIC_FEATURE, if phone.syllabic { "yes" } else { "no" })
}

/// The level to write in `to` for a source level (shared with the IPA mapping).
pub(crate) fn target_level(to: &Phoneset, level: StressLevel) -> Option<StressLevel> {
    if to.mark_for(level).is_some() {
        return Some(level);
    }
    (level == StressLevel::Secondary && to.mark_for(StressLevel::Unstressed).is_some()).then_some(StressLevel::Unstressed)
}
