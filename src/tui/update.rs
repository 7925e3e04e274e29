//! The review screen's behaviour: `update(&mut App, Event) -> Vec<Effect>`.
//!
//! Pure: it reads and changes the [`App`] and asks for outside work by returning [`Effect`]s
//! (append to the journal, look up neighbours, search, quit) that the terminal loop carries out,
//! feeding the outcome back as another [`Event`]. A decision is only shown as made once its
//! [`Event::Journaled`] arrives, i.e. once it is on disk.

use super::editor::{EditPurpose, Editor};
use super::filter::Filter;
use super::state::{App, BatchConfirm, Confirm, JobProgress, Mode, Neighbours, PendingWrite, SaveState, SearchBox, SearchMode, WordPron};
use crate::queue::{entry_key, Action, Candidate, Decision, ItemKind, Record, Threshold};

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
    /// A batch of journal appends finished and is on disk.
    JournaledBatch {
        /// The sequence number of the first record; the rest follow in order.
        first: u64,
        /// What was written.
        records: Vec<Record>,
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
    /// Append these records in one write and one fsync, and answer with
    /// [`Event::JournaledBatch`] or [`Event::JournalFailed`].
    AppendJournalBatch(Vec<Record>),
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
        Event::JournaledBatch { first, records } => on_journaled_batch(app, first, records),
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
        Mode::Confirm(c) => confirm_key(app, c, key),
        Mode::Threshold(kind, text, _) => threshold_key(app, kind, text, key),
        Mode::ConfirmBatch(c) => confirm_batch_key(app, c, key),
        Mode::Entry(entry) => entry_key_pressed(app, entry, key),
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
        Key::Char('A') => app.mode = Mode::Threshold(Threshold::AcceptAbove(0.0), String::new(), None),
        Key::Char('X') => app.mode = Mode::Threshold(Threshold::RejectBelow(0.0), String::new(), None),
        Key::Char('s') => return decide(app, Action::SetAside, String::new()),
        Key::Char('e') => match app.current() {
            Some(_) => {
                let text = app.current_candidate().map(|c| c.pronunciation.clone()).unwrap_or_default();
                app.mode = Mode::Edit(Editor::new(&text));
            }
            None => app.message = app.nothing_shown(),
        },
        Key::Char('n') => move_to(app, app.step_visible(true)),
        Key::Char('p') => move_to(app, app.step_visible(false)),
        Key::Char('u') => return undo(app),
        Key::Ctrl('r') => return redo(app),
        Key::Char('/') => app.mode = Mode::Search(SearchBox::new()),
        Key::Char('f') => app.mode = Mode::Filter(app.filter.text().to_string(), None),
        Key::Char('m') => match app.current_key() {
            Some(key) => app.mode = Mode::Note(app.notes.get(key).cloned().unwrap_or_default()),
            None => app.message = app.nothing_shown(),
        },
        Key::Char('i') => {
            app.ipa = !app.ipa;
            app.message = if app.ipa {
                "pronunciations in IPA (i: phone symbols)".into()
            } else {
                format!("pronunciations in {} symbols (i: IPA)", app.phones.name())
            };
        }
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
    if app.current().is_none() {
        app.message = app.nothing_shown();
        return Vec::new();
    }
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

/// Decide about the item on screen.
fn decide(app: &mut App, action: Action, detail: String) -> Vec<Effect> {
    let (Some(item), Some(key)) = (app.current(), app.current_key()) else {
        app.message = app.nothing_shown();
        return Vec::new();
    };
    if app.ledger().is_applied(key) {
        app.message = format!("{} is already merged into the lexicon; search for it (/) to change the entry", item.word);
        return Vec::new();
    }
    let (key, word) = (key.to_string(), item.word.clone());
    decide_on(app, key, word, action, detail)
}

/// Journal a decision under `key`, asking first when it would replace the decision in force
/// (or deprecate an entry).
fn decide_on(app: &mut App, key: String, word: String, action: Action, detail: String) -> Vec<Effect> {
    if app.pending.is_some() {
        app.message = "still saving the last decision…".into();
        return Vec::new();
    }
    let typed = app.notes.get(&key).map(|n| format!("note: {n}")).unwrap_or_default();
    let who = if app.reviewer.is_empty() { "reviewed".to_string() } else { format!("reviewed by {}", app.reviewer) };
    let reviewer = if app.now == 0 { who } else { format!("{who} on {}", crate::support::clock::utc(app.now)) };
    let note = [reviewer, detail, typed].into_iter().filter(|part| !part.is_empty()).collect::<Vec<_>>().join("; ");
    let decision = Decision { item: key, word, action, note };
    let question = match app.ledger().current(&decision.item) {
        Some((_, old)) if old.action == decision.action => {
            app.message = format!("{} is already {}", decision.word, describe(&decision.action));
            return Vec::new();
        }
        Some((seq, old)) => Some(format!(
            "{} was {} (#{seq}); replace with {}?  y: yes, any other key: keep it",
            decision.word,
            describe(&old.action),
            describe(&decision.action)
        )),
        None if matches!(decision.action, Action::DeprecateEntry { .. }) => {
            Some(format!("{}: {}?  y: yes, any other key: no", decision.word, describe(&decision.action)))
        }
        None => None,
    };
    match question {
        Some(question) => {
            app.mode = Mode::Confirm(Confirm { question, decision });
            Vec::new()
        }
        None => write_decision(app, decision),
    }
}

fn write_decision(app: &mut App, decision: Decision) -> Vec<Effect> {
    app.pending = Some(PendingWrite::Decide { redo: false });
    app.save = SaveState::Writing;
    vec![Effect::AppendJournal(Record::Decide(decision))]
}

/// `y` writes the decision asked about; any other key drops it.
fn confirm_key(app: &mut App, confirm: Confirm, key: Key) -> Vec<Effect> {
    if key != Key::Char('y') {
        app.message = format!("kept: nothing changed for {}", confirm.decision.word);
        return Vec::new();
    }
    if app.pending.is_some() {
        app.message = "still saving the last decision…".into();
        app.mode = Mode::Confirm(confirm);
        return Vec::new();
    }
    write_decision(app, confirm.decision)
}

/// The threshold line of `A` / `X`: Enter plans the batch over the pending items the filter
/// shows and asks, with the count and the expected number wrong.
fn threshold_key(app: &mut App, kind: Threshold, mut text: String, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => return Vec::new(),
        Key::Enter => {
            let p = match text.trim().parse::<f64>() {
                Ok(p) if (0.0..=1.0).contains(&p) => p,
                _ => {
                    app.mode = Mode::Threshold(kind, text, Some("give a score from 0 to 1".into()));
                    return Vec::new();
                }
            };
            let threshold = match kind {
                Threshold::AcceptAbove(_) => Threshold::AcceptAbove(p),
                Threshold::RejectBelow(_) => Threshold::RejectBelow(p),
            };
            return plan_shown(app, threshold);
        }
        _ => {
            edit_line(&mut text, key);
        }
    }
    app.mode = Mode::Threshold(kind, text, None);
    Vec::new()
}

