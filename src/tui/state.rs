//! The review screen's state: the queue, the decisions in force, where the cursor is, which
//! overlay is open, and the results of lookups the terminal loop ran for it.
//!
//! Plain data plus read-only questions about it ("which items are visible?", "how far along are
//! we?"). Changing it is `update`'s job; drawing it is the view's.

use std::cell::OnceCell;
use std::collections::{BTreeMap, HashMap};
use std::sync::Arc;

use super::editor::Editor;
use super::filter::Filter;
use crate::queue::ItemState;
use super::phones::PhoneCheck;
use crate::queue::{Candidate, Decision, Item, Ledger, Record, Threshold};
use crate::variants::FeatureView;

/// A word with one of its pronunciations, as shown in the neighbour and search panels.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct WordPron {
    /// The headword as written in the lexicon.
    pub word: String,
    /// Its pronunciation.
    pub pronunciation: String,
}

/// The selected candidate set against another form, position by position: the variants'
/// [`FeatureView`] with the candidate as its variant side and the other form as its canonical
/// side (no feature rows when the pronunciations do not parse in the phoneset).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Comparison {
    /// What the candidate is compared with ("canonical K AE1 T", "neighbour: cap").
    pub against: String,
    /// The aligned phones and feature rows.
    pub view: FeatureView,
}

/// Lexicon neighbours of the current item and its selected candidate.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Neighbours {
    /// Item key and candidate pronunciation these were computed for.
    pub for_key: String,
    /// The pronunciation they were computed for.
    pub for_pronunciation: String,
    /// Words a few spelling edits away (Levenshtein), nearest first.
    pub spelling: Vec<WordPron>,
    /// The longest ending shared with some lexicon words, and those words.
    pub ending: String,
    /// Words sharing [`ending`](Neighbours::ending).
    pub rhymes: Vec<WordPron>,
    /// Words already pronounced exactly like the selected candidate.
    pub homophones: Vec<WordPron>,
    /// The candidate against its closest neighbour or the canonical form.
    pub features: Option<Comparison>,
}

/// How `/` searches the lexicon.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SearchMode {
    /// The headword itself.
    Exact,
    /// Headwords starting with the text.
    Prefix,
    /// Headwords within two edits.
    Fuzzy,
}

impl SearchMode {
    /// The next mode (Tab cycles).
    pub fn next(self) -> SearchMode {
        match self {
            SearchMode::Exact => SearchMode::Prefix,
            SearchMode::Prefix => SearchMode::Fuzzy,
            SearchMode::Fuzzy => SearchMode::Exact,
        }
    }

    /// Lower-case name.
    pub fn name(self) -> &'static str {
        match self {
            SearchMode::Exact => "exact",
            SearchMode::Prefix => "prefix",
            SearchMode::Fuzzy => "fuzzy",
        }
    }
}

/// The search overlay.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SearchBox {
    /// Query text.
    pub query: String,
    /// Search mode.
    pub mode: SearchMode,
    /// Results of the last search run for `query`.
    pub hits: Vec<WordPron>,
    /// Index of the highlighted result (↑/↓ move it, Enter opens it).
    pub selected: usize,
}

impl SearchBox {
    /// An empty prefix search.
    pub fn new() -> SearchBox {
        SearchBox { query: String::new(), mode: SearchMode::Prefix, hits: Vec::new(), selected: 0 }
    }
}

impl Default for SearchBox {
    fn default() -> SearchBox {
        SearchBox::new()
    }
}

/// A question the screen asks before it journals a decision (`y` writes it, any other key
/// drops it).
#[derive(Debug, Clone, PartialEq)]
pub struct Confirm {
    /// What is asked, e.g. "Kelport was accepted /…/; replace with rejected?".
    pub question: String,
    /// The decision written on `y`.
    pub decision: Decision,
}

/// Which overlay or field has the keyboard.
#[derive(Debug, Clone, PartialEq)]
pub enum Mode {
    /// Moving and deciding.
    Normal,
    /// The phone editor is open.
    Edit(Editor),
    /// The lexicon search overlay is open.
    Search(SearchBox),
    /// The filter line is open (text being typed, last parse error).
    Filter(String, Option<String>),
    /// The reviewer's note for the current item is being typed.
    Note(String),
    /// The key help overlay is open.
    Help,
    /// A decision waits for `y` (it would replace one in force, or deprecate an entry).
    Confirm(Confirm),
    /// A lexicon entry opened from the search: `c` change, `v` add a variant, `d` deprecate.
    Entry(WordPron),
    /// A score threshold is being typed for a batch decision on the items shown (`A`: accept
    /// those at or above it, `X`: reject those below it); the text and the last parse error.
    Threshold(Threshold, String, Option<String>),
    /// A batch decision waits for `y`.
    ConfirmBatch(BatchConfirm),
}

