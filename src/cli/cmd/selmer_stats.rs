//! `qorbits selmer-stats`: the average size of the 2-Selmer group over the family of short
//! Weierstrass curves below a height, by height bins.

use crate::cmd::{guard_long, Jobs};
use crate::out::emit;
use crate::progress::Bar;
use crate::render::{aligned, csv};
use qorbits::arith::parse::parse_height;
use qorbits::error::Error;
use qorbits::selmer::dataset::{check_y, dataset_targets, write_dataset};
use qorbits::selmer::{
    estimated_seconds, family_selmer, family_statement, selmer_stats, stats_from_groups, SelmerBin,
    SelmerStats,
};
use qorbits::table::atomic::check_target;
use qorbits::table::json;
use serde_json::Value;

/// Average size of the 2-Selmer group over the curves y^2 = x^3 + A x + B of height
/// max(4|A|^3, 27B^2) below Y (non-singular, minimal, x^3 + A x + B without a rational root).
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits selmer-stats --height 1e4\n  qorbits selmer-stats --height 1e5 --json --curves\n  qorbits selmer-stats --height 1e5 --plot avg.svg\n  qorbits selmer-stats --height 1e5 --out curves.sqlite"
)]
pub struct Args {
    /// The height bound Y (e.g. 1e4).
    #[arg(long, allow_hyphen_values = true)]
    height: String,
    #[command(flatten)]
    jobs: Jobs,
    /// Print one JSON object instead of text (keys in docs/output.md).
    #[arg(long, conflicts_with = "csv")]
    json: bool,
    /// CSV: one row per height bin (with --curves: one row per curve).
    #[arg(long)]
    csv: bool,
    /// Also list every curve with its 2-Selmer rank (text: after the table).
    #[arg(long)]
    curves: bool,
    /// Run work estimated to take longer than the limit (see the estimate printed).
    #[arg(long)]
    allow_long: bool,
    /// No estimate and no progress bar.
    #[arg(long)]
    quiet: bool,
    /// Also draw the average against Y, with the published limit 3, into this SVG file.
    #[arg(long, value_name = "FILE")]
    plot: Option<std::path::PathBuf>,
    /// Also write every curve and 2-Selmer element into this SQLite file, with its
    /// manifest beside it (curves.sqlite -> curves.manifest.json; docs/output.md).
    #[arg(long, value_name = "FILE")]
    out: Option<std::path::PathBuf>,
    /// Replace existing --plot and --out files (and the manifest of --out).
    #[arg(long)]
    force: bool,
}

fn average(b: &SelmerBin) -> Value {
    if b.curves == 0 {
        Value::Null
    } else {
        Value::from(b.average())
    }
}

fn bin_json(b: &SelmerBin) -> Value {
    json::object(vec![
        ("from", json::int(&b.lo.into())),
        ("below", json::int(&b.hi.into())),
        ("curve_count", Value::from(b.curves)),
        ("selmer_total", Value::from(b.total)),
        ("average", average(b)),
        ("curves_by_rank", Value::from(b.by_rank.clone())),
    ])
}

