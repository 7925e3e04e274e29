//! Mapping pronunciations between phonesets through their IPA: each phone's `ipa` is the pivot.
//! The IPA of the source phones is re-read, longest match first, as IPA of target phones; a
//! target phone may cover part of one source phone (a diphthong split into two vowels) or
//! several whole source phones (two vowels read as one diphthong), never pieces of two.
//! Stress moves to the first nucleus produced from a stressed phone. This file maps; it does
//! not judge whether the result is a good pronunciation.

use thiserror::Error;

use super::pronunciation::{PhoneToken, Pronunciation};
use super::convert::target_level;
use super::{PhoneId, Phoneset};

/// Why a pronunciation could not be mapped.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
pub enum MappingError {
    /// Some IPA of a source phone is not the IPA of any target phone.
    #[error("phone {} `{symbol}` (IPA {ipa}) has no counterpart in {to}{}", index + 1, nearest_hint(nearest))]
    Unmappable {
        /// Target phoneset id.
        to: String,
        /// 0-based index of the source phone.
        index: usize,
        /// Its symbol.
        symbol: String,
        /// Its IPA.
        ipa: String,
        /// Nearest target symbols by features (empty when the schemas differ).
        nearest: Vec<String>,
    },
    /// The pronunciation holds an id that is not a phone of the source set.
    #[error("phone {} has id {id}, which is not a phone of {from}", index + 1)]
    BadId {
        /// Source phoneset id.
        from: String,
        /// 0-based index.
        index: usize,
        /// The id.
        id: PhoneId,
    },
}

fn nearest_hint(nearest: &[String]) -> String {
    if nearest.is_empty() {
        String::new()
    } else {
        format!("; nearest by features: {}", nearest.join(", "))
    }
}

/// One character of the concatenated source IPA, with the source phone it came from.
struct Pivot {
    ch: char,
    source: usize,
}

/// Maps `pron` (of `from`) to `to` through IPA. Stress levels `to` declares no mark for are
/// moved to the nearest declared level (secondary → unstressed) or dropped; stress is never
/// invented where the source had none.
///
/// ```
/// use orthoepy::phoneset::{map_pronunciation, Phoneset};
/// let arpa = Phoneset::shipped("en-arpa").unwrap();
/// let ipa = Phoneset::shipped("ipa-broad").unwrap();
/// let hello = arpa.parse("HH AH0 L OW1").unwrap();
/// let mapped = map_pronunciation(&arpa, &ipa, &hello).unwrap();
/// assert_eq!(mapped.render(&ipa), "h ʌ l oˈ ʊ");
/// let back = map_pronunciation(&ipa, &arpa, &mapped).unwrap();
/// assert_eq!(back.render(&arpa), "HH AH L OW1"); // unstressed has no IPA mark
/// ```
pub fn map_pronunciation(
    from: &Phoneset,
    to: &Phoneset,
    pron: &Pronunciation,
) -> Result<Pronunciation, MappingError> {
    let mut pivot = Vec::new();
    for (index, token) in pron.phones.iter().enumerate() {
        let phone = from.get(token.phone).ok_or_else(|| MappingError::BadId {
            from: from.id.clone(),
            index,
            id: token.phone,
        })?;
        pivot.extend(phone.ipa.chars().map(|ch| Pivot { ch, source: index }));
    }
    let mut out: Vec<(PhoneToken, usize)> = Vec::new(); // produced token, first source index
    let mut at = 0;
    while at < pivot.len() {
        let (id, len) = longest_match(to, &pivot, at)
            .ok_or_else(|| unmappable(from, to, pron, pivot.get(at).map_or(0, |p| p.source)))?;
        out.push((
            PhoneToken {
                phone: id,
                stress: None,
            },
            pivot.get(at).map_or(0, |p| p.source),
        ));
        at += len;
    }
    for (index, token) in pron.phones.iter().enumerate() {
        let Some(level) = token.stress.and_then(|l| target_level(to, l)) else {
            continue;
        };
        let first_nucleus = out
            .iter_mut()
            .filter(|(_, src)| *src == index)
            .find(|(t, _)| to.get(t.phone).is_some_and(|p| p.is_nucleus()));
        if let Some((t, _)) = first_nucleus {
            t.stress = Some(level);
        }
    }
    Ok(Pronunciation {
        phones: out.into_iter().map(|(t, _)| t).collect(),
    })
}

/// The longest target phone whose IPA spells `pivot[at..]`'s prefix without ending inside a
/// source phone it did not start in.
fn longest_match(to: &Phoneset, pivot: &[Pivot], at: usize) -> Option<(PhoneId, usize)> {
    let start_source = pivot.get(at)?.source;
    let starts_phone = at == 0 || pivot.get(at - 1).is_some_and(|p| p.source != start_source);
    let max = to.max_ipa_chars.min(pivot.len() - at);
    (1..=max).rev().find_map(|len| {
        let end = at + len;
        let last_source = pivot.get(end - 1)?.source;
        let ends_phone = pivot.get(end).map_or(true, |p| p.source != last_source);
        let allowed = last_source == start_source || (starts_phone && ends_phone);
        if !allowed {
            return None;
        }
        let ipa: String = pivot.get(at..end)?.iter().map(|p| p.ch).collect();
        to.by_ipa.get(&ipa).map(|&id| (id, len))
    })
}

fn unmappable(from: &Phoneset, to: &Phoneset, pron: &Pronunciation, index: usize) -> MappingError {
    let phone = pron.phones.get(index).and_then(|t| from.get(t.phone));
    let nearest = phone
        .map(|p| super::distance::nearest_across(&from.schema, p, to, 3))
        .unwrap_or_default()
        .into_iter()
        .filter_map(|(id, _)| to.get(id).map(|q| q.symbol.clone()))
        .collect();
    MappingError::Unmappable {
        to: to.id.clone(),
        index,
        symbol: phone.map(|p| p.symbol.clone()).unwrap_or_default(),
        ipa: phone.map(|p| p.ipa.clone()).unwrap_or_default(),
        nearest,
    }
}
