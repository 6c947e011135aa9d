//! Exporting a table: every class with every column of `classes` and its local data, in
//! table order, as CSV (RFC 4180, one row per class, the local data in one column) or JSON
//! Lines (one object per class, the local data nested), streamed one class at a time so
//! that memory does not grow with the table (docs/output.md, `export`).
//!
//! ```
//! use qorbits::table::export::local_text;
//! use qorbits::form::local::{LocalPlace, Place};
//! let l = vec![
//!     LocalPlace { place: Place::Prime(2), v_disc: Some(2), pattern: "1 1 1^2".into(), soluble: true },
//!     LocalPlace { place: Place::Real, v_disc: None, pattern: "2real".into(), soluble: true },
//! ];
//! assert_eq!(local_text(&l), "2:2:1 1 1^2:1;0::2real:1");
//! ```

use crate::error::{Error, Result};
use crate::form::local::LocalPlace;
use crate::progress::Progress;
use crate::table::reader::{for_each_class, read_error, StoredRow, CLASS_COLUMNS};
use crate::table::row::ClassRow;
use crate::table::schema::place_to_column;
use crate::table::space::{cause_of, no_space};
use rusqlite::Connection;
use serde_json::{Map, Value};
use std::io::Write;

/// The format of an export.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ExportFormat {
    /// CSV with a header line: the columns of `classes`, then `local`.
    Csv,
    /// One JSON object per class, the local data nested.
    Jsonl,
}

/// The names of the first columns of every CSV and text table of classes: the label, the
/// canonical form, the invariants and the discriminant.
pub const FORM_COLUMNS: [&str; 9] = ["label", "a", "b", "c", "d", "e", "I", "J", "disc"];

/// The CSV header: the columns of `classes` as the table names them, then `local`.
pub const CSV_COLUMNS: [&str; 21] = [
    "id",
    FORM_COLUMNS[0],
    FORM_COLUMNS[1],
    FORM_COLUMNS[2],
    FORM_COLUMNS[3],
    FORM_COLUMNS[4],
    FORM_COLUMNS[5],
    FORM_COLUMNS[6],
    FORM_COLUMNS[7],
    FORM_COLUMNS[8],
    "h4",
    "real_roots",
    "signature",
    "factorisation",
    "irreducible",
    "galois",
    "stabiliser",
    "els",
    "insoluble_at",
    "rational_class",
    "local",
];

/// The local data of a class in one CSV cell: the rows of `local` as stored
/// (`p:v_disc:pattern:soluble`, p = 0 for the real place, an empty v_disc for NULL),
/// separated by `;`, in the order of the places (primes increasing, then the real place).
pub fn local_text(places: &[LocalPlace<i64>]) -> String {
    places
        .iter()
        .map(|l| {
            format!(
                "{}:{}:{}:{}",
                place_to_column(&l.place),
                l.v_disc.map(|v| v.to_string()).unwrap_or_default(),
                l.pattern,
                u8::from(l.soluble)
            )
        })
        .collect::<Vec<_>>()
        .join(";")
}

/// The text of the columns `label, a, b, c, d, e, I, J, disc, h4, real_roots, signature,
/// factorisation` of a class (shared by every CSV and text table of classes).
pub fn core_fields(r: &ClassRow) -> Vec<String> {
    let mut f = vec![r.label.clone()];
    f.extend(r.form.iter().map(i64::to_string));
    f.extend([r.i, r.j, r.disc, r.h4].map(|v| v.to_string()));
    f.extend([
        r.signature.real_roots().to_string(),
        r.signature.name().to_string(),
        r.pattern.name().to_string(),
    ]);
    f
}

/// The CSV record of a class.
pub fn csv_record(s: &StoredRow) -> Vec<String> {
    let r = &s.row;
    let mut f = vec![s.id.to_string()];
    f.extend(core_fields(r));
    f.extend([
        u8::from(r.irreducible()).to_string(),
        r.galois.map(|g| g.name()).unwrap_or("").to_string(),
        r.stabiliser.to_string(),
        u8::from(r.els()).to_string(),
        r.insoluble_at(),
        s.rational_id.map(|v| v.to_string()).unwrap_or_default(),
        local_text(&r.local),
    ]);
    f
}

/// The JSON object of a class in an export: `id`, the keys of a class object
/// (docs/output.md), then `rational_class_id`.
pub fn json_object(s: &StoredRow) -> Value {
    let mut m = Map::new();
    m.insert("id".into(), Value::from(s.id));
    if let Ok(Value::Object(o)) = serde_json::to_value(&s.row) {
        m.extend(o);
    }
    m.insert("rational_class_id".into(), s.rational_id.into());
    Value::Object(m)
}

