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
    // Two primary stresses: the audit's multiple-primary-stress check warns (a warning, so a
    // second Enter saves; the project's default policy is exactly one primary stress).
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert!(matches!(app.mode, Mode::Edit(_)), "warned first");
    assert!(app.message.contains("multiple-primary-stress"), "{}", app.message);
    assert!(j.records().is_empty());
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
    set_filter(&mut app, "state=aside", &l, &mut j);
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
    set_filter(&mut app, "source=variant score>0.5", &l, &mut j);
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

#[test]
fn editor_runs_the_audits_per_entry_checks() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Char('e')], &l, &mut j);
    press(&mut app, &std::iter::repeat(Key::Backspace).take(40).collect::<Vec<_>>(), &l, &mut j);
    // The example: every phone known, but no primary stress; the audit's
    // missing-primary-stress check reports it, so the editor does too.
    press(&mut app, &type_text("K EH0 L P AO0 R T"), &l, &mut j);
    let verdicts = app.phones.audit("Kelport", "K EH0 L P AO0 R T");
    let ids: Vec<&str> = verdicts.iter().map(|v| v.check).collect();
    // The same checks the queue takes from the audit, in the audit's report order.
    let expected: Vec<&str> = orthoepy::audit::select_checks(&orthoepy::queue::PRONUNCIATION_CHECKS).unwrap().iter().map(|c| c.id()).collect();
    assert_eq!(ids, expected);
    assert!(verdicts.iter().any(|v| v.check == "missing-primary-stress" && v.problem.is_some()));
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert!(app.message.contains("missing-primary-stress"), "{}", app.message);
    assert!(j.records().is_empty(), "not saved on the first Enter");
    // A pronunciation with no nucleus at all: the no-nucleus check (a warning) speaks too.
    assert!(app.phones.audit("x", "K L P").iter().any(|v| v.check == "no-nucleus" && v.problem.is_some()));
    // An unknown phone is an error: never saved, however often Enter is pressed.
    press(&mut app, &[Key::Backspace, Key::Char('X')], &l, &mut j);
    press(&mut app, &[Key::Enter, Key::Enter], &l, &mut j);
    assert!(j.records().is_empty());
}

#[test]
fn keys_act_only_on_a_visible_item() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    set_filter(&mut app, "score>2", &l, &mut j);
    for key in [Key::Enter, Key::Char('x'), Key::Char('s'), Key::Char('e'), Key::Char('m')] {
        let effects = update(&mut app, Event::Key(key));
        assert!(effects.iter().all(|e| !matches!(e, Effect::AppendJournal(_))), "{key:?} acted: {effects:?}");
        assert_eq!(app.mode, Mode::Normal, "{key:?}");
        assert!(app.message.contains("no item matches the filter `score>2`"), "{key:?}: {}", app.message);
    }
    assert!(j.records().is_empty());
}

#[test]
fn source_filter_is_on_the_best_candidate() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    // Kelport's best candidate is g2p (its second is rules:en); quayside's best is a compound.
    set_filter(&mut app, "source=rules", &l, &mut j);
    assert!(!app.visible(0) && !app.visible(1) && !app.visible(2));
}

#[test]
fn changing_a_decision_asks_first_and_journals_a_new_one() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    press(&mut app, &[Key::Enter, Key::Char('p')], &l, &mut j);
    assert_eq!(app.cursor, 0);
    press(&mut app, &[Key::Char('x')], &l, &mut j);
    assert!(matches!(&app.mode, Mode::Confirm(c) if c.question.contains("accepted /K EH1 L P AO2 R T/")), "{:?}", app.mode);
    press(&mut app, &[Key::Char('n')], &l, &mut j);
    assert_eq!(j.records().len(), 1, "any other key keeps the decision");
    press(&mut app, &[Key::Char('x'), Key::Char('y')], &l, &mut j);
    assert_eq!(j.records().len(), 2, "the change is a new decision");
    let ledger = Ledger::replay(j.records());
    assert!(matches!(ledger.current("new:kelport"), Some((2, d)) if d.action == Action::Reject));
    // The same decision again changes nothing and asks nothing.
    app.cursor = 0;
    press(&mut app, &[Key::Char('x')], &l, &mut j);
    assert_eq!(j.records().len(), 2);
    assert!(app.message.contains("already rejected"), "{}", app.message);
}

