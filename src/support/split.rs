//! The held-out split of words: which side of a train/test split a word falls on, decided by a
//! stable hash of the word alone, so that every pronunciation variant of a word lands on the
//! same side and the split is the same on every machine and in every build.
//!
//! A word's hash is `FNV-1a-64(NFC(lowercase(word)))` over the UTF-8 bytes (see
//! [`super::hash`]); the evaluation split takes its lower digits (`hash mod 100`), the trainer's
//! own held-out part takes the upper half (`(hash >> 32) mod 100`), so the two are independent.
//! Changing anything here moves words between the sides and invalidates every published figure:
//! this module must not change its arithmetic. It must not know about models or scoring.

use unicode_normalization::UnicodeNormalization;

use super::hash::fnv1a_64;

/// The split hash of a word: FNV-1a 64 of its NFC, lower-cased UTF-8 bytes.
///
/// ```
/// use orthoepy::support::split::word_hash;
/// // FNV-1a 64 of the empty string is the offset basis (Fowler, Noll, Vo; draft-eastlake-fnv).
/// assert_eq!(word_hash(""), 0xcbf29ce484222325);
/// assert_eq!(word_hash("A"), 0xaf63dc4c8601ec8c); // lower-cased first: FNV-1a 64 of "a"
/// assert_eq!(word_hash("Cafe\u{301}"), word_hash("café")); // NFC first
/// ```
pub fn word_hash(word: &str) -> u64 {
    let normal: String = word.nfc().collect::<String>().to_lowercase();
    fnv1a_64(normal.as_bytes())
}

/// True if `word` belongs to the test side of a split with `test_percent` percent test words
/// (bucket `word_hash(word) mod 100` below `test_percent`).
///
/// ```
/// use orthoepy::support::split::is_test_word;
/// assert!(!is_test_word("harbour", 0));
/// assert!(is_test_word("harbour", 100));
/// assert_eq!(is_test_word("Harbour", 10), is_test_word("harbour", 10));
/// ```
pub fn is_test_word(word: &str, test_percent: u32) -> bool {
    word_hash(word) % 100 < u64::from(test_percent)
}

/// The trainer's held-out bucket (0..100) of a word: the upper half of [`word_hash`], so the
/// words the trainer holds out for tuning are independent of the evaluation split.
///
/// ```
/// use orthoepy::support::split::{heldout_bucket, word_hash};
/// assert_eq!(u64::from(heldout_bucket("quay")), (word_hash("quay") >> 32) % 100);
/// ```
pub fn heldout_bucket(word: &str) -> u32 {
    ((word_hash(word) >> 32) % 100) as u32
}

/// Splits items into (train, test) by the word each belongs to.
///
/// ```
/// use orthoepy::support::split::split_by_word;
/// let items = vec![("read", 1), ("read", 2), ("write", 3)];
/// let (train, test) = split_by_word(items, |i| i.0, 50);
/// assert_eq!(train.len() + test.len(), 3);
/// assert!(train.iter().filter(|i| i.0 == "read").count() % 2 == 0); // variants stay together
/// ```
pub fn split_by_word<T, F: Fn(&T) -> &str>(items: Vec<T>, word_of: F, test_percent: u32) -> (Vec<T>, Vec<T>) {
    items.into_iter().partition(|item| !is_test_word(word_of(item), test_percent))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pins the split so that no refactoring moves a word between the sides. Expected values
    /// computed independently in Python (`unicodedata.normalize("NFC", w).lower()`, then the
    /// FNV-1a 64 arithmetic of draft-eastlake-fnv over the UTF-8 bytes).
    #[test]
    fn split_hashes_and_buckets_are_pinned() {
        for (word, hash, bucket, heldout) in [
            ("harbour", 0x6622_3055_b061_ec68u64, 12u64, 29u32),
            ("Quay", 0x1e09_6e07_b286_6985, 1, 71),
            ("Cafe\u{301}", 0x48e8_823a_cfa4_0d89, 13, 42),
        ] {
            assert_eq!(word_hash(word), hash, "{word}");
            assert_eq!(word_hash(word) % 100, bucket, "{word}");
            assert_eq!(heldout_bucket(word), heldout, "{word}");
            assert!(is_test_word(word, bucket as u32 + 1) && !is_test_word(word, bucket as u32), "{word}");
        }
    }

    #[test]
    fn split_is_deterministic_and_roughly_proportional() {
        let words: Vec<String> = (0..2000).map(|i| format!("w{i}")).collect();
        let test = words.iter().filter(|w| is_test_word(w, 10)).count();
        assert!((100..300).contains(&test), "{test}");
        assert!(words.iter().all(|w| is_test_word(w, 10) == is_test_word(&w.to_uppercase(), 10)));
    }
}
