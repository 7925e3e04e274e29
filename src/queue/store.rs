//! The queue file: review items kept next to the lexicon, one JSON object per line after a
//! header line `{"orthoepy_queue":1}`. Saving is atomic (temporary file, fsync, rename); adding
//! an item whose key is already queued merges the two.
//!
//! Holds items only; what was decided about them lives in the journal.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use super::error::QueueError;
use super::fileio::{read_lines, MAX_QUEUE};
use crate::support::read::read_capped;
use crate::safe_io::atomic_write;
use super::item::Item;

/// Format version written in the header line.
pub const QUEUE_FORMAT: u32 = 1;

#[derive(Serialize, Deserialize)]
struct Header {
    orthoepy_queue: u32,
}

/// The list of items waiting for review, in review order.
#[derive(Debug, Clone, Default)]
pub struct Queue {
    items: Vec<Item>,
    by_key: HashMap<String, usize>,
    path: Option<PathBuf>,
}

/// What [`Queue::add`] or [`Queue::refresh`] did with an item.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Added {
    /// The item was new and appended.
    New,
    /// An item with the same key was queued; the two were merged and the queued one changed.
    Merged,
    /// An item with the same key was queued and already said everything this one says.
    Unchanged,
}

impl Queue {
    /// An empty in-memory queue.
    pub fn new() -> Queue {
        Queue::default()
    }

    /// Read a queue file; a missing file is an empty queue bound to that path.
    ///
    /// ```
    /// use orthoepy::queue::{Item, Queue};
    /// let dir = tempfile::tempdir().unwrap();
    /// let path = dir.path().join("queue.jsonl");
    /// let mut q = Queue::load(&path).unwrap();
    /// q.add(Item::new_word("Saltmarsh"));
    /// q.save().unwrap();
    /// assert_eq!(Queue::load(&path).unwrap().items().len(), 1);
    /// ```
    pub fn load(path: &Path) -> Result<Queue, QueueError> {
        let bytes = match read_capped(path, MAX_QUEUE) {
            Ok(bytes) => bytes,
            Err(e) if e.is_not_found() => return Ok(Queue { path: Some(path.to_path_buf()), ..Queue::default() }),
            Err(e) => return Err(e.into()),
        };
        Queue::from_reader(bytes.as_slice(), path)
    }

    /// Parse queue file bytes; the queue is bound to `path`, which also names the file in errors.
    /// Empty input is an empty queue, as a missing file is for [`Queue::load`].
    ///
    /// ```
    /// use orthoepy::queue::{Item, Queue};
    /// let path = std::path::Path::new("queue.jsonl");
    /// let mut q = Queue::new();
    /// q.add(Item::new_word("Saltmarsh"));
    /// let again = Queue::parse(&q.to_bytes().unwrap(), path).unwrap();
    /// assert_eq!(again.items(), q.items());
    /// assert!(Queue::parse(b"{\"orthoepy_queue\":9}\n", path).is_err());
    /// ```
    pub fn parse(bytes: &[u8], path: &Path) -> Result<Queue, QueueError> {
        Queue::from_reader(bytes, path)
    }

    fn from_reader(reader: impl std::io::Read, path: &Path) -> Result<Queue, QueueError> {
        let mut queue = Queue { path: Some(path.to_path_buf()), ..Queue::default() };
        let lines = read_lines(reader).map_err(|e| QueueError::from_lines(path, e))?;
        for raw in lines.iter().filter(|l| !l.text.trim().is_empty()) {
            if raw.number == 1 {
                let header: Header = serde_json::from_str(&raw.text).map_err(|e| {
                    QueueError::parse(path, 1, e.column(), format!("not a queue header ({e}); expected {{\"orthoepy_queue\":1}}"))
                })?;
                if header.orthoepy_queue != QUEUE_FORMAT {
                    return Err(QueueError::parse(path, 1, 0, format!(
                        "queue format {} is not supported (this build reads {QUEUE_FORMAT}); upgrade orthoepy",
                        header.orthoepy_queue
                    )));
                }
                continue;
            }
            let item: Item = serde_json::from_str(&raw.text).map_err(|e| {
                QueueError::parse(path, raw.number, e.column(), format!("bad queue item: {e}; fix or delete this line"))
            })?;
            queue.add(item);
        }
        Ok(queue)
    }

    /// Add an item, merging it into a queued item with the same key.
    pub fn add(&mut self, item: Item) -> Added {
        let key = item.key();
        match self.by_key.get(&key) {
            Some(&i) => {
                if let Some(have) = self.items.get_mut(i) {
                    have.merge(item);
                }
                Added::Merged
            }
            None => {
                self.by_key.insert(key, self.items.len());
                self.items.push(item);
                Added::New
            }
        }
    }

    /// Add an item from a later reading of its sources: a queued item with the same key is
    /// refreshed ([`Item::refresh`]: the counts of the item's origins are replaced, not added).
    ///
    /// ```
    /// use orthoepy::queue::{Added, Item, Queue};
    /// let mut q = Queue::new();
    /// let mut item = Item::new_word("Kelport");
    /// item.seen_in("corpus:queries.txt", 4);
    /// assert_eq!(q.refresh(item.clone()), Added::New);
    /// assert_eq!(q.refresh(item), Added::Unchanged);
    /// assert_eq!(q.items()[0].count, 4);
    /// ```
    pub fn refresh(&mut self, item: Item) -> Added {
        match self.by_key.get(&item.key()).and_then(|&i| self.items.get_mut(i)) {
            Some(have) => {
                if have.refresh(item) {
                    Added::Merged
                } else {
                    Added::Unchanged
                }
            }
            None => self.add(item),
        }
    }

