//! Hostile tables: files crafted to mislead or attack the commands that open a table
//! (`classes`, `stats`, `cite`, `verify`). Each is refused with one line (`verify`: a failed
//! report whose last line names the problem) and nothing on disk changes: the bytes of
//! every file and the listing of the directory are the same before and after. Hostile
//! paths, manifests and outputs are in `tests/hostile_paths.rs`.

mod common;

use common::fixture::TestDir;
use common::hostile::{case, qorbits, snapshot, stderr, DB};
use std::path::Path;

/// The id of the class Q10_-29_001, the pair every `classes` run below asks for.
fn id_10_29(c: &rusqlite::Connection) -> i64 {
    c.query_row("SELECT id FROM classes WHERE I = 10 AND J = -29", [], |r| {
        r.get(0)
    })
    .unwrap()
}

/// Rewrites the stored CREATE statement of `name` (the data stay as they are).
fn rewrite_schema(c: &rusqlite::Connection, name: &str, from: &str, to: &str) {
    c.pragma_update(None, "writable_schema", true).unwrap();
    let n = c
        .execute(
            "UPDATE sqlite_schema SET sql = replace(sql, ?1, ?2) WHERE name = ?3",
            [from, to, name],
        )
        .unwrap();
    assert_eq!(n, 1);
    let now: String = c
        .query_row(
            "SELECT sql FROM sqlite_schema WHERE name = ?1",
            [name],
            |r| r.get(0),
        )
        .unwrap();
    assert!(
        now.contains(to),
        "{from:?} is not in the CREATE statement of {name}"
    );
    let v: i64 = c
        .query_row("PRAGMA schema_version", [], |r| r.get(0))
        .unwrap();
    c.pragma_update(None, "schema_version", v + 1).unwrap();
}

/// Whether `msg` contains one of the `|`-separated phrases of `want` (ignoring case).
fn names(msg: &str, want: &str) -> bool {
    let msg = msg.to_lowercase();
    want.split('|').any(|w| msg.contains(&w.to_lowercase()))
}

/// Runs every command that opens a table on `dir`'s table; each must refuse it with one
/// line containing `want` (verify: exit 1, the last line naming it), and nothing in `dir`
/// may change. `readers` lists the commands that must refuse (those that read what was
/// made hostile). Returns the number of refusals.
fn refused_by_all(dir: &Path, want: &str, readers: &[&str]) -> u32 {
    let db = dir.join(DB);
    let dbs = db.to_str().unwrap();
    let before = snapshot(dir);
    let mut refusals = 0;
    let runs: [(&str, Vec<&str>); 4] = [
        (
            "classes",
            vec!["classes", "--db", dbs, "--I", "10", "--J", "-29"],
        ),
        ("stats", vec!["stats", "--db", dbs]),
        ("cite", vec!["cite", "--db", dbs, "--year", "2026"]),
        ("verify", vec!["verify", "--db", dbs]),
    ];
    for (cmd, args) in runs {
        let o = qorbits(&args);
        let err = stderr(&o);
        if !readers.contains(&cmd) {
            continue;
        }
        if cmd == "verify" {
            let out = String::from_utf8_lossy(&o.stdout).into_owned();
            let last = out.lines().last().unwrap_or_default();
            assert_eq!(o.status.code(), Some(1), "{dir:?} verify: {out}{err}");
            assert!(
                names(last, want),
                "{dir:?} verify: expected '{want}' in {last}"
            );
        } else {
            assert_eq!(o.status.code(), Some(2), "{dir:?} {cmd}: {err}");
            assert_eq!(err.trim_end().lines().count(), 1, "{dir:?} {cmd}: {err}");
            assert!(err.starts_with("qorbits: "), "{err}");
            assert!(
                names(&err, want),
                "{dir:?} {cmd}: expected '{want}' in {err}"
            );
            assert!(
                o.stdout.is_empty(),
                "{dir:?} {cmd} printed a partial answer"
            );
        }
        refusals += 1;
        assert_eq!(
            snapshot(dir),
            before,
            "{dir:?}: {cmd} changed something on disk"
        );
    }
    refusals
}

