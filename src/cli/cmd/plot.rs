//! `qorbits plot`: the counts of a table by signature against X, with the main terms of
//! the asymptotic count and the ratios, as an SVG picture.

use crate::plot::table_counts_svg;
use qorbits::error::Error;
use qorbits::table::atomic::write_atomic;
use qorbits::table::reader::open_table;
use std::path::PathBuf;

/// Draw the counts of a table by number of real roots against X (log axes), with the main
/// terms of the asymptotic count and a panel of their ratios, as SVG.
#[derive(clap::Args, Debug)]
#[command(after_help = "Example:\n  qorbits plot --db qorbits-h1e6.sqlite --out counts.svg")]
pub struct Args {
    /// The SVG file to write.
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    /// The table to draw (SQLite file).
    #[arg(long, value_name = "TABLE")]
    db: PathBuf,
    /// Replace an existing file.
    #[arg(long)]
    force: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let svg = table_counts_svg(&open_table(&a.db)?)?;
    write_atomic(&a.out, svg.as_bytes(), a.force)
}
