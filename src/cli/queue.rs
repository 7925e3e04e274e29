//! `orthoepy queue`: add words to the review queue (from a word list, running text, variant
//! proposals or audit findings) and list what is queued.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::queue::{self, Apostrophe, Case, Corpus, Digits, Hyphen, Sources, TokenRule};
use orthoepy::project::Project;
use orthoepy::workspace::Workspace;
use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

/// Add items to the review queue, or list it.
///
/// Examples:
///   orthoepy queue add --words new-words.txt
///   orthoepy queue add --corpus passenger-queries.txt --hyphen keep --min-count 2
///   orthoepy queue list --format json
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    #[command(subcommand)]
    action: QueueAction,
    #[command(flatten)]
    project: ProjectArgs,
}

#[derive(Debug, clap::Subcommand)]
enum QueueAction {
    /// Queue words missing from the lexicon (most frequent first) or proposals to review.
    Add(AddArgs),
    /// Show the queue with the review state of each item.
    List(ListArgs),
}

#[derive(Debug, clap::Args)]
#[command(group(clap::ArgGroup::new("from").required(true).multiple(true).args(["words", "corpus", "variants", "audit"])))]
struct AddArgs {
    /// A word list: one word per line, optionally a tab and an example line.
    #[arg(long, value_name = "FILE")]
    words: Option<PathBuf>,
    /// Running text: words missing from the lexicon are counted and queued.
    #[arg(long, value_name = "FILE")]
    corpus: Option<PathBuf>,
    /// Variant proposals of an accent profile (the project's own by name, a shipped id, or a file).
    #[arg(long, value_name = "PROFILE")]
    variants: Option<String>,
    /// Findings of the lexicon audit.
    #[arg(long)]
    audit: bool,
    /// Apostrophes inside words (corpus): keep (o'clock), split (o + clock) or drop (oclock).
    #[arg(long, value_enum, default_value = "keep")]
    apostrophe: Apostrophe,
    /// Hyphens inside words (corpus): split (ferry + port) or keep (ferry-port).
    #[arg(long, value_enum, default_value = "split")]
    hyphen: Hyphen,
    /// Tokens with digits (corpus): skip or keep.
    #[arg(long, value_enum, default_value = "skip")]
    digits: Digits,
    /// Case (corpus): fold (Quay = quay) or keep.
    #[arg(long, value_enum, default_value = "fold")]
    case: Case,
    /// Queue without guessing candidates (the review screen guesses them in the background).
    #[arg(long)]
    no_guess: bool,
    /// Queue corpus words seen at least this often.
    #[arg(long, default_value_t = 1)]
    min_count: u64,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
}

#[derive(Debug, clap::Args)]
struct ListArgs {
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
}

/// Run `orthoepy queue`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    match args.action {
        QueueAction::Add(a) => add(project, a),
        QueueAction::List(l) => list(&project, l.format),
    }
}

fn add(project: Project, a: AddArgs) -> anyhow::Result<ExitCode> {
    let rule = TokenRule { apostrophe: a.apostrophe, hyphen: a.hyphen, digits: a.digits, case: a.case };
    let sources = Sources {
        words: a.words,
        corpus: a.corpus.map(|path| Corpus { path, rule, min_count: a.min_count }),
        profiles: a.variants.into_iter().collect(),
        audit: a.audit,
    };
    let summary = add_sources(project, &sources, !a.no_guess)?;
    match a.format {
        DataFormat::Json => print_json(&summary.0)?,
        DataFormat::Text => println!(
            "queued {} new item(s), merged {} into queued ones; {} in {}",
            summary.0.new,
            summary.0.merged,
            summary.0.total,
            summary.1.display()
        ),
    }
    Ok(ExitCode::SUCCESS)
}

/// Gather the sources, guess candidates for new words (with a progress bar on a terminal) and
/// add everything to the project's queue; returns the summary and the queue file.
pub fn add_sources(project: Project, sources: &Sources, guess: bool) -> anyhow::Result<(queue::AddSummary, PathBuf)> {
    let queue_path = project.queue.clone();
    let _lock = super::lock_project(&project, "queue add")?;
    let workspace = Workspace::open(project)?;
    let bar = super::progress_bar(0, "guessing");
    let (summary, warnings) = queue::add_sources(&workspace, sources, guess, &mut |done, total| {
        bar.set_length(total as u64);
        bar.set_position(done as u64);
    })?;
    bar.finish_and_clear();
    for warning in &warnings {
        eprintln!("warning: {warning}");
    }
    Ok((summary, queue_path))
}

fn list(project: &Project, format: DataFormat) -> anyhow::Result<ExitCode> {
    let (listed, warnings) = queue::list_items(project).context("cannot read the queue")?;
    for w in &warnings {
        eprintln!("warning: {w}");
    }
    match format {
        DataFormat::Json => print_json(&listed)?,
        DataFormat::Text => {
            let mut out = std::io::stdout().lock();
            for l in &listed {
                let best = l.item.candidates.first().map(|c| c.pronunciation.as_str()).unwrap_or("-");
                writeln!(out, "{:<8} {:<7} {:>5}  {:<20} {}", l.state.name(), l.item.kind.tag(), l.item.count, l.item.word, best)?;
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
