//! The `qorbits` command line: argument parsing and output formatting over the library.

use clap::{Parser, Subcommand};
use qorbits::class::describe;
use qorbits::error::Error;
use qorbits::form::Form;
use rug::Integer;
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "qorbits",
    version,
    about = "Classes of integral binary quartic forms"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Canonical representative and data of the class of a x^4 + b x^3y + c x^2y^2 + d xy^3 + e y^4.
    Reduce {
        /// The five coefficients a b c d e (negative numbers as plain arguments).
        #[arg(allow_negative_numbers = true, num_args = 0.., value_name = "A B C D E")]
        coefficients: Vec<String>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
    },
}

fn parse_form(args: &[String]) -> Result<Form<Integer>, Error> {
    if args.len() != 5 {
        return Err(Error::Input(format!(
            "expected 5 integer coefficients a b c d e, got {}; e.g. qorbits reduce 1 -2 -3 -1 5",
            args.len()
        )));
    }
    let mut c = Vec::with_capacity(5);
    for a in args {
        let v = Integer::parse(a.trim())
            .map(Integer::from)
            .map_err(|_| Error::Input(format!("coefficient '{a}' is not an integer")))?;
        c.push(v);
    }
    Ok(Form::new(c.try_into().expect("five coefficients")))
}

fn run(cli: Cli) -> Result<(), Error> {
    match cli.command {
        Command::Reduce { coefficients, json } => {
            let f = parse_form(&coefficients)?;
            let d = describe(&f)?;
            if json {
                println!("{}", d.to_json());
            } else {
                print!("{}", d.to_text());
            }
            Ok(())
        }
    }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("qorbits: {e}");
            ExitCode::from(2)
        }
    }
}
