//! `orthoepy convert`: write a lexicon in another phoneset, with the report of every non-exact
//! phone mapping.

use super::{DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::convert::convert_entries;
use orthoepy::lexicon::Lexicon;
use orthoepy::phoneset::{parse_overrides, Converter};
use std::path::PathBuf;
use std::process::ExitCode;

/// Convert a lexicon to another phoneset through the feature tables.
///
/// Each phone goes to the target phone with the same IPA, else the same features, else (for a
/// diphthong) its vowel targets, else the nearest phone by feature distance. Every mapping that
/// is not exact (nearest, or from --overrides) is reported with its distance, count and example
/// words. Nothing is written when an entry is not of the source phoneset.
///
/// The override file has one `SOURCE TARGET...` per line (bare symbols, `#` comments).
///
/// Examples:
///   orthoepy convert lexicon.csv --to ipa-broad -o lexicon-ipa.csv
///   orthoepy convert lexicon.csv --to ipa-broad --overrides map.txt -o out.csv --format json
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// The target phoneset (shipped id or file).
    #[arg(long)]
    to: String,
    /// The source phoneset (default: the project's, else en-arpa).
    #[arg(long)]
    from: Option<String>,
    /// The CSV store to write.
    #[arg(short, long, value_name = "OUT")]
    output: PathBuf,
    /// Phone overrides, one `SOURCE TARGET...` per line.
    #[arg(long, value_name = "FILE")]
    overrides: Option<PathBuf>,
    /// Report format (on stdout).
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    /// Replace OUT when it exists.
    #[arg(long)]
    force: bool,
    #[command(flatten)]
    project: ProjectArgs,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    super::refuse_overwrite(&args.output, args.force)?;
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let from = super::resolve_phoneset(args.from.as_deref(), project.as_ref())?;
    let to = super::resolve_phoneset(Some(&args.to), None)?;
    let overrides = match &args.overrides {
        Some(path) => {
            let text = std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
            parse_overrides(&text, &from, &to).with_context(|| format!("in {}", path.display()))?
        }
        None => Default::default(),
    };
    let converter = Converter::new(&from, &to, &overrides)?;
    let done = convert_entries(lexicon.entries(), &converter, &from, &to);
    if !done.unreadable.is_empty() {
        let origin = lexicon.path().map(|p| p.display().to_string()).unwrap_or_default();
        for (line, word, symbol) in done.unreadable.iter().take(10) {
            eprintln!("{origin}:{line}: {word}: phone {symbol:?} is not in phoneset {}", from.id());
        }
        anyhow::bail!("{} entries are not of phoneset {}; fix them (orthoepy audit) or pass --from; nothing written", done.unreadable.len(), from.id());
    }
    let mut out = Lexicon::from_entries(done.entries, *lexicon.policy());
    out.save_as(&args.output).with_context(|| format!("cannot write {}", args.output.display()))?;
    match args.format {
        DataFormat::Json => super::print_json(&done.report)?,
        DataFormat::Text => {
            for row in &done.report {
                let distance = match row.kind {
                    orthoepy::phoneset::MatchKind::Nearest { distance } => format!("{distance:.3}"),
                    _ => "override".to_string(),
                };
                println!("{}\t{}\t{}\t{}\t{}", row.from, row.to, distance, row.count, row.examples.join(" "));
            }
        }
    }
    eprintln!("wrote {} entries in {} ({} non-exact mappings)", lexicon.entries().len(), to.id(), done.report.len());
    Ok(ExitCode::SUCCESS)
}
