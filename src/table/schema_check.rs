//! The schema of a table file against the schema this build writes: exactly the tables and
//! indexes that `schema/v4.sql` and `schema/v4-indexes.sql` create, each with the very
//! `CREATE` statement SQLite stored for them, and nothing else — no trigger, view or virtual
//! table, no extra table or index, no column of another type, no constraint, collation or
//! default of its own. The reference is made by running those two files in an in-memory
//! database and reading its `sqlite_schema` and `pragma_table_xinfo` back, so it cannot
//! drift from the writer. A mismatch is named in words (which object, which column). The
//! `_in` functions check a file of another [`Format`] the same way against its own SQL.
//!
//! ```
//! use qorbits::table::schema_check::{check_schema, columns};
//! let c = rusqlite::Connection::open_in_memory().unwrap();
//! c.execute_batch(qorbits::table::schema::SCHEMA_SQL).unwrap();
//! let e = check_schema(&c, 100).unwrap_err();
//! assert!(e.contains("lacks the index 'pairs_ij'"), "{e}");
//! assert_eq!(columns("classes").unwrap().len(), 20);
//! ```

use crate::table::format::{Format, TABLE};
use crate::table::pages::{Slot, Tree};
use rusqlite::Connection;

/// One row of `sqlite_schema`.
#[derive(Clone, Debug, PartialEq, Eq)]
struct Entry {
    kind: String,
    name: String,
    table: String,
    root: i64,
    sql: Option<String>,
}

/// A column as `pragma_table_xinfo` describes it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Column {
    /// Its name.
    pub name: String,
    /// The declared type (`INTEGER` or `TEXT` in every qorbits table).
    pub decl: String,
    /// Declared `NOT NULL`.
    pub not_null: bool,
    default: Option<String>,
    pk: i64,
    hidden: i64,
}

impl Column {
    /// Whether a stored value of SQLite type `typeof` (`integer`, `text`, `null`, `real`,
    /// `blob`) is one this column may hold.
    pub fn admits(&self, typeof_name: &str) -> bool {
        match typeof_name {
            "null" => !self.not_null,
            "integer" => self.decl == "INTEGER",
            "text" => self.decl == "TEXT",
            _ => false,
        }
    }
}

/// The schema of a [`Format`] as SQLite stores it, built once per format.
pub(crate) struct Reference {
    entries: Vec<Entry>,
    columns: Vec<(String, Vec<Column>)>,
    /// Each table and index as a b-tree (root pages as in the reference database).
    records: Vec<Tree>,
}

/// The values of the records of a table or index of the reference, in stored order: a rowid
/// table's columns (its INTEGER PRIMARY KEY as the rowid), a WITHOUT ROWID table's key
/// columns then the others, an index's columns then the rowid.
/// With the number of leading values that form the key of an index b-tree.
type Records = (bool, Vec<(String, Slot)>, usize);

fn record_slots(c: &Connection, e: &Entry) -> rusqlite::Result<Records> {
    let slot = |col: &Column| {
        let nullable = !col.not_null;
        if col.decl == "TEXT" {
            Slot::Text { nullable }
        } else {
            Slot::Int { nullable }
        }
    };
    if e.kind == "table" {
        let cols = table_columns(c, &e.name)?;
        let without_rowid = e
            .sql
            .as_deref()
            .is_some_and(|s| s.contains("WITHOUT ROWID"));
        let keys = cols.iter().filter(|c| c.pk > 0).count();
        let mut order: Vec<&Column> = cols.iter().collect();
        if without_rowid {
            order.sort_by_key(|c| (c.pk == 0, c.pk));
        }
        let slots = order
            .into_iter()
            .map(|col| {
                let alias = !without_rowid && keys == 1 && col.pk == 1 && col.decl == "INTEGER";
                (
                    col.name.clone(),
                    if alias { Slot::RowidAlias } else { slot(col) },
                )
            })
            .collect();
        let key_len = if without_rowid { keys } else { 0 };
        return Ok((!without_rowid, slots, key_len));
    }
    let table = table_columns(c, &e.table)?;
    let sql = "SELECT cid, name FROM pragma_index_xinfo(?1) ORDER BY seqno";
    let cols: Vec<(i64, Option<String>)> = rows(c, sql, [&e.name], |r| Ok((r.get(0)?, r.get(1)?)))?;
    let mut slots = Vec::new();
    for (cid, name) in cols {
        let s = match usize::try_from(cid).ok().and_then(|k| table.get(k)) {
            Some(col) => slot(col),
            // -1: the rowid; -2: an expression (integer-valued in every index of the schema).
            None => Slot::Int {
                nullable: cid != -1,
            },
        };
        let name = name.unwrap_or_else(|| if cid == -1 { "rowid" } else { "(expression)" }.into());
        slots.push((name, s));
    }
    let key_len = slots.len();
    Ok((false, slots, key_len))
}

