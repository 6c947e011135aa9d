//! `qorbits plan`: what a build will take (classes, time, disk, memory) before it starts,
//! and the Slurm job array that runs it as shards with a dependent merge.

use crate::cmd::{duration, Jobs};
use crate::out::emit;
use crate::progress::Bar;
use qorbits::arith::parse::parse_height;
use qorbits::error::Error;
use qorbits::table::plan::{plan, Estimate, Plan, MODEL};
use qorbits::table::row::Params;
use std::fmt::Write;
use std::path::{Path, PathBuf};

/// Plan a build: expected classes, time, disk and memory; optionally the Slurm scripts of a
/// sharded build (a job array of shards and a merge that depends on it).
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits plan --height 1e10\n  qorbits plan --height 1e12 --shards 64 --slurm run-1e12 --partition compute --cpus 16"
)]
pub struct Args {
    /// The height bound X.
    #[arg(long, allow_hyphen_values = true)]
    height: String,
    /// Also the classes with a rational factor.
    #[arg(long)]
    include_reducible: bool,
    #[command(flatten)]
    jobs: Jobs,
    /// Split the build into this many shards (a Slurm job array with --slurm).
    #[arg(long, value_name = "N")]
    shards: Option<usize>,
    /// Write the Slurm scripts of the sharded build into this directory.
    #[arg(long, value_name = "DIR", requires = "shards")]
    slurm: Option<PathBuf>,
    /// Cores per array task (default 4).
    #[arg(long, value_name = "N", default_value_t = 4)]
    cpus: usize,
    /// Slurm partition (passed through as --partition).
    #[arg(long)]
    partition: Option<String>,
    /// Slurm account (passed through as --account).
    #[arg(long)]
    account: Option<String>,
    /// No progress bar while the chunks are counted.
    #[arg(long)]
    quiet: bool,
}

fn gb(bytes: f64) -> String {
    if bytes < 1e9 {
        format!("{:.0} MB", bytes / 1e6)
    } else {
        format!("{:.1} GB", bytes / 1e9)
    }
}

/// Slurm's time format, `D-HH:MM:SS`.
fn slurm_time(seconds: f64) -> String {
    let s = seconds.ceil() as u64;
    format!(
        "{}-{:02}:{:02}:{:02}",
        s / 86_400,
        s / 3600 % 24,
        s / 60 % 60,
        s % 60
    )
}

pub fn run(a: Args) -> Result<(), Error> {
    let params = Params {
        height: parse_height(&a.height)?,
        include_reducible: a.include_reducible,
    };
    let bar = Bar::new(a.quiet);
    let threads = a.jobs.run(|| Ok(rayon::current_num_threads()))?;
    let p = a.jobs.run(|| plan(&params, a.shards.unwrap_or(1), &bar))?;
    bar.finish();
    let e = p.estimate(None, threads, &MODEL);
    let mut out = String::new();
    writeln!(
        out,
        "build of every {} class with H < {}",
        if params.include_reducible {
            ""
        } else {
            "irreducible"
        },
        params.height
    )
    .expect("string");
    let rows = [
        ("chunks", p.chunks.len().to_string()),
        ("candidates", format!("{} (counted)", p.candidates())),
        ("classes", format!("about {:.3e}", e.classes)),
        (
            "time",
            format!("about {} on {threads} cores", duration(e.seconds)),
        ),
        ("table", format!("about {}", gb(e.table_bytes))),
        (
            "disk",
            format!("about {} at the peak (table and runs)", gb(e.disk_bytes)),
        ),
        (
            "memory",
            format!("about {} at the peak", gb(e.memory_bytes)),
        ),
    ];
    for (k, v) in rows {
        writeln!(out, "{k:<12}{v}").expect("string");
    }
    writeln!(
        out,
        "(model: qorbits::table::plan::MODEL, calibrated on the measured builds of 1e8 and 1e9)"
    )
    .expect("string");
    if let Some(n) = a.shards {
        if n == 0 {
            return Err(Error::Input("--shards must be at least 1".into()));
        }
        let shards = p.shards(n);
        let work = p.work();
        let loads: Vec<f64> = shards
            .iter()
            .map(|s| s.iter().map(|&k| work[k]).sum())
            .collect();
        let big = (0..n)
            .max_by(|&i, &j| loads[i].total_cmp(&loads[j]))
            .unwrap_or(0);
        let mean = loads.iter().sum::<f64>() / n as f64;
        let one = p.estimate(Some(&shards[big]), a.cpus, &MODEL);
        writeln!(
            out,
            "shards      {n}: the largest is {:.3}× the mean work, about {} on {} cores",
            loads[big] / mean.max(1.0),
            duration(one.seconds),
            a.cpus
        )
        .expect("string");
        if let Some(dir) = &a.slurm {
            write_slurm(dir, &params, &p, n, &one, &a)?;
            writeln!(out, "slurm       wrote {0}/shards.sbatch, {0}/merge.sbatch and {0}/submit.sh; run: bash {0}/submit.sh", dir.display()).expect("string");
        }
    }
    emit(&out);
    Ok(())
}

