//! The table writer: pairs in table order into one SQLite file, streamed, byte-reproducible
//! and atomic (DESIGN §5). It only writes: every value comes computed from the pipeline.
//!
//! The bytes depend only on the pairs pushed: fixed page size and pragmas, one transaction,
//! rows inserted pair by pair in row order (each pair's classes, their local data, the pair
//! and its primes), indexes after the data, no timestamps. The file is built beside its
//! target under a temporary name, flushed to disk and renamed, so the target never holds a
//! partial table. Memory does not grow with the table.
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
use crate::form::local::LocalPlace;
use crate::table::atomic::TempFile;
use crate::table::format::{Format, TABLE};
use crate::table::group::label;
use crate::table::row::{ClassRow, Key, Pair, Params, Table};
use crate::table::schema::{
    place_to_column, INDEX_SQL, LABEL_RULE, ORDERING, PAGE_SIZE, SCHEMA_VERSION,
};
use crate::table::space::{no_space, sqlite_cause};
use rusqlite::{params, CachedStatement, Connection, ErrorCode, OpenFlags};
use std::path::{Path, PathBuf};

/// A table being written. Push the pairs in table order, then [`TableWriter::finish`]; a
/// writer dropped before that leaves nothing behind.
pub struct TableWriter {
    target: PathBuf,
    replace: bool,
    params: Params,
    tmp: TempFile,
    conn: Connection,
    classes: i64,
    pairs: i64,
    last: Option<Key>,
}

/// How many rows [`TableWriter::finish`] wrote.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Written {
    /// Rows of `classes`.
    pub classes: u64,
    /// Rows of `pairs`.
    pub pairs: u64,
}

impl TableWriter {
    /// Starts the table of `params` at `path`; an existing `path` is refused
    /// ([`Error::Exists`]) unless `replace`.
    pub fn create(path: &Path, params: &Params, replace: bool) -> Result<TableWriter> {
        let tmp = TempFile::create(path, replace)?;
        let conn = open_new(tmp.path(), params).map_err(|e| write_error(path, None, e))?;
        Ok(TableWriter {
            target: path.to_path_buf(),
            replace,
            params: *params,
            tmp,
            conn,
            classes: 0,
            pairs: 0,
            last: None,
        })
    }

    /// Appends one pair (labelled and grouped, as [`crate::table::group`] makes it); pairs
    /// must come in table order.
    pub fn push(&mut self, pair: &Pair) -> Result<()> {
        self.push_all(std::slice::from_ref(pair))
    }

    /// Appends pairs in table order, as many [`TableWriter::push`]es would, with the
    /// statements looked up once for all of them.
    pub fn push_all(&mut self, pairs: &[Pair]) -> Result<()> {
        let TableWriter {
            target,
            params,
            conn,
            classes,
            pairs: written,
            last,
            ..
        } = self;
        let failed = |e| write_error(target, Some(conn), e);
        let mut st = Statements::new(conn).map_err(failed)?;
        for pair in pairs {
            let row = *classes + 1;
            let (mut ni, mut nr) = (0, 0);
            for r in &pair.classes {
                check(r, row, last, params)?;
                let n = if r.irreducible() {
                    ni += 1;
                    ni
                } else {
                    nr += 1;
                    nr
                };
                if (r.i, r.j) != (pair.i, pair.j) || r.label != label(r.i, r.j, r.irreducible(), n)
                {
                    return Err(Error::Input(format!(
                        "cannot write the table: row {row} ({}) does not have the label of \
                         its place in its pair; group rows with table::group",
                        r.label
                    )));
                }
            }
            st.insert(pair, row, *written + 1, params).map_err(failed)?;
            *classes += pair.classes.len() as i64;
            *written += 1;
        }
        Ok(())
    }

    /// Builds the indexes, commits, flushes and renames the file into place.
    pub fn finish(self) -> Result<Written> {
        self.finish_with(|_| Ok(()))
    }

