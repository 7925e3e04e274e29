//! The terminal loop: puts the terminal in raw mode on the alternate screen, draws the [`App`],
//! turns key presses into [`Event`]s, carries out the [`Effect`]s `update` asks for (journal
//! appends are fsync'd before their outcome is fed back), and runs guessing in a background
//! thread whose progress shows as a gauge. The terminal is restored on quit, on error and on
//! panic (a panic hook restores it before the message prints).

use std::collections::VecDeque;
use std::io;
use std::sync::mpsc;
use std::time::Duration;

use crossterm::event::{self, Event as TermEvent, KeyCode, KeyEventKind, KeyModifiers};
use crossterm::execute;
use crossterm::terminal::{disable_raw_mode, enable_raw_mode, EnterAlternateScreen, LeaveAlternateScreen};
use ratatui::backend::CrosstermBackend;
use ratatui::Terminal;

use super::lookups::Lookups;
use super::state::{App, JobProgress};
use super::update::{update, Effect, Event, Key};
use super::view::draw;
use crate::queue::{CandidateSource, Journal};

/// Everything the loop needs besides the screen state.
pub struct Services {
    /// Lexicon lookups for neighbours and search.
    pub lookups: Lookups,
    /// The journal decisions are appended to.
    pub journal: Journal,
    /// Candidates for items without any, if the project can guess.
    pub guesser: Option<Box<dyn CandidateSource>>,
    /// Draw in colour (false when NO_COLOR is set).
    pub color: bool,
}

/// Carry out one effect and return the event that reports its outcome.
pub fn execute_effect(effect: Effect, lookups: &Lookups, journal: &mut Journal) -> Option<Event> {
    match effect {
        Effect::AppendJournal(record) => Some(match journal.append(record.clone()) {
            Ok(seq) => Event::Journaled { seq, record },
            Err(e) => Event::JournalFailed(e.to_string()),
        }),
        Effect::LoadNeighbours { key, word, pronunciation, compare_with } => {
            Some(Event::Neighbours(lookups.neighbours(&key, &word, &pronunciation, compare_with.as_deref())))
        }
        Effect::RunSearch { query, mode } => {
            let hits = lookups.search(&query, mode, 40);
            Some(Event::SearchResults { query, mode, hits })
        }
        Effect::Quit => None,
    }
}

/// Feed `event` to `update` and carry out effects until none are left.
pub fn dispatch(app: &mut App, event: Event, lookups: &Lookups, journal: &mut Journal) {
    let mut events = VecDeque::from([event]);
    while let Some(ev) = events.pop_front() {
        for effect in update(app, ev) {
            if let Some(next) = execute_effect(effect, lookups, journal) {
                events.push_back(next);
            }
        }
    }
}

fn restore_terminal() {
    let _ = disable_raw_mode();
    let _ = execute!(io::stdout(), LeaveAlternateScreen, crossterm::cursor::Show);
}

/// Map a crossterm key to ours; keys the screen does not use give `None`.
pub fn map_key(code: KeyCode, mods: KeyModifiers) -> Option<Key> {
    Some(match code {
        KeyCode::Char(c) if mods.contains(KeyModifiers::CONTROL) => Key::Ctrl(c.to_ascii_lowercase()),
        KeyCode::Char(c) => Key::Char(c),
        KeyCode::Up => Key::Up,
        KeyCode::Down => Key::Down,
        KeyCode::Left => Key::Left,
        KeyCode::Right => Key::Right,
        KeyCode::Home => Key::Home,
        KeyCode::End => Key::End,
        KeyCode::Enter => Key::Enter,
        KeyCode::Esc => Key::Esc,
        KeyCode::Tab => Key::Tab,
        KeyCode::Backspace => Key::Backspace,
        KeyCode::Delete => Key::Delete,
        _ => return None,
    })
}

fn start_guessing(app: &App, guesser: Box<dyn CandidateSource>, tx: mpsc::Sender<Event>) {
    let todo: Vec<(String, String)> = app
        .items
        .iter()
        .zip(&app.keys)
        .filter(|(item, _)| item.candidates.is_empty())
        .map(|(item, key)| (key.clone(), item.word.clone()))
        .collect();
    if todo.is_empty() {
        return;
    }
    std::thread::spawn(move || {
        let total = todo.len();
        let label = guesser.label().to_string();
        for (done, (key, word)) in todo.into_iter().enumerate() {
            let candidates = guesser.candidates(&word);
            let progress = Event::Progress(JobProgress { label: label.clone(), done: done + 1, total });
            if tx.send(Event::Candidates { key, candidates }).is_err() || tx.send(progress).is_err() {
                return;
            }
        }
        let _ = tx.send(Event::JobDone);
    });
}

/// Run the review screen until the reviewer quits. Returns the final state (so the caller can
/// save candidates guessed meanwhile).
pub fn run(mut app: App, mut services: Services) -> io::Result<App> {
    let previous = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        restore_terminal();
        previous(info);
    }));
    enable_raw_mode()?;
    let mut stdout = io::stdout();
    if let Err(e) = execute!(stdout, EnterAlternateScreen) {
        restore_terminal();
        return Err(e);
    }
    let result = (|| {
        let mut terminal = Terminal::new(CrosstermBackend::new(io::stdout()))?;
        let (tx, rx) = mpsc::channel();
        if let Some(g) = services.guesser.take() {
            start_guessing(&app, g, tx);
        }
        dispatch(&mut app, Event::Resize(0, 0), &services.lookups, &mut services.journal);
        while !app.quitting {
            terminal.draw(|f| draw(f, &app, services.color))?;
            if event::poll(Duration::from_millis(50))? {
                let ev = match event::read()? {
                    TermEvent::Key(k) if k.kind != KeyEventKind::Release => map_key(k.code, k.modifiers).map(Event::Key),
                    TermEvent::Resize(w, h) => Some(Event::Resize(w, h)),
                    _ => None,
                };
                if let Some(ev) = ev {
                    dispatch(&mut app, ev, &services.lookups, &mut services.journal);
                }
            }
            while let Ok(ev) = rx.try_recv() {
                dispatch(&mut app, ev, &services.lookups, &mut services.journal);
            }
        }
        Ok(())
    })();
    restore_terminal();
    let _ = std::panic::take_hook();
    result.map(|()| app)
}
