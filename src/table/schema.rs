//! The storage contract of a table (schema version 4, `schema/`): the SQL, the fixed file
//! settings, the row order and labelling rule stored in `meta`, the SQL of the content
//! hash, and how values are encoded in columns — one home for each, shared by the writer,
//! the reader and the hashes.
//!
//! ```
//! use qorbits::table::schema::{place_from_column, place_to_column};
//! use qorbits::form::local::Place;
//! assert_eq!(place_to_column(&Place::Real), 0);
//! assert_eq!(place_from_column(7), Some(Place::Prime(7)));
//! ```

use crate::form::galois::{FactorPattern, GaloisGroup};
use crate::form::local::Place;
use crate::form::Signature;

/// Version of the schema written by this builder (also the file's `PRAGMA user_version`).
pub const SCHEMA_VERSION: u32 = 4;

/// `PRAGMA application_id` of every qorbits table: the ASCII bytes `QORB`.
pub const APPLICATION_ID: i32 = 0x514F_5242;

/// The `CREATE TABLE` statements of the current schema version.
pub const SCHEMA_SQL: &str = include_str!("../../schema/v4.sql");

/// The `CREATE INDEX` statements of the current schema, run after the data is inserted.
pub const INDEX_SQL: &str = include_str!("../../schema/v4-indexes.sql");

/// Page size of every table file, fixed so that the bytes do not depend on SQLite defaults.
pub const PAGE_SIZE: u32 = 4096;

/// The row order of `classes`, as stored in `meta` (DESIGN §4).
pub const ORDERING: &str = "h4,I,J,a,b,c,d,e";

/// The labelling rule, as stored in `meta` (see [`crate::table::group`]).
pub const LABEL_RULE: &str = "Q<I>_<J>_<N> is the N-th irreducible and R<I>_<J>_<N> the N-th \
     reducible class with invariants (I, J), counting canonical forms (a,b,c,d,e) in \
     lexicographic order; N has at least three digits (schema/labels.md).";

/// The SQL whose output, rendered as the `sqlite3` shell prints it in list mode (columns
/// joined by `|`, NULL as the empty string, every row ended by `\n`, no header), is hashed
/// by [`content_sha256`].
pub const CONTENT_SQL: &str = "SELECT * FROM meta ORDER BY key; \
     SELECT * FROM classes ORDER BY id; SELECT * FROM local ORDER BY class_id, p = 0, p; \
     SELECT * FROM pairs ORDER BY id; SELECT * FROM pair_primes ORDER BY pair_id, p;";

/// The expression of the `classes_facets` index (schema/v4-indexes.sql): one small integer
/// from the Galois group, the signature, the stabiliser order and `els`. A query selects by
/// those through `FACET_EXPR IN (codes)` ([`facet_code`]) and so searches the index.
pub const FACET_EXPR: &str = "(CASE galois WHEN 'S4' THEN 1 WHEN 'A4' THEN 2 WHEN 'D4' THEN 3 \
     WHEN 'C4' THEN 4 WHEN 'V4' THEN 5 ELSE 0 END) * 64 + (CASE signature WHEN '4real' THEN 0 \
     WHEN '2real' THEN 1 WHEN 'posdef' THEN 2 ELSE 3 END) * 16 + stabiliser * 2 + els";

/// The value of [`FACET_EXPR`] for a class (`galois` `None` for a reducible class).
pub fn facet_code(galois: Option<GaloisGroup>, s: Signature, stabiliser: u8, els: bool) -> i64 {
    let g = match galois {
        None => 0,
        Some(g) => {
            1 + GaloisGroup::ALL
                .iter()
                .position(|x| *x == g)
                .expect("listed") as i64
        }
    };
    let sig = Signature::ALL.iter().position(|x| *x == s).expect("listed") as i64;
    g * 64 + sig * 16 + i64::from(stabiliser) * 2 + i64::from(els)
}

/// The column value of a place in `local.p`: the prime, or 0 for the real place.
pub fn place_to_column(p: &Place<i64>) -> i64 {
    match p {
        Place::Prime(p) => *p,
        Place::Real => 0,
    }
}

/// The place of a `local.p` value (`None` for a value no table holds).
pub fn place_from_column(p: i64) -> Option<Place<i64>> {
    match p {
        0 => Some(Place::Real),
        p if p >= 2 => Some(Place::Prime(p)),
        _ => None,
    }
}

/// The signature named in a column.
pub fn signature_from_name(s: &str) -> Option<Signature> {
    Signature::ALL.into_iter().find(|v| v.name() == s)
}

/// The factorisation pattern named in a column.
pub fn pattern_from_name(s: &str) -> Option<FactorPattern> {
    FactorPattern::ALL.into_iter().find(|v| v.name() == s)
}

/// The Galois group named in a column.
pub fn galois_from_name(s: &str) -> Option<GaloisGroup> {
    GaloisGroup::ALL.into_iter().find(|v| v.name() == s)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_facet_index_uses_the_expression_queries_use() {
        assert!(
            INDEX_SQL.contains(&format!("ON classes (({FACET_EXPR}))"))
                || INDEX_SQL.contains(&format!("ON classes ({FACET_EXPR})"))
        );
        assert_eq!(facet_code(None, Signature::FourReal, 1, false), 2);
        assert_eq!(
            facet_code(Some(GaloisGroup::V4), Signature::NegativeDefinite, 4, true),
            5 * 64 + 3 * 16 + 9
        );
    }
}
