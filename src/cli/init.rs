//! `orthoepy init`: start a project — a commented `orthoepy.toml` and an empty lexicon, or one
//! imported from a plain or PLS file. Refuses to overwrite anything.

use super::import::{read_layout, ImportLayout};
use anyhow::Context;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use std::path::PathBuf;
use std::process::ExitCode;

/// Start a project in DIR (default: the current folder): orthoepy.toml and lexicon.csv.
///
/// The project file names the lexicon, the phoneset, the review queue and journal, and shows the
/// optional keys commented out. With --from the lexicon is imported (plain `word PH PH ...` or,
/// for .pls/.xml files, W3C PLS); every line that cannot be read is reported.
///
/// Examples:
///   orthoepy init coast-lexicon --phoneset en-arpa
///   orthoepy init . --phoneset en-arpa --from cmudict.dict
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The project folder (created if missing).
    dir: Option<PathBuf>,
    /// The phoneset: a shipped id (en-arpa, ipa-broad, es-ipa) or a TOML path.
    #[arg(long, value_name = "ID")]
    phoneset: String,
    /// A lexicon to import (plain layout, or PLS for .pls / .xml).
    #[arg(long, value_name = "FILE")]
    from: Option<PathBuf>,
}

/// The project file `init` writes: the required keys, then the optional ones commented out.
fn project_file(phoneset: &str) -> String {
    format!(
        "# orthoepy project file (keys: see the README's \"Files\" section).\n\
         lexicon = \"lexicon.csv\"\n\
         phoneset = {phoneset:?}\n\
         # Headwords that differ only in case are one word.\n\
         fold_case = true\n\
         # The review queue and the append-only journal of review decisions.\n\
         queue = \"queue.jsonl\"\n\
         journal = \"journal.jsonl\"\n\
         # Letter-to-sound rules for guessing (a shipped id such as \"en\", or a TOML path):\n\
         # letter_to_sound = \"en\"\n\
         # A joint-sequence model trained with `orthoepy train` (guesses use it when set):\n\
         # model = \"model.g2p\"\n\
         # Accent profiles for `queue add --variants` (shipped ids or TOML paths):\n\
         # profiles = [\"fast-casual\"]\n\
         #\n\
         # [stress]\n\
         # How many primary stresses a word needs (\"exactly-one\" or \"at-least-one\"):\n\
         # primary = \"exactly-one\"\n"
    )
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let dir = args.dir.unwrap_or_else(|| PathBuf::from("."));
    let (toml_path, lexicon_path) = (dir.join("orthoepy.toml"), dir.join("lexicon.csv"));
    for path in [&toml_path, &lexicon_path] {
        if path.exists() {
            anyhow::bail!("{} exists; init writes a new project only (edit that file, or pick another folder)", path.display());
        }
    }
    let phoneset = super::resolve_phoneset(Some(&args.phoneset), None)?;
    let entries = match &args.from {
        None => Vec::new(),
        Some(file) => {
            let is_pls = file.extension().is_some_and(|e| e.eq_ignore_ascii_case("pls") || e.eq_ignore_ascii_case("xml"));
            let layout = if is_pls { ImportLayout::Pls } else { ImportLayout::Plain };
            let source = file.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_default();
            let read = read_layout(layout, file, &phoneset, &source)?;
            read.report();
            read.entries
        }
    };
    std::fs::create_dir_all(&dir).with_context(|| format!("cannot create {}", dir.display()))?;
    let mut lexicon = Lexicon::from_entries(entries, HeadwordPolicy { fold_case: true });
    lexicon.save_as(&lexicon_path).context("cannot write the lexicon")?;
    orthoepy::safe_io::atomic_write(&toml_path, project_file(&args.phoneset).as_bytes(), false)
        .with_context(|| format!("cannot write {}", toml_path.display()))?;
    println!(
        "project ready in {} ({} entries, phoneset {}); next: orthoepy audit --project {}",
        dir.display(),
        lexicon.entries().len(),
        phoneset.id(),
        dir.display()
    );
    Ok(ExitCode::SUCCESS)
}