/// A batch decision waiting for `y`: one decision per shown pending item that passed the threshold.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchConfirm {
    /// What is asked, with the count and the expected number wrong.
    pub question: String,
    /// The decisions written on `y`.
    pub decisions: Vec<Decision>,
}

/// Progress of background work (guessing, variant generation).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct JobProgress {
    /// What is being done.
    pub label: String,
    /// Steps done.
    pub done: usize,
    /// Steps in all.
    pub total: usize,
}

/// A journal write the screen is waiting for.
#[derive(Debug, Clone, PartialEq)]
pub enum PendingWrite {
    /// A decision; `redo` when it re-makes an undone decision.
    Decide {
        /// Whether this came from the redo stack.
        redo: bool,
    },
    /// Undoing this decision.
    Revoke(Decision),
    /// A batch of decisions (one journal write).
    Batch,
}

/// Whether everything shown as decided is on disk.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum SaveState {
    /// Every decision is in the journal (last sequence number written).
    Saved(u64),
    /// A write is in flight.
    Writing,
    /// The last write failed; the decision was not taken.
    Failed(String),
}

/// How far the review is: see [`App::progress`].
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Progress {
    /// Items decided, set aside or applied.
    pub done: usize,
    /// All items.
    pub total: usize,
    /// (done, total) per item origin (the file or profile an item came from, else its kind).
    pub by_origin: BTreeMap<String, (usize, usize)>,
}

/// The whole screen state.
pub struct App {
    /// Title (project folder or lexicon name).
    pub title: String,
    /// Queue items in review order.
    pub items: Vec<Item>,
    /// `items[i].key()`, computed once.
    pub keys: Vec<String>,
    /// Decisions in force (replayed from the journal, then kept up to date through
    /// [`App::record`], which also drops the memoised [`App::progress`]).
    ledger: Ledger,
    /// [`App::progress`], computed at most once between two decisions (a frame asks for it
    /// twice, and at 50,000 items a count costs milliseconds).
    progress_memo: OnceCell<Progress>,
    /// Index into `items` of the item on screen.
    pub cursor: usize,
    /// Index of the selected candidate of that item.
    pub selected: usize,
    /// Which overlay has the keyboard.
    pub mode: Mode,
    /// The queue filter in force.
    pub filter: Filter,
    /// Decisions (by sequence number) that `u` can revoke, newest last.
    pub undo: Vec<u64>,
    /// Undone decisions that Ctrl-r can re-make, newest last.
    pub redo: Vec<Decision>,
    /// The journal write being waited for.
    pub pending: Option<PendingWrite>,
    /// Save state for the status bar.
    pub save: SaveState,
    /// Lexicon neighbours of the current item (from the terminal loop).
    pub neighbours: Option<Neighbours>,
    /// Background work in progress.
    pub job: Option<JobProgress>,
    /// One-line message for the status bar.
    pub message: String,
    /// Phone knowledge for validation and completion.
    pub phones: Arc<dyn PhoneCheck>,
    /// Name put in the note of accepted entries.
    pub reviewer: String,
    /// Reviewer's notes typed with `m`, by item key, waiting for that item's next decision
    /// (kept until the decision is on disk, so a failed write loses nothing).
    pub notes: HashMap<String, String>,
    /// Set once `q` or Ctrl-c was pressed.
    pub quitting: bool,
    /// Show pronunciations in IPA (`i` toggles) instead of the phoneset's symbols.
    pub ipa: bool,
    /// Wall-clock time in seconds since 1970 (set by the terminal loop; 0 = unknown), written
    /// into each decision's note.
    pub now: u64,
    /// Index of each key in `keys` (so a 100,000-item queue finds an item without a scan).
    positions: HashMap<String, usize>,
    /// Position of the first item of each lower-cased word (the search jumps through it).
    words: HashMap<String, usize>,
}

