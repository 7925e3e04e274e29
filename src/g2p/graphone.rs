//! Graphones: the joint letter/phone units of Bisani & Ney, "Joint-sequence models for
//! grapheme-to-phoneme conversion", Speech Communication 50(5), 2008. This module owns how a
//! spelling is cut into letters, how phone symbols are normalised (stress kept or stripped),
//! the symbol tables that intern letters and phones to integers, and the graphone inventory.
//! It must not know about probabilities or n-gram histories.

use std::collections::HashMap;

use serde::{Deserialize, Serialize};
use unicode_normalization::UnicodeNormalization;
use unicode_segmentation::UnicodeSegmentation;

use crate::support::hash::FastMap;

/// Largest number of letters (and, separately, of phones) one graphone may carry.
pub const MAX_UNIT: usize = 3;

/// Largest symbol id a [`SymbolTable`] hands out; ids are packed into 21-bit fields.
pub const MAX_SYMBOLS: usize = (1 << 21) - 2;

/// What counts as one letter of a spelling.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum LetterUnit {
    /// One Unicode code point of the NFC-normalised spelling (the default).
    CodePoint,
    /// One extended grapheme cluster (UAX #29) of the NFC-normalised spelling.
    GraphemeCluster,
}

/// How spellings and pronunciations are normalised before they reach the model.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct SymbolOptions {
    /// Letter unit (code point or grapheme cluster).
    pub letter_unit: LetterUnit,
    /// Lower-case the spelling (after NFC) before splitting it.
    pub lowercase: bool,
    /// Remove stress marks from phone symbols (see [`strip_stress`]).
    pub strip_stress: bool,
}

impl Default for SymbolOptions {
    fn default() -> Self {
        SymbolOptions { letter_unit: LetterUnit::CodePoint, lowercase: true, strip_stress: false }
    }
}

impl SymbolOptions {
    /// Splits a spelling into letters: NFC, optional lower-casing, then code points or
    /// grapheme clusters. White space is dropped.
    ///
    /// ```
    /// use orthoepy::g2p::{LetterUnit, SymbolOptions};
    /// let opts = SymbolOptions::default();
    /// assert_eq!(opts.letters("Cafe\u{301}"), vec!["c", "a", "f", "é"]);
    /// // "q" + U+0307 has no precomposed form, so NFC keeps two code points; UAX #29 makes
    /// // the combining mark part of the letter's grapheme cluster.
    /// assert_eq!(opts.letters("q\u{307}a").len(), 3);
    /// let clusters = SymbolOptions { letter_unit: LetterUnit::GraphemeCluster, ..opts };
    /// assert_eq!(clusters.letters("q\u{307}a"), vec!["q\u{307}", "a"]);
    /// ```
    pub fn letters(&self, word: &str) -> Vec<String> {
        let nfc: String = word.nfc().collect();
        let text = if self.lowercase { nfc.to_lowercase() } else { nfc };
        match self.letter_unit {
            LetterUnit::CodePoint => {
                text.chars().filter(|c| !c.is_whitespace()).map(String::from).collect()
            }
            LetterUnit::GraphemeCluster => text
                .graphemes(true)
                .filter(|g| !g.chars().all(char::is_whitespace))
                .map(String::from)
                .collect(),
        }
    }

    /// Normalises one phone symbol: unchanged, or with stress removed when `strip_stress`.
    pub fn phone(&self, symbol: &str) -> String {
        if self.strip_stress {
            strip_stress(symbol)
        } else {
            symbol.to_string()
        }
    }
}

/// Removes lexical stress from a phone symbol: trailing ARPAbet stress digits `0`–`2`
/// (CMUdict convention) and the IPA stress marks U+02C8 `ˈ` and U+02CC `ˌ` anywhere.
/// A symbol made only of a stress mark is returned unchanged.
///
/// ```
/// use orthoepy::g2p::strip_stress;
/// assert_eq!(strip_stress("AH0"), "AH");
/// assert_eq!(strip_stress("ˈa"), "a");
/// assert_eq!(strip_stress("K"), "K");
/// ```
pub fn strip_stress(symbol: &str) -> String {
    let without_marks: String = symbol.chars().filter(|c| *c != '\u{2c8}' && *c != '\u{2cc}').collect();
    let trimmed = without_marks.trim_end_matches(['0', '1', '2']);
    if trimmed.is_empty() {
        symbol.to_string()
    } else {
        trimmed.to_string()
    }
}

/// Interns strings (letters or phones) to dense `u32` ids.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SymbolTable {
    names: Vec<String>,
    index: HashMap<String, u32>,
}

impl SymbolTable {
    /// Builds a table from names in id order; `None` if a name repeats or there are too many.
    pub fn from_names(names: Vec<String>) -> Option<SymbolTable> {
        if names.len() > MAX_SYMBOLS {
            return None;
        }
        let mut index = HashMap::with_capacity(names.len());
        for (id, name) in names.iter().enumerate() {
            if index.insert(name.clone(), id as u32).is_some() {
                return None;
            }
        }
        Some(SymbolTable { names, index })
    }

    /// Returns the id of `name`, adding it if new; `None` once the table is full.
    pub fn intern(&mut self, name: &str) -> Option<u32> {
        if let Some(&id) = self.index.get(name) {
            return Some(id);
        }
        if self.names.len() >= MAX_SYMBOLS {
            return None;
        }
        let id = self.names.len() as u32;
        self.names.push(name.to_string());
        self.index.insert(name.to_string(), id);
        Some(id)
    }

    /// The id of `name`, if known.
    pub fn get(&self, name: &str) -> Option<u32> {
        self.index.get(name).copied()
    }

    /// The name of `id` (empty string for an unknown id).
    pub fn name(&self, id: u32) -> &str {
        self.names.get(id as usize).map_or("", String::as_str)
    }

