//! SQLite schema and writer, and the queries on a finished table (DESIGN §4, §5).
//!
//! This module owns the schema (`schema/v3.sql` for the tables, `schema/v3-indexes.sql` for
//! the indexes built after the data), the byte-reproducible and atomic writer
//! [`write_table`], read-only opening with clear errors [`open_table`], the queries
//! [`table_params`] and [`classes_with_invariants`], and the two hashes of a table: the
//! SHA-256 of the file ([`file_sha256`]) and the content hash ([`content_sha256`]), the
//! SHA-256 of the text the `sqlite3` shell prints for [`CONTENT_SQL`].
//!
//! ```
//! use qorbits::store::{classes_with_invariants, open_table, table_params, write_table};
//! use qorbits::table::{enumerate_classes, Params};
//! let params = Params { height: 3000, include_reducible: true };
//! let rows = enumerate_classes(&params, None).unwrap().rows;
//! let dir = std::env::temp_dir().join(format!("qorbits-store-doc-{}", std::process::id()));
//! std::fs::create_dir_all(&dir).unwrap();
//! let path = dir.join("small.sqlite");
//! write_table(&path, &params, &rows, true).unwrap();
//! let conn = open_table(&path).unwrap();
//! assert_eq!(table_params(&conn).unwrap(), params);
//! let first = &rows[0];
//! assert!(classes_with_invariants(&conn, first.i, first.j).unwrap().contains(first));
//! # drop(conn);
//! # std::fs::remove_dir_all(&dir).unwrap();
//! ```

use crate::error::{Error, Result};
use crate::form::Signature;
use crate::galois::{FactorPattern, GaloisGroup};
use crate::table::{ClassRow, LocalRow, Params};
use rusqlite::types::ValueRef;
use rusqlite::{params, Connection, ErrorCode, OpenFlags, OptionalExtension};
use sha2::{Digest, Sha256};
use std::fs::{File, OpenOptions};
use std::io::{Read, Write};
use std::path::{Path, PathBuf};

/// Version of the schema written by this builder (also the file's `PRAGMA user_version`).
pub const SCHEMA_VERSION: u32 = 3;

/// `PRAGMA application_id` of every qorbits table: the ASCII bytes `QORB`.
pub const APPLICATION_ID: i32 = 0x514F_5242;

/// The `CREATE TABLE` statements of the current schema version.
pub const SCHEMA_SQL: &str = include_str!("../schema/v3.sql");

/// The `CREATE INDEX` statements of the current schema, run after the data is inserted.
pub const INDEX_SQL: &str = include_str!("../schema/v3-indexes.sql");

/// Page size of every table file, fixed so that the bytes do not depend on SQLite defaults.
pub const PAGE_SIZE: u32 = 4096;

/// The row order of `classes`, as stored in `meta` (DESIGN §4).
pub const ORDERING: &str = "h4,I,J,a,b,c,d,e";

/// The labelling rule, as stored in `meta` (see [`crate::table`]).
pub const LABEL_RULE: &str = "I.J.iN is the N-th irreducible and I.J.rN the N-th reducible \
     class with invariants (I, J), counting canonical forms (a,b,c,d,e) in lexicographic order.";

/// The SQL whose output, rendered as the `sqlite3` shell prints it in list mode (columns
/// joined by `|`, NULL as the empty string, every row ended by `\n`, no header), is hashed
/// by [`content_sha256`].
pub const CONTENT_SQL: &str = "SELECT * FROM meta ORDER BY key; \
     SELECT * FROM classes ORDER BY id; SELECT * FROM local ORDER BY class_id, p = 0, p; \
     SELECT * FROM pairs ORDER BY h4, I, J; SELECT * FROM pair_primes ORDER BY I, J, p;";

// ---------------------------------------------------------------------------------------
// Atomic files (shared with the manifest writer).

/// A temporary file beside its target, removed on drop unless committed.
pub(crate) struct TempFile {
    tmp: PathBuf,
    armed: bool,
}

