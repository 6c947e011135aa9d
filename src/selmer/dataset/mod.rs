//! The curve dataset (`selmer-stats --out`): one SQLite file holding every curve of the
//! family of [`crate::selmer::short_family`] below a height, with its 2-torsion and 2-Selmer
//! ranks, and every non-trivial 2-Selmer element as a canonical quartic with the label of
//! its class in the table (schema in `schema/curves-v1*.sql`, columns in
//! `schema/README.md`, manifest and verification in [`manifest`]).
//!
//! Elements: [`crate::selmer`] identifies the non-trivial elements with the classes over Q
//! of the everywhere locally soluble forms without a rational root having the curve's
//! invariants `(I, J) = (−48A, −1728B)`; each is stored as the first class of its class
//! over Q in table order. A form with a rational root gives the trivial element, so a curve
//! has exactly `2^selmer_rank − 1` element rows. The image of E(Q)[2] needs no subtraction:
//! its non-trivial elements are represented by forms with two quadratic factors, which are
//! counted among those classes; and in this family E(Q)[2] is trivial anyway, since
//! `x³ + Ax + B` has no rational root, so `two_torsion_rank` is 0 on every row.
//!
//! The bytes depend only on Y and the builder version: the rows come in family order
//! `(height, A, B)` whatever the number of threads, and the file is written as the table
//! is (`table::writer::new_database`: fixed settings, one transaction, indexes after the
//! data), under a temporary name, with its manifest written before the rename.
//!
//! ```
//! use qorbits::selmer::dataset::{curve_rows, CURVES};
//! use qorbits::selmer::family_selmer;
//! let groups = family_selmer(200, &qorbits::progress::Silent).unwrap();
//! let rows = curve_rows(&groups).unwrap();
//! assert!(rows.iter().all(|c| c.elements.len() + 1 == 1 << c.selmer_rank));
//! assert_eq!(CURVES.noun, "curve dataset");
//! ```

pub mod manifest;

use crate::error::{Error, Result};
use crate::selmer::{family_statement, short_height, Selmer};
use crate::table::atomic::{check_target, TempFile};
use crate::table::format::{is_height, shared_meta_ok, Format};
use crate::table::manifest::default_manifest_path;
use crate::table::schema::LABEL_RULE;
use crate::table::writer::{new_database, write_error};
use rusqlite::{params, Connection};
use std::path::{Path, PathBuf};

pub use manifest::{
    dataset_manifest, read_dataset_manifest, rebuild_dataset, verify_dataset, DatasetManifest,
    FORMAT,
};

/// Schema version of the curve dataset (`PRAGMA user_version`).
pub const SCHEMA_VERSION: u32 = 1;

/// `PRAGMA application_id` of a curve dataset: the ASCII bytes `QORC`.
pub const APPLICATION_ID: i32 = 0x514F_5243;

/// The row order of `curves`, as stored in `meta`.
pub const ORDERING: &str = "height,A,B";

/// The SQL of the content hash (`table::hash`; the manifest's recipe prints it with the
/// sqlite3 shell).
pub const CONTENT_SQL: &str = "SELECT * FROM meta ORDER BY key; SELECT * FROM curves ORDER BY \
     id; SELECT * FROM elements ORDER BY curve_id, n;";

/// The largest Y: the family's pairs reach `H < 27648·Y`, which the enumeration bounds.
pub const MAX_Y: i128 = crate::enumerate::bounds::MAX_HEIGHT / 27_648;

const META_KEYS: [&str; 6] = [
    "builder_version",
    "family",
    "height",
    "label_rule",
    "ordering",
    "schema_version",
];

/// The Y of a family statement written by [`family_statement`], if it is one.
fn statement_height(v: &str) -> Option<i128> {
    let rest = v.strip_prefix("all integer pairs (A, B) with max(4|A|^3, 27B^2) < ")?;
    let y: i128 = rest.split(',').next()?.parse().ok()?;
    (family_statement(y) == v).then_some(y)
}

fn meta_ok(k: &str, v: &str) -> bool {
    match k {
        "family" => statement_height(v).is_some_and(|y| (1..=MAX_Y).contains(&y)),
        "height" => is_height(v, MAX_Y),
        _ => shared_meta_ok(k, v, ORDERING, SCHEMA_VERSION).unwrap_or(false),
    }
}

/// The curve dataset as a file format (`table::format`).
pub static CURVES: Format = Format::new(
    "curve dataset",
    APPLICATION_ID,
    SCHEMA_VERSION,
    include_str!("../../../schema/curves-v1.sql"),
    include_str!("../../../schema/curves-v1-indexes.sql"),
    CONTENT_SQL,
    &META_KEYS,
    meta_ok,
);

/// One non-trivial 2-Selmer element: the label of its class (`schema/labels.md`) and the
/// canonical quartic `[a, b, c, d, e]`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ElementRow {
    /// `Q<I>_<J>_<N>` (or `R…` for a form with two quadratic factors).
    pub label: String,
    /// The canonical representative.
    pub form: [i64; 5],
}

/// One curve `y² = x³ + Ax + B` of the dataset.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CurveRow {
    /// A.
    pub a: i64,
    /// B.
    pub b: i64,
    /// `max(4|A|³, 27B²)`.
    pub height: i64,
    /// The discriminant `Δ = −16(4A³ + 27B²)`.
    pub disc: i64,
    /// `I = c4 = −48A` of its quartics.
    pub i: i64,
    /// `J = 2c6 = −1728B` of its quartics.
    pub j: i64,
    /// The rank of E(Q)[2].
    pub two_torsion_rank: u32,
    /// The 2-Selmer rank.
    pub selmer_rank: u32,
    /// The non-trivial elements, in table order of their quartics.
    pub elements: Vec<ElementRow>,
}

