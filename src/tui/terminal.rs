//! The terminal loop: puts the terminal in raw mode on the alternate screen, draws the [`App`],
//! turns key presses into [`Event`]s, carries out the [`Effect`]s `update` asks for (journal
//! appends are fsync'd before their outcome is fed back), and runs guessing in a background
//! thread whose progress shows as a gauge. The terminal is restored on quit, on error, on
//! panic (a panic hook restores it before the message prints) and on SIGTERM and SIGHUP: those
//! signals only set a flag, and the loop then leaves between two events exactly as `q` does, so
//! a journal append in progress is finished first and nothing is written half-way. A terminal
//! that hangs up (its window closed) ends the loop the same way.

use std::collections::VecDeque;
use std::io;
use std::sync::atomic::{AtomicBool, Ordering};
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
        Effect::AppendJournalBatch(records) => Some(match journal.append_all(records.clone()) {
            Ok(range) => Event::JournaledBatch { first: *range.start(), records },
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

/// Set by SIGTERM or SIGHUP while the screen is open.
static STOP_REQUESTED: AtomicBool = AtomicBool::new(false);

#[cfg(unix)]
extern "C" fn request_stop(_signal: libc::c_int) {
    // Only an atomic store: async-signal-safe.
    STOP_REQUESTED.store(true, Ordering::SeqCst);
}

/// SIGTERM and SIGHUP set [`STOP_REQUESTED`] while the screen is open; the returned guard puts
/// the previous dispositions back.
#[cfg(unix)]
struct StopSignals(Vec<(libc::c_int, libc::sigaction)>);

#[cfg(unix)]
impl StopSignals {
    fn catch() -> StopSignals {
        let mut previous = Vec::new();
        for signal in [libc::SIGTERM, libc::SIGHUP] {
            // SAFETY: a zeroed sigaction is a valid "no flags, empty mask" value; the handler
            // only stores to an atomic. No SA_RESTART, so a waiting poll returns at once.
            unsafe {
                let mut action: libc::sigaction = std::mem::zeroed();
                action.sa_sigaction = request_stop as extern "C" fn(libc::c_int) as libc::sighandler_t;
                libc::sigemptyset(&mut action.sa_mask);
                let mut old: libc::sigaction = std::mem::zeroed();
                if libc::sigaction(signal, &action, &mut old) == 0 {
                    previous.push((signal, old));
                }
            }
        }
        StopSignals(previous)
    }
}

#[cfg(unix)]
impl Drop for StopSignals {
    fn drop(&mut self) {
        for (signal, old) in &self.0 {
            // SAFETY: re-installs the disposition sigaction returned for this signal.
            unsafe {
                libc::sigaction(*signal, old, std::ptr::null_mut());
            }
        }
    }
}

/// Whether crossterm has an event ready, without waiting.
fn ready_now() -> io::Result<bool> {
    match event::poll(Duration::ZERO) {
        Ok(ready) => Ok(ready),
        // A signal arrived: look at the flag again.
        Err(e) if e.kind() == io::ErrorKind::Interrupted => Ok(false),
        Err(e) => Err(e),
    }
}

/// What [`TtyWatch::wait`] saw.
#[derive(Debug, PartialEq, Eq)]
enum TtyState {
    /// Input is waiting, or the wait ended (time out, a signal): ask crossterm.
    Go,
    /// The terminal hung up.
    HungUp,
}

/// Waits on the terminal the screen reads (standard input when it is a terminal, else
/// `/dev/tty`, as crossterm chooses) with poll(2), so that a hang-up is seen: crossterm's own
/// poll keeps retrying a terminal that is gone and never returns, which left a closed screen
/// spinning on a core for good.
struct TtyWatch {
    #[cfg(unix)]
    fd: Option<std::os::fd::RawFd>,
    #[cfg(unix)]
    _opened: Option<std::fs::File>,
}

impl TtyWatch {
    fn open() -> TtyWatch {
        #[cfg(unix)]
        {
            use std::os::fd::AsRawFd;
            use std::io::IsTerminal;
            if io::stdin().is_terminal() {
                return TtyWatch { fd: Some(0), _opened: None };
            }
            let opened = std::fs::File::open("/dev/tty").ok();
            TtyWatch { fd: opened.as_ref().map(|f| f.as_raw_fd()), _opened: opened }
        }
        #[cfg(not(unix))]
        TtyWatch {}
    }

    /// Waits up to `timeout` for input or a hang-up.
    fn wait(&self, timeout: Duration) -> TtyState {
        #[cfg(unix)]
        if let Some(fd) = self.fd {
            let mut watched = libc::pollfd { fd, events: libc::POLLIN, revents: 0 };
            let millis = libc::c_int::try_from(timeout.as_millis()).unwrap_or(libc::c_int::MAX);
            // SAFETY: one valid pollfd for the length given; the fd stays open while `self` lives.
            let ready = unsafe { libc::poll(&mut watched, 1, millis) };
            let gone = libc::POLLHUP | libc::POLLERR | libc::POLLNVAL;
            if ready > 0 && watched.revents & gone != 0 {
                return TtyState::HungUp;
            }
            return TtyState::Go;
        }
        // No descriptor to watch: let crossterm wait.
        let _ = event::poll(timeout);
        TtyState::Go
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
    STOP_REQUESTED.store(false, Ordering::SeqCst);
    #[cfg(unix)]
    let _signals = StopSignals::catch();
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
        let tty = TtyWatch::open();
        while !app.quitting && !STOP_REQUESTED.load(Ordering::SeqCst) {
            terminal.draw(|f| draw(f, &app, services.color))?;
            app.now = crate::support::clock::now_secs();
            if tty.wait(Duration::from_millis(50)) == TtyState::HungUp {
                // The terminal is gone (its window closed, the tmux session killed): nothing
                // can be read or drawn any more, so leave as `q` does.
                break;
            }
            // Every event ready now, then one frame; resizes come through here too (crossterm
            // turns SIGWINCH into an event), at most 50 ms late.
            while ready_now()? {
                let ev = match event::read() {
                    Ok(TermEvent::Key(k)) if k.kind != KeyEventKind::Release => map_key(k.code, k.modifiers).map(Event::Key),
                    Ok(TermEvent::Resize(w, h)) => Some(Event::Resize(w, h)),
                    Ok(_) => None,
                    Err(e) if e.kind() == io::ErrorKind::Interrupted => None,
                    Err(e) => return Err(e),
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
