//! `orthoepy variants`: propose variant pronunciations by applying an accent profile or rule
//! sets to a lexicon.

use super::{print_json, DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::phoneset::Phoneset;
use orthoepy::project::Project;
use orthoepy::variants::{feature_view, FeatureView, Generator, Options, Profile, VariantRuleSet, Variant};
use std::path::PathBuf;
use std::process::ExitCode;

/// Propose variant pronunciations (accents, fast speech) from feature rewrite rules.
///
/// Examples:
///   orthoepy variants lexicon.csv --profile fast-casual --all --min-prob 0.05
///   orthoepy variants lexicon.csv --rules flapping,td-deletion --words water,best --explain
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
#[command(group(clap::ArgGroup::new("which").required(true).args(["profile", "rules"])))]
#[command(group(clap::ArgGroup::new("scope").required(true).args(["words", "all"])))]
pub struct Args {
    /// The CSV store (default: the project's lexicon).
    lexicon: Option<PathBuf>,
    /// Accent profile: a shipped id (fast-casual, southern-british, london-vernacular), a profile
    /// named in the project, or a path to a profile .toml.
    #[arg(long, value_name = "NAME")]
    profile: Option<String>,
    /// Rule sets applied in order with weight 1: shipped ids or paths to rule-set .toml files.
    #[arg(long, value_name = "ID", value_delimiter = ',')]
    rules: Vec<String>,
    /// Only these words.
    #[arg(long, value_name = "W", value_delimiter = ',')]
    words: Vec<String>,
    /// Every word of the lexicon.
    #[arg(long)]
    all: bool,
    /// At most K variants per word.
    #[arg(long, value_name = "K", default_value_t = 5)]
    max_per_word: usize,
    /// Drop variants less probable than P.
    #[arg(long, value_name = "P", default_value_t = 0.01)]
    min_prob: f64,
    /// Phoneset: shipped id or path (default: the project's, else en-arpa).
    #[arg(long, value_name = "SPEC")]
    phoneset: Option<String>,
    /// Show each variant's aligned feature tracks next to its canonical.
    #[arg(long)]
    explain: bool,
    /// Output format.
    #[arg(long, value_enum, default_value = "table")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

#[derive(serde::Serialize)]
struct JsonVariant<'a> {
    #[serde(flatten)]
    variant: &'a Variant,
    #[serde(skip_serializing_if = "Option::is_none")]
    view: Option<FeatureView>,
}

fn load_profile(args: &Args, project: Option<&Project>, phoneset: &Phoneset) -> anyhow::Result<Profile> {
    let cwd = std::env::current_dir().context("cannot read the current folder")?;
    let base = project.map_or(cwd.as_path(), |p| p.root.as_path());
    if let Some(name) = &args.profile {
        let spec = project.map_or(name.as_str(), |p| p.profile_spec(name));
        return Profile::resolve(spec, base, phoneset).with_context(|| format!("cannot load profile {name}"));
    }
    let sets = args
        .rules
        .iter()
        .map(|id| VariantRuleSet::resolve(id, base, phoneset).with_context(|| format!("cannot load rule set {id}")))
        .collect::<anyhow::Result<Vec<_>>>()?;
    Ok(Profile::from_rule_sets(sets))
}

/// Runs the command.
pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    if !(0.0..=1.0).contains(&args.min_prob) {
        anyhow::bail!("--min-prob {} is a probability: give a number from 0 to 1", args.min_prob);
    }
    let (lexicon, project) = args.project.load_lexicon(args.lexicon.as_deref())?;
    let phoneset = super::resolve_phoneset(args.phoneset.as_deref(), project.as_ref())?;
    let profile = load_profile(&args, project.as_ref(), &phoneset)?;
    let options = Options { max_per_word: args.max_per_word, min_probability: args.min_prob };
    let generator = Generator::new(&phoneset, &profile, options);
    let words = (!args.all).then_some(args.words.as_slice());
    let run = generator.run(&lexicon, words);
    if !run.skipped.is_empty() {
        eprintln!("warning: {} entries skipped: their pronunciation does not parse (run `orthoepy audit`)", run.skipped.len());
    }
    let view = |v: &Variant| -> Option<FeatureView> {
        let (a, b) = (phoneset.parse(&v.canonical).ok()?, phoneset.parse(&v.pronunciation).ok()?);
        Some(feature_view(&phoneset, &a, &b))
    };
    match args.format {
        DataFormat::Json => {
            let out: Vec<JsonVariant> =
                run.variants.iter().map(|v| JsonVariant { variant: v, view: if args.explain { view(v) } else { None } }).collect();
            print_json(&serde_json::json!({ "profile": profile.id, "variants": out, "skipped": run.skipped }))?;
        }
        DataFormat::Text => {
            let width = run.variants.iter().map(|v| v.word.chars().count()).max().unwrap_or(4);
            for v in &run.variants {
                let fired: Vec<String> = v.fired.iter().map(|f| format!("{}/{}@{}", f.rule_set, f.rule_id, f.position)).collect();
                println!("{:<width$}  {:.3}  {}  (from {})  {}", v.word, v.probability, v.pronunciation, v.canonical, fired.join(" "));
                if let (true, Some(view)) = (args.explain, view(v)) {
                    for line in view.render_text().lines() {
                        println!("    {line}");
                    }
                    println!();
                }
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
