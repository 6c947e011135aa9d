//! The canonical representative is a class invariant (DESIGN §3): for random forms f and
//! random γ ∈ GL2(Z) with entries up to 10³, canonical(γ·f) = canonical(f), the returned
//! matrices map input to output exactly, and stabiliser orders agree. The sample includes
//! forms whose covariant lies on the boundary of F (symmetric forms) and coefficients up to
//! 10³⁰.

mod common;

use common::*;
use qorbits::form::canonical::{canonical, is_canonical, Canonical};
use qorbits::form::{Form, Gl2};
use rug::Integer;

fn check(f: &Form<Integer>, g: &Gl2<Integer>) -> Canonical<Integer> {
    let cf = canonical(f).unwrap_or_else(|e| panic!("{f}: {e}"));
    let gf = f.act(g).unwrap();
    let cg = canonical(&gf).unwrap_or_else(|e| panic!("{gf}: {e}"));
    assert_eq!(f.act(&cf.gamma).unwrap(), cf.form, "gamma of {f}");
    assert_eq!(gf.act(&cg.gamma).unwrap(), cg.form, "gamma of {gf}");
    assert_eq!(
        cf.form, cg.form,
        "canonical of {f} and of its transform {gf} by {g}"
    );
    assert_eq!(cf.stabiliser.len(), cg.stabiliser.len(), "{f}");
    for s in &cf.stabiliser {
        assert_eq!(cf.form.act(s).unwrap(), cf.form);
    }
    // An element of order 3 of PGL2(Z) fixes only e^{πi/3} and its conjugate in P¹(C), so it
    // cannot permute four distinct roots of a real form: stabilisers have order 1, 2 or 4
    // (derived here).
    assert!(
        [1, 2, 4].contains(&cf.stabiliser.len()),
        "{f}: {:?}",
        cf.stabiliser
    );
    cf
}

#[test]
fn canonical_form_is_invariant_on_random_forms_and_matrices() {
    let mut rng = Rng(20261201);
    let mut counts = [0usize; 4]; // small, medium, large, huge
    for n in 0..10_000 {
        let f = match n % 10 {
            0..=5 => random_form(&mut rng, 12),
            6 | 7 => random_form(&mut rng, 100_000),
            8 => random_big_form(&mut rng, 15),
            _ => random_big_form(&mut rng, 30),
        };
        counts[[0, 0, 0, 0, 0, 0, 1, 1, 2, 3][n % 10]] += 1;
        let g = random_gl2(&mut rng, 1000);
        let c = check(&f, &g);
        if let Some(small) = Form::<i128>::try_small(&c.form) {
            if n % 10 < 6 {
                assert!(is_canonical(&small).unwrap(), "fast path rejects {small}");
            }
        }
    }
    eprintln!("forms by size (|c| ≤ 12, ≤ 1e5, ~1e15, ~1e30): {counts:?}");
}

#[test]
fn symmetric_forms_on_the_boundary_of_f() {
    let mut rng = Rng(7);
    let mut seen = [0usize; 5];
    let (mut tried, mut rho_all_degenerate) = (0, true);
    while tried < 4000 {
        let base = random_form(&mut rng, 6);
        let kind = tried % 5;
        let f = match kind {
            0 => symmetrise(&base, &STAB_I),
            1 => symmetrise(&base, &STAB_RHO),
            k => symmetrise(&base, &STAB_LINES[k - 2]),
        };
        tried += 1;
        if f.invariants().unwrap().disc == 0 {
            continue;
        }
        if kind == 1 {
            rho_all_degenerate = false;
        }
        let g = random_gl2(&mut rng, 1000);
        let c = check(&f, &g);
        seen[c.stabiliser.len()] += 1;
        // Symmetrising over a group makes the form invariant under it.
        let want = [4, 6, 2, 2, 2][kind];
        assert_eq!(c.stabiliser.len() % want, 0, "{f}: {:?}", c.stabiliser);
    }
    eprintln!(
        "stabiliser orders 1/2/4: {} {} {}",
        seen[1], seen[2], seen[4]
    );
    assert!(seen[2] > 100 && seen[4] > 100);
    // Forms invariant under the order-6 group at e^{πi/3} all have a repeated root.
    assert!(rho_all_degenerate);
}

#[test]
fn scaled_and_huge_forms() {
    // γ·f for f with 30-digit coefficients has coefficients near 10⁴²: beyond i128.
    let mut rng = Rng(99);
    for _ in 0..200 {
        let f = random_big_form(&mut rng, 30);
        let g = random_gl2(&mut rng, 1000);
        let h = random_gl2(&mut rng, 1000);
        let c = check(&f.act(&h).unwrap(), &g);
        assert_eq!(canonical(&f).unwrap().form, c.form);
    }
}