#[test]
fn search_result_jumps_to_its_queue_item() {
    let (_d, mut j) = journal();
    let l = lookups_with(&[("harbour", "HH AA1 R B ER0")]);
    let mut app = app();
    set_filter(&mut app, "kind=new", &l, &mut j);
    press(&mut app, &[Key::Char('/')], &l, &mut j);
    press(&mut app, &type_text("harbour"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
    assert_eq!(app.cursor, 2, "the variant item about harbour");
    assert!(app.visible(2), "the filter that hid it was cleared");
}

#[test]
fn a_lexicon_entry_edited_from_the_search_is_merged_by_apply() {
    use orthoepy::lexicon::Status;
    use orthoepy::queue::{apply_decisions, Outcome, Queue};
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    // "key" is in the lexicon, not in the queue: Enter opens the entry, c changes it.
    press(&mut app, &[Key::Char('/')], &l, &mut j);
    press(&mut app, &[Key::Tab, Key::Tab], &l, &mut j);
    press(&mut app, &type_text("key"), &l, &mut j);
    let Mode::Search(b) = &app.mode else { panic!("{:?}", app.mode) };
    assert_eq!(b.hits.first().map(|h| h.word.as_str()), Some("key"));
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert!(matches!(&app.mode, Mode::Entry(e) if e.word == "key"), "{:?}", app.mode);
    press(&mut app, &[Key::Char('c')], &l, &mut j);
    press(&mut app, &[Key::Backspace, Key::Char('2')], &l, &mut j);
    // K IY2 has no primary stress: warned, then saved on the second Enter.
    press(&mut app, &[Key::Enter, Key::Enter], &l, &mut j);
    assert_eq!(j.records().len(), 1);
    // Deprecate "side" (asks first), add a variant to "port".
    for (word, keys) in [("side", vec![Key::Char('d'), Key::Char('y')]), ("port", vec![Key::Char('v')])] {
        press(&mut app, &[Key::Char('/')], &l, &mut j);
        press(&mut app, &[Key::Tab, Key::Tab], &l, &mut j);
        press(&mut app, &type_text(word), &l, &mut j);
        press(&mut app, &[Key::Enter], &l, &mut j);
        press(&mut app, &keys, &l, &mut j);
    }
    press(&mut app, &std::iter::repeat(Key::Backspace).take(20).collect::<Vec<_>>(), &l, &mut j);
    press(&mut app, &type_text("P OW1 R T"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert_eq!(j.records().len(), 3, "{}", app.message);
    let (records, _) = Journal::read(j.path()).unwrap();
    let ledger = Ledger::replay(&records);
    let mut lexicon = lexicon();
    let report = apply_decisions(&mut lexicon, &Queue::new(), &ledger, &common::arpa());
    assert!(matches!(&report.outcomes[0], Outcome::Replaced { old, new, .. } if old == "K IY1" && new == "K IY2"));
    assert!(matches!(&report.outcomes[1], Outcome::Deprecated { word, .. } if word == "side"));
    assert!(matches!(&report.outcomes[2], Outcome::Added { pronunciation, .. } if pronunciation == "P OW1 R T"));
    let side = lexicon.entries().iter().find(|e| e.word == "side").unwrap();
    assert_eq!(side.status, Status::Deprecated);
    assert!(side.note.starts_with("reviewed"), "{}", side.note);
    // The same conflict rule as any decision: applying to a lexicon whose entry changed meanwhile.
    let mut changed = orthoepy::lexicon::Lexicon::from_entries(vec![orthoepy::lexicon::Entry::new("key", "K EY1")], Default::default());
    let again = apply_decisions(&mut changed, &Queue::new(), &ledger, &common::arpa());
    assert!(matches!(&again.outcomes[0], Outcome::Conflict { seq: 1, .. }), "{:?}", again.outcomes);
}

#[test]
fn batch_accept_asks_with_count_and_expected_wrong_then_journals_each_item() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    // Best scores in the sample queue: Kelport 0.62, quayside 0.8, harbour (variant) 0.54.
    press(&mut app, &[Key::Char('A')], &l, &mut j);
    press(&mut app, &type_text("0.6"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    let Mode::ConfirmBatch(confirm) = &app.mode else { panic!("{:?}", app.mode) };
    // Expected wrong = Σ (1 − p) = 0.38 + 0.20 = 0.58, shown to one decimal.
    assert!(confirm.question.starts_with("accept 2 shown pending item(s)"), "{}", confirm.question);
    assert!(confirm.question.contains("expected wrong: 0.6"), "{}", confirm.question);
    assert!(j.records().is_empty(), "nothing is written before the confirmation");
    press(&mut app, &[Key::Char('y')], &l, &mut j);
    assert_eq!(j.records().len(), 2, "one journal record per item");
    assert_eq!(app.state_of(0), ItemState::Decided);
    assert_eq!(app.state_of(1), ItemState::Decided);
    assert_eq!(app.state_of(2), ItemState::Pending, "0.54 is below the threshold");
    // Undo works on batch decisions one at a time, like single ones.
    press(&mut app, &[Key::Char('u')], &l, &mut j);
    assert_eq!(j.records().len(), 3, "the undo is journaled too");
    let decided = (0..3).filter(|&i| app.state_of(i) == ItemState::Decided).count();
    assert_eq!(decided, 1);
    assert_eq!(Ledger::replay(j.records()).unapplied().len(), 1);
}

#[test]
fn batch_reject_acts_only_on_the_items_the_filter_shows_and_can_be_declined() {
    let (_d, mut j) = journal();
    let l = lookups();
    let mut app = app();
    set_filter(&mut app, "kind=new", &l, &mut j);
    // Below 0.7 among the shown (new-word) items: Kelport only; harbour (0.54) is a variant.
    press(&mut app, &[Key::Char('X')], &l, &mut j);
    press(&mut app, &type_text("0.7"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    let Mode::ConfirmBatch(confirm) = &app.mode else { panic!("{:?}", app.mode) };
    assert!(confirm.question.starts_with("reject 1 shown pending item(s)"), "{}", confirm.question);
    press(&mut app, &[Key::Char('n')], &l, &mut j);
    assert_eq!(app.mode, Mode::Normal);
    assert!(j.records().is_empty(), "declined: nothing decided");
    // A threshold that is not a probability is refused on the line itself.
    press(&mut app, &[Key::Char('X')], &l, &mut j);
    press(&mut app, &type_text("1.5"), &l, &mut j);
    press(&mut app, &[Key::Enter], &l, &mut j);
    assert!(matches!(&app.mode, Mode::Threshold(_, _, Some(why)) if why.contains("from 0 to 1")), "{:?}", app.mode);
}
