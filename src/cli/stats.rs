//! `orthoepy stats`: counts that describe a lexicon.

use super::{DataFormat, ProjectArgs};
use orthoepy::lexicon::{Lexicon, LexiconIndex};
use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::ExitCode;

/// Show entries, words, variants per word, statuses, sources and phone frequencies.
///
/// Example: orthoepy stats lexicon.csv --format json
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

/// The figures `stats` reports.
#[derive(Debug, serde::Serialize)]
struct Stats {
    entries: usize,
    words: usize,
    /// number of pronunciations → number of words with that many
    variants_per_word: BTreeMap<usize, usize>,
    statuses: BTreeMap<String, usize>,
    sources: BTreeMap<String, usize>,
    mean_phones_per_entry: f64,
    /// phone symbol as written (stress marks included) → occurrences
    phone_frequencies: BTreeMap<String, usize>,
}

fn compute(lexicon: &Lexicon, index: &LexiconIndex) -> Stats {
    let mut variants_per_word = BTreeMap::new();
    for key in index.keys() {
        *variants_per_word.entry(index.lookup(&key).len()).or_insert(0) += 1;
    }
    let mut statuses = BTreeMap::new();
    let mut sources = BTreeMap::new();
    let mut phone_frequencies = BTreeMap::new();
    let mut phones = 0usize;
    for entry in lexicon.entries() {
        *statuses.entry(entry.status.to_string()).or_insert(0) += 1;
        *sources.entry(entry.source.clone()).or_insert(0) += 1;
        for phone in entry.phones() {
            phones += 1;
            *phone_frequencies.entry(phone.to_string()).or_insert(0) += 1;
        }
    }
    let entries = lexicon.entries().len();
    Stats {
        entries,
        words: index.word_count(),
        variants_per_word,
        statuses,
        sources,
        mean_phones_per_entry: if entries == 0 { 0.0 } else { phones as f64 / entries as f64 },
        phone_frequencies,
    }
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (lexicon, _) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let stats = compute(&lexicon, &lexicon.index());
    match args.format {
        DataFormat::Json => super::print_json(&stats)?,
        DataFormat::Text => {
            println!("{}", lexicon);
            println!("entries\t{}\nwords\t{}", stats.entries, stats.words);
            println!("mean phones per entry\t{:.2}", stats.mean_phones_per_entry);
            println!("variants per word:");
            for (n, words) in &stats.variants_per_word {
                println!("  {n}\t{words}");
            }
            println!("statuses:");
            for (s, n) in &stats.statuses {
                println!("  {s}\t{n}");
            }
            println!("sources:");
            for (s, n) in &stats.sources {
                println!("  {}\t{n}", if s.is_empty() { "(none)" } else { s });
            }
            println!("phones (most frequent first):");
            let mut phones: Vec<_> = stats.phone_frequencies.iter().collect();
            phones.sort_by(|a, b| b.1.cmp(a.1).then(a.0.cmp(b.0)));
            for (p, n) in phones {
                println!("  {p}\t{n}");
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
