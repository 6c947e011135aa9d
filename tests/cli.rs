//! The command line as a user meets it: outputs, exit codes and one-line errors.

use std::path::PathBuf;
use std::process::{Command, Output};

fn qorbits(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .output()
        .unwrap()
}

fn text(o: &Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

fn tmpdir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("qorbits-cli-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

#[test]
fn reduce_prints_the_class_and_json() {
    let o = qorbits(&["reduce", "2", "-7", "4", "13", "-6"]);
    assert!(o.status.success());
    let (out, _) = text(&o);
    assert!(out.contains("canonical    2 -1 -5 -8 6\n"), "{out}");
    assert!(out.contains("Galois group S4"), "{out}");
    let o = qorbits(&["reduce", "--json", "2", "-7", "4", "13", "-6"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["form"], serde_json::json!([2, -1, -5, -8, 6]));
    assert_eq!(v["I"], 145);
}

#[test]
fn reduce_refuses_bad_input_with_one_line_and_code_2() {
    for args in [
        vec!["reduce", "1", "2", "3"],
        vec!["reduce", "1", "2", "x", "4", "5"],
        vec!["reduce", "1", "2", "1", "0", "0"], // (x² + xy)²-type: Disc = 0
        vec!["reduce", "1.5", "2", "1", "0", "0"],
    ] {
        let o = qorbits(&args);
        let (_, err) = text(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}");
        assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
        assert!(!err.contains("panicked"));
    }
    let (_, err) = text(&qorbits(&["reduce", "1", "2", "1", "0", "0"]));
    assert!(err.contains("discriminant 0"), "{err}");
}

#[test]
fn build_verify_query_cite_stats() {
    let d = tmpdir("build");
    let db = d.join("t.sqlite");
    let dbs = db.to_str().unwrap();
    let o = qorbits(&["build", "--height", "2e4", "--out", dbs, "--quiet"]);
    assert!(o.status.success(), "{:?}", text(&o));
    assert!(d.join("t.manifest.json").exists());
    // An existing output is refused without --force, and nothing is touched.
    let before = std::fs::read(&db).unwrap();
    let o = qorbits(&["build", "--height", "2e4", "--out", dbs, "--quiet"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("--force"));
    assert_eq!(std::fs::read(&db).unwrap(), before);
    // verify: ok, then one flipped byte is caught.
    let o = qorbits(&["verify", "--db", dbs]);
    assert!(o.status.success(), "{:?}", text(&o));
    let mut bytes = before.clone();
    let k = bytes.len() / 2;
    bytes[k] ^= 1;
    let bad = d.join("bad.sqlite");
    std::fs::write(&bad, &bytes).unwrap();
    let o = qorbits(&[
        "verify",
        "--db",
        bad.to_str().unwrap(),
        "--manifest",
        d.join("t.manifest.json").to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(1), "{:?}", text(&o));
    // A file that is not SQLite at all.
    let junk = d.join("junk.sqlite");
    std::fs::write(&junk, b"this is not a database").unwrap();
    let o = qorbits(&[
        "classes",
        "--I",
        "0",
        "--J",
        "0",
        "--db",
        junk.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(!text(&o).1.contains("panicked"));
    // classes from the index, negative values as plain arguments.
    let rows = qorbits(&["classes", "--I", "-3", "--J", "-27", "--db", dbs, "--json"]);
    let rows: serde_json::Value = serde_json::from_slice(&rows.stdout).unwrap();
    let all = qorbits(&["classes", "--I", "21", "--J", "-189", "--db", dbs, "--csv"]);
    assert!(text(&all).0.starts_with("label,a,b,c,d,e,I,J"));
    assert!(rows.is_array());
    // cite names the content hash of the manifest.
    let m: serde_json::Value =
        serde_json::from_slice(&std::fs::read(d.join("t.manifest.json")).unwrap()).unwrap();
    let cite = text(&qorbits(&["cite", "--db", dbs])).0;
    assert!(
        cite.contains(m["content_sha256"].as_str().unwrap()) && cite.contains("@misc{"),
        "{cite}"
    );
    let stats = text(&qorbits(&["stats", "--db", dbs])).0;
    assert!(stats.contains("main term"), "{stats}");
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn build_into_a_missing_directory_fails_cleanly() {
    let o = qorbits(&[
        "build",
        "--height",
        "1e3",
        "--out",
        "/nonexistent-dir/x.sqlite",
        "--quiet",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let (_, err) = text(&o);
    assert_eq!(err.trim().lines().count(), 1, "{err}");
}

#[test]
fn classes_without_a_table_are_computed_and_bad_pairs_refused() {
    let o = qorbits(&["classes", "--I", "145", "--J", "-8048", "--count"]);
    assert!(o.status.success(), "{:?}", text(&o));
    assert_eq!(text(&o).0.trim(), "3");
    for (i, j) in [("1", "0"), ("9", "54"), ("x", "0")] {
        let o = qorbits(&["classes", "--I", i, "--J", j]);
        assert_eq!(o.status.code(), Some(2), "({i}, {j})");
        assert_eq!(text(&o).1.trim().lines().count(), 1);
    }
    let o = qorbits(&[
        "classes",
        "--I",
        "-48",
        "--J",
        "1404",
        "--include-reducible",
        "--json",
    ]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert!(v
        .as_array()
        .unwrap()
        .iter()
        .all(|r| r["I"] == -48 && r["local"].is_array()));
}

#[test]
fn selmer_prints_rank_and_elements() {
    // y² + y = x³ − x (rank 1, trivial torsion; from memory the first curve of rank 1):
    // 2-Selmer rank 1, one non-trivial element.
    let o = qorbits(&["selmer", "--weierstrass", "0", "0", "1", "-1", "0"]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(out.contains("2-Selmer rank  1 (order 2)"), "{out}");
    assert!(
        out.contains("\nI              48\nJ              -432\n"),
        "{out}"
    );
    let o = qorbits(&["selmer", "--short", "-7", "10", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["selmer_rank"], 2);
    assert_eq!(v["elements"].as_array().unwrap().len(), 3);
    // The same three quartics from the search by invariants, one per class over Q.
    let o = qorbits(&[
        "classes", "--I", "336", "--J", "-17280", "--over-q", "--json", "--quiet",
    ]);
    let rows: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let forms: Vec<_> = rows
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["form"].clone())
        .collect();
    let elements: Vec<_> = v["elements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| e["form"].clone())
        .collect();
    assert_eq!(forms, elements);
    // y² = x³ − x: three points of order 2, 2-Selmer rank 2 (the torsion), from memory
    // rank 0 (congruent number curve of n = 1); PARI's ellrank agrees in the tests.
    let o = qorbits(&["selmer", "--short", "-1", "0", "--json", "--quiet"]);
    let t: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        (t["selmer_rank"].as_u64(), t["two_torsion_rank"].as_u64()),
        (Some(2), Some(2))
    );
    for args in [
        vec!["selmer", "--short", "-3", "2"], // singular
        vec!["selmer", "--short", "x", "2"],
        vec!["selmer", "--short", "100000000", "1"], // H ≈ 1e29: refused, not hours of search
        vec!["selmer", "--weierstrass", "0", "0", "1"],
        vec!["selmer"],
        vec!["selmer-stats", "--height", "-5"],
    ] {
        let o = qorbits(&args);
        let (_, err) = text(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}");
        assert!(!err.contains("panicked"), "{args:?}: {err}");
        if args.len() == 4 {
            assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
        }
    }
}

#[test]
fn selmer_stats_states_the_family_and_bins() {
    let o = qorbits(&["selmer-stats", "--height", "300", "--quiet", "--jobs", "1"]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(
        out.contains("family: all integer pairs (A, B) with max(4|A|^3, 27B^2) < 300"),
        "{out}"
    );
    assert!(err.is_empty(), "--quiet: {err}");
    let o2 = qorbits(&["selmer-stats", "--height", "300", "--quiet", "--jobs", "2"]);
    assert_eq!(
        o.stdout, o2.stdout,
        "the output does not depend on the threads"
    );
    let o = qorbits(&[
        "selmer-stats",
        "--height",
        "300",
        "--quiet",
        "--json",
        "--curves",
    ]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let ranks = v["curves"].as_array().unwrap();
    assert_eq!(v["curve_count"].as_u64().unwrap() as usize, ranks.len());
    let total: u64 = ranks
        .iter()
        .map(|r| 1u64 << r["selmer_rank"].as_u64().unwrap())
        .sum();
    let avg = v["average"].as_f64().unwrap();
    assert!((avg - total as f64 / ranks.len() as f64).abs() < 1e-12);
    let binned: u64 = v["bins"]
        .as_array()
        .unwrap()
        .iter()
        .map(|b| b["curve_count"].as_u64().unwrap())
        .sum();
    assert_eq!(binned as usize, ranks.len());
}

/// A manifest is untrusted input: a file name that climbs out with `../`, an absolute path
/// or odd bytes is refused before anything is built, and nothing is written outside the
/// rebuild's own fresh directory. The target here is a harmless file of the test's own.
#[test]
fn verify_rebuild_never_writes_where_a_manifest_points() {
    let d = tmpdir("escape");
    let victim = d.join("victim.sqlite");
    std::fs::write(&victim, b"harmless").unwrap();
    let committed = std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("manifests/qorbits-h1e4.manifest.json"),
    )
    .unwrap();
    let mut v: serde_json::Value = serde_json::from_str(&committed).unwrap();
    let climb = format!("{}{}", "../".repeat(12), victim.display());
    for name in [
        climb.as_str(),
        victim.to_str().unwrap(),
        "",
        "..",
        "sub/t.sqlite",
        "a\nb.sqlite",
    ] {
        v["file"]["name"] = serde_json::Value::String(name.to_string());
        let m = d.join("hostile.manifest.json");
        std::fs::write(&m, serde_json::to_string_pretty(&v).unwrap()).unwrap();
        let o = qorbits(&["verify", "--rebuild", m.to_str().unwrap(), "--quiet"]);
        let (_, err) = text(&o);
        assert_eq!(o.status.code(), Some(2), "{name:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{name:?}: {err}");
        assert!(err.contains("file name"), "{name:?}: {err}");
        assert_eq!(std::fs::read(&victim).unwrap(), b"harmless", "{name:?}");
        assert!(!d.join("victim.manifest.json").exists(), "{name:?}");
    }
    // With a plain name the rebuild runs in its own directory and leaves nothing behind in
    // the working directory.
    v["file"]["name"] = serde_json::Value::String("victim.sqlite".into());
    let m = d.join("plain.manifest.json");
    std::fs::write(&m, serde_json::to_string_pretty(&v).unwrap()).unwrap();
    let o = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(["verify", "--rebuild", m.to_str().unwrap(), "--quiet"])
        .current_dir(&d)
        .output()
        .unwrap();
    assert!(o.status.success(), "{:?}", text(&o));
    assert_eq!(std::fs::read(&victim).unwrap(), b"harmless");
    assert!(!d.join("victim.manifest.json").exists());
}

/// Writers replace only regular files: an output that is a symbolic link is refused even
/// with --force, and the file it points to is untouched.
#[test]
fn build_refuses_to_write_through_a_symlink() {
    let d = tmpdir("symlink");
    let target = d.join("target.txt");
    std::fs::write(&target, b"keep me").unwrap();
    let link = d.join("t.sqlite");
    std::os::unix::fs::symlink(&target, &link).unwrap();
    let o = qorbits(&[
        "build",
        "--height",
        "1e3",
        "--out",
        link.to_str().unwrap(),
        "--force",
        "--quiet",
    ]);
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("symbolic link"), "{err}");
    assert_eq!(std::fs::read(&target).unwrap(), b"keep me");
    assert!(std::fs::symlink_metadata(&link)
        .unwrap()
        .file_type()
        .is_symlink());
}
