//! `qorbits completions` and `qorbits man`: shell completions (clap_complete) and a man page
//! (clap_mangen), generated from the same argument definitions as the parser.

use crate::out::emit;
use clap::CommandFactory;
use qorbits::error::Error;

/// Print a completion script for a shell.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits completions bash > ~/.local/share/bash-completion/completions/qorbits\n  qorbits completions zsh > ~/.zfunc/_qorbits\n  qorbits completions fish > ~/.config/fish/completions/qorbits.fish"
)]
pub struct CompletionsArgs {
    /// The shell.
    #[arg(value_enum)]
    shell: clap_complete::Shell,
}

/// Print the man page (roff) of qorbits or of one subcommand.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits man > qorbits.1 && man -l qorbits.1\n  qorbits man classes | man -l -"
)]
pub struct ManArgs {
    /// A subcommand (default: the page of qorbits itself, which lists them).
    subcommand: Option<String>,
}

pub fn completions(a: CompletionsArgs) -> Result<(), Error> {
    let mut out = Vec::new();
    clap_complete::generate(a.shell, &mut crate::Cli::command(), "qorbits", &mut out);
    emit(&String::from_utf8_lossy(&out));
    Ok(())
}

pub fn man(a: ManArgs) -> Result<(), Error> {
    let top = crate::Cli::command();
    let cmd = match &a.subcommand {
        None => top,
        Some(s) => {
            let names: Vec<String> = top
                .get_subcommands()
                .map(|c| c.get_name().to_string())
                .collect();
            let sub = top.find_subcommand(s).cloned().ok_or_else(|| {
                Error::Input(format!(
                    "'{s}' is not a subcommand; one of {}",
                    names.join(", ")
                ))
            })?;
            sub.name(&*String::leak(format!("qorbits-{s}")))
        }
    };
    let mut out = Vec::new();
    clap_mangen::Man::new(cmd)
        .render(&mut out)
        .map_err(|e| Error::Io(format!("cannot write the man page: {e}")))?;
    emit(&String::from_utf8_lossy(&out));
    Ok(())
}
