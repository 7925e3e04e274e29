//! `length-outlier`: a pronunciation far too long or too short for its spelling, judged against the
//! lexicon's own words of the same length.
//!
//! The measure is phones per letter. Because short words vary far more than long ones (initialisms
//! such as "tv"), entries are compared only with entries whose headword has the same number of
//! letters (16 or more letters form one class). Within a class the robust modified z-score of
//! B. Iglewicz and D. C. Hoaglin, "How to Detect and Handle Outliers" (ASQC, 1993),
//! z = 0.6745 · (x − median) / MAD, flags |z| > 3.5. A class with fewer than [`MIN_CLASS`]
//! entries borrows the whole lexicon's distribution; a distribution with MAD = 0 has no spread to
//! judge by and flags nothing; a lexicon with fewer than [`MIN_CLASS`] measurable entries is not
//! judged at all. Rows with token problems or no letters are skipped.

use super::{Check, Context, Finding, Severity};
use rayon::prelude::*;

/// Entries needed before a distribution is trusted.
pub const MIN_CLASS: usize = 50;

/// Headwords of this many letters or more form one class.
const LONG_WORD: usize = 16;

/// Iglewicz & Hoaglin (1993): the modified z-score threshold and the constant 0.6745 (the 0.75
/// quantile of the standard normal, which makes MAD comparable to a standard deviation).
const THRESHOLD: f64 = 3.5;
const CONSISTENCY: f64 = 0.6745;

/// Reports pronunciations whose length is an outlier for their spelling.
pub struct LengthOutlier;

/// Median and median absolute deviation of a class.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Spread {
    median: f64,
    mad: f64,
}

impl Spread {
    fn of(values: &mut [f64]) -> Option<Spread> {
        if values.len() < MIN_CLASS {
            return None;
        }
        let median = median_of(values);
        let mut deviations: Vec<f64> = values.iter().map(|v| (v - median).abs()).collect();
        let mad = median_of(&mut deviations);
        Some(Spread { median, mad })
    }

    fn z(&self, x: f64) -> Option<f64> {
        (self.mad > 0.0).then(|| CONSISTENCY * (x - self.median) / self.mad)
    }
}

/// The median by selection (linear time; the order of `values` is changed).
fn median_of(values: &mut [f64]) -> f64 {
    let n = values.len();
    if n == 0 {
        return 0.0;
    }
    let (below, &mut upper, _) = values.select_nth_unstable_by(n / 2, f64::total_cmp);
    if n % 2 == 1 {
        upper
    } else {
        let lower = below.iter().copied().max_by(f64::total_cmp).unwrap_or(upper);
        (lower + upper) / 2.0
    }
}

