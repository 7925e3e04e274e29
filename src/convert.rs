//! Converting a lexicon's entries to another phoneset with a [`Converter`], and the report of
//! every non-exact mapping used (from, to, distance, count, example words). Entries keep their
//! word, status, source, score, note and extra columns; only the pronunciation changes. An entry
//! whose pronunciation is not of the source phoneset is reported, never guessed at.

use std::collections::BTreeMap;

use crate::lexicon::Entry;
use crate::phoneset::{Converter, MatchKind, Phoneset};
use crate::pls::entry_phones;

/// Example words kept per report row.
pub const EXAMPLES: usize = 3;

/// One non-exact mapping and how often it was used.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ReportRow {
    /// Source phones (symbol and stress mark), space separated.
    pub from: String,
    /// Target phones, space separated (empty when the phone is dropped).
    pub to: String,
    /// How the target was chosen (`override` or `nearest` with its distance).
    #[serde(flatten)]
    pub kind: MatchKind,
    /// Phones converted by this mapping.
    pub count: usize,
    /// The first words it was used in.
    pub examples: Vec<String>,
}

/// The converted entries and the report.
#[derive(Debug, Clone, Default)]
pub struct LexiconConversion {
    /// The entries, in order, pronunciations in the target phoneset.
    pub entries: Vec<Entry>,
    /// Non-exact mappings, most used first.
    pub report: Vec<ReportRow>,
    /// Entries that could not be read in the source phoneset: (line, word, unknown symbol).
    pub unreadable: Vec<(usize, String, String)>,
}

/// Converts every entry with `converter` (from `from` to `to`).
///
/// ```
/// use orthoepy::convert::convert_entries;
/// use orthoepy::lexicon::Entry;
/// use orthoepy::phoneset::{parse_overrides, Converter, Phoneset};
/// let arpa = Phoneset::shipped("en-arpa").unwrap();
/// let ipa = Phoneset::shipped("ipa-broad").unwrap();
/// let overrides = parse_overrides("DX t\n", &arpa, &ipa).unwrap();
/// let converter = Converter::new(&arpa, &ipa, &overrides).unwrap();
/// let done = convert_entries(&[Entry::new("butter", "B AH1 DX ER0")], &converter, &arpa, &ipa);
/// assert_eq!(done.entries[0].pronunciation, "b ʌˈ t ɚ");
/// assert_eq!((done.report[0].from.as_str(), done.report[0].to.as_str(), done.report[0].count), ("DX", "t", 1));
/// ```
pub fn convert_entries(entries: &[Entry], converter: &Converter<'_>, from: &Phoneset, to: &Phoneset) -> LexiconConversion {
    let mut done = LexiconConversion::default();
    let mut rows: BTreeMap<(String, String), ReportRow> = BTreeMap::new();
    for entry in entries {
        let pron = match entry_phones(entry, from) {
            Ok(p) => p,
            Err(symbol) => {
                done.unreadable.push((entry.line, entry.word.to_string(), symbol));
                continue;
            }
        };
        let (converted, rules) = converter.convert(&pron);
        for rule in rules.iter().filter(|r| !r.kind.is_exact()) {
            let mark = rule.level.and_then(|l| from.mark_for(l)).unwrap_or("");
            let from_text = rule.from.iter().map(|&id| format!("{}{mark}", from.phone(id).symbol)).collect::<Vec<_>>().join(" ");
            let to_text = rule.to.iter().map(|&id| to.phone(id).symbol.as_str()).collect::<Vec<_>>().join(" ");
            let row = rows.entry((from_text.clone(), to_text.clone())).or_insert_with(|| ReportRow {
                from: from_text,
                to: to_text,
                kind: rule.kind,
                count: 0,
                examples: Vec::new(),
            });
            row.count += 1;
            if row.examples.len() < EXAMPLES && !row.examples.iter().any(|w| *w == entry.word) {
                row.examples.push(entry.word.to_string());
            }
        }
        let mut out = entry.clone();
        out.pronunciation = converted.render(to).into();
        done.entries.push(out);
    }
    done.report = rows.into_values().collect();
    done.report.sort_by(|a, b| b.count.cmp(&a.count).then_with(|| a.from.cmp(&b.from)));
    done
}
