//! Drawing the review screen into ratatui's TestBackend at 80×24 and 200×60, with and without
//! colour, and the key help kept in step with the README.

mod common;

use common::*;
use orthoepy::queue::Journal;
use orthoepy::tui::{draw, App, Event, Key, KEYS};
use ratatui::backend::TestBackend;
use ratatui::buffer::Buffer;
use ratatui::style::Color;
use ratatui::Terminal;

fn render(app: &App, w: u16, h: u16, color: bool) -> Buffer {
    let mut t = Terminal::new(TestBackend::new(w, h)).unwrap();
    t.draw(|f| draw(f, app, color)).unwrap();
    t.backend().buffer().clone()
}

fn text(b: &Buffer) -> String {
    let w = b.area.width as usize;
    let cells: Vec<&str> = b.content.iter().map(|c| c.symbol()).collect();
    cells.chunks(w).map(|row| row.concat()).collect::<Vec<_>>().join("\n")
}

fn ready_app() -> App {
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    let mut app = app();
    // Load neighbours for the first item through the real effect path.
    orthoepy::tui::dispatch(&mut app, Event::Resize(80, 24), &lookups(), &mut j);
    app
}

#[test]
fn small_screen_shows_every_panel() {
    let app = ready_app();
    let screen = text(&render(&app, 80, 24, true));
    for needle in ["Kelport", "×10", "Next sailing from Kelport", "K EH1 L P AO2 R T", "g2p", "0.62", "neighbours",
                   "port", "P AO1 R T", "features vs", "valid in en-arpa", "0/3 done", "new-words 0/1", "passenger-queries 0/1"] {
        assert!(screen.contains(needle), "missing {needle:?} in\n{screen}");
    }
    // Score bar: 0.62 of six cells rounds to four full blocks.
    assert!(screen.contains("████░░ 0.62"), "{screen}");
    // Alignment of the selected candidate.
    assert!(screen.contains("or:AO2 R"), "{screen}");
}

#[test]
fn large_screen_lists_more_and_keeps_layout() {
    let app = ready_app();
    let screen = text(&render(&app, 200, 60, true));
    assert_eq!(screen.lines().count(), 60);
    assert!(screen.contains("rules:en"));
    assert!(screen.contains("seaport"), "longest shared ending 'port' lists seaport:\n{screen}");
}

#[test]
fn no_color_uses_no_colours_and_marks_unknown_phones() {
    let mut app = ready_app();
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('e')));
    for c in " QQ".chars() {
        orthoepy::tui::update(&mut app, Event::Key(Key::Char(c)));
    }
    let buf = render(&app, 80, 24, false);
    assert!(buf.content.iter().all(|c| c.fg == Color::Reset && c.bg == Color::Reset), "NO_COLOR: no colours");
    let screen = text(&buf);
    assert!(screen.contains("QQ?"), "unknown phone marked without colour:\n{screen}");
    assert!(screen.contains("not in en-arpa: QQ"));
    let coloured = render(&app, 80, 24, true);
    assert!(coloured.content.iter().any(|c| c.fg == Color::Red), "unknown phones in red with colour");
}

#[test]
fn help_overlay_lists_every_key() {
    let mut app = ready_app();
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('?')));
    let screen = text(&render(&app, 80, 24, false));
    for (keys, _) in KEYS {
        assert!(screen.contains(keys), "help lacks {keys:?}:\n{screen}");
    }
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('z')));
    assert!(!text(&render(&app, 80, 24, false)).contains("any key closes"));
}

#[test]
fn readme_keys_sections_match_the_help() {
    let readmes = [
        ("demo-lexicon/README.md", include_str!("../demo-lexicon/README.md"), "## KEYS"),
        ("README.md", include_str!("../README.md"), "## Review screen keys"),
    ];
    for (name, readme, heading) in readmes {
        let section = readme.split(heading).nth(1).unwrap_or_else(|| panic!("{name} has no {heading:?} section"));
        for (keys, what) in KEYS {
            assert!(section.contains(&format!("| {keys} | {what} |")), "{name} lacks row for {keys:?}");
        }
    }
}

#[test]
fn tiny_terminal_does_not_panic() {
    let app = ready_app();
    for (w, h) in [(1, 1), (20, 5), (80, 10), (30, 40)] {
        render(&app, w, h, true);
    }
    let empty = App::new("x", Vec::new(), Default::default(), app.phones.clone());
    let screen = text(&render(&empty, 80, 24, true));
    assert!(screen.contains("The queue is empty"));
}

#[test]
fn note_line_and_kept_note_are_drawn_at_80x24() {
    let mut app = ready_app();
    for key in [Key::Char('m'), Key::Char('o'), Key::Char('k')] {
        orthoepy::tui::update(&mut app, Event::Key(key));
    }
    assert!(text(&render(&app, 80, 24, false)).contains("note> ok"));
    orthoepy::tui::update(&mut app, Event::Key(Key::Enter));
    let screen = text(&render(&app, 80, 24, false));
    assert!(screen.contains("✎ ok") && !screen.contains("note>"), "{screen}");
}