/// The SQL of an export: every class, or those where the SQL expression `filter` over the
/// columns of `classes` holds, in table order.
pub fn export_sql(filter: Option<&str>) -> String {
    match filter {
        Some(w) => format!("SELECT {CLASS_COLUMNS} FROM classes c WHERE ({w}) ORDER BY c.id"),
        None => format!("SELECT {CLASS_COLUMNS} FROM classes c ORDER BY c.id"),
    }
}

/// The name a failed write of an export gives as its file ([`Error::NoSpace`]): the caller
/// knows the real one and puts it in ([`crate::table::space::retarget`]).
pub const OUTPUT: &str = "the export output";

/// The error for a failed write of an export: [`Error::NoSpace`] (naming [`OUTPUT`]) when
/// there was no room, else a one-line [`Error::Io`].
pub fn export_error(e: std::io::Error) -> Error {
    match cause_of(&e) {
        Some(c) => no_space(std::path::Path::new(OUTPUT), c),
        None => Error::Io(format!("cannot write the export: {e}")),
    }
}

/// The bytes an export of every class of the table writes, by the plan model
/// ([`crate::table::plan::export_bytes`]).
pub fn export_need(conn: &Connection, format: ExportFormat, gzip: bool) -> Result<f64> {
    let classes = class_total(conn)?;
    Ok(crate::table::plan::export_bytes(
        classes.max(0) as u64,
        format == ExportFormat::Jsonl,
        gzip,
    ))
}

/// The classes of the table, by the counts of `pairs`.
fn class_total(conn: &Connection) -> Result<i64> {
    conn.query_row("SELECT coalesce(sum(classes), 0) FROM pairs", [], |r| {
        r.get(0)
    })
    .map_err(|e| read_error(conn, e))
}

/// Writes the classes of the table (those where `filter` holds, if given) to `out` in
/// `format`, streaming; `progress` hears of every class. Returns the number of classes.
pub fn export(
    conn: &Connection,
    format: ExportFormat,
    filter: Option<&str>,
    out: &mut dyn Write,
    progress: &dyn Progress,
) -> Result<u64> {
    if let Some(w) = filter.filter(|w| w.contains(';') || w.contains("--") || w.contains("/*")) {
        return Err(Error::Input(format!(
            "--where '{w}' holds ';' or a comment; give one SQL condition on the columns of classes"
        )));
    }
    let sql = export_sql(filter);
    // Check the filter before writing anything (one statement, known columns).
    conn.prepare(&sql).map_err(|e| match filter {
        Some(w) => Error::Input(format!(
            "--where '{w}' is not an SQL condition on the columns of classes ({e}); e.g. \
             --where \"galois = 'S4' AND els = 1\""
        )),
        None => read_error(conn, e),
    })?;
    let total: i64 = if filter.is_none() {
        class_total(conn)?
    } else {
        0
    };
    progress.start("exporting the classes", total.max(0) as u64);
    let io = export_error;
    let csv_io = |e: csv::Error| match e.kind() {
        csv::ErrorKind::Io(io) if cause_of(io).is_some() => {
            no_space(std::path::Path::new(OUTPUT), cause_of(io).expect("a cause"))
        }
        _ => Error::Io(format!("cannot write the export: {e}")),
    };
    let mut n = 0u64;
    match format {
        ExportFormat::Csv => {
            let mut w = csv::Writer::from_writer(&mut *out);
            w.write_record(CSV_COLUMNS).map_err(csv_io)?;
            for_each_class(conn, &sql, [], |s| {
                w.write_record(csv_record(&s)).map_err(csv_io)?;
                n += 1;
                progress.advance(1);
                Ok(())
            })?;
            w.flush().map_err(io)?;
        }
        ExportFormat::Jsonl => {
            let mut w = std::io::BufWriter::new(&mut *out);
            let mut line = Vec::new();
            for_each_class(conn, &sql, [], |s| {
                line.clear();
                serde_json::to_writer(&mut line, &json_object(&s))
                    .map_err(|e| Error::Io(format!("cannot write the export: {e}")))?;
                line.push(b'\n');
                w.write_all(&line).map_err(io)?;
                n += 1;
                progress.advance(1);
                Ok(())
            })?;
            w.flush().map_err(io)?;
        }
    }
    out.flush().map_err(io)?;
    Ok(n)
}
