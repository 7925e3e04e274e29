//! The FST index over a lexicon: headword lookup, prefix listing, fuzzy search and sounds-like.
//!
//! Keys of the headword map are normalised headwords (see [`normalize_key`]); each value is the
//! range of a flat posting list of [`EntryId`]s, because one headword may have several rows
//! (variants). The headword map is an `fst::Map` (A. Gallant, "Index 1,600,000,000 keys with
//! automata and Rust", 2015), so prefix and Levenshtein queries run as automata over the index
//! rather than by scanning. Two reverse maps go from pronunciation to entries (homophones), with and
//! without stress marks; they need exact lookup only, so they are spans over one text buffer, sorted by hash and
//! found by binary search. The index is a snapshot: rebuild it after editing the lexicon.
//!
//! Every part is a flat byte [`Section`] (little-endian numbers), either just built or a range of
//! the memory-mapped cache file (see `cache.rs`), so a built index and a cached one are read by
//! the same code; posting lists are decoded into memory on first use only. An index opened from
//! the cache gets its sounds-like maps on the first sounds-like query, through a loader the
//! cache gives it.

use super::normalize::normalize_key;
use super::store::Lexicon;
use crate::support::hash::fnv1a_64;
use fst::automaton::{Levenshtein, Str};
use fst::{Automaton, IntoStreamer, Map, MapBuilder, Streamer};
use std::sync::{Arc, OnceLock};

/// The position of an entry in [`Lexicon::entries`].
pub type EntryId = usize;

/// Errors of index queries.
#[derive(Debug, thiserror::Error)]
pub enum IndexError {
    /// The Levenshtein automaton for the query would be too large.
    #[error("fuzzy query {query:?} with distance {distance} is too large to search; use a smaller distance or a longer query")]
    FuzzyTooLarge {
        /// The query.
        query: String,
        /// The distance asked for.
        distance: u32,
    },
}

/// How pronunciations are keyed in the sounds-like maps.
///
/// ```
/// use orthoepy::lexicon::IndexOptions;
/// let options = IndexOptions::default();
/// assert_eq!(options.strip_stress("K AA1 R"), "K AA R");
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct IndexOptions {
    /// Stress marks written as suffixes of phone symbols (digits `0`, `1`, `2` by default).
    pub stress_suffixes: Vec<String>,
}

impl Default for IndexOptions {
    fn default() -> Self {
        IndexOptions { stress_suffixes: vec!["0".into(), "1".into(), "2".into()] }
    }
}

impl IndexOptions {
    /// The pronunciation with stress suffixes removed from every phone.
    pub fn strip_stress(&self, pronunciation: &str) -> String {
        let mut out = String::with_capacity(pronunciation.len());
        self.push_stripped(pronunciation, &mut out);
        out
    }

    /// Appends the pronunciation with stress suffixes removed (and single spaces) to `out`.
    pub fn push_stripped(&self, pronunciation: &str, out: &mut String) {
        let mut first = true;
        for phone in pronunciation.split(' ').filter(|p| !p.is_empty()) {
            if !first {
                out.push(' ');
            }
            first = false;
            let bare = match phone.as_bytes() {
                // One-byte marks (the digit convention) are checked without string searches.
                [.., last] if phone.len() > 1 && self.stress_suffixes.iter().any(|m| m.as_bytes() == [*last]) => {
                    &phone[..phone.len() - 1]
                }
                _ => self
                    .stress_suffixes
                    .iter()
                    .filter(|m| m.len() > 1)
                    .find_map(|mark| phone.strip_suffix(mark.as_str()).filter(|b| !b.is_empty()))
                    .unwrap_or(phone),
            };
            out.push_str(bare);
        }
    }
}

/// Bytes of one part of an index: just built (owned) or a range of the memory-mapped cache file.
///
/// Cloning shares the bytes. Every multi-byte number in a section is little-endian, so a built
/// index and one opened from a cache file are read by the same code.
#[derive(Debug, Clone)]
pub(crate) struct Section {
    backing: Backing,
    start: usize,
    end: usize,
}

#[derive(Debug, Clone)]
enum Backing {
    Owned(Arc<Vec<u8>>),
    Mapped(Arc<memmap2::Mmap>),
}

impl Section {
    /// A section holding `bytes`.
    pub(crate) fn owned(bytes: Vec<u8>) -> Section {
        let end = bytes.len();
        Section { backing: Backing::Owned(Arc::new(bytes)), start: 0, end }
    }

