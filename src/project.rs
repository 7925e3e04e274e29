//! The project file `orthoepy.toml`: which lexicon, phoneset, model, rules, profiles and queue a
//! lexicon folder uses, and the policies that go with them.
//!
//! This module owns finding the file (in a given folder, or from the current folder upwards),
//! reading it strictly (unknown keys are errors, so a typo never silently falls back to a default),
//! and resolving every path relative to the folder that holds it. It must not open the files it
//! names: callers load the lexicon, phoneset and model themselves.
//!
//! ```toml
//! lexicon = "lexicon.csv"        # required
//! phoneset = "en-arpa"           # a shipped phoneset id or a path to a phoneset TOML
//! fold_case = true               # compare headwords case-insensitively
//! model = "model.g2p"            # optional trained joint-sequence model
//! letter_to_sound = "en"         # optional shipped letter-to-sound rule set id or path
//! profiles = ["accent.toml"]     # optional accent profiles (shipped ids or paths)
//! queue = "queue.jsonl"          # default: review-queue.jsonl
//! journal = "journal.jsonl"      # default: review-journal.jsonl
//!
//! [stress]
//! primary = "exactly-one"        # or "at-least-one" (compounds may carry two) or "unchecked"
//! free_variation = [["AH0", "IH0"]]
//! ```

use crate::lexicon::HeadwordPolicy;
use crate::audit::StressPolicy;
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped_string, Limit, ReadError, MIB};
use serde::Deserialize;
use std::path::{Path, PathBuf};

/// The file name looked for.
pub const PROJECT_FILE: &str = "orthoepy.toml";

/// The largest project file accepted: a few dozen lines in practice.
pub const MAX_PROJECT: Limit = Limit { bytes: MIB, what: "project file" };

/// Errors of finding or reading a project file.
#[derive(Debug, thiserror::Error)]
pub enum ProjectError {
    /// No `orthoepy.toml` in the folder or any parent.
    #[error("no {PROJECT_FILE} found in {} or any folder above it; pass --project DIR or run `orthoepy demo` for an example", start.display())]
    NotFound {
        /// Where the search started.
        start: PathBuf,
    },
    /// The file could not be read, or is too large to be a project file (over [`MAX_PROJECT`]).
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The file is not valid project TOML.
    #[error("{0}")]
    Syntax(Located),
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ProjectFile {
    lexicon: PathBuf,
    #[serde(default = "default_phoneset")]
    phoneset: String,
    #[serde(default = "default_true")]
    fold_case: bool,
    model: Option<PathBuf>,
    letter_to_sound: Option<String>,
    #[serde(default)]
    profiles: Vec<String>,
    queue: Option<PathBuf>,
    journal: Option<PathBuf>,
    #[serde(default)]
    stress: StressPolicy,
}

fn default_phoneset() -> String {
    "en-arpa".to_string()
}

fn default_true() -> bool {
    true
}

/// A project: the resolved contents of an `orthoepy.toml`.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"words.csv\"\nfold_case = false\n").unwrap();
/// let nested = dir.path().join("notes");
/// std::fs::create_dir(&nested).unwrap();
/// let project = orthoepy::project::Project::discover(&nested).unwrap();
/// assert_eq!(project.lexicon, dir.path().join("words.csv"));
/// assert_eq!(project.phoneset, "en-arpa");
/// assert!(!project.headword_policy().fold_case);
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Project {
    /// The folder holding `orthoepy.toml`.
    pub root: PathBuf,
    /// The lexicon store.
    pub lexicon: PathBuf,
    /// A shipped phoneset id or an absolute path to a phoneset file.
    pub phoneset: String,
    /// Compare headwords case-insensitively.
    pub fold_case: bool,
    /// The trained joint-sequence model, if any.
    pub model: Option<PathBuf>,
    /// Letter-to-sound rules: a shipped id or an absolute path.
    pub letter_to_sound: Option<String>,
    /// Accent profiles: shipped ids or absolute paths.
    pub profiles: Vec<String>,
    /// The review queue file.
    pub queue: PathBuf,
    /// The append-only review journal.
    pub journal: PathBuf,
    /// Stress policies for the audit.
    pub stress: StressPolicy,
}

impl Project {
    /// Reads `DIR/orthoepy.toml`.
    pub fn load(dir: &Path) -> Result<Project, ProjectError> {
        // Every path the project names is resolved against an absolute root, so a relative
        // `--project DIR` means the same folder wherever the paths are used later.
        let dir = &std::path::absolute(dir).unwrap_or_else(|_| dir.to_path_buf());
        let path = dir.join(PROJECT_FILE);
        let text = read_capped_string(&path, MAX_PROJECT)?;
        Project::parse(&text, dir, &path)
    }

