//! Selections beyond (I, J) on the published H < 10⁵ tier: every kind of selection gives
//! exactly the rows a plain filter over the whole table gives, in table order, with the
//! limit; and `EXPLAIN QUERY PLAN` shows that no documented query scans the whole table
//! (each searches an index: `pairs_ij`, `pairs_disc`, `pairs_h4`, `classes_facets` or the
//! key), including the queries of schema/README.md and of the README's Python section.

mod common;

use common::tier::tier_1e5;
use qorbits::form::galois::GaloisGroup;
use qorbits::form::Signature;
use qorbits::table::reader::{class_rows, open_table, CLASS_COLUMNS};
use qorbits::table::row::ClassRow;
use qorbits::table::select::{select, Selection};
use rusqlite::Connection;

fn all_rows(conn: &Connection) -> Vec<ClassRow> {
    class_rows(
        conn,
        &format!("SELECT {CLASS_COLUMNS} FROM classes c ORDER BY c.id"),
        [],
    )
    .unwrap()
}

/// The plan of a query, one line per step.
fn plan(conn: &Connection, sql: &str, params: &[i64]) -> Vec<String> {
    let mut st = conn.prepare(&format!("EXPLAIN QUERY PLAN {sql}")).unwrap();
    st.query_map(rusqlite::params_from_iter(params), |r| {
        r.get::<_, String>(3)
    })
    .unwrap()
    .collect::<Result<_, _>>()
    .unwrap()
}

fn assert_no_scan(conn: &Connection, sql: &str, params: &[i64]) {
    let p = plan(conn, sql, params);
    assert!(
        p.iter().any(|l| l.starts_with("SEARCH")),
        "{sql}: no index search: {p:?}"
    );
    for l in &p {
        assert!(
            !l.starts_with("SCAN") && !l.contains("AUTOMATIC"),
            "{sql}: scans the whole table: {p:?}"
        );
    }
}

fn selections() -> Vec<(&'static str, Selection)> {
    let s = Selection::default;
    vec![
        (
            "pair",
            Selection {
                pair: Some((28, -160)),
                ..s()
            },
        ),
        (
            "disc",
            Selection {
                disc: Some(-283),
                ..s()
            },
        ),
        (
            "disc, facets",
            Selection {
                disc: Some(2304),
                els: Some(true),
                ..s()
            },
        ),
        (
            "height range",
            Selection {
                h4_from: Some(4 * 10_000),
                h4_below: Some(4 * 20_000),
                ..s()
            },
        ),
        (
            "height below",
            Selection {
                h4_below: Some(4 * 3000),
                ..s()
            },
        ),
        (
            "height and Galois",
            Selection {
                h4_from: Some(4 * 50_000),
                galois: vec![GaloisGroup::D4],
                limit: Some(7),
                ..s()
            },
        ),
        (
            "Galois",
            Selection {
                galois: vec![GaloisGroup::C4, GaloisGroup::V4],
                ..s()
            },
        ),
        (
            "Galois, limit",
            Selection {
                galois: vec![GaloisGroup::S4],
                limit: Some(25),
                ..s()
            },
        ),
        (
            "signature",
            Selection {
                signature: vec![Signature::FourReal],
                ..s()
            },
        ),
        (
            "stabiliser",
            Selection {
                stabiliser: vec![4],
                ..s()
            },
        ),
        (
            "not ELS",
            Selection {
                els: Some(false),
                limit: Some(40),
                ..s()
            },
        ),
        (
            "facets together",
            Selection {
                galois: vec![GaloisGroup::D4],
                signature: vec![Signature::PositiveDefinite, Signature::NegativeDefinite],
                stabiliser: vec![2],
                els: Some(true),
                ..s()
            },
        ),
        (
            "label",
            Selection {
                label: Some("Q28_-160_002".into()),
                ..s()
            },
        ),
        (
            "id",
            Selection {
                id: Some(777),
                ..s()
            },
        ),
    ]
}

#[test]
fn every_selection_is_the_plain_filter_in_table_order() {
    let conn = open_table(&tier_1e5()).unwrap();
    let all = all_rows(&conn);
    assert_eq!(
        all.len(),
        1498,
        "the H < 10^5 tier (manifests/qorbits-h1e5.manifest.json)"
    );
    for (name, sel) in selections() {
        let got = select(&conn, &sel).unwrap();
        let mut want: Vec<ClassRow> = all
            .iter()
            .enumerate()
            .filter(|(k, r)| sel.keeps(r) && sel.id.is_none_or(|id| id == *k as i64 + 1))
            .map(|(_, r)| r.clone())
            .collect();
        if let Some(n) = sel.limit {
            want.truncate(n as usize);
        }
        assert!(!want.is_empty(), "{name}: the check selects nothing");
        assert_eq!(got, want, "{name}");
    }
}

#[test]
fn no_documented_query_scans_the_whole_table() {
    let conn = open_table(&tier_1e5()).unwrap();
    // As `select` runs them.
    conn.pragma_update(None, "automatic_index", false).unwrap();
    for (name, sel) in selections() {
        let (sql, params) = sel.sql();
        let p = plan(&conn, &sql, &params);
        assert_no_scan(&conn, &sql, &params);
        println!("{name}: {p:?}");
    }
    // The lookup of one class and the classes of a pair, as the library runs them.
    assert_no_scan(
        &conn,
        qorbits::table::lookup::FIND_CLASS_SQL,
        &[28, -160, 1, -4, 8, -4, 1],
    );
    assert_no_scan(&conn, qorbits::table::reader::PAIR_CLASSES_SQL, &[28, -160]);
    // The documented queries written out in schema/README.md and README.md, as a user's
    // sqlite3 shell or Python runs them (automatic indexes allowed).
    let conn = open_table(&tier_1e5()).unwrap();
    let root = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let mut documented = 0;
    for doc in ["schema/README.md", "README.md"] {
        let text = std::fs::read_to_string(root.join(doc)).unwrap();
        for sql in text.split("-- query:").skip(1) {
            let sql = sql.split(';').next().unwrap();
            let sql = sql.split_once('\n').map_or(sql, |(_, s)| s);
            // In Python the SQL is a triple-quoted string.
            let sql = sql.split_once("\"\"\"").map_or(sql, |(_, s)| s);
            let sql: String = sql
                .lines()
                .map(|l| l.trim().trim_start_matches('"').trim_end_matches('"'))
                .collect::<Vec<_>>()
                .join(" ");
            let sql = sql.replace("?", "1");
            assert_no_scan(&conn, &sql, &[]);
            documented += 1;
        }
    }
    assert!(documented >= 6, "documented queries found: {documented}");
}
