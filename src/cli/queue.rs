//! `orthoepy queue`: add words to the review queue (from a word list, running text, variant
//! proposals or audit findings), list what is queued with what was decided, decide many items
//! at once by score, remove items from review or bring them back, and undo recent decisions.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::queue::{
    self, Action, Apostrophe, BatchRequest, BatchRun, Case, Corpus, Digits, Hyphen, ListedItem, Selection, Sources, Threshold,
    TokenRule,
};
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
///   orthoepy queue decide --accept-above 0.95 --kind new --dry-run
///   orthoepy queue decide --reject-below 0.05 --kind variant --source variant:flapping
///   orthoepy queue remove --origin variants:london-vernacular
///   orthoepy queue undo --last 120
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
    /// Show the queue with the review state and the decision of each item.
    List(ListArgs),
    /// Accept (or reject) every pending item whose best candidate's score passes a threshold;
    /// one journal record per item, as if decided on the review screen.
    Decide(DecideArgs),
    /// Remove pending or set-aside items from review (journaled; `queue restore` brings them back).
    Remove(SelectArgs),
    /// Bring items removed from review back (revokes their removal).
    Restore(SelectArgs),
    /// Revoke the most recent decisions not yet merged by `apply` (newest first).
    Undo(UndoArgs),
}

/// Which items a batch is about; every option given must match.
#[derive(Debug, clap::Args)]
struct SelectionArgs {
    /// Only items of this kind.
    #[arg(long, value_enum)]
    kind: Option<KindArg>,
    /// Only items whose best candidate comes from this source (`rules` also matches `rules:en`,
    /// `variant` matches `variant:flapping+t-glottal`).
    #[arg(long, value_name = "SOURCE")]
    source: Option<String>,
    /// Only items queued from this origin (`corpus:queries.txt`, or `corpus` for every corpus).
    #[arg(long, value_name = "ORIGIN")]
    origin: Option<String>,
    /// Only this word (repeat for several; case is ignored).
    #[arg(long = "word", value_name = "WORD")]
    words: Vec<String>,
}

#[derive(Debug, Clone, Copy, clap::ValueEnum)]
enum KindArg {
    /// Words missing from the lexicon.
    New,
    /// Proposed variants.
    Variant,
    /// Audit findings.
    Audit,
}

impl SelectionArgs {
    fn selection(self) -> Selection {
        let kind = self.kind.map(|k| match k {
            KindArg::New => "new",
            KindArg::Variant => "variant",
            KindArg::Audit => "audit",
        });
        Selection { kind: kind.map(str::to_string), source: self.source, origin: self.origin, words: self.words }
    }
}

#[derive(Debug, clap::Args)]
#[command(group(clap::ArgGroup::new("threshold").required(true).args(["accept_above", "reject_below"])))]
struct DecideArgs {
    /// Accept the best candidate of every selected pending item scoring at least P (0..=1).
    #[arg(long, value_name = "P", value_parser = probability)]
    accept_above: Option<f64>,
    /// Reject every selected pending item whose best candidate scores below P (0..=1).
    #[arg(long, value_name = "P", value_parser = probability)]
    reject_below: Option<f64>,
    #[command(flatten)]
    selection: SelectionArgs,
    /// Say what would be decided; write nothing.
    #[arg(long)]
    dry_run: bool,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
}

#[derive(Debug, clap::Args)]
struct SelectArgs {
    #[command(flatten)]
    selection: SelectionArgs,
    /// Say what would change; write nothing.
    #[arg(long)]
    dry_run: bool,
}

#[derive(Debug, clap::Args)]
struct UndoArgs {
    /// How many decisions to revoke.
    #[arg(long, value_name = "N", default_value_t = 1)]
    last: usize,
    /// Say what would be revoked; write nothing.
    #[arg(long)]
    dry_run: bool,
}

fn probability(text: &str) -> Result<f64, String> {
    match text.parse::<f64>() {
        Ok(p) if (0.0..=1.0).contains(&p) => Ok(p),
        Ok(p) => Err(format!("{p} is not a probability; give a number from 0 to 1")),
        Err(e) => Err(format!("{e}; give a number from 0 to 1")),
    }
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
    /// With --audit, also the cross-validated unlikely-pronunciation check (trains a model per
    /// fold; minutes on a large lexicon, cached per lexicon).
    #[arg(long, requires = "audit")]
    model_check: bool,
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
        QueueAction::Decide(d) => decide(&project, d),
        QueueAction::Remove(r) => batch(&project, "queue remove", BatchRequest::Remove(r.selection.selection()), r.dry_run),
        QueueAction::Restore(r) => batch(&project, "queue restore", BatchRequest::Restore(r.selection.selection()), r.dry_run),
        QueueAction::Undo(u) => batch(&project, "queue undo", BatchRequest::Undo(u.last), u.dry_run),
    }
}

/// Runs a batch request under the project lock (a dry run only reads and needs no lock).
fn run_locked(project: &Project, command: &str, request: &BatchRequest, dry_run: bool) -> anyhow::Result<BatchRun> {
    let _lock = if dry_run { None } else { Some(super::lock_project(project, command)?) };
    Ok(queue::run_batch(project, request, dry_run)?)
}