    /// Drops the count `origin` gave to every queued item except those in `keep` (keys): the
    /// origin was read again and no longer lists them. Returns how many items changed.
    pub fn forget_origin_except(&mut self, origin: &str, keep: &std::collections::HashSet<String>) -> usize {
        let mut changed = 0;
        for item in self.items.iter_mut().filter(|i| !keep.contains(&i.key())) {
            let before = item.count;
            item.forget_origin(origin);
            changed += usize::from(item.count != before);
        }
        changed
    }

    /// Drops the items whose keys are in `keys`; returns how many were dropped.
    pub fn remove_keys(&mut self, keys: &std::collections::HashSet<String>) -> usize {
        let before = self.items.len();
        self.items.retain(|i| !keys.contains(&i.key()));
        self.reindex();
        before - self.items.len()
    }

    /// The items in review order.
    pub fn items(&self) -> &[Item] {
        &self.items
    }

    /// Find a queued item by key.
    pub fn get(&self, key: &str) -> Option<&Item> {
        self.by_key.get(key).and_then(|&i| self.items.get(i))
    }

    /// Replace a queued item's candidates (e.g. once guessing has finished).
    pub fn set_candidates(&mut self, key: &str, candidates: Vec<super::Candidate>) {
        if let Some(item) = self.by_key.get(key).and_then(|&i| self.items.get_mut(i)) {
            item.candidates = candidates;
        }
    }

    /// Reorder items: highest corpus count first, ties in their current order.
    pub fn sort_by_count(&mut self) {
        self.items.sort_by_key(|i| std::cmp::Reverse(i.count));
        self.reindex();
    }

    fn reindex(&mut self) {
        self.by_key = self.items.iter().enumerate().map(|(i, it)| (it.key(), i)).collect();
    }

    /// The file this queue was loaded from, if any.
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }

    /// Write the queue back to the file it was loaded from, atomically.
    pub fn save(&self) -> Result<(), QueueError> {
        match &self.path {
            Some(p) => self.save_as(p),
            None => Err(QueueError::io(
                Path::new("<queue>"),
                std::io::Error::new(std::io::ErrorKind::NotFound, "in-memory queue has no file; use save_as"),
            )),
        }
    }

    /// The bytes [`save_as`](Self::save_as) writes: the header line, then one JSON item per line.
    pub fn to_bytes(&self) -> Result<Vec<u8>, serde_json::Error> {
        let mut text = serde_json::to_string(&Header { orthoepy_queue: QUEUE_FORMAT })?;
        text.push('\n');
        for item in &self.items {
            text.push_str(&serde_json::to_string(item)?);
            text.push('\n');
        }
        Ok(text.into_bytes())
    }

    /// Write the queue to `path`, atomically.
    pub fn save_as(&self, path: &Path) -> Result<(), QueueError> {
        let bytes = self.to_bytes().map_err(|e| QueueError::io(path, e.into()))?;
        atomic_write(path, &bytes, false).map_err(|e| QueueError::io(path, e))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::queue::Candidate;

    #[test]
    fn a_candidate_score_survives_write_and_read() {
        // Found by the `queue_file` fuzz target: 1.1076693999740562 read back as
        // 1.1076693999740561 with serde_json's default float parsing, so every save moved the
        // score; the `float_roundtrip` feature parses exactly.
        let path = Path::new("q.jsonl");
        let text = include_bytes!("../../fuzz/regressions/queue_file/float-score.jsonl");
        let first = Queue::parse(text, path).unwrap();
        assert_eq!(first.items()[0].candidates[0].score, Some(1.1076693999740562));
        let again = Queue::parse(&first.to_bytes().unwrap(), path).unwrap();
        assert_eq!(first.items(), again.items());
    }

    #[test]
    fn adding_twice_merges_and_survives_reload() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("q.jsonl");
        let mut q = Queue::load(&path).unwrap();
        let mut a = Item::new_word("Kelport");
        a.count = 4;
        assert_eq!(q.add(a), Added::New);
        let mut b = Item::new_word("kelport");
        b.count = 1;
        b.candidates.push(Candidate::new("K EH1 L P AO2 R T", "g2p"));
        assert_eq!(q.add(b), Added::Merged);
        q.save().unwrap();
        let back = Queue::load(&path).unwrap();
        assert_eq!(back.items().len(), 1);
        assert_eq!(back.items()[0].count, 5);
        assert_eq!(back.items()[0].candidates.len(), 1);
    }

    #[test]
    fn bad_line_names_line_and_column() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("q.jsonl");
        std::fs::write(&path, "{\"orthoepy_queue\":1}\n{\"word\":\"a\",\"kind\":\"new_word\"}\n{\"word\":}\n").unwrap();
        let err = Queue::load(&path).unwrap_err().to_string();
        assert!(err.contains("q.jsonl:3:"), "{err}");
    }

    #[test]
    fn future_format_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("q.jsonl");
        std::fs::write(&path, "{\"orthoepy_queue\":9}\n").unwrap();
        assert!(Queue::load(&path).unwrap_err().to_string().contains("upgrade"));
    }

    #[test]
    fn sort_by_count_keeps_lookup_working() {
        let mut q = Queue::new();
        let mut a = Item::new_word("a");
        a.count = 1;
        let mut b = Item::new_word("b");
        b.count = 9;
        q.add(a);
        q.add(b);
        q.sort_by_count();
        assert_eq!(q.items()[0].word, "b");
        assert_eq!(q.get("new:a").map(|i| i.count), Some(1));
    }
}
