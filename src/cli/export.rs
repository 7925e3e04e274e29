//! `orthoepy export`: write the deterministic build lexicon and phone list.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::lexicon::plain::{write_plain, PlainExport};
use orthoepy::safe_io::atomic_write;
use std::path::PathBuf;
use std::process::ExitCode;

/// Layouts `export` writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ExportLayout {
    /// `word PH PH ...` per line, sorted.
    Plain,
    /// A W3C PLS 1.0 document (see --alphabet).
    Pls,
}

/// How PLS phonemes are written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum PlsAlphabet {
    /// IPA with stress marks before stressed syllables.
    Ipa,
    /// The phoneset's own symbols (alphabet x-orthoepy-<phoneset>).
    Symbols,
}

/// Write the deterministic build lexicon (plain or W3C PLS) and its phone list.
///
/// One line per pronunciation, sorted by headword then variant order, deprecated entries left out.
///
/// Examples:
///   orthoepy export lexicon.csv --format plain -o build/lexicon.txt --phones build/phones.txt
///   orthoepy export lexicon.csv --format pls --alphabet ipa --lang en-GB -o lexicon.pls
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Output layout.
    #[arg(long, value_enum, default_value = "plain")]
    format: ExportLayout,
    /// The build lexicon file to write ("-" for stdout).
    #[arg(short, long, value_name = "OUT")]
    output: PathBuf,
    /// Also write the phone inventory, one symbol per line.
    #[arg(long, value_name = "OUT")]
    phones: Option<PathBuf>,
    /// Remove stress marks (lines that become identical are written once).
    #[arg(long)]
    strip_stress: bool,
    /// Mark second and later pronunciations with (2), (3), ...
    #[arg(long)]
    variant_suffix: bool,
    /// PLS only: the phoneme alphabet.
    #[arg(long, value_enum, default_value = "ipa")]
    alphabet: PlsAlphabet,
    /// PLS only: the document language (BCP 47).
    #[arg(long, default_value = "en-US")]
    lang: String,
    /// Replace OUT (and the phone list) when they exist.
    #[arg(long)]
    force: bool,
    #[command(flatten)]
    project: ProjectArgs,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    super::refuse_overwrite(&args.output, args.force)?;
    if let Some(phones) = &args.phones {
        super::refuse_overwrite(phones, args.force)?;
    }
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let options = PlainExport { strip_stress: args.strip_stress, variant_suffix: args.variant_suffix, ..Default::default() };
    let build = write_plain(lexicon.entries(), lexicon.policy(), &options);
    let text = match args.format {
        ExportLayout::Plain => build.text.clone(),
        ExportLayout::Pls => {
            let set = super::resolve_phoneset(None, project.as_ref())?;
            let alphabet = match args.alphabet {
                PlsAlphabet::Ipa => orthoepy::pls::Alphabet::Ipa,
                PlsAlphabet::Symbols => orthoepy::pls::Alphabet::Symbols,
            };
            orthoepy::pls::write_pls(lexicon.entries(), lexicon.policy(), &set, alphabet, &args.lang)?
        }
    };
    if args.output.as_os_str() == "-" {
        print!("{text}");
    } else {
        atomic_write(&args.output, text.as_bytes(), false)
            .with_context(|| format!("cannot write {}", args.output.display()))?;
    }
    if let Some(path) = &args.phones {
        let mut text = String::new();
        for phone in &build.phones {
            text.push_str(phone);
            text.push('\n');
        }
        atomic_write(path, text.as_bytes(), false).with_context(|| format!("cannot write {}", path.display()))?;
    }
    eprintln!("wrote {} lines, {} phones", build.lines, build.phones.len());
    Ok(ExitCode::SUCCESS)
}