    /// Parses project TOML; relative paths are resolved against `root`, `path` names the file in errors.
    pub fn parse(text: &str, root: &Path, path: &Path) -> Result<Project, ProjectError> {
        let file: ProjectFile =
            toml::from_str(text).map_err(|err| ProjectError::Syntax(Located::from_toml(origin_of(path), text, &err)))?;
        let root = root.to_path_buf();
        let resolve = |p: &Path| if p.is_absolute() { p.to_path_buf() } else { root.join(p) };
        let resolve_named = |spec: &str| {
            if looks_like_path(spec) {
                resolve(Path::new(spec)).to_string_lossy().into_owned()
            } else {
                spec.to_string()
            }
        };
        Ok(Project {
            lexicon: resolve(&file.lexicon),
            phoneset: resolve_named(&file.phoneset),
            fold_case: file.fold_case,
            model: file.model.as_deref().map(resolve),
            letter_to_sound: file.letter_to_sound.as_deref().map(resolve_named),
            profiles: file.profiles.iter().map(|p| resolve_named(p)).collect(),
            queue: resolve(file.queue.as_deref().unwrap_or(Path::new("review-queue.jsonl"))),
            journal: resolve(file.journal.as_deref().unwrap_or(Path::new("review-journal.jsonl"))),
            stress: file.stress,
            root,
        })
    }

    /// Finds `orthoepy.toml` in `start` or the nearest folder above it.
    pub fn discover(start: &Path) -> Result<Project, ProjectError> {
        let mut dir = Some(start);
        while let Some(d) = dir {
            if d.join(PROJECT_FILE).is_file() {
                return Project::load(d);
            }
            dir = d.parent();
        }
        Err(ProjectError::NotFound { start: start.to_path_buf() })
    }

    /// What an accent-profile name means in this project: the path of the project's own profile
    /// whose file stem is `name` (`profiles` in orthoepy.toml), else `name` itself (a shipped id
    /// or a path).
    ///
    /// ```
    /// let p = orthoepy::project::Project::parse("lexicon = \"l.csv\"\nprofiles = [\"accents/harbour.toml\"]\n",
    ///     std::path::Path::new("/p"), std::path::Path::new("/p/orthoepy.toml")).unwrap();
    /// assert_eq!(p.profile_spec("harbour"), "/p/accents/harbour.toml");
    /// assert_eq!(p.profile_spec("fast-casual"), "fast-casual");
    /// ```
    pub fn profile_spec<'a>(&'a self, name: &'a str) -> &'a str {
        let own = self.profiles.iter().find(|spec| Path::new(spec).file_stem().is_some_and(|s| s == name));
        own.map_or(name, String::as_str)
    }

    /// The headword policy of this project.
    pub fn headword_policy(&self) -> HeadwordPolicy {
        HeadwordPolicy { fold_case: self.fold_case }
    }
}

/// True when a phoneset/rules/profile spec names a file rather than a shipped id.
fn looks_like_path(spec: &str) -> bool {
    spec.contains('/') || spec.contains('\\') || spec.ends_with(".toml")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unknown_keys_are_errors_with_position() {
        let err = Project::parse("lexicon = \"a.csv\"\nfoldcase = true\n", Path::new("/p"), Path::new("/p/orthoepy.toml"))
            .unwrap_err();
        match err {
            ProjectError::Syntax(at) => {
                assert_eq!((at.line(), at.column()), (Some(2), Some(1)));
                assert!(at.message.contains("foldcase"), "{}", at.message);
                assert!(at.to_string().starts_with("/p/orthoepy.toml:2:1: "), "{at}");
            }
            other => panic!("unexpected {other:?}"),
        }
    }

    #[test]
    fn shipped_ids_stay_ids_and_paths_resolve() {
        let text = "lexicon = \"l.csv\"\nphoneset = \"sets/mine.toml\"\nprofiles = [\"fast-speech\", \"local.toml\"]\n\
                    [stress]\nprimary = \"at-least-one\"\n";
        let p = Project::parse(text, Path::new("/p"), Path::new("/p/orthoepy.toml")).unwrap();
        assert_eq!(p.phoneset, "/p/sets/mine.toml");
        assert_eq!(p.profiles, ["fast-speech", "/p/local.toml"]);
        assert_eq!(p.stress.primary, crate::audit::PrimaryStressPolicy::AtLeastOne);
        assert_eq!(p.queue, Path::new("/p/review-queue.jsonl"));
    }

    #[test]
    fn missing_project_names_the_start() {
        let dir = tempfile::tempdir().unwrap();
        assert!(matches!(Project::discover(dir.path()), Err(ProjectError::NotFound { .. })));
    }
}