const ALL: &[&str] = &["classes", "stats", "cite", "verify"];

#[test]
fn hostile_tables_are_refused_by_every_command_and_left_untouched() {
    let d = TestDir::new("hostile");
    // The release itself passes every command.
    let good = case(&d, "good", |_| {});
    for args in [
        vec!["classes", "--I", "10", "--J", "-29"],
        vec!["stats"],
        vec!["cite"],
        vec!["verify"],
    ] {
        let mut a = args.clone();
        let db = good.join(DB);
        a.extend(["--db", db.to_str().unwrap()]);
        let o = qorbits(&a);
        assert!(o.status.success(), "{a:?}: {}", stderr(&o));
    }

    let id = |c: &rusqlite::Connection| id_10_29(c).to_string();
    type Edit = Box<dyn Fn(&rusqlite::Connection)>;
    let sql = |s: &'static str| -> Edit { Box::new(move |c| c.execute_batch(s).unwrap()) };
    let cases: Vec<(&str, Edit, &str, &[&str])> = vec![
        (
            "trigger",
            sql("CREATE TRIGGER t AFTER INSERT ON meta BEGIN DELETE FROM classes; END"),
            "has a trigger 't' on 'meta'",
            ALL,
        ),
        (
            "view",
            sql("CREATE VIEW v AS SELECT * FROM classes"),
            "has a view 'v'",
            ALL,
        ),
        (
            "view shadowing a table",
            sql("DROP TABLE pair_primes; CREATE VIEW pair_primes AS SELECT id AS pair_id, 2 AS p, 1 AS e FROM pairs"),
            "has a view 'pair_primes'",
            ALL,
        ),
        (
            "virtual table shadowing a table",
            sql("DROP TABLE pair_primes; CREATE VIRTUAL TABLE pair_primes USING fts5(pair_id, p, e)"),
            "has a virtual table 'pair_primes'",
            ALL,
        ),
        (
            "virtual table shadowing classes",
            sql("DROP TABLE classes; CREATE VIRTUAL TABLE classes USING rtree(id, a0, a1)"),
            "has a virtual table 'classes'",
            ALL,
        ),
        (
            "extra index on a function",
            sql("CREATE INDEX evil ON classes (abs(a))"),
            "has the index 'evil'",
            ALL,
        ),
        (
            "wrong column type",
            Box::new(|c| {
                rewrite_schema(c, "pairs", "h4           INTEGER", "h4           TEXT   ")
            }),
            "declares column pairs.h4 as TEXT",
            ALL,
        ),
        (
            "collation on a column",
            Box::new(|c| {
                rewrite_schema(c, "classes", "TEXT    NOT NULL,\n  a", "TEXT    NOT NULL COLLATE NOCASE,\n  a")
            }),
            "constraints, collations or options",
            ALL,
        ),
        (
            "text where an integer belongs",
            Box::new(move |c| {
                c.execute(&format!("UPDATE classes SET a = 'x' WHERE id = {}", id(c)), [])
                    .unwrap();
            }),
            "holds",
            ALL,
        ),
        (
            "H4 beyond i64",
            Box::new(move |c| {
                let n = c
                    .execute(
                        &format!("UPDATE classes SET h4 = 99999999999999999999 WHERE id = {}", id(c)),
                        [],
                    )
                    .unwrap();
                assert_eq!(n, 1);
                let t: String = c
                    .query_row("SELECT typeof(h4) FROM classes WHERE I = 10 AND J = -29", [], |r| r.get(0))
                    .unwrap();
                assert_eq!(t, "real", "SQLite stores an integer beyond i64 as REAL");
            }),
            "REAL",
            ALL,
        ),
        (
            "height beyond any table",
            sql("UPDATE meta SET value = '1000000000000000000000000' WHERE key = 'height'"),
            "not a height a table can have",
            ALL,
        ),
        (
            "a meta row of its own",
            sql("INSERT INTO meta VALUES ('extra', 'x')"),
            "has the meta key 'extra'",
            ALL,
        ),
        (
            "form that does not have its invariants",
            Box::new(move |c| {
                c.execute(&format!("UPDATE classes SET e = e + 1 WHERE id = {}", id(c)), [])
                    .unwrap();
            }),
            "invariants are not the pair's|content sha256 differs",
            &["classes", "verify"],
        ),
        (
            "pair row that hides its classes",
            sql("UPDATE pairs SET classes = 0 WHERE I = 10 AND J = -29"),
            "row of pairs counts 0/1/0/0|content sha256 differs",
            &["classes", "verify"],
        ),
        (
            "label with a terminal escape and invalid UTF-8",
            Box::new(move |c| {
                c.execute(
                    &format!("UPDATE classes SET label = CAST(X'1b5b326aff0a' AS TEXT) WHERE id = {}", id(c)),
                    [],
                )
                .unwrap();
            }),
            "utf-8",
            &["classes", "cite", "verify"],
        ),
    ];
    let (mut tried, mut refused) = (0, 0);
    for (name, edit, want, readers) in &cases {
        let dir = case(&d, &name.replace(' ', "-"), |c| edit(c));
        tried += readers.len() as u32;
        refused += refused_by_all(&dir, want, readers);
    }

    // Damage to the header itself, made on the bytes.
    let header_cases: [(&str, usize, &[u8], &str); 4] = [
        (
            "huge page count",
            28,
            &[0x7f, 0xff, 0xff, 0xff],
            "truncated",
        ),
        ("write-ahead log", 18, &[2, 2], "write-ahead log"),
        ("another page size", 16, &[0x20, 0x00], "page size"),
        ("UTF-16 text", 59, &[2], "text encoding"),
    ];
    for (name, at, bytes, want) in header_cases {
        let dir = case(&d, &name.replace(' ', "-"), |_| {});
        let db = dir.join(DB);
        let mut b = std::fs::read(&db).unwrap();
        b[at..at + bytes.len()].copy_from_slice(bytes);
        std::fs::write(&db, b).unwrap();
        tried += 4;
        refused += refused_by_all(&dir, want, ALL);
    }
    println!("hostile tables refused / tried (command runs): {refused} / {tried}");
    assert_eq!(refused, tried);
}

