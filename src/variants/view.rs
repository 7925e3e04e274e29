//! The feature view: a canonical and a variant pronunciation laid side by side as aligned
//! feature tracks (one row per feature, one column per aligned position), with changed cells,
//! insertions and deletions marked. Alignment is a weighted edit distance whose substitution
//! cost is `Phoneset::distance` (R. A. Wagner & M. J. Fischer, "The string-to-string correction
//! problem", 1974; the alignment itself is [`crate::support::align`]). Owns the plain data
//! and a plain-text rendering; must not draw to a terminal.

use crate::phoneset::{Phone, PhoneClass, PhoneToken, Phoneset, Pronunciation};

use super::compile::{stress_code, STRESS_NONE, STRESS_PRIMARY, STRESS_SECONDARY};

/// Cost of inserting or deleting one phone: as much as the most different substitution, so a
/// substitution is always preferred to a deletion plus an insertion.
const INDEL_COST: f64 = 1.0;

/// What happened at one aligned position.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Edit {
    /// Same phone and stress.
    Same,
    /// A different phone (or stress) in the variant.
    Changed,
    /// A phone only the variant has.
    Inserted,
    /// A phone only the canonical has.
    Deleted,
}

/// One aligned position.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct Column {
    /// Canonical phone symbol with stress mark, if the canonical has one here.
    pub canonical: Option<String>,
    /// Variant phone symbol with stress mark, if the variant has one here.
    pub variant: Option<String>,
    /// The edit.
    pub edit: Edit,
}

/// One feature across the aligned positions.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct FeatureRow {
    /// Feature name (`class` and `stress` come first).
    pub feature: String,
    /// Per column: the canonical phone's value (None: no phone, or the phone lacks the feature).
    pub canonical: Vec<Option<String>>,
    /// Per column: the variant phone's value.
    pub variant: Vec<Option<String>>,
    /// Per column: whether the two values differ.
    pub changed: Vec<bool>,
}

/// Canonical and variant as aligned feature tracks.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct FeatureView {
    /// Aligned positions.
    pub columns: Vec<Column>,
    /// One row per feature.
    pub rows: Vec<FeatureRow>,
}

fn stress_name(code: u8) -> Option<String> {
    match code {
        STRESS_NONE => None,
        STRESS_PRIMARY => Some("primary".into()),
        STRESS_SECONDARY => Some("secondary".into()),
        _ => Some("unstressed".into()),
    }
}

fn phone_at(p: &Pronunciation, i: Option<usize>) -> Option<&PhoneToken> {
    i.and_then(|i| p.phones.get(i))
}

fn class_name(p: &Phone) -> String {
    match p.class {
        PhoneClass::Consonant => "consonant",
        PhoneClass::Vowel => "vowel",
        PhoneClass::Diphthong => "diphthong",
    }
    .to_string()
}

/// Aligns by weighted edit distance ([`crate::support::align`]); returns (canonical index,
/// variant index) pairs.
fn align(set: &Phoneset, a: &Pronunciation, b: &Pronunciation) -> Vec<(Option<usize>, Option<usize>)> {
    let substitute = |i: usize, j: usize| {
        let (x, y) = (&a.phones[i], &b.phones[j]);
        f64::from(set.distance(x.phone, y.phone)) + if x.stress == y.stress { 0.0 } else { 0.05 }
    };
    crate::support::align::align(a.phones.len(), b.phones.len(), INDEL_COST, substitute).pairs
}

