//! The two hashes of a table (DESIGN §5): the SHA-256 of the file ([`file_sha256`]) and
//! the content hash ([`content_sha256`]), the SHA-256 of the text the `sqlite3` shell
//! prints for [`CONTENT_SQL`](crate::table::schema::CONTENT_SQL) — reproducible without qorbits.
//!
//! ```
//! use qorbits::table::hash::hex;
//! assert_eq!(hex(&[0, 255, 16]), "00ff10");
//! ```

use crate::error::{Error, Result};
use crate::table::format::{Format, TABLE};
use crate::table::pieces;
use crate::table::reader::{read_error, shown};
use crate::table::schema_check::{columns_in, Column};
use rusqlite::types::ValueRef;
use rusqlite::Connection;
use sha2::{Digest, Sha256};
use std::fs::File;
use std::io::{Read, Write};
use std::path::Path;

/// The statements of a content SQL, in order.
pub(crate) fn content_statements(sql: &'static str) -> impl Iterator<Item = &'static str> {
    sql.split(';').map(str::trim).filter(|s| !s.is_empty())
}

/// Writes the rendering of [`CONTENT_SQL`](crate::table::schema::CONTENT_SQL) that [`content_sha256`] hashes: what the
/// `sqlite3` shell prints in list mode with separator `|` and no header (integers in
/// decimal, text verbatim, NULL as the empty string, each row ended by `\n`).
pub fn render_content(conn: &Connection, out: &mut dyn Write) -> Result<()> {
    render_content_in(&TABLE, conn, out)
}

/// [`render_content`] of a file of format `f`: its [`Format::content_sql`], each value
/// checked against the column types of its schema.
pub fn render_content_in(f: &'static Format, conn: &Connection, out: &mut dyn Write) -> Result<()> {
    let io = |e: std::io::Error| Error::Io(format!("cannot write the content rendering: {e}"));
    let mut line = Vec::new();
    for sql in content_statements(f.content_sql) {
        let table = statement_table(sql);
        let cols = columns_in(f, table).expect("content statements name schema tables");
        let mut st = conn.prepare(sql).map_err(|e| read_error(conn, e))?;
        let n = st.column_count();
        let mut rows = st.query([]).map_err(|e| read_error(conn, e))?;
        let mut row = 0u64;
        while let Some(r) = rows.next().map_err(|e| read_error(conn, e))? {
            row += 1;
            line.clear();
            render_row(r, n, cols, &mut line).map_err(|bad| {
                let col = cols.get(bad.column);
                let (name, decl) = col.map_or(("?", "no column"), |c| (&*c.name, &*c.decl));
                let not_null = if col.is_some_and(|c| c.not_null) {
                    " NOT NULL"
                } else {
                    ""
                };
                match bad.error {
                    Some(e) => read_error(conn, e),
                    None => Error::Database(format!(
                        "{}: {table}.{name} holds {} in row {row} of \"{sql}\" where schema \
                         version {} has {decl}{not_null}; the {} is damaged or was edited, \
                         verify it against its manifest",
                        shown(conn),
                        bad.kind.to_ascii_uppercase(),
                        f.schema_version,
                        f.noun,
                    )),
                }
            })?;
            out.write_all(&line).map_err(io)?;
        }
    }
    Ok(())
}

/// The table a content statement reads: each is `SELECT * FROM <table> ...`, so its
/// columns are the table's.
pub(crate) fn statement_table(sql: &str) -> &str {
    sql.split_whitespace()
        .skip_while(|w| *w != "FROM")
        .nth(1)
        .expect("a table in every content statement")
}

/// A value [`render_row`] cannot render: of a type its column does not admit, or unreadable.
pub(crate) struct BadValue {
    /// The position of the column.
    pub column: usize,
    /// The SQLite type of the value (`null`, `integer`, `text`, `real`, `blob`, or
    /// `invalid UTF-8 text`).
    pub kind: &'static str,
    /// SQLite's error when the value could not be read.
    pub error: Option<rusqlite::Error>,
}

/// Appends the line of one row of `n` columns (`cols` its schema columns) as the `sqlite3`
/// shell prints it, `\n` included. Only the types the schema declares are rendered: the
/// rendering is then the same on every platform, and a value of another type is damage,
/// not content.
pub(crate) fn render_row(
    r: &rusqlite::Row<'_>,
    n: usize,
    cols: &[Column],
    line: &mut Vec<u8>,
) -> std::result::Result<(), BadValue> {
    for k in 0..n {
        if k > 0 {
            line.push(b'|');
        }
        let v = r.get_ref(k).map_err(|e| BadValue {
            column: k,
            kind: "unreadable",
            error: Some(e),
        })?;
        let kind = match v {
            ValueRef::Null => "null",
            ValueRef::Integer(v) => {
                push_decimal(line, v);
                "integer"
            }
            // Text must be UTF-8, the encoding of every table.
            ValueRef::Text(t) if std::str::from_utf8(t).is_err() => "invalid UTF-8 text",
            ValueRef::Text(t) => {
                line.extend_from_slice(t);
                "text"
            }
            ValueRef::Real(_) => "real",
            ValueRef::Blob(_) => "blob",
        };
        if cols.get(k).is_none_or(|c| !c.admits(kind)) {
            return Err(BadValue {
                column: k,
                kind,
                error: None,
            });
        }
    }
    line.push(b'\n');
    Ok(())
}

/// Appends the decimal digits of `v` (as the `sqlite3` shell prints an integer).
fn push_decimal(out: &mut Vec<u8>, v: i64) {
    let mut digits = [0u8; 20];
    let mut n = v.unsigned_abs();
    let mut k = digits.len();
    loop {
        k -= 1;
        digits[k] = b'0' + (n % 10) as u8;
        n /= 10;
        if n == 0 {
            break;
        }
    }
    if v < 0 {
        out.push(b'-');
    }
    out.extend_from_slice(&digits[k..]);
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
pub fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// The content hash: SHA-256 (lowercase hex) of [`render_content`], equal to
/// `sqlite3 -batch -noheader -list -separator '|' FILE "<CONTENT_SQL>" | sha256sum`.
pub fn content_sha256(conn: &Connection) -> Result<String> {
    content_sha256_in(&TABLE, conn)
}

/// [`content_sha256`] of a file of format `f` ([`render_content_in`]). A file with no
/// transaction open is rendered in parallel on the current rayon pool
/// ([`crate::table::pieces`]), to the same text; anything that path does not expect falls
/// back to the serial rendering here.
pub fn content_sha256_in(f: &'static Format, conn: &Connection) -> Result<String> {
    if let Some(path) = conn
        .path()
        .filter(|p| !p.is_empty() && conn.is_autocommit())
    {
        if let Ok(hash) = pieces::content_sha256(f, Path::new(path), pieces::PIECE_KEYS) {
            return Ok(hash);
        }
    }
    content_sha256_serial(f, conn)
}

/// [`content_sha256_in`] on one connection, in one pass: the reference.
pub fn content_sha256_serial(f: &'static Format, conn: &Connection) -> Result<String> {
    let mut h = HashWriter(Sha256::new());
    render_content_in(f, conn, &mut h)?;
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