impl TempFile {
    /// Checks that `target` may be written (refusing an existing file unless `force`) and
    /// creates an empty `.<name>.tmp-<pid>` in the same directory.
    pub(crate) fn create(target: &Path, force: bool) -> Result<TempFile> {
        let shown = target.display();
        let name = target.file_name().ok_or_else(|| {
            Error::Input(format!(
                "{shown} is not a file name; give a path like dir/table.sqlite"
            ))
        })?;
        if let Ok(m) = std::fs::symlink_metadata(target) {
            if m.is_dir() {
                return Err(Error::Io(format!(
                    "{shown} is a directory; give a file name inside it"
                )));
            }
            if m.file_type().is_symlink() {
                return Err(Error::Io(format!(
                    "{shown} is a symbolic link; qorbits replaces only regular files, so give \
                     the path of the file itself or remove the link"
                )));
            }
            if !m.is_file() {
                return Err(Error::Io(format!(
                    "{shown} is not a regular file (a device, socket or pipe); qorbits \
                     replaces only regular files"
                )));
            }
            if !force {
                return Err(Error::Io(format!(
                    "{shown} already exists; pass --force to overwrite it"
                )));
            }
        }
        let dir = match target.parent() {
            Some(d) if !d.as_os_str().is_empty() => d,
            _ => Path::new("."),
        };
        if !dir.is_dir() {
            return Err(Error::Io(format!(
                "cannot write {shown}: directory {} does not exist; create it first",
                dir.display()
            )));
        }
        let mut tmp_name = std::ffi::OsString::from(".");
        tmp_name.push(name);
        tmp_name.push(format!(".tmp-{}", std::process::id()));
        let tmp = dir.join(tmp_name);
        // A leftover of an earlier process with the same id is ours to replace.
        let _ = std::fs::remove_file(&tmp);
        OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&tmp)
            .map_err(|e| {
                Error::Io(format!(
                    "cannot write {shown}: cannot create {} ({e}); check that {} is writable",
                    tmp.display(),
                    dir.display()
                ))
            })?;
        Ok(TempFile { tmp, armed: true })
    }

    /// Path of the temporary file.
    pub(crate) fn path(&self) -> &Path {
        &self.tmp
    }

    /// Flushes the temporary file to disk and moves it to `target`: replacing an existing
    /// file only with `force`, never leaving a partial file at `target`.
    pub(crate) fn commit(mut self, target: &Path, force: bool) -> Result<()> {
        let shown = target.display();
        let io = |what: &str, e: std::io::Error| {
            Error::Io(format!("cannot write {shown}: {what} ({e})"))
        };
        File::open(&self.tmp)
            .and_then(|f| f.sync_all())
            .map_err(|e| io("cannot flush the temporary file to disk", e))?;
        if force {
            std::fs::rename(&self.tmp, target)
                .map_err(|e| io("cannot rename the temporary file", e))?;
        } else {
            // A hard link never replaces an existing file, so a file that appeared since
            // `create` is not overwritten; rename where links are not supported.
            match std::fs::hard_link(&self.tmp, target) {
                Ok(()) => {
                    let _ = std::fs::remove_file(&self.tmp);
                }
                Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                    return Err(Error::Io(format!(
                        "{shown} already exists; pass --force to overwrite it"
                    )));
                }
                Err(_) => {
                    if std::fs::symlink_metadata(target).is_ok() {
                        return Err(Error::Io(format!(
                            "{shown} already exists; pass --force to overwrite it"
                        )));
                    }
                    std::fs::rename(&self.tmp, target)
                        .map_err(|e| io("cannot rename the temporary file", e))?;
                }
            }
        }
        self.armed = false;
        // Make the new directory entry durable; best effort (some filesystems refuse it).
        if let Some(dir) = target.parent().filter(|d| !d.as_os_str().is_empty()) {
            let _ = File::open(dir).and_then(|d| d.sync_all());
        }
        Ok(())
    }
}

impl Drop for TempFile {
    fn drop(&mut self) {
        if self.armed {
            let _ = std::fs::remove_file(&self.tmp);
        }
    }
}

/// Writes `bytes` to `target` atomically (temporary file, fsync, rename).
pub(crate) fn write_atomic(target: &Path, bytes: &[u8], force: bool) -> Result<()> {
    let tmp = TempFile::create(target, force)?;
    OpenOptions::new()
        .write(true)
        .open(tmp.path())
        .and_then(|mut f| f.write_all(bytes))
        .map_err(|e| Error::Io(format!("cannot write {}: {e}", target.display())))?;
    tmp.commit(target, force)
}

// ---------------------------------------------------------------------------------------
// Writing.

/// One row of `pairs`.
struct PairRow {
    i: i64,
    j: i64,
    disc: i64,
    disc_factors: String,
    h4: i64,
    classes: i64,
    irreducible: i64,
    reducible: Option<i64>,
    els: i64,
    rational_els: i64,
    primes: Vec<(i64, i64)>,
}

