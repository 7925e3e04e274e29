//! Rule-set files (`rules/variants/ID.toml`): reading one, checking its metadata and compiling
//! every rule against a phoneset, and the embedded shipped sets. Must not apply rules.

use std::path::Path;

use crate::phoneset::Phoneset;
use crate::support::located::origin_of;
use crate::support::read::{read_capped_string, Limit, MIB};

use super::compile::{Compiler, Mode, Rule};
use super::error::VariantsError;
use super::source::{RuleSetFile, SourceText};
use super::syntax::parse_rule;

/// Largest rule-set or profile file read (the shipped ones are a few KiB).
pub const MAX_RULE_FILE: Limit = Limit { bytes: MIB, what: "variant rule or profile file" };

/// The shipped rule sets: (id, file text).
const SHIPPED: &[(&str, &str)] = &[
    ("non-rhotic", include_str!("../../rules/variants/non-rhotic.toml")),
    ("th-stopping", include_str!("../../rules/variants/th-stopping.toml")),
    ("th-fronting", include_str!("../../rules/variants/th-fronting.toml")),
    ("v-w-merger", include_str!("../../rules/variants/v-w-merger.toml")),
    ("alveolar-retroflexion", include_str!("../../rules/variants/alveolar-retroflexion.toml")),
    ("flapping", include_str!("../../rules/variants/flapping.toml")),
    ("final-devoicing", include_str!("../../rules/variants/final-devoicing.toml")),
    ("s-cluster-epenthesis", include_str!("../../rules/variants/s-cluster-epenthesis.toml")),
    ("nasal-place-assimilation", include_str!("../../rules/variants/nasal-place-assimilation.toml")),
    ("nasal-fricative-stop-epenthesis", include_str!("../../rules/variants/nasal-fricative-stop-epenthesis.toml")),
    ("schwa-deletion", include_str!("../../rules/variants/schwa-deletion.toml")),
    ("td-deletion", include_str!("../../rules/variants/td-deletion.toml")),
    ("h-dropping", include_str!("../../rules/variants/h-dropping.toml")),
];

/// An ordered list of compiled rules with its provenance.
#[derive(Debug, Clone)]
pub struct VariantRuleSet {
    /// Kebab-case id, e.g. `flapping`.
    pub id: String,
    /// One-line title.
    pub title: String,
    /// The published source the rules and weights come from.
    pub source: String,
    /// Free remarks.
    pub note: String,
    /// The phoneset the rules were compiled against.
    pub phoneset: String,
    /// The rules, applied in this order.
    pub rules: Vec<Rule>,
}

/// Reads a rule-set or profile file of at most [`MAX_RULE_FILE`].
pub(crate) fn read_limited(path: &Path) -> Result<String, VariantsError> {
    Ok(read_capped_string(path, MAX_RULE_FILE)?)
}

