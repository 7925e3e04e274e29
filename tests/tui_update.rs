//! The review screen's behaviour, driven without a terminal: keys go through the pure `update`,
//! effects are carried out against a real journal in a temporary folder.

mod common;

use common::*;
use orthoepy::queue::{Action, Journal, Ledger, Record};
use orthoepy::queue::ItemState;
use orthoepy::tui::{update, Effect, Event, Key, Mode, SaveState};

fn journal() -> (tempfile::TempDir, Journal) {
    let dir = tempfile::tempdir().unwrap();
    let (j, _) = Journal::open(&dir.path().join("journal.jsonl")).unwrap();
    (dir, j)
}

#[test]
fn accept_is_only_shown_after_the_journal_write_and_moves_on() {
    let mut app = app();
    let effects = update(&mut app, Event::Key(Key::Enter));
    let Some(Effect::AppendJournal(Record::Decide(d))) = effects.first().cloned() else { panic!("{effects:?}") };
    assert_eq!(d.word, "Kelport");
    // Not yet on disk: still pending, still on the same item.
    assert_eq!(app.state_of(0), ItemState::Pending);
    assert_eq!(app.save, SaveState::Writing);
    update(&mut app, Event::Journaled { seq: 1, record: Record::Decide(d) });
    assert_eq!(app.state_of(0), ItemState::Decided);
    assert_eq!(app.cursor, 1, "moves to the next pending item");
    assert_eq!(app.save, SaveState::Saved(1));
}

#[test]
fn failed_write_leaves_the_item_pending() {
    let mut app = app();
    update(&mut app, Event::Key(Key::Enter));
    update(&mut app, Event::JournalFailed("disk full".into()));
    assert_eq!(app.state_of(0), ItemState::Pending);
    assert_eq!(app.cursor, 0);
    assert!(matches!(app.save, SaveState::Failed(_)));
}

#[test]
fn pick_by_number_then_accept_records_that_candidate() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('2'), Key::Enter], &l, &mut j);
    let ledger = Ledger::replay(j.records());
    let (_, d) = ledger.current("new:kelport").unwrap();
    assert!(matches!(&d.action, Action::Accept { pronunciation, .. } if pronunciation == "K EH1 L P ER0 T"));
}

#[test]
fn editor_validates_completes_and_saves_an_edit() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('e')], &l, &mut j);
    assert!(matches!(app.mode, Mode::Edit(_)));
    // Clear the text and type a pronunciation with a bad symbol.
    let clear: Vec<Key> = std::iter::repeat(Key::Backspace).take(40).collect();
    press(&mut app, &clear, &l, &mut j);
    press(&mut app, &type_text("K EH1 L P QQ"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert!(matches!(app.mode, Mode::Edit(_)), "invalid text is not saved");
    assert!(j.records().is_empty());
    press(&mut app, &[Key::Backspace, Key::Backspace], &l, &mut j);
    // "A" + Tab: the en-arpa vowels starting with A are offered (CMUdict phone set: AA AE AH
    // AO AW AY, each with stress 0/1/2).
    press(&mut app, &[Key::Char('A'), Key::Char('O'), Key::Tab], &l, &mut j);
    let Mode::Edit(ed) = &app.mode else { panic!() };
    assert_eq!(ed.offers, vec!["AO0", "AO1", "AO2"]);
    press(&mut app, &type_text("1 R T"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
    let ledger = Ledger::replay(j.records());
    let (_, d) = ledger.current("new:kelport").unwrap();
    assert!(matches!(&d.action, Action::Accept { pronunciation, edited: true, source, .. }
        if pronunciation == "K EH1 L P AO1 R T" && source == "review"));
    assert!(d.note.contains("edited from K EH1 L P AO2 R T"), "{}", d.note);
}

#[test]
fn escape_cancels_the_editor_without_writing() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('e'), Key::Char('X'), Key::Esc], &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
    assert!(j.records().is_empty());
}

#[test]
fn undo_and_redo_go_through_the_journal() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Enter, Key::Char('x')], &l, &mut j);
    assert_eq!(app.state_of(0), ItemState::Decided);
    assert_eq!(app.state_of(1), ItemState::Decided);
    press(&mut app, &[Key::Char('u')], &l, &mut j);
    assert_eq!(app.state_of(1), ItemState::Pending);
    assert_eq!(app.cursor, 1, "undo returns to the item");
    press(&mut app, &[Key::Ctrl('r')], &l, &mut j);
    assert_eq!(app.state_of(1), ItemState::Decided);
    // Replaying the journal from disk gives the same states.
    let (records, warnings) = Journal::read(j.path()).unwrap();
    assert!(warnings.is_empty());
    let ledger = Ledger::replay(&records);
    assert!(matches!(ledger.current("new:quayside").map(|(_, d)| &d.action), Some(Action::Reject)));
    assert_eq!(records.len(), 4);
}

