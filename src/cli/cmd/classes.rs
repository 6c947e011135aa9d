//! `qorbits classes`: the classes with given invariants I and J, from a table that covers
//! them or computed by the search by invariants; and selections from a table by
//! discriminant, height range, Galois group, signature, stabiliser, local solubility, label
//! or id (`qorbits::table::select`), in table order, with a limit.

use crate::cmd::{guard_long, Jobs};
use crate::out::{emit, line};
use crate::progress::Bar;
use crate::render::{rows as render_rows, Format};
use qorbits::arith::parse::{parse_height, parse_integer};
use qorbits::enumerate::cost::search_steps;
use qorbits::error::Error;
use qorbits::form::galois::GaloisGroup;
use qorbits::form::Signature;
use qorbits::table::query::{Query, Source};
use qorbits::table::reader::open_table;
use qorbits::table::row::ClassRow;
use qorbits::table::schema::{galois_from_name, signature_from_name};
use qorbits::table::select::{select, Selection};
use std::path::PathBuf;

/// Triples (a, b, c) the search by invariants visits per second on one core, measured by
/// `cargo bench --bench invariants` on this project's reference machine (a rule of thumb
/// for estimates, no more).
pub const SEARCH_STEPS_PER_SECOND: f64 = 2.0e7;

/// List the classes with given invariants I and J.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits classes --I 10 --J -29\n  qorbits classes --db qorbits-h1e6.sqlite --I 28 --J -160 --els --csv\n  qorbits classes --I 336 --J -17280 --over-q\n  qorbits classes --db qorbits-h1e6.sqlite --disc -283\n  qorbits classes --db qorbits-h1e6.sqlite --galois C4 --signature posdef --limit 5\n  qorbits classes --db qorbits-h1e6.sqlite --height-from 1e5 --height-below 2e5 --stabiliser 4\n  qorbits classes --db qorbits-h1e6.sqlite --label Q10_-29_001"
)]
pub struct Args {
    /// Invariant I (negative values as plain arguments).
    #[arg(long = "I", allow_negative_numbers = true, requires = "j")]
    i: Option<String>,
    /// Invariant J (negative values as plain arguments).
    #[arg(long = "J", allow_negative_numbers = true, requires = "i")]
    j: Option<String>,
    /// Only classes with this discriminant (from the table given with --db).
    #[arg(long, allow_negative_numbers = true)]
    disc: Option<String>,
    /// Only classes with H at least this (e.g. 1e5).
    #[arg(long, value_name = "X")]
    height_from: Option<String>,
    /// Only classes with H below this (e.g. 2e5).
    #[arg(long, value_name = "Y")]
    height_below: Option<String>,
    /// Only these Galois groups, comma-separated (S4, A4, D4, C4, V4).
    #[arg(long, value_delimiter = ',', value_name = "GROUPS")]
    galois: Vec<String>,
    /// Only these signatures, comma-separated (4real, 2real, posdef, negdef).
    #[arg(long, value_delimiter = ',', value_name = "SIGNATURES")]
    signature: Vec<String>,
    /// Only these stabiliser orders in PGL2(Z), comma-separated (1, 2, 4).
    #[arg(long, value_delimiter = ',', value_name = "ORDERS")]
    stabiliser: Vec<String>,
    /// Only the classes that are not everywhere locally soluble.
    #[arg(long, conflicts_with = "els")]
    not_els: bool,
    /// Only the class with this label (schema/labels.md).
    #[arg(long)]
    label: Option<String>,
    /// Only the class with this row id.
    #[arg(long)]
    id: Option<String>,
    /// At most this many classes (the first in table order).
    #[arg(long, value_name = "N")]
    limit: Option<String>,
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

/// A whole number for an option.
fn number(name: &str, s: &str) -> Result<i64, Error> {
    parse_integer(name, s)?
        .to_i64()
        .ok_or_else(|| Error::Input(format!("{name} '{s}' is beyond the range of any table")))
}

/// H4 = 4·X of a height option.
fn h4_of(name: &str, s: &str) -> Result<i64, Error> {
    let x = parse_height(s).map_err(|e| Error::Input(format!("{name}: {e}")))?;
    i64::try_from(4 * x).map_err(|_| Error::Input(format!("{name} '{s}' is beyond any table")))
}

/// The selection of the table options (everything but I and J).
fn selection(a: &Args) -> Result<Selection, Error> {
    let named = |what: &str, v: &str, all: &[&str]| {
        Error::Input(format!("{what} '{v}' is not one of {}", all.join(", ")))
    };
    let mut s = Selection {
        include_reducible: a.include_reducible,
        label: a.label.clone(),
        ..Selection::default()
    };
    s.disc = a.disc.as_deref().map(|d| number("--disc", d)).transpose()?;
    s.id = a.id.as_deref().map(|d| number("--id", d)).transpose()?;
    s.h4_from = a
        .height_from
        .as_deref()
        .map(|h| h4_of("--height-from", h))
        .transpose()?;
    s.h4_below = a
        .height_below
        .as_deref()
        .map(|h| h4_of("--height-below", h))
        .transpose()?;
    for g in &a.galois {
        let names = GaloisGroup::ALL.map(GaloisGroup::name);
        s.galois
            .push(galois_from_name(g.trim()).ok_or_else(|| named("--galois", g, &names))?);
    }
    for g in &a.signature {
        let names = Signature::ALL.map(Signature::name);
        s.signature
            .push(signature_from_name(g.trim()).ok_or_else(|| named("--signature", g, &names))?);
    }
    for g in &a.stabiliser {
        let v = match g.trim() {
            "1" => 1,
            "2" => 2,
            "4" => 4,
            _ => return Err(named("--stabiliser", g, &["1", "2", "4"])),
        };
        s.stabiliser.push(v);
    }
    if a.not_els {
        s.els = Some(false);
    }
    s.limit = a
        .limit
        .as_deref()
        .map(|n| {
            n.trim().parse::<u64>().map_err(|_| {
                Error::Input(format!(
                    "--limit '{n}' is not a number of classes; give a whole number"
                ))
            })
        })
        .transpose()?;
    Ok(s)
}

/// Rows in the requested format (or their count).
fn print(a: &Args, rows: &[ClassRow]) {
    if a.count {
        line(&rows.len().to_string());
        return;
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
    emit(&render_rows(rows, format));
}

/// The first class of each class over Q among rows that carry their class over Q.
fn first_over_q(rows: Vec<ClassRow>) -> Vec<ClassRow> {
    rows.into_iter()
        .filter(|r| r.rational.as_deref() == Some(r.label.as_str()))
        .collect()
}

pub fn run(a: Args) -> Result<(), Error> {
    let mut sel = selection(&a)?;
    let selects = !sel.is_empty() || sel.limit.is_some() || a.not_els;
    if let (false, Some(_)) = (selects, &a.i) {
        return by_invariants(a);
    }
    if a.i.is_none() && !selects {
        return Err(Error::Input(
            "give the invariants (--I and --J) or a selection (--disc, --height-from, --galois,              --label, …) with a table (--db)"
                .into(),
        ));
    }
    if a.els {
        sel.els = Some(true);
    }
    if let (Some(i), Some(j)) = (&a.i, &a.j) {
        // A pair and more: from the table when it covers the pair, else computed and
        // filtered by the same conditions.
        let mut q = Query::new(parse_integer("I", i)?, parse_integer("J", j)?)?;
        q.include_reducible = a.include_reducible;
        let covered = match &a.db {
            Some(db) => q.coverage(db)?.is_ok(),
            None => false,
        };
        if !covered {
            let answer = a.jobs.run(|| q.answer(None, &Bar::new(a.quiet)))?;
            let mut rows: Vec<ClassRow> =
                answer.rows.into_iter().filter(|r| sel.keeps(r)).collect();
            if a.over_q {
                rows = first_over_q(rows);
            }
            if let Some(n) = sel.limit {
                rows.truncate(n as usize);
            }
            print(&a, &rows);
            return Ok(());
        }
        sel.pair = Some((
            q.i.to_i64().expect("covered"),
            q.j.to_i64().expect("covered"),
        ));
    }
    let Some(db) = &a.db else {
        return Err(Error::Input(
            "selecting by discriminant, height, facets, label or id reads a table; give it with --db"
                .into(),
        ));
    };
    if a.over_q && sel.limit.is_some() {
        return Err(Error::Input(
            "--over-q and --limit together are not supported; drop --limit".into(),
        ));
    }
    let conn = open_table(db)?;
    let mut rows = select(&conn, &sel)?;
    if a.over_q {
        rows = first_over_q(rows);
    }
    print(&a, &rows);
    Ok(())
}

/// The classes of one pair (I, J): from the table when it covers them, else computed.
fn by_invariants(a: Args) -> Result<(), Error> {
    let (i, j) = (
        a.i.as_deref().expect("given"),
        a.j.as_deref().expect("given"),
    );
    let mut q = Query::new(parse_integer("I", i)?, parse_integer("J", j)?)?;
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
    print(&a, &answer.rows);
    Ok(())
}
