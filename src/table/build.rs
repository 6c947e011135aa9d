//! The build of a table in bounded memory, resumable, on one machine or as shards of a
//! cluster (DESIGN §5, §7): plan the chunks ([`crate::table::plan`]), classify each chunk
//! into a sorted run ([`crate::table::runs`]), merge the runs into the table
//! ([`crate::table::merge`]), write the manifest, rename the table into place.
//!
//! A build keeps its runs in a work directory beside the table (`.NAME.work/`), marked as
//! ours and holding the plan. Killed at any point and restarted with `resume`, it keeps the
//! runs that are whole and ends with the same bytes (a table already complete is verified
//! and kept); without `resume` leftovers are removed. The table appears at its name only
//! when it is complete and its manifest stands beside it ([`crate::table::commit`]). A
//! write that finds no room fails with [`Error::NoSpace`]: the partial files are removed,
//! the whole runs kept for `resume` and named in the error. A shard
//! ([`crate::table::shard`]) is the same work for a subset of the chunks.

use crate::enumerate::bounds::Bounds;
use crate::error::{bytes_text, Error, Kept, Result};
use crate::form::Form;
use crate::progress::Progress;
use crate::table::atomic::{check_target, write_atomic};
use crate::table::classify::{classify, Annotation};
pub(crate) use crate::table::commit::MARKER;
use crate::table::commit::{
    finish_interrupted, fresh_work_dir, merge_to, remove_stale_temps, remove_work_dir,
};
use crate::table::hash::hex;
use crate::table::manifest::{default_manifest_path, read_manifest, verify, Manifest};
use crate::table::merge::Run;
use crate::table::plan::{plan, Plan, MODEL};
use crate::table::row::{ClassRow, Params};
use crate::table::runs::{check_run, write_run};
pub use crate::table::space::free_bytes;
use crate::table::space::with_need;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::path::{Path, PathBuf};

/// How to build.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct BuildOptions {
    /// Replace an existing table and manifest.
    pub replace: bool,
    /// Keep the whole runs of an interrupted build with the same parameters; a table that
    /// is already complete (it verifies against its manifest) is kept as it is.
    pub resume: bool,
    /// Do not check the free disk against the estimate.
    pub skip_disk_check: bool,
}

/// What a build wrote.
#[derive(Clone, Debug)]
pub struct BuildSummary {
    /// The table file.
    pub table: PathBuf,
    /// Its manifest, beside it.
    pub manifest_path: PathBuf,
    /// The manifest.
    pub manifest: Manifest,
    /// Chunks computed now (the others came from an interrupted build).
    pub computed: usize,
    /// Chunks of the plan.
    pub chunks: usize,
    /// Candidates examined by the loops.
    pub candidates: u64,
    /// The table was already complete: a resumed build found it in place and verified
    /// (perhaps after finishing a commit a kill had interrupted); nothing was computed.
    pub complete: bool,
}

/// The SHA-256 of the plan (its JSON), which names one build among all others.
pub fn plan_hash(p: &Plan) -> String {
    hex(&Sha256::digest(
        serde_json::to_vec(p).expect("plans serialise"),
    ))
}

pub(crate) fn run_file(dir: &Path, chunk: usize) -> PathBuf {
    dir.join(format!("chunk-{chunk:06}.run"))
}

/// The plan of the work directory, when it is one for these parameters and this builder.
fn saved_plan(dir: &Path, params: &Params) -> Option<Plan> {
    if !dir.join(MARKER).is_file() {
        return None;
    }
    let text = std::fs::read_to_string(dir.join("plan.json")).ok()?;
    let saved: SavedPlan = serde_json::from_str(&text).ok()?;
    (saved.builder == env!("CARGO_PKG_VERSION") && saved.plan.params == *params)
        .then_some(saved.plan)
}

#[derive(Serialize, Deserialize)]
struct SavedPlan {
    builder: String,
    plan: Plan,
}

/// The classified rows of one chunk of the plan.
fn chunk_rows(p: &Plan, k: usize, bounds: &Bounds) -> Result<Vec<ClassRow>> {
    let what = Annotation {
        include_reducible: p.params.include_reducible,
        with_local: true,
    };
    let mut rows = Vec::new();
    let mut failure = None;
    for seg in &p.chunks[k].segments {
        seg.chunk().for_each(bounds, |c| {
            if failure.is_some() {
                return;
            }
            match classify(&Form::new(c.map(i128::from)), what) {
                Ok(Some(r)) => rows.push(r),
                Ok(None) => {}
                Err(e) => failure = Some(e),
            }
        });
    }
    match failure {
        Some(e) => Err(e),
        None => Ok(rows),
    }
}

/// Computes the runs of the chunks `todo` of the plan into `dir` (skipping those whose run
/// is whole when `keep` is set); returns how many were computed.
pub(crate) fn compute_runs(
    p: &Plan,
    todo: &[usize],
    dir: &Path,
    keep: bool,
    progress: &dyn Progress,
) -> Result<usize> {
    let bounds = Bounds::for_height(p.params.height)?;
    let work: u64 = todo.iter().map(|&k| p.chunks[k].candidates).sum();
    progress.start("enumerating", work);
    let done: Vec<bool> = todo
        .par_iter()
        .map(|&k| {
            let file = run_file(dir, k);
            if keep && check_run(&file, k as u32, &p.params).is_ok() {
                progress.advance(p.chunks[k].candidates);
                return Ok(false);
            }
            let mut rows = chunk_rows(p, k, &bounds)?;
            write_run(&file, k as u32, &p.params, &mut rows)?;
            progress.advance(p.chunks[k].candidates);
            Ok(true)
        })
        .collect::<Result<_>>()?;
    Ok(done.into_iter().filter(|d| *d).count())
}