    /// [`TableWriter::finish`], calling `before` with the path of the finished temporary
    /// file just before it is renamed into place (the build writes the manifest there, so
    /// that a table never stands at its name without its manifest); an error from `before`
    /// leaves nothing at the target.
    pub fn finish_with(self, before: impl FnOnce(&Path) -> Result<()>) -> Result<Written> {
        let TableWriter {
            target,
            replace,
            mut tmp,
            conn,
            classes,
            pairs,
            ..
        } = self;
        let written = Written {
            classes: classes as u64,
            pairs: pairs as u64,
        };
        conn.execute_batch(INDEX_SQL)
            .and_then(|()| conn.execute_batch("COMMIT"))
            .map_err(|e| write_error(&target, Some(&conn), e))?;
        conn.close()
            .map_err(|(c, e)| write_error(&target, Some(&c), e))?;
        // On disk before anything names it: a kill after this leaves a whole file.
        tmp.sync(&target)?;
        before(tmp.path())?;
        tmp.commit(&target, replace)?;
        Ok(written)
    }
}

/// Row number `row` (its pair's first), after the row with key `last`, must be what the
/// pipeline makes for `params`.
fn check(r: &ClassRow, row: i64, last: &mut Option<Key>, params: &Params) -> Result<()> {
    let bad = |why: &str| {
        Error::Input(format!(
            "cannot write the table: row {row} ({}) {why}",
            r.label
        ))
    };
    if r.label.is_empty() {
        return Err(bad("has no label; group rows with table::group"));
    }
    if (*last).is_some_and(|k| k >= r.key()) {
        return Err(bad("is out of table order; group rows with table::group"));
    }
    *last = Some(r.key());
    if i128::from(r.h4) >= 4 * params.height {
        return Err(bad("is not below the height bound of the parameters"));
    }
    if r.irreducible() != r.galois.is_some() {
        return Err(bad("has a Galois group exactly when it is reducible"));
    }
    if r.rational.is_some() != r.grouped_over_q() {
        return Err(bad(
            "has a class over Q exactly when it is not an els class without a rational root",
        ));
    }
    if !r.irreducible() && !params.include_reducible {
        return Err(bad(
            "is reducible but the parameters exclude reducible classes",
        ));
    }
    Ok(())
}

/// The four insert statements of a batch of pairs, looked up once.
struct Statements<'c> {
    classes: CachedStatement<'c>,
    local: CachedStatement<'c>,
    pairs: CachedStatement<'c>,
    primes: CachedStatement<'c>,
}

