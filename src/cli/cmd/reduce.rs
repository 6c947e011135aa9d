//! `qorbits reduce`: the canonical representative and data of the class of one form, its
//! row in a table (`--db`), and the batch mode (`--batch`: one form per line, one JSON line
//! out per form).

use crate::cmd::Jobs;
use crate::out::emit;
use crate::progress::Bar;
use crate::render::{description_json, description_text};
use qorbits::arith::parse::parse_integer;
use qorbits::error::Error;
use qorbits::form::describe::describe;
use qorbits::form::Form;
use qorbits::progress::Progress;
use qorbits::table::lookup::{in_table_json, reduce_text, InTable, Lookup};
use rayon::prelude::*;
use rug::Integer;
use std::io::BufRead;
use std::path::PathBuf;
use std::sync::Mutex;

/// Canonical representative and data of the class of a x^4 + b x^3y + c x^2y^2 + d xy^3 + e y^4.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits reduce 2 -7 4 13 -6\n  qorbits reduce --json 1 0 0 0 2\n  qorbits reduce 2 -7 4 13 -6 --db qorbits-h1e6.sqlite\n  qorbits reduce --batch forms.txt --db qorbits-h1e6.sqlite > classes.jsonl\n  printf '1 0 0 0 2\\n3 1 4 1 5\\n' | qorbits reduce --batch -"
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
    /// A table to find the class in: its row id and label, or why the table does not hold it.
    #[arg(long, value_name = "TABLE")]
    db: Option<PathBuf>,
    /// Reduce the forms of FILE (`-`: standard input), one per line (five integers separated
    /// by spaces or commas), printing one JSON object per line; a bad line gets an error
    /// object and the batch goes on.
    #[arg(long, value_name = "FILE", conflicts_with = "json")]
    batch: Option<PathBuf>,
    #[command(flatten)]
    jobs: Jobs,
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

/// The `table` line of the text output.
fn table_line(db: &std::path::Path, t: &InTable) -> String {
    match t {
        InTable::Found { id, label } => {
            format!("table        {label}, row id {id} of {}\n", db.display())
        }
        InTable::NotCovered(why) => format!("table        not in {}: {why}\n", db.display()),
    }
}

pub fn run(a: Args) -> Result<(), Error> {
    if let Some(file) = &a.batch {
        if !a.coefficients.is_empty() {
            return Err(Error::Input(
                "--batch reads the forms from a file; give no coefficients with it".into(),
            ));
        }
        let db = a.db.as_deref();
        return a.jobs.run(|| batch(file, db));
    }
    let lookup = a.db.as_deref().map(Lookup::open).transpose()?;
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
    let place = match &lookup {
        Some(l) => Some(l.find(&d.canonical.form, &d.invariants)?),
        None => None,
    };
    bar.finish();
    if a.json {
        let mut v = description_json(&d);
        if let Some(t) = &place {
            v["table"] = in_table_json(t);
        }
        emit(&format!("{v}\n"));
    } else {
        let mut text = description_text(&d);
        if let (Some(t), Some(db)) = (&place, &a.db) {
            // After the summary lines, before the local table.
            let at = text.find("\n  ").map_or(text.len(), |k| k + 1);
            text.insert_str(at, &table_line(db, t));
        }
        emit(&text);
    }
    Ok(())
}

/// Lines read and reduced together (in parallel), then placed and printed in order.
const CHUNK: usize = 8192;

/// The batch mode: every line of `file` reduced, one JSON line out per form.
/// Runs on the pool of `--jobs`.
fn batch(file: &std::path::Path, db: Option<&std::path::Path>) -> Result<(), Error> {
    // One connection per worker thread: a connection is used by one thread at a time.
    let lookups = match db {
        Some(db) => (0..rayon::current_num_threads())
            .map(|_| Lookup::open(db).map(Mutex::new))
            .collect::<Result<Vec<_>, Error>>()?,
        None => Vec::new(),
    };
    let input: Box<dyn BufRead> = if file.as_os_str() == "-" {
        Box::new(std::io::stdin().lock())
    } else {
        let f = std::fs::File::open(file).map_err(|e| {
            Error::Io(format!(
                "cannot read the forms from {}: {e}",
                file.display()
            ))
        })?;
        Box::new(std::io::BufReader::new(f))
    };
    let mut lines = input.lines();
    let mut number = 0u64;
    loop {
        let mut chunk = Vec::with_capacity(CHUNK);
        while chunk.len() < CHUNK {
            let Some(l) = lines.next() else { break };
            number += 1;
            let l = l.map_err(|e| {
                Error::Io(format!(
                    "cannot read line {number} of {}: {e}",
                    file.display()
                ))
            })?;
            // Blank lines and comments are not forms.
            if !l.trim().is_empty() && !l.trim_start().starts_with('#') {
                chunk.push((number, l));
            }
        }
        if chunk.is_empty() {
            return Ok(());
        }
        let parts = chunk.len().div_ceil(lookups.len().max(1));
        let texts: Vec<String> = chunk
            .par_chunks(parts)
            .enumerate()
            .map(|(k, part)| {
                let lookup = lookups.get(k).map(|l| l.lock().expect("not poisoned"));
                let mut out = String::with_capacity(part.len() * 200);
                for (n, l) in part {
                    let r = match &lookup {
                        Some(t) => t.identify(*n, l),
                        None => reduce_text(*n, l),
                    };
                    r.write_json_line(&mut out);
                }
                out
            })
            .collect();
        let out: String = texts.concat();
        emit(&out);
    }
}