    /// The bytes `range` of a mapped file; `None` when the range lies outside it.
    pub(crate) fn mapped(map: &Arc<memmap2::Mmap>, start: usize, len: usize) -> Option<Section> {
        let end = start.checked_add(len).filter(|&end| end <= map.len())?;
        Some(Section { backing: Backing::Mapped(Arc::clone(map)), start, end })
    }
}

impl AsRef<[u8]> for Section {
    fn as_ref(&self) -> &[u8] {
        let all: &[u8] = match &self.backing {
            Backing::Owned(bytes) => bytes,
            Backing::Mapped(map) => map,
        };
        all.get(self.start..self.end).unwrap_or(&[])
    }
}

/// The little-endian `u32` at byte `at` of `bytes` (0 when it does not fit).
pub(crate) fn read_u32(bytes: &[u8], at: usize) -> u32 {
    match bytes.get(at..at + 4) {
        Some(&[a, b, c, d]) => u32::from_le_bytes([a, b, c, d]),
        _ => 0,
    }
}

/// A flat list of entry ids (little-endian `u32`s), decoded into memory on first use.
#[derive(Debug, Clone)]
struct Postings {
    bytes: Section,
    decoded: OnceLock<Vec<EntryId>>,
}

impl Postings {
    fn built(ids: Vec<EntryId>) -> Postings {
        let bytes = ids.iter().flat_map(|&id| (id as u32).to_le_bytes()).collect();
        Postings { bytes: Section::owned(bytes), decoded: OnceLock::from(ids) }
    }

    fn opened(bytes: Section) -> Postings {
        Postings { bytes, decoded: OnceLock::new() }
    }

    fn all(&self) -> &[EntryId] {
        self.decoded.get_or_init(|| self.bytes.as_ref().chunks_exact(4).map(|c| read_u32(c, 0) as EntryId).collect())
    }
}

/// How many FSTs the headwords are cut into, by key range, so that building them runs on that
/// many threads: the `fst` crate's builder is sequential and was the longest step of a cold start
/// (≈ 45 ms of ≈ 110 on CMUdict). Two, the cores of the machine this is measured on; a look-up
/// walks one of them, a search walks each in turn.
pub(crate) const WORD_FSTS: usize = 2;

/// A posting map: FSTs from key to a packed (start, length) range of `ids`, each holding the keys
/// of one range (every key of `maps[i + 1]` follows every key of `maps[i]`).
///
/// Postings are stored flat: the ids of one key are contiguous in `ids`, in ascending order, so a
/// lookup is one FST walk and one slice.
#[derive(Debug, Clone)]
struct PostingMap {
    maps: Vec<Map<Section>>,
    /// The smallest key of each map (`None` for an empty one), to pick the map a key belongs to.
    firsts: Vec<Option<Vec<u8>>>,
    ids: Postings,
}

impl PostingMap {
    fn build<K: AsRef<str> + Ord + Send + Sync>(mut pairs: Vec<(K, EntryId)>) -> PostingMap {
        use rayon::prelude::*;
        let order = |a: &(K, EntryId), b: &(K, EntryId)| a.0.as_ref().cmp(b.0.as_ref()).then(a.1.cmp(&b.1));
        // A saved store is already in key order; checking first makes that case linear.
        if !pairs.windows(2).all(|w| order(&w[0], &w[1]).is_le()) {
            pairs.par_sort_unstable_by(order);
        }
        // Cut at about equal numbers of rows, each cut moved forward to where a key starts.
        let mut cuts = vec![0];
        for part in 1..WORD_FSTS {
            let mut at = (pairs.len() * part / WORD_FSTS).max(*cuts.last().unwrap_or(&0));
            while at > 0 && at < pairs.len() && pairs[at].0.as_ref() == pairs[at - 1].0.as_ref() {
                at += 1;
            }
            cuts.push(at);
        }
        cuts.push(pairs.len());
        let built: Vec<(Map<Section>, Vec<EntryId>)> =
            cuts.par_windows(2).map(|range| PostingMap::build_range(&pairs[range[0]..range[1]], range[0])).collect();
        let mut ids = Vec::with_capacity(pairs.len());
        let mut maps = Vec::with_capacity(built.len());
        for (map, part_ids) in built {
            maps.push(map);
            ids.extend(part_ids);
        }
        PostingMap::from_maps(maps, Postings::built(ids))
    }

