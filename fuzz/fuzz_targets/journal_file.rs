//! Journal files (`Journal::read_bytes`) on arbitrary bytes: it never panics; the records it
//! accepts have strictly increasing sequence numbers; written again line by line (checksum
//! recomputed here, independently, as the format documents: CRC-32 of the compact JSON of
//! `[seq, record]`) they read back to the same records with no warning; and replaying them is
//! idempotent (replaying twice leaves the decisions in force as replaying once).
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use orthoepy::queue::{Journal, Ledger, Logged};

fn write(records: &[Logged]) -> Vec<u8> {
    let mut out = String::new();
    for r in records {
        let body = serde_json::to_string(&(r.seq, &r.record)).expect("a record serialises");
        let crc = format!("{:08x}", crc32fast::hash(body.as_bytes()));
        let line = serde_json::json!({ "seq": r.seq, "record": &r.record, "crc": crc });
        out.push_str(&line.to_string());
        out.push('\n');
    }
    out.into_bytes()
}

fn summary(ledger: &Ledger, records: &[Logged]) -> (u64, u64, Vec<(u64, String)>, Vec<Option<u64>>) {
    let unapplied = ledger.unapplied().iter().map(|(s, d)| (*s, d.item.clone())).collect();
    let current = records
        .iter()
        .filter_map(|r| match &r.record {
            orthoepy::queue::Record::Decide(d) => Some(ledger.current(&d.item).map(|(s, _)| s)),
            _ => None,
        })
        .collect();
    (ledger.applied_through(), ledger.last_seq(), unapplied, current)
}

fuzz_target!(|data: &[u8]| {
    let path = Path::new("fuzz-journal.jsonl");
    let Ok((records, _warnings)) = Journal::read_bytes(data, path) else { return };
    for pair in records.windows(2) {
        assert!(pair[0].seq < pair[1].seq, "sequence {} then {}", pair[0].seq, pair[1].seq);
    }
    let bytes = write(&records);
    let (again, warnings) = match Journal::read_bytes(&bytes, path) {
        Ok(r) => r,
        Err(e) => panic!("records we read do not read again once written: {e}"),
    };
    assert!(warnings.is_empty(), "{warnings:?}");
    assert_eq!(records, again);
    let once = Ledger::replay(&records);
    let mut twice = Ledger::replay(&records);
    for r in &records {
        twice.record(r.seq, &r.record);
    }
    assert_eq!(summary(&once, &records), summary(&twice, &records), "replaying twice differs from once");
});
