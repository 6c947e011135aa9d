//! `qorbits build`: the table of every class below a height with its manifest, in bounded
//! memory and resumable; or one shard of a cluster build.

use crate::cmd::Jobs;
use crate::out::line;
use crate::progress::Bar;
use crate::render::count;
use qorbits::arith::parse::parse_height;
use qorbits::error::Error;
use qorbits::table::build::{build_table, BuildOptions, BuildSummary};
use qorbits::table::row::Params;
use qorbits::table::shard::build_shard;
use std::path::PathBuf;

/// Build the table of every class with H < X (SQLite file and manifest), or one shard.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits build --height 1e6\n  qorbits build --height 1e9 --resume          # after an interruption\n  qorbits build --height 1e12 --shard 3/64 --out shards/s03   # one task of a job array"
)]
pub struct Args {
    /// The height bound X: the table holds the classes with H < X (e.g. 1e6).
    #[arg(long, allow_hyphen_values = true)]
    height: String,
    /// Output file (default qorbits-h<X>.sqlite, the manifest beside it); with --shard the
    /// shard directory (default qorbits-h<X>.shards/shard-K-of-N).
    #[arg(long, value_name = "PATH")]
    out: Option<PathBuf>,
    #[command(flatten)]
    jobs: Jobs,
    /// Also include the classes with a rational factor (Disc ≠ 0).
    #[arg(long)]
    include_reducible: bool,
    /// Overwrite existing output files.
    #[arg(long)]
    force: bool,
    /// Continue an interrupted build from its finished runs (same command otherwise).
    #[arg(long)]
    resume: bool,
    /// Compute only shard K of N of the build (runs and a shard manifest, for `qorbits merge`).
    #[arg(long, value_name = "K/N")]
    shard: Option<String>,
    /// Do not refuse to start when the free disk is below the estimate.
    #[arg(long)]
    ignore_disk: bool,
    /// No progress bar.
    #[arg(long)]
    quiet: bool,
}

fn parse_shard(s: &str) -> Result<(usize, usize), Error> {
    let bad = || {
        Error::Input(format!(
            "--shard '{s}' is not K/N; write e.g. 3/16 (1 ≤ K ≤ N)"
        ))
    };
    let (k, n) = s.split_once('/').ok_or_else(bad)?;
    let (k, n): (usize, usize) = (
        k.trim().parse().map_err(|_| bad())?,
        n.trim().parse().map_err(|_| bad())?,
    );
    if k == 0 || n == 0 || k > n {
        return Err(bad());
    }
    Ok((k, n))
}

/// The lines for a table found complete in place: what happened, then its content hash.
pub fn report_complete(s: &BuildSummary, what: &str) {
    line(&format!(
        "{} {what} (it verifies against {})",
        s.table.display(),
        s.manifest_path.display()
    ));
    line(&format!("content sha256 {}", s.manifest.content_sha256));
}

pub fn run(a: Args) -> Result<(), Error> {
    let params = Params {
        height: parse_height(&a.height)?,
        include_reducible: a.include_reducible,
    };
    let bar = Bar::new(a.quiet);
    if let Some(s) = &a.shard {
        let (k, n) = parse_shard(s)?;
        let stem = params.default_file_name();
        let stem = stem.trim_end_matches(".sqlite");
        let dir = a
            .out
            .unwrap_or_else(|| PathBuf::from(format!("{stem}.shards/shard-{k:04}-of-{n:04}")));
        let m = a.jobs.run(|| build_shard(&params, k, n, &dir, &bar))?;
        bar.finish();
        let rows: u64 = m.runs.iter().map(|r| r.rows).sum();
        line(&format!(
            "wrote shard {k} of {n} in {} ({} runs, {})",
            dir.display(),
            m.runs.len(),
            count(rows as usize, "class", "classes")
        ));
        return Ok(());
    }
    let out = a
        .out
        .unwrap_or_else(|| PathBuf::from(params.default_file_name()));
    let opts = BuildOptions {
        replace: a.force,
        resume: a.resume,
        skip_disk_check: a.ignore_disk,
    };
    let s = a.jobs.run(|| build_table(&params, &out, &opts, &bar))?;
    bar.finish();
    if s.complete {
        report_complete(&s, "is complete; nothing to resume");
        return Ok(());
    }
    if a.resume && s.computed < s.chunks {
        line(&format!(
            "resumed: {} of {} chunks came from the interrupted build",
            s.chunks - s.computed,
            s.chunks
        ));
    }
    line(&format!(
        "wrote {} ({})",
        s.table.display(),
        count(s.manifest.counts.classes as usize, "class", "classes")
    ));
    line(&format!("wrote {}", s.manifest_path.display()));
    line(&format!("content sha256 {}", s.manifest.content_sha256));
    Ok(())
}
