//! Reading tables: foreign, damaged and future files give one-line errors, a pair reads
//! back exactly as written (grouping over Q included), and lookups use the index.

mod common;

use common::fixture::{assert_one_line, table, TestDir};
use qorbits::progress::Silent;
use qorbits::table::manifest::{manifest_for, read_manifest, verify, write_manifest, Manifest};
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::reader::{open_table, pair_from_table, PAIR_CLASSES_SQL};
use qorbits::table::row::Params;
use qorbits::table::schema::{APPLICATION_ID, SCHEMA_VERSION};
use qorbits::table::writer::write_table;
use std::path::Path;

#[test]
fn foreign_and_damaged_files_give_clear_errors() {
    let d = TestDir::new("foreign");
    let err = |p: &Path| {
        let e = open_table(p)
            .expect_err("open_table accepted a foreign file")
            .to_string();
        assert_one_line(&e);
        e
    };
    let missing = d.join("missing.sqlite");
    assert!(err(&missing).contains("does not exist"));

    let garbage = d.join("garbage.sqlite");
    std::fs::write(&garbage, vec![0x5au8; 10_000]).unwrap();
    let e = err(&garbage);
    assert!(
        e.contains("is not a readable SQLite file") && e.contains("garbage.sqlite"),
        "{e}"
    );

    let empty = d.join("empty.sqlite");
    std::fs::write(&empty, b"").unwrap();
    assert!(err(&empty).contains("empty"));

    let other = d.join("other.sqlite");
    {
        let c = rusqlite::Connection::open(&other).unwrap();
        c.execute_batch("CREATE TABLE t(x INTEGER); INSERT INTO t VALUES (1);")
            .unwrap();
    }
    let e = err(&other);
    assert!(e.contains("not a qorbits table"), "{e}");

    let future = d.join("future.sqlite");
    {
        let c = rusqlite::Connection::open(&future).unwrap();
        c.pragma_update(None, "application_id", APPLICATION_ID)
            .unwrap();
        c.pragma_update(None, "user_version", SCHEMA_VERSION + 1)
            .unwrap();
        c.execute_batch("CREATE TABLE meta(key TEXT, value TEXT);")
            .unwrap();
    }
    let e = err(&future);
    assert!(
        e.contains(&format!("schema version {}", SCHEMA_VERSION + 1)),
        "{e}"
    );

    // Verifying a garbage file reports failed checks, it does not panic.
    let good = d.join("t.sqlite");
    write_table(&good, table(), false).unwrap();
    let m = manifest_for(&good).unwrap();
    let checks = verify(&garbage, &m).unwrap();
    let table = checks
        .iter()
        .find(|c| c.name == "table")
        .expect("a failed table check");
    assert!(!table.ok && table.detail.contains("not a readable SQLite file"));
    // The schema version is read from the file: a garbage file has none.
    let schema = checks.iter().find(|c| c.name == "schema version").unwrap();
    assert!(!schema.ok, "{schema:?}");
    // A missing file is a user error, not a failed check.
    let e = verify(&missing, &m).unwrap_err().to_string();
    assert!(e.contains("does not exist"), "{e}");
    assert_one_line(&e);

    // Manifests: missing, invalid JSON, wrong format.
    let e = read_manifest(&d.join("none.json")).unwrap_err().to_string();
    assert!(e.contains("none.json"), "{e}");
    assert_one_line(&e);
    let junk = d.join("junk.json");
    std::fs::write(&junk, "{ not json").unwrap();
    let e = read_manifest(&junk).unwrap_err().to_string();
    assert!(e.contains("not a qorbits manifest"), "{e}");
    assert_one_line(&e);
    let mut other_format: Manifest = m.clone();
    other_format.format = "something-else/9".into();
    let of = d.join("of.json");
    write_manifest(&of, &other_format, false).unwrap();
    let fmt = verify(&good, &read_manifest(&of).unwrap())
        .unwrap()
        .into_iter()
        .find(|c| c.name == "manifest format")
        .expect("a manifest format check");
    assert!(!fmt.ok, "{fmt:?}");
}

#[test]
fn a_pair_reads_back_exactly_as_it_was_written() {
    let d = TestDir::new("query");
    let p = d.join("t.sqlite");
    write_table(&p, table(), false).unwrap();
    let conn = open_table(&p).unwrap();
    for pair in &table().pairs {
        assert_eq!(
            &pair_from_table(&conn, pair.i, pair.j).unwrap(),
            pair,
            "({}, {})",
            pair.i,
            pair.j
        );
    }
    assert!(table().pairs.len() > 100);
    // Classes over Q with several members appear higher up: read those back too.
    let params = Params {
        height: 100_000,
        include_reducible: false,
    };
    let big = enumerate_classes(&params, &Silent).unwrap();
    let q = d.join("big.sqlite");
    write_table(&q, &big, false).unwrap();
    let conn_big = open_table(&q).unwrap();
    let mut several = 0;
    for pair in big
        .pairs
        .iter()
        .filter(|p| p.over_q.iter().any(|c| c.len() > 1))
    {
        assert_eq!(&pair_from_table(&conn_big, pair.i, pair.j).unwrap(), pair);
        several += 1;
    }
    assert!(
        several > 10,
        "{several} pairs with a class over Q of several members"
    );
    // An eligible pair above the bound has no classes in the table.
    assert!(pair_from_table(&conn, 0, 27 * 1000)
        .unwrap()
        .classes
        .is_empty());
    // The lookup is an index search of pairs and a range of class ids, not a scan.
    let mut st = conn
        .prepare(&format!("EXPLAIN QUERY PLAN {PAIR_CLASSES_SQL}"))
        .unwrap();
    let plan: Vec<String> = st
        .query_map([1, 2], |r| r.get(3))
        .unwrap()
        .map(Result::unwrap)
        .collect();
    assert!(plan.iter().all(|l| !l.contains("SCAN")), "{plan:?}");
    assert!(
        plan.iter().any(|l| l.contains("USING INDEX pairs_ij")),
        "{plan:?}"
    );
    assert!(
        plan.iter().any(|l| l.contains("INTEGER PRIMARY KEY")),
        "{plan:?}"
    );
}
