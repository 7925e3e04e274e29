//! `orthoepy completions SHELL` and `orthoepy manpage`: shell completions and a man page
//! generated from the command-line definitions (clap_complete, clap_mangen), so they never
//! disagree with `--help`.

use std::io::Write;
use std::process::ExitCode;

/// Print a completion script for a shell.
///
/// Examples:
///   orthoepy completions bash > ~/.local/share/bash-completion/completions/orthoepy
///   orthoepy completions zsh > ~/.zfunc/_orthoepy
///   orthoepy completions fish > ~/.config/fish/completions/orthoepy.fish
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct CompletionArgs {
    /// The shell.
    #[arg(value_enum)]
    shell: clap_complete::Shell,
}

/// Print a man page (roff): orthoepy's own (listing every command), or one command's.
///
/// Examples:
///   orthoepy manpage > orthoepy.1 && man ./orthoepy.1
///   orthoepy manpage queue > orthoepy-queue.1
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub struct ManpageArgs {
    /// A command whose page to print (default: the main page).
    command: Option<String>,
}

/// Runs `completions` on the full command definition.
pub fn completions(args: CompletionArgs, mut command: clap::Command) -> anyhow::Result<ExitCode> {
    let name = command.get_name().to_string();
    clap_complete::generate(args.shell, &mut command, name, &mut std::io::stdout());
    Ok(ExitCode::SUCCESS)
}

/// Runs `manpage`.
pub fn manpage(args: ManpageArgs, command: clap::Command) -> anyhow::Result<ExitCode> {
    let page = match &args.command {
        None => command,
        Some(name) => {
            let Some(sub) = command.find_subcommand(name) else {
                let known: Vec<&str> = command.get_subcommands().map(|s| s.get_name()).collect();
                anyhow::bail!("no command `{name}`; commands are: {}", known.join(", "));
            };
            let page_name = format!("{}-{name}", command.get_name());
            sub.clone().name(page_name)
        }
    };
    let mut out = std::io::stdout().lock();
    clap_mangen::Man::new(page).render(&mut out)?;
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}