/// Lays `canonical` and `variant` side by side.
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// use orthoepy::variants::{feature_view, Edit};
/// let arpa = Phoneset::shipped("en-arpa").unwrap();
/// let prince = arpa.parse("P R IH1 N S").unwrap();
/// let prints = arpa.parse("P R IH1 N T S").unwrap();
/// let view = feature_view(&arpa, &prince, &prints);
/// let edits: Vec<Edit> = view.columns.iter().map(|c| c.edit).collect();
/// assert_eq!(edits[4], Edit::Inserted);
/// assert_eq!(view.columns[4].variant.as_deref(), Some("T"));
/// assert!(view.render_text().contains("+T"));
/// ```
pub fn feature_view(set: &Phoneset, canonical: &Pronunciation, variant: &Pronunciation) -> FeatureView {
    let path = align(set, canonical, variant);
    let symbol = |p: &Pronunciation, i: Option<usize>| {
        i.and_then(|i| p.phones.get(i)).map(|t| Pronunciation { phones: vec![*t] }.render(set))
    };
    let columns: Vec<Column> = path
        .iter()
        .map(|&(i, j)| {
            let (c, v) = (symbol(canonical, i), symbol(variant, j));
            let edit = match (&c, &v) {
                (Some(x), Some(y)) if x == y => Edit::Same,
                (Some(_), Some(_)) => Edit::Changed,
                (None, _) => Edit::Inserted,
                (Some(_), None) => Edit::Deleted,
            };
            Column { canonical: c, variant: v, edit }
        })
        .collect();
    let mut names: Vec<String> = Vec::new();
    for &(i, j) in &path {
        for t in [phone_at(canonical, i), phone_at(variant, j)].into_iter().flatten() {
            for (name, _) in super::phone_features(set.phone(t.phone)) {
                if !names.contains(&name) {
                    names.push(name);
                }
            }
        }
    }
    let track = |value: &dyn Fn(&Pronunciation, Option<usize>) -> Option<String>, feature: &str| {
        let canonical_values: Vec<Option<String>> = path.iter().map(|&(i, _)| value(canonical, i)).collect();
        let variant_values: Vec<Option<String>> = path.iter().map(|&(_, j)| value(variant, j)).collect();
        let changed = canonical_values.iter().zip(&variant_values).map(|(a, b)| a != b).collect();
        FeatureRow { feature: feature.to_string(), canonical: canonical_values, variant: variant_values, changed }
    };
    let mut rows = vec![
        track(&|p, i| phone_at(p, i).map(|t| class_name(set.phone(t.phone))), "class"),
        track(&|p, i| phone_at(p, i).and_then(|t| stress_name(stress_code(t.stress))), "stress"),
    ];
    for name in &names {
        rows.push(track(&|p, i| phone_at(p, i).and_then(|t| set.phone(t.phone).feature(name).map(str::to_string)), name));
    }
    FeatureView { columns, rows }
}

impl FeatureView {
    /// Plain text: a header of aligned phones (`A>B` changed, `+B` inserted, `-A` deleted), then
    /// one line per feature; a changed cell reads `old>new*`, `+new*` (inserted) or `-old*` (deleted).
    pub fn render_text(&self) -> String {
        let header: Vec<String> = self
            .columns
            .iter()
            .map(|c| {
                let (a, b) = (c.canonical.as_deref().unwrap_or(""), c.variant.as_deref().unwrap_or(""));
                match c.edit {
                    Edit::Same => a.to_string(),
                    Edit::Changed => format!("{a}>{b}"),
                    Edit::Inserted => format!("+{b}"),
                    Edit::Deleted => format!("-{a}"),
                }
            })
            .collect();
        let cell = |row: &FeatureRow, k: usize| -> String {
            let get = |v: &Vec<Option<String>>| v.get(k).cloned().flatten();
            match (get(&row.canonical), get(&row.variant), row.changed.get(k).copied().unwrap_or(false)) {
                (Some(a), _, false) => a,
                (None, _, false) => "·".into(),
                (Some(a), Some(b), true) => format!("{a}>{b}*"),
                (None, Some(b), true) => format!("+{b}*"),
                (Some(a), None, true) => format!("-{a}*"),
                (None, None, true) => "·".into(),
            }
        };
        let label_width = self.rows.iter().map(|r| r.feature.chars().count()).max().unwrap_or(5).max(5);
        let widths: Vec<usize> = (0..self.columns.len())
            .map(|k| {
                let head = header.get(k).map_or(0, |h| h.chars().count());
                self.rows.iter().map(|r| cell(r, k).chars().count()).max().unwrap_or(0).max(head)
            })
            .collect();
        let mut out = String::new();
        let line = |label: &str, cells: Vec<String>, out: &mut String| {
            out.push_str(&format!("{label:<label_width$}"));
            for (c, w) in cells.iter().zip(&widths) {
                out.push_str(&format!("  {c:<w$}"));
            }
            out.push('\n');
        };
        line("phone", header, &mut out);
        for row in &self.rows {
            if row.canonical.iter().chain(&row.variant).all(Option::is_none) {
                continue;
            }
            line(&row.feature, (0..self.columns.len()).map(|k| cell(row, k)).collect(), &mut out);
        }
        out
    }
}