/// Every row of a query, mapped by `f`.
fn rows<T, P: rusqlite::Params>(
    conn: &Connection,
    sql: &str,
    params: P,
    f: impl FnMut(&rusqlite::Row<'_>) -> rusqlite::Result<T>,
) -> rusqlite::Result<Vec<T>> {
    conn.prepare(sql)?.query_map(params, f)?.collect()
}

fn entries(conn: &Connection) -> rusqlite::Result<Vec<Entry>> {
    let sql = "SELECT type, name, tbl_name, rootpage, sql FROM sqlite_schema ORDER BY rowid";
    rows(conn, sql, [], |r| {
        let (kind, name, table) = (r.get(0)?, r.get(1)?, r.get(2)?);
        let (root, sql) = (r.get(3)?, r.get(4)?);
        Ok(Entry {
            kind,
            name,
            table,
            root,
            sql,
        })
    })
}

fn table_columns(conn: &Connection, table: &str) -> rusqlite::Result<Vec<Column>> {
    let sql = "SELECT name, type, \"notnull\", dflt_value, pk, hidden FROM pragma_table_xinfo(?1) \
               ORDER BY cid";
    rows(conn, sql, [table], |r| {
        let (name, decl, not_null) = (r.get(0)?, r.get(1)?, r.get(2)?);
        let (default, pk, hidden) = (r.get(3)?, r.get(4)?, r.get(5)?);
        Ok(Column {
            name,
            decl,
            not_null,
            default,
            pk,
            hidden,
        })
    })
}

fn reference(f: &'static Format) -> &'static Reference {
    f.reference.get_or_init(|| {
        // The SQL is compiled in and run by the writer on every build; failing here is a
        // defect of this build, which the unit tests would show.
        let c = Connection::open_in_memory().expect("an in-memory database");
        c.execute_batch(f.schema_sql).expect("the schema SQL runs");
        c.execute_batch(f.index_sql).expect("the index SQL runs");
        let entries = entries(&c).expect("the reference schema reads back");
        let columns = entries
            .iter()
            .filter(|e| e.kind == "table")
            .map(|e| {
                let cols = table_columns(&c, &e.name).expect("the reference columns read back");
                (e.name.clone(), cols)
            })
            .collect();
        let records = entries
            .iter()
            .map(|e| {
                let (rowid, slots, key_len) =
                    record_slots(&c, e).expect("the reference records read back");
                Tree {
                    name: e.name.clone(),
                    root: 0,
                    rowid,
                    slots,
                    key_len,
                }
            })
            .collect();
        Reference {
            entries,
            columns,
            records,
        }
    })
}

/// The columns of a table of the table schema, in order (`None` for a name the schema
/// lacks).
pub fn columns(table: &str) -> Option<&'static [Column]> {
    columns_in(&TABLE, table)
}

/// The columns of a table of the schema of `f`, in order.
pub fn columns_in(f: &'static Format, table: &str) -> Option<&'static [Column]> {
    reference(f)
        .columns
        .iter()
        .find(|(t, _)| t == table)
        .map(|(_, c)| c.as_slice())
}

/// The b-trees of a file of format `f` whose schema passed [`check_schema_in`]:
/// `sqlite_schema` on page 1 and every table and index at the root page the file records,
/// with the records the schema gives them.
pub fn trees_in(f: &'static Format, conn: &Connection) -> rusqlite::Result<Vec<Tree>> {
    let text = |nullable| Slot::Text { nullable };
    let mut out = vec![Tree {
        name: "sqlite_schema".into(),
        root: 1,
        rowid: true,
        slots: vec![
            ("type".into(), text(false)),
            ("name".into(), text(false)),
            ("tbl_name".into(), text(false)),
            ("rootpage".into(), Slot::Int { nullable: false }),
            ("sql".into(), text(true)),
        ],
        key_len: 0,
    }];
    for e in entries(conn)? {
        if let Some(t) = reference(f).records.iter().find(|t| t.name == e.name) {
            out.push(Tree {
                root: u32::try_from(e.root).unwrap_or(0),
                ..t.clone()
            });
        }
    }
    Ok(out)
}

/// A name from a file, safe to put in a one-line message: escaped and cut short.
pub fn shown_name(s: &str) -> String {
    let mut out: String = s.chars().take(60).flat_map(char::escape_debug).collect();
    if s.chars().count() > 60 {
        out.push('…');
    }
    out
}

/// Checks the schema of a table file of `pages` pages. `Err` names the first difference in
/// words that follow the file name ("has a trigger 'x' …").
pub fn check_schema(conn: &Connection, pages: u32) -> Result<(), String> {
    check_schema_in(&TABLE, conn, pages)
}

/// Checks the schema of a file of format `f` with `pages` pages (see [`check_schema`]).
pub fn check_schema_in(f: &'static Format, conn: &Connection, pages: u32) -> Result<(), String> {
    let file = entries(conn).map_err(|e| format!("has a schema SQLite cannot read ({e})"))?;
    let want = reference(f);
    let v = f.schema_version;
    let none = format!("no qorbits {}", f.noun);
    for e in &file {
        let name = shown_name(&e.name);
        let is_virtual = e.sql.as_deref().is_some_and(|s| {
            s.get(..20)
                .is_some_and(|p| p.eq_ignore_ascii_case("CREATE VIRTUAL TABLE"))
        });
        match e.kind.as_str() {
            "trigger" => {
                return Err(format!(
                    "has a trigger '{name}' on '{}', which {none} has",
                    shown_name(&e.table)
                ))
            }
            "view" => return Err(format!("has a view '{name}', which {none} has")),
            "table" if is_virtual => {
                return Err(format!("has a virtual table '{name}', which {none} has"))
            }
            "table" | "index" => {}
            other => {
                return Err(format!(
                    "has a schema entry '{name}' of kind '{}', which {none} has",
                    shown_name(other)
                ))
            }
        }
    }
    for e in &file {
        if !want
            .entries
            .iter()
            .any(|w| w.kind == e.kind && w.name == e.name)
        {
            return Err(format!(
                "has the {} '{}', which schema version {v} does not have",
                e.kind,
                shown_name(&e.name)
            ));
        }
    }
    for w in &want.entries {
        let Some(e) = file.iter().find(|e| e.kind == w.kind && e.name == w.name) else {
            return Err(format!(
                "lacks the {} '{}' of schema version {v}",
                w.kind, w.name
            ));
        };
        if e.table != w.table || e.sql != w.sql {
            return Err(match columns_in(f, &w.name) {
                Some(cols) => column_difference(conn, &w.name, cols, v),
                None => format!(
                    "has an index '{}' that is not the one of schema version {v} (its CREATE \
                     statement differs)",
                    w.name
                ),
            });
        }
    }
    let mut roots: Vec<i64> = file.iter().map(|e| e.root).collect();
    roots.sort_unstable();
    let in_file = |r: i64| (2..=i64::from(pages)).contains(&r);
    if roots.iter().any(|&r| !in_file(r)) || roots.windows(2).any(|w| w[0] == w[1]) {
        return Err(format!(
            "has a damaged schema: its tables and indexes do not start on distinct pages \
             within its {pages} pages"
        ));
    }
    Ok(())
}

/// What differs between the columns of `table` in the file and `want`.
fn column_difference(conn: &Connection, table: &str, want: &[Column], v: u32) -> String {
    let got = match table_columns(conn, table) {
        Ok(c) => c,
        Err(e) => return format!("has a table '{table}' whose columns cannot be read ({e})"),
    };
    if got.len() != want.len() {
        return format!(
            "has a table '{table}' with {} columns, schema version {v} has {}",
            got.len(),
            want.len()
        );
    }
    for (k, (g, w)) in got.iter().zip(want).enumerate() {
        let col = format!("{table}.{}", w.name);
        if g.name != w.name {
            return format!(
                "has '{}' as column {} of table '{table}', schema version {v} has '{}'",
                shown_name(&g.name),
                k + 1,
                w.name
            );
        }
        if g.decl != w.decl {
            let decl = if g.decl.is_empty() {
                "without a type".to_string()
            } else {
                format!("as {}", shown_name(&g.decl))
            };
            return format!(
                "declares column {col} {decl}, schema version {v} declares it as {}",
                w.decl
            );
        }
        if g.not_null != w.not_null {
            let (is, was) = if g.not_null {
                ("NOT NULL", "may be NULL")
            } else {
                ("nullable", "is NOT NULL")
            };
            return format!("declares column {col} {is}; in schema version {v} it {was}");
        }
        if (&g.default, g.pk, g.hidden) != (&w.default, w.pk, w.hidden) {
            return format!(
                "declares column {col} with another default, key or generated value than \
                 schema version {v}"
            );
        }
    }
    format!(
        "has a table '{table}' with constraints, collations or options that schema version {v} \
         does not have (its CREATE statement differs)"
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn with(extra: &str) -> Result<(), String> {
        let c = Connection::open_in_memory().unwrap();
        c.execute_batch(TABLE.schema_sql).unwrap();
        c.execute_batch(TABLE.index_sql).unwrap();
        c.execute_batch(extra).unwrap();
        check_schema(&c, 1000)
    }

    #[test]
    fn the_reference_passes_and_every_addition_is_named() {
        assert_eq!(with(""), Ok(()));
        let cases = [
            ("CREATE VIEW v AS SELECT 1", "has a view 'v'"),
            (
                "CREATE TRIGGER t AFTER INSERT ON meta BEGIN SELECT 1; END",
                "has a trigger 't' on 'meta'",
            ),
            ("CREATE TABLE extra (x INTEGER)", "has the table 'extra'"),
            ("CREATE INDEX ix ON classes (a)", "has the index 'ix'"),
            ("DROP INDEX pairs_h4", "lacks the index 'pairs_h4'"),
            (
                "DROP TABLE pair_primes; CREATE VIRTUAL TABLE pair_primes USING rtree(id, x0, x1)",
                "has a virtual table 'pair_primes'",
            ),
            (
                "DROP INDEX pairs_h4; CREATE INDEX pairs_h4 ON pairs (h4 DESC)",
                "index 'pairs_h4' that is not the one",
            ),
            (
                "DROP TABLE meta; CREATE TABLE meta (key TEXT PRIMARY KEY, value BLOB NOT NULL) WITHOUT ROWID",
                "declares column meta.value as BLOB",
            ),
            (
                "DROP TABLE meta; CREATE TABLE meta (key TEXT PRIMARY KEY COLLATE NOCASE, value TEXT NOT NULL) WITHOUT ROWID",
                "constraints, collations or options",
            ),
            (
                "DROP TABLE meta; CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT) WITHOUT ROWID",
                "declares column meta.value nullable",
            ),
        ];
        for (sql, want) in cases {
            let e = with(sql).unwrap_err();
            assert!(e.contains(want), "{sql}: {e}");
            assert!(!e.contains('\n'), "{e}");
        }
    }

    #[test]
    fn names_from_a_file_are_escaped() {
        assert_eq!(shown_name("a\nb"), "a\\nb");
        assert_eq!(shown_name(&"x".repeat(100)).chars().count(), 61);
    }
}
