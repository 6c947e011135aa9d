//! Which pairs (I, J) occur (DESIGN §2; published in Annals of Mathematics 181 (2015), the
//! paper on binary quartic forms having bounded invariants): the congruences hold for every
//! form, every eligible residue class occurs, and every eligible pair is attained.

mod common;

use common::Rng;
use qorbits::form::{eligible, form_with_invariants, Form};
use rug::Integer;
use std::collections::BTreeSet;

#[test]
fn residues_of_i_mod_9_and_j_mod_27_are_exactly_the_eligible_ones() {
    // I mod 9 and J mod 27 depend only on the coefficients mod 27: an exhaustive search over
    // (Z/27)⁵ finds every residue pair that occurs.
    let mut seen = BTreeSet::new();
    for a in 0..27i64 {
        for b in 0..27 {
            for c in 0..27 {
                for d in 0..27 {
                    for e in 0..27 {
                        let i = 12 * a * e - 3 * b * d + c * c;
                        let j = 72 * a * c * e + 9 * b * c * d
                            - 27 * a * d * d
                            - 27 * e * b * b
                            - 2 * c * c * c;
                        seen.insert((i.rem_euclid(9), j.rem_euclid(27)));
                    }
                }
            }
        }
    }
    let eligible_residues: BTreeSet<(i64, i64)> = (0..9)
        .flat_map(|i| (0..27).map(move |j| (i, j)))
        .filter(|(i, j)| eligible(&(*i as i128), &(*j as i128)))
        .collect();
    assert_eq!(seen, eligible_residues);
    // I mod 9 ∈ {0, 3, 6} with J ≡ 0, and two classes of J for each of I ≡ 1, 4, 7 (mod 9).
    assert_eq!(seen.len(), 3 + 3 * 2);
}

#[test]
fn random_forms_have_eligible_invariants() {
    let mut rng = Rng(5);
    for _ in 0..20_000 {
        let f = Form::<Integer>::new(std::array::from_fn(|_| rng.big_upto(25)));
        let inv = f.invariants().unwrap();
        assert!(eligible(&inv.i, &inv.j), "{f}");
    }
}

#[test]
fn every_eligible_pair_is_attained() {
    let mut rng = Rng(11);
    let mut made = 0;
    while made < 20_000 {
        let (i, j) = (rng.big_upto(30), rng.big_upto(45));
        let f = form_with_invariants(&i, &j);
        if !eligible(&i, &j) {
            assert!(f.is_none());
            continue;
        }
        let f = f.unwrap_or_else(|| panic!("no form for eligible ({i}, {j})"));
        let inv = f.invariants().unwrap();
        assert_eq!((inv.i, inv.j), (i, j));
        made += 1;
    }
    // Small pairs, all of them.
    for i in -200i64..=200 {
        for j in -3000i64..=3000 {
            let (bi, bj) = (Integer::from(i), Integer::from(j));
            match form_with_invariants(&bi, &bj) {
                Some(f) => {
                    let inv = f.invariants().unwrap();
                    assert_eq!((inv.i, inv.j), (bi.clone(), bj.clone()), "{f}");
                    assert!(eligible(&bi, &bj), "({i}, {j}) is attained by {f}");
                }
                None => assert!(!eligible(&bi, &bj), "no form for eligible ({i}, {j})"),
            }
        }
    }
}
