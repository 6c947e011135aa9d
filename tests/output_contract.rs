//! Every command's `--json` and `--jsonl` output against the documented contract
//! (docs/output.md: the key lists and the integer rule), and every `--csv` read back by
//! Python's `csv` module (the standard library's RFC 4180 reader) with exactly the header's
//! number of fields in every row.

mod common;

use common::fixture::TestDir;
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::Command;

fn qorbits(args: &[&str]) -> Vec<u8> {
    let o = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    o.stdout
}

/// The key blocks of docs/output.md: block name → (key path → type).
fn contract() -> BTreeMap<String, BTreeMap<String, String>> {
    let doc =
        std::fs::read_to_string(PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("docs/output.md"))
            .unwrap();
    let mut out = BTreeMap::new();
    let mut current: Option<(String, BTreeMap<String, String>)> = None;
    for line in doc.lines() {
        if let Some(name) = line.strip_prefix("```keys ") {
            current = Some((name.trim().to_string(), BTreeMap::new()));
        } else if line.starts_with("```") {
            if let Some((name, keys)) = current.take() {
                out.insert(name, keys);
            }
        } else if let Some((_, keys)) = current.as_mut() {
            let (k, t) = line.split_once(':').expect("key: type");
            keys.insert(k.trim().to_string(), t.trim().to_string());
        }
    }
    assert!(out.len() >= 6, "key blocks found: {:?}", out.keys());
    out
}

const SAFE: i128 = (1 << 53) - 1;

/// Whether `v` is an `int` of the contract: a safe number, or the decimal string of an
/// unsafe one.
fn is_int(v: &Value) -> bool {
    match v {
        Value::Number(n) => n.as_i64().is_some_and(|x| i128::from(x).abs() <= SAFE),
        Value::String(s) => {
            let digits = s.strip_prefix('-').unwrap_or(s);
            !digits.is_empty()
                && digits.bytes().all(|b| b.is_ascii_digit())
                && s.parse::<rug::Integer>()
                    .is_ok_and(|n| n.clone().abs() > SAFE)
        }
        _ => false,
    }
}

fn has_type(v: &Value, t: &str) -> bool {
    if let Some(inner) = t.strip_suffix('?') {
        return v.is_null() || has_type(v, inner);
    }
    if let Some(inner) = t.strip_prefix("list<").and_then(|r| r.strip_suffix('>')) {
        return v
            .as_array()
            .is_some_and(|a| a.iter().all(|x| has_type(x, inner)));
    }
    let list_of = |n: usize, f: &dyn Fn(&Value) -> bool| {
        v.as_array()
            .is_some_and(|a| a.len() == n && a.iter().all(f))
    };
    match t {
        "int" => is_int(v),
        "height" => match v {
            Value::Number(n) => n.as_f64().is_some_and(|x| (4.0 * x).fract() == 0.0),
            Value::String(s) => s.parse::<f64>().is_ok(),
            _ => false,
        },
        "number" => v.is_number(),
        "str" => v.is_string(),
        "bool" => v.is_boolean(),
        "object" => v.is_object(),
        "form" => list_of(5, &is_int),
        "matrix" => list_of(2, &|r: &Value| {
            r.as_array()
                .is_some_and(|r| r.len() == 2 && r.iter().all(is_int))
        }),
        "factors" => v.as_array().is_some_and(|a| {
            a.iter().all(|pe| {
                pe.as_array()
                    .is_some_and(|pe| pe.len() == 2 && pe.iter().all(is_int))
            })
        }),
        other => panic!("unknown type {other} in docs/output.md"),
    }
}

/// Checks `v` against the keys of `spec` under `prefix` (`""`, `x.` or `x[].`); keys in
/// `optional` may be absent.
fn check(v: &Value, spec: &BTreeMap<String, String>, prefix: &str, optional: &[&str], at: &str) {
    let obj = v
        .as_object()
        .unwrap_or_else(|| panic!("{at}: not an object: {v}"));
    let own: BTreeMap<&str, &str> = spec
        .iter()
        .filter_map(|(k, t)| {
            let rest = k.strip_prefix(prefix)?;
            (!rest.contains('.') && !rest.contains("[]")).then_some((rest, t.as_str()))
        })
        .collect();
    for key in obj.keys() {
        assert!(
            own.contains_key(key.as_str()),
            "{at}: key {prefix}{key} is not documented"
        );
    }
    for (key, t) in &own {
        let Some(x) = obj.get(*key) else {
            assert!(
                optional.contains(key),
                "{at}: documented key {prefix}{key} is missing"
            );
            continue;
        };
        assert!(
            has_type(x, t),
            "{at}: {prefix}{key} = {x} is not of type {t}"
        );
        if *t == "object" {
            check(x, spec, &format!("{prefix}{key}."), optional, at);
        }
        if t.starts_with("list<object>") {
            for item in x.as_array().into_iter().flatten() {
                check(item, spec, &format!("{prefix}{key}[]."), optional, at);
            }
        }
    }
}

