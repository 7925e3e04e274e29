//! An opened project: everything an `orthoepy.toml` names, read once and checked, and the one
//! place where the project's guesser is assembled.
//!
//! [`Workspace::open`] loads the lexicon and opens its index (from the cache beside the store when
//! it is fresh, see [`crate::lexicon::IndexedStore`]), resolves the phoneset, the
//! language configuration, the letter-to-sound rules and the trained model; a file that is
//! named but fails to load is an error, never a silent fallback. Every caller that needs
//! candidates for a word — `orthoepy guess` inside a project, queue intake, the review screen —
//! asks [`Workspace::guess`], so one word in one project gets the same candidates, sources and
//! scores everywhere. Accent profiles are resolved through [`Workspace::profile`] (the project's
//! own profiles by file stem first, then shipped ids and paths).
//!
//! This module reads files and runs no user interface; the only thing it writes is the index
//! cache beside the lexicon (never the project's own files).

use std::path::Path;
use std::sync::Arc;

use crate::g2p::hybrid::{ConfigError, HybridGuesser, LanguageConfig, Proposal};
use crate::g2p::lts::{LetterToSoundRules, LtsError};
use crate::g2p::{Model, ModelFileError};
use crate::lexicon::{CacheState, IndexedStore, Lexicon, LexiconError, LexiconIndex};
use crate::phoneset::{Phoneset, PhonesetError};
use crate::project::Project;
use crate::variants::{Profile, VariantsError};

/// How many candidates the review queue keeps per word.
pub const CANDIDATES_PER_WORD: usize = 5;

/// Errors opening a project's files. Each names what could not be loaded; the reason (with the
/// file, line and column) is its [`source`](std::error::Error::source), which the command line
/// prints after it.
#[derive(Debug, thiserror::Error)]
pub enum WorkspaceError {
    /// The lexicon store could not be loaded.
    #[error("cannot load the lexicon")]
    Lexicon(#[from] LexiconError),
    /// The phoneset could not be loaded.
    #[error("cannot load the phoneset")]
    Phoneset(#[from] PhonesetError),
    /// The language configuration could not be loaded.
    #[error("cannot load the guesser's language configuration")]
    Language(#[from] ConfigError),
    /// No language configuration fits the project's phoneset.
    #[error(
        "no shipped language configuration for phoneset `{phoneset}` (shipped: {shipped}); \
         set `letter_to_sound` in orthoepy.toml to a shipped id"
    )]
    NoLanguage {
        /// The project's phoneset id.
        phoneset: String,
        /// The shipped language ids.
        shipped: String,
    },
    /// The letter-to-sound rules could not be loaded.
    #[error("cannot load the letter-to-sound rules")]
    Rules(#[from] LtsError),
    /// The model file named in orthoepy.toml does not exist.
    #[error(
        "{}: the model named in orthoepy.toml does not exist; train it with `orthoepy train -o {}` \
         or remove the `model` line", path.display(), path.display()
    )]
    MissingModel {
        /// The model path.
        path: std::path::PathBuf,
    },
    /// The model file could not be loaded.
    #[error("cannot load the model")]
    Model(#[from] ModelFileError),
    /// An accent profile or rule set could not be loaded.
    #[error("cannot load the accent profile `{name}`: {error}")]
    Profile {
        /// The name asked for.
        name: String,
        /// Why it failed.
        error: VariantsError,
    },
}

/// The language configuration and letter-to-sound rules a guesser uses in `phoneset`, given a
/// project's `letter_to_sound` setting (a shipped id or a rule file): the configuration of
/// that shipped id, else the one shipped for the phoneset; the rules only when named. Training
/// and evaluation, which calibrate and measure the guesser's sources, take them from here too.
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// let en = Phoneset::shipped("en-arpa").unwrap();
/// let (config, rules) = orthoepy::workspace::language_parts(Some("en"), &en).unwrap();
/// assert_eq!((config.language.as_str(), rules.map(|r| r.language().to_string())), ("en", Some("en".to_string())));
/// assert!(orthoepy::workspace::language_parts(None, &en).unwrap().1.is_none());
/// ```
pub fn language_parts(letter_to_sound: Option<&str>, phoneset: &Phoneset) -> Result<(LanguageConfig, Option<LetterToSoundRules>), WorkspaceError> {
    let language_id = match letter_to_sound {
        Some(id) if LetterToSoundRules::is_shipped(id) => id.to_string(),
        _ => match LetterToSoundRules::shipped_for_phoneset(phoneset.id()) {
            Some(id) => id.to_string(),
            None => {
                let shipped: Vec<&str> = crate::g2p::lts::SHIPPED.iter().map(|(id, _)| *id).collect();
                return Err(WorkspaceError::NoLanguage { phoneset: phoneset.id().to_string(), shipped: shipped.join(", ") });
            }
        },
    };
    let language = LanguageConfig::shipped(&language_id, phoneset)?;
    let rules = letter_to_sound.map(|spec| LetterToSoundRules::resolve(spec, phoneset)).transpose()?;
    Ok((language, rules))
}

/// A project with its files loaded: lexicon and index, phoneset, language configuration,
/// letter-to-sound rules and model.
///
/// ```
/// let dir = tempfile::tempdir().unwrap();
/// std::fs::write(dir.path().join("orthoepy.toml"), "lexicon = \"lexicon.csv\"\n").unwrap();
/// std::fs::write(dir.path().join("lexicon.csv"),
///     "word,pronunciation,status,source,score,note\nferry,F EH1 R IY0,imported,demo,,\nboat,B OW1 T,imported,demo,,\n").unwrap();
/// let project = orthoepy::project::Project::load(dir.path()).unwrap();
/// let workspace = orthoepy::workspace::Workspace::open(project).unwrap();
/// let best = &workspace.guess("ferryboat", 3)[0];
/// assert_eq!(best.pronunciation, "F EH1 R IY0 B OW2 T");
/// assert_eq!(best.source_label(), "compound:ferry+boat");
/// ```
pub struct Workspace {
    project: Project,
    lexicon: Arc<Lexicon>,
    index: Arc<LexiconIndex>,
    cache: CacheState,
    phoneset: Phoneset,
    language: LanguageConfig,
    rules: Option<LetterToSoundRules>,
    model: Option<Model>,
}

impl Workspace {
    /// Opens every file the project names; the model is the project's own.
    pub fn open(project: Project) -> Result<Workspace, WorkspaceError> {
        let model = project.model.clone();
        Workspace::open_with_model(project, model.as_deref())
    }

