//! `orthoepy find`: look words up in the lexicon index.

use super::{DataFormat, ProjectArgs};
use anyhow::Context;
use orthoepy::lexicon::{find, CacheState, Entry, IndexedStore, Query};
use std::path::PathBuf;
use std::process::ExitCode;

/// Look up headwords: exactly, by prefix, by spelling distance, or by sound.
///
/// Exit status is 0 when something was found and 1 when nothing was.
///
/// Examples:
///   orthoepy find ferry
///   orthoepy find --prefix harb
///   orthoepy find --fuzzy 2 ferie
///   orthoepy find --sounds-like pier          (words pronounced like "pier")
///   orthoepy find --phones "P IH1 R"          (words with this pronunciation)
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// Words (or, with --phones, pronunciations) to look for.
    #[arg(required = true)]
    queries: Vec<String>,
    /// The CSV store (default: the project's lexicon).
    #[arg(short, long)]
    lexicon: Option<PathBuf>,
    /// List headwords starting with the query.
    #[arg(long, conflicts_with_all = ["fuzzy", "sounds_like", "phones"])]
    prefix: bool,
    /// List headwords within K edits of the query.
    #[arg(long, value_name = "K", conflicts_with_all = ["sounds_like", "phones"])]
    fuzzy: Option<u32>,
    /// List words pronounced like the query word (stress ignored unless --exact-stress).
    #[arg(long, conflicts_with = "phones")]
    sounds_like: bool,
    /// Treat each query as a pronunciation and list the words that have it.
    #[arg(long)]
    phones: bool,
    /// With --sounds-like/--phones, require stress marks to match too.
    #[arg(long)]
    exact_stress: bool,
    /// At most this many headwords per query.
    #[arg(long, default_value_t = 50)]
    limit: usize,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    format: DataFormat,
    #[command(flatten)]
    project: ProjectArgs,
}

#[derive(serde::Serialize)]
struct Found<'a> {
    query: &'a str,
    entries: Vec<Entry>,
}

pub fn run(args: Args) -> anyhow::Result<ExitCode> {
    let (path, policy, _) = args.project.lexicon_path(args.lexicon.as_deref())?;
    let store = IndexedStore::open(&path, policy).context("cannot load the lexicon")?;
    if let CacheState::Unsaved { reason, .. } = store.state() {
        eprintln!("note: the index of {} is not kept for next time ({reason})", path.display());
    }
    let mut results = Vec::new();
    for query in &args.queries {
        let ids = find(store.index(), &store, query, query_of(&args))?;
        results.push(Found { query, entries: store.entries(&ids)? });
    }
    let any = results.iter().any(|r| !r.entries.is_empty());
    match args.format {
        DataFormat::Json => super::print_json(&results)?,
        DataFormat::Text => {
            for found in &results {
                if found.entries.is_empty() {
                    eprintln!("{}: not found", found.query);
                }
                for e in &found.entries {
                    println!("{}\t{}\t{}\t{}", e.word, e.pronunciation, e.status, e.source);
                }
            }
        }
    }
    Ok(if any { ExitCode::SUCCESS } else { ExitCode::from(1) })
}

/// The look-up the options ask for.
fn query_of(args: &Args) -> Query {
    if args.prefix {
        Query::Prefix { limit: args.limit }
    } else if let Some(edits) = args.fuzzy {
        Query::Fuzzy { edits, limit: args.limit }
    } else if args.phones {
        Query::Phones { exact_stress: args.exact_stress }
    } else if args.sounds_like {
        Query::SoundsLike { exact_stress: args.exact_stress }
    } else {
        Query::Exact
    }
}
