//! `orthoepy guess`: pronunciations of words from a trained model, from a shipped
//! letter-to-sound rule set (`--rules LANG`), or — inside a project with a lexicon — from the
//! hybrid guesser (initialisms, compounds, derivations, then the model or the project's rules).

use anyhow::Context;
use orthoepy::g2p::hybrid::{Candidate, Guesser, LanguageConfig};
use orthoepy::g2p::lts::{LetterToSoundRules, SHIPPED};
use orthoepy::g2p::{Guess, Model};
use orthoepy::phoneset::Phoneset;
use orthoepy::project::Project;
use std::io::BufRead;
use std::path::PathBuf;
use std::process::ExitCode;

/// Output formats of `guess`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum GuessFormat {
    /// word, rank, phones, score, and the alignment (model) or sources (rules, hybrid) —
    /// tab-separated, one candidate a line.
    Tsv,
    /// One JSON array: model guesses with hypotheses, posteriors, alignments and warnings, or
    /// hybrid/rule candidates with score and sources.
    Json,
}

/// Guess pronunciations for new words (model N-best, letter-to-sound rules, or the hybrid).
///
/// Words come from the command line, or one a line from standard input when none are given or
/// the only word is `-`.
///
/// With MODEL only: the model's N-best list. With `--rules LANG`: a shipped letter-to-sound rule
/// set alone (`en`, `es`; no model argument). Inside a project whose orthoepy.toml names a
/// lexicon: the hybrid guesser over that lexicon, with MODEL (or the project's model), else
/// the project's letter-to-sound rules. Scores are calibrated probabilities in 0..1.
///
/// Examples: orthoepy guess model.g2p quayside ferryman --nbest 3 --format json
///           orthoepy guess --rules es muelle embarcadero
///           orthoepy guess --project harbour-lexicon ferryboats
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The model file written by `orthoepy train` (leave out with --rules, or to use the project's).
    model: Option<PathBuf>,
    /// Words to guess (`-` or none: read standard input).
    words: Vec<String>,
    /// Guess with the shipped letter-to-sound rules of this language alone (en, es).
    #[arg(long, value_name = "LANG")]
    rules: Option<String>,
    /// Hypotheses per word.
    #[arg(long, value_name = "N", default_value_t = 5)]
    nbest: usize,
    /// Output format.
    #[arg(long, value_enum, default_value = "tsv")]
    format: GuessFormat,
    #[command(flatten)]
    project: super::ProjectArgs,
}

/// The TSV lines of one model guess: `word rank phones posterior alignment`; the alignment is
/// `letters:phones` pieces joined by `|` (phones joined by `_`).
fn tsv_lines(guess: &Guess) -> Vec<String> {
    guess
        .hypotheses
        .iter()
        .enumerate()
        .map(|(rank, h)| {
            let alignment: Vec<String> = h.alignment.iter().map(|p| format!("{}:{}", p.letters, p.phones.join("_"))).collect();
            format!("{}\t{}\t{}\t{:.4}\t{}", guess.word, rank + 1, h.phones.join(" "), h.posterior, alignment.join("|"))
        })
        .collect()
}

/// Candidates of one word for the rules and hybrid paths.
#[derive(Debug, serde::Serialize)]
struct WordCandidates {
    word: String,
    candidates: Vec<Candidate>,
}

/// The TSV lines of one word's candidates: `word rank phones score sources` (sources joined by `,`).
fn candidate_lines(word: &WordCandidates) -> Vec<String> {
    word.candidates
        .iter()
        .enumerate()
        .map(|(rank, c)| {
            let sources: Vec<String> = c.sources.iter().map(ToString::to_string).collect();
            format!("{}\t{}\t{}\t{:.4}\t{}", word.word, rank + 1, c.pronunciation, c.score, sources.join(","))
        })
        .collect()
}

fn print_candidates(all: &[WordCandidates], format: GuessFormat) -> anyhow::Result<()> {
    match format {
        GuessFormat::Json => super::print_json(&all)?,
        GuessFormat::Tsv => all.iter().flat_map(candidate_lines).for_each(|l| println!("{l}")),
    }
    Ok(())
}

