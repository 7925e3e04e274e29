//! The feature schema: which features exist, their values (with ordinal scale points), their
//! weights for distance, which phone classes they describe, and defaults. Builds a [`Schema`]
//! from `[[feature]]` tables, checking it, and completes or checks bundles against it. It does
//! not know about phones' symbols or stress.

use std::collections::{BTreeMap, HashSet};
use std::ops::Range;

use toml::Spanned;

use super::error::{CheckProblem, PhonesetError};
use super::phone::{Features, PhoneClass, CLASS_FEATURE, SYLLABIC_FEATURE};
use super::raw::{parse_toml, Problems, RawFeature, RawSchemaFile};

/// The shipped schemas: (name, TOML text).
const SHIPPED_SCHEMAS: &[(&str, &str)] = &[(
    "ipa-chart",
    include_str!("../../phonesets/ipa-chart.schema.toml"),
)];

/// One feature of a schema.
#[derive(Debug, Clone, PartialEq)]
pub struct FeatureDef {
    /// Feature name, e.g. `place`.
    pub name: String,
    /// Allowed values, in the order written.
    pub values: Vec<String>,
    /// Ordinal scale point of each value (same order as `values`), for graded mismatch; `None`
    /// for a categorical feature (any two different values mismatch fully).
    pub scale: Option<Vec<f32>>,
    /// Weight (salience) in the feature distance.
    pub weight: f32,
    /// Classes the feature describes (diphthong targets use `vowel` features).
    pub classes: Vec<PhoneClass>,
    /// Whether every phone of those classes must give the feature.
    pub required: bool,
    /// Value filled in when a phone leaves the feature out.
    pub default: Option<String>,
}

impl FeatureDef {
    /// Mismatch between two values in 0..=1: 0 when equal; for ordinal features the distance
    /// of their scale points divided by the scale's range; otherwise 1. Unknown values count 1.
    ///
    /// ```
    /// let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    /// let place = set.schema().feature("place").unwrap();
    /// let near = place.mismatch("bilabial", "labiodental");
    /// let far = place.mismatch("bilabial", "glottal");
    /// assert!(0.0 < near && near < far && far <= 1.0);
    /// ```
    pub fn mismatch(&self, a: &str, b: &str) -> f32 {
        if a == b {
            return 0.0;
        }
        let Some(scale) = &self.scale else { return 1.0 };
        let point = |v: &str| {
            self.values
                .iter()
                .position(|x| x == v)
                .and_then(|i| scale.get(i))
        };
        match (point(a), point(b)) {
            (Some(pa), Some(pb)) => {
                let (lo, hi) = scale
                    .iter()
                    .fold((f32::MAX, f32::MIN), |(lo, hi), &s| (lo.min(s), hi.max(s)));
                if hi > lo {
                    ((pa - pb).abs() / (hi - lo)).clamp(0.0, 1.0)
                } else {
                    1.0
                }
            }
            _ => 1.0,
        }
    }

    /// True when `value` is one of the feature's values.
    pub fn has_value(&self, value: &str) -> bool {
        self.values.iter().any(|v| v == value)
    }

    /// True when the feature describes phones of `class` (or its targets).
    pub fn applies_to(&self, class: PhoneClass) -> bool {
        self.classes.contains(&class)
    }
}

/// A feature schema: the features phones are described with.
#[derive(Debug, Clone, PartialEq)]
pub struct Schema {
    name: String,
    syllabic_weight: f32,
    features: Vec<FeatureDef>,
}

impl Schema {
    /// The schema's name (shipped: `ipa-chart`). Feature-based operations across phonesets
    /// need equal schema names.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The features, in the order defined.
    pub fn features(&self) -> &[FeatureDef] {
        &self.features
    }

    /// The feature called `name`.
    pub fn feature(&self, name: &str) -> Option<&FeatureDef> {
        self.features.iter().find(|f| f.name == name)
    }

    /// Weight of a syllabicity mismatch in the feature distance.
    pub fn syllabic_weight(&self) -> f32 {
        self.syllabic_weight
    }

