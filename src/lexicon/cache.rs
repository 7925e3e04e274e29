//! The persisted index: the FST index of a store saved in a hidden folder beside it, so that a
//! command that looks a few words up opens it by memory map instead of parsing the whole store.
//!
//! [`IndexedStore::open`] checksums the store in one streamed pass (`store_file`), takes its key
//! (length and CRC-32 of every byte, the headword policy, the stress marks) and opens
//! `.orthoepy-index/NAME.idx` beside it; the
//! sounds-like maps live in `NAME.sounds` and are read (or built and saved) only when a
//! sounds-like query first asks, since they are two thirds of the index. The cache is
//! never trusted blindly: its magic, version, length, a CRC-32 over all its bytes and the key must
//! all match, and its parts must have the shapes the index expects; otherwise it is rebuilt from
//! a full parse and replaced by rename (`safe_io::replace_derived`: not synced, since a cache torn
//! by a crash fails those checks and is rebuilt). A folder that cannot be written
//! (read-only media, another user's project) only means no cache is saved: the command works from
//! the index it just built, and [`CacheState::Unsaved`] says why.
//!
//! Each headword's value in the FST leads to its entry ids, and a row table gives each entry's
//! byte offset and line in the store, so [`IndexedStore::entries`] reads and parses only the rows
//! asked for (the store's header and those rows, by byte range, through the store's own parser);
//! the whole store is read only when the cache must be rebuilt or a command needs every entry.
//!
//! The key hashes the whole store on every open instead of trusting its size and modification
//! time: a CRC-32 streamed through a small buffer runs at several GB/s (≈ 1 ms for CMUdict's
//! 3.5 MiB, ≈ 20 ms for the 112 MB of a 2,000,000-entry store), which
//! is cheap next to the parse it saves, and it cannot be fooled by an edit that keeps the size
//! and the time stamp (a copy with `cp -p`, a clock set back, a coarse file system clock). Two
//! stores of the same length share a CRC-32 by accident with odds of 1 in 2³²; the same key
//! decides whether `Lexicon::save` sees an edit made meanwhile.
//!
//! The cache is replaced only by rename, never written in place; a process that truncates it in
//! place while another has it mapped can make that reader fail, which is why the store itself is
//! read, not mapped. This module writes nothing but the cache files and their folder.

use super::entry::Entry;
use super::index::{read_u32, Section, SoundLoader, SoundMaps, SOUND_PARTS, WORD_PARTS};
use super::store::LoadMode;
use super::store_file::StoreFile;
use super::{EntryId, HeadwordPolicy, IndexOptions, Lexicon, LexiconError, LexiconIndex};
use std::fmt;
use std::path::{Path, PathBuf};
use std::sync::{Arc, OnceLock};

/// The hidden folder beside a store that holds its index cache.
pub const CACHE_FOLDER: &str = ".orthoepy-index";

/// The first bytes of every headword cache file (`NAME.idx`).
const MAGIC: &[u8; 8] = b"OEPYIDX\x1a";

/// The first bytes of every sounds-like cache file (`NAME.sounds`).
const SOUNDS_MAGIC: &[u8; 8] = b"OEPYSND\x1a";

/// The cache format written and read; a file of another version is rebuilt. Version 2 moved
/// the sounds-like maps into a file of their own, read only when a sounds-like query asks;
/// version 3 holds the headwords in [`WORD_FSTS`](super::index::WORD_FSTS) FSTs by key range.
const VERSION: u32 = 3;

/// Parts of the headword file: the index's own, the row table and the stress marks.
const PARTS: usize = WORD_PARTS + 2;

/// Parts of the sounds-like file: the maps' own and the stress marks.
const SOUND_FILE_PARTS: usize = SOUND_PARTS + 1;

/// Fixed header: magic, version, flags, store length, store CRC, entries, header length, padding.
const FIXED: usize = 40;

/// Header with the part table (offset and length, `u64` each, per part) of a file of `parts`.
const fn header_size(parts: usize) -> usize {
    FIXED + parts * 16
}

/// Bytes per row of the row table: byte offset and line of the entry's record (`u32` each).
const ROW_BYTES: usize = 8;

const FOLD_CASE: u32 = 1;
const HAS_ROWS: u32 = 2;

