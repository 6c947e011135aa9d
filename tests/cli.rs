//! The command line as a user meets it: outputs, exit codes and one-line errors.
//!
//! Values asserted here come from outside the binary: PARI/GP (`polgalois`, `poldisc`,
//! `ellinit`, `ellrank`, `elltors`), the formulas of DESIGN §2, a brute-force count of
//! classes written in this file, or the library's `canonical` (whose rule is tested directly
//! in `tests/canonical_rule.rs`).

mod common;

use qorbits::form::canonical::canonical;
use qorbits::form::Form;
use rug::Integer;
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

/// I and J by the formulas of DESIGN §2.
fn i_j(f: [i64; 5]) -> (i128, i128) {
    let [a, b, c, d, e] = f.map(i128::from);
    (
        12 * a * e - 3 * b * d + c * c,
        72 * a * c * e + 9 * b * c * d - 27 * a * d * d - 27 * e * b * b - 2 * c * c * c,
    )
}

#[test]
fn reduce_prints_the_class_and_json() {
    let f = [2i64, -7, 4, 13, -6];
    let args: Vec<String> = f.iter().map(|v| v.to_string()).collect();
    let mut argv = vec!["reduce"];
    argv.extend(args.iter().map(String::as_str));
    let o = qorbits(&argv);
    assert!(o.status.success());
    let (out, _) = text(&o);
    // The canonical form: the library's, whose rule tests/canonical_rule.rs checks directly.
    let c = canonical(&Form::<Integer>::from_i64(f)).unwrap().form.c;
    let shown = format!(
        "canonical    {} {} {} {} {}\n",
        c[0], c[1], c[2], c[3], c[4]
    );
    assert!(out.contains(&shown), "{out}");
    // PARI/GP: the Galois group (polgalois order 24 is S4) and Disc, which must satisfy
    // 4I³ − J² = 27·Disc (DESIGN §2) with I and J from their formulas.
    let (i, j) = i_j(f);
    let pari = common::gp_lines(
        &format!(
            "P=({})*x^4+({})*x^3+({})*x^2+({})*x+({}); print(polgalois(P)[1]); print(poldisc(P))\n",
            f[0], f[1], f[2], f[3], f[4]
        ),
        2,
    );
    assert_eq!(pari[0].trim(), "24", "PARI polgalois");
    let disc: i128 = pari[1].trim().parse().unwrap();
    assert_eq!(4 * i * i * i - j * j, 27 * disc, "4I³ − J² = 27·Disc");
    assert!(out.contains("Galois group S4"), "{out}");
    argv.insert(1, "--json");
    let o = qorbits(&argv);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let want: Vec<i64> = c.iter().map(|v| v.to_i64().unwrap()).collect();
    assert_eq!(v["form"], serde_json::json!(want));
    assert_eq!(v["I"], i as i64);
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

/// The number of classes of irreducible forms with invariants (I, J), counted by brute
/// force here, independently of the library's enumerators: every form with a ≠ 0 and
/// (a, b, c) in a box, d from the quadratic that I and J impose (e is linear in I:
/// `12a·e = I − c² + 3bd`, then `12a·J = K(I − c² + 3bd) + 108abcd − 324a²d² − 24ac³` with
/// `K = 72ac − 27b²`, derived here from the formulas of DESIGN §2), e from I, each checked
/// against the formulas; the forms are then grouped by the library's canonical form and
/// PARI's `polisirreducible` keeps the irreducible classes. The box is at least 1.5 times
/// the ranges that the bounds of docs/enumeration.md (§1, §5) give for a member with point
/// in F_η: |a| ≤ 0.577·K/0.75, |b| ≤ 2.887·K/0.866 + 2|a|, |c| ≤ 4.619·K + 1.5|b| + 1.5|a|
/// with K = H^{1/6}.
fn irreducible_classes_by_brute_force(i: i128, j: i128) -> usize {
    let h = ((4 * i.abs().pow(3)).max(j * j) as f64 / 4.0).powf(1.0 / 6.0);
    let am = (1.5 * 0.577 * h / 0.75).ceil() as i128;
    let bm = (1.5 * (2.887 * h / 0.866 + 2.0 * am as f64)).ceil() as i128;
    let cm = (1.5 * (4.619 * h + 1.5 * bm as f64 + 1.5 * am as f64)).ceil() as i128;
    let mut found = std::collections::BTreeSet::new();
    let isqrt = |n: i128| -> Option<i128> {
        if n < 0 {
            return None;
        }
        let r = Integer::from(n).sqrt().to_i128().unwrap();
        (r * r == n).then_some(r)
    };
    for a in (-am..=am).filter(|a| *a != 0) {
        for b in -bm..=bm {
            for c in -cm..=cm {
                let k = 72 * a * c - 27 * b * b;
                let q2 = -324 * a * a;
                let q1 = 3 * b * k + 108 * a * b * c;
                let q0 = k * (i - c * c) - 24 * a * c * c * c - 12 * a * j;
                let Some(r) = isqrt(q1 * q1 - 4 * q2 * q0) else {
                    continue;
                };
                for num in [-q1 + r, -q1 - r] {
                    if num % (2 * q2) != 0 {
                        continue;
                    }
                    let d = num / (2 * q2);
                    let e12 = i - c * c + 3 * b * d;
                    if e12 % (12 * a) != 0 {
                        continue;
                    }
                    let f = [a, b, c, d, e12 / (12 * a)].map(|v| v as i64);
                    assert_eq!(i_j(f), (i, j), "{f:?}");
                    found.insert(canonical(&Form::<Integer>::from_i64(f)).unwrap().form.c);
                }
            }
        }
    }
    let forms: Vec<_> = found.into_iter().collect();
    let script: String = forms
        .iter()
        .map(|c| {
            format!(
                "print(polisirreducible(({})*x^4+({})*x^3+({})*x^2+({})*x+({})))\n",
                c[0], c[1], c[2], c[3], c[4]
            )
        })
        .collect();
    let irreducible = common::gp_lines(&script, forms.len())
        .iter()
        .filter(|l| l.trim() == "1")
        .count();
    assert!(irreducible > 0, "no irreducible class with ({i}, {j})");
    irreducible
}

#[test]
fn classes_without_a_table_are_computed_and_bad_pairs_refused() {
    let o = qorbits(&["classes", "--I", "145", "--J", "-8048", "--count"]);
    assert!(o.status.success(), "{:?}", text(&o));
    let want = irreducible_classes_by_brute_force(145, -8048);
    assert_eq!(text(&o).0.trim(), want.to_string());
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

/// PARI/GP's view of a curve `[a1, a2, a3, a4, a6]`: (I, J) = (c4, 2·c6) from `ellinit`
/// (DESIGN's invariants of its quartics), the 2-Selmer rank `R + s + T` from `ellrank`
/// (see tests/selmer_pari.rs) and the 2-torsion rank T from `elltors`.
fn pari_curve(a: [i64; 5]) -> (i64, i64, u64, u64) {
    let script = format!(
        "E=ellinit([{},{},{},{},{}]); r=ellrank(E); t=elltors(E)[2]; T=#[x|x<-t,x%2==0]; \
         print(E.c4, \" \", 2*E.c6, \" \", r[2]+r[3]+T, \" \", T)\n",
        a[0], a[1], a[2], a[3], a[4]
    );
    let line = &common::gp_lines(&script, 1)[0];
    let v: Vec<i64> = line
        .split_whitespace()
        .map(|t| t.parse().unwrap())
        .collect();
    (v[0], v[1], v[2] as u64, v[3] as u64)
}

#[test]
fn selmer_prints_rank_and_elements() {
    // y² + y = x³ − x (rank 1, trivial torsion; from memory the first curve of rank 1);
    // PARI gives its invariants and 2-Selmer rank.
    let (i, j, rank, _) = pari_curve([0, 0, 1, -1, 0]);
    let o = qorbits(&["selmer", "--weierstrass", "0", "0", "1", "-1", "0"]);
    let (out, err) = text(&o);
    assert!(o.status.success(), "{err}");
    assert!(
        out.contains(&format!("2-Selmer rank  {rank} (order {})", 1u64 << rank)),
        "{out}"
    );
    assert!(
        out.contains(&format!("\nI              {i}\nJ              {j}\n")),
        "{out}"
    );
    let (i, j, rank, _) = pari_curve([0, 0, 0, -7, 10]);
    let o = qorbits(&["selmer", "--short", "-7", "10", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["selmer_rank"], rank);
    // 2^rank − 1 non-trivial elements.
    assert_eq!(
        v["elements"].as_array().unwrap().len() as u64,
        (1 << rank) - 1
    );
    // The same quartics from the search by invariants, one per class over Q.
    let (i, j) = (i.to_string(), j.to_string());
    let o = qorbits(&[
        "classes", "--I", &i, "--J", &j, "--over-q", "--json", "--quiet",
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
    // y² = x³ − x: three points of order 2 and (from memory) rank 0, the congruent number
    // curve of n = 1; PARI gives the 2-Selmer and 2-torsion ranks.
    let (_, _, rank, torsion) = pari_curve([0, 0, 0, -1, 0]);
    assert_eq!(torsion, 2, "PARI elltors");
    let o = qorbits(&["selmer", "--short", "-1", "0", "--json", "--quiet"]);
    let t: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(
        (t["selmer_rank"].as_u64(), t["two_torsion_rank"].as_u64()),
        (Some(rank), Some(torsion))
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
