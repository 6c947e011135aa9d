//! The `qorbits` command line: argument parsing and output formatting over the library.

use clap::{Parser, Subcommand};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use qorbits::class::{describe, height_decimal};
use qorbits::error::Error;
use qorbits::form::Form;
use qorbits::manifest::{
    default_manifest_path, manifest_for, read_manifest, verify, write_manifest,
};
use qorbits::report;
use qorbits::selmer::{selmer_stats, two_selmer, Curve};
use qorbits::store::{
    classes_with_invariants, content_sha256, open_table, table_params, write_table,
};
use qorbits::table::{enumerate_classes, ClassRow, Params};
use rug::ops::Pow;
use rug::Integer;
use std::path::{Path, PathBuf};
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
    /// Build the table of every class with H < X (SQLite file and manifest).
    Build {
        /// The height bound X: the table holds the classes with H < X (e.g. 1e6).
        #[arg(long)]
        height: String,
        /// Output file (default qorbits-h<X>.sqlite, the manifest beside it).
        #[arg(long)]
        out: Option<PathBuf>,
        /// Worker threads (default: all cores). The output does not depend on it.
        #[arg(long)]
        jobs: Option<usize>,
        /// Also include the classes with a rational factor (Disc ≠ 0).
        #[arg(long)]
        include_reducible: bool,
        /// Overwrite existing output files.
        #[arg(long)]
        force: bool,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
    /// Check a table against its manifest, or rebuild from a manifest and compare.
    Verify {
        /// The table (SQLite file).
        file: Option<PathBuf>,
        /// The manifest (default: beside the file).
        #[arg(long)]
        manifest: Option<PathBuf>,
        /// Rebuild the table described by this manifest and compare the hashes.
        #[arg(long, value_name = "MANIFEST", conflicts_with_all = ["file", "manifest"])]
        rebuild: Option<PathBuf>,
        /// Worker threads for --rebuild.
        #[arg(long)]
        jobs: Option<usize>,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
    /// List the classes with given invariants I and J.
    Classes {
        /// Invariant I (negative values as plain arguments).
        #[arg(long = "I", allow_negative_numbers = true)]
        i: String,
        /// Invariant J (negative values as plain arguments).
        #[arg(long = "J", allow_negative_numbers = true)]
        j: String,
        /// A table to answer from; without one (or when its height bound is below H(I, J))
        /// the classes are computed directly from the invariants.
        #[arg(long)]
        db: Option<PathBuf>,
        /// Also the classes with a rational factor (Disc ≠ 0).
        #[arg(long)]
        include_reducible: bool,
        /// Print only the number of classes.
        #[arg(long)]
        count: bool,
        /// JSON output (one array of objects).
        #[arg(long, conflicts_with = "csv")]
        json: bool,
        /// CSV output with a header line.
        #[arg(long)]
        csv: bool,
        /// Only the everywhere locally soluble classes.
        #[arg(long)]
        els: bool,
        /// Only the first class of each class over Q among the everywhere locally soluble
        /// classes without a rational root (one quartic per non-trivial 2-Selmer element of
        /// y^2 = x^3 - 27I x - 27J that these invariants carry).
        #[arg(long)]
        over_q: bool,
        /// No progress spinner while the classes are computed.
        #[arg(long)]
        quiet: bool,
    },
    /// Print a BibTeX entry and a CITATION.cff fragment for a table.
    Cite {
        /// The table (SQLite file).
        file: PathBuf,
    },
    /// Counts by number of real roots against the asymptotic main terms.
    Stats {
        /// The table (SQLite file).
        file: PathBuf,
    },
    /// The 2-Selmer group of an elliptic curve without rational 2-torsion, from the
    /// quartic forms with invariants (c4, 2·c6): its rank and one quartic per element.
    Selmer {
        /// Weierstrass coefficients a1 a2 a3 a4 a6 (negative values as plain arguments).
        #[arg(long, num_args = 5, allow_negative_numbers = true, value_names = ["A1", "A2", "A3", "A4", "A6"], conflicts_with = "short", required_unless_present = "short")]
        ainvs: Option<Vec<String>>,
        /// The curve y^2 = x^3 + A x + B.
        #[arg(long, num_args = 2, allow_negative_numbers = true, value_names = ["A", "B"])]
        short: Option<Vec<String>>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
        /// No progress spinner.
        #[arg(long)]
        quiet: bool,
    },
    /// Average size of the 2-Selmer group over the curves y^2 = x^3 + A x + B of height
    /// max(4|A|^3, 27B^2) below Y without rational 2-torsion.
    SelmerStats {
        /// The height bound Y (e.g. 1e4).
        #[arg(long)]
        height: String,
        /// Worker threads (default: all cores). The output does not depend on it.
        #[arg(long)]
        jobs: Option<usize>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
        /// Also list every curve with its 2-Selmer rank (text: after the table).
        #[arg(long)]
        curves: bool,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
}

fn parse_int(name: &str, s: &str) -> Result<Integer, Error> {
    Integer::parse(s.trim())
        .map(Integer::from)
        .map_err(|_| Error::Input(format!("{name} '{s}' is not an integer")))
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
        c.push(parse_int("coefficient", a)?);
    }
    Ok(Form::new(c.try_into().expect("five coefficients")))
}

/// `1e6`, `2.5e5`, `1000000`: an integer height bound.
fn parse_height(s: &str) -> Result<i128, Error> {
    let bad = || {
        Error::Input(format!(
            "height '{s}' is not a positive integer (write e.g. 1e6 or 1000000)"
        ))
    };
    let t = s.trim().to_ascii_lowercase();
    let (mant, exp) = match t.split_once('e') {
        Some((m, e)) => (m.to_string(), e.parse::<u32>().map_err(|_| bad())?),
        None => (t.clone(), 0),
    };
    let (int, frac) = mant.split_once('.').unwrap_or((&mant, ""));
    if int.is_empty() && frac.is_empty()
        || !int.chars().chain(frac.chars()).all(|c| c.is_ascii_digit())
    {
        return Err(bad());
    }
    if frac.len() as u32 > exp && frac.trim_end_matches('0').len() as u32 > exp {
        return Err(bad());
    }
    let digits = format!("{int}{frac}");
    let shift = exp.checked_sub(frac.len() as u32);
    let v = Integer::parse(if digits.is_empty() { "0" } else { &digits }).map_err(|_| bad())?;
    let mut v = Integer::from(v);
    match shift {
        Some(k) => v *= Integer::from(10).pow(k),
        None => v /= Integer::from(10).pow(frac.len() as u32 - exp),
    }
    let v = v.to_i128().ok_or_else(bad)?;
    if v < 1 {
        return Err(bad());
    }
    Ok(v)
}

fn progress_bar(quiet: bool, what: &str) -> ProgressBar {
    if quiet {
        return ProgressBar::hidden();
    }
    let p = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::stderr());
    p.set_style(
        ProgressStyle::with_template("{msg} [{bar:40}] {pos}/{len}, {elapsed} (eta {eta})")
            .expect("valid template")
            .progress_chars("=> "),
    );
    p.set_message(what.to_string());
    p
}

