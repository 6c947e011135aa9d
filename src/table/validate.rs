//! A table file is untrusted input: what every command checks before it reads one, and the
//! value checks where a value read could mislead.
//!
//! [`open_checked`] opens a file in stages, each of which can refuse it with one line:
//! the file itself (a regular file, not empty), its database header read from the bytes
//! (`table::header`), a hardened read-only connection ([`harden`]: `immutable`, so no
//! journal or log file beside it is read or written; `trusted_schema` and triggers and
//! views off, `query_only`, defensive mode, no `ATTACH`, values capped at 1 MiB), the
//! schema (`table::schema_check`) and the `meta` rows ([`check_meta`]). Rows are checked
//! where they are read: every value against its column's declared type and domain
//! ([`check_values`], one scan, for commands that scan a table anyway), and the classes of
//! a pair against what their forms imply (`table::pair_check`). [`integrity`] runs
//! SQLite's page-by-page check for `verify`.
//!
//! ```
//! use qorbits::table::validate::{open_checked, Stage};
//! let (stage, e) = open_checked(std::path::Path::new("/")).unwrap_err();
//! assert_eq!(stage, Stage::File);
//! assert!(e.to_string().contains("directory"));
//! ```

use crate::error::{Error, Result};
use crate::table::format::{Format, TABLE};
use crate::table::header::{check_header_for, HEADER_LEN};
use crate::table::schema::SCHEMA_VERSION;
use crate::table::schema_check::{check_schema_in, columns, shown_name};
use rusqlite::config::DbConfig;
use rusqlite::limits::Limit;
use rusqlite::types::ValueRef;
use rusqlite::{Connection, OpenFlags};
use std::io::Read;
use std::path::Path;

/// The longest text value (or row) a table may hold: far above any qorbits value, far below
/// what would strain memory.
pub const MAX_VALUE_BYTES: i32 = 1 << 20;

/// The stage at which [`open_checked`] refused a file.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Stage {
    /// Missing, not a regular file, empty or unreadable.
    File,
    /// The database header (`table::header`).
    Header,
    /// The connection could not be opened or hardened.
    Open,
    /// The tables, columns and indexes (`table::schema_check`).
    Schema,
    /// The `meta` rows.
    Meta,
}

/// `file:` URI of a path, with `immutable=1`: every byte other than letters, digits and
/// `/-._~` percent-encoded, so no name can add URI parameters.
fn immutable_uri(path: &Path) -> String {
    use std::fmt::Write;
    use std::os::unix::ffi::OsStrExt;
    let bytes = path.as_os_str().as_bytes();
    // An absolute path gets an empty authority, so `//x` is never read as a host.
    let mut s = String::from(if bytes.first() == Some(&b'/') {
        "file://"
    } else {
        "file:"
    });
    for &b in bytes {
        if b.is_ascii_alphanumeric() || b"/-._~".contains(&b) {
            s.push(b as char);
        } else {
            write!(s, "%{b:02X}").expect("string");
        }
    }
    s.push_str("?immutable=1");
    s
}

/// Settings of every connection to a table: nothing in the file can run code, attach
/// another file, write, or make SQLite allocate without bound.
pub fn harden(conn: &Connection) -> rusqlite::Result<()> {
    conn.set_db_config(DbConfig::SQLITE_DBCONFIG_DEFENSIVE, true)?;
    conn.set_db_config(DbConfig::SQLITE_DBCONFIG_TRUSTED_SCHEMA, false)?;
    conn.set_db_config(DbConfig::SQLITE_DBCONFIG_ENABLE_TRIGGER, false)?;
    conn.set_db_config(DbConfig::SQLITE_DBCONFIG_ENABLE_VIEW, false)?;
    conn.set_limit(Limit::SQLITE_LIMIT_ATTACHED, 0);
    conn.set_limit(Limit::SQLITE_LIMIT_LENGTH, MAX_VALUE_BYTES);
    conn.set_limit(Limit::SQLITE_LIMIT_SQL_LENGTH, 100_000);
    conn.pragma_update(None, "trusted_schema", false)?;
    conn.pragma_update(None, "query_only", true)?;
    // Extra consistency checks on every page read, so damage shows as an error early.
    conn.pragma_update(None, "cell_size_check", true)?;
    Ok(())
}

/// Opens a qorbits table read-only after checking the file, its header, its schema and its
/// `meta` rows; the error says at which [`Stage`] it was refused, in one line.
pub fn open_checked(path: &Path) -> std::result::Result<Connection, (Stage, Error)> {
    open_checked_as(&TABLE, path)
}

