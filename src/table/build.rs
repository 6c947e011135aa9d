//! The build of a table in bounded memory, resumable, on one machine or as shards of a
//! cluster (DESIGN §5, §7): plan the chunks ([`crate::table::plan`]), classify each chunk
//! into a sorted run ([`crate::table::runs`]), merge the runs into the table
//! ([`crate::table::merge`]), write the manifest, rename the table into place.
//!
//! A build keeps its runs in a work directory beside the table (`.NAME.work/`), marked as
//! ours and holding the plan. Killed at any point and restarted with `resume`, it keeps the
//! runs that are whole and ends with the same bytes; without `resume` leftovers are removed.
//! The table appears at its name only when it is complete and its manifest stands beside
//! it. A shard ([`crate::table::shard`]) is the same work for a subset of the chunks.

use crate::enumerate::bounds::Bounds;
use crate::error::{Error, Result};
use crate::form::Form;
use crate::progress::Progress;
use crate::table::atomic::write_atomic;
use crate::table::classify::{classify, Annotation};
use crate::table::hash::hex;
use crate::table::manifest::{default_manifest_path, manifest_named, write_manifest, Manifest};
use crate::table::merge::{merge_into, Run};
use crate::table::plan::{plan, Plan, MODEL};
use crate::table::row::{ClassRow, Params};
use crate::table::runs::{check_run, write_run};
use crate::table::writer::TableWriter;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::path::{Path, PathBuf};

/// The marker file of a work or shard directory.
pub(crate) const MARKER: &str = "qorbits-work";

/// How to build.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct BuildOptions {
    /// Replace an existing table and manifest.
    pub replace: bool,
    /// Keep the whole runs of an interrupted build with the same parameters.
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

/// Makes `dir` a fresh work directory, removing the leftovers of an earlier one (only a
/// directory that carries our marker).
pub(crate) fn fresh_work_dir(dir: &Path) -> Result<()> {
    if std::fs::symlink_metadata(dir).is_ok() {
        let link = std::fs::symlink_metadata(dir).is_ok_and(|m| m.file_type().is_symlink());
        if link || !dir.join(MARKER).is_file() {
            return Err(Error::Io(format!(
                "{} exists and is not a qorbits work directory; remove it or choose another output",
                dir.display()
            )));
        }
        std::fs::remove_dir_all(dir).map_err(|e| {
            Error::Io(format!(
                "cannot remove the leftovers {}: {e}",
                dir.display()
            ))
        })?;
    }
    std::fs::create_dir(dir).map_err(|e| {
        Error::Io(format!(
            "cannot create the work directory {}: {e}",
            dir.display()
        ))
    })?;
    write_atomic(
        &dir.join(MARKER),
        b"a qorbits build keeps its runs here\n",
        true,
    )
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

/// Free bytes on the file system of `dir`, when the system says.
pub fn free_bytes(dir: &Path) -> Option<u64> {
    use std::os::unix::ffi::OsStrExt;
    let c = std::ffi::CString::new(dir.as_os_str().as_bytes()).ok()?;
    let mut s: libc::statvfs = unsafe { std::mem::zeroed() };
    // SAFETY: `c` is a valid C string and `s` a valid out-pointer for statvfs.
    let rc = unsafe { libc::statvfs(c.as_ptr(), &mut s) };
    (rc == 0).then(|| s.f_bavail as u64 * s.f_frsize as u64)
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

/// Merges runs into the table at `out` and its manifest, the manifest written first (so a
/// table never stands at its name without it).
pub(crate) fn merge_to(
    runs: Vec<Run>,
    params: &Params,
    work: &Path,
    out: &Path,
    replace: bool,
    progress: &dyn Progress,
) -> Result<(Manifest, PathBuf)> {
    let mut w = TableWriter::create(out, params, replace)?;
    progress.start("merging", 0);
    merge_into(runs, params, work, &mut w, progress)?;
    let name = out
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let manifest_path = default_manifest_path(out);
    let mut manifest = None;
    w.finish_with(|tmp| {
        let m = manifest_named(tmp, &name)?;
        write_manifest(&manifest_path, &m, replace)?;
        manifest = Some(m);
        Ok(())
    })?;
    Ok((manifest.expect("written before the rename"), manifest_path))
}

/// Builds the table of `params` at `out` with its manifest beside it, on the current rayon
/// pool. Existing files are refused ([`Error::Exists`]) unless `replace`, and a file system
/// with less free space than the estimate is refused, both before any work is done.
pub fn build_table(
    params: &Params,
    out: &Path,
    opts: &BuildOptions,
    progress: &dyn Progress,
) -> Result<BuildSummary> {
    let manifest_path = default_manifest_path(out);
    for target in [out, manifest_path.as_path()] {
        // Neither output may be a directory, a link or (unless replacing) a file:
        // checked before any work, so a build never stops with its manifest refused.
        crate::table::atomic::check_target(target, opts.replace)?;
    }
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
    if !dir.is_dir() {
        return Err(Error::Io(format!(
            "cannot write {}: directory {} does not exist; create it first",
            out.display(),
            dir.display()
        )));
    }
    let work = dir.join(format!(".{}.work", name.to_string_lossy()));
    let resumed = if opts.resume {
        saved_plan(&work, params)
    } else {
        None
    };
    let p = match resumed.clone() {
        Some(p) => p,
        None => {
            let p = plan(params, 1, progress)?;
            if !opts.skip_disk_check {
                let need = p.estimate(None, 1, &MODEL).disk_bytes;
                if let Some(free) = free_bytes(&dir) {
                    if (free as f64) < need {
                        return Err(Error::Io(format!(
                            "not enough free disk in {}: the build needs about {:.1} GB (table and runs), {:.1} GB are free",
                            dir.display(),
                            need / 1e9,
                            free as f64 / 1e9
                        )));
                    }
                }
            }
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
    let all: Vec<usize> = (0..p.chunks.len()).collect();
    let computed = compute_runs(&p, &all, &work, resumed.is_some(), progress)?;
    let runs = all
        .iter()
        .map(|&k| Run {
            chunk: k as u32,
            path: run_file(&work, k),
        })
        .collect();
    let (manifest, manifest_path) = merge_to(runs, params, &work, out, opts.replace, progress)?;
    let _ = std::fs::remove_dir_all(&work);
    Ok(BuildSummary {
        table: out.to_path_buf(),
        manifest_path,
        manifest,
        computed,
        chunks: p.chunks.len(),
        candidates: p.candidates(),
    })
}
