//! The crate's non-cryptographic hashes, written once: FNV-1a 64 for bytes and strings whose hash
//! must stay the same from build to build (the held-out split of words, the sounds-like index,
//! the audit's token table), and the "Fx" mixing hasher for the integer keys of the G2P model
//! (graphone ids, n-gram histories), where only speed matters.
//!
//! FNV-1a is G. Fowler, L. C. Noll and K.-P. Vo's hash (1991), with the 64-bit offset basis and
//! prime of the IETF draft "The FNV Non-Cryptographic Hash Algorithm" (draft-eastlake-fnv).
//! Neither hash resists chosen collisions: never key a table by untrusted text where an
//! attacker could make every key collide. This module owns the arithmetic only; it must not
//! know what is hashed.

use std::collections::HashMap;
use std::hash::{BuildHasherDefault, Hasher};

/// The 64-bit FNV offset basis (the hash of no bytes).
pub const FNV64_OFFSET_BASIS: u64 = 0xcbf2_9ce4_8422_2325;
/// The 64-bit FNV prime.
pub const FNV64_PRIME: u64 = 0x0000_0100_0000_01b3;

/// FNV-1a 64 of `bytes`: for each byte, xor it in, then multiply by the FNV prime.
///
/// ```
/// use orthoepy::support::hash::fnv1a_64;
/// // Test vectors of the FNV reference code (Fowler/Noll/Vo) and draft-eastlake-fnv.
/// assert_eq!(fnv1a_64(b""), 0xcbf29ce484222325);
/// assert_eq!(fnv1a_64(b"a"), 0xaf63dc4c8601ec8c);
/// assert_eq!(fnv1a_64(b"foobar"), 0x85944171f73967e8);
/// ```
#[inline]
pub fn fnv1a_64(bytes: &[u8]) -> u64 {
    fnv1a_64_continue(FNV64_OFFSET_BASIS, bytes)
}

/// Continues an FNV-1a 64 hash `state` over more bytes, so a hash can be taken in pieces:
/// `fnv1a_64_continue(fnv1a_64(a), b) == fnv1a_64(a ++ b)`.
///
/// ```
/// use orthoepy::support::hash::{fnv1a_64, fnv1a_64_continue};
/// assert_eq!(fnv1a_64_continue(fnv1a_64(b"foo"), b"bar"), fnv1a_64(b"foobar"));
/// ```
#[inline]
pub fn fnv1a_64_continue(state: u64, bytes: &[u8]) -> u64 {
    bytes.iter().fold(state, |hash, &b| (hash ^ u64::from(b)).wrapping_mul(FNV64_PRIME))
}

/// FNV-1a 64 as a [`Hasher`], for hash maps keyed by short strings (phone tokens) that need no
/// protection against chosen collisions. Starts at the offset basis.
///
/// ```
/// use std::hash::Hasher;
/// use orthoepy::support::hash::{fnv1a_64, Fnv1aHasher};
/// let mut h = Fnv1aHasher::default();
/// h.write(b"AA1");
/// assert_eq!(h.finish(), fnv1a_64(b"AA1"));
/// ```
#[derive(Debug, Clone, Copy)]
pub struct Fnv1aHasher(u64);

impl Default for Fnv1aHasher {
    fn default() -> Self {
        Fnv1aHasher(FNV64_OFFSET_BASIS)
    }
}

impl Hasher for Fnv1aHasher {
    #[inline]
    fn finish(&self) -> u64 {
        self.0
    }
    #[inline]
    fn write(&mut self, bytes: &[u8]) {
        self.0 = fnv1a_64_continue(self.0, bytes);
    }
}

/// A `HashMap` hashed by [`Fnv1aHasher`].
///
/// ```
/// use orthoepy::support::hash::FnvMap;
/// let mut tokens: FnvMap<String, u16> = FnvMap::default();
/// tokens.insert("AA1".into(), 3);
/// assert_eq!(tokens.get("AA1"), Some(&3));
/// ```
pub type FnvMap<K, V> = HashMap<K, V, BuildHasherDefault<Fnv1aHasher>>;

