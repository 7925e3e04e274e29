//! `orthoepy show`: a word's pronunciations in the phoneset's symbols, IPA and X-SAMPA, written
//! exactly as the PLS export writes them.

use super::{DataFormat, ProjectArgs};
use orthoepy::lexicon::find;
use orthoepy::lexicon::Query;
use orthoepy::phoneset::Alphabet;
use orthoepy::pls::{entry_phones, lexicon_onsets};
use std::path::PathBuf;
use std::process::ExitCode;

/// Show the pronunciations of words in symbols, IPA and X-SAMPA.
///
/// Stress marks are placed as `export --format pls` places them (before the longest consonant
/// cluster that begins some word of the lexicon). Exit status is 0 when every word was found,
/// 1 when one was not.
///
/// Examples:
///   orthoepy show ferry harbour
///   orthoepy show --format json ferry
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// Words to show.
    #[arg(required = true)]
    words: Vec<String>,
    /// The CSV store (default: the project's lexicon).
    #[arg(short, long)]
    lexicon: Option<PathBuf>,
    /// The phoneset (shipped id or file; default: the project's, else en-arpa).
    #[arg(long)]
    phoneset: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

#[derive(serde::Serialize)]
struct Shown<'a> {
    word: &'a str,
    symbols: &'a str,
    ipa: String,
    xsampa: String,
    status: String,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let set = super::resolve_phoneset(args.phoneset.as_deref(), project.as_ref())?;
    let index = lexicon.index();
    let onsets = lexicon_onsets(lexicon.entries(), &set);
    let mut shown = Vec::new();
    let mut missing = false;
    for word in &args.words {
        let ids = find(&index, &lexicon, word, Query::Exact)?;
        if ids.is_empty() {
            eprintln!("{word}: not found");
            missing = true;
        }
        for entry in ids.into_iter().filter_map(|i| lexicon.entries().get(i)) {
            let (ipa, xsampa) = match entry_phones(entry, &set) {
                Ok(pron) => (set.render_with(&pron, Alphabet::Ipa, &onsets), set.render_with(&pron, Alphabet::XSampa, &onsets)),
                Err(symbol) => {
                    eprintln!("{}: phone {symbol:?} is not in phoneset {}; fix it (orthoepy audit)", entry.word, set.id());
                    missing = true;
                    ("?".into(), "?".into())
                }
            };
            shown.push(Shown { word: &entry.word, symbols: &entry.pronunciation, ipa, xsampa, status: entry.status.to_string() });
        }
    }
    match args.format {
        DataFormat::Json => super::print_json(&shown)?,
        DataFormat::Text => {
            for s in &shown {
                println!("{}\t{}\t/{}/\t{}\t{}", s.word, s.symbols, s.ipa, s.xsampa, s.status);
            }
        }
    }
    Ok(if missing { ExitCode::from(1) } else { ExitCode::SUCCESS })
}