fn json(args: &[&str]) -> Value {
    serde_json::from_slice(&qorbits(args)).unwrap_or_else(|e| panic!("{args:?}: {e}"))
}

#[test]
fn every_json_output_follows_the_documented_contract() {
    let c = contract();
    let d = TestDir::new("contract");
    let db = d.join("t.sqlite");
    let dbs = db.to_str().unwrap();
    qorbits(&[
        "build",
        "--height",
        "3e4",
        "--include-reducible",
        "--out",
        dbs,
        "--quiet",
    ]);

    // classes: computed, from a table, JSON and JSON Lines agree.
    for args in [
        vec!["classes", "--I", "10", "--J", "-29", "--json", "--quiet"],
        vec!["classes", "--I", "28", "--J", "-160", "--json", "--db", dbs],
        vec![
            "classes",
            "--I",
            "0",
            "--J",
            "-27",
            "--include-reducible",
            "--json",
            "--db",
            dbs,
        ],
    ] {
        let rows = json(&args);
        let rows = rows.as_array().expect("an array of classes");
        assert!(!rows.is_empty(), "{args:?}");
        for r in rows {
            check(r, &c["class"], "", &[], &format!("{args:?}"));
        }
        let mut lines_args = args.clone();
        let k = lines_args.iter().position(|a| *a == "--json").unwrap();
        lines_args[k] = "--jsonl";
        let text = String::from_utf8(qorbits(&lines_args)).unwrap();
        let lines: Vec<Value> = text
            .lines()
            .map(|l| serde_json::from_str(l).unwrap())
            .collect();
        assert_eq!(
            &lines, rows,
            "--jsonl has the objects of --json, one a line"
        );
    }

    // reduce: a small form (numbers) and one with 40-digit coefficients (strings).
    let r = json(&["reduce", "--json", "2", "-7", "4", "13", "-6"]);
    check(&r, &c["reduce"], "", &[], "reduce");
    assert_eq!(r["H4"], 64770304);
    let big = "1234567890123456789012345678901234567890";
    let r = json(&["reduce", "--json", "--quiet", "1", "0", "0", "0", big]);
    check(&r, &c["reduce"], "", &[], "reduce big");
    assert!(r["I"].is_string(), "a 42-digit I is a string: {}", r["I"]);

    // selmer: minimal and non-minimal models.
    for args in [
        vec!["selmer", "--short", "-7", "10", "--json", "--quiet"],
        vec!["selmer", "--short", "-112", "640", "--json", "--quiet"],
        vec![
            "selmer",
            "--weierstrass",
            "0",
            "0",
            "1",
            "-1",
            "0",
            "--json",
            "--quiet",
        ],
    ] {
        check(&json(&args), &c["selmer"], "", &[], &format!("{args:?}"));
    }
    let m = json(&["selmer", "--short", "-112", "640", "--json", "--quiet"]);
    assert_eq!(
        (m["minimised"].as_bool(), m["scale"].as_i64()),
        (Some(true), Some(2))
    );

    // selmer-stats with and without the curves.
    let s = json(&[
        "selmer-stats",
        "--height",
        "2000",
        "--json",
        "--curves",
        "--quiet",
    ]);
    check(&s, &c["selmer-stats"], "", &[], "selmer-stats --curves");
    let s = json(&["selmer-stats", "--height", "2000", "--json", "--quiet"]);
    check(&s, &c["selmer-stats"], "", &["curves"], "selmer-stats");
    assert!(s.get("curves").is_none());

    check(
        &json(&["stats", "--db", dbs, "--json"]),
        &c["stats"],
        "",
        &[],
        "stats",
    );
    let v = json(&["verify", "--db", dbs, "--json"]);
    check(&v, &c["verify"], "", &[], "verify");
    assert_eq!(v["ok"], true);

    // reduce --db: the class object and its place in the table (covered or not).
    let mut spec = c["reduce"].clone();
    spec.extend(c["reduce-table"].clone());
    for form in [["1", "0", "0", "0", "2"], ["2", "-7", "4", "13", "-6"]] {
        let mut args = vec!["reduce", "--json", "--db", dbs];
        args.extend(form);
        check(&json(&args), &spec, "", &[], "reduce --db");
    }
    // selections print class objects.
    for args in [
        vec!["classes", "--db", dbs, "--galois", "C4", "--json"],
        vec!["classes", "--db", dbs, "--height-below", "5000", "--json"],
    ] {
        let rows = json(&args);
        assert!(!rows.as_array().unwrap().is_empty(), "{args:?}");
        for r in rows.as_array().unwrap() {
            check(r, &c["class"], "", &[], &format!("{args:?}"));
        }
    }
    // reduce --batch: forms and error lines, with and without a table.
    let forms = d.join("forms.txt");
    std::fs::write(
        &forms,
        "1 0 0 0 2\n3, 1, 4, 1, 5\nnot a form\n1 2 1 0 0\n[1, 0, 0, 0, 123456789012345678901]\n",
    )
    .unwrap();
    for with_db in [false, true] {
        let mut args = vec!["reduce", "--batch", forms.to_str().unwrap()];
        if with_db {
            args.extend(["--db", dbs]);
        }
        let text = String::from_utf8(qorbits(&args)).unwrap();
        let mut errors = 0;
        for l in text.lines() {
            let v: Value = serde_json::from_str(l).unwrap();
            if v.get("error").is_some() {
                errors += 1;
                check(
                    &v,
                    &c["reduce-batch-error"],
                    "",
                    &[],
                    "reduce --batch error",
                );
            } else {
                check(&v, &c["reduce-batch"], "", &[], "reduce --batch");
                assert_eq!(v["table"].is_null(), !with_db);
            }
        }
        assert_eq!((text.lines().count(), errors), (5, 2));
    }
    // export --format jsonl: every line.
    let text = String::from_utf8(qorbits(&[
        "export", "--db", dbs, "--format", "jsonl", "--quiet",
    ]))
    .unwrap();
    assert!(text.lines().count() > 100);
    for l in text.lines() {
        check(
            &serde_json::from_str(l).unwrap(),
            &c["export"],
            "",
            &[],
            "export",
        );
    }
}