fn plan_shown(app: &mut App, threshold: Threshold) -> Vec<Effect> {
    let shown: Vec<&crate::queue::Item> = (0..app.items.len())
        .filter(|&i| app.visible(i) && app.state_of(i) == crate::queue::ItemState::Pending)
        .filter_map(|i| app.items.get(i))
        .collect();
    let mut plan = crate::queue::plan_over(shown, threshold);
    let (verb, rule) = match threshold {
        Threshold::AcceptAbove(p) => ("accept", format!("whose best candidate scores at least {p}")),
        Threshold::RejectBelow(p) => ("reject", format!("whose best candidate scores below {p}")),
    };
    if plan.decisions.is_empty() {
        app.message = format!("no pending item shown {rule}; nothing decided");
        return Vec::new();
    }
    let note = batch_note(app, &rule);
    for d in &mut plan.decisions {
        d.note = note.clone();
    }
    let question = format!(
        "{verb} {} shown pending item(s) {rule}? expected wrong: {:.1}{}  y: yes, any other key: no",
        plan.decisions.len(),
        plan.expected_wrong,
        if plan.unscored > 0 { format!(" ({} without a score are left alone)", plan.unscored) } else { String::new() }
    );
    app.mode = Mode::ConfirmBatch(BatchConfirm { question, decisions: plan.decisions });
    Vec::new()
}

/// The note of a batch decision: who and when, as for single decisions, and the rule.
fn batch_note(app: &App, rule: &str) -> String {
    let who = if app.reviewer.is_empty() { "reviewed".to_string() } else { format!("reviewed by {}", app.reviewer) };
    let when = if app.now == 0 { who } else { format!("{who} on {}", crate::support::clock::utc(app.now)) };
    format!("{when}; batch: {rule}")
}