/// [`open_checked`] for a file of format `f`: the same stages against its header fields,
/// schema and `meta` rows.
pub fn open_checked_as(
    f: &'static Format,
    path: &Path,
) -> std::result::Result<Connection, (Stage, Error)> {
    let p = path.display();
    let noun = f.noun;
    let file = |m: String| (Stage::File, Error::Io(m));
    let m = match std::fs::metadata(path) {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            return Err(file(format!(
                "no {noun} at {p}: the file does not exist; check the path or build the {noun} first"
            )));
        }
        Err(e) => return Err(file(format!("cannot read {p}: {e}"))),
        Ok(m) => m,
    };
    if m.is_dir() {
        return Err(file(format!("{p} is a directory, not a {noun} file")));
    }
    if !m.is_file() {
        return Err(file(format!(
            "{p} is not a regular file (a device, socket or pipe), so not a {noun} file"
        )));
    }
    if m.len() == 0 {
        return Err((
            Stage::File,
            Error::Database(format!(
                "{p} is empty (0 bytes), not a qorbits {noun}; rebuild it"
            )),
        ));
    }
    let header = |why: String| (Stage::Header, Error::Database(format!("{p} {why}")));
    let mut bytes = [0u8; HEADER_LEN];
    std::fs::File::open(path)
        .and_then(|mut f| f.read_exact(&mut bytes))
        .map_err(|e| match e.kind() {
            std::io::ErrorKind::UnexpectedEof => header(format!(
                "is not a readable SQLite file: {} bytes, shorter than the SQLite header, so it is \
                 truncated or was never a {noun}; check the path",
                m.len()
            )),
            _ => file(format!("cannot read {p}: {e}")),
        })?;
    let h = check_header_for(f, &bytes, m.len()).map_err(|why| {
        let advice = if why.contains("not an SQLite file") || why.contains("not a qorbits") {
            "check the path".to_string()
        } else if why.contains("schema version") {
            format!("use a matching qorbits release or rebuild the {noun}")
        } else {
            "verify it against its manifest or rebuild it".to_string()
        };
        let why = why.replace(
            "does not start with the SQLite header, so it is not an SQLite file",
            "is not a readable SQLite file (it does not start with the SQLite header)",
        );
        header(format!("{why}; {advice}"))
    })?;
    let conn = Connection::open_with_flags(
        immutable_uri(path),
        OpenFlags::SQLITE_OPEN_READ_ONLY
            | OpenFlags::SQLITE_OPEN_NO_MUTEX
            | OpenFlags::SQLITE_OPEN_URI,
    )
    .and_then(|c| harden(&c).map(|()| c))
    .map_err(|e| {
        (
            Stage::Open,
            Error::Database(format!(
                "{p} is not a readable SQLite file ({e}); check the path"
            )),
        )
    })?;
    let refused = |stage, why: String| {
        (
            stage,
            Error::Database(format!(
                "{p} {why}; it is refused unread, use a {noun} built by qorbits (or verify it against its manifest)"
            )),
        )
    };
    check_schema_in(f, &conn, h.pages).map_err(|why| refused(Stage::Schema, why))?;
    check_meta_in(f, &conn).map_err(|why| refused(Stage::Meta, why))?;
    Ok(conn)
}

/// Checks the `meta` rows of a table: exactly the keys a table has, text, with values this
/// build writes (a height a table can have, `0`/`1`, the label rule, the ordering, the
/// schema version and a version number for the builder).
pub fn check_meta(conn: &Connection) -> std::result::Result<(), String> {
    check_meta_in(&TABLE, conn)
}

/// [`check_meta`] for a file of format `f`: its keys and [`Format::meta_value_ok`].
pub fn check_meta_in(f: &Format, conn: &Connection) -> std::result::Result<(), String> {
    // Text is read as bytes: a file may hold any bytes, and only valid UTF-8 is text here.
    let as_text = |v: ValueRef<'_>| match v {
        ValueRef::Text(t) => std::str::from_utf8(t).ok().map(str::to_string),
        _ => None,
    };
    let got: Vec<(Option<String>, Option<String>)> = (|| {
        let mut st = conn.prepare("SELECT key, value FROM meta ORDER BY key")?;
        let rows = st.query_map([], |r| Ok((as_text(r.get_ref(0)?), as_text(r.get_ref(1)?))))?;
        rows.collect::<rusqlite::Result<Vec<_>>>()
    })()
    .map_err(|e| format!("has a meta table SQLite cannot read ({e})"))?;
    let got: Vec<(String, String)> = got
        .into_iter()
        .map(|kv| match kv {
            (Some(k), Some(v)) => Ok((k, v)),
            (Some(k), None) => Err(format!(
                "has a meta row '{}' whose value is not UTF-8 text",
                shown_name(&k)
            )),
            _ => Err("has a meta row whose key is not UTF-8 text".to_string()),
        })
        .collect::<std::result::Result<_, _>>()?;
    let keys: Vec<&str> = got.iter().map(|(k, _)| k.as_str()).collect();
    let want = f.meta_keys;
    if keys != want {
        return Err(match keys.iter().find(|k| !want.contains(k)) {
            Some(k) => format!(
                "has the meta key '{}', which this qorbits does not write (it writes {})",
                shown_name(k),
                want.join(", ")
            ),
            None => format!(
                "has {} meta rows where a qorbits {} has {} ({})",
                keys.len(),
                f.noun,
                want.len(),
                want.join(", ")
            ),
        });
    }
    let max = crate::enumerate::bounds::MAX_HEIGHT;
    for (k, v) in &got {
        let ok = (f.meta_value_ok)(k, v);
        if !ok {
            let what = match k.as_str() {
                "height" if std::ptr::eq(f, &TABLE) => {
                    format!(", not a height a table can have (1 to {max})")
                }
                _ => String::new(),
            };
            return Err(format!(
                "has the meta row '{k}' = '{}'{what}, which this qorbits does not write",
                shown_name(v)
            ));
        }
    }
    Ok(())
}

