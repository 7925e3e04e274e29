//! Queue intake from every source a maintainer feeds in: word lists and running text (words the
//! lexicon lacks), the variant proposals of an accent profile, and the audit's findings about
//! pronunciations; then adding the items to the project's queue file.
//!
//! [`gather`] reads the named files (size-capped, UTF-8 checked) and turns each source into
//! [`Item`]s; [`add_sources`] also guesses candidates (through
//! [`fill_candidates`](super::fill_candidates)) for new words the queue lacks them for, merges
//! everything into the queue file and saves it atomically. This file prints nothing; warnings
//! come back in [`Gathered::warnings`].

use std::collections::HashSet;
use std::path::{Path, PathBuf};

use super::error::QueueError;
use super::guessing::fill_candidates;
use super::intake::{items_from_corpus, items_from_word_list};
use super::item::{Candidate, Item, ItemKind};
use super::journal::{Action, Journal, JournalError};
use super::ledger::Ledger;
use super::store::{Added, Queue};
use super::tokenise::TokenRule;
use crate::audit::{AuditError, Severity};
use crate::variants::{Generator, Options as VariantOptions};
use crate::workspace::{Workspace, WorkspaceError};

/// Audit checks whose findings a reviewer settles by choosing or editing a pronunciation; the
/// headword checks are left to `orthoepy audit --fix` and to the maintainer.
pub const PRONUNCIATION_CHECKS: [&str; 8] = [
    "unknown-phone",
    "bad-stress-mark",
    "missing-primary-stress",
    "multiple-primary-stress",
    "no-nucleus",
    "empty-pronunciation",
    "length-outlier",
    "phonotactic",
];

