//! The family enumeration (`table::pipeline::classes_of_congruent_pairs`, one pass over
//! every form with 48 | I and 1728 | J) against the search by invariants run on each pair
//! alone: on every curve y² = x³ + Ax + B of the `selmer-stats` family below Y = 10⁴ the
//! two give the same pair, every column, label, local datum and class over Q included; and
//! `selmer-stats` gives the same curves and ranks by both routes.
//!
//! Outside source: none beyond the search by invariants, which `tests/by_invariants.rs`
//! checks against the bulk builder and that against a brute-force box
//! (`tests/box_completeness.rs`).

use qorbits::progress::Silent;
use qorbits::selmer::{cheaper_route, selmer_stats_by, short_family, FamilyRoute};
use qorbits::table::pipeline::{classes_of_congruent_pairs, classes_with_invariants};
use rug::Integer;

#[test]
fn the_family_enumeration_gives_each_pair_of_the_search_by_invariants_to_1e4() {
    let y = 10_000i128;
    let family = short_family(y);
    assert_eq!(
        family.len(),
        926,
        "the family below 10⁴ (also counted by gp in selmer_stats_pari.rs)"
    );
    let pairs: Vec<(i64, i64)> = family.iter().map(|&(a, b)| (-48 * a, -1728 * b)).collect();
    let all = classes_of_congruent_pairs(&pairs, 27_648 * y, &Silent).unwrap();
    assert_eq!(all.len(), pairs.len());
    let mut classes = 0;
    for (&(i, j), got) in pairs.iter().zip(&all) {
        let want = classes_with_invariants(&Integer::from(i), &Integer::from(j), false).unwrap();
        assert_eq!(got, &want, "(I, J) = ({i}, {j})");
        classes += want.classes.len();
    }
    assert!(
        classes > 2 * pairs.len(),
        "{classes} classes: too few to test anything"
    );
}

#[test]
fn both_routes_give_the_same_statistics() {
    for y in [1i128, 50, 3000] {
        let per_pair = selmer_stats_by(y, FamilyRoute::PerPair, &Silent).unwrap();
        let family = selmer_stats_by(y, FamilyRoute::Family, &Silent).unwrap();
        assert_eq!(per_pair, family, "Y = {y}");
    }
    // The cost model picks the family enumeration for the heights the benchmarks report.
    for y in [10_000i128, 100_000] {
        assert_eq!(
            cheaper_route(y, &short_family(y)),
            FamilyRoute::Family,
            "Y = {y}"
        );
    }
}

#[test]
fn pairs_outside_the_congruences_are_refused() {
    for (i, j) in [(-47i64, 0i64), (48, 1000), (0, 0)] {
        let e = classes_of_congruent_pairs(&[(i, j)], 1_000_000, &Silent).unwrap_err();
        assert!(e.to_string().contains("48 | I"), "{e}");
    }
}
