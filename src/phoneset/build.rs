//! Turns a parsed phoneset file into a checked [`Phoneset`]: the self-check (unique symbols,
//! schema-valid features, required features, distinct bundles unless allophones, IPA and
//! X-SAMPA present, well-formed stress marks and constraints) and the derived lookup tables.
//! Every problem found is reported with its line and column; nothing is silently repaired.

use std::collections::{BTreeMap, HashMap};
use std::ops::Range;

use toml::Spanned;

use super::distance::phone_distance;
use super::error::{CheckProblem, PhonesetError};
use crate::support::located::Located;
use super::phone::{Features, Phone, PhoneClass, StressedForm};
use super::stress::StressLevel;
use super::transcribe::Forms;
use super::raw::{parse_toml, Problems, RawPhone, RawPhoneset};
use super::schema::Schema;
use super::stress::StressMarks;
use super::{phonotactics, PhoneId, Phoneset, MAX_FILE};

/// Parses and checks phoneset TOML `text`; `file` labels error messages.
pub(crate) fn from_text(text: &str, file: &str) -> Result<Phoneset, PhonesetError> {
    if text.len() as u64 > MAX_FILE.bytes {
        return Err(PhonesetError::TooLarge(Located::whole(
            file,
            format!("{} bytes is more than the {MAX_FILE} accepted for a phoneset file; is this really a phoneset?", text.len()),
        )));
    }
    let raw: RawPhoneset = parse_toml(text, file)?;
    let mut problems = Problems::new(text);
    let schema = build_schema(&raw, &mut problems)?;
    for field in [&raw.id, &raw.name] {
        if field.get_ref().trim().is_empty() {
            problems.add(
                field.span(),
                CheckProblem::BadSymbol {
                    symbol: field.get_ref().clone(),
                },
            );
        }
    }
    let max = PhoneId::MAX as usize;
    if raw.phone.len() > max {
        let problem = CheckProblem::TooManyPhones {
            count: raw.phone.len(),
            max,
        };
        return Err(PhonesetError::Invalid(vec![Located::new(file, None, problem)]));
    }
    let (phones, lines) = build_phones(&raw.phone, &schema, &mut problems);
    let by_symbol: HashMap<String, PhoneId> = phones
        .iter()
        .enumerate()
        .map(|(i, p)| (p.symbol.clone(), i as PhoneId))
        .collect();
    check_allophones(&raw.phone, &by_symbol, &mut problems);
    check_bundles(&raw.phone, &phones, &lines, &mut problems);
    let stress = StressMarks::build(raw.stress.as_ref(), &by_symbol, &mut problems);
    let constraints = phonotactics::build(&raw.constraint, &by_symbol, &schema, &mut problems);
    problems.finish(file)?;

    let mut by_ipa: HashMap<String, PhoneId> = HashMap::new();
    for (i, p) in phones.iter().enumerate() {
        let better = match by_ipa.get(&p.ipa) {
            None => true,
            Some(&old) => phones
                .get(old as usize)
                .is_some_and(|o| o.is_allophone() && !p.is_allophone()),
        };
        if better {
            by_ipa.insert(p.ipa.clone(), i as PhoneId);
        }
    }
    let max_ipa_chars = phones
        .iter()
        .map(|p| p.ipa.chars().count())
        .max()
        .unwrap_or(0);
    let forms = Forms::build(&phones);
    let distances = phones
        .iter()
        .flat_map(|a| phones.iter().map(|b| phone_distance(&schema, a, b)))
        .collect();
    Ok(Phoneset {
        id: raw.id.into_inner(),
        name: raw.name.into_inner(),
        description: raw.description.unwrap_or_default(),
        source: file.to_string(),
        schema,
        phones,
        by_symbol,
        by_ipa,
        max_ipa_chars,
        stress,
        constraints,
        distances,
        forms,
    })
}