fn confirm_batch_key(app: &mut App, confirm: BatchConfirm, key: Key) -> Vec<Effect> {
    if key != Key::Char('y') {
        app.message = "kept: nothing decided".into();
        return Vec::new();
    }
    if app.pending.is_some() {
        app.message = "still saving the last decision…".into();
        app.mode = Mode::ConfirmBatch(confirm);
        return Vec::new();
    }
    app.pending = Some(PendingWrite::Batch);
    app.save = SaveState::Writing;
    vec![Effect::AppendJournalBatch(confirm.decisions.into_iter().map(Record::Decide).collect())]
}

fn on_journaled_batch(app: &mut App, first: u64, records: Vec<Record>) -> Vec<Effect> {
    let count = records.len() as u64;
    for (seq, record) in (first..).zip(&records) {
        app.record(seq, record);
        app.undo.push(seq);
    }
    app.redo.clear();
    app.pending = None;
    let last = first + count.saturating_sub(1);
    app.save = SaveState::Saved(last);
    app.message = format!("{count} item(s) decided (saved #{first}–#{last}); u undoes them one at a time");
    if !app.visible(app.cursor) || app.state_of(app.cursor) != crate::queue::ItemState::Pending {
        let next = app.next_pending_from(app.cursor);
        move_to(app, next);
    }
    Vec::new()
}

fn undo(app: &mut App) -> Vec<Effect> {
    if app.pending.is_some() {
        return Vec::new();
    }
    let Some(&seq) = app.undo.last() else {
        app.message = "nothing to undo".into();
        return Vec::new();
    };
    if seq <= app.ledger().applied_through() {
        app.message = "that decision is already merged into the lexicon; it cannot be undone here".into();
        return Vec::new();
    }
    let decision = app.ledger().in_force(seq).cloned();
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
    app.record(seq, &record);
    app.save = SaveState::Saved(seq);
    match (app.pending.take(), &record) {
        (Some(PendingWrite::Decide { redo }), Record::Decide(d)) => {
            app.notes.remove(&d.item);
            app.undo.push(seq);
            if !redo {
                app.redo.clear();
            }
            app.message = format!("{}: {} (saved #{seq})", d.word, describe(&d.action));
            // A decision about a lexicon entry (from the search) leaves the cursor where it was.
            if let Some(i) = app.position_of(&d.item) {
                app.cursor = i;
                match app.next_pending_from(app.cursor) {
                    Some(next) => move_to(app, Some(next)),
                    None => app.message.push_str(" — no pending items left"),
                }
            }
        }
        (Some(PendingWrite::Revoke(d)), Record::Revoke { .. }) => {
            app.message = format!("undid {} on {} (saved #{seq})", describe(&d.action), d.word);
            let at = app.position_of(&d.item);
            app.redo.push(d);
            if at.is_some() {
                move_to(app, at);
            }
        }
        _ => {}
    }
    Vec::new()
}

/// A decision's action in words ("accepted /K IY1/"), as the status line and the decided
/// item's panel show it.
pub(super) fn describe(action: &Action) -> String {
    match action {
        Action::Accept { pronunciation, edited: true, .. } => format!("accepted edited /{pronunciation}/"),
        Action::Accept { pronunciation, .. } => format!("accepted /{pronunciation}/"),
        Action::Reject => "rejected".into(),
        Action::SetAside => "set aside".into(),
        Action::Remove => "removed from review".into(),
        Action::ChangeEntry { from, pronunciation } => format!("entry /{from}/ changed to /{pronunciation}/"),
        Action::AddVariant { pronunciation } => format!("variant /{pronunciation}/ added"),
        Action::DeprecateEntry { pronunciation } => format!("entry /{pronunciation}/ deprecated"),
    }
}

