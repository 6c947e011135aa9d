//! The curve dataset of `qorbits selmer-stats --out` (schema/curves-v1.sql): its rows against
//! PARI/GP, its bytes against the number of threads, its manifest (documented keys,
//! hostile manifests) under `verify`, `verify --rebuild` and `cite`, and the refusal of an
//! existing output. Damage and kills: `tests/curve_dataset_damage.rs`.
//!
//! External sources: PARI/GP (Debian package pari-gp), `ellrank` and `elltors`, read as in
//! `tests/selmer_pari.rs`: `ellrank` returns `[r, R, s, L]` and the 2-Selmer rank is
//! `R + s + T` with T the number of even cyclic factors of `elltors` (the rank of E(Q)[2]);
//! `polisirreducible` for the element quartics; the invariants I = 12ae − 3bd + c² and
//! J = 72ace + 9bcd − 27ad² − 27eb² − 2c³ (DESIGN §2, handbook formulas) computed here; the
//! sqlite3 shell and coreutils sha256sum for the content recipe.

mod common;

use common::curves::{manifest, ok, qorbits, verify, write};
use common::fixture::{assert_one_line, TestDir};
use std::path::Path;
use std::process::{Command, Stdio};

type CurveRow = (i64, i64, i64, i64, i64, i64, i64, i64, i64);

fn curves(db: &Path) -> Vec<CurveRow> {
    let c = rusqlite::Connection::open(db).unwrap();
    let mut st = c
        .prepare(
            "SELECT A, B, height, disc, I, J, two_torsion_rank, selmer_rank, elements FROM curves \
             ORDER BY id",
        )
        .unwrap();
    let rows = st.query_map([], |r| {
        Ok((
            r.get(0)?,
            r.get(1)?,
            r.get(2)?,
            r.get(3)?,
            r.get(4)?,
            r.get(5)?,
            r.get(6)?,
            r.get(7)?,
            r.get(8)?,
        ))
    });
    rows.unwrap().map(Result::unwrap).collect()
}

/// Every element: (A, B, n, label, [a, b, c, d, e]) in key order.
fn elements(db: &Path) -> Vec<(i64, i64, i64, String, [i64; 5])> {
    let c = rusqlite::Connection::open(db).unwrap();
    let mut st = c
        .prepare(
            "SELECT c.A, c.B, e.n, e.label, e.a, e.b, e.c, e.d, e.e FROM elements e \
             JOIN curves c ON c.id = e.curve_id ORDER BY e.curve_id, e.n",
        )
        .unwrap();
    let rows = st.query_map([], |r| {
        let f = [r.get(4)?, r.get(5)?, r.get(6)?, r.get(7)?, r.get(8)?];
        Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?, f))
    });
    rows.unwrap().map(Result::unwrap).collect()
}

