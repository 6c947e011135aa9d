//! The command line's surface as a user meets it: one-line errors with exit status 2 for
//! every usage error (the argument parser's included), a quiet end on a closed pipe,
//! `verify` judging the file and not the program, the reason a table does not answer,
//! estimates and refusals before long work, and text layouts that read well.

mod common;

use common::fixture::TestDir;
use std::process::{Command, Output, Stdio};

fn qorbits(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .output()
        .unwrap()
}

fn err(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn out(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn assert_usage_error(args: &[&str], needle: &str) {
    let o = qorbits(args);
    let e = err(&o);
    assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
    assert_eq!(e.lines().count(), 1, "{args:?}: not one line: {e}");
    assert!(e.starts_with("qorbits: "), "{args:?}: {e}");
    assert!(e.contains(needle), "{args:?}: {e} lacks {needle:?}");
    assert!(
        !e.contains("panicked") && !e.contains("..="),
        "{args:?}: {e}"
    );
}

#[test]
fn every_usage_error_is_one_line_with_status_2() {
    assert_usage_error(&["build"], "--height");
    assert_usage_error(
        &["build", "--height", "-1"],
        "height '-1' is not a positive integer",
    );
    assert_usage_error(&["build", "--height", "1e19"], "1 to 10^18");
    assert_usage_error(&["build", "--height", "1e6", "--jobs", "-1"], "--jobs '-1'");
    assert_usage_error(&["build", "--height", "1e6", "--jobs", "0"], "--jobs '0'");
    assert_usage_error(&["frobnicate"], "qorbits --help");
    assert_usage_error(&["reduce", "1", "2", "--bogus"], "qorbits reduce --help");
    assert_usage_error(&["classes", "--I", "1"], "--J");
    assert_usage_error(
        &["classes", "--I", "1", "--J", "2", "--count", "--json"],
        "--count",
    );
    assert_usage_error(
        &["classes", "--I", "10", "--J", "-29", "--json", "--csv"],
        "--csv",
    );
    assert_usage_error(&["selmer", "--weierstrass", "0", "0", "1"], "selmer --help");
    assert_usage_error(&["selmer-stats", "--height", "-5"], "height '-5'");
    assert_usage_error(
        &["verify", "--db", "/no/such/table.sqlite"],
        "does not exist",
    );
    assert_usage_error(
        &["stats", "--db", "/no/such/table.sqlite"],
        "does not exist",
    );
    assert_usage_error(&["cite", "--db", "/no/such/table.sqlite"], "does not exist");
    assert_usage_error(&["cite"], "--db");
    assert_usage_error(&["classes", "--galois", "D4"], "--db");
    assert_usage_error(
        &["classes", "--db", "x.sqlite", "--galois", "Q8"],
        "--galois 'Q8'",
    );
    assert_usage_error(&["classes"], "give the invariants");
    assert_usage_error(
        &["export", "--db", "/no/such/table.sqlite", "--format", "csv"],
        "does not exist",
    );
    assert_usage_error(
        &["reduce", "--batch", "/no/such/forms.txt"],
        "cannot read the forms",
    );
    assert_usage_error(&["completions", "tcsh"], "completions --help");
    assert_usage_error(&["man", "nosuch"], "not a subcommand");
    // Help and version are not errors.
    for args in [vec!["--help"], vec!["build", "--help"], vec!["--version"]] {
        let o = qorbits(&args);
        assert_eq!(o.status.code(), Some(0), "{args:?}");
    }
}

#[test]
fn every_subcommand_help_has_an_example_and_no_stale_text() {
    let top = out(&qorbits(&["--help"]));
    assert!(!top.contains("without rational 2-torsion"), "{top}");
    for sub in [
        "reduce",
        "build",
        "verify",
        "classes",
        "cite",
        "stats",
        "selmer",
        "selmer-stats",
        "export",
        "plot",
        "release",
        "completions",
        "man",
    ] {
        let h = out(&qorbits(&[sub, "--help"]));
        assert!(h.contains("Example"), "{sub} --help has no example:\n{h}");
        assert!(!h.contains("without rational 2-torsion"), "{sub}: {h}");
    }
}

#[test]
fn a_closed_pipe_ends_quietly() {
    // The reader goes away before the output is written, like `| head -1` on a command
    // that works first and prints at the end: the write meets a closed pipe.
    for args in [
        vec!["selmer-stats", "--height", "2000", "--curves", "--quiet"],
        vec![
            "verify",
            "--rebuild",
            "manifests/qorbits-h1e4.manifest.json",
            "--quiet",
        ],
    ] {
        let mut child = Command::new(env!("CARGO_BIN_EXE_qorbits"))
            .args(&args)
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stdout.take());
        let o = child.wait_with_output().unwrap();
        assert_ne!(o.status.code(), Some(101), "{args:?} panicked: {}", err(&o));
        assert!(err(&o).is_empty(), "{args:?}: {}", err(&o));
    }
}

#[test]
fn verify_judges_the_file_not_the_program() {
    let d = TestDir::new("surface-verify");
    let db = d.join("t.sqlite");
    let o = qorbits(&[
        "build",
        "--height",
        "1e4",
        "--out",
        db.to_str().unwrap(),
        "--quiet",
    ]);
    assert!(o.status.success(), "{}", err(&o));
    let manifest = d.join("t.manifest.json");
    let other = d.join("other.sqlite");
    rusqlite::Connection::open(&other)
        .unwrap()
        .execute_batch("CREATE TABLE t (x INTEGER); INSERT INTO t VALUES (1);")
        .unwrap();
    let text = d.join("text.sqlite");
    std::fs::write(&text, "a text file, not a table\n").unwrap();
    let empty = d.join("empty.sqlite");
    std::fs::write(&empty, b"").unwrap();
    for f in [&other, &text, &empty] {
        let o = qorbits(&[
            "verify",
            "--db",
            f.to_str().unwrap(),
            "--manifest",
            manifest.to_str().unwrap(),
        ]);
        let s = out(&o);
        assert_eq!(o.status.code(), Some(1), "{}: {s}", f.display());
        let schema = s.lines().find(|l| l.contains("schema version")).unwrap();
        assert!(schema.starts_with("FAIL"), "{}: {schema}", f.display());
    }
    let s = out(&qorbits(&["verify", "--db", db.to_str().unwrap()]));
    assert!(s.contains("ok   schema version         4"), "{s}");
}

#[test]
fn a_table_that_cannot_answer_says_why() {
    let d = TestDir::new("surface-cover");
    let db = d.join("t.sqlite");
    let dbs = db.to_str().unwrap();
    assert!(
        qorbits(&["build", "--height", "2e3", "--out", dbs, "--quiet"])
            .status
            .success()
    );
    // (12, 0) has H = 1728 < 2000, but the table holds only irreducible classes.
    let o = qorbits(&[
        "classes",
        "--I",
        "12",
        "--J",
        "0",
        "--db",
        dbs,
        "--include-reducible",
    ]);
    assert!(o.status.success(), "{}", err(&o));
    assert!(
        err(&o).contains("holds only irreducible classes"),
        "{}",
        err(&o)
    );
    let o = qorbits(&["classes", "--I", "28", "--J", "-160", "--db", dbs]);
    assert!(
        err(&o).contains("not below the table's bound 2000"),
        "{}",
        err(&o)
    );
}

#[test]
fn long_work_is_estimated_and_refused_beyond_the_limit() {
    // H ≈ 10²⁰: hours of search.
    let o = qorbits(&["classes", "--I", "4641591", "--J", "0"]);
    assert_eq!(o.status.code(), Some(2));
    let e = err(&o);
    assert!(
        e.contains("estimated to take") && e.contains("--allow-long"),
        "{e}"
    );
    assert_eq!(e.lines().count(), 1);
    let o = qorbits(&["selmer-stats", "--height", "1e30"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(err(&o).contains("years"), "{}", err(&o));
    // A 300-digit form says what it is doing before it starts.
    let big = format!("1{}", "0".repeat(299));
    let o = qorbits(&["reduce", "1", "0", "0", "1", &big]);
    assert!(o.status.success(), "{}", err(&o));
    assert!(err(&o).contains("300-digit coefficients"), "{}", err(&o));
}

#[test]
fn text_layouts_split_on_whitespace_and_count_in_words() {
    let o = qorbits(&["classes", "--I", "10", "--J", "-29"]);
    let s = out(&o);
    let lines: Vec<&str> = s.lines().collect();
    assert_eq!(lines.last(), Some(&"1 class"), "{s}");
    let widths: Vec<usize> = lines[..lines.len() - 1]
        .iter()
        .map(|l| l.split_whitespace().count())
        .collect();
    assert!(widths.iter().all(|w| *w == 18), "{widths:?}\n{s}");
    // A family without curves says so instead of an average of zero.
    let s = out(&qorbits(&["selmer-stats", "--height", "5", "--quiet"]));
    assert!(s.contains("no curve"), "{s}");
    // The local data of a form with large primes stays in columns.
    let s = out(&qorbits(&["reduce", "1", "0", "0", "0", "-123456789"]));
    let local: Vec<&str> = s
        .lines()
        .skip_while(|l| !l.trim_start().starts_with("place"))
        .collect();
    assert!(local.len() >= 3, "{s}");
    assert!(
        local.iter().all(|l| l.split_whitespace().count() >= 4),
        "{s}"
    );
}

#[test]
fn cite_gives_year_url_and_parameters_in_words() {
    let d = TestDir::new("surface-cite");
    let db = d.join("t.sqlite");
    let dbs = db.to_str().unwrap();
    assert!(
        qorbits(&["build", "--height", "1e3", "--out", dbs, "--quiet"])
            .status
            .success()
    );
    let b = out(&qorbits(&[
        "cite",
        "--db",
        dbs,
        "--format",
        "bibtex",
        "--year",
        "2026",
        "--url",
        "https://example.org/t",
    ]));
    assert!(
        b.starts_with("@misc{") && b.contains("year         = {2026}"),
        "{b}"
    );
    assert!(b.contains("url          = {https://example.org/t}"), "{b}");
    assert!(b.contains("height") && b.contains("below 1000"), "{b}");
    assert!(!b.contains("cff-version"), "bibtex only: {b}");
    let c = out(&qorbits(&[
        "cite",
        "--db",
        dbs,
        "--format",
        "cff",
        "--url",
        "10.5281/zenodo.1",
    ]));
    assert!(
        c.starts_with("cff-version: 1.2.0") && c.contains("type: doi"),
        "{c}"
    );
    assert!(!c.contains("@misc"), "{c}");
    assert_eq!(
        qorbits(&["cite", "--db", dbs, "--year", "soon"])
            .status
            .code(),
        Some(2)
    );
}