    /// All names in id order.
    pub fn names(&self) -> &[String] {
        &self.names
    }

    /// Number of symbols.
    pub fn len(&self) -> usize {
        self.names.len()
    }
}

/// One graphone: 0..=L letters joined with 0..=L phones, never both empty.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Graphone {
    /// Letter ids (into the letter [`SymbolTable`]).
    pub letters: Vec<u32>,
    /// Phone ids (into the phone [`SymbolTable`]).
    pub phones: Vec<u32>,
}

/// Packs a letter and a phone id sequence (each at most [`MAX_UNIT`] long) into one key.
fn pack(letters: &[u32], phones: &[u32]) -> u128 {
    let mut key = 0u128;
    for slot in 0..MAX_UNIT {
        let l = letters.get(slot).map_or(0, |&x| u128::from(x) + 1);
        let p = phones.get(slot).map_or(0, |&x| u128::from(x) + 1);
        key |= l << (21 * slot);
        key |= p << (21 * (slot + MAX_UNIT));
    }
    key
}

/// The set of graphones a model knows, with dense ids.
#[derive(Clone, Debug, Default)]
pub struct Inventory {
    graphones: Vec<Graphone>,
    index: FastMap<u128, u32>,
    by_letters: FastMap<u128, Vec<u32>>,
}

impl Inventory {
    /// Builds an inventory from graphones in id order. `None` if one is empty/empty, too long,
    /// or repeated.
    pub fn from_graphones(graphones: Vec<Graphone>) -> Option<Inventory> {
        let mut inv = Inventory::default();
        for g in graphones {
            let bad = (g.letters.is_empty() && g.phones.is_empty())
                || g.letters.len() > MAX_UNIT
                || g.phones.len() > MAX_UNIT
                || g.letters.iter().chain(&g.phones).any(|&s| s as usize >= MAX_SYMBOLS);
            if bad || inv.insert(g).is_none() {
                return None;
            }
        }
        Some(inv)
    }

    /// Adds a graphone if new (returns its id either way); `None` if it already existed.
    fn insert(&mut self, g: Graphone) -> Option<u32> {
        let key = pack(&g.letters, &g.phones);
        if self.index.contains_key(&key) {
            return None;
        }
        let id = self.graphones.len() as u32;
        self.index.insert(key, id);
        self.by_letters.entry(pack(&g.letters, &[])).or_default().push(id);
        self.graphones.push(g);
        Some(id)
    }

    /// Adds a graphone, returning its id (new or existing).
    pub fn intern(&mut self, letters: &[u32], phones: &[u32]) -> u32 {
        match self.lookup(letters, phones) {
            Some(id) => id,
            None => self
                .insert(Graphone { letters: letters.to_vec(), phones: phones.to_vec() })
                .unwrap_or(0),
        }
    }

    /// The id of the graphone `letters`:`phones`, if present.
    #[inline]
    pub fn lookup(&self, letters: &[u32], phones: &[u32]) -> Option<u32> {
        if letters.len() > MAX_UNIT || phones.len() > MAX_UNIT {
            return None;
        }
        self.index.get(&pack(letters, phones)).copied()
    }

    /// All graphones whose letter part is exactly `letters` (empty slice: phone insertions).
    pub fn with_letters(&self, letters: &[u32]) -> &[u32] {
        if letters.len() > MAX_UNIT {
            return &[];
        }
        self.by_letters.get(&pack(letters, &[])).map_or(&[], Vec::as_slice)
    }

    /// Orders every same-letters candidate list by descending `score` (used by the decoder
    /// to stop early once candidates cannot survive the beam).
    pub fn sort_candidates(&mut self, score: &[f32]) {
        let at = |g: &u32| score.get(*g as usize).copied().unwrap_or(f32::NEG_INFINITY);
        for list in self.by_letters.values_mut() {
            list.sort_by(|a, b| at(b).total_cmp(&at(a)).then(a.cmp(b)));
        }
    }

    /// The graphone with id `id`.
    pub fn get(&self, id: u32) -> Option<&Graphone> {
        self.graphones.get(id as usize)
    }

    /// All graphones in id order.
    pub fn graphones(&self) -> &[Graphone] {
        &self.graphones
    }

    /// Number of graphones.
    pub fn len(&self) -> usize {
        self.graphones.len()
    }

    /// Longest letter part of any graphone.
    pub fn max_letters(&self) -> usize {
        self.graphones.iter().map(|g| g.letters.len()).max().unwrap_or(0)
    }

    /// Longest phone part of any graphone.
    pub fn max_phones(&self) -> usize {
        self.graphones.iter().map(|g| g.phones.len()).max().unwrap_or(0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nfc_joins_combining_accent() {
        // Unicode Standard Annex #15: "e" + U+0301 composes to U+00E9 under NFC.
        let opts = SymbolOptions::default();
        assert_eq!(opts.letters("e\u{301}"), vec!["\u{e9}"]);
    }

    #[test]
    fn inventory_rejects_empty_and_duplicates() {
        let empty = Graphone { letters: vec![], phones: vec![] };
        assert!(Inventory::from_graphones(vec![empty]).is_none());
        let g = Graphone { letters: vec![1], phones: vec![2] };
        assert!(Inventory::from_graphones(vec![g.clone(), g]).is_none());
    }

    #[test]
    fn lookup_distinguishes_letter_and_phone_sides() {
        let mut inv = Inventory::default();
        let a = inv.intern(&[1], &[]);
        let b = inv.intern(&[], &[1]);
        assert_ne!(a, b);
        assert_eq!(inv.lookup(&[1], &[]), Some(a));
        assert_eq!(inv.with_letters(&[]), &[b]);
    }
}
