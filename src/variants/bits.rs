//! Fixed-size sets of phone ids, the compiled form of a feature bundle: matching a phone is one
//! bit test. Owns nothing else.

use crate::phoneset::PhoneId;

/// A set of phone ids of one phoneset.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PhoneBits {
    words: Box<[u64]>,
}

impl PhoneBits {
    /// The empty set for a phoneset of `len` phones.
    pub fn empty(len: usize) -> PhoneBits {
        PhoneBits { words: vec![0; len.div_ceil(64)].into_boxed_slice() }
    }

    /// Adds a phone.
    pub fn insert(&mut self, id: PhoneId) {
        if let Some(w) = self.words.get_mut(usize::from(id) / 64) {
            *w |= 1 << (id % 64);
        }
    }

    /// Whether the phone is in the set.
    #[inline]
    pub fn contains(&self, id: PhoneId) -> bool {
        self.words.get(usize::from(id) / 64).is_some_and(|w| w >> (id % 64) & 1 == 1)
    }

    /// Adds every phone of `other`.
    pub fn union_with(&mut self, other: &PhoneBits) {
        for (a, b) in self.words.iter_mut().zip(other.words.iter()) {
            *a |= b;
        }
    }

    /// Whether no phone is in the set.
    pub fn is_empty(&self) -> bool {
        self.words.iter().all(|w| *w == 0)
    }

    /// The members, in id order.
    pub fn iter(&self) -> impl Iterator<Item = PhoneId> + '_ {
        self.words.iter().enumerate().flat_map(|(i, w)| {
            (0..64u16).filter(move |b| w >> b & 1 == 1).map(move |b| (i as u16) * 64 + b)
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn insert_contains_iter() {
        let mut b = PhoneBits::empty(70);
        assert!(b.is_empty());
        b.insert(3);
        b.insert(65);
        assert!(b.contains(65) && b.contains(3) && !b.contains(4));
        assert!(!b.contains(500));
        assert_eq!(b.iter().collect::<Vec<_>>(), vec![3, 65]);
    }
}
