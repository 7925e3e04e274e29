//! Turning word lists and running text into queue items.
//!
//! A word list has one word per line; blank lines and lines starting with `#` are skipped, and
//! anything after the first tab or two spaces is taken as an example line for that word. Running
//! text is tokenised by [`TokenRule`] and counted (see [`count_unknown`]). Both keep only words
//! the caller says are missing from the lexicon.

use super::item::Item;
use super::tokenise::{count_unknown, TokenRule};
use crate::support::read::{Limit, MIB};

/// The largest word list or corpus file read for queue intake (a corpus of some tens of
/// millions of words).
pub const MAX_INTAKE_TEXT: Limit = Limit { bytes: 256 * MIB, what: "word list or corpus" };

/// Longest word accepted from a word list, in characters (longer lines are skipped as noise).
pub const MAX_WORD_CHARS: usize = 64;

/// Items for the words of a word list that `is_known` does not know, in file order; a word
/// listed twice counts twice.
///
/// ```
/// use orthoepy::queue::items_from_word_list;
/// let list = "# new stations\nKelport\tnext stop Kelport\nquay\nKelport\n";
/// let items = items_from_word_list(list, "words:list.txt", |w| w == "quay");
/// assert_eq!(items.len(), 1);
/// assert_eq!(items[0].count, 2);
/// assert_eq!(items[0].context, "next stop Kelport");
/// ```
pub fn items_from_word_list(text: &str, origin: &str, is_known: impl Fn(&str) -> bool) -> Vec<Item> {
    let mut out: Vec<Item> = Vec::new();
    let mut position: std::collections::HashMap<String, usize> = std::collections::HashMap::new();
    for line in text.lines() {
        let line = line.trim_end();
        if line.trim().is_empty() || line.trim_start().starts_with('#') {
            continue;
        }
        let (word, context) = match line.split_once('\t').or_else(|| line.split_once("  ")) {
            Some((w, c)) => (w.trim(), c.trim()),
            None => (line.trim(), ""),
        };
        if word.chars().count() > MAX_WORD_CHARS || is_known(word) {
            continue;
        }
        let mut item = Item::new_word(word);
        item.seen_in(origin, 1);
        item.context = context.to_string();
        match position.get(&item.key()).and_then(|&i| out.get_mut(i)) {
            Some(have) => have.merge(item),
            None => {
                position.insert(item.key(), out.len());
                out.push(item);
            }
        }
    }
    out
}

/// Items for the words of running text that `is_known` does not know, most frequent first,
/// dropping words seen fewer than `min_count` times.
pub fn items_from_corpus(
    text: &str,
    rule: &TokenRule,
    origin: &str,
    min_count: u64,
    is_known: impl Fn(&str) -> bool,
) -> Vec<Item> {
    count_unknown(text, rule, is_known)
        .into_iter()
        .filter(|c| c.count >= min_count)
        .map(|c| {
            let mut item = Item::new_word(&c.word);
            item.seen_in(origin, c.count);
            item.context = c.context;
            item
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn corpus_items_are_ordered_and_thresholded() {
        let text = "Saltmarsh Quay ferry\nSaltmarsh again\nKelport";
        let items = items_from_corpus(text, &TokenRule::default(), "corpus:q", 1, |w| w == "ferry" || w == "again");
        let words: Vec<&str> = items.iter().map(|i| i.word.as_str()).collect();
        assert_eq!(words, vec!["Saltmarsh", "Kelport", "Quay"]);
        let items = items_from_corpus(text, &TokenRule::default(), "corpus:q", 2, |_| false);
        assert_eq!(items.len(), 1);
        assert_eq!(items[0].origin, "corpus:q");
    }

    #[test]
    fn overlong_list_lines_are_skipped() {
        let list = format!("{}\nok\n", "x".repeat(MAX_WORD_CHARS + 1));
        assert_eq!(items_from_word_list(&list, "w", |_| false).len(), 1);
    }
}