/// `--rules LANG`: the shipped rule set alone, in the phoneset it is written for.
fn with_rules(lang: &str, words: &[String], format: GuessFormat) -> anyhow::Result<ExitCode> {
    let Some((_, phoneset_id)) = SHIPPED.iter().find(|(id, _)| *id == lang) else {
        let known: Vec<&str> = SHIPPED.iter().map(|(id, _)| *id).collect();
        anyhow::bail!("no shipped letter-to-sound rules for `{lang}`; choose one of: {}", known.join(", "));
    };
    let phoneset = Phoneset::shipped(phoneset_id)?;
    let rules = LetterToSoundRules::shipped(lang, &phoneset)?;
    let config = LanguageConfig::shipped(lang, &phoneset)?;
    let mut all = Vec::with_capacity(words.len());
    for word in words {
        let pronunciation = rules.transcribe(word).with_context(|| format!("cannot transcribe `{word}`"))?;
        let source = orthoepy::g2p::hybrid::Source::Rules { language: lang.to_string() };
        all.push(WordCandidates {
            word: word.clone(),
            candidates: vec![Candidate { pronunciation: pronunciation.render(&phoneset), score: config.scores.rules, sources: vec![source] }],
        });
    }
    print_candidates(&all, format)?;
    Ok(ExitCode::SUCCESS)
}

/// The hybrid guesser over the project's lexicon.
fn with_project(project: &Project, model: Option<PathBuf>, words: &[String], args: &Args) -> anyhow::Result<ExitCode> {
    let phoneset = Phoneset::resolve(&project.phoneset, &project.root).context("cannot load the project's phoneset")?;
    let language = project
        .letter_to_sound
        .as_deref()
        .filter(|id| SHIPPED.iter().any(|(s, _)| s == id))
        .or_else(|| LetterToSoundRules::shipped_for_phoneset(phoneset.id()))
        .with_context(|| format!("no shipped language configuration for phoneset {}", phoneset.id()))?;
    let config = LanguageConfig::shipped(language, &phoneset)?;
    let lexicon = orthoepy::lexicon::Lexicon::load(&project.lexicon, project.headword_policy()).context("cannot load the lexicon")?;
    let index = lexicon.index();
    let model = match model.or_else(|| project.model.clone()) {
        Some(path) => Some(Model::load(&path).with_context(|| format!("cannot load the model {}", path.display()))?),
        None => None,
    };
    let rules = match (&model, &project.letter_to_sound) {
        (None, Some(spec)) => Some(LetterToSoundRules::resolve(spec, &phoneset).context("cannot load the project's letter-to-sound rules")?),
        _ => None,
    };
    let mut guesser = Guesser::new(&lexicon, &index, &phoneset, &config);
    if let Some(m) = &model {
        guesser = guesser.with_model(m);
    }
    if let Some(r) = &rules {
        guesser = guesser.with_rules(r);
    }
    let all: Vec<WordCandidates> = words.iter().map(|w| WordCandidates { word: w.clone(), candidates: guesser.guess(w, args.nbest) }).collect();
    print_candidates(&all, args.format)?;
    Ok(ExitCode::SUCCESS)
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let mut positional: Vec<String> = args.model.iter().map(|p| p.display().to_string()).chain(args.words.iter().cloned()).collect();
    let read_stdin = positional.is_empty() || positional == ["-"];
    let read_words = |rest: Vec<String>| -> anyhow::Result<Vec<String>> {
        let words = if rest.is_empty() || rest == ["-"] {
            std::io::stdin().lock().lines().collect::<Result<Vec<_>, _>>().context("cannot read words from standard input")?
        } else {
            rest
        };
        Ok(words.iter().map(|w| w.trim().to_string()).filter(|w| !w.is_empty()).collect())
    };
    if let Some(lang) = &args.rules {
        let words = read_words(if read_stdin { Vec::new() } else { positional })?;
        return with_rules(lang, &words, args.format);
    }
    if let Some(project) = args.project.find()? {
        // Inside a project the first argument is a model only if it is an existing file; one
        // named like a model file that does not exist is a mistake, not a word to guess.
        let model = match positional.first() {
            Some(first) if std::path::Path::new(first).is_file() => Some(PathBuf::from(positional.remove(0))),
            Some(first) if first.to_lowercase().ends_with(".g2p") => {
                anyhow::bail!("no model file {first}; name an existing model, or leave it out to use the project's")
            }
            _ => None,
        };
        let words = read_words(positional)?;
        return with_project(&project, model, &words, &args);
    }
    let Some(model_path) = args.model.clone() else {
        anyhow::bail!("no model given and no orthoepy.toml found; name a MODEL file, pass --project DIR, or use --rules LANG");
    };
    let model = Model::load(&model_path).context("cannot load the model")?;
    let words = read_words(args.words.clone())?;
    let guesses: Vec<Guess> = words.iter().map(|w| model.guess(w, args.nbest)).collect();
    for g in &guesses {
        for w in &g.warnings {
            eprintln!("warning: {}: {w}", g.word);
        }
    }
    match args.format {
        GuessFormat::Json => super::print_json(&guesses)?,
        GuessFormat::Tsv => guesses.iter().flat_map(tsv_lines).for_each(|l| println!("{l}")),
    }
    Ok(ExitCode::SUCCESS)
}
