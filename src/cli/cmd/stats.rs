//! `qorbits stats`: counts of irreducible classes by number of real roots against the main
//! terms of the asymptotic count.

use crate::out::emit;
use crate::render::aligned;
use qorbits::error::Error;
use qorbits::table::json;
use qorbits::table::reader::{open_table, table_params};
use qorbits::table::stats::stats_counts;
use serde_json::Value;
use std::path::PathBuf;

/// What the main terms are, for the reader of the report.
const NOTE: &str = "main terms (4, 32, 8)/135 · ζ(2) · X^(5/6) for 4, 2 and 0 real roots (0: \
                    both definite signs together; published asymptotics, recalled from memory); \
                    the ratios tend to 1 slowly";

/// Counts by number of real roots against the asymptotic main terms.
#[derive(clap::Args, Debug)]
#[command(after_help = "Example:\n  qorbits stats --db qorbits-h1e6.sqlite --json")]
pub struct Args {
    /// The table (SQLite file).
    #[arg(long, value_name = "TABLE")]
    db: PathBuf,
    /// Print one JSON object instead of text (keys in docs/output.md).
    #[arg(long)]
    json: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let conn = open_table(&a.db)?;
    let params = table_params(&conn)?;
    let counts = stats_counts(&conn)?;
    let (n_all, m_all) = counts
        .iter()
        .fold((0u64, 0.0), |(n, m), c| (n + c.1, m + c.2));
    let ratio = |n: u64, m: f64| n as f64 / m;
    if a.json {
        let row = |real: Option<u8>, n: u64, m: f64| {
            let mut f = vec![];
            if let Some(r) = real {
                f.push(("real_roots", Value::from(r)));
            }
            f.extend([
                ("classes", json::small(n as i64)),
                ("main_term", Value::from(m)),
                ("ratio", Value::from(ratio(n, m))),
            ]);
            json::object(f)
        };
        let v = json::object(vec![
            ("height", json::int(&params.height.into())),
            ("include_reducible", Value::from(params.include_reducible)),
            (
                "by_real_roots",
                Value::Array(counts.iter().map(|c| row(Some(c.0), c.1, c.2)).collect()),
            ),
            ("all", row(None, n_all, m_all)),
            ("note", Value::from(NOTE)),
        ]);
        emit(&format!("{v}\n"));
        return Ok(());
    }
    let mut records: Vec<Vec<String>> = counts
        .iter()
        .map(|&(real, n, m)| {
            vec![
                real.to_string(),
                n.to_string(),
                format!("{m:.1}"),
                format!("{:.3}", ratio(n, m)),
            ]
        })
        .collect();
    records.push(vec![
        "all".into(),
        n_all.to_string(),
        format!("{m_all:.1}"),
        format!("{:.3}", ratio(n_all, m_all)),
    ]);
    let table = aligned(&["real roots", "classes", "main term", "ratio"], &records);
    emit(&format!(
        "irreducible classes with H < {}\n{table}{NOTE}\n",
        params.height
    ));
    Ok(())
}
