//! The `qorbits` command line: parses the arguments, calls the library, renders the result.

mod args;
mod progress;
mod render;
mod report;

use args::{Cli, Command};
use clap::Parser;
use progress::Bar;
use qorbits::arith::parse::{parse_height, parse_integer};
use qorbits::error::Error;
use qorbits::form::describe::describe;
use qorbits::form::Form;
use qorbits::selmer::{selmer_stats, two_selmer, Curve};
use qorbits::table::hash::content_sha256;
use qorbits::table::manifest::{default_manifest_path, read_manifest, rebuild_and_compare, verify};
use qorbits::table::pipeline::build;
use qorbits::table::query::{Query, Source};
use qorbits::table::reader::{open_table, table_params};
use qorbits::table::row::Params;
use render::DescriptionView;
use std::path::PathBuf;
use std::process::ExitCode;

fn parse_form(args: &[String]) -> Result<Form<rug::Integer>, Error> {
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

/// Runs `f` on a pool of `jobs` worker threads (default: all cores).
fn with_jobs<T: Send>(
    jobs: Option<usize>,
    f: impl FnOnce() -> Result<T, Error> + Send,
) -> Result<T, Error> {
    let mut b = rayon::ThreadPoolBuilder::new();
    if let Some(n) = jobs {
        if n == 0 {
            return Err(Error::Input("--jobs must be at least 1".into()));
        }
        b = b.num_threads(n);
    }
    b.build()
        .map_err(|e| Error::Input(format!("cannot start worker threads: {e}")))?
        .install(f)
}

fn run(cli: Cli) -> Result<ExitCode, Error> {
    match cli.command {
        Command::Reduce { coefficients, json } => {
            let d = describe(&parse_form(&coefficients)?)?;
            if json {
                println!("{}", d.to_json());
            } else {
                print!("{}", d.to_text());
            }
        }
        Command::Build {
            height,
            out,
            jobs,
            include_reducible,
            force,
            quiet,
        } => {
            let params = Params {
                height: parse_height(&height)?,
                include_reducible,
            };
            let out = out.unwrap_or_else(|| PathBuf::from(params.default_file_name()));
            let bar = Bar::new(quiet);
            let s = with_jobs(jobs, || build(&params, &out, force, &bar))?;
            bar.finish();
            println!(
                "wrote {} ({} classes)",
                s.table.display(),
                s.manifest.counts.classes
            );
            println!("wrote {}", s.manifest_path.display());
            println!("content sha256 {}", s.manifest.content_sha256);
        }
        Command::Verify {
            file,
            manifest,
            rebuild,
            jobs,
            quiet,
        } => {
            let checks = match (file, rebuild) {
                (_, Some(m)) => {
                    let bar = Bar::new(quiet);
                    with_jobs(jobs, || rebuild_and_compare(&m, &bar))?
                }
                (Some(f), None) => {
                    let m = manifest.unwrap_or_else(|| default_manifest_path(&f));
                    verify(&f, &read_manifest(&m)?)
                }
                (None, None) => {
                    return Err(Error::Input(
                        "give a table FILE or --rebuild MANIFEST".into(),
                    ));
                }
            };
            print!("{}", report::checks(&checks));
            if checks.iter().any(|c| !c.ok) {
                return Ok(ExitCode::from(1));
            }
        }
        Command::Classes {
            i,
            j,
            db,
            json,
            csv,
            els,
            over_q,
            count,
            include_reducible,
            quiet,
        } => {
            let mut q = Query::new(parse_integer("I", &i)?, parse_integer("J", &j)?)?;
            q.include_reducible = include_reducible;
            q.els = els;
            q.over_q = over_q;
            let bar = Bar::new(quiet);
            let answer = q.answer(db.as_deref(), &bar)?;
            bar.finish();
            if let (Source::NotInTable(_), Some(db)) = (&answer.source, &db) {
                eprintln!(
                    "qorbits: {} does not cover (I, J) = ({}, {}) (H = {}); computing from the invariants",
                    db.display(),
                    q.i,
                    q.j,
                    q.height()
                );
            }
            if count {
                println!("{}", answer.rows.len());
                return Ok(ExitCode::SUCCESS);
            }
            let format = if json {
                render::Format::Json
            } else if csv {
                render::Format::Csv
            } else {
                render::Format::Text
            };
            print!("{}", render::render_rows(&answer.rows, format));
        }
        Command::Cite { file } => {
            let conn = open_table(&file)?;
            let params = table_params(&conn)?;
            let hash = content_sha256(&conn)?;
            print!("{}", report::citation(&params, &hash, &file));
        }
        Command::Stats { file } => {
            let conn = open_table(&file)?;
            print!("{}", report::stats(&conn)?);
        }
        Command::Selmer {
            ainvs,
            short,
            json,
            quiet,
        } => {
            let curve = match (ainvs, short) {
                (Some(a), _) => {
                    let mut c = Vec::with_capacity(5);
                    for (name, v) in ["a1", "a2", "a3", "a4", "a6"].iter().zip(&a) {
                        c.push(parse_integer(name, v)?);
                    }
                    Curve::new(c.try_into().expect("five coefficients"))?
                }
                (None, Some(s)) => {
                    Curve::short(parse_integer("A", &s[0])?, parse_integer("B", &s[1])?)?
                }
                (None, None) => unreachable!("clap requires --ainvs or --short"),
            };
            let (i, j) = curve.quartic_invariants();
            let bar = Bar::new(quiet);
            qorbits::progress::Progress::start(&bar, &format!("classes with I = {i}, J = {j}"), 0);
            let s = two_selmer(&curve);
            bar.finish();
            print!("{}", report::selmer(&curve, &s?, json));
        }
        Command::SelmerStats {
            height,
            jobs,
            json,
            curves,
            quiet,
        } => {
            let y = parse_height(&height)?;
            let bar = Bar::new(quiet);
            let stats = with_jobs(jobs, || selmer_stats(y, &bar))?;
            bar.finish();
            print!("{}", report::selmer_stats(&stats, json, curves));
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(code) => code,
        Err(Error::Exists(p)) => {
            eprintln!(
                "qorbits: {} already exists; pass --force to overwrite it",
                p.display()
            );
            ExitCode::from(2)
        }
        Err(e) => {
            eprintln!("qorbits: {e}");
            ExitCode::from(2)
        }
    }
}
