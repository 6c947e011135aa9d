//! `qorbits reduce`: the canonical representative and data of the class of one form.

use crate::out::emit;
use crate::progress::Bar;
use crate::render::{description_json, description_text};
use qorbits::arith::parse::parse_integer;
use qorbits::error::Error;
use qorbits::form::describe::describe;
use qorbits::form::Form;
use qorbits::progress::Progress;
use rug::Integer;

/// Canonical representative and data of the class of a x^4 + b x^3y + c x^2y^2 + d xy^3 + e y^4.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Example:\n  qorbits reduce 2 -7 4 13 -6\n  qorbits reduce --json 1 0 0 0 2"
)]
pub struct Args {
    /// The five coefficients a b c d e (negative numbers as plain arguments), any size.
    #[arg(allow_negative_numbers = true, num_args = 0.., value_name = "A B C D E")]
    coefficients: Vec<String>,
    /// Print one JSON object instead of text (keys in docs/output.md).
    #[arg(long)]
    json: bool,
    /// No progress message for large forms.
    #[arg(long)]
    quiet: bool,
}

/// The form of five coefficient arguments.
pub fn parse_form(args: &[String]) -> Result<Form<Integer>, Error> {
    if args.len() != 5 {
        return Err(Error::Input(format!(
            "expected 5 integer coefficients a b c d e, got {}; e.g. qorbits reduce 1 -2 -3 -1 5",
            args.len()
        )));
    }
    let mut c = Vec::with_capacity(5);
    for a in args {
        c.push(parse_integer("coefficient", a)?);
    }
    Ok(Form::new(c.try_into().expect("five coefficients")))
}

pub fn run(a: Args) -> Result<(), Error> {
    let f = parse_form(&a.coefficients)?;
    let digits =
        f.c.iter()
            .map(|c| c.to_string().trim_start_matches('-').len())
            .max();
    let bar = Bar::new(a.quiet);
    if digits.unwrap_or(0) > 38 && !a.quiet {
        // Beyond machine integers the covariant point is computed with MPFR: seconds.
        let what = format!(
            "reducing a form with {}-digit coefficients: the covariant point in multiple \
             precision, then the discriminant factored (seconds to a minute)",
            digits.unwrap_or(0)
        );
        eprintln!("qorbits: {what}");
        bar.start(&what, 0);
    }
    let d = describe(&f)?;
    bar.finish();
    if a.json {
        emit(&format!("{}\n", description_json(&d)));
    } else {
        emit(&description_text(&d));
    }
    Ok(())
}