/// The schema: inline `[[feature]]` tables, else the shipped schema named by `schema`.
fn build_schema(raw: &RawPhoneset, problems: &mut Problems<'_>) -> Result<Schema, PhonesetError> {
    let name = raw.schema.get_ref();
    if !raw.feature.is_empty() {
        if Schema::shipped_names().contains(&name.as_str()) {
            problems.add(
                raw.schema.span(),
                CheckProblem::SchemaShadowsShipped { name: name.clone() },
            );
        }
        return Ok(Schema::build(
            &raw.schema,
            raw.syllabic_weight.as_ref(),
            &raw.feature,
            problems,
        ));
    }
    if let Some(w) = &raw.syllabic_weight {
        problems.add(
            w.span(),
            CheckProblem::BadFeature {
                feature: "syllabic".into(),
                message:
                    "`syllabic_weight` belongs to an inline schema; this file uses a shipped one"
                        .into(),
            },
        );
    }
    match Schema::shipped(name) {
        Some(schema) => schema,
        None => {
            problems.add(
                raw.schema.span(),
                CheckProblem::UnknownSchema {
                    name: name.clone(),
                    known: Schema::shipped_names().join(", "),
                },
            );
            Ok(Schema::build(
                &raw.schema,
                None,
                &[],
                &mut Problems::new(""),
            ))
        }
    }
}

fn build_phones(
    raw: &[Spanned<RawPhone>],
    schema: &Schema,
    problems: &mut Problems<'_>,
) -> (Vec<Phone>, Vec<usize>) {
    let mut phones = Vec::new();
    let mut lines = Vec::new();
    let mut first_line: HashMap<&str, usize> = HashMap::new();
    for rp in raw {
        let span = rp.span();
        let r = rp.get_ref();
        let symbol = r.symbol.get_ref();
        if symbol.is_empty() || symbol.contains(char::is_whitespace) {
            problems.add(
                r.symbol.span(),
                CheckProblem::BadSymbol {
                    symbol: symbol.clone(),
                },
            );
        } else if let Some(&line) = first_line.get(symbol.as_str()) {
            problems.add(
                r.symbol.span(),
                CheckProblem::DuplicateSymbol {
                    symbol: symbol.clone(),
                    first_line: line,
                },
            );
            continue;
        }
        first_line.insert(symbol, problems.line_of(&r.symbol.span()));
        let Some(class) = PhoneClass::from_name(r.class.get_ref()) else {
            problems.add(
                r.class.span(),
                CheckProblem::UnknownClass {
                    value: r.class.get_ref().clone(),
                },
            );
            continue;
        };
        let ipa = text_field(&r.ipa, "ipa", symbol, &span, problems);
        let xsampa = text_field(&r.xsampa, "xsampa", symbol, &span, problems);
        let empty = BTreeMap::new();
        let (bundle, bundle_span) = match &r.features {
            Some(f) => (f.get_ref(), f.span()),
            None => (&empty, span.clone()),
        };
        let features = schema.check_bundle(bundle, bundle_span, class, symbol, problems);
        let targets = build_targets(r, class, schema, &span, problems);
        let syllabic = r.syllabic.unwrap_or(class != PhoneClass::Consonant);
        let by_stress = build_stressed_forms(r, syllabic, problems);
        phones.push(Phone {
            symbol: symbol.clone(),
            ipa,
            xsampa,
            class,
            features,
            allophone_of: r.allophone_of.iter().map(|a| a.get_ref().clone()).collect(),
            syllabic,
            targets,
            by_stress,
        });
        lines.push(problems.line_of(&span));
    }
    (phones, lines)
}

fn text_field(
    value: &Option<Spanned<String>>,
    field: &'static str,
    phone: &str,
    span: &Range<usize>,
    problems: &mut Problems<'_>,
) -> String {
    match value {
        Some(v) if !v.get_ref().trim().is_empty() => v.get_ref().trim().to_string(),
        Some(v) => {
            problems.add(
                v.span(),
                CheckProblem::MissingField {
                    phone: phone.to_string(),
                    field,
                },
            );
            String::new()
        }
        None => {
            problems.add(
                span.clone(),
                CheckProblem::MissingField {
                    phone: phone.to_string(),
                    field,
                },
            );
            String::new()
        }
    }
}