/// Parses CSV with Python's csv module and returns (header length, row lengths).
fn python_csv(text: &[u8]) -> (usize, Vec<usize>) {
    let d = TestDir::new("csvpy");
    let f = d.join("x.csv");
    std::fs::write(&f, text).unwrap();
    let o = Command::new("python3")
        .arg("-c")
        .arg(
            "import csv, sys\nrows = list(csv.reader(open(sys.argv[1], newline='')))\n\
             print(len(rows[0]))\nprint(' '.join(str(len(r)) for r in rows[1:]))",
        )
        .arg(&f)
        .output()
        .expect("python3 is needed for this test");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let out = String::from_utf8(o.stdout).unwrap();
    let mut lines = out.lines();
    let header = lines.next().unwrap().parse().unwrap();
    let rows = lines
        .next()
        .unwrap_or("")
        .split_whitespace()
        .map(|n| n.parse().unwrap())
        .collect();
    (header, rows)
}

#[test]
fn every_csv_reads_back_with_the_header_width() {
    let tier = common::tier::tier_1e5().to_str().unwrap().to_string();
    for args in [
        // insoluble_at "3,inf" holds a comma and must be quoted.
        vec!["classes", "--I", "10", "--J", "-29", "--csv", "--quiet"],
        vec![
            "classes",
            "--I",
            "-48",
            "--J",
            "1404",
            "--include-reducible",
            "--csv",
            "--quiet",
        ],
        vec!["selmer-stats", "--height", "2000", "--csv", "--quiet"],
        vec![
            "selmer-stats",
            "--height",
            "2000",
            "--csv",
            "--curves",
            "--quiet",
        ],
        vec![
            "export",
            "--db",
            tier.as_str(),
            "--format",
            "csv",
            "--quiet",
        ],
        vec!["classes", "--db", tier.as_str(), "--galois", "D4", "--csv"],
    ] {
        let out = qorbits(&args);
        let (header, rows) = python_csv(&out);
        assert!(!rows.is_empty(), "{args:?}");
        assert!(
            rows.iter().all(|n| *n == header),
            "{args:?}: {header} vs {rows:?}"
        );
    }
    let out = String::from_utf8(qorbits(&[
        "classes", "--I", "10", "--J", "-29", "--csv", "--quiet",
    ]))
    .unwrap();
    assert!(out.contains("\"3,inf\""), "{out}");
}