/// Multiplicative constant of the Fx hash (common practice: the Firefox and rustc code bases).
const FX_SEED: u64 = 0x51_7c_c1_b7_27_22_0a_95;

/// The "Fx" hasher (rotate, xor, multiply by an odd constant; common practice, from the
/// Firefox and rustc code bases): very fast for integer keys chosen by the program itself, such
/// as the interned ids of the G2P model. Bytes are taken in little-endian 8-byte words.
///
/// ```
/// use std::hash::Hasher;
/// use orthoepy::support::hash::FastHasher;
/// let (mut a, mut b) = (FastHasher::default(), FastHasher::default());
/// a.write_u32(7);
/// b.write_u32(8);
/// assert_ne!(a.finish(), b.finish());
/// ```
#[derive(Debug, Default, Clone, Copy)]
pub struct FastHasher {
    hash: u64,
}

impl FastHasher {
    #[inline]
    fn add(&mut self, word: u64) {
        self.hash = (self.hash.rotate_left(5) ^ word).wrapping_mul(FX_SEED);
    }
}

impl Hasher for FastHasher {
    #[inline]
    fn write(&mut self, bytes: &[u8]) {
        for chunk in bytes.chunks(8) {
            let mut word = [0u8; 8];
            word[..chunk.len()].copy_from_slice(chunk);
            self.add(u64::from_le_bytes(word));
        }
    }
    #[inline]
    fn write_u32(&mut self, value: u32) {
        self.add(u64::from(value));
    }
    #[inline]
    fn write_u64(&mut self, value: u64) {
        self.add(value);
    }
    #[inline]
    fn write_u128(&mut self, value: u128) {
        self.add(value as u64);
        self.add((value >> 64) as u64);
    }
    #[inline]
    fn write_usize(&mut self, value: usize) {
        self.add(value as u64);
    }
    #[inline]
    fn finish(&self) -> u64 {
        self.hash
    }
}

/// A `HashMap` hashed by [`FastHasher`], for program-chosen integer keys.
///
/// ```
/// use orthoepy::support::hash::FastMap;
/// let mut counts: FastMap<[u32; 2], f64> = FastMap::default();
/// *counts.entry([1, 2]).or_default() += 0.5;
/// assert_eq!(counts[&[1, 2]], 0.5);
/// ```
pub type FastMap<K, V> = HashMap<K, V, BuildHasherDefault<FastHasher>>;

#[cfg(test)]
mod tests {
    use super::*;

    /// FNV-1a 64 test vectors from the test suite of the FNV reference code by Fowler, Noll and
    /// Vo (`test_fnv.c`, also listed in draft-eastlake-fnv). Written down from memory, then each
    /// confirmed by an independent computation of the published algorithm (xor, then multiply
    /// by 0x100000001b3 modulo 2^64) in a Python one-liner.
    #[test]
    fn fnv1a_64_matches_published_test_vectors() {
        let vectors: [(&[u8], u64); 6] = [
            (b"", 0xcbf2_9ce4_8422_2325),
            (b"a", 0xaf63_dc4c_8601_ec8c),
            (b"b", 0xaf63_df4c_8601_f1a5),
            (b"c", 0xaf63_de4c_8601_eff2),
            (b"foo", 0xdcb2_7518_fed9_d577),
            (b"foobar", 0x8594_4171_f739_67e8),
        ];
        for (input, expected) in vectors {
            assert_eq!(fnv1a_64(input), expected, "FNV-1a 64 of {:?}", String::from_utf8_lossy(input));
        }
    }

    #[test]
    fn hasher_and_function_agree_across_pieces() {
        let mut h = Fnv1aHasher::default();
        h.write(b"foo");
        h.write(b"bar");
        assert_eq!(h.finish(), fnv1a_64(b"foobar"));
    }
}
