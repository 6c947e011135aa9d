//! The `qorbits` command line: parses the arguments, dispatches to the subcommand, and turns
//! every error into one line on stderr with exit status 2. A file-size limit (`ulimit -f`)
//! shows as a failed write (EFBIG) reported in that line: SIGXFSZ is ignored from the start.

mod cmd;
mod out;
mod plot;
mod progress;
mod render;

use clap::error::ErrorKind;
use clap::{CommandFactory, Parser, Subcommand};
use qorbits::error::Error;
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "qorbits",
    version,
    about = "Classes of integral binary quartic forms: build, verify and query the table",
    after_help = "Start with: qorbits build --height 1e6, then qorbits verify --db qorbits-h1e6.sqlite"
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    Reduce(cmd::reduce::Args),
    Build(cmd::build::Args),
    Plan(cmd::plan::Args),
    Merge(cmd::merge::Args),
    Verify(cmd::verify::Args),
    Classes(Box<cmd::classes::Args>),
    Cite(cmd::cite::Args),
    Stats(cmd::stats::Args),
    Selmer(cmd::selmer::Args),
    SelmerStats(cmd::selmer_stats::Args),
    Export(cmd::export::Args),
    Plot(cmd::plot::Args),
    Release(cmd::release::Args),
    Completions(cmd::shell::CompletionsArgs),
    Man(cmd::shell::ManArgs),
}

fn dispatch(c: Command) -> Result<ExitCode, Error> {
    match c {
        Command::Reduce(a) => cmd::reduce::run(a)?,
        Command::Build(a) => cmd::build::run(a)?,
        Command::Plan(a) => cmd::plan::run(a)?,
        Command::Merge(a) => cmd::merge::run(a)?,
        Command::Verify(a) => return cmd::verify::run(a),
        Command::Classes(a) => cmd::classes::run(*a)?,
        Command::Cite(a) => cmd::cite::run(a)?,
        Command::Stats(a) => cmd::stats::run(a)?,
        Command::Selmer(a) => cmd::selmer::run(a)?,
        Command::SelmerStats(a) => cmd::selmer_stats::run(a)?,
        Command::Export(a) => cmd::export::run(a)?,
        Command::Plot(a) => cmd::plot::run(a)?,
        Command::Release(a) => cmd::release::run(a)?,
        Command::Completions(a) => cmd::shell::completions(a)?,
        Command::Man(a) => cmd::shell::man(a)?,
    }
    Ok(ExitCode::SUCCESS)
}

/// An argument error as one line: clap's first line, and where to read more.
fn usage_error(e: clap::Error) -> ExitCode {
    match e.kind() {
        ErrorKind::DisplayHelp | ErrorKind::DisplayVersion => {
            out::emit(&e.render().to_string());
            ExitCode::SUCCESS
        }
        _ => {
            // clap's first paragraph, on one line: the message and what it names.
            let text = e.render().to_string();
            let first: Vec<&str> = text
                .lines()
                .take_while(|l| !l.trim().is_empty())
                .map(str::trim)
                .collect();
            let first = first.join(" ");
            let first = first.trim_start_matches("error: ").trim_end_matches(':');
            let known = |s: &str| Cli::command().get_subcommands().any(|c| c.get_name() == s);
            let sub = std::env::args().nth(1).filter(|s| known(s));
            let help = match sub {
                Some(s) => format!("qorbits {s} --help"),
                None => "qorbits --help".to_string(),
            };
            eprintln!("qorbits: {first}; see '{help}'");
            ExitCode::from(2)
        }
    }
}

fn main() -> ExitCode {
    // SAFETY: sets the disposition of one signal to "ignore" before any other thread runs.
    unsafe {
        libc::signal(libc::SIGXFSZ, libc::SIG_IGN);
    }
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => return usage_error(e),
    };
    match dispatch(cli.command) {
        Ok(code) => code,
        Err(Error::Exists(p)) => {
            eprintln!(
                "qorbits: {} already exists; pass --force to overwrite it",
                p.display()
            );
            ExitCode::from(2)
        }
        Err(Error::NoSpace(mut n)) => {
            // The partial files are gone by now: say what a retry has.
            qorbits::table::space::measure_again(&mut n);
            eprintln!(
                "qorbits: {}",
                n.message("rerun with --resume once there is room")
            );
            ExitCode::from(2)
        }
        Err(e) => {
            eprintln!("qorbits: {e}");
            ExitCode::from(2)
        }
    }
}
