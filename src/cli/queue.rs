//! `orthoepy queue`: add words to the review queue (from a word list, running text, variant
//! proposals or audit findings) and list what is queued.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::lexicon::Lexicon;
use orthoepy::project::Project;
use orthoepy::g2p::hybrid::{Guesser, LanguageConfig};
use orthoepy::g2p::lts::LetterToSoundRules as LtsRules;
use orthoepy::g2p::Model;
use orthoepy::phoneset::Phoneset;
use orthoepy::queue::{
    items_from_corpus, items_from_word_list, Added, AlignPair, Apostrophe, Candidate, Case, Digits, Hyphen, Item,
    ItemKind, Journal, Ledger, Queue, TokenRule,
};
use orthoepy::variants::{Generator, Options as VariantOptions, Profile};
use orthoepy::tui::{self, ItemState};
use std::path::{Path, PathBuf};
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
#[command(group(clap::ArgGroup::new("from").required(true).args(["words", "corpus", "variants", "audit"])))]
struct AddArgs {
    /// A word list: one word per line, optionally a tab and an example line.
    #[arg(long, value_name = "FILE")]
    words: Option<PathBuf>,
    /// Running text: words missing from the lexicon are counted and queued.
    #[arg(long, value_name = "FILE")]
    corpus: Option<PathBuf>,
    /// Variant proposals of an accent profile (shipped id or profile file).
    #[arg(long, value_name = "PROFILE")]
    variants: Option<String>,
    /// Findings of the lexicon audit.
    #[arg(long)]
    audit: bool,
    /// Apostrophes inside words (corpus): keep (o'clock), split (o + clock) or drop (oclock).
    #[arg(long, default_value = "keep", value_parser = ["keep", "split", "drop"])]
    apostrophe: String,
    /// Hyphens inside words (corpus): split (ferry + port) or keep (ferry-port).
    #[arg(long, default_value = "split", value_parser = ["split", "keep"])]
    hyphen: String,
    /// Tokens with digits (corpus): skip or keep.
    #[arg(long, default_value = "skip", value_parser = ["skip", "keep"])]
    digits: String,
    /// Case (corpus): fold (Quay = quay) or keep.
    #[arg(long, default_value = "fold", value_parser = ["fold", "keep"])]
    case: String,
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

/// The tokenising rule named by the corpus options.
fn token_rule(a: &AddArgs) -> TokenRule {
    TokenRule {
        apostrophe: match a.apostrophe.as_str() {
            "split" => Apostrophe::Split,
            "drop" => Apostrophe::Drop,
            _ => Apostrophe::Keep,
        },
        hyphen: if a.hyphen == "keep" { Hyphen::Keep } else { Hyphen::Split },
        digits: if a.digits == "keep" { Digits::Keep } else { Digits::Skip },
        case: if a.case == "keep" { Case::Keep } else { Case::Fold },
    }
}

fn read_text(path: &Path) -> anyhow::Result<String> {
    Ok(orthoepy::support::read::read_capped_string(path, orthoepy::queue::MAX_INTAKE_TEXT)?)
}

fn file_label(kind: &str, path: &Path) -> String {
    format!("{kind}:{}", path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default())
}

/// What `queue add` did.
#[derive(Debug, Default, serde::Serialize)]
pub struct AddSummary {
    /// Items new to the queue.
    pub new: usize,
    /// Items merged into queued ones.
    pub merged: usize,
    /// Items in the queue now.
    pub total: usize,
}

/// Add items to a project's queue file and save it.
pub fn add_to_queue(project: &Project, items: Vec<Item>) -> anyhow::Result<AddSummary> {
    let mut queue = Queue::load(&project.queue).context("cannot read the queue")?;
    let mut summary = AddSummary::default();
    for item in items {
        match queue.add(item) {
            Added::New => summary.new += 1,
            Added::Merged => summary.merged += 1,
        }
    }
    queue.sort_by_count();
    queue.save().context("cannot save the queue")?;
    summary.total = queue.items().len();
    Ok(summary)
}

/// Items for a word list or a corpus file, keeping words missing from `lexicon`.
pub fn intake(lexicon: &Lexicon, words: Option<&Path>, corpus: Option<(&Path, TokenRule, u64)>) -> anyhow::Result<Vec<Item>> {
    let index = lexicon.index();
    let known = |w: &str| index.contains(w);
    let mut items = Vec::new();
    if let Some(path) = words {
        items.extend(items_from_word_list(&read_text(path)?, &file_label("words", path), known));
    }
    if let Some((path, rule, min)) = corpus {
        items.extend(items_from_corpus(&read_text(path)?, &rule, &file_label("corpus", path), min, known));
    }
    Ok(items)
}

/// Run `orthoepy queue`.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let project = args.project.require()?;
    match args.action {
        QueueAction::Add(a) => add(&project, a),
        QueueAction::List(l) => list(&project, l.format),
    }
}

