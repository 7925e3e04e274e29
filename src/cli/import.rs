//! `orthoepy import`: read an external lexicon layout into a CSV store.

use anyhow::Context;
use orthoepy::lexicon::plain::read_plain_file;
use orthoepy::lexicon::Lexicon;
use orthoepy::project::Project;
use rayon::prelude::*;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

/// Layouts `import` reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ImportLayout {
    /// `word PH PH ...` per line, optional `(2)` variant suffix, `#` comments; `word PROB PH ...`
    /// (a probability in 0..=1 as the second field) stores PROB as the entry's score.
    Plain,
    /// A W3C PLS 1.0 document, alphabet `ipa`, `x-sampa` or `x-orthoepy-<phoneset>`.
    Pls,
}

/// Read a lexicon in another layout and write it as a CSV store.
///
/// Every line that splits into a headword and phones is kept, even with phones outside the
/// phoneset or odd stress (run `orthoepy audit` next); each line that cannot be read is reported
/// as FILE:LINE:COLUMN.
///
/// Example: orthoepy import plain cmudict.dict -o lexicon.csv --phoneset en-arpa
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The layout of the input file.
    #[arg(value_enum)]
    layout: ImportLayout,
    /// The file to read.
    file: PathBuf,
    /// The CSV store to write.
    #[arg(short, long, value_name = "LEXICON.csv")]
    output: PathBuf,
    /// Phoneset the pronunciations are meant to be in (a shipped id or a TOML path).
    #[arg(long, value_name = "NAME", default_value = "en-arpa")]
    phoneset: String,
    /// Text for the `source` column (default: the input file's name without extension).
    #[arg(long)]
    source: Option<String>,
    /// Fold case in headword comparison (the project default).
    #[arg(long, default_value_t = true, action = clap::ArgAction::Set, value_name = "BOOL")]
    fold_case: bool,
    /// Replace OUTPUT if it exists (its old content is kept as OUTPUT.bak).
    #[arg(long)]
    force: bool,
    /// Write nothing and exit 2 if any line cannot be read.
    #[arg(long)]
    strict: bool,
}

/// The project whose lexicon `output` is, if any: an import into it holds the project lock.
fn project_of(output: &Path) -> Option<Project> {
    let absolute = |path: &Path| -> Option<PathBuf> {
        let folder = path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
        Some(std::fs::canonicalize(folder).ok()?.join(path.file_name()?))
    };
    let target = absolute(output)?;
    let project = Project::discover(target.parent()?).ok()?;
    (absolute(&project.lexicon)? == target).then_some(project)
}

/// What was read from a file in another layout.
pub struct LayoutRead {
    /// The entries.
    pub entries: Vec<orthoepy::lexicon::Entry>,
    /// One message per item that could not be read.
    pub rejected: Vec<String>,
    /// One message per item kept with a remark (a PLS alias nothing in the document pronounces).
    pub notes: Vec<String>,
}

impl LayoutRead {
    /// Prints the rejected items and the notes on stderr.
    pub fn report(&self) {
        for line in self.rejected.iter().chain(&self.notes) {
            eprintln!("{line}");
        }
    }
}

/// Reads `file` in `layout`.
pub fn read_layout(layout: ImportLayout, file: &Path, phoneset: &orthoepy::phoneset::Phoneset, source: &str) -> anyhow::Result<LayoutRead> {
    let lines = |items: &[orthoepy::support::located::Located]| items.iter().map(ToString::to_string).collect();
    Ok(match layout {
        ImportLayout::Plain => {
            let import = read_plain_file(file, source)?;
            LayoutRead { rejected: lines(&import.rejected), entries: import.entries, notes: Vec::new() }
        }
        ImportLayout::Pls => {
            let import = orthoepy::pls::read_pls_file(file, phoneset, source)?;
            LayoutRead { rejected: lines(&import.rejected), notes: lines(&import.notes), entries: import.entries }
        }
    })
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    // Into a project's lexicon under its lock (which cleans up after a killed save); elsewhere
    // the leftovers of a killed import into the same file are removed here.
    let lock = project_of(&args.output).map(|project| super::lock_project(&project, "import")).transpose()?;
    if lock.is_none() {
        super::remove_output_leftovers(&[&args.output])?;
    }
    super::refuse_overwrite(&args.output, args.force)?;
    let source = args.source.clone().unwrap_or_else(|| {
        args.file.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_default()
    });
    let phoneset = super::resolve_phoneset(Some(&args.phoneset), None)?;
    let read = read_layout(args.layout, &args.file, &phoneset, &source)?;
    read.report();
    let rejected = read.rejected.len();
    if args.strict && rejected > 0 {
        anyhow::bail!("{rejected} item(s) could not be read; nothing was written");
    }
    let policy = orthoepy::lexicon::HeadwordPolicy { fold_case: args.fold_case };
    let mut lexicon = Lexicon::from_entries(read.entries, policy);
    let outside = lexicon.entries().par_iter().filter(|e| phoneset.parse(&e.pronunciation).is_err()).count();
    // Sorted first (in parallel; saving keeps the order), so the count of headwords needs no sort.
    lexicon.sort();
    let words = lexicon.headword_count();
    lexicon.save_as(&args.output).context("cannot write the lexicon")?;
    eprintln!(
        "imported {} pronunciations of {} words into {}; {} line(s) rejected; {} pronunciation(s) do not parse in {} (run `orthoepy audit`)",
        lexicon.entries().len(),
        words,
        args.output.display(),
        rejected,
        outside,
        phoneset.id(),
    );
    Ok(ExitCode::SUCCESS)
}
