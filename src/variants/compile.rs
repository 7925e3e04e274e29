//! Compiling parsed rules against a phoneset: phone symbols and feature bundles become phone-id
//! bitsets, feature changes become a lookup table from each target phone to its result phone.
//! Every name is checked here, so a rule that loads cannot fail when applied. Owns the compiled
//! rule types; must not apply rules (that is `apply`) or read files (that is `ruleset`).

use crate::phoneset::{PhoneClass, PhoneId, Phoneset, StressLevel};

use super::bits::PhoneBits;
use super::error::{NoPhoneWithFeatures, VariantsError};
use crate::support::located::{Located, Position};
use super::syntax::{Bundle, Change, Element, RuleAst, Segment, Span, Target, Term};

/// Stress codes used by compiled matchers: none (consonants, unmarked), primary, secondary, unstressed.
pub(crate) const STRESS_NONE: u8 = 0;
pub(crate) const STRESS_PRIMARY: u8 = 1;
pub(crate) const STRESS_SECONDARY: u8 = 2;
pub(crate) const STRESS_UNSTRESSED: u8 = 3;
const ANY_STRESS: u8 = 0b1111;

/// The stress code of a lexical stress level.
pub(crate) fn stress_code(level: Option<StressLevel>) -> u8 {
    match level {
        None => STRESS_NONE,
        Some(StressLevel::Primary) => STRESS_PRIMARY,
        Some(StressLevel::Secondary) => STRESS_SECONDARY,
        Some(StressLevel::Unstressed) => STRESS_UNSTRESSED,
    }
}

/// The lexical stress level of a stress code.
pub(crate) fn stress_level(code: u8) -> Option<StressLevel> {
    match code {
        STRESS_PRIMARY => Some(StressLevel::Primary),
        STRESS_SECONDARY => Some(StressLevel::Secondary),
        STRESS_UNSTRESSED => Some(StressLevel::Unstressed),
        _ => None,
    }
}

/// Whether a rule may apply at some of its sites only (`optional`) or at all of them or none
/// (`obligatory`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Mode {
    /// Each site is decided independently with the rule's weight.
    Optional,
    /// All sites together, with the rule's weight: the speaker has the rule or not.
    Obligatory,
}

/// One phone position: a phone set plus a stress condition.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Matcher {
    pub phones: PhoneBits,
    /// Bit `1 << code` for each accepted stress code.
    pub stress: u8,
}

impl Matcher {
    #[inline]
    pub fn matches(&self, phone: PhoneId, stress: u8) -> bool {
        self.phones.contains(phone) && self.stress >> stress & 1 == 1
    }
}

/// A compiled context element.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Pattern {
    Boundary,
    One(Matcher),
    Choice(Vec<Pattern>),
    Optional(Box<Pattern>),
    Repeat(Box<Pattern>),
}

/// What a compiled rule does at a site.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Action {
    Delete,
    Insert(PhoneId),
    /// Result phone for each phone id (None: phone is not a target).
    Map(Vec<Option<PhoneId>>),
}

/// A rule ready to apply.
#[derive(Debug, Clone)]
pub struct Rule {
    /// Rule id, unique inside its set.
    pub id: String,
    /// Optional or obligatory.
    pub mode: Mode,
    /// Probability of applying (per site for optional rules, for all sites for obligatory ones).
    pub weight: f64,
    /// The rule as written.
    pub text: String,
    /// 1-based line of the rule text in its file.
    pub line: usize,
    /// Source given for this rule alone (empty: the set's source).
    pub source: String,
    pub(crate) target: Option<Vec<Matcher>>,
    pub(crate) action: Action,
    /// Left context, nearest element first (matched leftwards).
    pub(crate) left: Vec<Pattern>,
    pub(crate) right: Vec<Pattern>,
}

/// The compiled pieces of one rule (the left context still in reading order).
pub(crate) struct Parts {
    pub target: Option<Vec<Matcher>>,
    pub action: Action,
    pub left: Vec<Pattern>,
    pub right: Vec<Pattern>,
}

/// Compiles rule text; `locate` turns a character offset in the text into (line, column).
pub(crate) struct Compiler<'a> {
    pub set: &'a Phoneset,
    pub file: &'a str,
    pub locate: &'a dyn Fn(usize) -> (usize, usize),
}

