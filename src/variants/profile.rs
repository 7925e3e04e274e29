//! Accent profiles (`rules/profiles/ID.toml`): an ordered, weighted list of rule sets, shipped or
//! given as files next to the profile, with optional per-rule weight overrides. Owns reading and
//! resolving profiles; must not apply rules.

use std::path::Path;

use crate::phoneset::Phoneset;

use super::apply::Weighted;
use super::error::VariantsError;
use super::ruleset::{read_limited, VariantRuleSet};
use crate::support::located::origin_of;
use super::source::{ProfileFile, SourceText};

const SHIPPED: &[(&str, &str)] = &[
    ("fast-casual", include_str!("../../rules/profiles/fast-casual.toml")),
    ("southern-british", include_str!("../../rules/profiles/southern-british.toml")),
    ("london-vernacular", include_str!("../../rules/profiles/london-vernacular.toml")),
];

/// A rule set as used by a profile.
#[derive(Debug, Clone)]
pub struct ProfileUse {
    /// The compiled set.
    pub set: VariantRuleSet,
    /// Probability that a speaker of the accent uses this set; multiplies each rule's weight.
    pub weight: f64,
    /// Per-rule weights replacing the rule file's weights, by rule id.
    pub overrides: Vec<(String, f64)>,
}

/// An accent (or speaking style) as a weighted, ordered list of rule sets.
#[derive(Debug, Clone)]
pub struct Profile {
    /// Kebab-case id.
    pub id: String,
    /// One-line title.
    pub title: String,
    /// Where the choice and weights come from.
    pub source: String,
    /// The rule sets in application order.
    pub uses: Vec<ProfileUse>,
}

impl Profile {
    /// Ids of the shipped profiles.
    pub fn shipped_ids() -> Vec<&'static str> {
        SHIPPED.iter().map(|(id, _)| *id).collect()
    }

    /// A shipped profile compiled against `phoneset`.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::variants::Profile;
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let fast = Profile::shipped("fast-casual", &arpa).unwrap();
    /// assert_eq!(fast.uses[0].set.id, "flapping");
    /// ```
    pub fn shipped(id: &str, phoneset: &Phoneset) -> Result<Profile, VariantsError> {
        match SHIPPED.iter().find(|(i, _)| *i == id) {
            Some((_, text)) => Profile::parse(text, &format!("rules/profiles/{id}.toml"), None, phoneset),
            None => Err(VariantsError::Unknown { kind: "profile", id: id.to_string(), known: SHIPPED.iter().map(|(i, _)| i.to_string()).collect() }),
        }
    }

    /// A profile file; its `file = "..."` entries are read relative to the profile's folder.
    pub fn load(path: &Path, phoneset: &Phoneset) -> Result<Profile, VariantsError> {
        let text = read_limited(path)?;
        Profile::parse(&text, &origin_of(path), path.parent(), phoneset)
    }

    /// A shipped profile id, else a path to a profile file (relative to `base_dir`).
    pub fn resolve(spec: &str, base_dir: &Path, phoneset: &Phoneset) -> Result<Profile, VariantsError> {
        if SHIPPED.iter().any(|(i, _)| *i == spec) {
            return Profile::shipped(spec, phoneset);
        }
        let path = base_dir.join(spec);
        if path.is_file() {
            return Profile::load(&path, phoneset);
        }
        Profile::shipped(spec, phoneset)
    }

    /// An ad-hoc profile applying the given rule sets with weight 1, in order.
    pub fn from_rule_sets(sets: Vec<VariantRuleSet>) -> Profile {
        let id = sets.iter().map(|s| s.id.as_str()).collect::<Vec<_>>().join(",");
        Profile {
            title: format!("rule sets {id}"),
            id,
            source: String::new(),
            uses: sets.into_iter().map(|set| ProfileUse { set, weight: 1.0, overrides: Vec::new() }).collect(),
        }
    }

    /// Parses profile TOML; `dir` is where `file = ...` entries are looked up (None: only
    /// shipped rule sets may be named).
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::variants::Profile;
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let text = r#"
    /// id = "harbour-town"
    /// title = "Harbour town speech"
    /// phoneset = "en-arpa"
    /// [[use]]
    /// rules = "h-dropping"
    /// weight = 0.5
    /// weights = { h-drop = 0.9 }
    /// "#;
    /// let p = Profile::parse(text, "harbour.toml", None, &arpa).unwrap();
    /// assert_eq!(p.uses[0].overrides, vec![("h-drop".to_string(), 0.9)]);
    /// ```
    pub fn parse(text: &str, file: &str, dir: Option<&Path>, phoneset: &Phoneset) -> Result<Profile, VariantsError> {
        let src = SourceText { name: file, text };
        let parsed: ProfileFile = src.parse()?;
        if parsed.phoneset.get_ref() != phoneset.id() {
            return Err(src.error_at(&parsed.phoneset, format!("profile is written for phoneset `{}` but the lexicon uses `{}`", parsed.phoneset.get_ref(), phoneset.id())));
        }
        let mut uses = Vec::with_capacity(parsed.uses.len());
        for spanned in &parsed.uses {
            let entry = spanned.get_ref();
            let set = match (&entry.rules, &entry.file, dir) {
                (Some(id), None, _) => VariantRuleSet::shipped(id, phoneset).map_err(|e| src.error_at(spanned, e.to_string()))?,
                (None, Some(rel), Some(dir)) => VariantRuleSet::load(&dir.join(rel), phoneset)?,
                (None, Some(_), None) => return Err(src.error_at(spanned, "`file = ...` needs a profile read from a file")),
                _ => return Err(src.error_at(spanned, "each [[use]] names exactly one of `rules = \"ID\"` (shipped) or `file = \"PATH\"`")),
            };
            if !(0.0..=1.0).contains(&entry.weight) {
                return Err(src.error_at(spanned, format!("weight {} is a probability: write a number from 0 to 1", entry.weight)));
            }
            let mut overrides = Vec::new();
            for (rule_id, w) in &entry.weights {
                if !set.rules.iter().any(|r| &r.id == rule_id) {
                    let ids: Vec<&str> = set.rules.iter().map(|r| r.id.as_str()).collect();
                    return Err(src.error_at(spanned, format!("rule set `{}` has no rule `{rule_id}`; its rules: {}", set.id, ids.join(", "))));
                }
                if !(0.0..=1.0).contains(w) {
                    return Err(src.error_at(spanned, format!("weight {w} for `{rule_id}` is a probability: write a number from 0 to 1")));
                }
                overrides.push((rule_id.clone(), *w));
            }
            uses.push(ProfileUse { set, weight: entry.weight, overrides });
        }
        Ok(Profile { id: parsed.id, title: parsed.title, source: parsed.source, uses })
    }

    /// Every rule in application order with its effective weight (set weight × rule weight).
    pub(crate) fn weighted_rules(&self) -> Vec<Weighted<'_>> {
        let mut out = Vec::new();
        for u in &self.uses {
            for rule in &u.set.rules {
                let base = u.overrides.iter().find(|(id, _)| *id == rule.id).map_or(rule.weight, |(_, w)| *w);
                out.push(Weighted { rule, set_id: &u.set.id, weight: base * u.weight });
            }
        }
        out
    }
}