    /// Names of the shipped schemas.
    pub fn shipped_names() -> Vec<&'static str> {
        SHIPPED_SCHEMAS.iter().map(|(n, _)| *n).collect()
    }

    /// The shipped schema called `name`.
    pub(crate) fn shipped(name: &str) -> Option<Result<Schema, PhonesetError>> {
        let (_, text) = SHIPPED_SCHEMAS.iter().find(|(n, _)| *n == name)?;
        let file = format!("phonesets/{name}.schema.toml (shipped)");
        Some(parse_toml::<RawSchemaFile>(text, &file).and_then(|raw| {
            let mut problems = Problems::new(text);
            let schema = Schema::build(
                &raw.name,
                raw.syllabic_weight.as_ref(),
                &raw.feature,
                &mut problems,
            );
            problems.finish(&file).map(|()| schema)
        }))
    }

    /// Builds and checks a schema from its parts, recording problems.
    pub(crate) fn build(
        name: &Spanned<String>,
        syllabic_weight: Option<&Spanned<f64>>,
        raw: &[Spanned<RawFeature>],
        problems: &mut Problems<'_>,
    ) -> Schema {
        let syllabic_weight = match syllabic_weight {
            None => 5.0,
            Some(w) => check_weight(w, "syllabic", problems),
        };
        let mut seen = HashSet::new();
        let mut features = Vec::new();
        for f in raw {
            let f = f.get_ref();
            let fname = f.name.get_ref().clone();
            if fname.is_empty() {
                problems.add(f.name.span(), bad(&fname, "the name is empty"));
            } else if fname == CLASS_FEATURE || fname == SYLLABIC_FEATURE {
                problems.add(
                    f.name.span(),
                    CheckProblem::ReservedFeature {
                        name: fname.clone(),
                    },
                );
            } else if !seen.insert(fname.clone()) {
                problems.add(
                    f.name.span(),
                    CheckProblem::DuplicateFeature {
                        name: fname.clone(),
                    },
                );
            }
            features.push(build_feature(f, problems));
        }
        if features.is_empty() {
            problems.add(
                name.span(),
                bad(name.get_ref(), "the schema defines no [[feature]] tables"),
            );
        }
        Schema {
            name: name.get_ref().clone(),
            syllabic_weight,
            features,
        }
    }

    /// Checks a written bundle for a phone of `class` and returns it with defaults filled in.
    pub(crate) fn check_bundle(
        &self,
        bundle: &BTreeMap<String, Spanned<String>>,
        span: Range<usize>,
        class: PhoneClass,
        phone: &str,
        problems: &mut Problems<'_>,
    ) -> Features {
        let mut out = Features::new();
        for (name, value) in bundle {
            let Some(def) = self.feature(name) else {
                problems.add(
                    value.span(),
                    CheckProblem::UnknownFeature {
                        feature: name.clone(),
                        known: self.names(),
                    },
                );
                continue;
            };
            if !def.applies_to(class) {
                problems.add(
                    value.span(),
                    CheckProblem::FeatureNotForClass {
                        feature: name.clone(),
                        class: class.as_str(),
                    },
                );
            } else if !def.has_value(value.get_ref()) {
                problems.add(
                    value.span(),
                    CheckProblem::UnknownValue {
                        feature: name.clone(),
                        value: value.get_ref().clone(),
                        allowed: def.values.join(", "),
                    },
                );
            } else {
                out.set(name, value.get_ref());
            }
        }
        for def in self.features.iter().filter(|d| d.applies_to(class)) {
            if out.get(&def.name).is_some() || bundle.contains_key(&def.name) {
                continue;
            }
            match &def.default {
                Some(d) => {
                    out.set(&def.name, d);
                }
                None if def.required => problems.add(
                    span.clone(),
                    CheckProblem::MissingFeature {
                        phone: phone.to_string(),
                        feature: def.name.clone(),
                        class: class.as_str(),
                    },
                ),
                None => {}
            }
        }
        out
    }

    /// `query` with defaults of `class` filled in, or `None` when the query names a feature
    /// (other than the reserved ones) that does not describe `class`.
    pub(crate) fn complete(&self, query: &Features, class: PhoneClass) -> Option<Features> {
        let mut out = Features::new();
        for (name, value) in query.iter() {
            if name == CLASS_FEATURE || name == SYLLABIC_FEATURE {
                continue;
            }
            if !self.feature(name)?.applies_to(class) {
                return None;
            }
            out.set(name, value);
        }
        for def in self.features.iter().filter(|d| d.applies_to(class)) {
            if let (None, Some(d)) = (out.get(&def.name), &def.default) {
                out.set(&def.name, d);
            }
        }
        Some(out)
    }

    /// Feature names, comma separated (for messages).
    pub(crate) fn names(&self) -> String {
        self.features
            .iter()
            .map(|f| f.name.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    }
}

