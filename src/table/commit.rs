//! Putting a finished table in place (DESIGN §5), and the work directories of builds and
//! merges, so that a process killed at any point leaves nothing that looks finished and
//! nothing the next run cannot recognise.
//!
//! The commit: the table's temporary file is completed and flushed to disk, the manifest
//! is written at its name, then the table is renamed beside it — a table never stands at
//! its name without its manifest. A kill between the two leaves the manifest alone, next to
//! the complete temporary table of a process that no longer runs; [`finish_interrupted`]
//! (called by the next build or merge of the same table) renames that file into place when
//! its size and SHA-256 are the manifest's. A failure between the two removes the manifest.
//!
//! Work directories (`.NAME.work`, `.NAME.merge`) carry a marker file from their first
//! moment and lose it last, so a directory a kill left is either marked or empty: both are
//! ours to reuse or remove, anything else is refused.

use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::table::atomic::{rename_noreplace, stale_temps};
use crate::table::hash::file_sha256;
use crate::table::manifest::{
    default_manifest_path, manifest_named, read_manifest, write_manifest, Manifest,
};
use crate::table::merge::{merge_into, Run};
use crate::table::row::Params;
use crate::table::writer::TableWriter;
use std::path::{Path, PathBuf};

/// The marker file of a work or shard directory.
pub(crate) const MARKER: &str = "qorbits-work";

/// Whether `dir` is a directory of ours: not a link, and marked or empty.
pub(crate) fn is_work_dir(dir: &Path) -> bool {
    let plain = std::fs::symlink_metadata(dir).is_ok_and(|m| m.is_dir());
    plain
        && (dir.join(MARKER).is_file()
            || std::fs::read_dir(dir).is_ok_and(|mut r| r.next().is_none()))
}

/// Removes a work directory of ours, its marker last (so a kill on the way leaves a marked
/// or an empty directory).
pub(crate) fn remove_work_dir(dir: &Path) {
    if !is_work_dir(dir) {
        return;
    }
    for e in std::fs::read_dir(dir).into_iter().flatten().flatten() {
        if e.file_name() != MARKER {
            let p = e.path();
            let _ = std::fs::remove_dir_all(&p).or_else(|_| std::fs::remove_file(&p));
        }
    }
    let _ = std::fs::remove_file(dir.join(MARKER));
    let _ = std::fs::remove_dir(dir);
}

/// Makes `dir` a fresh work directory, removing the leftovers of an earlier one (only a
/// directory of ours, see [`is_work_dir`]). The marker is its first file.
pub(crate) fn fresh_work_dir(dir: &Path) -> Result<()> {
    if std::fs::symlink_metadata(dir).is_ok() {
        if !is_work_dir(dir) {
            return Err(Error::Io(format!(
                "{} exists and is not a qorbits work directory; remove it or choose another output",
                dir.display()
            )));
        }
        remove_work_dir(dir);
        if std::fs::symlink_metadata(dir).is_ok() {
            return Err(Error::Io(format!(
                "cannot remove the leftovers {}; remove them by hand",
                dir.display()
            )));
        }
    }
    std::fs::create_dir(dir).map_err(|e| match crate::table::space::cause_of(&e) {
        Some(c) => crate::table::space::no_space(dir, c),
        None => Error::Io(format!(
            "cannot create the work directory {}: {e}",
            dir.display()
        )),
    })?;
    mark(dir, b"a qorbits build keeps its runs here\n")
}

/// Writes the marker of a work or shard directory (in place: what matters is that it is
/// there; a marker cut short by a kill still marks).
pub(crate) fn mark(dir: &Path, text: &[u8]) -> Result<()> {
    let m = dir.join(MARKER);
    std::fs::write(&m, text).map_err(|e| crate::table::space::write_error(&m, e))
}

/// Removes what killed writers of `out` and of its manifest left: their temporary files.
pub(crate) fn remove_stale_temps(out: &Path) {
    let dir = match out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    for f in [out.to_path_buf(), default_manifest_path(out)] {
        if let Some(name) = f.file_name() {
            for t in stale_temps(&dir, name) {
                let _ = std::fs::remove_file(t);
            }
        }
    }
}

/// Completes the commit of `out` that a kill interrupted: when `out` is missing and its
/// manifest stands alone, a temporary file of `out` left by a process that no longer runs,
/// with the size and SHA-256 the manifest records, is renamed into place. Returns whether
/// it did so.
pub fn finish_interrupted(out: &Path) -> Result<bool> {
    let manifest = default_manifest_path(out);
    let lone = std::fs::symlink_metadata(out).is_err()
        && std::fs::symlink_metadata(&manifest).is_ok_and(|m| m.is_file());
    let (Some(name), true) = (out.file_name(), lone) else {
        return Ok(false);
    };
    let Ok(m) = read_manifest(&manifest) else {
        return Ok(false);
    };
    if m.file.name != name.to_string_lossy() {
        return Ok(false);
    }
    let dir = match out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    for tmp in stale_temps(&dir, name) {
        let size = std::fs::metadata(&tmp).map(|t| t.len()).unwrap_or(0);
        if size == m.file.bytes && file_sha256(&tmp).is_ok_and(|h| h == m.file.sha256) {
            let failed = |e: std::io::Error| {
                Error::Io(format!(
                    "cannot finish the interrupted write of {}: {e}",
                    out.display()
                ))
            };
            if !rename_noreplace(&tmp, out).map_err(failed)? {
                std::fs::hard_link(&tmp, out).map_err(failed)?;
                let _ = std::fs::remove_file(&tmp);
            }
            let _ = std::fs::File::open(&dir).and_then(|d| d.sync_all());
            return Ok(true);
        }
    }
    Ok(false)
}

/// Merges runs into the table at `out` and commits it with its manifest (see the module
/// doc). With `drop_work`, the work directory (then only intermediate runs) is removed
/// before the commit, so a merge killed later leaves nothing of it.
pub(crate) fn merge_to(
    runs: Vec<Run>,
    params: &Params,
    work: &Path,
    out: &Path,
    replace: bool,
    drop_work: bool,
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
    let done = w.finish_with(|tmp| {
        let m = manifest_named(tmp, &name)?;
        if drop_work {
            remove_work_dir(work);
        }
        write_manifest(&manifest_path, &m, replace)?;
        manifest = Some(m);
        Ok(())
    });
    if let Err(e) = done {
        if manifest.is_some() {
            // The manifest stood alone: the table did not follow it.
            let _ = std::fs::remove_file(&manifest_path);
        }
        return Err(e);
    }
    Ok((manifest.expect("written before the rename"), manifest_path))
}
