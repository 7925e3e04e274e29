//! `orthoepy export`: write the deterministic build lexicon and phone list.
//!
//! The files written are vouched for by `OUT.sha256`, a `sha256sum` checksum list written last
//! (see `safe_io::replace_together`): a build that runs `sha256sum -c` on it in OUT's folder
//! never takes a new lexicon with an old phone list from an export that was killed halfway.

use super::ProjectArgs;
use anyhow::Context;
use orthoepy::lexicon::plain::{write_plain, PlainExport};
use orthoepy::safe_io::{atomic_write, replace_together};
use std::path::{Path, PathBuf};
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
    /// X-SAMPA (Wells 1995) with stress marks " and % before stressed syllables.
    XSampa,
    /// The phoneset's own symbols (alphabet x-orthoepy-<phoneset>).
    Symbols,
}

/// Write the deterministic build lexicon (plain or W3C PLS) and its phone list.
///
/// One line per pronunciation, sorted by headword then variant order, deprecated entries left out.
/// OUT.sha256, written last, lists the files written (check it with `sha256sum -c` in OUT's
/// folder before a build uses them: an export that was killed halfway leaves no list).
///
/// With --with-probability each line is WORD<TAB>PROBABILITY<TAB>PHONES: an entry's score, or 1
/// for an entry without one, normalised per word to sum to 1 (four decimals).
///
/// Examples:
///   orthoepy export lexicon.csv --format plain -o build/lexicon.txt --phones build/phones.txt
///   orthoepy export lexicon.csv --with-probability -o build/lexiconp.txt
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
    /// Also write the phone inventory, one symbol per line (OUT.sha256 then lists both files).
    #[arg(long, value_name = "OUT")]
    phones: Option<PathBuf>,
    /// Remove stress marks (lines that become identical are written once).
    #[arg(long)]
    strip_stress: bool,
    /// Mark second and later pronunciations with (2), (3), ...
    #[arg(long)]
    variant_suffix: bool,
    /// Plain only: a pronunciation-probability column after the word (WORD<TAB>PROB<TAB>PHONES).
    #[arg(long)]
    with_probability: bool,
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

/// The checksum list written beside OUT: `OUT.sha256`.
fn checksum_list_path(output: &Path) -> PathBuf {
    let mut name = output.file_name().map(|n| n.to_os_string()).unwrap_or_default();
    name.push(".sha256");
    output.with_file_name(name)
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    if args.with_probability && args.format != ExportLayout::Plain {
        anyhow::bail!("--with-probability adds a column to the plain layout; PLS has no place for it (drop the option or use --format plain)");
    }
    super::refuse_overwrite(&args.output, args.force)?;
    let to_stdout = args.output.as_os_str() == "-";
    let manifest = (!to_stdout).then(|| checksum_list_path(&args.output));
    if let Some(phones) = &args.phones {
        super::refuse_overwrite(phones, args.force)?;
        if *phones == args.output || Some(phones) == manifest.as_ref() {
            anyhow::bail!("--phones {} names a file export writes anyway; give the phone list its own name", phones.display());
        }
    }
    let outputs: Vec<&Path> = [Some(&args.output), args.phones.as_ref(), manifest.as_ref()].into_iter().flatten().map(PathBuf::as_path).collect();
    super::remove_output_leftovers(&outputs)?;
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let options = PlainExport {
        strip_stress: args.strip_stress,
        variant_suffix: args.variant_suffix,
        probability: args.with_probability,
        ..Default::default()
    };
    let mut build = write_plain(lexicon.entries(), lexicon.policy(), &options);
    // The build lexicon's text is moved out (and, for PLS, freed before the document is built):
    // at 2,000,000 entries each text is 70-160 MB.
    let plain_text = std::mem::take(&mut build.text);
    let text = match args.format {
        ExportLayout::Plain => plain_text,
        ExportLayout::Pls => {
            drop(plain_text);
            let set = super::resolve_phoneset(None, project.as_ref())?;
            let alphabet = match args.alphabet {
                PlsAlphabet::Ipa => orthoepy::pls::Alphabet::Ipa,
                PlsAlphabet::XSampa => orthoepy::pls::Alphabet::XSampa,
                PlsAlphabet::Symbols => orthoepy::pls::Alphabet::Symbols,
            };
            orthoepy::pls::write_pls(lexicon.entries(), lexicon.policy(), &set, alphabet, &args.lang)?
        }
    };
    let phone_list: Option<(&Path, String)> =
        args.phones.as_deref().map(|path| (path, build.phones.iter().map(|phone| format!("{phone}\n")).collect()));
    match (&manifest, &phone_list) {
        (None, None) => print!("{text}"),
        (None, Some((path, phones))) => {
            print!("{text}");
            atomic_write(path, phones.as_bytes(), false).with_context(|| format!("cannot write {}", path.display()))?;
        }
        (Some(manifest), _) => {
            let mut files: Vec<(&Path, &[u8])> = vec![(&args.output, text.as_bytes())];
            files.extend(phone_list.as_ref().map(|(path, phones)| (*path, phones.as_bytes())));
            replace_together(&files, manifest).with_context(|| format!("cannot write {}", args.output.display()))?;
        }
    }
    eprintln!("wrote {} lines, {} phones", build.lines, build.phones.len());
    Ok(ExitCode::SUCCESS)
}
