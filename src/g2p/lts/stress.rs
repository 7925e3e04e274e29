//! Lexical stress for the output of letter-to-sound rules, and the syllabifier it needs.
//!
//! Two methods are available to rule files:
//! - `english`: a simple heuristic. Rules may emit explicit stress digits (e.g. `AH0` for a
//!   reducing prefix) and the anchor `^`, which puts primary stress on the last nucleus before
//!   it (stress-attracting suffixes such as *-ic*, *-ity*, *-tion*: the syllable before them is
//!   stressed — common practice in English phonology, cf. Chomsky & Halle, *The Sound Pattern of
//!   English*, 1968). Without an anchor the first nucleus not marked unstressed takes primary
//!   stress; every other unmarked nucleus is unstressed.
//! - `written-accent`: Spanish orthographic stress (Real Academia Española, *Ortografía de la
//!   lengua española*, 2010): a vowel with an acute accent carries the stress; otherwise a word
//!   ending in a vowel, *n* or *s* stresses the penultimate syllable, any other word the last.
//!   Syllables come from [`syllabify`] (maximal onsets over the phone string).
//!
//! This module only marks stress; it never changes phones.

use std::ops::Range;

use crate::phoneset::{PhoneId, Phoneset, StressLevel};

/// How a rule set assigns stress (declared in the `[stress]` table of the rule file).
#[derive(Debug, Clone)]
pub(crate) enum StressMethod {
    /// No stress marks at all.
    None,
    /// The English heuristic described in the module docs; vowels it leaves unstressed are
    /// replaced by their reduced counterpart (`reduce` pairs), e.g. AE → AH.
    English { reduce: Vec<(PhoneId, PhoneId)> },
    /// Spanish written-accent rules.
    WrittenAccent {
        /// Letters that carry an acute accent (stress is on the nucleus they produce).
        accented: Vec<char>,
        /// Final letters that make a word without accent stress its penultimate syllable.
        penultimate_after: Vec<char>,
        /// Legal syllable onsets (phone sequences), for the syllabifier.
        onsets: Vec<Vec<PhoneId>>,
    },
}

/// A phone produced by a rule, remembering which letters produced it.
#[derive(Debug, Clone)]
pub(crate) struct Emitted {
    pub(crate) phone: PhoneId,
    pub(crate) stress: Option<StressLevel>,
    pub(crate) letters: Range<usize>,
    /// Set when a stress anchor `^` was emitted just before this phone.
    pub(crate) anchor_before: bool,
}

impl StressMethod {
    /// Builds a method from the `[stress]` table; the error text says what to change.
    pub(crate) fn from_parts(
        method: &str,
        accented: &str,
        penultimate_after: &str,
        onsets: &[String],
        reduce: &[(String, String)],
        phoneset: &Phoneset,
    ) -> Result<StressMethod, String> {
        let phone = |symbol: &str, what: &str| {
            phoneset.lookup(symbol).ok_or_else(|| format!("{what}: phone `{symbol}` is not in phoneset {}", phoneset.id()))
        };
        match method {
            "none" => Ok(StressMethod::None),
            "english" => {
                let mut pairs = Vec::with_capacity(reduce.len());
                for (full, reduced) in reduce {
                    pairs.push((phone(full, "reduce")?, phone(reduced, "reduce")?));
                }
                Ok(StressMethod::English { reduce: pairs })
            }
            "written-accent" => {
                let mut parsed = Vec::with_capacity(onsets.len());
                for onset in onsets {
                    let mut phones = Vec::new();
                    for symbol in onset.split_whitespace() {
                        phones.push(phone(symbol, &format!("onset `{onset}`"))?);
                    }
                    parsed.push(phones);
                }
                Ok(StressMethod::WrittenAccent {
                    accented: accented.chars().filter(|c| !c.is_whitespace()).collect(),
                    penultimate_after: penultimate_after.chars().filter(|c| !c.is_whitespace()).collect(),
                    onsets: parsed,
                })
            }
            other => Err(format!("stress method `{other}` is unknown; use `english`, `written-accent` or `none`")),
        }
    }