fn add(project: &Project, a: AddArgs) -> anyhow::Result<ExitCode> {
    let lexicon = Lexicon::load(&project.lexicon, project.headword_policy()).context("cannot load the lexicon")?;
    let rule = token_rule(&a);
    let corpus = a.corpus.as_deref().map(|p| (p, rule, a.min_count));
    let mut items = intake(&lexicon, a.words.as_deref(), corpus)?;
    if let Some(spec) = &a.variants {
        items.extend(variant_items(project, &lexicon, spec)?);
    }
    if a.audit {
        items.extend(audit_items(project, &lexicon)?);
    }
    if !a.no_guess {
        guess_missing(&mut items, &ProjectGuesser::open(project, lexicon)?);
    }
    let summary = add_to_queue(project, items)?;
    match a.format {
        DataFormat::Json => print_json(&summary)?,
        DataFormat::Text => println!(
            "queued {} new item(s), merged {} into queued ones; {} in {}",
            summary.new,
            summary.merged,
            summary.total,
            project.queue.display()
        ),
    }
    Ok(ExitCode::SUCCESS)
}

#[derive(serde::Serialize)]
struct Listed<'a> {
    #[serde(flatten)]
    item: &'a Item,
    state: &'static str,
}

fn list(project: &Project, format: DataFormat) -> anyhow::Result<ExitCode> {
    let queue = Queue::load(&project.queue).context("cannot read the queue")?;
    let (records, warnings) = Journal::read(&project.journal).context("cannot read the journal")?;
    for w in &warnings {
        eprintln!("warning: {w}");
    }
    let ledger = Ledger::replay(&records);
    let listed: Vec<Listed> = queue
        .items()
        .iter()
        .map(|item| {
            let key = item.key();
            let state = ItemState::of(ledger.current(&key).map(|(_, d)| &d.action), ledger.is_applied(&key));
            Listed { item, state: state.name() }
        })
        .collect();
    match format {
        DataFormat::Json => print_json(&listed)?,
        DataFormat::Text => {
            use std::io::Write;
            let mut out = std::io::stdout().lock();
            for l in &listed {
                let best = l.item.candidates.first().map(|c| c.pronunciation.as_str()).unwrap_or("-");
                let line = writeln!(out, "{:<8} {:<7} {:>5}  {:<20} {}", l.state, l.item.kind.tag(), l.item.count, l.item.word, best);
                if line.is_err() {
                    break; // the reader went away (e.g. `| head`)
                }
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}

/// The project's guessers behind the review screen's [`tui::Guesser`]: the hybrid guesser
/// (compounds, derivations, initialisms, letter-to-sound rules) plus the trained model's N-best
/// list with letter↔phone alignments when the project has a model.
pub struct ProjectGuesser {
    lexicon: Lexicon,
    index: orthoepy::lexicon::LexiconIndex,
    phoneset: Phoneset,
    config: LanguageConfig,
    rules: Option<LtsRules>,
    model: Option<Model>,
}

/// How many candidates to keep per word.
const CANDIDATES_PER_WORD: usize = 5;

impl ProjectGuesser {
    /// Load the project's phoneset, language configuration, rules and model.
    pub fn open(project: &Project, lexicon: Lexicon) -> anyhow::Result<ProjectGuesser> {
        let phoneset = Phoneset::resolve(&project.phoneset, &project.root).context("cannot load the phoneset")?;
        let language = project.letter_to_sound.clone().unwrap_or_else(|| "en".to_string());
        let config = LanguageConfig::shipped(&language, &phoneset)
            .or_else(|_| LanguageConfig::shipped("en", &phoneset))
            .context("cannot load the guesser's language configuration")?;
        let rules = LtsRules::shipped(&language, &phoneset).ok();
        let model = match &project.model {
            Some(path) if path.exists() => Some(Model::load(path).with_context(|| format!("cannot load {}", path.display()))?),
            _ => None,
        };
        let index = lexicon.index();
        Ok(ProjectGuesser { lexicon, index, phoneset, config, rules, model })
    }
}

impl tui::Guesser for ProjectGuesser {
    fn label(&self) -> &str {
        "guessing"
    }

    fn guess(&self, word: &str) -> Vec<Candidate> {
        let mut guesser = Guesser::new(&self.lexicon, &self.index, &self.phoneset, &self.config);
        if let Some(r) = &self.rules {
            guesser = guesser.with_rules(r);
        }
        let mut item = Item::new_word(word);
        for c in guesser.guess(word, CANDIDATES_PER_WORD) {
            let mut cand = Candidate::new(&c.pronunciation, "");
            cand.source = c.sources.iter().map(ToString::to_string).collect::<Vec<_>>().join("+");
            cand.score = Some(c.score);
            item.merge(Item { candidates: vec![cand], ..Item::new_word(word) });
        }
        if let Some(model) = &self.model {
            for h in model.guess(word, CANDIDATES_PER_WORD).hypotheses {
                let mut cand = Candidate::new(&h.phones.join(" "), "g2p");
                cand.score = Some(h.posterior);
                cand.alignment =
                    h.alignment.iter().map(|p| AlignPair { letters: p.letters.clone(), phones: p.phones.join(" ") }).collect();
                item.merge(Item { candidates: vec![cand], ..Item::new_word(word) });
            }
        }
        item.candidates.truncate(CANDIDATES_PER_WORD);
        item.candidates
    }
}

/// Fill in candidates for items that have none, with a progress bar on a terminal.
pub fn guess_missing(items: &mut [Item], guesser: &dyn tui::Guesser) {
    let todo = items.iter().filter(|i| i.candidates.is_empty()).count();
    let bar = super::progress_bar(todo as u64, "guessing");
    for item in items.iter_mut().filter(|i| i.candidates.is_empty()) {
        item.candidates = guesser.guess(&item.word);
        bar.inc(1);
    }
    bar.finish_and_clear();
}

/// Audit checks whose findings a reviewer settles by choosing or editing a pronunciation; the
/// headword checks are left to `orthoepy audit --fix` and to the maintainer.
const PRONUNCIATION_CHECKS: [&str; 8] = [
    "unknown-phone",
    "bad-stress-mark",
    "missing-primary-stress",
    "multiple-primary-stress",
    "no-nucleus",
    "empty-pronunciation",
    "length-outlier",
    "phonotactic",
];

/// Items for the audit findings about pronunciations (warnings and errors; informational notes
/// such as weak forms stay out of the queue): one item per flagged entry, with the
/// finding's message; candidates come from the guesser (the reviewer may also edit the current
/// pronunciation, or reject to keep it).
pub fn audit_items(project: &Project, lexicon: &Lexicon) -> anyhow::Result<Vec<Item>> {
    let phoneset = Phoneset::resolve(&project.phoneset, &project.root).context("cannot load the phoneset")?;
    let checks = orthoepy::audit::select_checks(&PRONUNCIATION_CHECKS)?;
    let context = orthoepy::audit::Context::new(lexicon.entries(), project.headword_policy(), &phoneset, &project.stress);
    let report = orthoepy::audit::run(&context, &checks, None);
    let mut queue = Queue::new();
    for finding in report.findings.iter().filter(|f| f.severity >= orthoepy::audit::Severity::Warning) {
        let mut item = Item::new_word(&finding.word);
        let message = match &finding.suggestion {
            Some(hint) => format!("{} ({hint})", finding.message),
            None => finding.message.clone(),
        };
        item.kind = ItemKind::Audit {
            check: finding.check.clone(),
            current: finding.pronunciation.clone(),
            message,
            line: finding.line,
        };
        item.origin = format!("audit:{}", finding.check);
        queue.add(item);
    }
    Ok(queue.items().to_vec())
}

/// Items for the variants an accent profile proposes for the lexicon: one item per canonical
/// pronunciation, its variants as candidates (probability as score, fired rules listed).
pub fn variant_items(project: &Project, lexicon: &Lexicon, profile_spec: &str) -> anyhow::Result<Vec<Item>> {
    let phoneset = Phoneset::resolve(&project.phoneset, &project.root).context("cannot load the phoneset")?;
    let profile = Profile::resolve(profile_spec, &project.root, &phoneset)
        .with_context(|| format!("cannot load the accent profile {profile_spec}"))?;
    let generation = Generator::new(&phoneset, &profile, VariantOptions::default()).run(lexicon, None);
    for s in &generation.skipped {
        eprintln!("warning: {}: line {}: {}", s.word, s.line, s.message);
    }
    let mut queue = Queue::new();
    for v in generation.variants {
        let mut item = Item::new_word(&v.word);
        item.kind = ItemKind::Variant { canonical: v.canonical.clone(), profile: profile.id.clone() };
        item.origin = format!("variants:{}", profile.id);
        let mut sets: Vec<&str> = v.fired.iter().map(|f| f.rule_set.as_str()).collect();
        sets.dedup();
        let mut cand = Candidate::new(&v.pronunciation, &format!("variant:{}", sets.join("+")));
        cand.score = Some(v.probability);
        cand.rules = v.fired.iter().map(|f| format!("{}/{}", f.rule_set, f.rule_id)).collect();
        item.candidates.push(cand);
        queue.add(item);
    }
    Ok(queue.items().to_vec())
}