/// The rows of the curves and 2-Selmer groups of [`crate::selmer::family_selmer`]; an
/// error if a value does not fit the 64-bit columns (never below [`MAX_Y`]).
pub fn curve_rows(groups: &[((i64, i64), Selmer)]) -> Result<Vec<CurveRow>> {
    groups
        .iter()
        .map(|&((a, b), ref s)| {
            let too_large = || {
                Error::Input(format!(
                    "the curve y^2 = x^3 + {a}x + {b} has invariants beyond 64-bit integers; \
                     choose a smaller height"
                ))
            };
            let (a1, b1) = (i128::from(a), i128::from(b));
            let fit = |v: i128| i64::try_from(v).map_err(|_| too_large());
            let elements: Vec<ElementRow> = s
                .elements
                .iter()
                .map(|r| ElementRow {
                    label: r.label.clone(),
                    form: r.form,
                })
                .collect();
            if elements.len() + 1 != 1usize << s.rank {
                return Err(Error::Numerical(format!(
                    "the curve y^2 = x^3 + {a}x + {b} has {} elements for 2-Selmer rank {}",
                    elements.len(),
                    s.rank
                )));
            }
            Ok(CurveRow {
                a,
                b,
                height: fit(short_height(a, b))?,
                disc: fit(-16 * (4 * a1 * a1 * a1 + 27 * b1 * b1))?,
                i: fit(-48 * a1)?,
                j: fit(-1728 * b1)?,
                two_torsion_rank: s.two_torsion_rank,
                selmer_rank: s.rank,
                elements,
            })
        })
        .collect()
}

/// Checks that the dataset and its manifest (beside it, `x.sqlite` → `x.manifest.json`)
/// may be written, before any work; returns the manifest's path.
pub fn dataset_targets(path: &Path, replace: bool) -> Result<PathBuf> {
    let manifest = default_manifest_path(path);
    for target in [path, manifest.as_path()] {
        check_target(target, replace)?;
    }
    Ok(manifest)
}

/// Y within `1 ..= MAX_Y`.
pub fn check_y(y: i128) -> Result<()> {
    if !(1..=MAX_Y).contains(&y) {
        return Err(Error::Input(format!(
            "the height bound of a curve dataset must be from 1 to {MAX_Y}, not {y}"
        )));
    }
    Ok(())
}

/// Writes the dataset of the family below `y` (its groups from
/// [`crate::selmer::family_selmer`]`(y)`) to `path` and its manifest beside it; existing
/// files are refused ([`Error::Exists`]) unless `replace`. The manifest is written first,
/// then the dataset renamed into place, so the dataset never stands at its name without its
/// manifest and never holds a partial file.
pub fn write_dataset(
    path: &Path,
    y: i128,
    groups: &[((i64, i64), Selmer)],
    replace: bool,
) -> Result<DatasetManifest> {
    check_y(y)?;
    let manifest_path = dataset_targets(path, replace)?;
    let rows = curve_rows(groups)?;
    let tmp = TempFile::create(path, replace)?;
    fill(tmp.path(), y, &rows).map_err(|e| write_error(path, None, e))?;
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let m = dataset_manifest(tmp.path(), &name)?;
    manifest::write_dataset_manifest(&manifest_path, &m, replace)?;
    tmp.commit(path, replace)?;
    Ok(m)
}

/// The database in the empty file `tmp`: settings and schema, `meta`, the rows in order, the
/// indexes, committed and closed.
fn fill(tmp: &Path, y: i128, rows: &[CurveRow]) -> rusqlite::Result<()> {
    let conn: Connection = new_database(tmp, &CURVES)?;
    {
        let mut meta = conn.prepare("INSERT INTO meta (key, value) VALUES (?1, ?2)")?;
        for (k, v) in [
            ("builder_version", env!("CARGO_PKG_VERSION").to_string()),
            ("family", family_statement(y)),
            ("height", y.to_string()),
            ("label_rule", LABEL_RULE.to_string()),
            ("ordering", ORDERING.to_string()),
            ("schema_version", SCHEMA_VERSION.to_string()),
        ] {
            meta.execute(params![k, v])?;
        }
        let mut curve =
            conn.prepare("INSERT INTO curves VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)")?;
        let mut element =
            conn.prepare("INSERT INTO elements VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8)")?;
        for (k, c) in rows.iter().enumerate() {
            let id = k as i64 + 1;
            curve.execute(params![
                id,
                c.a,
                c.b,
                c.height,
                c.disc,
                c.i,
                c.j,
                c.two_torsion_rank,
                c.selmer_rank,
                c.elements.len() as i64
            ])?;
            for (n, e) in c.elements.iter().enumerate() {
                let [a, b, cc, d, ee] = e.form;
                element.execute(params![id, n as i64 + 1, e.label, a, b, cc, d, ee])?;
            }
        }
    }
    conn.execute_batch(CURVES.index_sql)?;
    conn.execute_batch("COMMIT")?;
    conn.close().map_err(|(_, e)| e)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn meta_values_are_those_written() {
        assert!(meta_ok("family", &family_statement(10_000)));
        assert!(!meta_ok(
            "family",
            &family_statement(10_000).replace("!=", "=")
        ));
        assert!(!meta_ok("family", &family_statement(0)));
        assert!(meta_ok("height", "10000") && !meta_ok("height", "1e4"));
        assert!(!meta_ok("ordering", "A,B"));
        assert_eq!(statement_height(&family_statement(77)), Some(77));
    }
}