/// A spinner on stderr for work of unknown length (hidden with `quiet` or off a terminal).
fn spinner(quiet: bool, what: &str) -> ProgressBar {
    if quiet {
        return ProgressBar::hidden();
    }
    let p = ProgressBar::with_draw_target(None, ProgressDrawTarget::stderr());
    p.set_style(
        ProgressStyle::with_template("{spinner} {msg}, {elapsed}").expect("valid template"),
    );
    p.set_message(what.to_string());
    p.enable_steady_tick(std::time::Duration::from_millis(200));
    p
}

fn pool(jobs: Option<usize>) -> Result<rayon::ThreadPool, Error> {
    let mut b = rayon::ThreadPoolBuilder::new();
    if let Some(n) = jobs {
        if n == 0 {
            return Err(Error::Input("--jobs must be at least 1".into()));
        }
        b = b.num_threads(n);
    }
    b.build()
        .map_err(|e| Error::Input(format!("cannot start worker threads: {e}")))
}

fn refuse_existing(path: &Path, force: bool) -> Result<(), Error> {
    if path.exists() && !force {
        return Err(Error::Io(format!(
            "{} already exists; pass --force to overwrite it",
            path.display()
        )));
    }
    Ok(())
}

/// A new, empty, private directory under the system's temporary directory. It is created
/// here (never reused), so nothing planted beforehand can redirect what is written in it.
fn fresh_temp_dir() -> Result<PathBuf, Error> {
    use std::os::unix::fs::DirBuilderExt;
    let base = std::env::temp_dir();
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.subsec_nanos());
    for k in 0..100u32 {
        let dir = base.join(format!(
            "qorbits-rebuild-{}-{nanos:x}-{k}",
            std::process::id()
        ));
        match std::fs::DirBuilder::new().mode(0o700).create(&dir) {
            Ok(()) => return Ok(dir),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => continue,
            Err(e) => {
                return Err(Error::Io(format!(
                    "cannot create a directory for the rebuild in {}: {e}",
                    base.display()
                )))
            }
        }
    }
    Err(Error::Io(format!(
        "cannot create a fresh directory for the rebuild in {}",
        base.display()
    )))
}