    /// One FST over sorted `pairs`, whose ids start at `offset` in the flat postings.
    fn build_range<K: AsRef<str>>(pairs: &[(K, EntryId)], offset: usize) -> (Map<Section>, Vec<EntryId>) {
        let mut builder = MapBuilder::memory();
        let mut ids = Vec::with_capacity(pairs.len());
        let mut i = 0;
        while i < pairs.len() {
            let key = pairs[i].0.as_ref();
            let start = offset + ids.len();
            while i < pairs.len() && pairs[i].0.as_ref() == key {
                ids.push(pairs[i].1);
                i += 1;
            }
            // Keys arrive sorted and deduplicated, the only conditions insert checks.
            let _ = builder.insert(key, pack(start, offset + ids.len() - start));
        }
        let bytes = builder.into_inner().unwrap_or_default();
        (Map::new(Section::owned(bytes)).unwrap_or_else(|_| empty_map()), ids)
    }

    /// The map over `maps` (in key order) and `ids`.
    fn from_maps(maps: Vec<Map<Section>>, ids: Postings) -> PostingMap {
        let firsts = maps.iter().map(|map| map.keys().next().map(<[u8]>::to_vec)).collect();
        PostingMap { maps, firsts, ids }
    }

    /// The map over parts read from a file; `None` unless each map's keys all follow the
    /// previous non-empty map's keys (the order [`map_of`](Self::map_of) relies on).
    fn opened(maps: Vec<Map<Section>>, ids: Postings) -> Option<PostingMap> {
        let map = PostingMap::from_maps(maps, ids);
        let mut last: Option<Vec<u8>> = None;
        for (inner, first) in map.maps.iter().zip(&map.firsts) {
            if let (Some(previous), Some(first)) = (&last, first) {
                if first <= previous {
                    return None;
                }
            }
            if first.is_some() {
                last = largest_key(inner.as_fst());
            }
        }
        Some(map)
    }

    fn range(&self, packed: u64) -> &[EntryId] {
        let (start, len) = unpack(packed);
        self.ids.all().get(start..start + len).unwrap_or(&[])
    }

    /// The map that would hold `key`: the last non-empty one whose first key is not after it.
    fn map_of(&self, key: &[u8]) -> Option<&Map<Section>> {
        let mut chosen = None;
        for (map, first) in self.maps.iter().zip(&self.firsts) {
            match first {
                Some(first) if first.as_slice() <= key => chosen = Some(map),
                Some(_) => break,
                None => {}
            }
        }
        chosen
    }

    fn get(&self, key: &str) -> &[EntryId] {
        self.map_of(key.as_bytes()).and_then(|map| map.get(key)).map(|v| self.range(v)).unwrap_or(&[])
    }

    fn len(&self) -> usize {
        self.maps.iter().map(Map::len).sum()
    }

    fn search<A: Automaton>(&self, automaton: A, limit: usize) -> Vec<(String, Vec<EntryId>)> {
        let mut out = Vec::new();
        for map in &self.maps {
            let mut stream = map.search(&automaton).into_stream();
            while let Some((key, packed)) = stream.next() {
                if out.len() >= limit {
                    return out;
                }
                out.push((String::from_utf8_lossy(key).into_owned(), self.range(packed).to_vec()));
            }
        }
        out
    }
}

/// The largest key of an FST: the path that takes the last transition of every node, as far as
/// it goes (every state of a minimal FST leads to a key, so the path ends at a final state).
fn largest_key(fst: &fst::raw::Fst<Section>) -> Option<Vec<u8>> {
    if fst.is_empty() {
        return None;
    }
    let mut key = Vec::new();
    let mut node = fst.root();
    while !node.is_empty() {
        let transition = node.transition(node.len() - 1);
        key.push(transition.inp);
        node = fst.node(transition.addr);
    }
    Some(key)
}

/// An FST map with no keys.
fn empty_map() -> Map<Section> {
    let bytes = MapBuilder::memory().into_inner().unwrap_or_default();
    // The builder's own empty output is a valid map; `Map::new` cannot refuse it.
    match Map::new(Section::owned(bytes)) {
        Ok(map) => map,
        Err(_) => unreachable!("an empty fst built by the fst crate is valid"),
    }
}

fn pack(start: usize, len: usize) -> u64 {
    ((start as u64) << 32) | len as u64
}

fn unpack(packed: u64) -> (usize, usize) {
    ((packed >> 32) as usize, (packed & 0xffff_ffff) as usize)
}