/// The rows must be what [`crate::table::enumerate_classes`] returns for `params`.
fn check_rows(params: &Params, rows: &[ClassRow]) -> Result<()> {
    let bound = 4 * params.height;
    for (n, r) in rows.iter().enumerate() {
        let bad = |why: &str| {
            Error::Input(format!(
                "cannot write the table: row {} ({}) {why}",
                n + 1,
                r.label
            ))
        };
        if r.label.is_empty() {
            return Err(bad(
                "has no label; order and label rows with table::order_and_label",
            ));
        }
        if n > 0 && rows[n - 1].key() >= r.key() {
            return Err(bad(
                "is out of table order; order and label rows with table::order_and_label",
            ));
        }
        if i128::from(r.h4) >= bound {
            return Err(bad("is not below the height bound of the parameters"));
        }
        let irreducible = r.pattern == FactorPattern::Irreducible;
        if irreducible != r.galois.is_some() {
            return Err(bad("has a Galois group exactly when it is reducible"));
        }
        if r.rational.is_some() != r.grouped_over_q() {
            return Err(bad(
                "has a class over Q exactly when it is not an els class without a rational root; \
                 order and label rows with table::order_and_label",
            ));
        }
        if !irreducible && !params.include_reducible {
            return Err(bad(
                "is reducible but the parameters exclude reducible classes",
            ));
        }
    }
    Ok(())
}

/// One row per (I, J) of the (ordered) rows, in the order (h4, I, J).
fn pair_rows(rows: &[ClassRow], include_reducible: bool) -> Vec<PairRow> {
    let mut out: Vec<PairRow> = Vec::new();
    for r in rows {
        let irr = i64::from(r.pattern == FactorPattern::Irreducible);
        match out.last_mut() {
            Some(p) if (p.i, p.j) == (r.i, r.j) => {
                p.classes += 1;
                p.irreducible += irr;
                p.els += i64::from(r.els());
                p.rational_els += i64::from(r.first_over_q());
            }
            _ => out.push(PairRow {
                i: r.i,
                j: r.j,
                disc: r.disc,
                disc_factors: factor_text(r.disc),
                h4: r.h4,
                classes: 1,
                irreducible: irr,
                reducible: None,
                els: i64::from(r.els()),
                rational_els: i64::from(r.first_over_q()),
                primes: crate::primes::factor(&rug::Integer::from(r.disc))
                    .into_iter()
                    .map(|(p, e)| (p.to_i64().expect("factor of an i64"), i64::from(e)))
                    .collect(),
            }),
        }
    }
    if include_reducible {
        for p in &mut out {
            p.reducible = Some(p.classes - p.irreducible);
        }
    }
    out
}

/// The factorisation of `n`, e.g. `-1 * 2^4 * 3^3 * 7`; `1` and `-1` for ±1.
fn factor_text(n: i64) -> String {
    crate::primes::factor_string(&rug::Integer::from(n))
}

/// Builds the whole database in the (empty) file `tmp`.
fn fill(tmp: &Path, params: &Params, rows: &[ClassRow], pairs: &[PairRow]) -> rusqlite::Result<()> {
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
        for (n, r) in rows.iter().enumerate() {
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
                r.pattern == FactorPattern::Irreducible,
                r.galois.map(GaloisGroup::name),
                r.stabiliser,
                r.els(),
                r.insoluble_at(),
                r.rational,
            ])?;
            for l in &r.local {
                loc.execute(params![n as i64 + 1, l.p, l.v_disc, l.pattern, l.soluble])?;
            }
        }
        let mut ins =
            tx.prepare("INSERT INTO pairs VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)")?;
        let mut pp = tx.prepare("INSERT INTO pair_primes VALUES (?1, ?2, ?3, ?4)")?;
        for p in pairs {
            ins.execute(params![
                p.i,
                p.j,
                p.disc,
                p.disc_factors,
                p.h4,
                p.classes,
                p.irreducible,
                p.reducible,
                p.els,
                p.rational_els
            ])?;
            for (q, e) in &p.primes {
                pp.execute(params![p.i, p.j, q, e])?;
            }
        }
    }
    tx.execute_batch(INDEX_SQL)?;
    tx.commit()?;
    conn.close().map_err(|(_, e)| e)
}

