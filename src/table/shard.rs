//! Shards of a cluster build (DESIGN §7): one shard is the runs of a subset of the chunks
//! of a build's plan, balanced by the work model, in a directory with a shard manifest; the
//! merge checks that the shards form one build and merges their runs — the same merge as
//! the build on one machine, so the same bytes.

use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::table::atomic::write_atomic;
use crate::table::build::{compute_runs, plan_hash, run_file, BuildSummary};
use crate::table::commit::{
    finish_interrupted, fresh_work_dir, mark, merge_to, remove_stale_temps, MARKER,
};
use crate::table::hash::file_sha256;
use crate::table::manifest::{default_manifest_path, read_manifest};
use crate::table::merge::Run;
use crate::table::plan::{merge_bytes, plan};
use crate::table::row::Params;
use crate::table::runs::check_run;
use crate::table::space::with_need;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// The manifest of a shard: which chunks of which build it holds, with their files.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardManifest {
    /// `qorbits-shard/1`.
    pub format: String,
    /// The parameters of the build.
    pub parameters: Params,
    /// The builder version.
    pub builder: String,
    /// The SHA-256 of the plan of the build ([`plan_hash`]).
    pub plan_sha256: String,
    /// Chunks in the plan.
    pub chunks_total: usize,
    /// This shard's index, from 1.
    pub shard: usize,
    /// Shards of the build.
    pub shards: usize,
    /// The runs of this shard.
    pub runs: Vec<ShardRun>,
}

/// One run of a shard.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardRun {
    /// The chunk index.
    pub chunk: usize,
    /// The file name in the shard directory.
    pub file: String,
    /// Rows of the run.
    pub rows: u64,
    /// SHA-256 of the file.
    pub sha256: String,
}

/// The shard format tag.
pub const SHARD_FORMAT: &str = "qorbits-shard/1";

