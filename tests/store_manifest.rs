//! The SQLite writer and the manifest (DESIGN §4, §5): byte-reproducible files, the content
//! hash against the `sqlite3` command-line shell (Debian package sqlite3, list mode as
//! documented at sqlite.org/cli.html) and coreutils `sha256sum`, verification that catches
//! damaged files, clear errors for foreign files, atomic writes that refuse to overwrite,
//! and the queries.

use qorbits::form::Signature;
use qorbits::galois::{FactorPattern, GaloisGroup};
use qorbits::manifest::{
    content_recipe, default_manifest_path, manifest_for, manifest_json, read_manifest, verify,
    write_manifest, Manifest, FORMAT,
};
use qorbits::store::{
    classes_with_invariants, content_sha256, file_sha256, open_table, render_content, table_params,
    write_table, APPLICATION_ID, CONTENT_SQL, SCHEMA_VERSION,
};
use qorbits::table::{enumerate_classes, ClassRow, Params};
use sha2::{Digest, Sha256};
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

const PARAMS: Params = Params {
    height: 3000,
    include_reducible: true,
};

/// The rows of the table at H < 3000 with reducible classes, computed once.
fn rows() -> &'static [ClassRow] {
    static ROWS: OnceLock<Vec<ClassRow>> = OnceLock::new();
    ROWS.get_or_init(|| enumerate_classes(&PARAMS, None).expect("enumeration").rows)
}

/// A fresh directory removed at the end of the test.
struct TestDir(PathBuf);