/// Writes the table of `rows` (in table order and labelled, as returned by
/// [`crate::table::enumerate_classes`] for `params`) to `path`.
///
/// The same rows give the same bytes: fixed page size and pragmas, one transaction, inserts
/// in row order, indexes after the data, no timestamps. The file is built beside `path`
/// under a temporary name, flushed to disk and renamed, so `path` never holds a partial
/// table. An existing `path` is refused unless `force`.
pub fn write_table(path: &Path, params: &Params, rows: &[ClassRow], force: bool) -> Result<()> {
    check_rows(params, rows)?;
    let pairs = pair_rows(rows, params.include_reducible);
    let tmp = TempFile::create(path, force)?;
    fill(tmp.path(), params, rows, &pairs).map_err(|e| match e.sqlite_error_code() {
        Some(ErrorCode::ConstraintViolation) => Error::Input(format!(
            "cannot write {}: the rows break a key of the table ({e}); labels must be unique",
            path.display()
        )),
        _ => Error::Io(format!("cannot write {}: {e}", path.display())),
    })?;
    tmp.commit(path, force)
}

// ---------------------------------------------------------------------------------------
// Reading.

/// How a connection's file is named in messages.
fn shown(conn: &Connection) -> String {
    match conn.path() {
        Some(p) if !p.is_empty() => p.to_string(),
        _ => "the table".to_string(),
    }
}

/// A one-line error for a failed query on a table.
fn read_error(conn: &Connection, e: rusqlite::Error) -> Error {
    match e.sqlite_error_code() {
        Some(ErrorCode::DatabaseCorrupt) | Some(ErrorCode::NotADatabase) => {
            Error::Database(format!(
                "{} is damaged ({e}); verify it against its manifest or rebuild it",
                shown(conn)
            ))
        }
        _ => Error::Database(format!("cannot read {}: {e}", shown(conn))),
    }
}

/// Opens a qorbits table read-only, checking that it is an SQLite file written by qorbits
/// with a schema version this build reads.
pub fn open_table(path: &Path) -> Result<Connection> {
    let p = path.display();
    match std::fs::metadata(path) {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            return Err(Error::Io(format!(
                "no table at {p}: the file does not exist; check the path or build the table first"
            )));
        }
        Err(e) => return Err(Error::Io(format!("cannot read {p}: {e}"))),
        Ok(m) if m.is_dir() => {
            return Err(Error::Io(format!("{p} is a directory, not a table file")))
        }
        Ok(m) if m.len() == 0 => {
            return Err(Error::Database(format!(
                "{p} is empty (0 bytes), not a qorbits table; rebuild it"
            )));
        }
        Ok(_) => {}
    }
    let unreadable = |e: rusqlite::Error| {
        Error::Database(format!(
            "{p} is not a readable SQLite file ({e}); check the path"
        ))
    };
    let conn = Connection::open_with_flags(
        path,
        OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX,
    )
    .map_err(unreadable)?;
    let app: i32 = conn
        .query_row("PRAGMA application_id", [], |r| r.get(0))
        .map_err(unreadable)?;
    if app != APPLICATION_ID {
        return Err(Error::Database(format!(
            "{p} is an SQLite database but not a qorbits table (application_id {app:#010x}, expected \
             {APPLICATION_ID:#010x}); check the path"
        )));
    }
    let version: i64 = conn
        .query_row("PRAGMA user_version", [], |r| r.get(0))
        .map_err(unreadable)?;
    if version != i64::from(SCHEMA_VERSION) {
        return Err(Error::Database(format!(
            "{p} is a qorbits table with schema version {version}, but this qorbits reads version \
             {SCHEMA_VERSION}; use a matching qorbits release or rebuild the table"
        )));
    }
    // Extra consistency checks on every page read, so damage shows as an error early.
    conn.pragma_update(None, "cell_size_check", true)
        .map_err(unreadable)?;
    Ok(conn)
}

/// The value of `key` in the `meta` table.
pub fn meta_value(conn: &Connection, key: &str) -> Result<String> {
    conn.query_row("SELECT value FROM meta WHERE key = ?1", [key], |r| r.get(0))
        .optional()
        .map_err(|e| read_error(conn, e))?
        .ok_or_else(|| {
            Error::Database(format!(
                "{} has no meta row '{key}'; the table is damaged or was not written by qorbits",
                shown(conn)
            ))
        })
}