/// Bytes per span of a [`SoundMap`]: hash (`u64`), start and length (`u32` each).
const SPAN_BYTES: usize = 16;

/// An exact-match map from pronunciation to entries.
///
/// Pronunciations need exact lookup only (prefix and fuzzy search are for spellings), so they are
/// kept as one text buffer with spans sorted by content and found by binary search: one copy of
/// the text and one sort instead of an automaton build.
#[derive(Debug, Clone)]
struct SoundMap {
    text: Section,
    /// (hash, start, length) of each key, sorted by hash, then key text, then entry.
    spans: Section,
    /// The entry of each span, so the entries of one key form a slice.
    ids: Postings,
}

impl SoundMap {
    /// Builds the map; `write_key(i, out)` appends the key of entry `i` to `out`.
    fn build(count: usize, mut write_key: impl FnMut(usize, &mut String)) -> SoundMap {
        let mut text = String::new();
        let mut span_of: Vec<(u32, u32)> = Vec::with_capacity(count);
        let mut order: Vec<(u64, EntryId)> = Vec::with_capacity(count);
        for id in 0..count {
            let start = text.len();
            write_key(id, &mut text);
            span_of.push((start as u32, (text.len() - start) as u32));
            order.push((fnv1a_64(&text.as_bytes()[start..]), id));
        }
        // An integer sort by (hash, entry); then, inside each run of one hash (homophones, or a
        // rare collision), order by text so that every key's entries are contiguous.
        order.sort_unstable();
        let key_of = |id: EntryId| {
            let (start, len) = span_of[id];
            &text[start as usize..(start + len) as usize]
        };
        let mut run = 0;
        while run < order.len() {
            let end = run + order[run..].iter().take_while(|o| o.0 == order[run].0).count();
            if end - run > 1 {
                order[run..end].sort_by(|a, b| key_of(a.1).cmp(key_of(b.1)).then(a.1.cmp(&b.1)));
            }
            run = end;
        }
        let mut spans = Vec::with_capacity(order.len() * SPAN_BYTES);
        for &(hash, id) in &order {
            spans.extend_from_slice(&hash.to_le_bytes());
            spans.extend_from_slice(&span_of[id].0.to_le_bytes());
            spans.extend_from_slice(&span_of[id].1.to_le_bytes());
        }
        let ids = order.iter().map(|o| o.1).collect();
        SoundMap { text: Section::owned(text.into_bytes()), spans: Section::owned(spans), ids: Postings::built(ids) }
    }

    /// The hash and key text of span `i`.
    fn span(&self, i: usize) -> (u64, &[u8]) {
        let spans = self.spans.as_ref();
        let at = i * SPAN_BYTES;
        let hash = u64::from(read_u32(spans, at)) | (u64::from(read_u32(spans, at + 4)) << 32);
        let (start, len) = (read_u32(spans, at + 8) as usize, read_u32(spans, at + 12) as usize);
        (hash, self.text.as_ref().get(start..start + len).unwrap_or(&[]))
    }

    fn get(&self, key: &str) -> &[EntryId] {
        let wanted = (fnv1a_64(key.as_bytes()), key.as_bytes());
        let count = self.spans.as_ref().len() / SPAN_BYTES;
        let (mut low, mut high) = (0, count);
        while low < high {
            let middle = low + (high - low) / 2;
            if self.span(middle) < wanted {
                low = middle + 1;
            } else {
                high = middle;
            }
        }
        let found = (low..count).take_while(|&i| self.span(i) == wanted).count();
        self.ids.all().get(low..low + found).unwrap_or(&[])
    }
}

/// How many byte parts the headword map has (see [`LexiconIndex::word_parts`]): its FSTs, then
/// its postings.
pub(crate) const WORD_PARTS: usize = WORD_FSTS + 1;

/// The index of one lexicon snapshot.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
/// let lexicon = Lexicon::from_entries(
///     vec![Entry::new("Pier", "P IH1 R"), Entry::new("peer", "P IH1 R"), Entry::new("pierhead", "P IH1 R HH EH2 D")],
///     HeadwordPolicy { fold_case: true },
/// );
/// let index = lexicon.index();
/// assert_eq!(index.lookup("PIER"), &[0]);
/// assert_eq!(index.prefix("pier", 10).len(), 2);
/// let near: Vec<String> = index.fuzzy("pear", 1, 10).unwrap().into_iter().map(|(k, _)| k).collect();
/// assert_eq!(near, ["peer"]);
/// assert_eq!(index.sounds_like("P IH1 R"), &[0, 1]);
/// ```
#[derive(Debug, Clone)]
pub struct LexiconIndex {
    words: PostingMap,
    sounds: LazySounds,
    policy: super::HeadwordPolicy,
    options: IndexOptions,
}