impl Check for LengthOutlier {
    fn id(&self) -> &'static str {
        "length-outlier"
    }
    fn severity(&self) -> Severity {
        Severity::Warning
    }
    fn description(&self) -> &'static str {
        "pronunciations far longer or shorter than words of the same spelling length"
    }
    fn run(&self, context: &Context<'_>) -> Vec<Finding> {
        let entries = context.entries();
        // (letters, phones) of a measurable entry; recomputed where needed rather than held.
        let measure = |id: usize| {
            let parsed = context.parsed(id);
            let letters = entries[id].word.chars().filter(|c| c.is_alphabetic()).count();
            (letters > 0 && !parsed.tokens.is_empty() && parsed.problems.is_empty()).then(|| (letters, parsed.tokens.len()))
        };
        let ratio = |(letters, phones): (usize, usize)| phones as f64 / letters as f64;
        let no_classes = || vec![Vec::new(); LONG_WORD + 1];
        let classes: Vec<Vec<f64>> = (0..entries.len())
            .into_par_iter()
            .with_min_len(4096)
            .fold(no_classes, |mut classes, id| {
                if let Some(m) = measure(id) {
                    classes[m.0.min(LONG_WORD)].push(ratio(m));
                }
                classes
            })
            .reduce(no_classes, |mut all, part| {
                for (class, more) in all.iter_mut().zip(part) {
                    class.extend(more);
                }
                all
            });
        // Medians and MADs depend on the values only, not their order.
        let Some(overall) = Spread::of(&mut classes.concat()) else { return Vec::new() };
        let spreads: Vec<Spread> = classes.into_iter().map(|mut c| Spread::of(&mut c).unwrap_or(overall)).collect();
        context.each_entry(|id, entry, out| {
            let Some(m) = measure(id) else { return };
            let (letters, phones) = m;
            let spread = spreads[letters.min(LONG_WORD)];
            let Some(z) = spread.z(ratio(m)) else { return };
            if z.abs() <= THRESHOLD {
                return;
            }
            let class = if letters >= LONG_WORD { format!("{LONG_WORD}+") } else { letters.to_string() };
            let message = format!(
                "{phones} phones for {letters} letters ({:.2} per letter); {class}-letter words here have {:.2} ± {:.2} (median ± MAD), modified z-score {z:+.1}",
                ratio(m),
                spread.median,
                spread.mad
            );
            let hint = if z > 0.0 {
                "check that the pronunciation belongs to this word (a spelled-out initialism or expanded abbreviation is fine)"
            } else {
                "check for missing phones (a truncated or wrongly pasted pronunciation)"
            };
            out.push(Finding::new(self.id(), self.severity(), id, entry, message).suggest(hint));
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::with;
    use crate::lexicon::Entry;

    #[test]
    fn modified_z_score_matches_the_worked_definition() {
        // Iglewicz & Hoaglin (1993): median 3, MAD 1 → z(8) = 0.6745 · 5 = 3.3725 (not an outlier),
        // z(9) = 4.047 (an outlier). Values chosen so median and MAD are exact.
        let mut values: Vec<f64> = (0..MIN_CLASS).map(|i| [2.0, 3.0, 4.0, 3.0][i % 4]).collect();
        let spread = Spread::of(&mut values).unwrap();
        assert_eq!((spread.median, spread.mad), (3.0, 0.5));
        let spread = Spread { median: 3.0, mad: 1.0 };
        assert!((spread.z(8.0).unwrap() - 3.3725).abs() < 1e-9);
        assert!(spread.z(9.0).unwrap() > THRESHOLD);
        assert_eq!(Spread { median: 1.0, mad: 0.0 }.z(5.0), None);
    }

    fn word(letters: usize, i: usize) -> String {
        (0..letters).map(|k| (b'a' + ((i + k) % 26) as u8) as char).collect()
    }

    fn phones(n: usize) -> String {
        vec!["K"; n].join(" ")
    }

    #[test]
    fn far_off_lengths_are_flagged_within_their_class() {
        // Ten-letter words with 9, 10 or 11 phones: median 1.0, MAD 0.1 phones per letter, so
        // |z| > 3.5 means fewer than 4.8 or more than 15.2 phones.
        let mut rows: Vec<Entry> = (0..300).map(|i| Entry::new(&word(10, i), &phones(9 + i % 3))).collect();
        rows.push(Entry::new("abcdefghij", &phones(16)));
        rows.push(Entry::new("bcdefghijk", &phones(4)));
        rows.push(Entry::new("cdefghijkl", &phones(15)));
        // Two-letter words: a different class, where 4 phones are ordinary.
        rows.extend((0..100).map(|i| Entry::new(&word(2, i), &phones(3 + i % 3))));
        let found = with(&rows, |c| LengthOutlier.run(c));
        assert_eq!(found.iter().map(|f| f.entry).collect::<Vec<_>>(), [300, 301], "{found:#?}");
        assert!(found[0].message.contains("10-letter words here have 1.00 ± 0.10"), "{}", found[0].message);
        assert!(found[1].suggestion.as_deref().unwrap_or("").contains("missing phones"));
    }

    #[test]
    fn small_lexicons_are_not_judged() {
        let mut rows: Vec<Entry> = (0..MIN_CLASS - 2).map(|i| Entry::new(&word(4, i), &phones(3 + i % 3))).collect();
        rows.push(Entry::new("abcd", &phones(40)));
        assert!(with(&rows, |c| LengthOutlier.run(c)).is_empty());
    }
}