/// Builds shard `k` of `n` (from 1) of the build of `params` into the directory `dir`: the
/// runs of its chunks and `shard.json`. A shard whose manifest and files verify is not
/// recomputed; the whole runs of a partial one are kept.
pub fn build_shard(
    params: &Params,
    k: usize,
    n: usize,
    dir: &Path,
    progress: &dyn Progress,
) -> Result<ShardManifest> {
    if n == 0 || k == 0 || k > n {
        return Err(Error::Input(format!(
            "--shard {k}/{n}: give k/n with 1 ≤ k ≤ n"
        )));
    }
    if let Ok(m) = read_shard(dir) {
        if m.parameters == *params
            && m.shard == k
            && m.shards == n
            && verify_shard_files(dir, &m).is_ok()
        {
            return Ok(m);
        }
    }
    if std::fs::symlink_metadata(dir).is_err() {
        std::fs::create_dir_all(dir)
            .map_err(|e| Error::Io(format!("cannot create {}: {e}", dir.display())))?;
    }
    let empty = std::fs::read_dir(dir).is_ok_and(|mut r| r.next().is_none());
    if !empty && !dir.join(MARKER).is_file() {
        return Err(Error::Io(format!(
            "{} exists and is not a qorbits shard directory; choose another",
            dir.display()
        )));
    }
    if !dir.join(MARKER).is_file() {
        mark(dir, b"a qorbits shard keeps its runs here\n")?;
    }
    let p = plan(params, n, progress)?;
    let mine = p.shards(n).swap_remove(k - 1);
    compute_runs(&p, &mine, dir, true, progress)?;
    let runs = mine
        .iter()
        .map(|&c| {
            let f = run_file(dir, c);
            Ok(ShardRun {
                chunk: c,
                file: f
                    .file_name()
                    .expect("a file")
                    .to_string_lossy()
                    .into_owned(),
                rows: check_run(&f, c as u32, params)?,
                sha256: file_sha256(&f)?,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    let m = ShardManifest {
        format: SHARD_FORMAT.into(),
        parameters: *params,
        builder: env!("CARGO_PKG_VERSION").into(),
        plan_sha256: plan_hash(&p),
        chunks_total: p.chunks.len(),
        shard: k,
        shards: n,
        runs,
    };
    let mut json = serde_json::to_string_pretty(&m).expect("manifests serialise");
    json.push('\n');
    write_atomic(&dir.join("shard.json"), json.as_bytes(), true)?;
    Ok(m)
}

/// The shard manifest of a directory, checked for plausibility (it is untrusted input).
pub fn read_shard(dir: &Path) -> Result<ShardManifest> {
    let f = dir.join("shard.json");
    let text = std::fs::read_to_string(&f).map_err(|e| {
        Error::Io(format!(
            "{} is not a finished shard: cannot read {}: {e}",
            dir.display(),
            f.display()
        ))
    })?;
    let m: ShardManifest = serde_json::from_str(&text).map_err(|e| {
        Error::Input(format!(
            "{} is not a qorbits shard manifest: {e}",
            f.display()
        ))
    })?;
    let plain = |s: &str| crate::table::manifest::check_file_name(s).is_ok() && s.ends_with(".run");
    if m.format != SHARD_FORMAT
        || m.shard == 0
        || m.shard > m.shards
        || m.runs
            .iter()
            .any(|r| !plain(&r.file) || r.chunk >= m.chunks_total)
    {
        return Err(Error::Input(format!(
            "{} is not a valid qorbits shard manifest",
            f.display()
        )));
    }
    Ok(m)
}

/// Checks every run file of a shard against its manifest (hash and contents).
fn verify_shard_files(dir: &Path, m: &ShardManifest) -> Result<()> {
    for r in &m.runs {
        let f = dir.join(&r.file);
        if file_sha256(&f)? != r.sha256 {
            return Err(Error::Database(format!(
                "{}: the run {} does not match its shard manifest",
                dir.display(),
                r.file
            )));
        }
    }
    Ok(())
}

/// The work directory of a merge into `out`: `.NAME.merge` beside it.
fn work_of(out: &Path) -> PathBuf {
    let dir = match out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    dir.join(format!(
        ".{}.merge",
        out.file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default()
    ))
}

/// Checks that the shard directories form one complete build (same parameters, builder and
/// plan; each shard index exactly once; every chunk exactly once; every file's hash) and
/// merges them into the table at `out` and its manifest — the bytes the unsharded build
/// writes. Errors name the shard that is missing, foreign or damaged. A merge of the same
/// shards that a kill interrupted between the manifest and the table is completed
/// ([`finish_interrupted`]); a write that finds no room fails with
/// [`Error::NoSpace`](crate::error::Error::NoSpace), leaving nothing at `out`.
pub fn merge_shards(
    dirs: &[PathBuf],
    out: &Path,
    replace: bool,
    progress: &dyn Progress,
) -> Result<BuildSummary> {
    let manifest_path = default_manifest_path(out);
    let finished = finish_interrupted(out)?;
    for target in [out, manifest_path.as_path()] {
        // Neither output may be a directory, a link or (unless replacing) a file:
        // checked before any work, so a build never stops with its manifest refused.
        if !finished {
            crate::table::atomic::check_target(target, replace)?;
        }
    }
    let shards = dirs
        .iter()
        .map(|d| read_shard(d))
        .collect::<Result<Vec<_>>>()?;
    let first = shards
        .first()
        .ok_or_else(|| Error::Input("give at least one shard directory".into()))?;
    let mut seen = vec![false; first.shards];
    let mut chunks = vec![None; first.chunks_total];
    for (d, m) in dirs.iter().zip(&shards) {
        let same = m.parameters == first.parameters
            && m.builder == first.builder
            && m.plan_sha256 == first.plan_sha256
            && m.shards == first.shards
            && m.chunks_total == first.chunks_total;
        if !same {
            return Err(Error::Input(format!(
                "{} is a shard of another build (parameters, builder version or plan differ from {})",
                d.display(),
                dirs[0].display()
            )));
        }
        if m.builder != env!("CARGO_PKG_VERSION") {
            return Err(Error::Input(format!(
                "{} was built by qorbits {}; merge it with that version",
                d.display(),
                m.builder
            )));
        }
        if std::mem::replace(&mut seen[m.shard - 1], true) {
            return Err(Error::Input(format!(
                "{}: shard {} of {} is given twice",
                d.display(),
                m.shard,
                m.shards
            )));
        }
        verify_shard_files(d, m)?;
        for r in &m.runs {
            if chunks[r.chunk]
                .replace(Run {
                    chunk: r.chunk as u32,
                    path: d.join(&r.file),
                })
                .is_some()
            {
                return Err(Error::Input(format!(
                    "{}: chunk {} is in two shards",
                    d.display(),
                    r.chunk
                )));
            }
        }
    }
    if let Some(k) = seen.iter().position(|s| !s) {
        return Err(Error::Input(format!(
            "shard {} of {} is missing; give every shard directory",
            k + 1,
            first.shards
        )));
    }
    let runs = chunks
        .into_iter()
        .enumerate()
        .map(|(k, r)| {
            r.ok_or_else(|| {
                Error::Input(format!(
                    "chunk {k} is in no shard: the shards are incomplete"
                ))
            })
        })
        .collect::<Result<Vec<_>>>()?;
    if finished {
        // The table now in place is the one a killed merge wrote: of these shards?
        let manifest = read_manifest(&manifest_path)?;
        if manifest.parameters != first.parameters || manifest.versions.builder != first.builder {
            return Err(Error::Exists(out.to_path_buf()));
        }
        remove_stale_temps(out);
        crate::table::commit::remove_work_dir(&work_of(out));
        return Ok(BuildSummary {
            table: out.to_path_buf(),
            manifest_path,
            manifest,
            computed: 0,
            chunks: first.chunks_total,
            candidates: 0,
            complete: true,
        });
    }
    let rows: u64 = shards.iter().flat_map(|m| &m.runs).map(|r| r.rows).sum();
    let need = merge_bytes(rows, runs.len());
    let work = work_of(out);
    let params = first.parameters;
    let candidates = 0;
    let result = fresh_work_dir(&work)
        .and_then(|()| merge_to(runs, &params, &work, out, replace, true, progress));
    crate::table::commit::remove_work_dir(&work);
    let (manifest, manifest_path) = result.map_err(|e| with_need(e, "the merge", need))?;
    Ok(BuildSummary {
        table: out.to_path_buf(),
        manifest_path,
        manifest,
        computed: 0,
        chunks: first.chunks_total,
        candidates,
        complete: false,
    })
}
