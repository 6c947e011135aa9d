//! `qorbits classes`: the classes with given invariants I and J, from a table that covers
//! them or computed by the search by invariants.

use crate::cmd::{guard_long, Jobs};
use crate::out::{emit, line};
use crate::progress::Bar;
use crate::render::{rows, Format};
use qorbits::arith::parse::parse_integer;
use qorbits::enumerate::cost::search_steps;
use qorbits::error::Error;
use qorbits::table::query::{Query, Source};
use std::path::PathBuf;

/// Triples (a, b, c) the search by invariants visits per second on one core, measured by
/// `cargo bench --bench invariants` on this project's reference machine (a rule of thumb
/// for estimates, no more).
pub const SEARCH_STEPS_PER_SECOND: f64 = 2.0e7;

/// List the classes with given invariants I and J.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits classes --I 10 --J -29\n  qorbits classes --db qorbits-h1e6.sqlite --I 28 --J -160 --els --csv\n  qorbits classes --I 336 --J -17280 --over-q"
)]
pub struct Args {
    /// Invariant I (negative values as plain arguments).
    #[arg(long = "I", allow_negative_numbers = true)]
    i: String,
    /// Invariant J (negative values as plain arguments).
    #[arg(long = "J", allow_negative_numbers = true)]
    j: String,
    /// A table to answer from; without one (or when it does not cover the pair) the
    /// classes are computed directly from the invariants.
    #[arg(long, value_name = "TABLE")]
    db: Option<PathBuf>,
    /// Also the classes with a rational factor (Disc ≠ 0).
    #[arg(long)]
    include_reducible: bool,
    /// Only the everywhere locally soluble classes.
    #[arg(long)]
    els: bool,
    /// Only the first class of each class over Q among the everywhere locally soluble
    /// classes without a rational root (one quartic per non-trivial 2-Selmer element of
    /// y^2 = x^3 - 27I x - 27J that these invariants carry).
    #[arg(long)]
    over_q: bool,
    /// Print only the number of classes.
    #[arg(long, conflicts_with_all = ["json", "jsonl", "csv"])]
    count: bool,
    /// One JSON array of objects (keys in docs/output.md).
    #[arg(long, conflicts_with_all = ["jsonl", "csv"])]
    json: bool,
    /// One JSON object per line, streamed.
    #[arg(long, conflicts_with = "csv")]
    jsonl: bool,
    /// CSV with a header line (RFC 4180).
    #[arg(long)]
    csv: bool,
    #[command(flatten)]
    jobs: Jobs,
    /// Run a search estimated to take longer than the limit (see the estimate printed).
    #[arg(long)]
    allow_long: bool,
    /// No estimate and no progress spinner on stderr.
    #[arg(long)]
    quiet: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let mut q = Query::new(parse_integer("I", &a.i)?, parse_integer("J", &a.j)?)?;
    q.include_reducible = a.include_reducible;
    q.els = a.els;
    q.over_q = a.over_q;
    let covered = match &a.db {
        Some(db) => q.coverage(db)?.map_err(Some),
        None => Err(None),
    };
    if let Err(why) = &covered {
        if let (Some(why), Some(db)) = (why, &a.db) {
            if !a.quiet {
                eprintln!(
                    "qorbits: {} does not cover (I, J) = ({}, {}): {why}; computing from the invariants",
                    db.display(),
                    q.i,
                    q.j
                );
            }
        }
        let threads = a.jobs.run(|| Ok(rayon::current_num_threads()))? as f64;
        let seconds =
            search_steps(q.h4.to_f64(), q.include_reducible) / SEARCH_STEPS_PER_SECOND / threads;
        guard_long(
            &format!("the search for the classes with H = {}", q.height()),
            seconds,
            a.allow_long,
            a.quiet,
        )?;
    }
    let bar = Bar::new(a.quiet);
    let db = a.db.as_deref().filter(|_| covered.is_ok());
    let answer = a.jobs.run(|| q.answer(db, &bar))?;
    bar.finish();
    debug_assert!(db.is_none() || answer.source == Source::Table);
    if a.count {
        line(&answer.rows.len().to_string());
        return Ok(());
    }
    let format = if a.json {
        Format::Json
    } else if a.jsonl {
        Format::Jsonl
    } else if a.csv {
        Format::Csv
    } else {
        Format::Text
    };
    emit(&rows(&answer.rows, format));
    Ok(())
}