/// The path of the index cache of the store at `store`: `.orthoepy-index/NAME.idx` beside it
/// (its sounds-like maps go in `NAME.sounds` next to it).
///
/// ```
/// use std::path::Path;
/// assert_eq!(orthoepy::lexicon::cache_path(Path::new("demo/lexicon.csv")),
///            Path::new("demo/.orthoepy-index/lexicon.csv.idx"));
/// ```
pub fn cache_path(store: &Path) -> PathBuf {
    let mut name = store.file_name().map(|n| n.to_os_string()).unwrap_or_default();
    name.push(".idx");
    let folder = store.parent().unwrap_or(Path::new(""));
    folder.join(CACHE_FOLDER).join(name)
}

/// Why a cache file was not used.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Stale {
    /// There was no cache file.
    Missing,
    /// The file is not a usable cache: what was wrong with it.
    Damaged(&'static str),
    /// The cache was written by another version of the format.
    OtherVersion(u32),
    /// The cache belongs to another content of the store (it changed since).
    StoreChanged,
    /// The cache was built with another headword policy or other stress marks.
    OtherSettings,
}

impl fmt::Display for Stale {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Stale::Missing => write!(f, "there was none"),
            Stale::Damaged(what) => write!(f, "the old one was damaged ({what})"),
            Stale::OtherVersion(v) => write!(f, "the old one has format version {v}, this program writes {VERSION}"),
            Stale::StoreChanged => write!(f, "the store changed"),
            Stale::OtherSettings => write!(f, "the old one was built with another headword policy"),
        }
    }
}

/// What [`IndexedStore::open`] did with the cache.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum CacheState {
    /// The cache matched the store and was used.
    Reused,
    /// The cache was rebuilt and saved.
    Rebuilt(Stale),
    /// The index was built, but the cache could not be saved: why not (the store works anyway).
    Unsaved {
        /// Why the old cache was not used.
        stale: Stale,
        /// What the system said when writing.
        reason: String,
    },
}

/// The key a cache must carry to be used for a store.
#[derive(Debug, Clone, PartialEq, Eq)]
struct StoreKey {
    length: u64,
    crc: u32,
    fold_case: bool,
    marks: Vec<u8>,
}

impl StoreKey {
    fn of(store: &StoreFile, policy: HeadwordPolicy, options: &IndexOptions) -> StoreKey {
        let marks = options.stress_suffixes.join("\n").into_bytes();
        StoreKey { length: store.length(), crc: store.crc(), fold_case: policy.fold_case, marks }
    }
}

/// A store with its index, opened from the cache where it is fresh.
///
/// ```
/// use orthoepy::lexicon::{CacheState, HeadwordPolicy, IndexedStore};
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("lexicon.csv");
/// std::fs::write(&path, "word,pronunciation,status,source,score,note\nquay,K IY1,imported,,,\nquay,K EY1,imported,,,\n").unwrap();
/// let first = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
/// assert!(matches!(first.state(), CacheState::Rebuilt(_)));
/// let again = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
/// assert_eq!(again.state(), &CacheState::Reused);
/// let rows = again.entries(again.index().lookup("quay")).unwrap();
/// assert_eq!(rows.iter().map(|e| (e.pronunciation.as_str(), e.line)).collect::<Vec<_>>(), [("K IY1", 2), ("K EY1", 3)]);
/// ```
pub struct IndexedStore {
    store: Arc<StoreFile>,
    policy: HeadwordPolicy,
    index: LexiconIndex,
    rows: Option<Section>,
    header_len: usize,
    entry_count: usize,
    parsed: OnceLock<Lexicon>,
    state: CacheState,
}

