//! `orthoepy audit`: run the lexicon checks, print the report, optionally make the safe repairs.

use super::{DataFormat, ProjectArgs};
use anyhow::Context as _;
use orthoepy::audit::{self, fix, Context, Report, Severity};
use orthoepy::lexicon::{Lexicon, LoadMode};
use std::io::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

/// Severities `--fail-on` accepts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum FailOn {
    /// Exit 1 when there is an error.
    Error,
    /// Exit 1 when there is a warning or an error.
    Warning,
    /// Exit 1 on any finding, notes included.
    Info,
}

impl From<FailOn> for Severity {
    fn from(f: FailOn) -> Severity {
        match f {
            FailOn::Error => Severity::Error,
            FailOn::Warning => Severity::Warning,
            FailOn::Info => Severity::Info,
        }
    }
}

/// Check a lexicon for invalid phones, broken stress, duplicates and suspicious entries.
///
/// Exit 0 when clean, 1 when findings at or above --fail-on exist, 2 when the audit could not run.
///
/// --fix makes only safe repairs (Unicode NFC, trimming, single spaces, dropping invisible
/// characters and exact duplicate rows), prints each change, saves atomically keeping a .bak,
/// refuses a file changed on disk, and then reports what is left.
///
/// --model-check (or --checks unlikely-pronunciation) also looks for well-formed but probably
/// wrong pronunciations: it trains a model per fold (k-fold cross-validation by word, k = 5) and
/// flags entries far less likely than the guess of a model that never saw their word. It takes
/// minutes on a large lexicon; finished folds are cached beside the lexicon, so an interrupted
/// or repeated run on an unchanged lexicon does not train them again.
///
/// Examples:
///   orthoepy audit lexicon.csv --checks unknown-phone,duplicate-entry --format json
///   orthoepy audit --model-check --fail-on warning
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Phoneset: a shipped id or a TOML path (default: the project's, else en-arpa).
    #[arg(long, value_name = "NAME")]
    phoneset: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    /// Lowest severity that makes the exit code 1.
    #[arg(long, value_enum, default_value = "error")]
    fail_on: FailOn,
    /// Make the safe repairs and save the lexicon (a .bak is kept).
    #[arg(long)]
    fix: bool,
    /// Run only these checks (comma-separated ids; default: all but unlikely-pronunciation).
    #[arg(long, value_delimiter = ',', value_name = "ID,...")]
    checks: Vec<String>,
    /// Add the cross-validated unlikely-pronunciation check to the checks run.
    #[arg(long)]
    model_check: bool,
    /// Folds of the unlikely-pronunciation check.
    #[arg(long, value_name = "K", default_value_t = 5)]
    folds: u32,
    #[command(flatten)]
    project: ProjectArgs,
}

/// The JSON document: the report, plus the changes when --fix ran.
#[derive(serde::Serialize)]
struct Output<'a> {
    #[serde(flatten)]
    report: &'a Report,
    #[serde(skip_serializing_if = "Option::is_none")]
    fixes: Option<&'a [fix::Change]>,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (path, policy, project) = args.project.lexicon_path(args.lexicon.as_deref())?;
    let model_check = args.model_check || args.checks.iter().any(|c| c == audit::UNLIKELY_PRONUNCIATION);
    let named: Vec<&str> = args.checks.iter().map(String::as_str).filter(|c| *c != audit::UNLIKELY_PRONUNCIATION).collect();
    let mut checks = match (args.checks.is_empty(), named.is_empty()) {
        (true, _) => audit::all_checks(),
        (false, true) => Vec::new(),
        (false, false) => audit::select_checks(&named)?,
    };
    let phoneset = super::resolve_phoneset(args.phoneset.as_deref(), project.as_ref())?;
    let stress = project.as_ref().map(|p| p.stress.clone()).unwrap_or_default();
    // Repairs write the lexicon: inside a project, one writer at a time.
    let _lock = match (&project, args.fix) {
        (Some(p), true) => Some(super::lock_project(p, "audit --fix")?),
        _ => None,
    };
    let load = || Lexicon::load_with(&path, policy, LoadMode::Repair).context("cannot load the lexicon");
    let mut lexicon = load()?;
    let changes = if args.fix { fix::apply(&mut lexicon) } else { Vec::new() };
    if !changes.is_empty() {
        lexicon.save().context("cannot save the repaired lexicon")?;
        lexicon = load()?; // line numbers of the saved file
    }
    if model_check {
        checks.push(Box::new(unlikely_check(&lexicon, &path, args.folds)?));
    }
    let context = Context::new(lexicon.entries(), policy, &phoneset, &stress);
    let file = path.display().to_string();
    let report = audit::run(&context, &checks, Some(&file));
    // The report owns what it prints: the lexicon and the prepared context go first.
    drop(context);
    drop(lexicon);
    match args.format {
        DataFormat::Json => super::print_json(&Output { report: &report, fixes: args.fix.then_some(changes.as_slice()) })?,
        DataFormat::Text => {
            if args.fix {
                for change in &changes {
                    println!("fixed {file}: {change}");
                }
                match changes.len() {
                    0 => println!("nothing to fix safely\n"),
                    n => println!("{n} safe repairs saved to {file} (previous version in {})\n", orthoepy::safe_io::backup_path(&path).display()),
                }
            }
            let mut out = std::io::BufWriter::new(std::io::stdout().lock());
            report.write_text(&mut out).and_then(|()| out.flush()).context("cannot write the report")?;
        }
    }
    let failing = report.count_at_least(args.fail_on.into());
    Ok(if failing > 0 { ExitCode::from(1) } else { ExitCode::SUCCESS })
}

/// Runs the cross-validation of the unlikely-pronunciation check with a progress bar, caching
/// finished folds in the index cache folder beside the lexicon.
fn unlikely_check(lexicon: &Lexicon, path: &std::path::Path, folds: u32) -> anyhow::Result<audit::UnlikelyPronunciation> {
    let opts = audit::UnlikelyOptions { folds, ..audit::UnlikelyOptions::default() };
    let cache = audit::unlikely_cache_folder(path);
    let bar = super::progress_bar(u64::from(folds), "folds");
    bar.enable_steady_tick(std::time::Duration::from_millis(250));
    let check = audit::UnlikelyPronunciation::compute(lexicon.entries(), *lexicon.policy(), &opts, Some(&cache), &mut |done, _| {
        bar.set_position(u64::from(done));
    })
    .context("the unlikely-pronunciation check could not run")?;
    bar.finish_and_clear();
    Ok(check)
}