impl<'c> Statements<'c> {
    fn new(conn: &'c Connection) -> rusqlite::Result<Statements<'c>> {
        Ok(Statements {
            classes: conn.prepare_cached(
                "INSERT INTO classes VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, \
                 ?13, ?14, ?15, ?16, ?17, ?18, ?19, ?20)",
            )?,
            local: conn.prepare_cached("INSERT INTO local VALUES (?1, ?2, ?3, ?4, ?5)")?,
            pairs: conn.prepare_cached(
                "INSERT INTO pairs VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12)",
            )?,
            primes: conn.prepare_cached("INSERT INTO pair_primes VALUES (?1, ?2, ?3)")?,
        })
    }

    /// Inserts one checked pair, its first class numbered `first_id` and itself `pair_id`.
    fn insert(
        &mut self,
        pair: &Pair,
        first_id: i64,
        pair_id: i64,
        params: &Params,
    ) -> rusqlite::Result<()> {
        let mut first_of = vec![None; pair.classes.len()];
        for class in &pair.over_q {
            for &k in class {
                first_of[k] = Some(first_id + class[0] as i64);
            }
        }
        for (k, r) in pair.classes.iter().enumerate() {
            let id = first_id + k as i64;
            let [a, b, c, d, e] = r.form;
            self.classes.execute(params![
                id,
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
                first_of[k],
            ])?;
            // In key order (class_id, p): the real place (p = 0) first. One row per
            // statement: the bytes depend only on the order of the rows, and single-row
            // statements were no slower than one statement for all places of a class.
            let mut places: Vec<(i64, &LocalPlace<i64>)> = r
                .local
                .iter()
                .map(|l| (place_to_column(&l.place), l))
                .collect();
            places.sort_by_key(|&(p, _)| p);
            for (p, l) in &places {
                self.local
                    .execute(params![id, p, l.v_disc, l.pattern, l.soluble])?;
            }
        }
        let (classes, irreducible) = (pair.classes.len() as i64, pair.irreducible() as i64);
        self.pairs.execute(params![
            pair_id,
            first_id,
            pair.i,
            pair.j,
            pair.disc,
            factor_text(&pair.disc_factors),
            pair.h4,
            classes,
            irreducible,
            params.include_reducible.then_some(classes - irreducible),
            pair.els() as i64,
            pair.over_q.len() as i64,
        ])?;
        // The primes of the pair, in order.
        for (q, e) in &pair.disc_factors {
            self.primes.execute(params![pair_id, q, e])?;
        }
        Ok(())
    }
}

/// Creates a database of format `f` in the (empty) file `tmp`: the fixed settings (page
/// size, UTF-8, no auto-vacuum, no journal), an open transaction, the application id, the
/// schema version and the schema. Every qorbits file starts here, so files of every format
/// share the settings the header check expects.
pub fn new_database(tmp: &Path, f: &Format) -> rusqlite::Result<Connection> {
    let conn = Connection::open_with_flags(
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
    conn.pragma_update(None, "temp_store", "FILE")?;
    conn.execute_batch("BEGIN")?;
    conn.pragma_update(None, "application_id", f.application_id)?;
    conn.pragma_update(None, "user_version", f.schema_version)?;
    conn.execute_batch(f.schema_sql)?;
    Ok(conn)
}

/// Creates the table in the (empty) file `tmp`: settings, schema, `meta`, and an open
/// transaction.
fn open_new(tmp: &Path, params: &Params) -> rusqlite::Result<Connection> {
    let conn = new_database(tmp, &TABLE)?;
    {
        let mut meta = conn.prepare("INSERT INTO meta (key, value) VALUES (?1, ?2)")?;
        let include = if params.include_reducible { "1" } else { "0" };
        for (k, v) in [
            ("builder_version", env!("CARGO_PKG_VERSION").to_string()),
            ("height", params.height.to_string()),
            ("include_reducible", include.to_string()),
            ("label_rule", LABEL_RULE.to_string()),
            ("ordering", ORDERING.to_string()),
            ("schema_version", SCHEMA_VERSION.to_string()),
        ] {
            meta.execute(params![k, v])?;
        }
    }
    Ok(conn)
}

/// A one-line error for a failed write ([`Error::NoSpace`] when there was no room; the
/// connection, when given, tells SQLite's system error).
pub fn write_error(path: &Path, conn: Option<&Connection>, e: rusqlite::Error) -> Error {
    if let Some(cause) = sqlite_cause(conn, &e) {
        return no_space(path, cause);
    }
    match e.sqlite_error_code() {
        Some(ErrorCode::ConstraintViolation) => Error::Input(format!(
            "cannot write {}: the rows break a key of the table ({e}); labels must be unique",
            path.display()
        )),
        _ => Error::Io(format!("cannot write {}: {e}", path.display())),
    }
}

/// Writes `table` (as returned by [`crate::table::pipeline::enumerate_classes`]) to `path`;
/// an existing `path` is refused ([`Error::Exists`]) unless `replace`.
pub fn write_table(path: &Path, table: &Table, replace: bool) -> Result<Written> {
    let mut w = TableWriter::create(path, &table.params, replace)?;
    for pair in &table.pairs {
        w.push(pair)?;
    }
    w.finish()
}
