//! The manifest of a curve dataset (format [`FORMAT`], beside the file as
//! `x.manifest.json`), its verification and the rebuild from it — the table's machinery
//! (`table::manifest`, `table::verify`) applied to the curve format [`CURVES`]: the same
//! file checks, hostile-input opening, integrity check and page walk, and a content hash that
//! the sqlite3 shell and sha256sum recompute (`content_recipe`).
//!
//! ```
//! use qorbits::selmer::dataset::FORMAT;
//! assert_eq!(FORMAT, "qorbits-curves-manifest/1");
//! ```

use super::{check_y, write_dataset, CURVES, MAX_Y, SCHEMA_VERSION};
use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::selmer::{family_selmer, family_statement};
use crate::table::atomic::{fresh_temp_dir, write_atomic};
use crate::table::hash::{content_sha256_in, file_sha256};
use crate::table::manifest::{check_file_info, content_recipe_of, FileInfo, Versions};
use crate::table::reader::read_error;
use crate::table::validate::open_checked_as;
use crate::table::verify::{check, content_check, outcome, verify_file, Check};
use rusqlite::Connection;
use serde::{Deserialize, Serialize};
use std::path::Path;

/// The format tag of curve dataset manifests.
pub const FORMAT: &str = "qorbits-curves-manifest/1";

/// What the dataset is of.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct DatasetParams {
    /// The height bound Y.
    pub height: i128,
    /// The family in words ([`family_statement`]).
    pub family: String,
}

/// Row counts.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct DatasetCounts {
    /// Rows of `curves`.
    pub curves: u64,
    /// Rows of `elements`: the non-trivial 2-Selmer elements of all curves.
    pub elements: u64,
    /// Curves by 2-Selmer rank 0, 1, 2, ….
    pub by_selmer_rank: Vec<u64>,
    /// Curves by rank of E(Q)[2] 0, 1, 2, ….
    pub by_two_torsion_rank: Vec<u64>,
}

/// A curve dataset manifest (field order is the JSON order).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct DatasetManifest {
    /// [`FORMAT`].
    pub format: String,
    /// Y and the family.
    pub parameters: DatasetParams,
    /// Versions (schema: the curve schema version).
    pub versions: Versions,
    /// Row counts.
    pub counts: DatasetCounts,
    /// The file.
    pub file: FileInfo,
    /// SHA-256 of the content rendering.
    pub content_sha256: String,
    /// Shell command that recomputes `content_sha256` from the file.
    pub content_recipe: String,
}

/// Curves by the values of an integer column, as a list indexed by the value.
fn by_value(conn: &Connection, column: &str) -> Result<Vec<u64>> {
    let sql = format!("SELECT {column}, count(*) FROM curves GROUP BY {column} ORDER BY {column}");
    let mut st = conn.prepare(&sql).map_err(|e| read_error(conn, e))?;
    let pairs = st
        .query_map([], |r| Ok((r.get::<_, i64>(0)?, r.get::<_, i64>(1)?)))
        .and_then(|rows| rows.collect::<rusqlite::Result<Vec<_>>>())
        .map_err(|e| read_error(conn, e))?;
    let mut out = Vec::new();
    for (v, n) in pairs {
        // A rank of a curve of the family is at most a few dozen; anything else is damage.
        let v = usize::try_from(v)
            .ok()
            .filter(|v| *v <= 64)
            .ok_or_else(|| {
                Error::Database(format!(
                "the curve dataset holds {column} = {v}, which no curve has; verify it against \
                 its manifest"
            ))
            })?;
        if out.len() <= v {
            out.resize(v + 1, 0);
        }
        out[v] = n as u64;
    }
    Ok(out)
}

/// The parameters and counts of an opened dataset, by SQL.
fn read_counts(conn: &Connection) -> Result<(DatasetParams, DatasetCounts)> {
    let one = |sql: &str| -> Result<u64> {
        conn.query_row(sql, [], |r| r.get::<_, i64>(0))
            .map(|n| n as u64)
            .map_err(|e| read_error(conn, e))
    };
    let text = |key: &str| -> Result<String> {
        conn.query_row("SELECT value FROM meta WHERE key = ?1", [key], |r| r.get(0))
            .map_err(|e| read_error(conn, e))
    };
    let height = text("height")?.parse::<i128>().unwrap_or(0);
    let params = DatasetParams {
        height,
        family: text("family")?,
    };
    let counts = DatasetCounts {
        curves: one("SELECT count(*) FROM curves")?,
        elements: one("SELECT count(*) FROM elements")?,
        by_selmer_rank: by_value(conn, "selmer_rank")?,
        by_two_torsion_rank: by_value(conn, "two_torsion_rank")?,
    };
    Ok((params, counts))
}

