//! Classes over Q (the `rational` column): invariance under GL2(Z), behaviour under scaling
//! by 4, and local solubility of forms with a rational point.
//!
//! Sources: the equivalence over Q of two forms with the same invariants is a property of
//! the forms, so moving a form by GL2(Z) must keep its class over Q; the forms `4f`,
//! `f(2x, y)`, `f(x, 2y)` and `f∘γ` with det γ = ±2 all have invariants (16I, 64J) and are
//! equivalent over Q (each is a GL2(Q)-image of f scaled to those invariants), and `4f ~ 4g`
//! exactly when `f ~ g`. A rational point on z² = f(x, y) is a point over every completion,
//! so a form with a point found by PARI/GP's `hyperellratpoints` (Debian package pari-gp
//! 2.15) must be everywhere locally soluble.

mod common;

use common::{random_form, random_gl2, Rng};
use qorbits::arith::primes::factor;
use qorbits::form::galois::FactorPattern;
use qorbits::form::local::local_data;
use qorbits::form::rational::Algebra;
use qorbits::form::{Form, Gl2};
use qorbits::progress::Silent;
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::{ClassRow, Params};
use rug::Integer;

/// The pairs of a small table with at least two els irreducible classes.
fn pairs_with_several_els_classes() -> Vec<Vec<ClassRow>> {
    let rows = enumerate_classes(
        &Params {
            height: 200_000,
            include_reducible: false,
        },
        &Silent,
    )
    .unwrap()
    .rows()
    .cloned()
    .collect::<Vec<ClassRow>>();
    let mut out: Vec<Vec<ClassRow>> = Vec::new();
    for r in rows {
        match out.last_mut() {
            Some(p) if (p[0].i, p[0].j) == (r.i, r.j) => p.push(r),
            _ => out.push(vec![r]),
        }
    }
    out.into_iter()
        .map(|p| {
            p.into_iter()
                .filter(|r| r.rational.is_some())
                .collect::<Vec<_>>()
        })
        .filter(|p| p.len() >= 2)
        .collect()
}

fn big(f: &ClassRow) -> Form<Integer> {
    Form::from_i64(f.form)
}

#[test]
fn classes_over_q_are_invariant_under_gl2z() {
    let pairs = pairs_with_several_els_classes();
    let mut rng = Rng(0x0ddba11);
    let (mut split, mut distinct, mut tested) = (0, 0, 0);
    for p in &pairs {
        let l = Algebra::new(&Integer::from(p[0].i), &Integer::from(p[0].j)).unwrap();
        split += usize::from(l.splits());
        let mut labels: Vec<&String> = p.iter().map(|r| r.rational.as_ref().unwrap()).collect();
        labels.dedup();
        distinct += usize::from(labels.len() > 1);
        let own: Vec<_> = p.iter().map(|r| l.element(&big(r)).unwrap()).collect();
        for (k, r) in p.iter().enumerate() {
            let moved = big(r).act(&random_gl2(&mut rng, 30)).unwrap();
            let x = l.element(&moved).unwrap();
            for (m, s) in p.iter().enumerate() {
                assert_eq!(
                    l.equivalent(&x, &own[m]).unwrap(),
                    r.rational == s.rational,
                    "{} moved to {moved} against {}",
                    r.label,
                    s.label
                );
            }
            assert!(l.equivalent(&own[k], &own[k]).unwrap());
            tested += 1;
        }
    }
    assert!(tested >= 500, "{tested} classes");
    assert!(split >= 20, "{split} pairs with a split resolvent algebra");
    assert!(
        distinct >= 20,
        "{distinct} pairs with several classes over Q"
    );
}

#[test]
fn scaling_by_four_keeps_classes_over_q() {
    let pairs = pairs_with_several_els_classes();
    let mut rng = Rng(0x00fa_c704);
    for p in pairs.iter().take(150) {
        let (i, j) = (Integer::from(16 * p[0].i), Integer::from(64 * p[0].j));
        let l = Algebra::new(&i, &j).unwrap();
        let scaled: Vec<_> = p
            .iter()
            .map(|r| {
                let f = big(r);
                let four = f.scale(4).unwrap();
                let x4 = l.element(&four).unwrap();
                let det2 = random_gl2(&mut rng, 9)
                    .mul(&Gl2::new(2, 0, 0, 1))
                    .unwrap()
                    .mul(&random_gl2(&mut rng, 9))
                    .unwrap();
                for g in [Gl2::new(2, 0, 0, 1), Gl2::new(1, 0, 0, 2), det2] {
                    let h = f.act(&g).unwrap();
                    let inv = h.invariants().unwrap();
                    assert_eq!(
                        (inv.i.clone(), inv.j.clone()),
                        (i.clone(), j.clone()),
                        "{f} by {g:?}"
                    );
                    assert!(
                        l.equivalent(&x4, &l.element(&h).unwrap()).unwrap(),
                        "{f} by {g:?}"
                    );
                }
                x4
            })
            .collect();
        for (k, r) in p.iter().enumerate() {
            for (m, s) in p.iter().enumerate() {
                assert_eq!(
                    l.equivalent(&scaled[k], &scaled[m]).unwrap(),
                    r.rational == s.rational,
                    "4·{} against 4·{}",
                    r.label,
                    s.label
                );
            }
        }
    }
}

#[test]
fn forms_with_a_rational_point_from_pari_are_els() {
    let mut rng = Rng(0x0090_1175);
    let mut forms = Vec::new();
    while forms.len() < 600 {
        let f = random_form(&mut rng, 6);
        if f.c[0] != 0
            && qorbits::form::galois::factor_pattern(&f) == Some(FactorPattern::Irreducible)
        {
            forms.push(f);
        }
    }
    let mut script = String::new();
    for f in &forms {
        let [a, b, c, d, e] = &f.c;
        script.push_str(&format!(
            "print(#hyperellratpoints({a}*x^4+({b})*x^3+({c})*x^2+({d})*x+({e}), 30));\n"
        ));
    }
    let lines = common::gp_lines(&script, forms.len());
    let mut with_points = 0;
    for (f, line) in forms.iter().zip(&lines) {
        if line.trim() == "0" {
            continue;
        }
        with_points += 1;
        let inv = f.invariants().unwrap();
        let s = f.signature(&inv).unwrap();
        let local = local_data(f, &factor(&inv.disc), s);
        assert!(
            local.iter().all(|l| l.soluble),
            "{f} has a rational point: {local:?}"
        );
    }
    assert!(with_points >= 100, "{with_points} forms with a point");
}
