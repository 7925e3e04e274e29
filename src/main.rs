//! The `orthoepy` command line: argument parsing and dispatch only. Every command lives in
//! `cli/<command>.rs`; the logic lives in the library.

mod cli;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// A workbench for pronunciation lexicons: import, audit, guess, propose variants, review, export.
#[derive(Debug, Parser)]
#[command(name = "orthoepy", version, about, long_about = None, propagate_version = true)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    Import(cli::import::Args),
    Export(cli::export::Args),
    Find(cli::find::Args),
    Show(cli::show::Args),
    Convert(cli::convert::Args),
    Diff(cli::diff::Args),
    Stats(cli::stats::Args),
    Audit(cli::audit::Args),
    Split(cli::split::Args),
    Train(cli::train::Args),
    Guess(cli::guess::Args),
    Evaluate(cli::evaluate::Args),
    Variants(cli::variants::Args),
    Queue(cli::queue::Args),
    Review(cli::review::Args),
    Apply(cli::apply::Args),
    Journal(cli::journal::Args),
    Demo(cli::demo::Args),
}

/// Writing into a closed pipe (`orthoepy find --prefix a | head`) ends the process quietly, as
/// it does for the standard Unix tools: the default SIGPIPE action is restored (the Rust runtime
/// ignores the signal, which turns every later `println!` into a panic).
fn restore_default_sigpipe() {
    #[cfg(unix)]
    // SAFETY: setting a signal's disposition to the default action at start-up, before any
    // thread is spawned, has no preconditions.
    unsafe {
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
}

fn main() -> ExitCode {
    restore_default_sigpipe();
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Import(args) => cli::import::run(args),
        Command::Export(args) => cli::export::run(args),
        Command::Find(args) => cli::find::run(args),
        Command::Show(args) => cli::show::run(args),
        Command::Convert(args) => cli::convert::run(args),
        Command::Diff(args) => cli::diff::run(args),
        Command::Stats(args) => cli::stats::run(args),
        Command::Audit(args) => cli::audit::run(args),
        Command::Split(args) => cli::split::run(args),
        Command::Train(args) => cli::train::run(args),
        Command::Guess(args) => cli::guess::run(args),
        Command::Evaluate(args) => cli::evaluate::run(args),
        Command::Variants(args) => cli::variants::run(args),
        Command::Queue(args) => cli::queue::run(args),
        Command::Review(args) => cli::review::run(args),
        Command::Apply(args) => cli::apply::run(args),
        Command::Journal(args) => cli::journal::run(args),
        Command::Demo(args) => cli::demo::run(args),
    };
    match result {
        Ok(code) => code,
        Err(err) => {
            eprintln!("error: {err:#}");
            ExitCode::from(2)
        }
    }
}
