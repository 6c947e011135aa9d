//! The SQLite writer (DESIGN §4, §5): the same rows give the same bytes, `meta` holds the
//! parameters and no clock, writes are atomic and refuse existing outputs and bad rows, and
//! the `pairs` table counts and factorises (factorisations checked with coreutils `factor`).

mod common;

use common::fixture::{assert_one_line, rows, table, table_of, TestDir, PARAMS};
use qorbits::error::Error;
use qorbits::form::galois::FactorPattern;
use qorbits::table::manifest::{default_manifest_path, manifest_for, write_manifest};
use qorbits::table::reader::{open_table, table_params};
use qorbits::table::row::{ClassRow, Params};
use qorbits::table::schema::{APPLICATION_ID, SCHEMA_VERSION};
use qorbits::table::writer::write_table;
use std::process::Command;

#[test]
fn same_rows_give_identical_bytes_and_the_manifest_verifies() {
    let d = TestDir::new("repro");
    let (a, b) = (d.join("a.sqlite"), d.join("b.sqlite"));
    write_table(&a, table(), false).unwrap();
    write_table(&b, table(), false).unwrap();
    let (ba, bb) = (std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
    assert!(ba == bb, "two writes of the same rows differ");
    assert_eq!(ba.len() % 4096, 0, "page size is fixed at 4096");
    // Rewriting over an existing file with force gives the same bytes again.
    write_table(&a, table(), true).unwrap();
    assert!(std::fs::read(&a).unwrap() == ba);
    // Only the two tables remain: no temporary files.
    assert_eq!(d.entries(), ["a.sqlite", "b.sqlite"]);
}

#[test]
fn meta_holds_parameters_and_no_clock() {
    let d = TestDir::new("meta");
    let p = d.join("t.sqlite");
    write_table(&p, table(), false).unwrap();
    let conn = open_table(&p).unwrap();
    assert_eq!(table_params(&conn).unwrap(), PARAMS);
    let mut st = conn
        .prepare("SELECT key, value FROM meta ORDER BY key")
        .unwrap();
    let meta: Vec<(String, String)> = st
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))
        .unwrap()
        .map(Result::unwrap)
        .collect();
    let keys: Vec<&str> = meta.iter().map(|(k, _)| k.as_str()).collect();
    assert_eq!(
        keys,
        [
            "builder_version",
            "height",
            "include_reducible",
            "label_rule",
            "ordering",
            "schema_version"
        ]
    );
    let get = |k: &str| meta.iter().find(|(x, _)| x == k).unwrap().1.clone();
    assert_eq!(get("height"), "3000");
    assert_eq!(get("include_reducible"), "1");
    assert_eq!(get("ordering"), "h4,I,J,a,b,c,d,e");
    assert_eq!(get("schema_version"), SCHEMA_VERSION.to_string());
    let app: i32 = conn
        .query_row("PRAGMA application_id", [], |r| r.get(0))
        .unwrap();
    assert_eq!(app, APPLICATION_ID);
    // No REAL column anywhere (DESIGN §4).
    let reals: i64 = conn
        .query_row(
            "SELECT count(*) FROM sqlite_schema s, pragma_table_info(s.name) c \
             WHERE s.type = 'table' AND c.type NOT IN ('INTEGER', 'TEXT')",
            [],
            |r| r.get(0),
        )
        .unwrap();
    assert_eq!(reals, 0);
}

#[test]
fn existing_outputs_are_refused_and_failures_leave_nothing() {
    let d = TestDir::new("atomic");
    let p = d.join("t.sqlite");
    write_table(&p, table(), false).unwrap();
    let before = std::fs::read(&p).unwrap();
    let e = write_table(&p, &table_of(PARAMS, rows()[..10].to_vec()), false).unwrap_err();
    assert!(matches!(&e, Error::Exists(x) if *x == p), "{e}");
    assert!(
        std::fs::read(&p).unwrap() == before,
        "a refused write changed the file"
    );

    let m = manifest_for(&p).unwrap();
    let mp = default_manifest_path(&p);
    write_manifest(&mp, &m, false).unwrap();
    let e = write_manifest(&mp, &m, false).unwrap_err();
    assert!(matches!(&e, Error::Exists(x) if *x == mp), "{e}");
    write_manifest(&mp, &m, true).unwrap();

    // A missing directory.
    let e = write_table(&d.join("no/such/dir/t.sqlite"), table(), false).unwrap_err();
    assert!(e.to_string().contains("does not exist"), "{e}");

    // A label that is not the one the rule gives (here a duplicate) is refused: no file at
    // the target and no temporary file.
    let mut dup = table().clone();
    dup.pairs[1].classes[0].label = dup.pairs[0].classes[0].label.clone();
    let q = d.join("dup.sqlite");
    let e = write_table(&q, &dup, false).unwrap_err().to_string();
    assert_one_line(&e);
    assert!(!q.exists());

    // Rows out of order or above the bound are refused before anything is written.
    let mut swapped = table().clone();
    swapped.pairs.swap(0, 1);
    assert!(write_table(&q, &swapped, false).is_err());
    let mut low = table().clone();
    low.params.height = 1000;
    assert!(write_table(&q, &low, false).is_err());
    let mut irr_only = table().clone();
    irr_only.params.include_reducible = false;
    assert!(write_table(&q, &irr_only, false).is_err());
    assert!(!q.exists());
    assert_eq!(d.entries(), ["t.manifest.json", "t.sqlite"]);
}

