//! The corruption catalogue: the committed H < 10⁵ release damaged in every way the
//! reliability contract lists — 100 single-byte flips at random offsets, truncations, two
//! swapped pages, an added row, a changed value with the file hash updated in the manifest,
//! an edited manifest count and a manifest for another table. `verify` must catch every one
//! and name what is wrong; the figures (caught / tried, by kind, and what was named) are
//! printed with `cargo test --release --test corruption -- --nocapture`.

mod common;

use common::fixture::{assert_one_line, TestDir};
use common::Rng;
use qorbits::table::hash::file_sha256;
use qorbits::table::manifest::{diagnosis, read_manifest, verify, write_manifest, Manifest};
use std::collections::BTreeMap;
use std::io::Read;
use std::path::{Path, PathBuf};
use std::process::Command;

fn repo(p: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(p)
}

/// The committed release, uncompressed.
fn release() -> Vec<u8> {
    let gz = std::fs::read(repo("releases/qorbits-h1e5.sqlite.gz")).unwrap();
    let mut out = Vec::new();
    flate2::read::GzDecoder::new(&gz[..])
        .read_to_end(&mut out)
        .unwrap();
    out
}

/// Verifies `db` against `m`: whether a check failed, and the diagnosis.
fn caught(db: &Path, m: &Manifest) -> (bool, String, bool) {
    let checks = verify(db, m).expect("verify runs on every damaged file");
    for c in &checks {
        assert_one_line(&c.detail);
    }
    let failed = checks.iter().any(|c| !c.ok);
    let beyond_file_hash = checks.iter().any(|c| !c.ok && c.name != "file sha256");
    let d = diagnosis(&checks).unwrap_or_default();
    assert_one_line(&d);
    assert_eq!(
        failed,
        !d.is_empty(),
        "a diagnosis exactly when a check fails"
    );
    (failed, d, beyond_file_hash)
}

/// What a diagnosis names, in a few words (for the figures); `None` for a sentence that
/// names nothing in particular.
fn named(d: &str) -> Option<&'static str> {
    let kinds = [
        ("page ", "a damaged page (named)"),
        (
            "an index does not match",
            "an index that does not match its table",
        ),
        ("row count differs", "row count differs"),
        ("the counts differ", "counts differ"),
        ("content sha256 differs", "content sha256 differs"),
        ("a manifest for another table", "manifest for another table"),
        ("the manifest was edited", "manifest edited"),
        (
            "the table's meta rows record other parameters",
            "meta parameters changed",
        ),
        ("file sha256 differs, but", "unused bytes (file hash only)"),
        (
            "the rows cannot be read",
            "a value of the wrong type (row named)",
        ),
    ];
    if let Some(rest) = d.strip_prefix("the file is refused: ") {
        return Some(if rest.contains("header") || rest.contains("length") {
            "header or length"
        } else if rest.contains("meta") {
            "meta rows"
        } else {
            "schema"
        });
    }
    kinds
        .iter()
        .find(|(p, _)| d.starts_with(p))
        .map(|(_, k)| *k)
}