impl IndexedStore {
    /// Reads the store at `path` and opens its index: from the cache when it matches, else built
    /// from a full (strict) parse and saved to the cache. Errors are the store's own (unreadable,
    /// malformed); a cache that cannot be used or written is never an error.
    pub fn open(path: &Path, policy: HeadwordPolicy) -> Result<IndexedStore, LexiconError> {
        let store = Arc::new(StoreFile::open(path)?);
        let options = IndexOptions::default();
        let key = StoreKey::of(&store, policy, &options);
        let cache = cache_path(path);
        let loader = sound_loader(Arc::clone(&store), &key, policy, &options);
        let stale = match open_cache(&cache, &key, policy, &options, Arc::clone(&loader)) {
            Ok(opened) => {
                let store = IndexedStore {
                    store,
                    policy,
                    index: opened.index,
                    rows: opened.rows,
                    header_len: opened.header_len,
                    entry_count: opened.entries,
                    parsed: OnceLock::new(),
                    state: CacheState::Reused,
                };
                return Ok(store);
            }
            Err(stale) => stale,
        };
        // Read for this build only, not kept: the parsed lexicon answers every later question.
        // The row table is made first so that the bytes (112 MB at 2,000,000 entries) are gone
        // before the FST build, which runs on every core itself (two FSTs side by side).
        let bytes = store.read_whole()?;
        let lexicon = Lexicon::from_file_bytes(&bytes, path, policy, LoadMode::Strict)?;
        let table = row_table(&bytes, lexicon.entries(), path, policy);
        drop(bytes);
        let index = LexiconIndex::build_words(&lexicon, options, loader);
        let (rows, header_len) = match table {
            Some((rows, header_len)) => (Some(rows), header_len),
            None => (None, 0),
        };
        let mut parts: Vec<&[u8]> = index.word_parts().to_vec();
        parts.push(rows.as_deref().unwrap_or(&[]));
        parts.push(&key.marks);
        let flags = if rows.is_some() { HAS_ROWS } else { 0 };
        let file = encode(MAGIC, &key, &parts, flags, header_len, lexicon.entries().len());
        let state = match write_cache(&cache, &file) {
            Ok(()) => CacheState::Rebuilt(stale),
            Err(reason) => CacheState::Unsaved { stale, reason: reason.to_string() },
        };
        Ok(IndexedStore {
            store,
            policy,
            entry_count: lexicon.entries().len(),
            index,
            rows: rows.map(Section::owned),
            header_len,
            parsed: OnceLock::from(lexicon),
            state,
        })
    }

    /// The index (headwords and sounds-like maps).
    pub fn index(&self) -> &LexiconIndex {
        &self.index
    }

    /// What was done with the cache.
    pub fn state(&self) -> &CacheState {
        &self.state
    }

    /// The store's file.
    pub fn path(&self) -> &Path {
        self.store.path()
    }

    /// Rows in the store.
    pub fn entry_count(&self) -> usize {
        self.entry_count
    }

    /// The entries `ids` (in that order; unknown ids are skipped), parsed from their rows only.
    /// A store whose rows cannot be located (records that do not start lines of their own) is
    /// parsed once in full instead.
    pub fn entries(&self, ids: &[EntryId]) -> Result<Vec<Entry>, LexiconError> {
        if let Some(rows) = &self.rows {
            if let Some(found) = self.rows_alone(rows, ids)? {
                return Ok(found);
            }
        }
        let lexicon = self.full()?;
        Ok(ids.iter().filter_map(|&id| lexicon.entries().get(id).cloned()).collect())
    }

    /// The whole lexicon (parsed from the bytes already read) with its index.
    pub fn into_parts(self) -> Result<(Lexicon, LexiconIndex), LexiconError> {
        let lexicon = match self.parsed.into_inner() {
            Some(lexicon) => lexicon,
            None => Lexicon::from_file_bytes(&self.store.whole()?, self.store.path(), self.policy, LoadMode::Strict)?,
        };
        Ok((lexicon, self.index))
    }

    fn full(&self) -> Result<&Lexicon, LexiconError> {
        if let Some(lexicon) = self.parsed.get() {
            return Ok(lexicon);
        }
        let lexicon = Lexicon::from_file_bytes(&self.store.whole()?, self.store.path(), self.policy, LoadMode::Strict)?;
        Ok(self.parsed.get_or_init(|| lexicon))
    }

    /// The entries `ids` (unknown ids skipped) parsed from their rows alone, read by byte range
    /// with the store's header; `None` unless every row gives exactly one entry whose headword
    /// leads back to its id in the index.
    fn rows_alone(&self, rows: &Section, ids: &[EntryId]) -> Result<Option<Vec<Entry>>, LexiconError> {
        let table = rows.as_ref();
        let ids: Vec<EntryId> = ids.iter().copied().filter(|&id| id < self.entry_count).collect();
        let mut ranges = vec![(0, self.header_len as u64)];
        let mut lines = Vec::with_capacity(ids.len());
        for &id in &ids {
            let start = u64::from(read_u32(table, id * ROW_BYTES));
            let end = if id + 1 < self.entry_count { u64::from(read_u32(table, (id + 1) * ROW_BYTES)) } else { self.store.length() };
            ranges.push((start, end));
            lines.push(read_u32(table, id * ROW_BYTES + 4) as usize);
        }
        let records = self.store.ranges(&ranges)?;
        let (header, records) = records.split_first().expect("the header range is always read");
        let mut found = Vec::with_capacity(ids.len());
        for ((record, &id), line) in records.iter().zip(&ids).zip(lines) {
            let Some(mut entry) = parse_row(header, record, self.store.path(), self.policy) else { return Ok(None) };
            if !self.index.lookup(&entry.word).contains(&id) {
                return Ok(None);
            }
            entry.line = line;
            found.push(entry);
        }
        Ok(Some(found))
    }
}