/// The directory and file name of `out`, and its work directory `.NAME.work` beside it.
fn places(out: &Path) -> Result<(PathBuf, PathBuf)> {
    let name = out.file_name().ok_or_else(|| {
        Error::Input(format!(
            "{} is not a file name; give a path like dir/table.sqlite",
            out.display()
        ))
    })?;
    let dir = match out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let work = dir.join(format!(".{}.work", name.to_string_lossy()));
    Ok((dir, work))
}

/// The summary of a table already complete at `out` — both files regular, the manifest's
/// parameters these, every check of `verify` passed — after removing the leftovers of the
/// build that wrote it; `None` otherwise.
fn already_built(params: &Params, out: &Path, work: &Path) -> Result<Option<BuildSummary>> {
    let manifest_path = default_manifest_path(out);
    let plain = |p: &Path| std::fs::symlink_metadata(p).is_ok_and(|m| m.is_file());
    if !plain(out) || !plain(&manifest_path) {
        return Ok(None);
    }
    let Ok(manifest) = read_manifest(&manifest_path) else {
        return Ok(None);
    };
    if manifest.parameters != *params
        || !verify(out, &manifest).is_ok_and(|c| c.iter().all(|c| c.ok))
    {
        return Ok(None);
    }
    remove_work_dir(work);
    remove_stale_temps(out);
    Ok(Some(BuildSummary {
        table: out.to_path_buf(),
        manifest_path,
        manifest,
        computed: 0,
        chunks: 0,
        candidates: 0,
        complete: true,
    }))
}

/// After a write found no room: the need of the build and, when whole runs are left, the
/// work directory kept for resuming (intermediate runs and temporary files removed);
/// without whole runs the work directory is removed.
fn keep_for_resume(e: Error, work: &Path, need: Option<f64>) -> Error {
    let mut e = match need {
        Some(n) => with_need(e, "the build (table and runs)", n),
        None => e,
    };
    let Error::NoSpace(n) = &mut e else {
        return e;
    };
    let (mut runs, mut bytes) = (0usize, 0u64);
    for entry in std::fs::read_dir(work).into_iter().flatten().flatten() {
        let name = entry.file_name().to_string_lossy().into_owned();
        if name.starts_with("chunk-") && name.ends_with(".run") {
            runs += 1;
            bytes += entry.metadata().map_or(0, |m| m.len());
        } else if name != MARKER && name != "plan.json" {
            let _ = std::fs::remove_file(entry.path());
        }
    }
    if runs == 0 {
        remove_work_dir(work);
    } else {
        n.kept = Some(Kept {
            dir: work.to_path_buf(),
            runs,
            bytes,
        });
    }
    e
}

/// Builds the table of `params` at `out` with its manifest beside it, on the current rayon
/// pool. Existing files are refused ([`Error::Exists`]) unless `replace` (or, with
/// `resume`, unless they are the complete table of `params`), and a file system with less
/// free space than the estimate is refused, both before any work is done. A write that
/// finds no room fails with [`Error::NoSpace`], keeping the whole runs for `resume`.
pub fn build_table(
    params: &Params,
    out: &Path,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<BuildSummary> {
    let (dir, work) = places(out)?;
    // A commit that a kill interrupted is completed first: its table is whole.
    finish_interrupted(out)?;
    if opts.resume && !opts.replace {
        if let Some(s) = already_built(params, out, &work)? {
            return Ok(s);
        }
    }
    let manifest_path = default_manifest_path(out);
    for target in [out, manifest_path.as_path()] {
        // Neither output may be a directory, a link or (unless replacing) a file:
        // checked before any work, so a build never stops with its manifest refused.
        check_target(target, opts.replace)?;
    }
    let resumed = if opts.resume {
        saved_plan(&work, params)
    } else {
        None
    };
    let mut need = None;
    let result = (|| {
        let p = match resumed.clone() {
            Some(p) => p,
            None => {
                let p = plan(params, 1, progress)?;
                let want = p.estimate(None, 1, &MODEL).disk_bytes;
                if !opts.skip_disk_check {
                    if let Some(free) = free_bytes(&dir) {
                        if (free as f64) < want {
                            return Err(Error::Io(format!(
                                "not enough free disk in {}: the build needs about {} (table and runs), {} are free",
                                dir.display(),
                                bytes_text(want),
                                bytes_text(free as f64)
                            )));
                        }
                    }
                }
                need = Some(want);
                fresh_work_dir(&work)?;
                let saved = SavedPlan {
                    builder: env!("CARGO_PKG_VERSION").into(),
                    plan: p.clone(),
                };
                write_atomic(
                    &work.join("plan.json"),
                    &serde_json::to_vec(&saved).expect("plans serialise"),
                    true,
                )?;
                p
            }
        };
        need = Some(p.estimate(None, 1, &MODEL).disk_bytes);
        let all: Vec<usize> = (0..p.chunks.len()).collect();
        let computed = compute_runs(&p, &all, &work, resumed.is_some(), progress)?;
        let runs = all
            .iter()
            .map(|&k| Run {
                chunk: k as u32,
                path: run_file(&work, k),
            })
            .collect();
        let (manifest, manifest_path) =
            merge_to(runs, params, &work, out, opts.replace, false, progress)?;
        Ok((p, computed, manifest, manifest_path))
    })();
    let (p, computed, manifest, manifest_path) = match result {
        Ok(r) => r,
        Err(e @ Error::NoSpace(_)) => return Err(keep_for_resume(e, &work, need)),
        Err(e) => return Err(e),
    };
    remove_work_dir(&work);
    Ok(BuildSummary {
        table: out.to_path_buf(),
        manifest_path,
        manifest,
        computed,
        chunks: p.chunks.len(),
        candidates: p.candidates(),
        complete: false,
    })
}