/// The parameters the table was built with (from `meta`).
pub fn table_params(conn: &Connection) -> Result<Params> {
    let bad = |key: &str, v: &str| {
        Error::Database(format!(
            "{}: meta row '{key}' has the invalid value '{v}'; the table is damaged",
            shown(conn)
        ))
    };
    let h = meta_value(conn, "height")?;
    let height = h.parse::<i128>().map_err(|_| bad("height", &h))?;
    let r = meta_value(conn, "include_reducible")?;
    let include_reducible = match r.as_str() {
        "0" => false,
        "1" => true,
        _ => return Err(bad("include_reducible", &r)),
    };
    Ok(Params {
        height,
        include_reducible,
    })
}

fn signature_from_name(s: &str) -> Option<Signature> {
    Signature::ALL.into_iter().find(|v| v.name() == s)
}

fn pattern_from_name(s: &str) -> Option<FactorPattern> {
    [
        FactorPattern::Irreducible,
        FactorPattern::LinearCubic,
        FactorPattern::QuadraticQuadratic,
        FactorPattern::LinearLinearQuadratic,
        FactorPattern::Linear4,
    ]
    .into_iter()
    .find(|v| v.name() == s)
}

fn galois_from_name(s: &str) -> Option<GaloisGroup> {
    GaloisGroup::ALL.into_iter().find(|v| v.name() == s)
}

/// The columns of `classes` as stored, before the names are parsed.
struct StoredClass {
    id: i64,
    label: String,
    ints: [i64; 9],
    real_roots: i64,
    signature: String,
    factorisation: String,
    irreducible: i64,
    galois: Option<String>,
    stabiliser: i64,
    rational: Option<String>,
}

impl StoredClass {
    fn into_class_row(self, conn: &Connection) -> Result<ClassRow> {
        let bad = |what: &str| {
            Error::Database(format!(
                "{}: class id {} has {what}; the table is damaged",
                shown(conn),
                self.id
            ))
        };
        let signature =
            signature_from_name(&self.signature).ok_or_else(|| bad("an unknown signature"))?;
        let pattern = pattern_from_name(&self.factorisation)
            .ok_or_else(|| bad("an unknown factorisation"))?;
        let galois = match &self.galois {
            None => None,
            Some(g) => Some(galois_from_name(g).ok_or_else(|| bad("an unknown Galois group"))?),
        };
        let irreducible = pattern == FactorPattern::Irreducible;
        if self.real_roots != i64::from(signature.real_roots())
            || self.irreducible != i64::from(irreducible)
            || irreducible != galois.is_some()
        {
            return Err(bad("inconsistent columns"));
        }
        let stabiliser =
            u8::try_from(self.stabiliser).map_err(|_| bad("an invalid stabiliser order"))?;
        let [a, b, c, d, e, i, j, disc, h4] = self.ints;
        let local = (|| {
            let mut st = conn.prepare_cached(
                "SELECT p, v_disc, pattern, soluble FROM local WHERE class_id = ?1 ORDER BY p = 0, p",
            )?;
            let rows = st.query_map([self.id], |r| {
                Ok(LocalRow { p: r.get(0)?, v_disc: r.get(1)?, pattern: r.get(2)?, soluble: r.get(3)? })
            })?;
            rows.collect::<rusqlite::Result<Vec<_>>>()
        })()
        .map_err(|e| read_error(conn, e))?;
        Ok(ClassRow {
            form: [a, b, c, d, e],
            i,
            j,
            disc,
            h4,
            signature,
            pattern,
            galois,
            stabiliser,
            label: self.label,
            rational: self.rational,
            local,
        })
    }
}

/// Every class with invariants (I, J) = (`i`, `j`), in table order (uses the (I, J) index).
pub fn classes_with_invariants(conn: &Connection, i: i64, j: i64) -> Result<Vec<ClassRow>> {
    let stored = (|| {
        let mut st = conn.prepare_cached(
            "SELECT id, label, a, b, c, d, e, I, J, disc, h4, real_roots, signature, factorisation, \
             irreducible, galois, stabiliser, rational_class FROM classes WHERE I = ?1 AND J = ?2 ORDER BY id",
        )?;
        let rows = st.query_map([i, j], |r| {
            let mut ints = [0i64; 9];
            for (k, v) in ints.iter_mut().enumerate() {
                *v = r.get(k + 2)?;
            }
            Ok(StoredClass {
                id: r.get(0)?,
                label: r.get(1)?,
                ints,
                real_roots: r.get(11)?,
                signature: r.get(12)?,
                factorisation: r.get(13)?,
                irreducible: r.get(14)?,
                galois: r.get(15)?,
                stabiliser: r.get(16)?,
                rational: r.get(17)?,
            })
        })?;
        rows.collect::<rusqlite::Result<Vec<_>>>()
    })()
    .map_err(|e| read_error(conn, e))?;
    stored.into_iter().map(|s| s.into_class_row(conn)).collect()
}

