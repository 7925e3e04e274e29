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
    Init(cli::init::Args),
    Completions(cli::completions::CompletionArgs),
    Manpage(cli::completions::ManpageArgs),
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

/// SIGTERM, SIGHUP and SIGINT end a command between two write steps, never inside one: a
/// thread waits for the signal, waits for the write step in progress to end
/// (`safe_io::hold_writes`, which also keeps the next from starting), releases the project lock
/// and exits with status 128 + the signal's number, as a shell reports a process the signal ended.
/// Every file is then old or new, and no temporary file is left. The review screen (and the demo,
/// which opens it) keeps the default actions: it restores the terminal itself.
fn end_between_writes_on_termination() {
    #[cfg(unix)]
    {
        use signal_hook::consts::{SIGHUP, SIGINT, SIGTERM};
        let Ok(mut signals) = signal_hook::iterator::Signals::new([SIGTERM, SIGHUP, SIGINT]) else {
            eprintln!("warning: cannot watch for termination signals; a signal now ends the command at once");
            return;
        };
        std::thread::spawn(move || {
            if let Some(signal) = signals.forever().next() {
                let _no_more_writes = orthoepy::safe_io::hold_writes();
                orthoepy::lock::release_held_locks();
                std::process::exit(128 + signal);
            }
        });
    }
}

fn main() -> ExitCode {
    restore_default_sigpipe();
    let cli = Cli::parse();
    if !matches!(cli.command, Command::Review(_) | Command::Demo(_)) {
        end_between_writes_on_termination();
    }
    let result = match cli.command {
        Command::Import(args) => cli::import::run(args),
        Command::Export(args) => cli::export::run(args),
        Command::Find(args) => cli::find::run(args),
        Command::Show(args) => cli::show::run(args),
        Command::Convert(args) => cli::convert::run(args),
        Command::Diff(args) => cli::diff::run(args),
        Command::Init(args) => cli::init::run(args),
        Command::Completions(args) => cli::completions::completions(args, <Cli as clap::CommandFactory>::command()),
        Command::Manpage(args) => cli::completions::manpage(args, <Cli as clap::CommandFactory>::command()),
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