#[test]
fn every_curve_row_agrees_with_pari_at_1e4() {
    let d = TestDir::new("curves-pari");
    let db = write(&d.0, "1e4", "2");
    let rows = curves(&db);
    let els = elements(&db);
    assert_eq!(
        rows.len(),
        926,
        "curves below 10^4 (as selmer-stats counts them)"
    );
    // PARI/GP: one line per curve, so a failed line cannot go unnoticed.
    let mut script = String::from("f(A,B)=my(E=ellinit([0,0,0,A,B]),r=ellrank(E),t=elltors(E)[2],T=sum(i=1,#t,t[i]%2==0));print(A,\" \",B,\" \",r[2]+r[3]+T,\" \",T);\n");
    for r in &rows {
        script += &format!("f({},{});\n", r.0, r.1);
    }
    let lines = common::gp_lines(&script, rows.len());
    for (r, line) in rows.iter().zip(&lines) {
        let v: Vec<i64> = line
            .split_whitespace()
            .map(|t| t.parse().unwrap())
            .collect();
        let (a, b, h, disc, i, j, t, s, n) = *r;
        assert_eq!(v[..2], [a, b], "gp line {line:?}");
        assert_eq!(
            (s, t),
            (v[2], v[3]),
            "(selmer rank, 2-torsion rank) of ({a}, {b}): ours, gp"
        );
        // The family's definitions (DESIGN; src/selmer/family.rs doc): height, Δ, (I, J).
        assert_eq!(h, (4 * a.abs().pow(3)).max(27 * b * b));
        assert_eq!(disc, -16 * (4 * a * a * a + 27 * b * b));
        assert_eq!((i, j), (-48 * a, -1728 * b));
        assert_eq!(t, 0, "x^3 + Ax + B has no rational root in the family");
        // Elements: exactly 2^rank − 1 rows (the identity, forms with a rational root, is
        // not stored; E(Q)[2] is trivial here, so nothing else is left out).
        assert_eq!(n, (1 << s) - 1, "elements column of ({a}, {b})");
    }
    let per_curve = |a: i64, b: i64| els.iter().filter(|e| (e.0, e.1) == (a, b)).count() as i64;
    for r in &rows {
        assert_eq!(
            per_curve(r.0, r.1),
            r.8,
            "element rows of ({}, {})",
            r.0,
            r.1
        );
    }
    // Each element: invariants (−48A, −1728B) by the handbook formulas, its label names
    // that pair, the quartic is irreducible (gp), labels of one curve distinct.
    let mut script = String::new();
    for (a, b, _, label, [fa, fb, fc, fd, fe]) in &els {
        let i = 12 * fa * fe - 3 * fb * fd + fc * fc;
        let j = 72 * fa * fc * fe + 9 * fb * fc * fd
            - 27 * fa * fd * fd
            - 27 * fe * fb * fb
            - 2 * fc * fc * fc;
        assert_eq!((i, j), (-48 * a, -1728 * b), "invariants of {label}");
        assert!(label.starts_with(&format!("Q{i}_{j}_")), "{label}");
        script += &format!("print(polisirreducible({fa}*x^4+{fb}*x^3+{fc}*x^2+{fd}*x+{fe}));\n");
    }
    let irreducible = common::gp_lines(&script, els.len());
    assert!(
        irreducible.iter().all(|l| l == "1"),
        "every element quartic is irreducible"
    );
    let mut labels: Vec<(i64, i64, &str)> = els.iter().map(|e| (e.0, e.1, e.3.as_str())).collect();
    labels.sort();
    labels.dedup();
    assert_eq!(labels.len(), els.len(), "distinct labels within each curve");
    println!(
        "{} curves and {} elements agree with gp",
        rows.len(),
        els.len()
    );
}

#[test]
fn jobs_one_and_two_give_the_same_bytes_and_the_recipe_the_content_hash() {
    let d = TestDir::new("curves-jobs");
    let (one, two) = (d.join("one"), d.join("two"));
    std::fs::create_dir_all(&one).unwrap();
    std::fs::create_dir_all(&two).unwrap();
    let a = std::fs::read(write(&one, "1e4", "1")).unwrap();
    let b = std::fs::read(write(&two, "1e4", "2")).unwrap();
    assert!(a == b, "the dataset's bytes depend on --jobs");
    let ma = std::fs::read(one.join("curves.manifest.json")).unwrap();
    assert_eq!(ma, std::fs::read(two.join("curves.manifest.json")).unwrap());
    // The content recipe, run by the sqlite3 shell and sha256sum (outside qorbits).
    let m = manifest(&one);
    let out = Command::new("sh")
        .args(["-c", m["content_recipe"].as_str().unwrap()])
        .current_dir(&one)
        .stderr(Stdio::inherit())
        .output()
        .expect("sh with sqlite3 and sha256sum");
    let printed = String::from_utf8(out.stdout).unwrap();
    assert_eq!(
        printed.split_whitespace().next(),
        m["content_sha256"].as_str()
    );
    assert_eq!(m["format"], "qorbits-curves-manifest/1");
    assert_eq!(m["counts"]["curves"], 926);
    let by_rank: u64 = m["counts"]["by_selmer_rank"]
        .as_array()
        .unwrap()
        .iter()
        .enumerate()
        .map(|(r, n)| ((1u64 << r) - 1) * n.as_u64().unwrap())
        .sum();
    assert_eq!(m["counts"]["elements"].as_u64(), Some(by_rank));
}

#[test]
fn verify_rebuild_and_cite_pass_on_a_fresh_dataset() {
    let d = TestDir::new("curves-verify");
    write(&d.0, "1e4", "2");
    let (code, out, _) = verify(&d.0);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("verified: all"), "{out}");
    let s = ok(&qorbits(&["verify", "--db", "curves.sqlite"], &d.0));
    assert!(s.contains("verified: all"), "{s}");
    let s = ok(&qorbits(
        &["verify", "--rebuild", "curves.manifest.json", "--quiet"],
        &d.0,
    ));
    assert!(s.contains("verified: all"), "{s}");
    let hash = manifest(&d.0)["content_sha256"]
        .as_str()
        .unwrap()
        .to_string();
    let cite = ok(&qorbits(&["cite", "curves.manifest.json"], &d.0));
    assert!(
        cite.contains("@misc{qorbits-curves-y10000-") && cite.contains(&hash),
        "{cite}"
    );
    assert!(
        cite.contains("cff-version: 1.2.0") && cite.contains("926 curves"),
        "{cite}"
    );
    // The committed table manifests still verify through the same command.
    let repo = Path::new(env!("CARGO_MANIFEST_DIR"));
    let s = ok(&qorbits(
        &[
            "verify",
            "--rebuild",
            "manifests/qorbits-h1e4.manifest.json",
            "--quiet",
        ],
        repo,
    ));
    assert!(s.contains("verified: all"), "{s}");
}