impl TestDir {
    fn new(name: &str) -> TestDir {
        let d = std::env::temp_dir().join(format!("qorbits-store-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).unwrap();
        TestDir(d)
    }
    fn join(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }
    /// Names of the files in the directory, sorted.
    fn entries(&self) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(&self.0)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }
}

impl Drop for TestDir {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

fn assert_one_line(msg: &str) {
    assert!(!msg.contains('\n'), "error message spans lines: {msg}");
}

#[test]
fn sha256_known_answer() {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    let d = TestDir::new("kat");
    let p = d.join("abc");
    std::fs::write(&p, b"abc").unwrap();
    assert_eq!(
        file_sha256(&p).unwrap(),
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    );
}

#[test]
fn same_rows_give_identical_bytes_and_the_manifest_verifies() {
    let d = TestDir::new("repro");
    let (a, b) = (d.join("a.sqlite"), d.join("b.sqlite"));
    write_table(&a, &PARAMS, rows(), false).unwrap();
    write_table(&b, &PARAMS, rows(), false).unwrap();
    let (ba, bb) = (std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
    assert!(ba == bb, "two writes of the same rows differ");
    assert_eq!(ba.len() % 4096, 0, "page size is fixed at 4096");
    // Rewriting over an existing file with force gives the same bytes again.
    write_table(&a, &PARAMS, rows(), true).unwrap();
    assert!(std::fs::read(&a).unwrap() == ba);
    // Only the two tables remain: no temporary files.
    assert_eq!(d.entries(), ["a.sqlite", "b.sqlite"]);

    let m = manifest_for(&a).unwrap();
    let mb = manifest_for(&b).unwrap();
    assert_eq!(m.content_sha256, mb.content_sha256);
    assert_eq!(m.file.sha256, mb.file.sha256);
    assert_eq!(m.file.name, "a.sqlite");
    assert_eq!(m.file.bytes, ba.len() as u64);
    assert_eq!(m.format, FORMAT);
    assert_eq!(m.parameters.height, 3000);
    assert!(m.parameters.include_reducible);
    assert_eq!(m.versions.builder, env!("CARGO_PKG_VERSION"));
    assert_eq!(m.versions.schema, SCHEMA_VERSION);
    assert_eq!(m.versions.sqlite, rusqlite::version());

    // Counts read from the database agree with counts of the rows made here.
    let rs = rows();
    assert_eq!(m.counts.classes, rs.len() as u64);
    let mut pairs: Vec<(i64, i64)> = rs.iter().map(|r| (r.i, r.j)).collect();
    pairs.dedup();
    assert_eq!(m.counts.pairs, pairs.len() as u64);
    let sig_names: Vec<&str> = m.counts.by_signature.keys().map(String::as_str).collect();
    assert_eq!(sig_names.len(), 4);
    for s in Signature::ALL {
        let n = rs.iter().filter(|r| r.signature == s).count() as u64;
        assert_eq!(
            m.counts.by_signature.get(s.name()).copied(),
            Some(n),
            "{}",
            s.name()
        );
    }
    let gal_names: Vec<&str> = m.counts.by_galois.keys().map(String::as_str).collect();
    assert_eq!(gal_names.len(), 6);
    for g in GaloisGroup::ALL {
        let n = rs.iter().filter(|r| r.galois == Some(g)).count() as u64;
        assert_eq!(
            m.counts.by_galois.get(g.name()).copied(),
            Some(n),
            "{}",
            g.name()
        );
    }
    let red = rs
        .iter()
        .filter(|r| r.pattern != FactorPattern::Irreducible)
        .count() as u64;
    assert!(red > 0, "the table at H < 3000 has reducible classes");
    assert_eq!(m.counts.by_galois.get("reducible").copied(), Some(red));

    // Deterministic JSON, fixed key order, trailing newline, and a faithful round trip.
    let json = manifest_json(&m);
    assert_eq!(json, manifest_json(&manifest_for(&a).unwrap()));
    assert!(json.ends_with("}\n"));
    let keys = [
        "\"format\"",
        "\"parameters\"",
        "\"versions\"",
        "\"counts\"",
        "\"file\"",
        "\"content_sha256\"",
        "\"content_recipe\"",
    ];
    let at: Vec<usize> = keys.iter().map(|k| json.find(k).expect(k)).collect();
    assert!(
        at.windows(2).all(|w| w[0] < w[1]),
        "keys out of order:\n{json}"
    );
    let mp = default_manifest_path(&a);
    assert_eq!(mp, d.join("a.manifest.json"));
    write_manifest(&mp, &m, false).unwrap();
    assert_eq!(std::fs::read_to_string(&mp).unwrap(), json);
    assert_eq!(read_manifest(&mp).unwrap(), m);

    let checks = verify(&a, &m);
    assert!(checks.iter().all(|c| c.ok), "{checks:#?}");
    assert!(checks.iter().all(|c| c.name.len() <= 22));
    for name in [
        "file sha256",
        "content sha256",
        "schema version",
        "classes",
        "galois S4",
    ] {
        assert!(checks.iter().any(|c| c.name == name), "no check {name}");
    }
    // A manifest that records a different count fails that check only.
    let mut wrong = m.clone();
    *wrong.counts.by_galois.get_mut("S4").unwrap() += 1;
    let bad: Vec<String> = verify(&a, &wrong)
        .into_iter()
        .filter(|c| !c.ok)
        .map(|c| c.name)
        .collect();
    assert_eq!(bad, ["galois S4"]);
}

#[test]
fn meta_holds_parameters_and_no_clock() {
    let d = TestDir::new("meta");
    let p = d.join("t.sqlite");
    write_table(&p, &PARAMS, rows(), false).unwrap();
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
fn content_hash_equals_the_sqlite3_shell_recipe() {
    let d = TestDir::new("shell");
    let p = d.join("t.sqlite");
    write_table(&p, &PARAMS, rows(), false).unwrap();
    let m = manifest_for(&p).unwrap();
    assert_eq!(m.content_recipe, content_recipe("t.sqlite"));
    assert!(m.content_recipe.contains(CONTENT_SQL));
    let shell = m
        .content_recipe
        .strip_suffix(" | sha256sum")
        .expect("the recipe pipes into sha256sum");
    let probe = Command::new("sqlite3").arg("-version").output();
    assert!(
        probe.is_ok_and(|o| o.status.success()),
        "the sqlite3 shell is needed for this test: apt-get install sqlite3"
    );
    // The recipe as printed, minus the final hash, run by a POSIX shell in the table's directory.
    let out = Command::new("sh")
        .arg("-c")
        .arg(shell)
        .current_dir(&d.0)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut ours = Vec::new();
    render_content(&open_table(&p).unwrap(), &mut ours).unwrap();
    assert!(!ours.is_empty());
    if out.stdout != ours {
        let (a, b) = (
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&ours),
        );
        let first = a.lines().zip(b.lines()).find(|(x, y)| x != y);
        panic!("rendering differs from the sqlite3 shell; first differing lines: {first:?}");
    }
    assert_eq!(hex(&Sha256::digest(&out.stdout)), m.content_sha256);
    assert_eq!(
        content_sha256(&open_table(&p).unwrap()).unwrap(),
        m.content_sha256
    );
    // The whole recipe, with coreutils sha256sum.
    let full = Command::new("sh")
        .arg("-c")
        .arg(&m.content_recipe)
        .current_dir(&d.0)
        .output()
        .unwrap();
    assert!(full.status.success());
    let text = String::from_utf8(full.stdout).unwrap();
    assert_eq!(
        text.split_whitespace().next(),
        Some(m.content_sha256.as_str())
    );
}

#[test]
fn flipping_any_byte_fails_verification() {
    let d = TestDir::new("flip");
    let good = d.join("t.sqlite");
    write_table(&good, &PARAMS, rows(), false).unwrap();
    let m = manifest_for(&good).unwrap();
    let bytes = std::fs::read(&good).unwrap();
    let pages = bytes.len() / 4096;
    assert!(pages >= 4, "expected a table of several pages, got {pages}");
    let bad = d.join("bad.sqlite");
    let mut beyond_file_hash = 0;
    let mut tried = 0;
    for page in 0..pages {
        for k in [40, 100, 1000, 2000, 3000, 4000, 4095] {
            let off = page * 4096 + k;
            let mut b = bytes.clone();
            b[off] ^= 0xA5;
            std::fs::write(&bad, &b).unwrap();
            let checks = verify(&bad, &m);
            tried += 1;
            assert!(
                checks.iter().any(|c| !c.ok),
                "flip at {off} passed verification"
            );
            let file = checks.iter().find(|c| c.name == "file sha256").unwrap();
            assert!(!file.ok, "flip at {off}: file hash unchanged");
            for c in &checks {
                assert_one_line(&c.detail);
            }
            if checks.iter().any(|c| !c.ok && c.name != "file sha256") {
                beyond_file_hash += 1;
            }
        }
    }
    // Flips inside rows are also seen by the content hash or by SQLite's own checks.
    assert!(
        beyond_file_hash > 0,
        "no flip among {tried} was caught beyond the file hash"
    );
}

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
    write_table(&good, &PARAMS, rows(), false).unwrap();
    let m = manifest_for(&good).unwrap();
    let checks = verify(&garbage, &m);
    let table = checks
        .iter()
        .find(|c| c.name == "table")
        .expect("a failed table check");
    assert!(!table.ok && table.detail.contains("not a readable SQLite file"));
    let checks = verify(&missing, &m);
    assert!(checks.iter().any(|c| !c.ok));

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
        .into_iter()
        .find(|c| c.name == "manifest format")
        .expect("a manifest format check");
    assert!(!fmt.ok, "{fmt:?}");
}

#[test]
fn existing_outputs_are_refused_and_failures_leave_nothing() {
    let d = TestDir::new("atomic");
    let p = d.join("t.sqlite");
    write_table(&p, &PARAMS, rows(), false).unwrap();
    let before = std::fs::read(&p).unwrap();
    let e = write_table(&p, &PARAMS, &rows()[..10], false)
        .unwrap_err()
        .to_string();
    assert!(e.contains("t.sqlite") && e.contains("--force"), "{e}");
    assert!(
        std::fs::read(&p).unwrap() == before,
        "a refused write changed the file"
    );

    let m = manifest_for(&p).unwrap();
    let mp = default_manifest_path(&p);
    write_manifest(&mp, &m, false).unwrap();
    let e = write_manifest(&mp, &m, false).unwrap_err().to_string();
    assert!(
        e.contains("t.manifest.json") && e.contains("--force"),
        "{e}"
    );
    write_manifest(&mp, &m, true).unwrap();

    // A missing directory.
    let e = write_table(&d.join("no/such/dir/t.sqlite"), &PARAMS, rows(), false).unwrap_err();
    assert!(e.to_string().contains("does not exist"), "{e}");

    // A failure after the data is written (duplicate labels break the unique index): no
    // file at the target and no temporary file.
    let mut dup = rows().to_vec();
    dup[1].label = dup[0].label.clone();
    let q = d.join("dup.sqlite");
    let e = write_table(&q, &PARAMS, &dup, false)
        .unwrap_err()
        .to_string();
    assert_one_line(&e);
    assert!(!q.exists());

    // Rows out of order or above the bound are refused before anything is written.
    let mut swapped = rows().to_vec();
    swapped.swap(0, 1);
    assert!(write_table(&q, &PARAMS, &swapped, false).is_err());
    let low = Params {
        height: 1000,
        include_reducible: true,
    };
    assert!(write_table(&q, &low, rows(), false).is_err());
    let irr_only = Params {
        height: 3000,
        include_reducible: false,
    };
    assert!(write_table(&q, &irr_only, rows(), false).is_err());
    assert!(!q.exists());
    assert_eq!(d.entries(), ["t.manifest.json", "t.sqlite"]);
}

#[test]
fn classes_with_invariants_returns_exactly_the_rows_of_the_pair() {
    let d = TestDir::new("query");
    let p = d.join("t.sqlite");
    write_table(&p, &PARAMS, rows(), false).unwrap();
    let conn = open_table(&p).unwrap();
    let rs = rows();
    let mut start = 0;
    let mut pairs = 0;
    while start < rs.len() {
        let (i, j) = (rs[start].i, rs[start].j);
        let end = start
            + rs[start..]
                .iter()
                .take_while(|r| (r.i, r.j) == (i, j))
                .count();
        assert_eq!(
            classes_with_invariants(&conn, i, j).unwrap(),
            &rs[start..end],
            "({i}, {j})"
        );
        start = end;
        pairs += 1;
    }
    assert!(pairs > 100);
    // An ineligible pair (I ≡ 2 mod 3) has no classes.
    assert!(classes_with_invariants(&conn, 2, 0).unwrap().is_empty());
    // The lookup is an index search, not a scan.
    let plan: String = conn
        .query_row(
            "EXPLAIN QUERY PLAN SELECT * FROM classes WHERE I = 1 AND J = 2 ORDER BY id",
            [],
            |r| r.get(3),
        )
        .unwrap();
    assert!(plan.contains("USING INDEX classes_ij"), "{plan}");
}

/// Multiplies a factorisation text `-1 * 2^4 * 7` back, checking the factors are increasing primes.
fn expand(text: &str) -> i128 {
    let mut v: i128 = 1;
    let mut last = 1u64;
    for part in text.split(" * ") {
        if part == "-1" {
            v = -v;
            continue;
        }
        if part == "1" {
            continue;
        }
        let (p, e) = match part.split_once('^') {
            Some((p, e)) => (p.parse::<u64>().unwrap(), e.parse::<u32>().unwrap()),
            None => (part.parse::<u64>().unwrap(), 1),
        };
        assert!(p > last, "factors out of order in {text}");
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
        write_table(&p, &params, rs, false).unwrap();
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
            assert_eq!(expand(factors), i128::from(*disc), "{factors}");
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
    let all = check(PARAMS, rows(), "all.sqlite");
    // Irreducible classes keep their labels without the reducible ones (table module doc).
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
        let ours = ours.strip_prefix("-1 * ").unwrap_or(ours);
        assert_eq!(ours, theirs.join(" * "), "factorisation of {n}");
    }
}
