//! The project file `orthoepy.toml`: which lexicon, phoneset, model, rules, profiles and queue a
//! lexicon folder uses, and the policies that go with them.
//!
//! This module owns finding the file (in a given folder, or from the current folder upwards),
//! reading it strictly (unknown keys are errors, so a typo never silently falls back to a default),
//! and resolving every path relative to the folder that holds it. A project file is shared with
//! others, so every path it names must stay inside the project folder (no `..` out of it, no
//! absolute path elsewhere, no symbolic link that leads out) unless the file says
//! `allow_paths_outside = true`. It must not open the files it names: callers load the lexicon,
//! phoneset and model themselves.
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
//! allow_paths_outside = false    # true lets the paths above name files outside this folder
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
use std::path::{Component, Path, PathBuf};
use toml::Spanned;

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
    /// A path names a file outside the project folder and the file does not allow that (placed
    /// at the key).
    #[error("{0}")]
    OutsideProject(Located),
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ProjectFile {
    lexicon: Spanned<PathBuf>,
    phoneset: Option<Spanned<String>>,
    #[serde(default = "default_true")]
    fold_case: bool,
    model: Option<Spanned<PathBuf>>,
    letter_to_sound: Option<Spanned<String>>,
    #[serde(default)]
    profiles: Vec<Spanned<String>>,
    queue: Option<Spanned<PathBuf>>,
    journal: Option<Spanned<PathBuf>>,
    #[serde(default)]
    allow_paths_outside: bool,
    #[serde(default)]
    stress: StressPolicy,
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
        let allow = file.allow_paths_outside;
        let resolve = |key: &str, p: &Spanned<PathBuf>| {
            let named = p.get_ref();
            let full = if named.is_absolute() { named.clone() } else { root.join(named) };
            if !allow && !is_inside(&root, &full) {
                let message = format!(
                    "`{key}` names {}, which is outside the project folder {}; a shared project file must not make orthoepy read or write elsewhere. Move the file into the folder, or add `allow_paths_outside = true` to {PROJECT_FILE} if that is intended",
                    named.display(),
                    root.display()
                );
                return Err(ProjectError::OutsideProject(Located::at_offset(origin_of(path), text.as_bytes(), p.span().start, message)));
            }
            Ok(full)
        };
        let resolve_named = |key: &str, spec: &Spanned<String>| {
            if looks_like_path(spec.get_ref()) {
                let as_path = Spanned::new(spec.span(), PathBuf::from(spec.get_ref()));
                resolve(key, &as_path).map(|p| p.to_string_lossy().into_owned())
            } else {
                Ok(spec.get_ref().clone())
            }
        };
        let default_file = |name: &str| Spanned::new(0..0, PathBuf::from(name));
        Ok(Project {
            lexicon: resolve("lexicon", &file.lexicon)?,
            phoneset: match &file.phoneset {
                Some(spec) => resolve_named("phoneset", spec)?,
                None => "en-arpa".to_string(),
            },
            fold_case: file.fold_case,
            model: file.model.as_ref().map(|m| resolve("model", m)).transpose()?,
            letter_to_sound: file.letter_to_sound.as_ref().map(|l| resolve_named("letter_to_sound", l)).transpose()?,
            profiles: file.profiles.iter().map(|p| resolve_named("profiles", p)).collect::<Result<_, _>>()?,
            queue: resolve("queue", file.queue.as_ref().unwrap_or(&default_file("review-queue.jsonl")))?,
            journal: resolve("journal", file.journal.as_ref().unwrap_or(&default_file("review-journal.jsonl")))?,
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

/// True when `path` (absolute) lies inside `root`: lexically (`..` resolved without the file
/// system), and, where the path or a folder above it exists, also after following symbolic links.
fn is_inside(root: &Path, path: &Path) -> bool {
    let (Some(root_clean), Some(path_clean)) = (lexical(root), lexical(path)) else { return false };
    if !path_clean.starts_with(&root_clean) {
        return false;
    }
    let Ok(real_root) = root.canonicalize() else { return true };
    // The deepest part of the path that exists, with symbolic links followed; the rest is
    // plain names (`..` was resolved above), which cannot lead out.
    let mut existing = path_clean.as_path();
    let mut rest = Vec::new();
    loop {
        if let Ok(real) = existing.canonicalize() {
            return rest.iter().rev().fold(real, |p: PathBuf, part| p.join(part)).starts_with(&real_root);
        }
        match (existing.parent(), existing.file_name()) {
            (Some(parent), Some(name)) => {
                rest.push(name.to_os_string());
                existing = parent;
            }
            _ => return true,
        }
    }
}

/// `path` with `.` and `..` resolved by name; `None` when `..` climbs above the root.
fn lexical(path: &Path) -> Option<PathBuf> {
    let mut clean = PathBuf::new();
    for part in path.components() {
        match part {
            Component::CurDir => {}
            Component::ParentDir => {
                if !clean.pop() || clean.as_os_str().is_empty() {
                    return None;
                }
            }
            other => clean.push(other.as_os_str()),
        }
    }
    Some(clean)
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
    fn paths_leaving_the_folder_are_refused_unless_allowed() {
        let dir = tempfile::tempdir().unwrap();
        let root = dir.path().join("p");
        std::fs::create_dir(&root).unwrap();
        let file = root.join("orthoepy.toml");
        for (text, key, line) in [
            ("lexicon = \"../x.csv\"\n", "lexicon", 1),
            ("lexicon = \"l.csv\"\nmodel = \"/etc/m.g2p\"\n", "model", 2),
            ("lexicon = \"l.csv\"\nqueue = \"a/../../q.jsonl\"\n", "queue", 2),
            ("lexicon = \"l.csv\"\nprofiles = [\"fast-casual\", \"../a.toml\"]\n", "profiles", 2),
            ("lexicon = \"l.csv\"\nphoneset = \"../sets/x.toml\"\n", "phoneset", 2),
        ] {
            match Project::parse(text, &root, &file) {
                Err(ProjectError::OutsideProject(at)) => {
                    assert_eq!(at.line(), Some(line), "{at}");
                    assert!(at.message.contains(&format!("`{key}`")) && at.message.contains("allow_paths_outside = true"), "{at}");
                }
                other => panic!("{text}: {other:?}"),
            }
            let allowed = format!("{text}allow_paths_outside = true\n");
            assert!(Project::parse(&allowed, &root, &file).is_ok(), "{allowed}");
        }
        // A symbolic link inside the folder that leads out is outside too.
        #[cfg(unix)]
        {
            std::os::unix::fs::symlink(dir.path(), root.join("out")).unwrap();
            let text = "lexicon = \"out/l.csv\"\n";
            assert!(matches!(Project::parse(text, &root, &file), Err(ProjectError::OutsideProject(_))));
            let inside = format!("lexicon = \"{}\"\njournal = \"sub/./j.jsonl\"\n", root.join("l.csv").display());
            assert!(Project::parse(&inside, &root, &file).is_ok());
        }
    }

    #[test]
    fn missing_project_names_the_start() {
        let dir = tempfile::tempdir().unwrap();
        assert!(matches!(Project::discover(dir.path()), Err(ProjectError::NotFound { .. })));
    }
}
