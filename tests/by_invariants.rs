//! Cross-validation of the two enumerators: the search by invariants returns exactly the
//! builder's rows (every column, local data and labels included) for thousands of pairs,
//! nothing for eligible pairs absent from the table, and at H ≈ 10¹² every class it finds
//! is recognised again from random GL2(Z) transforms. At heights up to 10¹² the fast loop
//! over c (residue sieve) returns exactly the forms of the plain loop (one exact evaluation
//! per c), reducible forms included.

mod common;

use common::{random_gl2, Rng};
use qorbits::enumerate::by_invariants::{forms_with_invariants_by, refusal, Route};
use qorbits::form::canonical::canonical;
use qorbits::form::{eligible, invariants_from_ij, Form};
use qorbits::progress::Silent;
use qorbits::table::pipeline::classes_with_invariants;
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::{ClassRow, Params};
use rug::Integer;
use std::collections::BTreeMap;

#[test]
fn search_by_invariants_reproduces_the_table() {
    let height = 300_000i128;
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
    let mut by_pair: BTreeMap<(i64, i64), Vec<ClassRow>> = BTreeMap::new();
    for r in rows {
        by_pair.entry((r.i, r.j)).or_default().push(r);
    }
    let pairs: Vec<_> = by_pair.keys().cloned().collect();
    let mut rng = Rng(55);
    let mut checked = 0;
    for n in 0..2200 {
        let (i, j) = pairs[(rng.next() % pairs.len() as u64) as usize];
        let want = &by_pair[&(i, j)];
        let include_reducible = n % 2 == 0;
        let got = classes_with_invariants(&Integer::from(i), &Integer::from(j), include_reducible)
            .unwrap();
        let want: Vec<ClassRow> = want
            .iter()
            .filter(|r| include_reducible || r.irreducible())
            .cloned()
            .collect();
        assert_eq!(
            got.classes, want,
            "(I, J) = ({i}, {j}), reducible included: {include_reducible}"
        );
        checked += 1;
    }
    // Every eligible pair occurs once reducible classes count (DESIGN §2); pairs without an
    // irreducible class in the table have none from the search either.
    let irreducible: std::collections::BTreeSet<(i64, i64)> = by_pair
        .iter()
        .filter(|(_, v)| v.iter().any(|r| r.galois.is_some()))
        .map(|(k, _)| *k)
        .collect();
    let mut absent = 0;
    let mut tries = 0;
    while absent < 300 {
        tries += 1;
        assert!(
            tries < 1_000_000,
            "too few pairs without irreducible classes"
        );
        let (i, j) = (rng.range(60), rng.range(1000));
        let (bi, bj) = (Integer::from(i), Integer::from(j));
        if !eligible(&bi, &bj) || irreducible.contains(&(i, j)) {
            continue;
        }
        let inv = invariants_from_ij(bi.clone(), bj.clone()).unwrap();
        if inv.disc == 0 || inv.h4 >= 4 * height {
            continue;
        }
        assert!(
            by_pair.contains_key(&(i, j)),
            "eligible ({i}, {j}) has no class at all"
        );
        assert!(
            classes_with_invariants(&bi, &bj, false)
                .unwrap()
                .classes
                .is_empty(),
            "({i}, {j})"
        );
        absent += 1;
    }
    eprintln!("{checked} pairs agree with the table, {absent} absent pairs give none");
}

#[test]
fn classes_at_height_1e12_are_recognised_from_transforms() {
    let mut rng = Rng(12);
    let mut found = 0;
    while found < 6 {
        // A form with H near 10¹²: coefficients of a few dozen.
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(25)));
        let inv = f.invariants().unwrap();
        let h = inv.h4.to_f64() / 4.0;
        if inv.disc == 0 || !(3e11..3e12).contains(&h) {
            continue;
        }
        let rows = classes_with_invariants(&inv.i, &inv.j, true).unwrap();
        let own = canonical(&f).unwrap().form;
        let forms: Vec<Form<Integer>> = rows
            .classes
            .iter()
            .map(|r| Form::from_i64(r.form))
            .collect();
        assert!(
            forms.contains(&own),
            "the class of {f} is missing from {forms:?}"
        );
        for g in &forms {
            for _ in 0..5 {
                let moved = g.act(&random_gl2(&mut rng, 1000)).unwrap();
                assert_eq!(&canonical(&moved).unwrap().form, g, "transform of {g}");
            }
        }
        found += 1;
    }
}

#[test]
fn ineligible_and_degenerate_pairs_are_refused() {
    assert!(refusal(&Integer::from(1), &Integer::from(0))
        .unwrap()
        .contains("no integral form"));
    // 4I³ = J² with (I, J) = (9, 54): eligible, Disc = 0.
    assert!(refusal(&Integer::from(9), &Integer::from(54))
        .unwrap()
        .contains("Disc = 0"));
    assert!(classes_with_invariants(&Integer::from(9), &Integer::from(54), true).is_err());
    assert!(refusal(&Integer::from(10), &Integer::from(-29)).is_none());
}

#[test]
fn the_fast_loop_finds_the_forms_of_the_plain_loop_up_to_1e12() {
    let mut rng = Rng(1e12 as u64);
    let mut pairs = vec![
        (9999i64, -54i64),
        (-48 * 29, -1728 * 60),
        (-48 * 7, 1728 * 13),
    ];
    while pairs.len() < 12 {
        // Random forms with H from 10⁶ to 10¹¹: their own pair has at least one class.
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(12)));
        let inv = f.invariants().unwrap();
        let h = inv.h4.to_f64() / 4.0;
        if inv.disc != 0 && (1e6..1e11).contains(&h) {
            pairs.push((inv.i.to_i64().unwrap(), inv.j.to_i64().unwrap()));
        }
    }
    let mut total = 0;
    for (n, &(i, j)) in pairs.iter().enumerate() {
        let (bi, bj) = (Integer::from(i), Integer::from(j));
        let reducible = n % 2 == 0;
        let mut fast = forms_with_invariants_by(&bi, &bj, reducible, Route::Fast).unwrap();
        let mut plain = forms_with_invariants_by(&bi, &bj, reducible, Route::Reference).unwrap();
        fast.sort();
        plain.sort();
        assert_eq!(fast, plain, "(I, J) = ({i}, {j})");
        total += plain.len();
    }
    assert!(total >= 12, "{total} forms");
}