// ---------------------------------------------------------------------------------------
// Hashes.

/// The statements of [`CONTENT_SQL`], in order.
fn content_statements() -> impl Iterator<Item = &'static str> {
    CONTENT_SQL
        .split(';')
        .map(str::trim)
        .filter(|s| !s.is_empty())
}

/// Writes the rendering of [`CONTENT_SQL`] that [`content_sha256`] hashes: what the
/// `sqlite3` shell prints in list mode with separator `|` and no header (integers in
/// decimal, text verbatim, NULL as the empty string, each row ended by `\n`).
pub fn render_content(conn: &Connection, out: &mut dyn Write) -> Result<()> {
    let io = |e: std::io::Error| Error::Io(format!("cannot write the content rendering: {e}"));
    let mut line = Vec::new();
    for sql in content_statements() {
        let mut st = conn.prepare(sql).map_err(|e| read_error(conn, e))?;
        let n = st.column_count();
        let mut rows = st.query([]).map_err(|e| read_error(conn, e))?;
        while let Some(r) = rows.next().map_err(|e| read_error(conn, e))? {
            line.clear();
            for k in 0..n {
                if k > 0 {
                    line.push(b'|');
                }
                match r.get_ref(k).map_err(|e| read_error(conn, e))? {
                    ValueRef::Null => {}
                    ValueRef::Integer(v) => line.extend_from_slice(v.to_string().as_bytes()),
                    ValueRef::Text(t) => line.extend_from_slice(t),
                    ValueRef::Real(_) | ValueRef::Blob(_) => {
                        return Err(Error::Database(format!(
                            "{} holds a REAL or BLOB value (\"{sql}\", column {}), which schema version {SCHEMA_VERSION} \
                             does not allow; the table is damaged",
                            shown(conn),
                            k + 1
                        )));
                    }
                }
            }
            line.push(b'\n');
            out.write_all(&line).map_err(io)?;
        }
    }
    Ok(())
}

/// A writer that feeds SHA-256.
struct HashWriter(Sha256);

impl Write for HashWriter {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        self.0.update(buf);
        Ok(buf.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

/// Lowercase hexadecimal.
pub(crate) fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// The content hash: SHA-256 (lowercase hex) of [`render_content`], equal to
/// `sqlite3 -batch -noheader -list -separator '|' FILE "<CONTENT_SQL>" | sha256sum`.
pub fn content_sha256(conn: &Connection) -> Result<String> {
    let mut h = HashWriter(Sha256::new());
    render_content(conn, &mut h)?;
    Ok(hex(&h.0.finalize()))
}

/// SHA-256 (lowercase hex) of the bytes of the file at `path`.
pub fn file_sha256(path: &Path) -> Result<String> {
    let err = |e: std::io::Error| Error::Io(format!("cannot read {}: {e}", path.display()));
    let mut f = File::open(path).map_err(err)?;
    let mut h = Sha256::new();
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = f.read(&mut buf).map_err(err)?;
        if n == 0 {
            break;
        }
        h.update(&buf[..n]);
    }
    Ok(hex(&h.finalize()))
}

#[cfg(test)]
mod tests {
    use super::factor_text;

    #[test]
    fn factor_text_edge_cases() {
        assert_eq!(factor_text(1), "1");
        assert_eq!(factor_text(-1), "-1");
        assert_eq!(factor_text(-2), "-1 * 2");
        assert_eq!(factor_text(-3024), "-1 * 2^4 * 3^3 * 7");
        assert_eq!(factor_text(229), "229");
        assert_eq!(factor_text(25), "5^2");
        assert_eq!(factor_text(i64::MIN), "-1 * 2^63");
        // 2^63 − 1 = 7² · 73 · 127 · 337 · 92737 · 649657 (checked with coreutils `factor`).
        assert_eq!(
            factor_text(i64::MAX),
            "7^2 * 73 * 127 * 337 * 92737 * 649657"
        );
        // 999999999989 is prime (coreutils `factor`).
        assert_eq!(factor_text(-999_999_999_989), "-1 * 999999999989");
    }
}