/// The domain of the columns of `classes` that take few values, as SQL conditions.
const CLASS_DOMAINS: &[(&str, &str)] = &[
    ("real_roots", "IN (0, 2, 4)"),
    ("signature", "IN ('4real', '2real', 'posdef', 'negdef')"),
    (
        "factorisation",
        "IN ('4', '1+3', '2+2', '1+1+2', '1+1+1+1')",
    ),
    ("irreducible", "IN (0, 1)"),
    ("galois", "IN ('S4', 'A4', 'D4', 'C4', 'V4')"),
    ("stabiliser", "IN (1, 2, 4)"),
    ("els", "IN (0, 1)"),
];

/// Scans `table` once: every value must have its column's declared type (INTEGER or
/// TEXT, NULL only where allowed) and, in `classes`, lie in its column's domain. `Err`
/// names the first row and column that do not.
pub fn check_values(conn: &Connection, table: &str) -> Result<()> {
    let cols = columns(table).ok_or_else(|| {
        Error::Database(format!(
            "no table '{table}' in schema version {SCHEMA_VERSION}"
        ))
    })?;
    let mut conds = Vec::new();
    for c in cols {
        let types = if c.not_null { "" } else { ", 'null'" };
        let t = c.decl.to_ascii_lowercase();
        conds.push(format!("typeof(\"{}\") IN ('{t}'{types})", c.name));
    }
    if table == "classes" {
        for (c, domain) in CLASS_DOMAINS {
            conds.push(format!("(\"{c}\" IS NULL OR \"{c}\" {domain})"));
        }
    }
    let list: Vec<String> = cols
        .iter()
        .map(|c| format!("typeof(\"{}\")", c.name))
        .collect();
    let sql = format!(
        "SELECT quote(\"{}\"), {} FROM \"{table}\" WHERE NOT ({}) LIMIT 1",
        cols[0].name,
        list.join(", "),
        conds.join(" AND ")
    );
    let shown = crate::table::reader::shown(conn);
    let bad = conn
        .query_row(&sql, [], |r| {
            let key = match r.get_ref(0)? {
                ValueRef::Text(t) => String::from_utf8_lossy(t).into_owned(),
                _ => "?".to_string(),
            };
            let types = (0..cols.len())
                .map(|k| r.get::<_, String>(k + 1))
                .collect::<rusqlite::Result<Vec<_>>>()?;
            Ok((key, types))
        })
        .map(Some)
        .or_else(|e| match e {
            rusqlite::Error::QueryReturnedNoRows => Ok(None),
            e => Err(crate::table::reader::read_error(conn, e)),
        })?;
    let Some((key, types)) = bad else {
        return Ok(());
    };
    let key = shown_name(&key);
    let what = match cols.iter().zip(&types).find(|(c, t)| !c.admits(t)) {
        Some((c, t)) => format!(
            "column {} holds {} where schema version {SCHEMA_VERSION} has {}{}",
            c.name,
            t.to_ascii_uppercase(),
            c.decl,
            if c.not_null { " NOT NULL" } else { "" }
        ),
        None => "a value lies outside its column's domain (a real_roots, signature, factorisation, stabiliser, Galois group or flag no class has)"
            .to_string(),
    };
    Err(Error::Database(format!(
        "{shown}: in {table} row {} = {key}, {what}; the table is damaged or was edited, verify it against its manifest",
        cols[0].name
    )))
}

/// The messages of SQLite's page-by-page check (`PRAGMA integrity_check`, at most 10):
/// empty when every page, every index entry and every NOT NULL column is sound.
pub fn integrity(conn: &Connection) -> rusqlite::Result<Vec<String>> {
    let mut st = conn.prepare("PRAGMA integrity_check(10)")?;
    let rows = st.query_map([], |r| r.get::<_, String>(0))?;
    let lines = rows.collect::<rusqlite::Result<Vec<_>>>()?;
    Ok(if lines == ["ok"] {
        Vec::new()
    } else {
        lines
            .iter()
            .flat_map(|l| l.lines())
            .map(str::trim)
            .filter(|l| !l.is_empty() && !l.starts_with("***"))
            .map(shown_name)
            .collect()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn uris_never_carry_parameters_from_the_name() {
        assert_eq!(
            immutable_uri(Path::new("/t/a b?x=1#y.sqlite")),
            "file:///t/a%20b%3Fx%3D1%23y.sqlite?immutable=1"
        );
        assert_eq!(
            immutable_uri(Path::new("t.sqlite")),
            "file:t.sqlite?immutable=1"
        );
        assert_eq!(
            immutable_uri(Path::new("//h/t")),
            "file:////h/t?immutable=1"
        );
    }
}
