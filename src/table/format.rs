//! The kinds of SQLite file qorbits writes, each a [`Format`]: the table of classes
//! ([`TABLE`], `schema/v4*.sql`) and any other dataset a later stage defines (the curve
//! dataset of `selmer::dataset`). A format fixes what the hostile-input checks of an opened
//! file compare against — the application id and schema version in the header
//! (`table::header`), the SQL the schema must match (`table::schema_check`), the `meta` keys
//! and values (`table::validate`) — and the SQL of its content hash (`table::hash`). The
//! page size and the other file settings are the same for every format
//! (`table::writer::new_database`).
//!
//! ```
//! use qorbits::table::format::TABLE;
//! assert_eq!(TABLE.noun, "table");
//! assert!((TABLE.meta_value_ok)("ordering", "h4,I,J,a,b,c,d,e"));
//! assert!(!(TABLE.meta_value_ok)("include_reducible", "2"));
//! ```

use crate::table::schema::{
    APPLICATION_ID, CONTENT_SQL, INDEX_SQL, LABEL_RULE, ORDERING, SCHEMA_SQL, SCHEMA_VERSION,
};
use crate::table::schema_check::Reference;
use std::sync::OnceLock;

/// One kind of qorbits SQLite file (see the module doc). Make one with [`Format::new`] in a
/// `static`, so that the reference schema is built once.
pub struct Format {
    /// What the file is, in messages after "qorbits": `table`, `curve dataset`.
    pub noun: &'static str,
    /// `PRAGMA application_id` of every file of this format.
    pub application_id: i32,
    /// Its schema version (`PRAGMA user_version`).
    pub schema_version: u32,
    /// The `CREATE TABLE` statements.
    pub schema_sql: &'static str,
    /// The `CREATE INDEX` statements, run after the data.
    pub index_sql: &'static str,
    /// The statements whose sqlite3-shell rendering the content hash hashes, each
    /// `SELECT * FROM <table> ORDER BY …`.
    pub content_sql: &'static str,
    /// The keys of `meta`, in key order.
    pub meta_keys: &'static [&'static str],
    /// Whether `value` is one this build writes for the `meta` key `key`.
    pub meta_value_ok: fn(key: &str, value: &str) -> bool,
    pub(crate) reference: OnceLock<Reference>,
}

impl Format {
    /// A format from its parts (see the fields).
    #[allow(clippy::too_many_arguments)]
    pub const fn new(
        noun: &'static str,
        application_id: i32,
        schema_version: u32,
        schema_sql: &'static str,
        index_sql: &'static str,
        content_sql: &'static str,
        meta_keys: &'static [&'static str],
        meta_value_ok: fn(&str, &str) -> bool,
    ) -> Format {
        Format {
            noun,
            application_id,
            schema_version,
            schema_sql,
            index_sql,
            content_sql,
            meta_keys,
            meta_value_ok,
            reference: OnceLock::new(),
        }
    }
}

/// The `meta` rows a qorbits table has, in key order.
const TABLE_META_KEYS: [&str; 6] = [
    "builder_version",
    "height",
    "include_reducible",
    "label_rule",
    "ordering",
    "schema_version",
];

/// The meta values of a table: a height a table can have, `0`/`1`, and the rows every
/// format has ([`shared_meta_ok`]).
fn table_meta_ok(k: &str, v: &str) -> bool {
    match k {
        "height" => is_height(v, crate::enumerate::bounds::MAX_HEIGHT),
        "include_reducible" => v == "0" || v == "1",
        _ => shared_meta_ok(k, v, ORDERING, SCHEMA_VERSION).unwrap_or(false),
    }
}

/// The `meta` rows every format has: a version number as `builder_version`, the table's
/// label rule (which labels in any file follow), the format's row `ordering` and its
/// `schema_version`. `None` for another key.
pub fn shared_meta_ok(k: &str, v: &str, ordering: &str, schema_version: u32) -> Option<bool> {
    match k {
        "builder_version" => Some(is_version(v)),
        "label_rule" => Some(v == LABEL_RULE),
        "ordering" => Some(v == ordering),
        "schema_version" => Some(v == schema_version.to_string()),
        _ => None,
    }
}

/// The table of classes (schema version 4).
pub static TABLE: Format = Format::new(
    "table",
    APPLICATION_ID,
    SCHEMA_VERSION,
    SCHEMA_SQL,
    INDEX_SQL,
    CONTENT_SQL,
    &TABLE_META_KEYS,
    table_meta_ok,
);

/// A height `1 ..= max` written in decimal as this build writes it.
pub fn is_height(v: &str, max: i128) -> bool {
    v.parse::<i128>()
        .is_ok_and(|h| (1..=max).contains(&h) && h.to_string() == v)
}

/// A version number `x.y.z` with an optional `-suffix` of letters, digits and dots.
pub fn is_version(v: &str) -> bool {
    let (core, suffix) = v.split_once('-').unwrap_or((v, ""));
    let parts: Vec<&str> = core.split('.').collect();
    v.len() <= 64
        && parts.len() == 3
        && parts
            .iter()
            .all(|p| !p.is_empty() && p.bytes().all(|b| b.is_ascii_digit()))
        && suffix
            .bytes()
            .all(|b| b.is_ascii_alphanumeric() || b == b'.')
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn versions_and_heights() {
        assert!(is_version("0.2.0") && is_version("1.10.3-rc.1"));
        assert!(!is_version("0.2") && !is_version("0.2.0\n") && !is_version("a.b.c"));
        assert!(is_height("10000", 10_000) && !is_height("010", 100) && !is_height("0", 9));
    }
}
