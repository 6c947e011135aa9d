//! `qorbits build`: the table of every class below a height, with its manifest.

use crate::cmd::Jobs;
use crate::out::line;
use crate::progress::Bar;
use qorbits::arith::parse::parse_height;
use qorbits::error::Error;
use qorbits::table::pipeline::build;
use qorbits::table::row::Params;
use std::path::PathBuf;

/// Build the table of every class with H < X (SQLite file and manifest).
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Example:\n  qorbits build --height 1e6\n  qorbits build --height 1e7 --out t.sqlite --jobs 2"
)]
pub struct Args {
    /// The height bound X: the table holds the classes with H < X (e.g. 1e6).
    #[arg(long, allow_hyphen_values = true)]
    height: String,
    /// Output file (default qorbits-h<X>.sqlite, the manifest beside it).
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    #[command(flatten)]
    jobs: Jobs,
    /// Also include the classes with a rational factor (Disc ≠ 0).
    #[arg(long)]
    include_reducible: bool,
    /// Overwrite existing output files.
    #[arg(long)]
    force: bool,
    /// No progress bar.
    #[arg(long)]
    quiet: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let params = Params {
        height: parse_height(&a.height)?,
        include_reducible: a.include_reducible,
    };
    let out = a
        .out
        .unwrap_or_else(|| PathBuf::from(params.default_file_name()));
    let bar = Bar::new(a.quiet);
    let s = a.jobs.run(|| build(&params, &out, a.force, &bar))?;
    bar.finish();
    line(&format!(
        "wrote {} ({})",
        s.table.display(),
        crate::render::count(s.manifest.counts.classes as usize, "class", "classes")
    ));
    line(&format!("wrote {}", s.manifest_path.display()));
    line(&format!("content sha256 {}", s.manifest.content_sha256));
    Ok(())
}
