//! The review screen's behaviour: `update(&mut App, Event) -> Vec<Effect>`.
//!
//! Pure: it reads and changes the [`App`] and asks for outside work by returning [`Effect`]s
//! (append to the journal, look up neighbours, search, quit) that the terminal loop carries out,
//! feeding the outcome back as another [`Event`]. A decision is only shown as made once its
//! [`Event::Journaled`] arrives, i.e. once it is on disk.

use super::editor::Editor;
use super::filter::Filter;
use super::state::{App, JobProgress, Mode, Neighbours, PendingWrite, SaveState, SearchBox, SearchMode, WordPron};
use crate::queue::{Action, Candidate, Decision, ItemKind, Record};

/// A key press, independent of the terminal library.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Key {
    /// A printable character.
    Char(char),
    /// A character with Ctrl held.
    Ctrl(char),
    /// Arrow up.
    Up,
    /// Arrow down.
    Down,
    /// Arrow left.
    Left,
    /// Arrow right.
    Right,
    /// Home.
    Home,
    /// End.
    End,
    /// Enter.
    Enter,
    /// Escape.
    Esc,
    /// Tab.
    Tab,
    /// Backspace.
    Backspace,
    /// Delete.
    Delete,
}

/// Something that happened.
#[derive(Debug, Clone, PartialEq)]
pub enum Event {
    /// A key was pressed.
    Key(Key),
    /// The terminal was resized (the next draw uses the new size).
    Resize(u16, u16),
    /// A journal append finished and is on disk.
    Journaled {
        /// Its sequence number.
        seq: u64,
        /// What was written.
        record: Record,
    },
    /// A journal append failed; nothing was recorded.
    JournalFailed(String),
    /// Neighbours asked for with [`Effect::LoadNeighbours`].
    Neighbours(Neighbours),
    /// Results of [`Effect::RunSearch`].
    SearchResults {
        /// The query they answer.
        query: String,
        /// The mode they answer.
        mode: SearchMode,
        /// Matching words with pronunciations.
        hits: Vec<WordPron>,
    },
    /// Background work advanced.
    Progress(JobProgress),
    /// Background work produced candidates for an item.
    Candidates {
        /// Item key.
        key: String,
        /// New candidates, best first.
        candidates: Vec<Candidate>,
    },
    /// Background work finished.
    JobDone,
}

/// Work for the terminal loop.
#[derive(Debug, Clone, PartialEq)]
pub enum Effect {
    /// Append this record to the journal, fsync, and answer with [`Event::Journaled`] or
    /// [`Event::JournalFailed`].
    AppendJournal(Record),
    /// Look up lexicon neighbours and answer with [`Event::Neighbours`].
    LoadNeighbours {
        /// Item key (echoed back).
        key: String,
        /// The item's word.
        word: String,
        /// The selected candidate's pronunciation (may be empty).
        pronunciation: String,
        /// For variants and audit findings: the form to compare with.
        compare_with: Option<String>,
    },
    /// Search the lexicon and answer with [`Event::SearchResults`].
    RunSearch {
        /// Query text.
        query: String,
        /// Search mode.
        mode: SearchMode,
    },
    /// Leave the screen.
    Quit,
}

/// Apply one event to the state.
///
/// ```
/// use std::sync::Arc;
/// use orthoepy::queue::{Candidate, Item, Ledger};
/// use orthoepy::tui::{update, App, Effect, Event, Key, SymbolList};
/// let mut item = Item::new_word("quay");
/// item.candidates.push(Candidate::new("K IY1", "g2p"));
/// let phones = Arc::new(SymbolList::new("t", &["K"], &["IY"], &["1"]));
/// let mut app = App::new("demo", vec![item], Ledger::default(), phones);
/// let effects = update(&mut app, Event::Key(Key::Enter));
/// assert!(matches!(effects.first(), Some(Effect::AppendJournal(_))));
/// ```
pub fn update(app: &mut App, event: Event) -> Vec<Effect> {
    let mut effects = match event {
        Event::Key(Key::Ctrl('c')) => quit(app),
        Event::Key(key) => on_key(app, key),
        Event::Resize(..) => Vec::new(),
        Event::Journaled { seq, record } => on_journaled(app, seq, record),
        Event::JournalFailed(message) => {
            app.pending = None;
            app.message = format!("NOT SAVED: {message}");
            app.save = SaveState::Failed(message);
            Vec::new()
        }
        Event::Neighbours(n) => {
            app.neighbours = Some(n);
            Vec::new()
        }
        Event::SearchResults { query, mode, hits } => {
            if let Mode::Search(b) = &mut app.mode {
                if b.query == query && b.mode == mode {
                    b.hits = hits;
                }
            }
            Vec::new()
        }
        Event::Progress(p) => {
            app.job = Some(p);
            Vec::new()
        }
        Event::Candidates { key, candidates } => {
            if let Some(i) = app.position_of(&key) {
                if let Some(item) = app.items.get_mut(i) {
                    item.candidates = candidates;
                }
                if i == app.cursor {
                    app.selected = 0;
                }
            }
            Vec::new()
        }
        Event::JobDone => {
            app.job = None;
            Vec::new()
        }
    };
    if !app.quitting {
        effects.extend(refresh_neighbours(app));
    }
    effects
}