impl super::EntrySource for IndexedStore {
    fn entries_of(&self, ids: &[EntryId]) -> Result<Vec<Entry>, LexiconError> {
        self.entries(ids)
    }
}

/// The row table of a store and the length of its header: for each entry, the byte offset where
/// its record starts and its line (as the store's parser numbered it). Records are found by quote
/// parity (a newline outside quotes ends one; RFC 4180 quotes escape themselves by doubling),
/// blank lines passed over as the parser does. `None` when that does not give one record per
/// entry, or a lone carriage return could end records, or a sample of rows parsed alone differs
/// from the full parse.
fn row_table(bytes: &[u8], entries: &[Entry], path: &Path, policy: HeadwordPolicy) -> Option<(Vec<u8>, usize)> {
    if bytes.iter().enumerate().any(|(i, &b)| b == b'\r' && bytes.get(i + 1) != Some(&b'\n')) {
        return None;
    }
    let mut starts = Vec::with_capacity(entries.len());
    let mut header_len = None;
    let mut take = |start: usize, end: usize| {
        let record = bytes[start..end].strip_suffix(b"\n").unwrap_or(&bytes[start..end]);
        let record = record.strip_suffix(b"\r").unwrap_or(record);
        if header_len.is_none() {
            header_len = Some(end);
        } else if !record.is_empty() && record != b"\"\"" {
            starts.push(start);
        }
    };
    // Jumping from quote to line feed with memchr: the same parity scan without a step per byte.
    let (mut quoted, mut start) = (false, 0);
    for i in memchr::memchr2_iter(b'"', b'\n', bytes) {
        if bytes[i] == b'"' {
            quoted = !quoted;
        } else if !quoted {
            take(start, i + 1);
            start = i + 1;
        }
    }
    if start < bytes.len() {
        take(start, bytes.len());
    }
    let header_len = header_len?;
    if starts.len() != entries.len() {
        return None;
    }
    let end_of = |id: usize| starts.get(id + 1).copied().unwrap_or(bytes.len());
    let sample = (0..entries.len()).step_by(entries.len() / 64 + 1).chain(entries.len().checked_sub(1));
    for id in sample {
        let mut alone = parse_row(&bytes[..header_len], &bytes[starts[id]..end_of(id)], path, policy)?;
        alone.line = entries[id].line;
        if alone != entries[id] {
            return None;
        }
    }
    let mut table = Vec::with_capacity(entries.len() * ROW_BYTES);
    for (start, entry) in starts.iter().zip(entries) {
        table.extend_from_slice(&u32::try_from(*start).ok()?.to_le_bytes());
        table.extend_from_slice(&u32::try_from(entry.line).ok()?.to_le_bytes());
    }
    Some((table, header_len))
}

/// The one entry of the store's `record`, parsed after the store's `header`; `None` unless it
/// gives exactly one entry.
fn parse_row(header: &[u8], record: &[u8], path: &Path, policy: HeadwordPolicy) -> Option<Entry> {
    let text = [header, record].concat();
    let mut parsed = Lexicon::parse(&text, path, policy, LoadMode::Strict).ok()?;
    let mut one = std::mem::take(parsed.entries_mut());
    one.pop().filter(|_| one.is_empty())
}

/// The bytes of a cache file: `magic`, the header (with the store's key, `flags` beside the
/// headword policy's, the store's header length and entry count), the part table, the parts,
/// and a CRC-32 of all that.
fn encode(magic: &[u8; 8], key: &StoreKey, parts: &[&[u8]], flags: u32, header_len: usize, entries: usize) -> Vec<u8> {
    let flags = flags | if key.fold_case { FOLD_CASE } else { 0 };
    let header = header_size(parts.len());
    let total = header + parts.iter().map(|p| p.len()).sum::<usize>() + 4;
    let mut out = Vec::with_capacity(total);
    out.extend_from_slice(magic);
    out.extend_from_slice(&VERSION.to_le_bytes());
    out.extend_from_slice(&flags.to_le_bytes());
    out.extend_from_slice(&key.length.to_le_bytes());
    out.extend_from_slice(&key.crc.to_le_bytes());
    out.extend_from_slice(&(entries as u32).to_le_bytes());
    out.extend_from_slice(&(header_len as u32).to_le_bytes());
    out.resize(FIXED, 0);
    let mut offset = header as u64;
    for part in parts {
        out.extend_from_slice(&offset.to_le_bytes());
        out.extend_from_slice(&(part.len() as u64).to_le_bytes());
        offset += part.len() as u64;
    }
    for part in parts {
        out.extend_from_slice(part);
    }
    let crc = crc32fast::hash(&out);
    out.extend_from_slice(&crc.to_le_bytes());
    out
}