#[test]
fn an_existing_output_is_refused_without_force_and_unchanged() {
    let d = TestDir::new("curves-exists");
    write(&d.0, "1e3", "1");
    let before = common::hostile::snapshot(&d.0);
    let o = qorbits(
        &[
            "selmer-stats",
            "--height",
            "1e4",
            "--out",
            "curves.sqlite",
            "--quiet",
        ],
        &d.0,
    );
    let err = String::from_utf8_lossy(&o.stderr).into_owned();
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(err.contains("already exists; pass --force"), "{err}");
    assert_one_line(err.trim_end());
    assert!(o.stdout.is_empty(), "nothing printed before the refusal");
    assert_eq!(
        common::hostile::snapshot(&d.0),
        before,
        "nothing on disk changed"
    );
    // A manifest alone is refused too, before any work.
    std::fs::remove_file(d.join("curves.sqlite")).unwrap();
    let o = qorbits(
        &[
            "selmer-stats",
            "--height",
            "1e4",
            "--out",
            "curves.sqlite",
            "--quiet",
        ],
        &d.0,
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(!d.join("curves.sqlite").exists());
    // --force replaces both.
    let o = qorbits(
        &[
            "selmer-stats",
            "--height",
            "1e4",
            "--out",
            "curves.sqlite",
            "--quiet",
            "--force",
        ],
        &d.0,
    );
    ok(&o);
    assert_eq!(manifest(&d.0)["parameters"]["height"], 10_000);
    assert_eq!(verify(&d.0).0, 0);
}

/// The dotted keys of a JSON object (`x`, `x.y`), as `docs/output.md` lists them.
fn keys(v: &serde_json::Value, prefix: &str, out: &mut Vec<String>) {
    for (k, x) in v.as_object().unwrap() {
        let name = format!("{prefix}{k}");
        out.push(name.clone());
        if x.is_object() {
            keys(x, &format!("{name}."), out);
        }
    }
}

#[test]
fn the_manifest_has_the_documented_keys_and_hostile_manifests_are_refused() {
    let d = TestDir::new("curves-manifest");
    write(&d.0, "1e3", "1");
    let m = manifest(&d.0);
    let doc = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/output.md"))
        .unwrap();
    let block = doc
        .split("```keys curves-manifest\n")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("docs/output.md lists the keys of the curve manifest");
    let mut documented: Vec<String> = block
        .lines()
        .filter_map(|l| l.split(':').next())
        .map(str::to_string)
        .collect();
    let mut found = Vec::new();
    keys(&m, "", &mut found);
    documented.sort();
    found.sort();
    assert_eq!(found, documented);
    // Untrusted manifests: a path as file name, an impossible height, another family text.
    type Edit<'a> = (&'a str, &'a dyn Fn(&mut serde_json::Value));
    let edits: [Edit; 3] = [
        ("path", &|m| m["file"]["name"] = "../curves.sqlite".into()),
        ("height", &|m| m["parameters"]["height"] = 0.into()),
        ("family", &|m| {
            m["parameters"]["family"] = "all curves".into()
        }),
    ];
    for (name, edit) in edits {
        let mut bad = m.clone();
        edit(&mut bad);
        let p = d.join(&format!("{name}.manifest.json"));
        std::fs::write(&p, serde_json::to_string(&bad).unwrap()).unwrap();
        let shown = p.display().to_string();
        for args in [
            vec!["verify", shown.as_str()],
            vec!["verify", "--rebuild", shown.as_str()],
        ] {
            let o = qorbits(&args, &d.0);
            let err = String::from_utf8_lossy(&o.stderr).into_owned();
            assert_eq!(o.status.code(), Some(2), "{name}: {err}");
            assert!(
                err.contains("not a valid qorbits manifest"),
                "{name}: {err}"
            );
            assert_one_line(err.trim_end());
        }
    }
}
