//! The command implementations of the `orthoepy` binary: one file per command, each with a clap
//! `Args` struct and a `run` function.
//!
//! This module and its children are the only places that use `anyhow`; they turn library errors
//! into messages for people and exit codes (0 success, 1 findings the user asked to fail on,
//! 2 could not run). They hold no logic a library user would need.

pub mod apply;
pub mod audit;
pub mod completions;
pub mod convert;
pub mod demo;
pub mod diff;
pub mod evaluate;
pub mod export;
pub mod find;
pub mod guess;
pub mod import;
pub mod init;
pub mod journal;
pub mod queue;
pub mod review;
pub mod show;
pub mod split;
pub mod stats;
pub mod train;
pub mod variants;

use anyhow::Context;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::lock::ProjectLock;
use orthoepy::project::Project;
use std::io::{IsTerminal, Write as _};
use std::path::{Path, PathBuf};

/// How data output is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum DataFormat {
    /// Lines for people (and `cut`/`awk`); `tsv` and `table` are accepted for it.
    #[value(alias = "tsv", alias = "table")]
    Text,
    /// One JSON document.
    Json,
}

/// The `--project` option shared by commands that read a project.
#[derive(Debug, Clone, clap::Args)]
pub struct ProjectArgs {
    /// Folder holding orthoepy.toml (default: the current folder or the nearest one above it).
    #[arg(long, value_name = "DIR", global = true)]
    pub project: Option<PathBuf>,
}

impl ProjectArgs {
    /// The project named by `--project`, else the one found upwards from the current folder, else
    /// `None` (commands that can run without a project then need explicit files).
    pub fn find(&self) -> anyhow::Result<Option<Project>> {
        if let Some(dir) = &self.project {
            return Project::load(dir).map(Some).with_context(|| format!("cannot open project {}", dir.display()));
        }
        let cwd = std::env::current_dir().context("cannot read the current folder")?;
        match Project::discover(&cwd) {
            Ok(p) => Ok(Some(p)),
            Err(orthoepy::project::ProjectError::NotFound { .. }) => Ok(None),
            Err(err) => Err(err.into()),
        }
    }

    /// The project, required.
    pub fn require(&self) -> anyhow::Result<Project> {
        match self.find()? {
            Some(p) => Ok(p),
            None => {
                let cwd = std::env::current_dir().unwrap_or_default();
                Err(orthoepy::project::ProjectError::NotFound { start: cwd }.into())
            }
        }
    }

    /// The lexicon path and headword policy: an explicit file wins, else the project's lexicon.
    pub fn lexicon_path(&self, explicit: Option<&Path>) -> anyhow::Result<(PathBuf, HeadwordPolicy, Option<Project>)> {
        let project = self.find()?;
        let policy = project.as_ref().map(Project::headword_policy).unwrap_or_default();
        match (explicit, &project) {
            (Some(path), _) => Ok((path.to_path_buf(), policy, project)),
            (None, Some(p)) => Ok((p.lexicon.clone(), policy, project)),
            (None, None) => anyhow::bail!(
                "no lexicon given and no orthoepy.toml found; name a LEXICON.csv or pass --project DIR"
            ),
        }
    }

    /// Loads the lexicon named explicitly or by the project.
    pub fn load_lexicon(&self, explicit: Option<&Path>) -> anyhow::Result<(Lexicon, Option<Project>)> {
        let (path, policy, project) = self.lexicon_path(explicit)?;
        let lexicon = Lexicon::load(&path, policy).with_context(|| "cannot load the lexicon".to_string())?;
        Ok((lexicon, project))
    }
}

/// The phoneset a command works in: the one named by `--phoneset` (a shipped id, or a file
/// relative to the current folder), else the project's, else `en-arpa`.
pub fn resolve_phoneset(explicit: Option<&str>, project: Option<&Project>) -> anyhow::Result<orthoepy::phoneset::Phoneset> {
    let (spec, base) = match (explicit, project) {
        (Some(spec), _) => (spec, std::env::current_dir().context("cannot read the current folder")?),
        (None, Some(p)) => (p.phoneset.as_str(), p.root.clone()),
        (None, None) => ("en-arpa", std::env::current_dir().context("cannot read the current folder")?),
    };
    orthoepy::phoneset::Phoneset::resolve(spec, &base).with_context(|| format!("cannot load the phoneset {spec}"))
}

/// Refuses to replace an existing output file unless `--force` was given.
pub fn refuse_overwrite(path: &Path, force: bool) -> anyhow::Result<()> {
    if path.as_os_str() != "-" && path.exists() && !force {
        anyhow::bail!("{} exists; pass --force to replace it", path.display());
    }
    Ok(())
}

/// Takes the project lock for a command that writes the project's lexicon, queue or journal,
/// printing its notes (a lock taken over, leftovers of killed saves removed). Take it before
/// reading what will be written, and keep it until the last write is done.
pub fn lock_project(project: &Project, command: &str) -> anyhow::Result<ProjectLock> {
    let lock = ProjectLock::acquire_for(project, command)?;
    for note in lock.notes() {
        eprintln!("note: {note}");
    }
    Ok(lock)
}

/// Removes the temporary files an interrupted run left beside `outputs`, files outside any
/// project lock (export's build files, an import into a file no project names): only files of
/// the exact `.NAME.PID.tmp` pattern whose process is gone, each with a note.
pub fn remove_output_leftovers(outputs: &[&Path]) -> anyhow::Result<()> {
    for output in outputs.iter().filter(|p| p.as_os_str() != "-") {
        let removed = orthoepy::safe_io::remove_leftover_temps(output, orthoepy::lock::process_running)
            .with_context(|| format!("cannot look for leftovers beside {}", output.display()))?;
        for path in removed {
            eprintln!("note: removed {}, left behind by a save that was interrupted", path.display());
        }
    }
    Ok(())
}

/// A progress bar on stderr when it is a terminal, hidden otherwise (pipes and CI stay clean).
pub fn progress_bar(len: u64, label: &str) -> indicatif::ProgressBar {
    styled_bar(len, label, "{prefix:>10} [{bar:30}] {pos}/{len} ({eta})")
}

/// Like [`progress_bar`], with the bar's message on a line of its own below it, so a status
/// line of up to the terminal's width fits beside an 80-column bar.
pub fn progress_bar_with_status(len: u64, label: &str) -> indicatif::ProgressBar {
    styled_bar(len, label, "{prefix:>10} [{bar:30}] {pos}/{len} ({eta})\n{wide_msg}")
}

fn styled_bar(len: u64, label: &str, template: &str) -> indicatif::ProgressBar {
    if !std::io::stderr().is_terminal() {
        return indicatif::ProgressBar::hidden();
    }
    let bar = indicatif::ProgressBar::new(len);
    let style = indicatif::ProgressStyle::with_template(template).unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()).progress_chars("=> ");
    bar.set_style(style);
    bar.set_prefix(label.to_string());
    bar
}

/// Writes a JSON document and a newline to stdout.
pub fn print_json<T: serde::Serialize>(value: &T) -> anyhow::Result<()> {
    // Written as it is encoded: a large report is never held as one string.
    let mut out = std::io::BufWriter::new(std::io::stdout().lock());
    serde_json::to_writer_pretty(&mut out, value).context("cannot write JSON")?;
    writeln!(out).and_then(|()| out.flush()).context("cannot write JSON")?;
    Ok(())
}
