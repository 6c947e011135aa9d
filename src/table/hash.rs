//! The two hashes of a table (DESIGN §5): the SHA-256 of the file ([`file_sha256`]) and
//! the content hash ([`content_sha256`]), the SHA-256 of the text the `sqlite3` shell
//! prints for [`CONTENT_SQL`] — reproducible without qorbits.
//!
//! ```
//! use qorbits::table::hash::hex;
//! assert_eq!(hex(&[0, 255, 16]), "00ff10");
//! ```

use crate::error::{Error, Result};
use crate::table::reader::{read_error, shown};
use crate::table::schema::{CONTENT_SQL, SCHEMA_VERSION};
use rusqlite::types::ValueRef;
use rusqlite::Connection;
use sha2::{Digest, Sha256};
use std::fs::File;
use std::io::{Read, Write};
use std::path::Path;

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
pub fn hex(bytes: &[u8]) -> String {
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