/// The `by_stress` renderings: known levels, each once, non-empty, on nuclei only.
fn build_stressed_forms(r: &RawPhone, syllabic: bool, problems: &mut Problems<'_>) -> Vec<StressedForm> {
    let mut forms: Vec<StressedForm> = Vec::new();
    for raw in &r.by_stress {
        let form = raw.get_ref();
        let mut fail = |span: Range<usize>, message: String| {
            let phone = r.symbol.get_ref().clone();
            problems.add(span, CheckProblem::BadStressedForm { phone, message });
        };
        let Some(level) = StressLevel::from_name(form.level.get_ref()) else {
            let message = format!("unknown level `{}`; use primary, secondary or unstressed", form.level.get_ref());
            fail(form.level.span(), message);
            continue;
        };
        let (ipa, xsampa) = (form.ipa.get_ref().trim(), form.xsampa.get_ref().trim());
        if !syllabic {
            fail(raw.span(), "only a phone that can carry stress (a nucleus) has stress-dependent renderings".into());
        } else if ipa.is_empty() || xsampa.is_empty() {
            fail(raw.span(), "`ipa` and `xsampa` must both be non-empty".into());
        } else if forms.iter().any(|f| f.level == level) {
            fail(form.level.span(), format!("level `{}` is given twice; keep one", level.as_str()));
        } else {
            forms.push(StressedForm { level, ipa: ipa.to_string(), xsampa: xsampa.to_string() });
        }
    }
    forms
}

fn build_targets(
    r: &RawPhone,
    class: PhoneClass,
    schema: &Schema,
    span: &Range<usize>,
    problems: &mut Problems<'_>,
) -> Vec<Features> {
    let symbol = r.symbol.get_ref().clone();
    match (&r.targets, class) {
        (Some(t), PhoneClass::Diphthong) if t.get_ref().len() >= 2 => t
            .get_ref()
            .iter()
            .map(|b| {
                schema.check_bundle(b.get_ref(), b.span(), PhoneClass::Vowel, &symbol, problems)
            })
            .collect(),
        (Some(t), PhoneClass::Diphthong) => {
            problems.add(
                t.span(),
                CheckProblem::BadTargets {
                    phone: symbol,
                    message: "a diphthong needs at least two vowel targets",
                },
            );
            Vec::new()
        }
        (None, PhoneClass::Diphthong) => {
            problems.add(
                span.clone(),
                CheckProblem::BadTargets {
                    phone: symbol,
                    message: "a diphthong needs `targets = [{..}, {..}]`",
                },
            );
            Vec::new()
        }
        (Some(t), _) => {
            problems.add(
                t.span(),
                CheckProblem::BadTargets {
                    phone: symbol,
                    message: "only diphthongs have targets; use `features`",
                },
            );
            Vec::new()
        }
        (None, _) => Vec::new(),
    }
}

fn check_allophones(
    raw: &[Spanned<RawPhone>],
    symbols: &HashMap<String, PhoneId>,
    problems: &mut Problems<'_>,
) {
    for r in raw.iter().map(Spanned::get_ref) {
        for base in &r.allophone_of {
            let why = if base.get_ref() == r.symbol.get_ref() {
                "the phone itself"
            } else if !symbols.contains_key(base.get_ref()) {
                "not a symbol of this phoneset"
            } else {
                continue;
            };
            problems.add(
                base.span(),
                CheckProblem::BadAllophoneBase {
                    phone: r.symbol.get_ref().clone(),
                    base: base.get_ref().clone(),
                    why,
                },
            );
        }
    }
}

/// Two phones may share class, features, targets and syllabicity only when one is marked an
/// allophone of the other.
fn check_bundles(
    raw: &[Spanned<RawPhone>],
    phones: &[Phone],
    lines: &[usize],
    problems: &mut Problems<'_>,
) {
    type Key<'p> = (PhoneClass, &'p Features, &'p [Features], bool);
    let mut seen: HashMap<Key<'_>, usize> = HashMap::new();
    for (i, p) in phones.iter().enumerate() {
        let key = (p.class, &p.features, p.targets.as_slice(), p.syllabic);
        let Some(&j) = seen.get(&key) else {
            seen.insert(key, i);
            continue;
        };
        let Some(other) = phones.get(j) else { continue };
        let related =
            p.allophone_of.contains(&other.symbol) || other.allophone_of.contains(&p.symbol);
        if !related {
            let span = raw
                .iter()
                .find(|r| r.get_ref().symbol.get_ref() == &p.symbol)
                .map(|r| r.get_ref().symbol.span());
            problems.add(
                span.unwrap_or(0..0),
                CheckProblem::SameBundle {
                    symbol: p.symbol.clone(),
                    other: other.symbol.clone(),
                    other_line: lines.get(j).copied().unwrap_or(0),
                },
            );
        }
    }
}