fn quit(app: &mut App) -> Vec<Effect> {
    app.quitting = true;
    vec![Effect::Quit]
}

/// Ask for neighbours when the item or the selected candidate changed.
fn refresh_neighbours(app: &App) -> Option<Effect> {
    let item = app.current()?;
    let key = app.keys.get(app.cursor)?;
    let pronunciation = match &app.mode {
        Mode::Edit(ed) => ed.text.trim().to_string(),
        _ => app.current_candidate().map(|c| c.pronunciation.clone()).unwrap_or_default(),
    };
    let fresh = app.neighbours.as_ref().is_some_and(|n| n.for_key == *key && n.for_pronunciation == pronunciation);
    if fresh {
        return None;
    }
    let compare_with = match &item.kind {
        ItemKind::NewWord => None,
        ItemKind::Variant { canonical, .. } => Some(canonical.clone()),
        ItemKind::Audit { current, .. } => Some(current.clone()),
    };
    Some(Effect::LoadNeighbours { key: key.clone(), word: item.word.clone(), pronunciation, compare_with })
}

fn on_key(app: &mut App, key: Key) -> Vec<Effect> {
    match std::mem::replace(&mut app.mode, Mode::Normal) {
        Mode::Normal => normal_key(app, key),
        Mode::Help => Vec::new(),
        Mode::Edit(ed) => edit_key(app, ed, key),
        Mode::Search(b) => search_key(app, b, key),
        Mode::Filter(text, _) => filter_key(app, text, key),
        Mode::Note(text) => note_key(app, text, key),
    }
}

fn normal_key(app: &mut App, key: Key) -> Vec<Effect> {
    let n_cands = app.current().map_or(0, |i| i.candidates.len());
    match key {
        Key::Char('q') => return quit(app),
        Key::Up | Key::Char('k') => app.selected = app.selected.saturating_sub(1),
        Key::Down | Key::Char('j') if app.selected + 1 < n_cands => app.selected += 1,
        Key::Char(c @ '1'..='9') => {
            let i = (c as usize) - ('1' as usize);
            if i < n_cands {
                app.selected = i;
            } else {
                app.message = format!("no candidate {c}");
            }
        }
        Key::Enter => return accept_selected(app),
        Key::Char('x') => return decide(app, Action::Reject, String::new()),
        Key::Char('s') => return decide(app, Action::SetAside, String::new()),
        Key::Char('e') if app.current().is_some() => {
            let text = app.current_candidate().map(|c| c.pronunciation.clone()).unwrap_or_default();
            app.mode = Mode::Edit(Editor::new(&text));
        }
        Key::Char('n') => move_to(app, app.step_visible(true)),
        Key::Char('p') => move_to(app, app.step_visible(false)),
        Key::Char('u') => return undo(app),
        Key::Ctrl('r') => return redo(app),
        Key::Char('/') => {
            app.mode = Mode::Search(SearchBox { query: String::new(), mode: SearchMode::Prefix, hits: Vec::new() })
        }
        Key::Char('f') => app.mode = Mode::Filter(app.filter.text().to_string(), None),
        Key::Char('m') => match app.keys.get(app.cursor) {
            Some(key) => app.mode = Mode::Note(app.notes.get(key).cloned().unwrap_or_default()),
            None => app.message = "the queue is empty".into(),
        },
        Key::Char('?') => app.mode = Mode::Help,
        _ => {}
    }
    Vec::new()
}