/// The path of the sounds-like cache beside the headword cache `cache`.
fn sounds_path(cache: &Path) -> PathBuf {
    cache.with_extension("sounds")
}

/// Where an index opened for `store` gets its sounds-like maps when a query first asks: the
/// sounds cache when it matches the store, else built from a parse of the store's bytes (read
/// then, if they were not already) and saved to that cache.
fn sound_loader(store: Arc<StoreFile>, key: &StoreKey, policy: HeadwordPolicy, options: &IndexOptions) -> SoundLoader {
    let (key, options) = (key.clone(), options.clone());
    Arc::new(move || {
        let cache = sounds_path(&cache_path(store.path()));
        if let Ok(maps) = open_sounds(&cache, &key) {
            return maps;
        }
        // The headword cache matched these very bytes (checked against their checksum when read)
        // or they were just parsed, so a failure here means the file changed in place meanwhile
        // or memory ran out; no maps then, no panic.
        let Ok(lexicon) = store.whole().and_then(|bytes| Lexicon::parse(&bytes, store.path(), policy, LoadMode::Strict)) else {
            return SoundMaps::empty();
        };
        let maps = SoundMaps::build(&lexicon, &options);
        let mut parts: Vec<&[u8]> = maps.parts().to_vec();
        parts.push(&key.marks);
        // A sounds cache that cannot be written only means the next query builds again.
        let _ = write_cache(&cache, &encode(SOUNDS_MAGIC, &key, &parts, 0, 0, lexicon.entries().len()));
        maps
    })
}

/// Maps and checks the sounds-like cache at `path` against `key`.
fn open_sounds(path: &Path, key: &StoreKey) -> Result<SoundMaps, Stale> {
    let checked = open_checked(path, SOUNDS_MAGIC, key, SOUND_FILE_PARTS)?;
    let mut sections = checked.sections;
    sections.pop(); // the stress marks, compared by `open_checked`
    let parts: [Section; SOUND_PARTS] = sections.try_into().map_err(|_| Stale::Damaged("parts missing"))?;
    SoundMaps::from_parts(parts).ok_or(Stale::Damaged("sounds-like parts malformed"))
}

/// A cache file opened and checked.
struct Opened {
    index: LexiconIndex,
    rows: Option<Section>,
    header_len: usize,
    entries: usize,
}

fn u64_at(bytes: &[u8], at: usize) -> u64 {
    u64::from(read_u32(bytes, at)) | (u64::from(read_u32(bytes, at + 4)) << 32)
}

/// A cache file mapped, its checksum, key and settings checked, cut into its parts (the last
/// being the stress marks).
struct Checked {
    sections: Vec<Section>,
    flags: u32,
    entries: usize,
    header_len: usize,
}

/// Maps the cache file at `path` and checks it: `magic`, version, CRC-32, the store's key, the
/// headword policy and stress marks, and `parts` parts inside the file.
fn open_checked(path: &Path, magic: &[u8; 8], key: &StoreKey, parts: usize) -> Result<Checked, Stale> {
    let file = match std::fs::File::open(path) {
        Ok(file) => file,
        Err(err) if err.kind() == std::io::ErrorKind::NotFound => return Err(Stale::Missing),
        Err(_) => return Err(Stale::Damaged("cannot be read")),
    };
    // SAFETY: the cache is only ever replaced by rename (a new file), never changed in place, so
    // the mapped bytes stay as they are while mapped; they are checked before any use.
    let map = match unsafe { memmap2::MmapOptions::new().populate().map(&file) } {
        Ok(map) => Arc::new(map),
        Err(_) => return Err(Stale::Damaged("cannot be mapped")),
    };
    let bytes: &[u8] = &map;
    if bytes.len() < header_size(parts) + 4 {
        return Err(Stale::Damaged("truncated"));
    }
    if &bytes[..magic.len()] != magic {
        return Err(Stale::Damaged("not an index cache"));
    }
    let version = read_u32(bytes, 8);
    if version != VERSION {
        return Err(Stale::OtherVersion(version));
    }
    let (body, stored) = bytes.split_at(bytes.len() - 4);
    if crc32fast::hash(body) != read_u32(stored, 0) {
        return Err(Stale::Damaged("checksum mismatch"));
    }
    let flags = read_u32(bytes, 12);
    if u64_at(bytes, 16) != key.length || read_u32(bytes, 24) != key.crc {
        return Err(Stale::StoreChanged);
    }
    let entries = read_u32(bytes, 28) as usize;
    let header_len = read_u32(bytes, 32) as usize;
    let mut sections = Vec::with_capacity(parts);
    for i in 0..parts {
        let (offset, len) = (u64_at(bytes, FIXED + i * 16), u64_at(bytes, FIXED + i * 16 + 8));
        let section = usize::try_from(offset)
            .ok()
            .zip(usize::try_from(len).ok())
            .filter(|&(offset, len)| offset.saturating_add(len) <= body.len())
            .and_then(|(offset, len)| Section::mapped(&map, offset, len));
        sections.push(section.ok_or(Stale::Damaged("a part lies outside the file"))?);
    }
    let marks = sections.last().ok_or(Stale::Damaged("parts missing"))?;
    if (flags & FOLD_CASE != 0) != key.fold_case || marks.as_ref() != key.marks.as_slice() {
        return Err(Stale::OtherSettings);
    }
    Ok(Checked { sections, flags, entries, header_len })
}