fn edit_key(app: &mut App, mut ed: Editor, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => {
            app.message = "edit cancelled".into();
            return Vec::new();
        }
        Key::Enter => return save_edit(app, ed),
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

/// Enter in the editor: every token must be a phone and no audit check may report an error;
/// audit warnings are shown first and a second Enter on the same text saves anyway.
fn save_edit(app: &mut App, mut ed: Editor) -> Vec<Effect> {
    let Some(pronunciation) = ed.valid_pronunciation(app.phones.as_ref()) else {
        app.message = "fix the marked phones first (Tab completes, Esc cancels)".into();
        app.mode = Mode::Edit(ed);
        return Vec::new();
    };
    let word = match &ed.purpose {
        EditPurpose::Item => app.current().map(|i| i.word.clone()).unwrap_or_default(),
        EditPurpose::ChangeEntry { word, .. } | EditPurpose::AddVariant { word } => word.clone(),
    };
    let verdicts = app.phones.audit(&word, &pronunciation);
    let failed: Vec<String> =
        verdicts.iter().filter_map(|v| v.problem.as_ref().map(|p| format!("{}: {p}", v.check))).collect();
    if verdicts.iter().any(|v| v.error) {
        app.message = format!("not saved: {}", failed.join("; "));
        app.mode = Mode::Edit(ed);
        return Vec::new();
    }
    if !failed.is_empty() && ed.warned.as_deref() != Some(ed.text.as_str()) {
        app.message = format!("warning: {} — Enter again saves it anyway", failed.join("; "));
        ed.warned = Some(ed.text.clone());
        app.mode = Mode::Edit(ed);
        return Vec::new();
    }
    let effects = match ed.purpose.clone() {
        EditPurpose::Item => {
            let changed = !ed.original.is_empty() && ed.original != pronunciation;
            let detail = if changed { format!("edited from {}", ed.original) } else { String::new() };
            let action = Action::Accept { pronunciation, source: "review".into(), score: None, edited: true };
            decide(app, action, detail)
        }
        EditPurpose::ChangeEntry { word, from } if from != pronunciation => {
            let key = entry_key(&word, &from);
            decide_on(app, key, word, Action::ChangeEntry { from, pronunciation }, String::new())
        }
        EditPurpose::ChangeEntry { word, .. } => {
            app.message = format!("{word}: the pronunciation is unchanged; nothing to save");
            Vec::new()
        }
        EditPurpose::AddVariant { word } => {
            let key = entry_key(&word, &pronunciation);
            decide_on(app, key, word, Action::AddVariant { pronunciation }, String::new())
        }
    };
    if effects.is_empty() && !matches!(app.mode, Mode::Confirm(_)) {
        app.mode = Mode::Edit(ed);
    }
    effects
}

fn search_key(app: &mut App, mut b: SearchBox, key: Key) -> Vec<Effect> {
    match key {
        Key::Esc => return Vec::new(),
        Key::Enter => return open_hit(app, b),
        Key::Up | Key::Down => {
            b.selected = if key == Key::Up { b.selected.saturating_sub(1) } else { (b.selected + 1).min(b.hits.len().saturating_sub(1)) };
            app.mode = Mode::Search(b);
            return Vec::new();
        }
        Key::Tab => b.mode = b.mode.next(),
        _ if edit_line(&mut b.query, key) => {}
        _ => {
            app.mode = Mode::Search(b);
            return Vec::new();
        }
    }
    b.selected = 0;
    let effect = (!b.query.trim().is_empty()).then(|| Effect::RunSearch { query: b.query.clone(), mode: b.mode });
    if effect.is_none() {
        b.hits.clear();
    }
    app.mode = Mode::Search(b);
    effect.into_iter().collect()
}

/// Enter on a search result: jump to the word's queue item when it is queued (clearing a
/// filter that hides it), otherwise open the lexicon entry.
fn open_hit(app: &mut App, b: SearchBox) -> Vec<Effect> {
    let Some(hit) = b.hits.get(b.selected).cloned() else {
        app.message = "no result to open; type a word first".into();
        app.mode = Mode::Search(b);
        return Vec::new();
    };
    match app.position_of_word(&hit.word) {
        Some(i) => {
            app.message = format!("{} is in the queue: here it is", hit.word);
            if !app.visible(i) {
                app.filter = Filter::default();
                app.message.push_str(" (filter cleared to show it)");
            }
            app.cursor = i;
            app.selected = 0;
        }
        None => {
            app.message = "c: change it, v: add a variant, d: deprecate it, Esc: close".into();
            app.mode = Mode::Entry(hit);
        }
    }
    Vec::new()
}

/// Keys on a lexicon entry opened from the search.
fn entry_key_pressed(app: &mut App, entry: WordPron, key: Key) -> Vec<Effect> {
    let WordPron { word, pronunciation } = entry.clone();
    match key {
        Key::Char('c') => {
            let purpose = EditPurpose::ChangeEntry { word, from: pronunciation.clone() };
            app.mode = Mode::Edit(Editor::for_purpose(&pronunciation, purpose));
        }
        Key::Char('v') => {
            let mut ed = Editor::for_purpose(&pronunciation, EditPurpose::AddVariant { word });
            ed.original.clear();
            app.mode = Mode::Edit(ed);
        }
        Key::Char('d') => {
            let key = entry_key(&word, &pronunciation);
            return decide_on(app, key, word, Action::DeprecateEntry { pronunciation }, String::new());
        }
        Key::Esc => app.message = "entry closed".into(),
        _ => {
            app.message = "c: change it, v: add a variant, d: deprecate it, Esc: close".into();
            app.mode = Mode::Entry(entry);
        }
    }
    Vec::new()
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