fn write_slurm(
    dir: &Path,
    params: &Params,
    p: &Plan,
    n: usize,
    task: &Estimate,
    a: &Args,
) -> Result<(), Error> {
    std::fs::create_dir_all(dir)
        .map_err(|e| Error::Io(format!("cannot create {}: {e}", dir.display())))?;
    let dir = dir
        .canonicalize()
        .map_err(|e| Error::Io(format!("cannot resolve {}: {e}", dir.display())))?;
    let exe = std::env::current_exe()
        .map_err(|e| Error::Io(format!("cannot find the qorbits binary: {e}")))?;
    let all = p.estimate(None, a.cpus, &MODEL);
    // Generous limits: twice the estimate, at least ten minutes; memory and local disk
    // with a margin of half.
    let time = slurm_time((2.0 * task.seconds).max(600.0));
    let mem_mb = (1.5 * task.memory_bytes / 1e6).ceil() as u64;
    let merge_time = slurm_time((2.0 * all.classes * 4e-6).max(600.0));
    let merge_mem = (1.5 * 1.5e9 / 1e6) as u64;
    let mut extra = String::new();
    if let Some(part) = &a.partition {
        writeln!(extra, "#SBATCH --partition={part}").expect("string");
    }
    if let Some(acc) = &a.account {
        writeln!(extra, "#SBATCH --account={acc}").expect("string");
    }
    let reducible = if params.include_reducible {
        " --include-reducible"
    } else {
        ""
    };
    let table = dir.join(params.default_file_name());
    let shards = format!(
        "#!/bin/bash\n# The shards of the build of H < {h}: one task of the array per shard.\n\
         #SBATCH --job-name=qorbits-shards\n#SBATCH --array=1-{n}\n#SBATCH --cpus-per-task={cpus}\n\
         #SBATCH --mem={mem_mb}M\n#SBATCH --time={time}\n#SBATCH --output={d}/logs/shard-%a.log\n{extra}\
         set -euo pipefail\nQORBITS=\"${{QORBITS:-{exe}}}\"\nk=$SLURM_ARRAY_TASK_ID\n\
         \"$QORBITS\" build --height {h}{reducible} --shard \"$k/{n}\" --out \"{d}/shards/shard-$(printf %04d \"$k\")-of-{n:04}\" --jobs \"${{SLURM_CPUS_PER_TASK:-{cpus}}}\" --quiet\n",
        h = params.height,
        cpus = a.cpus,
        d = dir.display(),
        exe = exe.display(),
    );
    let merge = format!(
        "#!/bin/bash\n# The merge of the shards into the table and its manifest (after every shard).\n\
         #SBATCH --job-name=qorbits-merge\n#SBATCH --cpus-per-task={cpus}\n#SBATCH --mem={merge_mem}M\n\
         #SBATCH --time={merge_time}\n#SBATCH --output={d}/logs/merge.log\n{extra}\
         set -euo pipefail\nQORBITS=\"${{QORBITS:-{exe}}}\"\n\
         \"$QORBITS\" merge \"{d}\"/shards/shard-*-of-{n:04} --out \"{t}\" --jobs \"${{SLURM_CPUS_PER_TASK:-{cpus}}}\" --quiet\n\
         \"$QORBITS\" verify --db \"{t}\"\n",
        cpus = a.cpus,
        d = dir.display(),
        exe = exe.display(),
        t = table.display(),
    );
    let submit = format!(
        "#!/bin/bash\n# Submits the shards as a job array and the merge after them (afterok). To redo failed\n\
         # shards only: sbatch --array=K1,K2 {d}/shards.sbatch, then submit merge.sbatch again\n\
         # with --dependency=afterok:<that job id>.\n\
         set -euo pipefail\nmkdir -p \"{d}/logs\" \"{d}/shards\"\n\
         array=$(sbatch --parsable \"{d}/shards.sbatch\")\n\
         merge=$(sbatch --parsable --dependency=afterok:\"${{array%%;*}}\" \"{d}/merge.sbatch\")\n\
         echo \"shards: job $array; merge: job $merge\"\n",
        d = dir.display(),
    );
    for (name, text) in [
        ("shards.sbatch", shards),
        ("merge.sbatch", merge),
        ("submit.sh", submit),
    ] {
        qorbits::table::atomic::write_atomic(&dir.join(name), text.as_bytes(), true)?;
    }
    Ok(())
}