/// A rollback journal planted beside a table (one that would rewrite its pages) is never
/// applied: every command reads the table's own bytes and leaves the journal as it is, and
/// verify fails, since the sqlite3 shell of the content recipe would apply it.
#[test]
fn a_planted_journal_is_neither_applied_nor_trusted() {
    let d = TestDir::new("journal");
    let dir = case(&d, "t", |_| {});
    let db = dir.join(DB);
    // A hot journal made for a changed copy: the copy's pages, under the table's name.
    let changed = d.join("changed.sqlite");
    std::fs::copy(&db, &changed).unwrap();
    {
        let c = rusqlite::Connection::open(&changed).unwrap();
        c.execute_batch("UPDATE classes SET e = e + 1; PRAGMA journal_mode = DELETE;")
            .unwrap();
        c.execute_batch("BEGIN; UPDATE classes SET d = d + 1;")
            .unwrap();
        let journal = d.join("changed.sqlite-journal");
        assert!(journal.exists(), "the open transaction has a journal");
        std::fs::copy(&journal, dir.join(format!("{DB}-journal"))).unwrap();
        c.execute_batch("ROLLBACK").unwrap();
    }
    let dbs = db.to_str().unwrap();
    let before = snapshot(&dir);
    let o = qorbits(&["classes", "--db", dbs, "--I", "10", "--J", "-29", "--json"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        v[0]["form"],
        serde_json::json!([-1, 2, -2, 1, -1]),
        "the table's own row"
    );
    let o = qorbits(&["verify", "--db", dbs]);
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    assert_eq!(o.status.code(), Some(1), "{out}");
    assert!(out.contains("rollback journal"), "{out}");
    assert_eq!(snapshot(&dir), before);
}