fn bad(feature: &str, message: &str) -> CheckProblem {
    CheckProblem::BadFeature {
        feature: feature.to_string(),
        message: message.to_string(),
    }
}

fn check_weight(w: &Spanned<f64>, feature: &str, problems: &mut Problems<'_>) -> f32 {
    let v = *w.get_ref();
    if v.is_finite() && (0.0..=1.0e6).contains(&v) {
        v as f32
    } else {
        problems.add(
            w.span(),
            bad(feature, "the weight must be a number from 0 to 1000000"),
        );
        0.0
    }
}

fn build_feature(f: &RawFeature, problems: &mut Problems<'_>) -> FeatureDef {
    let name = f.name.get_ref().clone();
    let mut classes = Vec::new();
    for c in f.classes.get_ref() {
        match PhoneClass::from_name(c.get_ref()) {
            Some(class) if !classes.contains(&class) => classes.push(class),
            Some(_) => problems.add(c.span(), bad(&name, "a class is listed twice")),
            None => problems.add(
                c.span(),
                CheckProblem::UnknownClass {
                    value: c.get_ref().clone(),
                },
            ),
        }
    }
    if classes.is_empty() {
        problems.add(
            f.classes.span(),
            bad(
                &name,
                "list the classes it describes, e.g. classes = [\"consonant\"]",
            ),
        );
    }
    let mut values: Vec<String> = Vec::new();
    for v in f.values.get_ref() {
        if v.get_ref().is_empty() || v.get_ref().contains(char::is_whitespace) {
            problems.add(
                v.span(),
                bad(&name, "a value is empty or contains whitespace"),
            );
        } else if values.contains(v.get_ref()) {
            problems.add(
                v.span(),
                bad(&name, &format!("value `{}` is listed twice", v.get_ref())),
            );
        }
        values.push(v.get_ref().clone());
    }
    if values.len() < 2 {
        problems.add(
            f.values.span(),
            bad(&name, "a feature needs at least two values"),
        );
    }
    let scale = f
        .scale
        .as_ref()
        .map(|s| check_scale(&name, s, values.len(), problems));
    let weight = check_weight(&f.weight, &name, problems);
    let default = f.default.as_ref().map(|d| {
        if f.required {
            problems.add(
                d.span(),
                bad(
                    &name,
                    "a required feature cannot have a default; drop one of them",
                ),
            );
        } else if !values.contains(d.get_ref()) {
            problems.add(
                d.span(),
                bad(
                    &name,
                    &format!("default `{}` is not one of its values", d.get_ref()),
                ),
            );
        }
        d.get_ref().clone()
    });
    FeatureDef {
        name,
        values,
        scale,
        weight,
        classes,
        required: f.required,
        default,
    }
}

fn check_scale(
    name: &str,
    s: &Spanned<Vec<f64>>,
    n_values: usize,
    problems: &mut Problems<'_>,
) -> Vec<f32> {
    let points = s.get_ref();
    if points.len() != n_values {
        problems.add(
            s.span(),
            bad(
                name,
                &format!(
                    "the scale has {} points for {} values",
                    points.len(),
                    n_values
                ),
            ),
        );
    }
    if points
        .iter()
        .any(|p| !p.is_finite() || !(0.0..=1.0).contains(p))
    {
        problems.add(s.span(), bad(name, "scale points must lie in 0..=1"));
    }
    let mut distinct = HashSet::new();
    for p in points {
        if !distinct.insert(p.to_bits()) {
            problems.add(s.span(), bad(name, "two values share a scale point, so their phones would not differ; give each its own"));
            break;
        }
    }
    points.iter().map(|&p| p as f32).collect()
}