/// The two sounds-like maps: pronunciation → entries, with and without stress marks.
#[derive(Debug, Clone)]
pub(crate) struct SoundMaps {
    pronunciations: SoundMap,
    unstressed: SoundMap,
}

/// How many byte parts the sounds-like maps have (see [`SoundMaps::parts`]).
pub(crate) const SOUND_PARTS: usize = 6;

impl SoundMaps {
    /// Both maps of `lexicon`'s entries (built side by side).
    pub(crate) fn build(lexicon: &Lexicon, options: &IndexOptions) -> SoundMaps {
        let entries = lexicon.entries();
        let (pronunciations, unstressed) = rayon::join(
            || SoundMap::build(entries.len(), |i, out| out.push_str(&entries[i].pronunciation)),
            || SoundMap::build(entries.len(), |i, out| options.push_stripped(&entries[i].pronunciation, out)),
        );
        SoundMaps { pronunciations, unstressed }
    }

    /// Maps with no keys.
    pub(crate) fn empty() -> SoundMaps {
        SoundMaps { pronunciations: SoundMap::build(0, |_, _| ()), unstressed: SoundMap::build(0, |_, _| ()) }
    }

    /// The bytes of each part, in the order [`from_parts`](Self::from_parts) takes them: text,
    /// spans and postings of the stressed map, then of the unstressed one.
    pub(crate) fn parts(&self) -> [&[u8]; SOUND_PARTS] {
        let (p, u) = (&self.pronunciations, &self.unstressed);
        [p.text.as_ref(), p.spans.as_ref(), p.ids.bytes.as_ref(), u.text.as_ref(), u.spans.as_ref(), u.ids.bytes.as_ref()]
    }

    /// Maps over parts written by [`parts`](Self::parts), checking their shapes (whole numbers
    /// of spans, one id per span); `None` when they do not fit.
    pub(crate) fn from_parts(parts: [Section; SOUND_PARTS]) -> Option<SoundMaps> {
        let [text, spans, ids, bare_text, bare_spans, bare_ids] = parts;
        let sound_map = |text: Section, spans: Section, ids: Section| {
            let fits = spans.as_ref().len() % SPAN_BYTES == 0 && ids.as_ref().len() * 4 == spans.as_ref().len();
            fits.then(|| SoundMap { text, spans, ids: Postings::opened(ids) })
        };
        Some(SoundMaps { pronunciations: sound_map(text, spans, ids)?, unstressed: sound_map(bare_text, bare_spans, bare_ids)? })
    }
}

/// Where an index opened from a cache gets its sounds-like maps the first time a sounds-like
/// query asks: their own cache file, or a parse of the store (see `cache.rs`).
pub(crate) type SoundLoader = Arc<dyn Fn() -> SoundMaps + Send + Sync>;

/// The sounds-like maps, built with the index or loaded on first use: a command that only looks
/// headwords up (`find WORD`, most of the review screen) never reads them. On CMUdict they are
/// two thirds of the index (9 MB of 13), on a 2,000,000-entry lexicon 169 MB of 220.
#[derive(Clone)]
struct LazySounds {
    maps: OnceLock<SoundMaps>,
    loader: Option<SoundLoader>,
}

impl LazySounds {
    fn get(&self) -> &SoundMaps {
        self.maps.get_or_init(|| self.loader.as_ref().map_or_else(SoundMaps::empty, |load| load()))
    }
}

impl std::fmt::Debug for LazySounds {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("LazySounds").field("loaded", &self.maps.get().is_some()).finish()
    }
}

impl LexiconIndex {
    /// Builds the index of a lexicon with the given options.
    pub fn build(lexicon: &Lexicon, options: IndexOptions) -> LexiconIndex {
        let (words, sounds) = rayon::join(|| LexiconIndex::word_map(lexicon), || SoundMaps::build(lexicon, &options));
        let sounds = LazySounds { maps: OnceLock::from(sounds), loader: None };
        LexiconIndex { words, sounds, policy: *lexicon.policy(), options }
    }