fn move_to(app: &mut App, target: Option<usize>) {
    match target {
        Some(i) => {
            app.cursor = i;
            app.selected = 0;
        }
        None => app.message = "no item matches the filter".into(),
    }
}

fn accept_selected(app: &mut App) -> Vec<Effect> {
    match app.current_candidate().cloned() {
        Some(c) => {
            let note = if c.rules.is_empty() { String::new() } else { format!("rules: {}", c.rules.join(", ")) };
            let action =
                Action::Accept { pronunciation: c.pronunciation, source: c.source, score: c.score, edited: false };
            decide(app, action, note)
        }
        None => {
            app.message = "no candidate to accept; press e to type one".into();
            Vec::new()
        }
    }
}

fn decide(app: &mut App, action: Action, detail: String) -> Vec<Effect> {
    if app.pending.is_some() {
        app.message = "still saving the last decision…".into();
        return Vec::new();
    }
    let (Some(item), Some(key)) = (app.current(), app.keys.get(app.cursor)) else {
        app.message = "the queue is empty".into();
        return Vec::new();
    };
    if app.ledger.is_applied(key) {
        app.message = format!("{} is already merged into the lexicon", item.word);
        return Vec::new();
    }
    let typed = app.notes.get(key).map(|n| format!("note: {n}")).unwrap_or_default();
    let reviewer = if app.reviewer.is_empty() { String::new() } else { format!("reviewed by {}", app.reviewer) };
    let note = [reviewer, detail, typed].into_iter().filter(|part| !part.is_empty()).collect::<Vec<_>>().join("; ");
    let decision = Decision { item: key.clone(), word: item.word.clone(), action, note };
    app.pending = Some(PendingWrite::Decide { redo: false });
    app.save = SaveState::Writing;
    vec![Effect::AppendJournal(Record::Decide(decision))]
}

fn undo(app: &mut App) -> Vec<Effect> {
    if app.pending.is_some() {
        return Vec::new();
    }
    let Some(&seq) = app.undo.last() else {
        app.message = "nothing to undo".into();
        return Vec::new();
    };
    if seq <= app.ledger.applied_through() {
        app.message = "that decision is already merged into the lexicon; it cannot be undone here".into();
        return Vec::new();
    }
    let decision = app
        .keys
        .iter()
        .filter_map(|k| app.ledger.current(k))
        .find(|(s, _)| *s == seq)
        .map(|(_, d)| d.clone());
    app.undo.pop();
    match decision {
        Some(d) => {
            app.pending = Some(PendingWrite::Revoke(d));
            app.save = SaveState::Writing;
            vec![Effect::AppendJournal(Record::Revoke { seq })]
        }
        None => {
            // Superseded by a later decision on the same item: nothing left to revoke.
            undo(app)
        }
    }
}

fn redo(app: &mut App) -> Vec<Effect> {
    if app.pending.is_some() {
        return Vec::new();
    }
    match app.redo.pop() {
        Some(d) => {
            app.pending = Some(PendingWrite::Decide { redo: true });
            app.save = SaveState::Writing;
            vec![Effect::AppendJournal(Record::Decide(d))]
        }
        None => {
            app.message = "nothing to redo".into();
            Vec::new()
        }
    }
}

fn on_journaled(app: &mut App, seq: u64, record: Record) -> Vec<Effect> {
    app.ledger.record(seq, &record);
    app.save = SaveState::Saved(seq);
    match (app.pending.take(), &record) {
        (Some(PendingWrite::Decide { redo }), Record::Decide(d)) => {
            app.notes.remove(&d.item);
            app.undo.push(seq);
            if !redo {
                app.redo.clear();
            }
            app.message = format!("{}: {} (saved #{seq})", d.word, describe(&d.action));
            if let Some(i) = app.position_of(&d.item) {
                app.cursor = i;
            }
            match app.next_pending_from(app.cursor) {
                Some(next) => move_to(app, Some(next)),
                None => app.message.push_str(" — no pending items left"),
            }
        }
        (Some(PendingWrite::Revoke(d)), Record::Revoke { .. }) => {
            app.message = format!("undid {} on {} (saved #{seq})", describe(&d.action), d.word);
            let at = app.position_of(&d.item);
            app.redo.push(d);
            move_to(app, at);
        }
        _ => {}
    }
    Vec::new()
}