    /// Marks stress on `phones` (the rule output for `letters`).
    pub(crate) fn apply(&self, letters: &[char], phones: &mut [Emitted], phoneset: &Phoneset) {
        let nuclei: Vec<usize> =
            (0..phones.len()).filter(|&i| phoneset.phone(phones[i].phone).is_nucleus()).collect();
        match self {
            StressMethod::None => {}
            StressMethod::English { reduce } => english(phones, &nuclei, reduce),
            StressMethod::WrittenAccent { accented, penultimate_after, onsets } => {
                let syllables = syllabify(phones.iter().map(|p| p.phone), phoneset, onsets);
                let accent = syllables.iter().position(|s| {
                    s.nucleus.is_some_and(|n| phones[n].letters.clone().any(|i| letters.get(i).is_some_and(|c| accented.contains(c))))
                });
                let count = syllables.len();
                let chosen = accent.or_else(|| match letters.last() {
                    Some(last) if penultimate_after.contains(last) && count >= 2 => Some(count - 2),
                    _ => count.checked_sub(1),
                });
                if let Some(nucleus) = chosen.and_then(|s| syllables.get(s)).and_then(|s| s.nucleus) {
                    phones[nucleus].stress = Some(StressLevel::Primary);
                }
                if phoneset.mark_for(StressLevel::Unstressed).is_some() {
                    for &n in &nuclei {
                        phones[n].stress.get_or_insert(StressLevel::Unstressed);
                    }
                }
            }
        }
    }
}

fn english(phones: &mut [Emitted], nuclei: &[usize], reduce: &[(PhoneId, PhoneId)]) {
    let has_primary = nuclei.iter().any(|&n| phones[n].stress == Some(StressLevel::Primary));
    if !has_primary {
        let last_anchor = phones.iter().rposition(|p| p.anchor_before);
        let anchored = last_anchor.and_then(|a| nuclei.iter().rev().find(|&&n| n < a && phones[n].stress.is_none()));
        let first_free = || nuclei.iter().find(|&&n| phones[n].stress.is_none());
        if let Some(&n) = anchored.or_else(first_free) {
            phones[n].stress = Some(StressLevel::Primary);
        }
    }
    for &n in nuclei {
        if phones[n].stress.is_none() {
            phones[n].stress = Some(StressLevel::Unstressed);
            if let Some(&(_, reduced)) = reduce.iter().find(|(full, _)| *full == phones[n].phone) {
                phones[n].phone = reduced;
            }
        }
    }
}

/// One syllable: the phone range it spans and the index of its nucleus, if any.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Syllable {
    /// Phone positions covered by the syllable.
    pub phones: Range<usize>,
    /// Position of the nucleus (a phone whose [`crate::phoneset::Phone::is_nucleus`] holds).
    pub nucleus: Option<usize>,
}

/// Splits a phone string into syllables by the maximal-onset principle: between two nuclei, the
/// longest tail of the consonant cluster that is a legal onset starts the next syllable (the rest
/// closes the previous one). A word without nuclei is one syllable without a nucleus.
///
/// ```
/// use orthoepy::g2p::lts::syllabify;
/// use orthoepy::phoneset::Phoneset;
/// let es = Phoneset::shipped("es-ipa").unwrap();
/// let ids = |s: &str| s.split(' ').map(|p| es.lookup(p).unwrap()).collect::<Vec<_>>();
/// let onsets = vec![ids("p ɾ")];
/// // "compra" -> com.pra: "m p ɾ" splits after m because "p ɾ" is a legal onset.
/// let syllables = syllabify(ids("k o m p ɾ a"), &es, &onsets);
/// assert_eq!(syllables.len(), 2);
/// assert_eq!(syllables[1].phones, 3..6);
/// ```
pub fn syllabify(phones: impl IntoIterator<Item = PhoneId>, phoneset: &Phoneset, onsets: &[Vec<PhoneId>]) -> Vec<Syllable> {
    let phones: Vec<PhoneId> = phones.into_iter().collect();
    let nuclei: Vec<usize> = (0..phones.len()).filter(|&i| phoneset.phone(phones[i]).is_nucleus()).collect();
    if nuclei.is_empty() {
        return vec![Syllable { phones: 0..phones.len(), nucleus: None }];
    }
    let mut starts = vec![0usize];
    for pair in nuclei.windows(2) {
        let (a, b) = (pair[0], pair[1]);
        let cluster = &phones[a + 1..b];
        // Longest legal onset that is a suffix of the cluster; single consonants always qualify.
        let onset_len = (0..=cluster.len())
            .rev()
            .find(|&k| k <= 1 || onsets.iter().any(|o| o.as_slice() == &cluster[cluster.len() - k..]))
            .unwrap_or(0);
        starts.push(b - onset_len);
    }
    let ends = starts.iter().skip(1).copied().chain(std::iter::once(phones.len()));
    starts
        .iter()
        .zip(ends)
        .zip(nuclei)
        .map(|((&start, end), nucleus)| Syllable { phones: start..end, nucleus: Some(nucleus) })
        .collect()
}