    /// The headword part of the index only; the sounds-like maps come from `loader` when first
    /// asked for.
    pub(crate) fn build_words(lexicon: &Lexicon, options: IndexOptions, loader: SoundLoader) -> LexiconIndex {
        let words = LexiconIndex::word_map(lexicon);
        LexiconIndex { words, sounds: LazySounds { maps: OnceLock::new(), loader: Some(loader) }, policy: *lexicon.policy(), options }
    }

    fn word_map(lexicon: &Lexicon) -> PostingMap {
        let policy = *lexicon.policy();
        use rayon::prelude::*;
        let keys = lexicon.entries().par_iter().enumerate();
        PostingMap::build(keys.map(|(id, e)| (normalize_key(e.word.trim(), &policy), id)).collect())
    }

    /// The bytes of the headword parts, in the order [`from_word_parts`](Self::from_word_parts)
    /// takes them: the headword FST, then its postings.
    pub(crate) fn word_parts(&self) -> [&[u8]; WORD_PARTS] {
        std::array::from_fn(|i| match self.words.maps.get(i) {
            Some(map) => map.as_fst().as_bytes(),
            None => self.words.ids.bytes.as_ref(),
        })
    }

    /// An index over headword parts written by [`word_parts`](Self::word_parts), checking their
    /// shapes (the FST's header, a whole number of ids); `None` when they do not fit. The
    /// sounds-like maps come from `loader` when first asked for.
    pub(crate) fn from_word_parts(
        parts: [Section; WORD_PARTS],
        policy: super::HeadwordPolicy,
        options: IndexOptions,
        loader: SoundLoader,
    ) -> Option<LexiconIndex> {
        let mut parts = Vec::from(parts);
        let word_ids = parts.pop()?;
        if word_ids.as_ref().len() % 4 != 0 {
            return None;
        }
        let maps = parts.into_iter().map(|part| Map::new(part).ok()).collect::<Option<Vec<_>>>()?;
        let words = PostingMap::opened(maps, Postings::opened(word_ids))?;
        Some(LexiconIndex { words, sounds: LazySounds { maps: OnceLock::new(), loader: Some(loader) }, policy, options })
    }

    /// The options the sounds-like maps were built with.
    pub fn options(&self) -> &IndexOptions {
        &self.options
    }

    fn key<'a>(&self, word: &'a str) -> std::borrow::Cow<'a, str> {
        normalize_key(word.trim(), &self.policy)
    }

    /// The entries of a headword (normalised by the lexicon's policy before lookup).
    pub fn lookup(&self, word: &str) -> &[EntryId] {
        self.words.get(&self.key(word))
    }

    /// True when the headword is in the lexicon.
    pub fn contains(&self, word: &str) -> bool {
        !self.lookup(word).is_empty()
    }

    /// Number of distinct normalised headwords.
    pub fn word_count(&self) -> usize {
        self.words.len()
    }

    /// True when some headword starts with `prefix` (normalised like a headword). Walks each
    /// FST's transitions for the prefix's bytes and stops there: every state of a minimal FST
    /// lies on a path to a key, so reaching the prefix's state is enough, and nothing is
    /// allocated (the compound splitter asks this for every split point of every word).
    ///
    /// ```
    /// use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
    /// let lexicon = Lexicon::from_entries(vec![Entry::new("harbour", "HH AA1 R B ER0")], HeadwordPolicy::default());
    /// let index = lexicon.index();
    /// assert!(index.has_prefix("harb") && index.has_prefix("harbour") && index.has_prefix(""));
    /// assert!(!index.has_prefix("harbours") && !index.has_prefix("hb"));
    /// ```
    pub fn has_prefix(&self, prefix: &str) -> bool {
        let key = self.key(prefix);
        self.words.maps.iter().any(|map| {
            let fst = map.as_fst();
            let mut node = fst.root();
            for &byte in key.as_bytes() {
                match node.find_input(byte) {
                    Some(i) => node = fst.node(node.transition(i).addr),
                    None => return false,
                }
            }
            !fst.is_empty()
        })
    }

    /// Headwords starting with `prefix`, in key order, at most `limit` of them.
    pub fn prefix(&self, prefix: &str, limit: usize) -> Vec<(String, Vec<EntryId>)> {
        let key = self.key(prefix);
        self.words.search(Str::new(&key).starts_with(), limit)
    }

    /// Headwords within `max_edits` Levenshtein edits (over code points) of `word`, nearest first,
    /// at most `limit` of them.
    pub fn fuzzy(&self, word: &str, max_edits: u32, limit: usize) -> Result<Vec<(String, Vec<EntryId>)>, IndexError> {
        let key = self.key(word);
        let automaton = Levenshtein::new(&key, max_edits)
            .map_err(|_| IndexError::FuzzyTooLarge { query: word.to_string(), distance: max_edits })?;
        let mut found = self.words.search(automaton, usize::MAX);
        found.sort_by_cached_key(|(k, _)| (strsim::levenshtein(k, &key), k.clone()));
        found.truncate(limit);
        Ok(found)
    }

    /// Entries whose pronunciation is exactly `pronunciation` (stress marks included).
    pub fn sounds_like(&self, pronunciation: &str) -> &[EntryId] {
        let folded = crate::lexicon::join_phones(pronunciation.split_whitespace());
        self.sounds.get().pronunciations.get(&folded)
    }

    /// Entries whose pronunciation equals `pronunciation` once stress marks are removed from both.
    pub fn sounds_like_unstressed(&self, pronunciation: &str) -> &[EntryId] {
        self.sounds.get().unstressed.get(&self.options.strip_stress(pronunciation))
    }

    /// Every normalised headword, in key order.
    pub fn keys(&self) -> impl Iterator<Item = String> + '_ {
        let mut all = Vec::with_capacity(self.words.len());
        for map in &self.words.maps {
            let mut stream = map.keys();
            while let Some(k) = stream.next() {
                all.push(String::from_utf8_lossy(k).into_owned());
            }
        }
        all.into_iter()
    }
}

