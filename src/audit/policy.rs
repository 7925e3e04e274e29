//! The audit's stress policies: how many primary stresses a pronunciation must carry and which
//! tokens a project treats as free variation. A project file (`[stress]` in `orthoepy.toml`)
//! deserialises into [`StressPolicy`], so the type lives with the checks that read it and the
//! project module depends on the audit, never the reverse. Owns the policy types only.

use serde::Deserialize;

/// How many primary stresses a pronunciation must carry (an audit policy).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PrimaryStressPolicy {
    /// Exactly one primary stress per pronunciation.
    #[default]
    ExactlyOne,
    /// At least one (compounds may carry two).
    AtLeastOne,
    /// Do not check primary stress.
    Unchecked,
}

/// Stress policies of a project.
#[derive(Debug, Clone, PartialEq, Eq, Default, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct StressPolicy {
    /// How many primary stresses a pronunciation needs.
    #[serde(default)]
    pub primary: PrimaryStressPolicy,
    /// Groups of phone tokens the project treats as free variation: variants of a word that
    /// differ only by swapping tokens within one group are redundant.
    #[serde(default)]
    pub free_variation: Vec<Vec<String>>,
}