/// The manifest of the dataset file at `path` as if it were named `name`.
pub fn dataset_manifest(path: &Path, name: &str) -> Result<DatasetManifest> {
    let conn = open_checked_as(&CURVES, path).map_err(|(_, e)| e)?;
    let (parameters, counts) = read_counts(&conn)?;
    let bytes = std::fs::metadata(path)
        .map_err(|e| Error::Io(format!("{}: {e}", path.display())))?
        .len();
    Ok(DatasetManifest {
        format: FORMAT.into(),
        parameters,
        versions: Versions {
            builder: env!("CARGO_PKG_VERSION").into(),
            schema: SCHEMA_VERSION,
            sqlite: rusqlite::version().into(),
        },
        counts,
        file: FileInfo {
            name: name.to_string(),
            bytes,
            sha256: file_sha256(path)?,
        },
        content_sha256: content_sha256_in(&CURVES, &conn)?,
        content_recipe: content_recipe_of(name, CURVES.content_sql),
    })
}

/// Writes a manifest atomically as pretty JSON with a final newline; an existing file is
/// refused unless `replace`.
pub fn write_dataset_manifest(path: &Path, m: &DatasetManifest, replace: bool) -> Result<()> {
    let mut s = serde_json::to_string_pretty(m).expect("manifests serialise");
    s.push('\n');
    write_atomic(path, s.as_bytes(), replace)
}

/// Reads a curve dataset manifest: untrusted input, checked before use (its format tag, a
/// plain file name, hashes, size, a Y a dataset can have and the family statement of that Y).
pub fn read_dataset_manifest(path: &Path) -> Result<DatasetManifest> {
    let shown = path.display();
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::Io(format!("cannot read the manifest {shown}: {e}")))?;
    let m: DatasetManifest = serde_json::from_str(&text).map_err(|e| {
        Error::Input(format!(
            "{shown} is not a qorbits curve dataset manifest: {e}"
        ))
    })?;
    let bad = |why: String| Error::Input(format!("{shown} is not a valid qorbits manifest: {why}"));
    if m.format != FORMAT {
        return Err(bad(format!("its format is {:?}, not {FORMAT}", m.format)));
    }
    check_file_info(&m.file, &m.content_sha256).map_err(bad)?;
    check_y(m.parameters.height).map_err(|_| {
        bad(format!(
            "its height {} is outside the heights a curve dataset can have (1 to {MAX_Y})",
            m.parameters.height
        ))
    })?;
    if m.parameters.family != family_statement(m.parameters.height) {
        return Err(bad(
            "its family is not the statement of the family of its height".into(),
        ));
    }
    Ok(m)
}

/// Checks a curve dataset against its manifest: the checks every qorbits file gets
/// (`table::verify::verify_file`: size, SHA-256, side files, header, the hostile-input
/// opening as [`CURVES`], integrity check and page walk), then the content hash, the
/// parameters and the counts. `table::verify::diagnosis` names what is wrong.
pub fn verify_dataset(db: &Path, m: &DatasetManifest) -> Result<Vec<Check>> {
    let unknown = (m.format != FORMAT).then_some(m.format.as_str());
    let (mut out, conn) = verify_file(db, &CURVES, &m.file, m.versions.schema, unknown)?;
    let Some(conn) = conn else {
        return Ok(out);
    };
    let got = (|| -> Result<_> { Ok((read_counts(&conn)?, content_sha256_in(&CURVES, &conn)?)) })();
    let Some((params, counts)) = content_check(&mut out, &m.content_sha256, got) else {
        return Ok(out);
    };
    out.push(check("height", m.parameters.height, params.height));
    out.push(outcome(
        "family",
        m.parameters.family == params.family,
        if m.parameters.family == params.family {
            "the family statement of the height".into()
        } else {
            "the meta row family differs from the manifest's".into()
        },
    ));
    out.push(check("curves", m.counts.curves, counts.curves));
    out.push(check("elements", m.counts.elements, counts.elements));
    let ranks = m
        .counts
        .by_selmer_rank
        .len()
        .max(counts.by_selmer_rank.len());
    for r in 0..ranks {
        let at = |v: &[u64]| v.get(r).copied().unwrap_or(0);
        let (want, got) = (at(&m.counts.by_selmer_rank), at(&counts.by_selmer_rank));
        out.push(check(&format!("selmer rank {r}"), want, got));
    }
    let t = &m.counts.by_two_torsion_rank;
    out.push(check(
        "two-torsion ranks",
        format!("{t:?}"),
        format!("{:?}", counts.by_two_torsion_rank),
    ));
    Ok(out)
}

/// Rebuilds the dataset a manifest describes and checks it against the manifest, on the
/// current rayon pool. The manifest is untrusted ([`read_dataset_manifest`]); the rebuild is
/// written in a fresh private directory under a fixed name, removed afterwards, so nothing
/// from the manifest becomes part of a path.
pub fn rebuild_dataset(manifest: &Path, progress: &dyn Progress) -> Result<Vec<Check>> {
    let m = read_dataset_manifest(manifest)?;
    let dir = fresh_temp_dir("rebuild")?;
    let out = dir.join("rebuild.sqlite");
    let result = family_selmer(m.parameters.height, progress)
        .and_then(|groups| write_dataset(&out, m.parameters.height, &groups, false))
        .and_then(|_| verify_dataset(&out, &m));
    let _ = std::fs::remove_dir_all(&dir);
    result
}