/// Maps and checks the headword cache at `path` against `key`; the index it opens gets its
/// sounds-like maps from `loader`.
fn open_cache(path: &Path, key: &StoreKey, policy: HeadwordPolicy, options: &IndexOptions, loader: SoundLoader) -> Result<Opened, Stale> {
    let Checked { mut sections, flags, entries, header_len } = open_checked(path, MAGIC, key, PARTS)?;
    sections.pop(); // the stress marks
    let rows = sections.pop().ok_or(Stale::Damaged("parts missing"))?;
    let rows = if flags & HAS_ROWS != 0 {
        if rows.as_ref().len() != entries * ROW_BYTES {
            return Err(Stale::Damaged("row table of the wrong length"));
        }
        Some(rows)
    } else {
        None
    };
    let parts: [Section; WORD_PARTS] = sections.try_into().map_err(|_| Stale::Damaged("parts missing"))?;
    let index = LexiconIndex::from_word_parts(parts, policy, options.clone(), loader).ok_or(Stale::Damaged("index parts malformed"))?;
    Ok(Opened { index, rows, header_len, entries })
}

/// Writes the cache file by rename, creating its folder; unsynced, since a torn cache fails
/// its CRC on the next open and is rebuilt (see [`crate::safe_io::replace_derived`]).
fn write_cache(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    if let Some(folder) = path.parent() {
        std::fs::create_dir_all(folder)?;
    }
    crate::safe_io::replace_derived(path, bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Header of the headword file.
    const HEADER: usize = header_size(PARTS);

    const HEADER_LINE: &str = "word,pronunciation,status,source,score,note\n";

    fn store(dir: &Path, body: &str) -> PathBuf {
        let path = dir.join("lexicon.csv");
        std::fs::write(&path, format!("{HEADER_LINE}{body}")).unwrap();
        path
    }

    fn sample() -> String {
        let mut body = String::new();
        for i in 0..300 {
            body.push_str(&format!("word{i:03},W ER1 D {i},imported,test,,\n"));
            if i % 7 == 0 {
                body.push_str(&format!("word{i:03},W ER1 D,accepted,review,0.5,\"a note, with\nnewline\"\n"));
            }
        }
        body
    }

    /// Every entry through the cache equals the entry of a full load (the store's own parser).
    fn assert_same_as_full_load(path: &Path, policy: HeadwordPolicy) {
        let full = Lexicon::load(path, policy).unwrap();
        let opened = IndexedStore::open(path, policy).unwrap();
        let ids: Vec<EntryId> = (0..full.entries().len()).collect();
        assert_eq!(opened.entries(&ids).unwrap(), full.entries());
        for entry in full.entries() {
            let found = opened.entries(opened.index().lookup(&entry.word)).unwrap();
            assert!(found.contains(entry), "{entry:?}");
        }
    }

    #[test]
    fn rebuilt_when_missing_then_reused_and_rows_parse_alone() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        let first = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(first.state(), &CacheState::Rebuilt(Stale::Missing));
        assert!(cache_path(&path).exists());
        let again = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(again.state(), &CacheState::Reused);
        assert!(again.rows.is_some());
        assert_same_as_full_load(&path, HeadwordPolicy::default());
        let (lexicon, index) = again.into_parts().unwrap();
        assert_eq!(index.lookup("word007"), &[8, 9]);
        assert_eq!(lexicon.entries()[9].note, "a note, with\nnewline");
        // Rows "W ER1 D" follow every seventh word: 0, 7, …, 294.
        let homophones = index.sounds_like_unstressed("W ER D");
        assert_eq!(homophones.len(), 43);
        assert!(homophones.iter().all(|&id| lexicon.entries()[id].pronunciation == "W ER1 D"));
    }

    #[test]
    fn a_reused_cache_reads_rows_from_the_store_it_checked() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(opened.state(), &CacheState::Reused);
        // Another process saves by rename meanwhile: this command still sees the store it checked.
        let renamed = dir.path().join("saved.csv");
        std::fs::write(&renamed, format!("{HEADER_LINE}word001,X,imported,,,\n")).unwrap();
        std::fs::rename(&renamed, &path).unwrap();
        let rows = opened.entries(opened.index().lookup("word001")).unwrap();
        assert_eq!(rows.iter().map(|e| e.pronunciation.as_str()).collect::<Vec<_>>(), ["W ER1 D 1"]);
        // Written in place instead (same inode, other length): an error, not a mixture.
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap(); // rebuilds for the new content
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(opened.state(), &CacheState::Reused);
        std::fs::OpenOptions::new().append(true).open(&path).and_then(|mut f| std::io::Write::write_all(&mut f, b"word999,X,imported,,,\n")).unwrap();
        let err = opened.entries(opened.index().lookup("word001")).unwrap_err();
        assert!(matches!(err, LexiconError::ChangedWhileRead { .. }), "{err}");
        assert!(err.to_string().ends_with("changed on disk while it was being read; run the command again"), "{err}");
    }

    #[test]
    fn every_flipped_byte_is_detected_and_rebuilt() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        let cache = cache_path(&path);
        let good = std::fs::read(&cache).unwrap();
        // Header, part table, each part's start, the middle, and the checksum itself.
        let mut places = vec![0, 8, 12, 16, 24, 28, 32, FIXED, FIXED + 8, HEADER, good.len() / 2, good.len() - 1];
        places.extend((0..PARTS).map(|i| read_u32(&good, FIXED + i * 16) as usize).filter(|&o| o < good.len()));
        for at in places {
            let mut bad = good.clone();
            bad[at] ^= 0x20;
            std::fs::write(&cache, &bad).unwrap();
            let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
            assert!(matches!(opened.state(), CacheState::Rebuilt(Stale::Damaged(_) | Stale::OtherVersion(_))), "byte {at}: {:?}", opened.state());
            assert_eq!(std::fs::read(&cache).unwrap(), good, "byte {at}: rebuilt to the same bytes");
        }
        assert_same_as_full_load(&path, HeadwordPolicy::default());
    }

    #[test]
    fn sounds_like_maps_are_cached_apart_checked_and_rebuilt() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        let sounds = sounds_path(&cache_path(&path));
        let first = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(first.index().lookup("word007"), &[8, 9]);
        assert!(!sounds.exists(), "a headword look-up reads no sounds-like map");
        let expected = first.index().sounds_like_unstressed("W ER D").to_vec();
        assert_eq!(expected.len(), 43);
        let good = std::fs::read(&sounds).unwrap();
        let fresh = || IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(fresh().index().sounds_like_unstressed("W ER D"), expected, "read back from the sounds cache");
        for at in [0, 8, 16, 24, FIXED, header_size(SOUND_FILE_PARTS), good.len() / 2, good.len() - 1] {
            let mut bad = good.clone();
            bad[at] ^= 0x20;
            std::fs::write(&sounds, &bad).unwrap();
            let opened = fresh();
            assert_eq!(opened.state(), &CacheState::Reused, "the headword cache is still good");
            assert_eq!(opened.index().sounds_like_unstressed("W ER D"), expected, "byte {at}");
            assert_eq!(opened.index().sounds_like("W ER1 D").len(), 43, "byte {at}");
            assert_eq!(std::fs::read(&sounds).unwrap(), good, "byte {at}: rebuilt to the same bytes");
        }
        // The store changes: its sounds cache no longer matches and is rebuilt.
        std::fs::write(&path, format!("{HEADER_LINE}word001,W ER1 D,imported,test,,\n")).unwrap();
        assert_eq!(fresh().index().sounds_like_unstressed("W ER D"), &[0]);
        assert_ne!(std::fs::read(&sounds).unwrap(), good);
    }

    #[test]
    fn truncated_or_foreign_cache_is_rebuilt() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        let cache = cache_path(&path);
        let good = std::fs::read(&cache).unwrap();
        for cut in [0, 7, HEADER, good.len() - 1] {
            std::fs::write(&cache, &good[..cut]).unwrap();
            let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
            assert!(matches!(opened.state(), CacheState::Rebuilt(Stale::Damaged(_))), "cut {cut}: {:?}", opened.state());
        }
        std::fs::write(&cache, HEADER_LINE.repeat(20)).unwrap();
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(opened.state(), &CacheState::Rebuilt(Stale::Damaged("not an index cache")));
    }

    #[test]
    fn a_change_of_the_same_length_and_time_is_seen() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), "quay,K IY1,imported,,,\n");
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        let modified = std::fs::metadata(&path).unwrap().modified().unwrap();
        std::fs::write(&path, format!("{HEADER_LINE}quay,K EY1,imported,,,\n")).unwrap();
        std::fs::File::options().write(true).open(&path).unwrap().set_modified(modified).unwrap();
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(opened.state(), &CacheState::Rebuilt(Stale::StoreChanged));
        assert_eq!(opened.entries(&[0]).unwrap()[0].pronunciation, "K EY1");
    }

    #[test]
    fn another_policy_rebuilds() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), "Quay,K IY1,imported,,,\n");
        IndexedStore::open(&path, HeadwordPolicy { fold_case: false }).unwrap();
        let folded = IndexedStore::open(&path, HeadwordPolicy { fold_case: true }).unwrap();
        assert_eq!(folded.state(), &CacheState::Rebuilt(Stale::OtherSettings));
        assert_eq!(folded.index().lookup("quay"), &[0]);
    }

    #[test]
    fn unwritable_folder_still_answers() {
        // Running as root ignores permission bits, so the cache folder's place is taken by a
        // file: creating the folder fails as it does on a read-only folder.
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), &sample());
        std::fs::write(dir.path().join(CACHE_FOLDER), b"in the way").unwrap();
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert!(matches!(opened.state(), CacheState::Unsaved { stale: Stale::Damaged(_), .. }), "{:?}", opened.state());
        assert_eq!(opened.entries(opened.index().lookup("word010")).unwrap()[0].pronunciation, "W ER1 D 10");
        assert_eq!(std::fs::read(dir.path().join(CACHE_FOLDER)).unwrap(), b"in the way");
    }

    #[test]
    fn unsorted_crlf_bom_stores_locate_their_rows() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        let text = "\u{feff}word,pronunciation,status,source,score,note\r\n\r\nzed,Z EH1 D,imported,,,\r\nAble,EY1 B AH0 L,imported,,,\"two\r\nlines\"\r\n\r\nzed,Z IY1,accepted,,,\r\nable,EY1 B L,imported,,,";
        std::fs::write(&path, text).unwrap();
        for policy in [HeadwordPolicy { fold_case: true }, HeadwordPolicy { fold_case: false }] {
            IndexedStore::open(&path, policy).unwrap();
            let opened = IndexedStore::open(&path, policy).unwrap();
            assert_eq!(opened.state(), &CacheState::Reused);
            assert!(opened.rows.is_some());
            assert_same_as_full_load(&path, policy);
        }
    }

    #[test]
    fn records_not_on_their_own_lines_fall_back_to_a_full_parse() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("lexicon.csv");
        std::fs::write(&path, "word,pronunciation,status,source,score,note\rquay,K IY1,imported,,,\rpier,P IH1 R,imported,,,\r").unwrap();
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        let opened = IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_eq!(opened.state(), &CacheState::Reused);
        assert!(opened.rows.is_none());
        assert_same_as_full_load(&path, HeadwordPolicy::default());
        // A quote inside an unquoted field is a literal character to the parser, not a quote:
        // counting quotes then misplaces records, which the checks catch.
        std::fs::write(&path, format!("{HEADER_LINE}o\"neil,OW1 N IY1 L,imported,,,\nquay,K IY1,imported,,,\npier,P IH1 R,imported,,,\n")).unwrap();
        IndexedStore::open(&path, HeadwordPolicy::default()).unwrap();
        assert_same_as_full_load(&path, HeadwordPolicy::default());
    }

    #[test]
    fn a_malformed_store_is_an_error_and_writes_no_cache() {
        let dir = tempfile::tempdir().unwrap();
        let path = store(dir.path(), "quay,K IY1,approved,,,\n");
        assert!(matches!(IndexedStore::open(&path, HeadwordPolicy::default()), Err(LexiconError::Parse(_))));
        assert!(!dir.path().join(CACHE_FOLDER).exists());
    }
}