/// Multiplies a factorisation text `2^4 7` back, checking the factors are increasing primes.
fn expand(text: &str) -> i128 {
    let mut v: i128 = 1;
    let mut last = 1u64;
    for part in text.split(' ') {
        if part == "1" {
            continue;
        }
        let (p, e) = match part.split_once('^') {
            Some((p, e)) => (p.parse::<u64>().unwrap(), e.parse::<u32>().unwrap()),
            None => (part.parse::<u64>().unwrap(), 1),
        };
        assert!(p > last, "factors out of order in {text}");
        assert!(
            e >= 2 || !part.contains('^'),
            "exponent 1 written out in {text}"
        );
        assert!(
            (2..p).take_while(|q| q * q <= p).all(|q| p % q != 0),
            "{p} is not prime"
        );
        last = p;
        v *= i128::from(p).pow(e);
    }
    v
}

#[test]
fn pairs_table_counts_and_factorises() {
    let d = TestDir::new("pairs");
    let check = |params: Params, rs: &[ClassRow], name: &str| {
        let p = d.join(name);
        write_table(&p, &table_of(params, rs.to_vec()), false).unwrap();
        let conn = open_table(&p).unwrap();
        let mut st = conn.prepare(
            "SELECT I, J, disc, disc_factors, h4, classes, irreducible, reducible FROM pairs ORDER BY rowid",
        ).unwrap();
        type Pair = (i64, i64, i64, String, i64, i64, i64, Option<i64>);
        let pairs: Vec<Pair> = st
            .query_map([], |r| {
                Ok((
                    r.get(0)?,
                    r.get(1)?,
                    r.get(2)?,
                    r.get(3)?,
                    r.get(4)?,
                    r.get(5)?,
                    r.get(6)?,
                    r.get(7)?,
                ))
            })
            .unwrap()
            .map(Result::unwrap)
            .collect();
        let order: Vec<(i64, i64, i64)> = pairs.iter().map(|p| (p.4, p.0, p.1)).collect();
        let mut want = order.clone();
        want.sort();
        assert_eq!(order, want, "pairs are not in (h4, I, J) order");
        let mut disc_list = Vec::new();
        for (i, j, disc, factors, h4, classes, irr, red) in &pairs {
            let mine: Vec<&ClassRow> = rs.iter().filter(|r| (r.i, r.j) == (*i, *j)).collect();
            assert_eq!(*classes as usize, mine.len());
            let n_irr = mine
                .iter()
                .filter(|r| r.pattern == FactorPattern::Irreducible)
                .count();
            assert_eq!(*irr as usize, n_irr);
            if params.include_reducible {
                assert_eq!(*red, Some((mine.len() - n_irr) as i64));
            } else {
                assert_eq!(*red, None);
            }
            assert_eq!((*disc, *h4), (mine[0].disc, mine[0].h4));
            // 4I³ − J² = 27·Disc (DESIGN §2).
            assert_eq!(
                4 * i128::from(*i).pow(3) - i128::from(*j).pow(2),
                27 * i128::from(*disc)
            );
            assert_eq!(expand(factors), i128::from(*disc).abs(), "{factors}");
            disc_list.push((disc.unsigned_abs(), factors.clone()));
        }
        let n_pairs = {
            let mut v: Vec<(i64, i64)> = rs.iter().map(|r| (r.i, r.j)).collect();
            v.dedup();
            v.len()
        };
        assert_eq!(pairs.len(), n_pairs);
        disc_list
    };
    let all = check(PARAMS, &rows(), "all.sqlite");
    // Irreducible classes keep their labels without the reducible ones (module doc of
    // qorbits::table::group).
    let irr: Vec<ClassRow> = rows()
        .iter()
        .filter(|r| r.pattern == FactorPattern::Irreducible)
        .cloned()
        .collect();
    check(
        Params {
            height: 3000,
            include_reducible: false,
        },
        &irr,
        "irr.sqlite",
    );

    // Cross-check the factorisations with coreutils `factor` (GNU coreutils).
    let args: Vec<String> = all
        .iter()
        .filter(|(n, _)| *n > 1)
        .map(|(n, _)| n.to_string())
        .collect();
    let out = Command::new("factor")
        .args(&args)
        .output()
        .expect("coreutils factor");
    let text = String::from_utf8(out.stdout).unwrap();
    let mut lines = text.lines();
    for (n, ours) in all.iter().filter(|(n, _)| *n > 1) {
        let line = lines.next().unwrap();
        let (head, primes) = line.split_once(':').unwrap();
        assert_eq!(head, n.to_string());
        let mut exps: Vec<(u64, u32)> = Vec::new();
        for p in primes.split_whitespace().map(|p| p.parse::<u64>().unwrap()) {
            match exps.last_mut() {
                Some((q, e)) if *q == p => *e += 1,
                _ => exps.push((p, 1)),
            }
        }
        let theirs: Vec<String> = exps
            .iter()
            .map(|&(p, e)| {
                if e == 1 {
                    p.to_string()
                } else {
                    format!("{p}^{e}")
                }
            })
            .collect();
        assert_eq!(*ours, theirs.join(" "), "factorisation of {n}");
    }
}