fn describe(action: &Action) -> String {
    match action {
        Action::Accept { pronunciation, edited: true, .. } => format!("accepted edited /{pronunciation}/"),
        Action::Accept { pronunciation, .. } => format!("accepted /{pronunciation}/"),
        Action::Reject => "rejected".into(),
        Action::SetAside => "set aside".into(),
        Action::Remove => "removed from review".into(),
    }
}

fn edit_key(app: &mut App, mut ed: Editor, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => {
            app.message = "edit cancelled".into();
            return Vec::new();
        }
        Key::Enter => match ed.valid_pronunciation(app.phones.as_ref()) {
            Some(pronunciation) => {
                let detail = if ed.original.is_empty() || ed.original == pronunciation {
                    String::new()
                } else {
                    format!("edited from {}", ed.original)
                };
                let action = Action::Accept { pronunciation, source: "review".into(), score: None, edited: true };
                let effects = decide(app, action, detail);
                if effects.is_empty() {
                    app.mode = Mode::Edit(ed);
                }
                return effects;
            }
            None => app.message = "fix the marked phones first (Tab completes, Esc cancels)".into(),
        },
        Key::Tab => ed.complete(app.phones.as_ref()),
        Key::Backspace => ed.backspace(),
        Key::Delete => ed.delete(),
        Key::Left => ed.move_by(-1),
        Key::Right => ed.move_by(1),
        Key::Home => ed.jump(false),
        Key::End => ed.jump(true),
        Key::Char(c) if !c.is_control() => ed.insert(c),
        _ => {}
    }
    app.mode = Mode::Edit(ed);
    Vec::new()
}

fn search_key(app: &mut App, mut b: SearchBox, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => return Vec::new(),
        Key::Tab => b.mode = b.mode.next(),
        _ if edit_line(&mut b.query, key) => {}
        _ => {
            app.mode = Mode::Search(b);
            return Vec::new();
        }
    }
    let effect = (!b.query.trim().is_empty()).then(|| Effect::RunSearch { query: b.query.clone(), mode: b.mode });
    if effect.is_none() {
        b.hits.clear();
    }
    app.mode = Mode::Search(b);
    effect.into_iter().collect()
}

/// The note line: Enter keeps the note for the current item's next decision (an empty note
/// removes it), Esc leaves the note as it was.
fn note_key(app: &mut App, mut text: String, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => return Vec::new(),
        Key::Enter => {
            if let Some(item) = app.keys.get(app.cursor).cloned() {
                let text = text.trim().to_string();
                if text.is_empty() {
                    app.notes.remove(&item);
                    app.message = "note removed".into();
                } else {
                    app.message = "note kept; it goes with the next decision on this item".into();
                    app.notes.insert(item, text);
                }
            }
            return Vec::new();
        }
        _ => {
            edit_line(&mut text, key);
        }
    }
    app.mode = Mode::Note(text);
    Vec::new()
}

/// Typing into a one-line field (search, filter, note): Backspace deletes the last character,
/// a printable character is appended. Returns whether `key` was one of those.
fn edit_line(text: &mut String, key: Key) -> bool {
    match key {
        Key::Backspace => {
            text.pop();
            true
        }
        Key::Char(c) if !c.is_control() => {
            text.push(c);
            true
        }
        _ => false,
    }
}

fn filter_key(app: &mut App, mut text: String, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => return Vec::new(),
        Key::Enter => match Filter::parse(&text) {
            Ok(f) => {
                app.filter = f;
                app.message = if text.trim().is_empty() { "filter cleared".into() } else { format!("filter: {text}") };
                if !app.visible(app.cursor) {
                    let target = app.next_pending_from(app.cursor).or_else(|| app.step_visible(true));
                    move_to(app, target);
                }
                return Vec::new();
            }
            Err(e) => {
                app.mode = Mode::Filter(text, Some(e.to_string()));
                return Vec::new();
            }
        },
        _ => {
            edit_line(&mut text, key);
        }
    }
    app.mode = Mode::Filter(text, None);
    Vec::new()
}