impl VariantRuleSet {
    /// Ids of the rule sets embedded in the library.
    pub fn shipped_ids() -> Vec<&'static str> {
        SHIPPED.iter().map(|(id, _)| *id).collect()
    }

    /// A shipped rule set compiled against `phoneset`.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::variants::VariantRuleSet;
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let flapping = VariantRuleSet::shipped("flapping", &arpa).unwrap();
    /// assert_eq!(flapping.rules[0].id, "t-d-flap");
    /// assert!(VariantRuleSet::shipped("no-such-set", &arpa).is_err());
    /// ```
    pub fn shipped(id: &str, phoneset: &Phoneset) -> Result<VariantRuleSet, VariantsError> {
        match SHIPPED.iter().find(|(i, _)| *i == id) {
            Some((_, text)) => VariantRuleSet::parse(text, &format!("rules/variants/{id}.toml"), phoneset),
            None => Err(VariantsError::Unknown {
                kind: "rule set",
                id: id.to_string(),
                known: SHIPPED.iter().map(|(i, _)| i.to_string()).collect(),
            }),
        }
    }

    /// A rule-set file compiled against `phoneset`.
    pub fn load(path: &Path, phoneset: &Phoneset) -> Result<VariantRuleSet, VariantsError> {
        let text = read_limited(path)?;
        VariantRuleSet::parse(&text, &origin_of(path), phoneset)
    }

    /// A shipped id, else a path (relative paths against `base_dir`).
    pub fn resolve(spec: &str, base_dir: &Path, phoneset: &Phoneset) -> Result<VariantRuleSet, VariantsError> {
        if SHIPPED.iter().any(|(i, _)| *i == spec) {
            return VariantRuleSet::shipped(spec, phoneset);
        }
        let path = base_dir.join(spec);
        if path.is_file() {
            return VariantRuleSet::load(&path, phoneset);
        }
        VariantRuleSet::shipped(spec, phoneset)
    }

    /// Parses and compiles rule-set TOML; `file` names it in errors.
    ///
    /// ```
    /// use orthoepy::phoneset::Phoneset;
    /// use orthoepy::variants::VariantRuleSet;
    /// let arpa = Phoneset::shipped("en-arpa").unwrap();
    /// let text = r#"
    /// id = "n-velar"
    /// title = "n before velars"
    /// phoneset = "en-arpa"
    /// source = "common practice"
    /// [[rule]]
    /// id = "n-ng"
    /// rule = "N -> [place=velar] / _ [consonant, place=velar]"
    /// mode = "optional"
    /// weight = 0.5
    /// "#;
    /// let set = VariantRuleSet::parse(text, "n-velar.toml", &arpa).unwrap();
    /// assert_eq!(set.rules[0].line, 8);
    /// let bad = text.replace("place=velar]", "place=velr]");
    /// let err = VariantRuleSet::parse(&bad, "n-velar.toml", &arpa).unwrap_err();
    /// assert!(err.to_string().starts_with("n-velar.toml:8:"), "{err}");
    /// ```
    pub fn parse(text: &str, file: &str, phoneset: &Phoneset) -> Result<VariantRuleSet, VariantsError> {
        let src = SourceText { name: file, text };
        let parsed: RuleSetFile = src.parse()?;
        if parsed.phoneset.get_ref() != phoneset.id() {
            return Err(src.error_at(
                &parsed.phoneset,
                format!("rules are written for phoneset `{}` but the lexicon uses `{}`; use rules written for it", parsed.phoneset.get_ref(), phoneset.id()),
            ));
        }
        let mut rules: Vec<Rule> = Vec::with_capacity(parsed.rules.len());
        for entry in &parsed.rules {
            if rules.iter().any(|r| r.id == *entry.id.get_ref()) {
                return Err(src.error_at(&entry.id, format!("rule id `{}` is used twice in this set", entry.id.get_ref())));
            }
            let mode = match entry.mode.get_ref().as_str() {
                "optional" => Mode::Optional,
                "obligatory" => Mode::Obligatory,
                other => return Err(src.error_at(&entry.mode, format!("mode is `optional` or `obligatory`, not `{other}`"))),
            };
            let weight = *entry.weight.get_ref();
            if !(0.0..=1.0).contains(&weight) {
                return Err(src.error_at(&entry.weight, format!("weight {weight} is a probability: write a number from 0 to 1")));
            }
            let span = entry.rule.span();
            let locate = |offset: usize| src.position_in_string(span.clone(), offset);
            let ast = parse_rule(entry.rule.get_ref()).map_err(|e| VariantsError::at(file, locate(e.column), e.message))?;
            let compiler = Compiler { set: phoneset, file, locate: &locate };
            let parts = compiler.rule(&ast)?;
            rules.push(Rule {
                id: entry.id.get_ref().clone(),
                mode,
                weight,
                text: entry.rule.get_ref().clone(),
                line: src.position(span.start).0,
                source: entry.source.clone(),
                target: parts.target,
                action: parts.action,
                left: parts.left.into_iter().rev().collect(),
                right: parts.right,
            });
        }
        Ok(VariantRuleSet { id: parsed.id, title: parsed.title, source: parsed.source, note: parsed.note, phoneset: phoneset.id().to_string(), rules })
    }
}