pub fn run(a: Args) -> Result<(), Error> {
    let y = parse_height(&a.height)?;
    let threads = a.jobs.run(|| Ok(rayon::current_num_threads()))? as f64;
    guard_long(
        &format!("the 2-Selmer groups of the curves below {y}"),
        estimated_seconds(y) / threads,
        a.allow_long,
        a.quiet,
    )?;
    // Every output is checked before any work, so a long run never ends refused.
    if let Some(file) = &a.out {
        check_y(y)?;
        dataset_targets(file, a.force)?;
    }
    if let Some(file) = &a.plot {
        check_target(file, a.force)?;
    }
    let bar = Bar::new(a.quiet);
    let st = match &a.out {
        None => a.jobs.run(|| selmer_stats(y, &bar))?,
        Some(file) => {
            let groups = a.jobs.run(|| family_selmer(y, &bar))?;
            bar.finish();
            let m = write_dataset(file, y, &groups, a.force)?;
            if !a.quiet {
                eprintln!(
                    "qorbits: wrote {} ({} curves, {} elements), content sha256 {}",
                    file.display(),
                    m.counts.curves,
                    m.counts.elements,
                    m.content_sha256
                );
            }
            stats_from_groups(y, &groups)
        }
    };
    bar.finish();
    if let Some(file) = &a.plot {
        let svg = crate::plot::stats_selmer_svg(&st)?;
        qorbits::table::atomic::write_atomic(file, svg.as_bytes(), a.force)?;
    }
    emit(&if a.json {
        let mut v = json::object(vec![
            ("height", json::int(&y.into())),
            ("family", Value::from(family_statement(y))),
            ("curve_count", Value::from(st.all.curves)),
            ("selmer_total", Value::from(st.all.total)),
            ("average", average(&st.all)),
            ("curves_by_rank", Value::from(st.all.by_rank.clone())),
            ("bins", Value::Array(st.bins.iter().map(bin_json).collect())),
        ]);
        if a.curves {
            v["curves"] = Value::Array(
                st.curves
                    .iter()
                    .map(|&(a, b, r)| {
                        json::object(vec![
                            ("A", json::small(a)),
                            ("B", json::small(b)),
                            ("selmer_rank", Value::from(r)),
                        ])
                    })
                    .collect(),
            );
        }
        format!("{v}\n")
    } else if a.csv {
        csv_report(&st, a.curves)
    } else {
        text(&st, a.curves)
    });
    Ok(())
}

/// The bins (or with `curves` the curves) as records.
fn records(st: &SelmerStats, curves: bool) -> (Vec<String>, Vec<Vec<String>>) {
    if curves {
        let header = ["A", "B", "selmer_rank"].map(String::from).to_vec();
        let rows = st
            .curves
            .iter()
            .map(|(a, b, r)| vec![a.to_string(), b.to_string(), r.to_string()])
            .collect();
        return (header, rows);
    }
    let ranks = st.all.by_rank.len().max(1);
    let mut header: Vec<String> = [
        "from",
        "below",
        "curve_count",
        "selmer_total",
        "average",
        "cumulative",
    ]
    .map(String::from)
    .to_vec();
    header.extend((0..ranks).map(|r| format!("rank_{r}")));
    let (mut n, mut t) = (0u64, 0u64);
    let rows = st
        .bins
        .iter()
        .map(|b| {
            n += b.curves;
            t += b.total;
            let mut f = vec![
                b.lo.to_string(),
                b.hi.to_string(),
                b.curves.to_string(),
                b.total.to_string(),
                format!("{:.4}", b.average()),
                format!("{:.4}", t as f64 / n as f64),
            ];
            f.extend((0..ranks).map(|r| b.by_rank.get(r).copied().unwrap_or(0).to_string()));
            f
        })
        .collect();
    (header, rows)
}

fn csv_report(st: &SelmerStats, curves: bool) -> String {
    let (header, rows) = records(st, curves);
    let h: Vec<&str> = header.iter().map(String::as_str).collect();
    csv(&h, rows)
}

fn text(st: &SelmerStats, curves: bool) -> String {
    let mut out = format!("family: {}\n", family_statement(st.height));
    if st.all.curves == 0 {
        out += "no curve of the family lies below this height\n";
        return out;
    }
    out += &format!(
        "{} curves, average size of the 2-Selmer group {:.4} (= {}/{})\n",
        st.all.curves,
        st.all.average(),
        st.all.total,
        st.all.curves
    );
    let (header, rows) = records(st, false);
    let h: Vec<&str> = header.iter().map(String::as_str).collect();
    out += &aligned(&h, &rows);
    if curves {
        let (header, rows) = records(st, true);
        let h: Vec<&str> = header.iter().map(String::as_str).collect();
        out += &aligned(&h, &rows);
    }
    out
}