fn build(
    params: &Params,
    out: &Path,
    jobs: Option<usize>,
    force: bool,
    quiet: bool,
) -> Result<(), Error> {
    let manifest_path = default_manifest_path(out);
    refuse_existing(out, force)?;
    refuse_existing(&manifest_path, force)?;
    let bar = progress_bar(quiet, "enumerating");
    let rows = pool(jobs)?.install(|| enumerate_classes(params, Some(&bar)))?;
    bar.finish_and_clear();
    write_table(out, params, &rows.rows, force)?;
    let m = manifest_for(out)?;
    write_manifest(&manifest_path, &m, force)?;
    println!("wrote {} ({} classes)", out.display(), rows.rows.len());
    println!("wrote {}", manifest_path.display());
    println!("content sha256 {}", m.content_sha256);
    Ok(())
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
            let out = out.unwrap_or_else(|| PathBuf::from(report::default_file_name(&params)));
            build(&params, &out, jobs, force, quiet)?;
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
                    let man = read_manifest(&m)?;
                    let params = Params {
                        height: man.parameters.height,
                        include_reducible: man.parameters.include_reducible,
                    };
                    // The rebuild goes into a directory made fresh for it, under a fixed
                    // name: nothing from the manifest becomes part of a path.
                    let dir = fresh_temp_dir()?;
                    let out = dir.join("rebuild.sqlite");
                    let result =
                        build(&params, &out, jobs, false, quiet).map(|()| verify(&out, &man));
                    let _ = std::fs::remove_dir_all(&dir);
                    result?
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
            let failed = checks.iter().filter(|c| !c.ok).count();
            for c in &checks {
                println!(
                    "{} {:<22} {}",
                    if c.ok { "ok  " } else { "FAIL" },
                    c.name,
                    c.detail
                );
            }
            if failed == 0 {
                println!("verified: all {} checks passed", checks.len());
            } else {
                println!("verification FAILED: {failed} of {} checks", checks.len());
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
            let (i, j) = (parse_int("I", &i)?, parse_int("J", &j)?);
            if let Some(why) = qorbits::by_invariants::refusal(&i, &j) {
                return Err(Error::Input(why));
            }
            let h4 = qorbits::form::invariants_from_ij(i.clone(), j.clone())
                .expect("eligible pair")
                .h4;
            // Answer from the table when it covers (I, J) (and the classes asked for);
            // otherwise compute them directly from the invariants.
            let mut from_table = None;
            if let Some(db) = &db {
                let conn = open_table(db)?;
                let params = table_params(&conn)?;
                let covers =
                    h4 < 4 * params.height && (params.include_reducible || !include_reducible);
                if covers {
                    let (a, b) = (
                        i.to_i64().expect("below the bound"),
                        j.to_i64().expect("below the bound"),
                    );
                    from_table = Some(classes_with_invariants(&conn, a, b)?);
                } else {
                    eprintln!(
                        "qorbits: {} does not cover (I, J) = ({i}, {j}) (H = {}); computing from the invariants",
                        db.display(),
                        height_decimal(&h4)
                    );
                }
            }
            let mut rows = match from_table {
                Some(rows) => rows,
                None => {
                    let wait = spinner(quiet, &format!("classes with I = {i}, J = {j}"));
                    let rows =
                        qorbits::by_invariants::classes_with_invariants(&i, &j, include_reducible);
                    wait.finish_and_clear();
                    rows?
                }
            };
            if !include_reducible {
                rows.retain(|r| r.galois.is_some());
            }
            if els {
                rows.retain(|r| r.els());
            }
            if over_q {
                rows.retain(ClassRow::first_over_q);
            }
            if count {
                println!("{}", rows.len());
                return Ok(ExitCode::SUCCESS);
            }
            print!(
                "{}",
                report::render_rows(
                    &rows,
                    if json {
                        report::Format::Json
                    } else if csv {
                        report::Format::Csv
                    } else {
                        report::Format::Text
                    }
                )
            );
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
                        c.push(parse_int(name, v)?);
                    }
                    Curve::new(c.try_into().expect("five coefficients"))?
                }
                (None, Some(s)) => Curve::short(parse_int("A", &s[0])?, parse_int("B", &s[1])?)?,
                (None, None) => unreachable!("clap requires --ainvs or --short"),
            };
            let (i, j) = curve.quartic_invariants();
            let wait = spinner(quiet, &format!("classes with I = {i}, J = {j}"));
            let s = two_selmer(&curve);
            wait.finish_and_clear();
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
            let bar = progress_bar(quiet, "curves");
            let stats = pool(jobs)?.install(|| selmer_stats(y, Some(&bar)))?;
            bar.finish_and_clear();
            print!("{}", report::selmer_stats(&stats, json, curves));
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(code) => code,
        Err(e) => {
            eprintln!("qorbits: {e}");
            ExitCode::from(2)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::parse_height;

    #[test]
    fn heights_in_e_notation() {
        assert_eq!(parse_height("1e6").unwrap(), 1_000_000);
        assert_eq!(parse_height("2.5e5").unwrap(), 250_000);
        assert_eq!(parse_height("1000").unwrap(), 1000);
        assert_eq!(parse_height("1E8").unwrap(), 100_000_000);
        for bad in ["1.5", "-3", "0", "abc", "1e", "e5", ""] {
            assert!(parse_height(bad).is_err(), "{bad}");
        }
    }
}
