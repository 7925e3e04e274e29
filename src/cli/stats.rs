//! `orthoepy stats`: counts that describe a lexicon.

use super::{DataFormat, ProjectArgs};
use orthoepy::lexicon::LexiconStats;
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
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (lexicon, _) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let stats = LexiconStats::of(&lexicon);
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
            for (p, n) in stats.phones_by_frequency() {
                println!("  {p}\t{n}");
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