#[test]
fn set_aside_items_are_skipped_until_filtered_for() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('s')], &l, &mut j);
    assert_eq!(app.state_of(0), ItemState::Aside);
    assert_eq!(app.cursor, 1);
    press(&mut app, &[Key::Char('f')], &l, &mut j);
    press(&mut app, &type_text("state=aside"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert_eq!(app.cursor, 0, "the filter moves to the only visible item");
    assert!(!app.visible(1));
}

#[test]
fn bad_filter_shows_the_error_and_keeps_the_old_filter() {
    let mut app = app();
    update(&mut app, Event::Key(Key::Char('f')));
    for c in "colour=red".chars() {
        update(&mut app, Event::Key(Key::Char(c)));
    }
    update(&mut app, Event::Key(Key::Enter));
    assert!(matches!(&app.mode, Mode::Filter(_, Some(e)) if e.contains("source=")));
    assert_eq!(app.filter.text(), "");
}

#[test]
fn filter_by_source_and_score() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('f')], &l, &mut j);
    press(&mut app, &type_text("source=variant score>0.5"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert_eq!(app.cursor, 2);
    assert!(!app.visible(0) && !app.visible(1));
}

#[test]
fn search_overlay_runs_live_searches() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('/')], &l, &mut j);
    press(&mut app, &type_text("ke"), &l, &mut j);
    let Mode::Search(b) = &app.mode else { panic!() };
    let words: Vec<&str> = b.hits.iter().map(|h| h.word.as_str()).collect();
    assert_eq!(words, vec!["kellogg", "key", "keyside"], "prefix search in key order");
    press(&mut app, &[Key::Tab], &l, &mut j);
    press(&mut app, &[Key::Backspace, Key::Backspace], &l, &mut j);
    press(&mut app, &type_text("qay"), &l, &mut j);
    let Mode::Search(b) = &app.mode else { panic!() };
    assert_eq!(b.mode.name(), "fuzzy");
    assert!(b.hits.iter().any(|h| h.word == "quay"), "one edit from qay");
    press(&mut app, &[Key::Esc], &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
}

#[test]
fn neighbours_follow_the_selected_candidate() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('n')], &l, &mut j);
    let n = app.neighbours.clone().unwrap();
    assert_eq!(n.for_key, "new:quayside");
    // keyside is pronounced K IY1 S AY2 D in CMUdict 1.1.3: a homophone of the first candidate.
    assert!(n.homophones.iter().any(|w| w.word == "keyside"));
    // "keyside" shares the six-letter ending "yside" with "quayside".
    assert_eq!(n.ending, "yside");
    press(&mut app, &[Key::Down], &l, &mut j);
    let n = app.neighbours.clone().unwrap();
    assert_eq!(n.for_pronunciation, "K W EY1 S AY2 D");
    assert!(n.homophones.is_empty());
}

#[test]
fn variant_items_compare_with_their_canonical_form() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('p')], &l, &mut j);
    assert_eq!(app.cursor, 2, "p wraps to the last item");
    let f = app.neighbours.clone().unwrap().features.unwrap();
    assert_eq!(f.against, "/HH AA1 R B ER0/");
    // h-dropping removes HH; non-rhotic drops R: two positions with no phone on our side.
    assert_eq!(f.view.columns.iter().filter(|c| c.variant.is_none()).count(), 2);
}

#[test]
fn replayed_journal_restores_states_and_undo() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Enter], &l, &mut j);
    let ledger = Ledger::replay(j.records());
    let mut again = orthoepy::tui::App::new("coast", items(), ledger, app.phones.clone());
    assert_eq!(again.state_of(0), ItemState::Decided);
    assert_eq!(again.cursor, 1, "starts on the first pending item");
    press(&mut again, &[Key::Char('u')], &l, &mut j);
    assert_eq!(again.state_of(0), ItemState::Pending);
}

#[test]
fn quit_keys() {
    let mut app = app();
    assert_eq!(update(&mut app, Event::Key(Key::Char('q'))), vec![Effect::Quit]);
    let mut app = common::app();
    update(&mut app, Event::Key(Key::Char('e')));
    assert_eq!(update(&mut app, Event::Key(Key::Ctrl('c'))), vec![Effect::Quit], "Ctrl-c quits from any mode");
}

#[test]
fn a_typed_note_goes_with_the_next_decision_and_survives_a_failed_write() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    let mut keys = vec![Key::Char('m')];
    keys.extend(type_text("heard as KEL-port on the harbour radio"));
    keys.push(Key::Enter);
    press(&mut app, &keys, &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
    assert_eq!(app.notes.get("new:kelport").map(String::as_str), Some("heard as KEL-port on the harbour radio"));
    // A failed write keeps the note for the retry.
    update(&mut app, Event::Key(Key::Char('x')));
    update(&mut app, Event::JournalFailed("disk full".into()));
    assert!(app.notes.contains_key("new:kelport"));
    // Esc on a reopened note line leaves it unchanged; the decision then carries it.
    press(&mut app, &[Key::Char('m'), Key::Backspace, Key::Esc, Key::Enter], &l, &mut j);
    let ledger = Ledger::replay(j.records());
    let (_, d) = ledger.current("new:kelport").expect("decided");
    assert!(d.note.ends_with("note: heard as KEL-port on the harbour radio"), "{}", d.note);
    assert!(app.notes.is_empty(), "the note is used once");
}
