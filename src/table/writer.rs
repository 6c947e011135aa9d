//! The table writer: a [`Table`] in memory into one SQLite file, byte-reproducible and
//! atomic (DESIGN §5). It only writes: every value comes computed from the pipeline.
//!
//! ```
//! use qorbits::progress::Silent;
//! use qorbits::table::pipeline::enumerate_classes;
//! use qorbits::table::reader::{open_table, pair_from_table, table_params};
//! use qorbits::table::row::Params;
//! use qorbits::table::writer::write_table;
//! let params = Params { height: 3000, include_reducible: true };
//! let table = enumerate_classes(&params, &Silent).unwrap();
//! let dir = std::env::temp_dir().join(format!("qorbits-writer-doc-{}", std::process::id()));
//! std::fs::create_dir_all(&dir).unwrap();
//! let path = dir.join("small.sqlite");
//! write_table(&path, &table, true).unwrap();
//! let conn = open_table(&path).unwrap();
//! assert_eq!(table_params(&conn).unwrap(), params);
//! let first = &table.pairs[0];
//! assert_eq!(&pair_from_table(&conn, first.i, first.j).unwrap(), first);
//! # drop(conn);
//! # std::fs::remove_dir_all(&dir).unwrap();
//! ```

use crate::arith::primes::factor_text;
use crate::error::{Error, Result};
use crate::form::galois::GaloisGroup;
use crate::table::atomic::TempFile;
use crate::table::row::{ClassRow, Table};
use crate::table::schema::{
    place_to_column, APPLICATION_ID, INDEX_SQL, LABEL_RULE, ORDERING, PAGE_SIZE, SCHEMA_SQL,
    SCHEMA_VERSION,
};
use rug::Integer;
use rusqlite::{params, Connection, ErrorCode, OpenFlags};
use std::path::Path;

/// The rows must be what [`crate::table::pipeline::enumerate_classes`] returns.
fn check_rows(table: &Table) -> Result<()> {
    let params = &table.params;
    let bound = 4 * params.height;
    let mut previous: Option<&ClassRow> = None;
    for (n, r) in table.rows().enumerate() {
        let bad = |why: &str| {
            Error::Input(format!(
                "cannot write the table: row {} ({}) {why}",
                n + 1,
                r.label
            ))
        };
        if r.label.is_empty() {
            return Err(bad(
                "has no label; group rows with table::group::group_rows",
            ));
        }
        if previous.is_some_and(|p| p.key() >= r.key()) {
            return Err(bad(
                "is out of table order; group rows with table::group::group_rows",
            ));
        }
        previous = Some(r);
        if i128::from(r.h4) >= bound {
            return Err(bad("is not below the height bound of the parameters"));
        }
        if r.irreducible() != r.galois.is_some() {
            return Err(bad("has a Galois group exactly when it is reducible"));
        }
        if r.rational.is_some() != r.grouped_over_q() {
            return Err(bad(
                "has a class over Q exactly when it is not an els class without a rational root; \
                 group rows with table::group::group_rows",
            ));
        }
        if !r.irreducible() && !params.include_reducible {
            return Err(bad(
                "is reducible but the parameters exclude reducible classes",
            ));
        }
    }
    Ok(())
}

