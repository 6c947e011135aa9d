//! Manifests and verification (DESIGN §5): SHA-256 against its published test vector,
//! counts that agree with the rows, deterministic JSON, and verification that catches a
//! flipped byte anywhere in the file.

mod common;

use common::fixture::{assert_one_line, rows, table, TestDir};
use qorbits::form::galois::{FactorPattern, GaloisGroup};
use qorbits::form::Signature;
use qorbits::table::hash::file_sha256;
use qorbits::table::manifest::{
    default_manifest_path, manifest_for, manifest_json, read_manifest, verify, write_manifest,
    FORMAT,
};
use qorbits::table::schema::SCHEMA_VERSION;
use qorbits::table::writer::write_table;

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
fn manifest_counts_json_and_verification() {
    let d = TestDir::new("manifest");
    let a = d.join("a.sqlite");
    let b = d.join("b.sqlite");
    write_table(&a, table(), false).unwrap();
    write_table(&b, table(), false).unwrap();
    let ba = std::fs::read(&a).unwrap();
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
    let rs = &rows();
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

    let checks = verify(&a, &m).unwrap();
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
        .unwrap()
        .into_iter()
        .filter(|c| !c.ok)
        .map(|c| c.name)
        .collect();
    assert_eq!(bad, ["galois S4"]);
}

#[test]
fn flipping_any_byte_fails_verification() {
    let d = TestDir::new("flip");
    let good = d.join("t.sqlite");
    write_table(&good, table(), false).unwrap();
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
            let checks = verify(&bad, &m).unwrap();
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