fn decide(project: &Project, d: DecideArgs) -> anyhow::Result<ExitCode> {
    let threshold = match (d.accept_above, d.reject_below) {
        (Some(p), _) => Threshold::AcceptAbove(p),
        (None, Some(p)) => Threshold::RejectBelow(p),
        (None, None) => unreachable!("clap requires one threshold"),
    };
    let request = BatchRequest::Decide(d.selection.selection(), threshold);
    let run = run_locked(project, "queue decide", &request, d.dry_run)?;
    if let DataFormat::Json = d.format {
        print_json(&run)?;
        return Ok(ExitCode::SUCCESS);
    }
    let (verb, rule) = match threshold {
        Threshold::AcceptAbove(p) => ("accepted", format!("best candidate scoring at least {p}")),
        Threshold::RejectBelow(p) => ("rejected", format!("best candidate scoring below {p}")),
    };
    let verb = if d.dry_run { format!("would have {verb}") } else { verb.to_string() };
    println!(
        "{verb} {} of {} selected pending item(s) ({rule}); expected wrong: {:.1}",
        run.plan.decisions.len(),
        run.plan.considered,
        run.plan.expected_wrong
    );
    if run.plan.unscored > 0 {
        println!("left {} item(s) alone: their best candidate has no score", run.plan.unscored);
    }
    print_written(&run);
    Ok(ExitCode::SUCCESS)
}

fn batch(project: &Project, command: &str, request: BatchRequest, dry_run: bool) -> anyhow::Result<ExitCode> {
    let run = run_locked(project, command, &request, dry_run)?;
    let what = match &request {
        BatchRequest::Remove(_) => "removal(s) from review",
        BatchRequest::Restore(_) => "item(s) brought back into review",
        BatchRequest::Undo(_) => "decision(s) revoked",
        BatchRequest::Decide(..) => "decision(s)",
    };
    println!("{}{} {what}", if dry_run { "would write " } else { "" }, run.records);
    match (&request, &run.written) {
        (BatchRequest::Remove(_), _) => print_written(&run),
        (_, Some(range)) => println!("journal records {}–{}", range.start(), range.end()),
        (_, None) => {}
    }
    Ok(ExitCode::SUCCESS)
}

fn print_written(run: &BatchRun) {
    if let Some(range) = &run.written {
        println!("journal records {}–{}; undo on the review screen (u) or with `orthoepy queue undo --last {}`", range.start(), range.end(), run.records);
    }
}

fn add(project: Project, a: AddArgs) -> anyhow::Result<ExitCode> {
    let rule = TokenRule { apostrophe: a.apostrophe, hyphen: a.hyphen, digits: a.digits, case: a.case };
    let sources = Sources {
        words: a.words,
        corpus: a.corpus.map(|path| Corpus { path, rule, min_count: a.min_count }),
        profiles: a.variants.into_iter().collect(),
        audit: a.audit,
        model_check: a.model_check,
    };
    let summary = add_sources(project, &sources, !a.no_guess)?;
    match a.format {
        DataFormat::Json => print_json(&summary.0)?,
        DataFormat::Text => {
            println!(
                "queued {} new item(s), updated {}, {} unchanged; {} in {}",
                summary.0.new,
                summary.0.updated,
                summary.0.unchanged,
                summary.0.total,
                summary.1.display()
            );
            if summary.0.still_removed > 0 {
                println!("{} of them stay removed from review (`orthoepy queue restore` brings them back)", summary.0.still_removed);
            }
        }
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
                let warnings: String = l.item.warnings().iter().map(|w| format!("  (warning: {w})")).collect();
                writeln!(out, "{:<8} {:<7} {:>5}  {:<20} {}{warnings}", l.state.name(), l.item.kind.tag(), l.item.count, l.item.word, shown(l))?;
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

/// What `queue list` shows after the word: the decision in force, or the best candidate.
fn shown(l: &ListedItem) -> String {
    let Some(d) = &l.decision else {
        return match l.item.candidates.first() {
            Some(best) => format!("best: {}", best.pronunciation),
            None => "no candidate yet".to_string(),
        };
    };
    let action = match &d.action {
        Action::Accept { pronunciation, edited: true, .. } => format!("accept {pronunciation} (edited)"),
        Action::Accept { pronunciation, .. } => format!("accept {pronunciation}"),
        Action::Reject => "reject".to_string(),
        Action::SetAside => "set aside".to_string(),
        Action::Remove => "removed from review".to_string(),
        Action::ChangeEntry { from, pronunciation } => format!("change {from} to {pronunciation}"),
        Action::AddVariant { pronunciation } => format!("add variant {pronunciation}"),
        Action::DeprecateEntry { pronunciation } => format!("deprecate {pronunciation}"),
    };
    let note = if d.note.is_empty() { String::new() } else { format!(" — {}", d.note) };
    format!("{action} (#{}){note}", d.seq)
}
