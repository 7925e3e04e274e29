//! Compound splitting: a word that is two or more lexicon words written together.
//!
//! Dynamic programming over the lexicon's FST index finds, for every position, the fewest
//! known words that spell the rest of the word (prefix queries prune spans no headword starts
//! with); splits with that fewest number of parts are ranked most balanced first. The
//! pronunciation joins each part's first pronunciation, with primary stress on the first part
//! and secondary on later parts — the compound stress rule of English (Chomsky & Halle,
//! *The Sound Pattern of English*, 1968; common practice in CMUdict, e.g. "airport"
//! EH1 R P AO2 R T). Must not guess parts that are not in the lexicon.

use super::{demote_primary, LanguageConfig, Lookup, Raw, Source, COMPOUND};
use crate::phoneset::Pronunciation;

/// Candidates from the fewest-parts splits of `word` (lower-cased), with the configured score
/// (`scores.compound`, times `scores.alternative` for each further split) and the feature the
/// fitted calibration reads: `1 − 1/(letters of the shortest part)`, since a split into long
/// words is more often a real compound than one with a three-letter part ("car+pet").
pub(super) fn candidates(word: &str, lookup: &Lookup<'_>, config: &LanguageConfig) -> Vec<Raw> {
    let limits = &config.compound;
    let mut out = Vec::new();
    let mut score = config.scores.compound;
    for parts in splits(word, lookup, limits.min_part_letters, limits.max_parts, limits.max_splits) {
        let mut joined = Pronunciation { phones: Vec::new() };
        let mut complete = true;
        for (i, part) in parts.iter().enumerate() {
            let Some(mut p) = lookup.first(part) else {
                complete = false;
                break;
            };
            if i > 0 {
                demote_primary(&mut p, lookup.phoneset);
            }
            joined.phones.extend(p.phones);
        }
        if complete {
            let shortest = parts.iter().map(|p| p.chars().count()).min().unwrap_or(1).max(1);
            let feature = 1.0 - 1.0 / shortest as f64;
            out.push(Raw { pronunciation: joined, prior: score, feature, key: COMPOUND, source: Source::Compound { parts } });
            score *= config.scores.alternative;
        }
    }
    out
}

/// Splits of `word` into the fewest (≥ 2, ≤ `max_parts`) lexicon words of at least
/// `min_letters` letters, at most `max_splits` of them: the most balanced first (the split whose
/// shortest part is longest), ties to the shorter first part.
fn splits(word: &str, lookup: &Lookup<'_>, min_letters: usize, max_parts: usize, max_splits: usize) -> Vec<Vec<String>> {
    let bounds: Vec<usize> = word.char_indices().map(|(i, _)| i).chain(std::iter::once(word.len())).collect();
    let n = bounds.len() - 1;
    // fewest[i]: fewest parts spelling letters i.. (None = impossible).
    let mut fewest: Vec<Option<usize>> = vec![None; n + 1];
    fewest[n] = Some(0);
    let mut edges: Vec<Vec<usize>> = vec![Vec::new(); n + 1];
    for i in (0..n).rev() {
        for j in i + 1..=n {
            let piece = &word[bounds[i]..bounds[j]];
            if !lookup.has_prefix(piece) {
                break;
            }
            if j - i >= min_letters && !(i == 0 && j == n) && lookup.contains(piece) {
                if let Some(rest) = fewest[j] {
                    edges[i].push(j);
                    fewest[i] = Some(fewest[i].map_or(rest + 1, |f: usize| f.min(rest + 1)));
                }
            }
        }
    }
    let mut found = Vec::new();
    if fewest[0].is_some_and(|f| f >= 2 && f <= max_parts) {
        let mut path = Vec::new();
        collect(0, &fewest, &edges, &bounds, word, &mut path, &mut found, max_splits * 4);
    }
    // Most balanced first: the split whose shortest part is longest.
    found.sort_by_key(|parts| std::cmp::Reverse(parts.iter().map(|p| p.chars().count()).min().unwrap_or(0)));
    found.truncate(max_splits);
    found
}

#[allow(clippy::too_many_arguments)]
fn collect(
    at: usize,
    fewest: &[Option<usize>],
    edges: &[Vec<usize>],
    bounds: &[usize],
    word: &str,
    path: &mut Vec<String>,
    found: &mut Vec<Vec<String>>,
    max_splits: usize,
) {
    if found.len() >= max_splits {
        return;
    }
    if at + 1 == bounds.len() {
        found.push(path.clone());
        return;
    }
    let Some(need) = fewest[at] else { return };
    for &next in edges[at].iter() {
        if fewest[next].map(|f| f + 1) == Some(need) {
            path.push(word[bounds[at]..bounds[next]].to_string());
            collect(next, fewest, edges, bounds, word, path, found, max_splits);
            path.pop();
        }
    }
}