    /// Opens the project with another model file (or none) instead of the one it names.
    pub fn open_with_model(project: Project, model: Option<&Path>) -> Result<Workspace, WorkspaceError> {
        // The small files first: one that fails to load stops the command before the store is
        // opened, so a refused project leaves even its index cache as it was.
        let phoneset = Phoneset::resolve(&project.phoneset, &project.root)?;
        let (language, rules) = language_parts(project.letter_to_sound.as_deref(), &phoneset)?;
        let model = match model {
            Some(path) if !path.exists() => return Err(WorkspaceError::MissingModel { path: path.to_path_buf() }),
            Some(path) => Some(Model::load(path)?),
            None => None,
        };
        let store = IndexedStore::open(&project.lexicon, project.headword_policy())?;
        let cache = store.state().clone();
        let (lexicon, index) = store.into_parts()?;
        let (lexicon, index) = (Arc::new(lexicon), Arc::new(index));
        Ok(Workspace { project, lexicon, index, cache, phoneset, language, rules, model })
    }

    /// The project file's contents.
    pub fn project(&self) -> &Project {
        &self.project
    }

    /// The lexicon as loaded.
    pub fn lexicon(&self) -> &Lexicon {
        &self.lexicon
    }

    /// The lexicon's FST index.
    pub fn index(&self) -> &LexiconIndex {
        &self.index
    }

    /// The lexicon and its index, shared (the review screen's look-ups hold them beside the
    /// workspace's guesser without a copy).
    pub fn shared_lexicon(&self) -> (Arc<Lexicon>, Arc<LexiconIndex>) {
        (Arc::clone(&self.lexicon), Arc::clone(&self.index))
    }

    /// What was done with the index cache when the lexicon was opened.
    pub fn cache_state(&self) -> &CacheState {
        &self.cache
    }

    /// The project's phoneset.
    pub fn phoneset(&self) -> &Phoneset {
        &self.phoneset
    }

    /// The trained model, if the project has one.
    pub fn model(&self) -> Option<&Model> {
        self.model.as_ref()
    }

    /// Gives up the loaded lexicon (e.g. to change and save it).
    pub fn into_lexicon(self) -> Lexicon {
        Arc::try_unwrap(self.lexicon).unwrap_or_else(|shared| (*shared).clone())
    }

    /// The project's guesser: initialisms, compounds and derivations over the lexicon, then the
    /// model's N-best list, or — only when the project has no model — its letter-to-sound rules.
    pub fn guesser(&self) -> HybridGuesser<'_> {
        let guesser = HybridGuesser::new(&self.lexicon, &self.index, &self.phoneset, &self.language);
        match (&self.model, &self.rules) {
            (Some(model), _) => guesser.with_model(model),
            (None, Some(rules)) => guesser.with_rules(rules),
            (None, None) => guesser,
        }
    }

    /// Candidates for `word`, best first, at most `limit`, on the calibrated score scale.
    pub fn guess(&self, word: &str, limit: usize) -> Vec<Proposal> {
        self.guesser().guess(word, limit)
    }

    /// An accent profile: one of the project's own profiles (`profiles` in orthoepy.toml) when
    /// `name` is its file stem, else a shipped profile id, else a profile file (relative to
    /// the project folder).
    pub fn profile(&self, name: &str) -> Result<Profile, WorkspaceError> {
        Profile::resolve(self.project.profile_spec(name), &self.project.root, &self.phoneset)
            .map_err(|error| WorkspaceError::Profile { name: name.to_string(), error })
    }
}