impl Compiler<'_> {
    fn err(&self, span: Span, message: impl Into<String>) -> VariantsError {
        VariantsError::at(self.file, (self.locate)(span.start), message)
    }

    fn all_phones(&self) -> PhoneBits {
        let mut bits = PhoneBits::empty(self.set.phones().len());
        for id in 0..self.set.phones().len() {
            bits.insert(id as PhoneId);
        }
        bits
    }

    fn filter(&self, bits: &mut PhoneBits, keep: impl Fn(PhoneId) -> bool) {
        let mut out = PhoneBits::empty(self.set.phones().len());
        for id in bits.iter().filter(|id| keep(*id)) {
            out.insert(id);
        }
        *bits = out;
    }

    fn phone(&self, symbol: &str, span: Span) -> Result<(PhoneId, Option<StressLevel>), VariantsError> {
        let (bare, stress) = self.set.split_stress(symbol);
        match self.set.lookup(bare) {
            Some(id) => Ok((id, stress.map(|s| s.level))),
            None => {
                let near = self.set.suggest(bare, 3);
                Err(self.err(span, format!("unknown phone `{bare}` in phoneset {}; nearest: {}", self.set.id(), near.join(", "))))
            }
        }
    }

    fn check_feature(&self, name: &str, values: &[String], span: Span) -> Result<(), VariantsError> {
        let schema = self.set.schema();
        let Some(def) = schema.feature(name) else {
            let names: Vec<&str> = schema.features().iter().map(|f| f.name.as_str()).collect();
            return Err(self.err(span, format!("unknown feature `{name}`; features of {} are: {}", self.set.id(), names.join(", "))));
        };
        match values.iter().find(|v| !def.has_value(v)) {
            Some(bad) => Err(self.err(span, format!("`{bad}` is not a value of `{name}`; values are: {}", def.values.join(", ")))),
            None => Ok(()),
        }
    }

    fn bundle(&self, bundle: &Bundle) -> Result<Matcher, VariantsError> {
        let mut phones = self.all_phones();
        let mut stress = ANY_STRESS;
        for (term, span) in &bundle.terms {
            match term {
                Term::Class(word) => match word.as_str() {
                    "stressed" => stress &= 1 << STRESS_PRIMARY | 1 << STRESS_SECONDARY,
                    "unstressed" => stress &= 1 << STRESS_UNSTRESSED | 1 << STRESS_NONE,
                    _ => {
                        let class = class_test(word).ok_or_else(|| {
                            self.err(*span, format!("unknown class `{word}`; use one of {} or `feature=value`", CLASS_WORDS.join(", ")))
                        })?;
                        self.filter(&mut phones, |id| class(self.set, id));
                    }
                },
                Term::Feature { name, values, negated } if name == "stress" => {
                    let mut mask = 0;
                    for v in values {
                        mask |= match v.as_str() {
                            "primary" => 1 << STRESS_PRIMARY,
                            "secondary" => 1 << STRESS_SECONDARY,
                            "unstressed" => 1 << STRESS_UNSTRESSED | 1 << STRESS_NONE,
                            _ => return Err(self.err(*span, format!("stress is primary, secondary or unstressed, not `{v}`"))),
                        };
                    }
                    stress &= if *negated { !mask & ANY_STRESS } else { mask };
                }
                Term::Feature { name, values, negated } => {
                    self.check_feature(name, values, *span)?;
                    self.filter(&mut phones, |id| {
                        let has = self.set.phone(id).feature(name).is_some_and(|v| values.iter().any(|x| x == v));
                        has != *negated
                    });
                }
            }
        }
        if phones.is_empty() || stress == 0 {
            let whole = Span { start: bundle.terms.first().map_or(0, |t| t.1.start), end: 0 };
            return Err(self.err(whole, "this bundle matches no phone of the phoneset; loosen it"));
        }
        Ok(Matcher { phones, stress })
    }

    fn segment(&self, seg: &Segment) -> Result<Matcher, VariantsError> {
        match seg {
            Segment::Phone(symbol, span) => {
                let (id, level) = self.phone(symbol, *span)?;
                let mut phones = PhoneBits::empty(self.set.phones().len());
                phones.insert(id);
                let stress = match level {
                    Some(l) => 1 << stress_code(Some(l)),
                    None => ANY_STRESS,
                };
                Ok(Matcher { phones, stress })
            }
            Segment::Bundle(b, _) => self.bundle(b),
        }
    }

    fn pattern(&self, el: &Element) -> Result<Pattern, VariantsError> {
        Ok(match el {
            Element::Boundary => Pattern::Boundary,
            Element::Segment(s) => Pattern::One(self.segment(s)?),
            Element::Choice(alts) => Pattern::Choice(alts.iter().map(|a| self.pattern(a)).collect::<Result<_, _>>()?),
            Element::Optional(inner) => Pattern::Optional(Box::new(self.pattern(inner)?)),
            Element::Repeat(inner) => Pattern::Repeat(Box::new(self.pattern(inner)?)),
        })
    }

    fn bare_phone(&self, symbol: &str, span: Span) -> Result<PhoneId, VariantsError> {
        let (id, stress) = self.phone(symbol, span)?;
        if stress.is_some() {
            return Err(self.err(span, "write the result phone without a stress mark: a changed vowel keeps its stress, an inserted one is unstressed"));
        }
        Ok(id)
    }

    fn feature_map(&self, targets: &[Matcher], sets: &[(String, String, Span)]) -> Result<Vec<Option<PhoneId>>, VariantsError> {
        for (name, value, span) in sets {
            self.check_feature(name, std::slice::from_ref(value), *span)?;
        }
        let mut map = vec![None; self.set.phones().len()];
        let mut all = PhoneBits::empty(self.set.phones().len());
        targets.iter().for_each(|m| all.union_with(&m.phones));
        for id in all.iter() {
            let mut features = super::phone_features(self.set.phone(id));
            for (name, value, _) in sets {
                match features.iter_mut().find(|(n, _)| n == name) {
                    Some(slot) => slot.1 = value.clone(),
                    None => features.push((name.clone(), value.clone())),
                }
            }
            let result = super::find_phone_with(self.set, &features);
            let Some(result) = result else {
                let span = sets.first().map_or(Span { start: 0, end: 0 }, |s| s.2);
                let (line, column) = (self.locate)(span.start);
                let details = NoPhoneWithFeatures {
                    from: self.set.phone(id).symbol.clone(),
                    change: sets.iter().map(|(n, v, _)| format!("{n}={v}")).collect::<Vec<_>>().join(", "),
                    features: features.iter().map(|(n, v)| format!("{n}={v}")).collect::<Vec<_>>().join(", "),
                    phoneset: self.set.id().to_string(),
                    nearest: super::nearest_phones(self.set, &features, 3),
                };
                return Err(VariantsError::NoPhoneWithFeatures(Box::new(Located::new(
                    self.file,
                    Some(Position::new(line, column)),
                    details,
                ))));
            };
            if let Some(slot) = map.get_mut(usize::from(id)) {
                *slot = Some(result);
            }
        }
        Ok(map)
    }

    /// Compiles one parsed rule.
    pub fn rule(&self, ast: &RuleAst) -> Result<Parts, VariantsError> {
        let left = ast.left.iter().map(|e| self.pattern(e)).collect::<Result<Vec<_>, _>>()?;
        let right = ast.right.iter().map(|e| self.pattern(e)).collect::<Result<Vec<_>, _>>()?;
        let target = match &ast.target {
            Target::Empty => None,
            Target::Segments(segs) => Some(segs.iter().map(|s| self.segment(s)).collect::<Result<Vec<_>, _>>()?),
        };
        let action = match (&target, &ast.change) {
            (None, Change::Phone(p, span)) => Action::Insert(self.bare_phone(p, *span)?),
            (None, _) => return Err(self.err(Span { start: 0, end: 0 }, "an insertion needs a phone as its result")),
            (Some(_), Change::Delete) => Action::Delete,
            (Some(t), Change::Phone(p, span)) => {
                let to = self.bare_phone(p, *span)?;
                let mut map = vec![None; self.set.phones().len()];
                for m in t {
                    for id in m.phones.iter() {
                        if let Some(slot) = map.get_mut(usize::from(id)) {
                            *slot = Some(to);
                        }
                    }
                }
                Action::Map(map)
            }
            (Some(t), Change::Features(sets)) => Action::Map(self.feature_map(t, sets)?),
        };
        Ok(Parts { target, action, left, right })
    }
}

/// Class words accepted inside bundles (besides `stressed`/`unstressed`).
pub const CLASS_WORDS: &[&str] = &["consonant", "vowel", "monophthong", "diphthong", "nucleus", "syllabic"];

fn class_test(word: &str) -> Option<fn(&Phoneset, PhoneId) -> bool> {
    Some(match word {
        "consonant" => |s, id| matches!(s.phone(id).class, PhoneClass::Consonant),
        "vowel" => |s, id| matches!(s.phone(id).class, PhoneClass::Vowel | PhoneClass::Diphthong),
        "monophthong" => |s, id| matches!(s.phone(id).class, PhoneClass::Vowel),
        "diphthong" => |s, id| matches!(s.phone(id).class, PhoneClass::Diphthong),
        "nucleus" => |s, id| s.phone(id).is_nucleus(),
        "syllabic" => |s, id| s.phone(id).syllabic && matches!(s.phone(id).class, PhoneClass::Consonant),
        _ => return None,
    })
}
