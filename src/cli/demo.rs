//! `orthoepy demo`: a ready-to-review copy of the demo project (an invented coastal rail-and-ferry
//! operator building a voice timetable assistant), then the review screen on it.

use anyhow::Context;
use orthoepy::project::Project;
use orthoepy::queue::{Corpus, Sources, TokenRule};
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

/// Make a working copy of the demo project, queue its new words, and open the review screen.
///
/// Reopen it later with `orthoepy review --project DIR`; merge with `orthoepy apply --project DIR`.
///
/// Example: orthoepy demo /tmp/coast-demo
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// Folder for the copy (default: a new folder under the system temporary folder).
    dir: Option<PathBuf>,
    /// Only make the copy and the queue; do not open the review screen.
    #[arg(long)]
    no_review: bool,
}

/// The demo project's files, built into the binary so the demo works from anywhere.
const FILES: &[(&str, &[u8])] = &[
    ("orthoepy.toml", include_bytes!("../../demo-lexicon/orthoepy.toml")),
    ("lexicon.csv", include_bytes!("../../demo-lexicon/lexicon.csv")),
    ("new-words.txt", include_bytes!("../../demo-lexicon/new-words.txt")),
    ("passenger-queries.txt", include_bytes!("../../demo-lexicon/passenger-queries.txt")),
    ("saltmarsh-coast.toml", include_bytes!("../../demo-lexicon/saltmarsh-coast.toml")),
    ("model.g2p", include_bytes!("../../demo-lexicon/model.g2p")),
    ("README.md", include_bytes!("../../demo-lexicon/README.md")),
];

fn default_dir() -> PathBuf {
    let stamp = std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH).map_or(0, |d| d.as_secs());
    std::env::temp_dir().join(format!("orthoepy-demo-{stamp}-{}", std::process::id()))
}

/// Write the demo files into `dir` and fill its queue (new words, most frequent first, then the
/// variants of the project's accent profiles); returns the project. A folder this call created
/// is removed again when a later step fails, so no half-made copy is left behind.
pub fn make_demo(dir: &Path) -> anyhow::Result<Project> {
    anyhow::ensure!(
        !dir.join("orthoepy.toml").exists(),
        "{} already holds a project; reopen it with `orthoepy review --project {}`",
        dir.display(),
        dir.display()
    );
    let created = !dir.exists();
    let result = fill_demo(dir);
    if result.is_err() && created {
        let _ = std::fs::remove_dir_all(dir);
    }
    result
}

fn fill_demo(dir: &Path) -> anyhow::Result<Project> {
    std::fs::create_dir_all(dir).with_context(|| format!("cannot create {}", dir.display()))?;
    for (name, text) in FILES {
        let path = dir.join(name);
        std::fs::write(&path, text).with_context(|| format!("cannot write {}", path.display()))?;
    }
    let project = Project::load(dir).context("cannot read the demo project")?;
    let sources = Sources {
        words: Some(project.root.join("new-words.txt")),
        corpus: Some(Corpus { path: project.root.join("passenger-queries.txt"), rule: TokenRule::default(), min_count: 1 }),
        // Then the variants the operator's speakers use: the project's accent profiles.
        profiles: project.profiles.clone(),
        audit: false,
        model_check: false,
    };
    super::queue::add_sources(project.clone(), &sources, true)?;
    Ok(project)
}

/// Run `orthoepy demo`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let dir = args.dir.unwrap_or_else(default_dir);
    let project = make_demo(&dir)?;
    println!("{}", project.root.display());
    if args.no_review || !std::io::stdout().is_terminal() {
        eprintln!("demo ready; open it with `orthoepy review --project {}`", project.root.display());
        return Ok(ExitCode::SUCCESS);
    }
    super::review::open_review(project, None)
}
