//! Orbit completeness by brute force (DESIGN §6): every form in a coefficient box with
//! H < 10⁴ is canonicalised; the set of classes found must not grow when the box grows.

mod common;

use qorbits::form::canonical::canonical_in;
use qorbits::form::galois::{factor_pattern, FactorPattern};
use qorbits::form::Form;
use rayon::prelude::*;
use std::collections::{BTreeMap, BTreeSet};

/// H < X  ⇔  H4 = max(4|I|³, J²) < 4X.
const X: i128 = 10_000;

/// Canonical forms of all forms with |a|, |b|, |c|, |d| ≤ m, |e| ≤ me, H < X, Disc ≠ 0.
fn classes_in_box(m: i64, me: i64) -> BTreeSet<[i128; 5]> {
    let range: Vec<i64> = (-m..=m).collect();
    range
        .par_iter()
        .flat_map_iter(|&a| {
            let mut out = BTreeSet::new();
            for b in -m..=m {
                for c in -m..=m {
                    for d in -m..=m {
                        for e in -me..=me {
                            let f = Form::<i128>::from_i64([a, b, c, d, e]);
                            let inv = f.invariants().unwrap();
                            if inv.disc == 0 || inv.h4 >= 4 * X {
                                continue;
                            }
                            let c = canonical_in(&f).unwrap_or_else(|e| panic!("{f}: {e}"));
                            out.insert(c.form.c);
                        }
                    }
                }
            }
            out
        })
        .collect()
}

fn census(set: &BTreeSet<[i128; 5]>) -> BTreeMap<(bool, u8), usize> {
    let mut out = BTreeMap::new();
    for c in set {
        let f = Form::new(*c);
        let inv = f.invariants().unwrap();
        let irr = factor_pattern(&f).unwrap() == FactorPattern::Irreducible;
        *out.entry((irr, f.signature(&inv).unwrap().real_roots()))
            .or_insert(0) += 1;
    }
    out
}

#[test]
fn classes_below_height_1e4_stop_growing_with_the_box() {
    let small = classes_in_box(7, 40);
    let large = classes_in_box(10, 60);
    let (cs, cl) = (census(&small), census(&large));
    eprintln!(
        "H < 1e4, box |a..d| <= 7, |e| <= 40:  {} classes {cs:?}",
        small.len()
    );
    eprintln!(
        "H < 1e4, box |a..d| <= 10, |e| <= 60: {} classes {cl:?}",
        large.len()
    );
    let extra: Vec<_> = large.difference(&small).take(10).collect();
    assert!(
        extra.is_empty(),
        "growing the box added classes, e.g. {extra:?}"
    );
    assert!(small.is_subset(&large));
}

#[test]
fn builder_rows_equal_the_brute_force_box() {
    use qorbits::progress::Silent;
    use qorbits::table::pipeline::enumerate_classes;
    use qorbits::table::row::Params;
    let boxed = classes_in_box(10, 60);
    for include_reducible in [true, false] {
        let out = enumerate_classes(
            &Params {
                height: X,
                include_reducible,
            },
            &Silent,
        )
        .unwrap();
        let built: BTreeSet<[i128; 5]> = out.rows().map(|r| r.form.map(i128::from)).collect();
        assert_eq!(built.len(), out.classes(), "a class was emitted twice");
        let want: BTreeSet<[i128; 5]> = boxed
            .iter()
            .filter(|c| {
                include_reducible
                    || factor_pattern(&Form::new(**c)).unwrap() == FactorPattern::Irreducible
            })
            .cloned()
            .collect();
        let missing: Vec<_> = want.difference(&built).take(5).collect();
        let extra: Vec<_> = built.difference(&want).take(5).collect();
        assert!(
            missing.is_empty() && extra.is_empty(),
            "missing {missing:?}, extra {extra:?}"
        );
        eprintln!(
            "builder at H < 1e4 (reducible: {include_reducible}): {} classes, {} candidates ({:.2} per class)",
            out.classes(),
            out.candidates,
            out.candidates as f64 / out.classes() as f64
        );
    }
}