/// Builds the whole database in the (empty) file `tmp`.
/// Builds the whole database in the (empty) file `tmp`.
fn fill(tmp: &Path, table: &Table) -> rusqlite::Result<()> {
    let params = &table.params;
    let mut conn = Connection::open_with_flags(
        tmp,
        OpenFlags::SQLITE_OPEN_READ_WRITE | OpenFlags::SQLITE_OPEN_NO_MUTEX,
    )?;
    // Everything that shapes the file is fixed here rather than left to defaults.
    conn.pragma_update(None, "page_size", PAGE_SIZE)?;
    conn.pragma_update(None, "encoding", "UTF-8")?;
    conn.pragma_update(None, "auto_vacuum", "NONE")?;
    let mode: String = conn.pragma_update_and_check(None, "journal_mode", "OFF", |r| r.get(0))?;
    if !mode.eq_ignore_ascii_case("off") {
        return Err(rusqlite::Error::InvalidQuery);
    }
    conn.pragma_update(None, "synchronous", "OFF")?;
    conn.pragma_update(None, "cache_size", -65536)?;
    let tx = conn.transaction()?;
    tx.pragma_update(None, "application_id", APPLICATION_ID)?;
    tx.pragma_update(None, "user_version", SCHEMA_VERSION)?;
    tx.execute_batch(SCHEMA_SQL)?;
    {
        let mut meta = tx.prepare("INSERT INTO meta (key, value) VALUES (?1, ?2)")?;
        let include = if params.include_reducible { "1" } else { "0" };
        for (k, v) in [
            ("builder_version", env!("CARGO_PKG_VERSION").to_string()),
            ("schema_version", SCHEMA_VERSION.to_string()),
            ("height", params.height.to_string()),
            ("include_reducible", include.to_string()),
            ("ordering", ORDERING.to_string()),
            ("label_rule", LABEL_RULE.to_string()),
        ] {
            meta.execute(params![k, v])?;
        }
        let mut ins = tx.prepare(
            "INSERT INTO classes VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, ?13, ?14, ?15, ?16, ?17, ?18, ?19, ?20)",
        )?;
        let mut loc = tx.prepare("INSERT INTO local VALUES (?1, ?2, ?3, ?4, ?5)")?;
        for (n, r) in table.rows().enumerate() {
            let [a, b, c, d, e] = r.form;
            ins.execute(params![
                n as i64 + 1,
                r.label,
                a,
                b,
                c,
                d,
                e,
                r.i,
                r.j,
                r.disc,
                r.h4,
                r.signature.real_roots(),
                r.signature.name(),
                r.pattern.name(),
                r.irreducible(),
                r.galois.map(GaloisGroup::name),
                r.stabiliser,
                r.els(),
                r.insoluble_at(),
                r.rational,
            ])?;
            for l in &r.local {
                let p = place_to_column(&l.place);
                loc.execute(params![n as i64 + 1, p, l.v_disc, l.pattern, l.soluble])?;
            }
        }
        let mut ins =
            tx.prepare("INSERT INTO pairs VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)")?;
        let mut pp = tx.prepare("INSERT INTO pair_primes VALUES (?1, ?2, ?3, ?4)")?;
        for p in &table.pairs {
            let factors: Vec<(Integer, u32)> = p
                .disc_factors
                .iter()
                .map(|&(q, e)| (Integer::from(q), e))
                .collect();
            let (classes, irreducible) = (p.classes.len() as i64, p.irreducible() as i64);
            ins.execute(params![
                p.i,
                p.j,
                p.disc,
                factor_text(p.disc < 0, &factors),
                p.h4,
                classes,
                irreducible,
                params.include_reducible.then_some(classes - irreducible),
                p.els() as i64,
                p.over_q.len() as i64,
            ])?;
            for (q, e) in &p.disc_factors {
                pp.execute(params![p.i, p.j, q, e])?;
            }
        }
    }
    tx.execute_batch(INDEX_SQL)?;
    tx.commit()?;
    conn.close().map_err(|(_, e)| e)
}

/// Writes `table` (as returned by [`crate::table::pipeline::enumerate_classes`]) to `path`.
///
/// The same rows give the same bytes: fixed page size and pragmas, one transaction, inserts
/// in row order, indexes after the data, no timestamps. The file is built beside `path`
/// under a temporary name, flushed to disk and renamed, so `path` never holds a partial
/// table. An existing `path` is refused ([`Error::Exists`]) unless `replace`.
pub fn write_table(path: &Path, table: &Table, replace: bool) -> Result<()> {
    check_rows(table)?;
    let tmp = TempFile::create(path, replace)?;
    fill(tmp.path(), table).map_err(|e| match e.sqlite_error_code() {
        Some(ErrorCode::ConstraintViolation) => Error::Input(format!(
            "cannot write {}: the rows break a key of the table ({e}); labels must be unique",
            path.display()
        )),
        _ => Error::Io(format!("cannot write {}: {e}", path.display())),
    })?;
    tmp.commit(path, replace)
}
