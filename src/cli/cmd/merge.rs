//! `qorbits merge`: the shards of a cluster build into the table and manifest that one
//! machine would have written.

use crate::cmd::Jobs;
use crate::out::line;
use crate::progress::Bar;
use crate::render::count;
use qorbits::error::Error;
use qorbits::table::shard::merge_shards;
use std::path::PathBuf;

/// Merge the shards of a build (each a directory written by `build --shard K/N`) into the
/// table and its manifest.
#[derive(clap::Args, Debug)]
#[command(after_help = "Example:\n  qorbits merge shards/shard-* --out qorbits-h1e12.sqlite")]
pub struct Args {
    /// The shard directories, every shard of the build exactly once.
    #[arg(required = true, value_name = "SHARD_DIR")]
    shards: Vec<PathBuf>,
    /// The table to write (its manifest beside it).
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    #[command(flatten)]
    jobs: Jobs,
    /// Overwrite existing output files.
    #[arg(long)]
    force: bool,
    /// No progress bar.
    #[arg(long)]
    quiet: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let bar = Bar::new(a.quiet);
    let s = a
        .jobs
        .run(|| merge_shards(&a.shards, &a.out, a.force, &bar))?;
    bar.finish();
    if s.complete {
        crate::cmd::build::report_complete(&s, "is in place: the interrupted merge is finished");
        return Ok(());
    }
    line(&format!(
        "wrote {} ({}) from {} shards",
        s.table.display(),
        count(s.manifest.counts.classes as usize, "class", "classes"),
        a.shards.len()
    ));
    line(&format!("wrote {}", s.manifest_path.display()));
    line(&format!("content sha256 {}", s.manifest.content_sha256));
    Ok(())
}