impl Lexicon {
    /// Builds the FST index of this lexicon with the default [`IndexOptions`].
    pub fn index(&self) -> LexiconIndex {
        LexiconIndex::build(self, IndexOptions::default())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{Entry, HeadwordPolicy};

    fn sample() -> Lexicon {
        Lexicon::from_entries(
            vec![
                Entry::new("ferry", "F EH1 R IY0"),
                Entry::new("fairy", "F EH1 R IY0"),
                Entry::new("ferries", "F EH1 R IY0 Z"),
                Entry::new("ferry", "F EH1 R IY2"),
                Entry::new("Café", "K AE0 F EY1"),
            ],
            HeadwordPolicy { fold_case: true },
        )
    }

    #[test]
    fn lookup_returns_all_variants_in_store_order() {
        let index = sample().index();
        assert_eq!(index.lookup("ferry"), &[0, 3]);
        assert_eq!(index.lookup("Ferry"), &[0, 3]);
        assert!(index.lookup("ferr").is_empty());
        assert_eq!(index.word_count(), 4);
    }

    /// Words from a small alphabet, so that duplicates, shared prefixes and runs of one key
    /// across the cut between the FSTs are common.
    fn small_words() -> impl proptest::strategy::Strategy<Value = Vec<String>> {
        use proptest::prelude::*;
        proptest::collection::vec(proptest::collection::vec(prop::sample::select(vec!['a', 'b', 'é', 'B']), 0..5), 0..40)
            .prop_map(|words| words.into_iter().map(String::from_iter).filter(|w| !w.is_empty()).collect())
    }

    proptest::proptest! {
        #![proptest_config(proptest::test_runner::Config::with_cases(64))]

        /// Every query over the FSTs cut by key range answers as a sorted map of the same keys
        /// would (the straightforward reference), built fresh and reopened from its parts.
        #[test]
        fn index_cut_into_fsts_answers_like_one_sorted_map(words in small_words(), probes in small_words()) {
            let policy = HeadwordPolicy { fold_case: true };
            let lexicon = Lexicon::from_entries(words.iter().map(|w| Entry::new(w, "AH0")).collect(), policy);
            let mut reference: std::collections::BTreeMap<String, Vec<EntryId>> = Default::default();
            for (id, word) in words.iter().enumerate() {
                reference.entry(normalize_key(word, &policy).into_owned()).or_default().push(id);
            }
            let built = lexicon.index();
            let parts = built.word_parts().map(|part| Section::owned(part.to_vec()));
            let reopened = LexiconIndex::from_word_parts(parts, policy, IndexOptions::default(), Arc::new(SoundMaps::empty)).unwrap();
            for index in [&built, &reopened] {
                proptest::prop_assert_eq!(index.keys().collect::<Vec<_>>(), reference.keys().cloned().collect::<Vec<_>>());
                proptest::prop_assert_eq!(index.word_count(), reference.len());
                for probe in words.iter().chain(&probes) {
                    let key = normalize_key(probe, &policy).into_owned();
                    proptest::prop_assert_eq!(index.lookup(probe), reference.get(&key).map_or(&[][..], Vec::as_slice));
                    let starting: Vec<(String, Vec<EntryId>)> =
                        reference.iter().filter(|(k, _)| k.starts_with(&key)).map(|(k, v)| (k.clone(), v.clone())).collect();
                    proptest::prop_assert_eq!(index.has_prefix(probe), !starting.is_empty());
                    proptest::prop_assert_eq!(index.prefix(probe, 3), starting.into_iter().take(3).collect::<Vec<_>>());
                }
            }
        }
    }

    #[test]
    fn fsts_whose_key_ranges_overlap_are_refused() {
        let policy = HeadwordPolicy::default();
        let lexicon = Lexicon::from_entries(["a", "b", "c", "d"].iter().map(|w| Entry::new(w, "AH0")).collect(), policy);
        let index = lexicon.index();
        let mut parts: Vec<Section> = index.word_parts().iter().map(|part| Section::owned(part.to_vec())).collect();
        parts.swap(0, WORD_FSTS - 1);
        let parts: [Section; WORD_PARTS] = parts.try_into().unwrap();
        assert!(LexiconIndex::from_word_parts(parts, policy, IndexOptions::default(), Arc::new(SoundMaps::empty)).is_none());
    }

    #[test]
    fn lookup_normalises_unicode_form() {
        let index = sample().index();
        assert_eq!(index.lookup("CAFE\u{301}"), &[4]);
    }

    #[test]
    fn prefix_respects_limit_and_order() {
        let index = sample().index();
        let keys: Vec<_> = index.prefix("fe", 10).into_iter().map(|(k, _)| k).collect();
        assert_eq!(keys, ["ferries", "ferry"]);
        assert_eq!(index.prefix("fe", 1).len(), 1);
    }

    #[test]
    fn has_prefix_agrees_with_the_prefix_search() {
        let index = sample().index();
        let mut probes: Vec<String> = Vec::new();
        for key in index.keys() {
            let chars: Vec<char> = key.chars().collect();
            for end in 0..=chars.len() {
                let head: String = chars[..end].iter().collect();
                probes.push(format!("{head}x"));
                probes.push(head.to_uppercase());
                probes.push(head);
            }
        }
        for probe in probes {
            assert_eq!(index.has_prefix(&probe), !index.prefix(&probe, 1).is_empty(), "{probe:?}");
        }
        let empty = Lexicon::from_entries(Vec::new(), HeadwordPolicy::default()).index();
        assert!(!empty.has_prefix("") && !empty.has_prefix("a"));
    }

    #[test]
    fn fuzzy_sorts_by_distance() {
        let index = sample().index();
        let keys: Vec<_> = index.fuzzy("ferri", 2, 10).unwrap().into_iter().map(|(k, _)| k).collect();
        assert_eq!(keys, ["ferry", "ferries"]); // "fairy" is 3 edits away
    }

    #[test]
    fn sounds_like_with_and_without_stress() {
        let index = sample().index();
        assert_eq!(index.sounds_like("F EH1 R IY0"), &[0, 1]);
        assert_eq!(index.sounds_like_unstressed("F EH R IY"), &[0, 1, 3]);
        assert!(index.sounds_like("F EH1 R").is_empty());
    }

    #[test]
    fn stress_stripping_fast_and_general_paths_agree() {
        let digits = IndexOptions::default();
        let general = IndexOptions { stress_suffixes: vec!["1".into(), "0".into(), "2".into(), "ˈ".into()] };
        for pron in ["K AA1 R", "AH0", "0 1 IY2", "  A1  B2 ", "ɡ ɑ1 ɹ", ""] {
            let mut fast = String::new();
            digits.push_stripped(pron, &mut fast);
            let mut slow = String::new();
            general.push_stripped(pron, &mut slow);
            assert_eq!(fast, slow, "{pron:?}");
        }
        assert_eq!(digits.strip_stress("0 1 IY2"), "0 1 IY");
    }

    #[test]
    fn keys_are_sorted_and_unique() {
        let keys: Vec<_> = sample().index().keys().collect();
        assert_eq!(keys, ["café", "fairy", "ferries", "ferry"]);
    }
}
