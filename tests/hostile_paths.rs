//! Hostile paths: a pipe or a directory given as a table, manifests naming paths or absurd
//! sizes, outputs that are links or directories, and the settings of the connection every
//! command reads a table through. Each is refused with one line, and nothing on disk
//! changes.

mod common;

use common::fixture::{assert_one_line, TestDir};
use common::hostile::{case, qorbits, repo, snapshot, stderr, DB, MANIFEST};
use qorbits::table::reader::open_table;
use std::process::Command;

#[test]
fn files_that_are_not_tables_are_refused_without_blocking() {
    let d = TestDir::new("special");
    let fifo = d.join("fifo.sqlite");
    let ok = Command::new("mkfifo").arg(&fifo).status().unwrap();
    assert!(ok.success());
    let dir = d.join("dir.sqlite");
    std::fs::create_dir(&dir).unwrap();
    let manifest = repo(&format!("manifests/{MANIFEST}"));
    let before = snapshot(&d.0);
    for (p, want) in [(&fifo, "not a regular file"), (&dir, "directory")] {
        let ps = p.to_str().unwrap();
        for args in [
            vec!["classes", "--db", ps, "--I", "10", "--J", "-29"],
            vec!["stats", "--db", ps],
            vec!["cite", "--db", ps],
            vec![
                "verify",
                "--db",
                ps,
                "--manifest",
                manifest.to_str().unwrap(),
            ],
        ] {
            let o = qorbits(&args);
            let err = stderr(&o);
            assert_eq!(o.status.code(), Some(2), "{args:?}: {err}");
            assert_one_line(err.trim_end());
            assert!(err.contains(want), "{args:?}: {err}");
        }
    }
    assert_eq!(snapshot(&d.0), before);
}

#[test]
fn hostile_manifests_are_refused_before_anything_is_read_or_built() {
    let d = TestDir::new("hostile-manifest");
    let dir = case(&d, "t", |_| {});
    let committed = std::fs::read_to_string(dir.join(MANIFEST)).unwrap();
    let db = dir.join(DB);
    let cases: [(&str, serde_json::Value, &str); 7] = [
        ("/file/name", "../x".into(), "path separator"),
        ("/file/name", "/etc/passwd".into(), "path separator"),
        ("/file/name", "..".into(), "names a directory"),
        ("/file/bytes", 0.into(), "impossible"),
        ("/file/bytes", (1u64 << 60).into(), "impossible"),
        ("/file/bytes", 57_345.into(), "impossible"),
        (
            "/counts/classes",
            serde_json::json!(1e30),
            "not a qorbits manifest",
        ),
    ];
    let m = dir.join("hostile.manifest.json");
    let (mut tried, mut refused) = (0, 0);
    for (ptr, value, want) in cases {
        let mut v: serde_json::Value = serde_json::from_str(&committed).unwrap();
        *v.pointer_mut(ptr).unwrap() = value.clone();
        std::fs::write(&m, serde_json::to_string_pretty(&v).unwrap()).unwrap();
        let before = snapshot(&dir);
        for args in [
            vec![
                "verify",
                "--db",
                db.to_str().unwrap(),
                "--manifest",
                m.to_str().unwrap(),
            ],
            vec!["verify", "--rebuild", m.to_str().unwrap(), "--quiet"],
        ] {
            let o = qorbits(&args);
            let err = stderr(&o);
            tried += 1;
            assert_eq!(o.status.code(), Some(2), "{ptr} = {value}: {err}");
            assert_eq!(err.trim_end().lines().count(), 1, "{err}");
            assert!(
                err.contains(want),
                "{ptr} = {value}: expected '{want}' in {err}"
            );
            assert_eq!(snapshot(&dir), before);
            refused += 1;
        }
    }
    println!("hostile manifests refused / tried: {refused} / {tried}");
}

/// Outputs that are links or directories are refused before any work, with or without
/// --force, for the table and for the manifest beside it; the files links point to are
/// untouched and no table is left behind.
#[test]
fn build_refuses_outputs_that_are_links_or_directories() {
    let d = TestDir::new("hostile-out");
    let keep = d.join("keep.txt");
    std::fs::write(&keep, b"keep me").unwrap();
    std::os::unix::fs::symlink(&keep, d.join("link.sqlite")).unwrap();
    std::fs::create_dir(d.join("dir.sqlite")).unwrap();
    std::os::unix::fs::symlink(&keep, d.join("m1.manifest.json")).unwrap();
    std::fs::create_dir(d.join("m2.manifest.json")).unwrap();
    let cases = [
        ("link.sqlite", "symbolic link"),
        ("dir.sqlite", "directory"),
        ("m1.sqlite", "symbolic link"),
        ("m2.sqlite", "directory"),
    ];
    let before = snapshot(&d.0);
    for (out, want) in cases {
        for force in [false, true] {
            let o = d.join(out);
            let mut args = vec![
                "build",
                "--height",
                "2e3",
                "--quiet",
                "--out",
                o.to_str().unwrap(),
            ];
            if force {
                args.push("--force");
            }
            let r = qorbits(&args);
            let err = stderr(&r);
            assert_eq!(r.status.code(), Some(2), "{args:?}: {err}");
            assert_eq!(err.trim_end().lines().count(), 1, "{err}");
            assert!(err.contains(want), "{args:?}: {err}");
            assert_eq!(snapshot(&d.0), before, "{args:?} changed the directory");
        }
    }
}

/// The connection every command reads through: read-only, query_only, trusted_schema off,
/// no ATTACH, no writes, triggers and views off.
#[test]
fn the_connection_to_a_table_can_neither_write_nor_attach() {
    let d = TestDir::new("hostile-conn");
    let dir = case(&d, "t", |_| {});
    let before = snapshot(&dir);
    let c = open_table(&dir.join(DB)).unwrap();
    let pragma = |p: &str| -> i64 {
        c.query_row(&format!("PRAGMA {p}"), [], |r| r.get(0))
            .unwrap()
    };
    assert_eq!(pragma("trusted_schema"), 0);
    assert_eq!(pragma("query_only"), 1);
    for sql in [
        "DELETE FROM classes",
        "INSERT INTO meta VALUES ('x', 'y')",
        "CREATE TABLE t (x)",
        "ATTACH DATABASE ':memory:' AS other",
        "PRAGMA writable_schema = ON; DELETE FROM sqlite_schema",
    ] {
        let e = c.execute_batch(sql);
        assert!(e.is_err(), "{sql} was allowed");
    }
    drop(c);
    assert_eq!(snapshot(&dir), before);
}