impl App {
    /// A screen over `items`, with decisions replayed into `ledger`. The cursor starts on the
    /// first pending item.
    pub fn new(title: &str, items: Vec<Item>, ledger: Ledger, phones: Arc<dyn PhoneCheck>) -> App {
        let undo = ledger.unapplied().iter().map(|(seq, _)| *seq).collect();
        let save = SaveState::Saved(ledger.last_seq());
        let keys: Vec<String> = items.iter().map(Item::key).collect();
        let positions = keys.iter().enumerate().map(|(i, k)| (k.clone(), i)).collect();
        let mut words = HashMap::new();
        for (i, item) in items.iter().enumerate() {
            words.entry(item.word.to_lowercase()).or_insert(i);
        }
        let mut app = App {
            title: title.to_string(),
            keys,
            positions,
            words,
            items,
            ledger,
            progress_memo: OnceCell::new(),
            cursor: 0,
            selected: 0,
            mode: Mode::Normal,
            filter: Filter::default(),
            undo,
            redo: Vec::new(),
            pending: None,
            save,
            neighbours: None,
            job: None,
            message: String::new(),
            phones,
            reviewer: String::new(),
            notes: HashMap::new(),
            quitting: false,
            ipa: false,
            now: 0,
        };
        if let Some(first) = app.next_pending_from(0) {
            app.cursor = first;
        }
        app
    }

    /// The position of the item with this key.
    pub fn position_of(&self, key: &str) -> Option<usize> {
        self.positions.get(key).copied()
    }

    /// The position of the first queued item about `word` (any case).
    pub fn position_of_word(&self, word: &str) -> Option<usize> {
        self.words.get(&word.to_lowercase()).copied()
    }

    /// The item on screen: the cursor's item when it passes the filter. Keys act on this item
    /// only; `None` when the queue is empty or the filter hides everything.
    pub fn current(&self) -> Option<&Item> {
        self.items.get(self.cursor).filter(|_| self.visible(self.cursor))
    }

    /// The key of [`current`](Self::current).
    pub fn current_key(&self) -> Option<&str> {
        self.current().and(self.keys.get(self.cursor)).map(String::as_str)
    }

    /// Why no item is on screen (for keys that need one).
    pub fn nothing_shown(&self) -> String {
        if self.items.is_empty() {
            "the queue is empty".to_string()
        } else {
            format!("no item matches the filter `{}`; press f to change it", self.filter.text())
        }
    }

    /// A pronunciation as the display toggle asks: IPA (when the phone knowledge has it) or
    /// the phoneset's symbols.
    pub fn shown_pronunciation(&self, pronunciation: &str) -> String {
        if self.ipa {
            if let Some(ipa) = self.phones.ipa(pronunciation) {
                return ipa;
            }
        }
        pronunciation.to_string()
    }

    /// The selected candidate of the item on screen.
    pub fn current_candidate(&self) -> Option<&Candidate> {
        self.current().and_then(|i| i.candidates.get(self.selected))
    }

    /// Review state of item `i`.
    pub fn state_of(&self, i: usize) -> ItemState {
        match self.keys.get(i) {
            Some(key) => {
                let current = self.ledger.current(key).map(|(_, d)| &d.action);
                ItemState::of(current, self.ledger.is_applied(key))
            }
            None => ItemState::Pending,
        }
    }

    /// Whether item `i` passes the filter.
    pub fn visible(&self, i: usize) -> bool {
        self.items.get(i).is_some_and(|item| self.filter.matches(item, self.state_of(i)))
    }

    /// The first visible pending item at or after `from`, wrapping around.
    pub fn next_pending_from(&self, from: usize) -> Option<usize> {
        let n = self.items.len();
        (0..n).map(|k| (from + k) % n).find(|&i| self.visible(i) && self.state_of(i) == ItemState::Pending)
    }

    /// The nearest visible item after (`forward`) or before the cursor, wrapping around.
    pub fn step_visible(&self, forward: bool) -> Option<usize> {
        let n = self.items.len();
        (1..=n)
            .map(|k| if forward { (self.cursor + k) % n } else { (self.cursor + n * 2 - k) % n })
            .find(|&i| self.visible(i))
    }

    /// Decisions in force.
    pub fn ledger(&self) -> &Ledger {
        &self.ledger
    }

    /// Takes journal record `seq` into the ledger (after it was written).
    pub fn record(&mut self, seq: u64, record: &Record) {
        self.ledger.record(seq, record);
        self.progress_memo = OnceCell::new();
    }

    /// Done (decided, set aside or applied) and total, overall and per item origin.
    pub fn progress(&self) -> &Progress {
        self.progress_memo.get_or_init(|| {
            let mut by: BTreeMap<&str, (usize, usize)> = BTreeMap::new();
            let mut done = 0;
            for (i, item) in self.items.iter().enumerate() {
                let origin = if item.origin.is_empty() { item.kind.tag() } else { item.origin.as_str() };
                let slot = by.entry(origin).or_default();
                slot.1 += 1;
                if self.state_of(i) != ItemState::Pending {
                    slot.0 += 1;
                    done += 1;
                }
            }
            let by_origin = by.into_iter().map(|(origin, counts)| (origin.to_string(), counts)).collect();
            Progress { done, total: self.items.len(), by_origin }
        })
    }
}