#[test]
fn verify_catches_and_names_every_corruption() {
    let d = TestDir::new("corruption");
    let good = release();
    let m = read_manifest(&repo("manifests/qorbits-h1e5.manifest.json")).unwrap();
    let db = d.join("qorbits-h1e5.sqlite");
    std::fs::write(&db, &good).unwrap();
    let (failed, dg, _) = caught(&db, &m);
    assert!(!failed, "the release itself fails: {dg}");

    // kind → (tried, caught); what the diagnoses named.
    let mut tally: BTreeMap<&str, (u32, u32)> = BTreeMap::new();
    let mut names: BTreeMap<&str, u32> = BTreeMap::new();
    let mut beyond = 0;
    let mut record = |kind: &'static str, ok: (bool, String, bool), want: Option<&str>| {
        let (failed, dg, _) = ok;
        let t = tally.entry(kind).or_default();
        t.0 += 1;
        t.1 += u32::from(failed);
        assert!(failed, "{kind} passed verification");
        let what =
            named(&dg).unwrap_or_else(|| panic!("{kind}: the diagnosis names nothing: {dg}"));
        if let Some(w) = want {
            assert!(dg.contains(w), "{kind}: expected '{w}' in: {dg}");
        }
        *names.entry(what).or_default() += 1;
    };

    // 1. 100 single-byte flips at random offsets (a fixed seed: the same offsets each run).
    let bad = d.join("bad.sqlite");
    let mut rng = Rng(0x5eed_f11b);
    for _ in 0..100 {
        let at = (rng.next() % good.len() as u64) as usize;
        let x = 1 + (rng.next() % 255) as u8;
        let mut b = good.clone();
        b[at] ^= x;
        std::fs::write(&bad, &b).unwrap();
        let r = caught(&bad, &m);
        beyond += u32::from(r.2);
        record("single-byte flip", r, None);
    }

    // 2. Truncations: a whole page off the end, mid-page, and to less than a header.
    for len in [good.len() - 4096, good.len() / 2 + 123, 60] {
        std::fs::write(&bad, &good[..len]).unwrap();
        record("truncation", caught(&bad, &m), Some("truncated"));
    }

    // 3. Two pages swapped (pairs of pages with different bytes).
    let pages = good.len() / 4096;
    let mut swaps = 0;
    while swaps < 5 {
        let (p, q) = (
            (rng.next() % pages as u64) as usize,
            (rng.next() % pages as u64) as usize,
        );
        let (a, b) = (p * 4096, q * 4096);
        if p == q || good[a..a + 4096] == good[b..b + 4096] {
            continue;
        }
        let mut s = good.clone();
        let (pa, pb) = (good[a..a + 4096].to_vec(), good[b..b + 4096].to_vec());
        s[a..a + 4096].copy_from_slice(&pb);
        s[b..b + 4096].copy_from_slice(&pa);
        std::fs::write(&bad, &s).unwrap();
        record("two swapped pages", caught(&bad, &m), None);
        swaps += 1;
    }

    // 4. An added row: a copy of the last class under the next id.
    std::fs::write(&bad, &good).unwrap();
    {
        let c = rusqlite::Connection::open(&bad).unwrap();
        c.execute_batch(
            "INSERT INTO classes SELECT id + 1, label || 'x', a, b, c, d, e, I, J, disc, h4, \
             real_roots, signature, factorisation, irreducible, galois, stabiliser, els, \
             insoluble_at, rational_class FROM classes WHERE id = (SELECT max(id) FROM classes)",
        )
        .unwrap();
    }
    record("added row", caught(&bad, &m), Some("row count differs"));

    // 5. A changed value (a coefficient; no count depends on it), with the file hash and
    //    size in the manifest updated to the changed file.
    std::fs::write(&bad, &good).unwrap();
    {
        let c = rusqlite::Connection::open(&bad).unwrap();
        c.execute_batch("UPDATE classes SET e = e + 1 WHERE id = 700")
            .unwrap();
    }
    let mut m5 = m.clone();
    m5.file.sha256 = file_sha256(&bad).unwrap();
    m5.file.bytes = std::fs::metadata(&bad).unwrap().len();
    record(
        "changed value, file hash updated",
        caught(&bad, &m5),
        Some("content sha256 differs although the file sha256 matches"),
    );

    // 6. An edited count in the manifest.
    let mut m6 = m.clone();
    m6.counts.classes += 1;
    record(
        "edited manifest count",
        caught(&db, &m6),
        Some("classes: manifest 1499, file 1498"),
    );

    // 7. The manifest of another table (H < 10⁴) for this one.
    let other = read_manifest(&repo("manifests/qorbits-h1e4.manifest.json")).unwrap();
    record(
        "manifest for another table",
        caught(&db, &other),
        Some("parameters differ (height: manifest 10000, file 100000)"),
    );

    // The binary says the same: exit status 1 and the diagnosis on its last line.
    let mp = d.join("edited.manifest.json");
    write_manifest(&mp, &m6, false).unwrap();
    let o = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(["verify", "--db", db.to_str().unwrap(), "--manifest"])
        .arg(&mp)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1));
    let out = String::from_utf8(o.stdout).unwrap();
    assert!(
        out.lines()
            .last()
            .unwrap()
            .contains("the manifest was edited"),
        "{out}"
    );

    let (tried, got): (u32, u32) = tally.values().fold((0, 0), |a, t| (a.0 + t.0, a.1 + t.1));
    println!("corruptions caught / tried, by kind (H < 10^5 release, {pages} pages):");
    for (kind, (t, c)) in &tally {
        println!("  {kind:<34} {c:>3} / {t}");
    }
    println!("  {:<34} {got:>3} / {tried}", "all");
    println!("  flips caught beyond the file hash: {beyond} / 100");
    println!("what the diagnoses named:");
    for (what, n) in &names {
        println!("  {what:<40} {n:>3}");
    }
    assert_eq!(got, tried);
}
