//! The published tiers: rebuilding H < 10⁴ and 10⁵ gives exactly the committed hashes, the
//! thread count does not change a byte, the gzipped releases are those files, and with
//! reducible classes the (I, J) present are exactly the eligible pairs (DESIGN §2, §5).

use qorbits::form::{eligible, invariants_from_ij};
use qorbits::progress::Silent;
use qorbits::table::hash::file_sha256;
use qorbits::table::manifest::{manifest_for, read_manifest};
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::ClassRow;
use qorbits::table::row::Params;
use qorbits::table::writer::write_table;
use std::collections::BTreeSet;
use std::io::Read;
use std::path::{Path, PathBuf};

fn tmp(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("qorbits-tiers-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d.join(name)
}

fn build_with_threads(params: &Params, threads: usize, out: &Path) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .unwrap();
    let table = pool.install(|| enumerate_classes(params, &Silent)).unwrap();
    write_table(out, &table, true).unwrap();
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn rebuilt_tiers_match_the_committed_manifests() {
    for (height, stem) in [(10_000i128, "qorbits-h1e4"), (100_000, "qorbits-h1e5")] {
        let committed = read_manifest(
            &root()
                .join("manifests")
                .join(format!("{stem}.manifest.json")),
        )
        .unwrap();
        let params = Params {
            height,
            include_reducible: false,
        };
        assert_eq!(committed.parameters.height, height);
        let out = tmp(&format!("{stem}.sqlite"));
        build_with_threads(&params, 2, &out);
        // The whole manifest, every field: counts, versions, sizes and both hashes.
        let m = manifest_for(&out).unwrap();
        assert_eq!(m, committed, "the rebuilt {stem} differs from its manifest");
        // The gzipped release holds the same bytes.
        let gz = root().join("releases").join(format!("{stem}.sqlite.gz"));
        let mut bytes = Vec::new();
        flate2::read::GzDecoder::new(std::fs::File::open(&gz).unwrap())
            .read_to_end(&mut bytes)
            .unwrap();
        assert_eq!(bytes, std::fs::read(&out).unwrap(), "{}", gz.display());
    }
}

#[test]
fn thread_count_does_not_change_a_byte() {
    let params = Params {
        height: 30_000,
        include_reducible: true,
    };
    let (one, two) = (tmp("jobs1.sqlite"), tmp("jobs2.sqlite"));
    build_with_threads(&params, 1, &one);
    build_with_threads(&params, 2, &two);
    assert_eq!(file_sha256(&one).unwrap(), file_sha256(&two).unwrap());
    assert_eq!(std::fs::read(&one).unwrap(), std::fs::read(&two).unwrap());
}

#[test]
fn with_reducible_classes_the_pairs_are_exactly_the_eligible_ones() {
    // Published (DESIGN §2): every eligible (I, J) with 4I³ ≠ J² is attained by some form.
    for height in [10_000i128, 60_000] {
        let rows = enumerate_classes(
            &Params {
                height,
                include_reducible: true,
            },
            &Silent,
        )
        .unwrap()
        .rows()
        .cloned()
        .collect::<Vec<ClassRow>>();
        let present: BTreeSet<(i64, i64)> = rows.iter().map(|r| (r.i, r.j)).collect();
        let mut want = BTreeSet::new();
        for i in -100i64..=100 {
            for j in -1000i64..=1000 {
                if !eligible(&(i as i128), &(j as i128)) {
                    continue;
                }
                let inv = invariants_from_ij(i as i128, j as i128).unwrap();
                if inv.disc != 0 && inv.h4 < 4 * height {
                    want.insert((i, j));
                }
            }
        }
        let missing: Vec<_> = want.difference(&present).take(5).collect();
        let extra: Vec<_> = present.difference(&want).take(5).collect();
        assert!(
            missing.is_empty() && extra.is_empty(),
            "H < {height}: missing {missing:?}, extra {extra:?}"
        );
        assert!(rows.iter().all(|r| r.h4 < 4 * height as i64));
    }
}