/// Errors of queue intake.
#[derive(Debug, thiserror::Error)]
pub enum IntakeError {
    /// A word list or corpus could not be read, is too large or is not UTF-8.
    #[error(transparent)]
    Read(#[from] crate::support::read::ReadError),
    /// An accent profile could not be loaded.
    #[error(transparent)]
    Workspace(#[from] WorkspaceError),
    /// The audit's checks could not be selected.
    #[error(transparent)]
    Audit(#[from] AuditError),
    /// The cross-validated unlikely-pronunciation check could not run.
    #[error(transparent)]
    Unlikely(#[from] crate::audit::UnlikelyError),
    /// The queue file could not be read or saved.
    #[error(transparent)]
    Queue(#[from] QueueError),
    /// The journal could not be read (to see which items were removed from review).
    #[error(transparent)]
    Journal(#[from] JournalError),
}

/// What to queue, as `orthoepy queue add` names it.
#[derive(Debug, Clone, Default)]
pub struct Sources {
    /// A word list: one word per line, optionally a tab and an example line.
    pub words: Option<PathBuf>,
    /// Running text, tokenised by the rule; words seen at least `min_count` times are queued.
    pub corpus: Option<Corpus>,
    /// Accent profiles whose variant proposals are queued (names as [`Workspace::profile`] takes).
    pub profiles: Vec<String>,
    /// Queue the audit's findings about pronunciations.
    pub audit: bool,
    /// With `audit`, also run the cross-validated unlikely-pronunciation check (trains a model
    /// per fold; see [`crate::audit::UnlikelyPronunciation`]) and offer its guess as a candidate.
    pub model_check: bool,
}

/// A corpus source.
#[derive(Debug, Clone)]
pub struct Corpus {
    /// The text file.
    pub path: PathBuf,
    /// How tokens are cut and folded.
    pub rule: TokenRule,
    /// Queue words seen at least this often.
    pub min_count: u64,
}

/// Items gathered from the sources, and what the caller should tell the user.
#[derive(Debug, Default)]
pub struct Gathered {
    /// The items, in source order (word list, corpus, variants, audit).
    pub items: Vec<Item>,
    /// Warnings (entries a profile could not use), one line each.
    pub warnings: Vec<String>,
    /// Every origin read (`words:FILE`, `corpus:FILE`, `variants:PROFILE`, `audit:CHECK`), even
    /// those that gave no item: what they said before is replaced by what they say now.
    pub origins: Vec<String>,
}

/// What [`add_sources`] did.
#[derive(Debug, Default, Clone, PartialEq, Eq, serde::Serialize)]
pub struct AddSummary {
    /// Items new to the queue.
    pub new: usize,
    /// Queued items that changed (new counts or candidates).
    pub updated: usize,
    /// Queued items the sources said nothing new about (reading the same input again).
    pub unchanged: usize,
    /// Items whose removal from review (`queue remove`) stands; they were not brought back.
    pub still_removed: usize,
    /// Items in the queue now.
    pub total: usize,
}

/// Items for every source named, without candidates for new words (see
/// [`fill_candidates`](super::fill_candidates)).
pub fn gather(workspace: &Workspace, sources: &Sources) -> Result<Gathered, IntakeError> {
    let mut gathered = Gathered::default();
    let index = workspace.index();
    let known = |w: &str| index.contains(w);
    if let Some(path) = &sources.words {
        let origin = file_label("words", path);
        gathered.items.extend(items_from_word_list(&read_text(path)?, &origin, known));
        gathered.origins.push(origin);
    }
    if let Some(corpus) = &sources.corpus {
        let text = read_text(&corpus.path)?;
        let origin = file_label("corpus", &corpus.path);
        gathered.items.extend(items_from_corpus(&text, &corpus.rule, &origin, corpus.min_count, known));
        gathered.origins.push(origin);
    }
    for name in &sources.profiles {
        variant_items(workspace, name, &mut gathered)?;
    }
    if sources.audit {
        gathered.items.extend(audit_items(workspace, sources.model_check)?);
        gathered.origins.extend(PRONUNCIATION_CHECKS.iter().map(|check| format!("audit:{check}")));
        if sources.model_check {
            gathered.origins.push(format!("audit:{}", crate::audit::UNLIKELY_PRONUNCIATION));
        }
    }
    Ok(gathered)
}

/// Gathers the sources, guesses candidates for the new words the queue does not already hold
/// with candidates (`progress(done, total)` as guessing goes), and adds everything to the
/// project's queue file. Reading the same input again changes nothing; a changed input
/// replaces the counts it gave before (see [`Queue::refresh`]). Returns the summary and the
/// warnings of [`gather`]. The caller holds the project lock.
pub fn add_sources(
    workspace: &Workspace,
    sources: &Sources,
    guess: bool,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<(AddSummary, Vec<String>), IntakeError> {
    let path = &workspace.project().queue;
    let mut gathered = gather(workspace, sources)?;
    let warnings = std::mem::take(&mut gathered.warnings);
    let mut queue = Queue::load(path)?;
    if guess {
        let (mut todo, mut rest): (Vec<Item>, Vec<Item>) = gathered
            .items
            .into_iter()
            .partition(|item| item.candidates.is_empty() && queue.get(&item.key()).map_or(true, |q| q.candidates.is_empty()));
        fill_candidates(&mut todo, workspace, progress);
        rest.append(&mut todo);
        gathered.items = rest;
    }
    let (records, _) = Journal::read(&workspace.project().journal)?;
    let ledger = Ledger::replay(&records);
    let summary = merge_and_save(&mut queue, gathered, &ledger)?;
    Ok((summary, warnings))
}

/// Refreshes the queue with what the sources say now (items already queued get the counts of
/// this reading, origins read again forget the words they no longer list), keeps it in review
/// order (most frequent first) and saves it atomically if anything changed.
fn merge_and_save(queue: &mut Queue, gathered: Gathered, ledger: &Ledger) -> Result<AddSummary, QueueError> {
    // One reading's items about the same thing add up (two spellings of one word in a corpus);
    // only then are they set against the queue.
    let mut reading = Queue::new();
    for item in gathered.items {
        reading.add(item);
    }
    let mut summary = AddSummary::default();
    let mut forgotten = 0;
    for origin in &gathered.origins {
        let keep: HashSet<String> =
            reading.items().iter().filter(|i| i.origin_counts().contains_key(origin)).map(|i| i.key()).collect();
        forgotten += queue.forget_origin_except(origin, &keep);
    }
    for item in reading.items() {
        if matches!(ledger.current(&item.key()), Some((_, d)) if d.action == Action::Remove) {
            summary.still_removed += 1;
        }
        match queue.refresh(item.clone()) {
            Added::New => summary.new += 1,
            Added::Merged => summary.updated += 1,
            Added::Unchanged => summary.unchanged += 1,
        }
    }
    if summary.new + summary.updated + forgotten > 0 {
        queue.sort_by_count();
        queue.save()?;
    }
    summary.total = queue.items().len();
    Ok(summary)
}

/// Reads a word list or corpus: capped, and checked to be UTF-8.
fn read_text(path: &Path) -> Result<String, IntakeError> {
    Ok(crate::support::read::read_capped_string(path, super::intake::MAX_INTAKE_TEXT)?)
}

fn file_label(kind: &str, path: &Path) -> String {
    format!("{kind}:{}", path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default())
}

/// Items for the audit findings about pronunciations (warnings and errors; informational notes
/// such as weak forms stay out of the queue): one item per flagged entry, with the finding's
/// message; candidates come from the guesser (the reviewer may also edit the current
/// pronunciation, or reject to keep it). The unlikely-pronunciation check's guess comes as a
/// candidate of its own.
fn audit_items(workspace: &Workspace, model_check: bool) -> Result<Vec<Item>, IntakeError> {
    let project = workspace.project();
    let mut checks = crate::audit::select_checks(&PRONUNCIATION_CHECKS)?;
    let lexicon = workspace.lexicon();
    if model_check {
        let opts = crate::audit::UnlikelyOptions::default();
        let cache = crate::audit::unlikely_cache_folder(&project.lexicon);
        let check = crate::audit::UnlikelyPronunciation::compute(lexicon.entries(), project.headword_policy(), &opts, Some(&cache), &mut |_, _| {})?;
        checks.push(Box::new(check));
    }
    let context = crate::audit::Context::new(lexicon.entries(), project.headword_policy(), workspace.phoneset(), &project.stress);
    let report = crate::audit::run(&context, &checks, None);
    let mut queue = Queue::new();
    for finding in report.findings.iter().filter(|f| f.severity >= Severity::Warning) {
        let mut item = Item::new_word(&finding.word);
        let message = match &finding.suggestion {
            Some(hint) => format!("{} ({hint})", finding.message),
            None => finding.message.clone(),
        };
        item.kind = ItemKind::Audit {
            check: finding.check.to_string(),
            current: finding.pronunciation.to_string(),
            message,
            line: finding.line,
        };
        item.seen_in(&format!("audit:{}", finding.check), 0);
        if finding.check == crate::audit::UNLIKELY_PRONUNCIATION {
            item.candidates.extend(finding.suggestion.as_deref().map(|guess| Candidate::new(guess, "g2p-cross-validated")));
        }
        queue.add(item);
    }
    Ok(queue.items().to_vec())
}

/// Items for the variants an accent profile proposes for the lexicon: one item per canonical
/// pronunciation, its variants as candidates (probability as score, fired rules listed).
fn variant_items(workspace: &Workspace, name: &str, gathered: &mut Gathered) -> Result<(), IntakeError> {
    let profile = workspace.profile(name)?;
    gathered.origins.push(format!("variants:{}", profile.id));
    let generation = Generator::new(workspace.phoneset(), &profile, VariantOptions::default()).run(workspace.lexicon(), None);
    for s in &generation.skipped {
        gathered.warnings.push(format!("{}: line {}: {}", s.word, s.line, s.message));
    }
    let mut queue = Queue::new();
    for v in generation.variants {
        let mut item = Item::new_word(&v.word);
        item.kind = ItemKind::Variant { canonical: v.canonical.clone(), profile: profile.id.clone() };
        item.seen_in(&format!("variants:{}", profile.id), 0);
        let mut sets: Vec<&str> = v.fired.iter().map(|f| f.rule_set.as_str()).collect();
        sets.dedup();
        let mut candidate = Candidate::new(&v.pronunciation, &format!("variant:{}", sets.join("+")));
        candidate.score = Some(v.probability);
        candidate.rules = v.fired.iter().map(|f| format!("{}/{}", f.rule_set, f.rule_id)).collect();
        item.candidates.push(candidate);
        queue.add(item);
    }
    gathered.items.extend(queue.items().iter().cloned());
    Ok(())
}
