//! Local solubility against an independent brute-force oracle: a search over P¹(Z/p^k)
//! that ends with a certificate of solubility (a residue class on which f takes square
//! values) or of insolubility (every residue class shown to take non-square values only).

mod common;

use common::{random_form, random_gl2, Rng};
use qorbits::arith::primes::factor;
use qorbits::form::local::{
    everywhere_soluble, insoluble_places, local_data, pattern_mod_p, qp_soluble, Place,
};
use qorbits::form::{Form, Signature};
use rug::Integer;

/// `Some(true/false)` with a certificate, `None` if undecided up to `p^k ≤ limit` points.
fn oracle(f: &[i64; 5], p: i64, limit: i64) -> Option<bool> {
    let margin = if p == 2 { 3 } else { 1 };
    let eval = |x: i128, y: i128, m: i128| -> i128 {
        let (x, y) = (x % m, y % m);
        let mut acc = 0i128;
        for (k, c) in f.iter().enumerate() {
            let mut t = (*c as i128).rem_euclid(m);
            for _ in 0..(4 - k) {
                t = t * x % m;
            }
            for _ in 0..k {
                t = t * y % m;
            }
            acc = (acc + t) % m;
        }
        acc
    };
    let mut k = 1u32;
    loop {
        let m = (p as i128).pow(k);
        if m > limit as i128 {
            return None;
        }
        let mut undecided = false;
        // (x : 1) for x mod p^k, and (1 : y) for y ≡ 0 mod p.
        let points = (0..m)
            .map(|x| (x, 1))
            .chain((0..m / p as i128).map(|t| (1, t * p as i128)));
        for (x, y) in points {
            let v0 = eval(x, y, m);
            let mut v = 0;
            let mut u = v0;
            while u != 0 && u % p as i128 == 0 {
                u /= p as i128;
                v += 1;
            }
            if u == 0 || v + margin > k {
                undecided = true;
                continue;
            }
            let square = v % 2 == 0
                && if p == 2 {
                    u.rem_euclid(8) == 1
                } else {
                    (1..p as i128).any(|s| (s * s - u).rem_euclid(p as i128) == 0)
                };
            if square {
                return Some(true);
            }
        }
        if !undecided {
            return Some(false);
        }
        k += 1;
    }
}

#[test]
fn qp_solubility_agrees_with_the_oracle() {
    let mut rng = Rng(404);
    let (mut cases, mut insoluble, mut by_p) = (0, 0, std::collections::BTreeMap::new());
    while cases < 10_000 {
        let f = random_form(&mut rng, 12);
        let c: [i64; 5] = std::array::from_fn(|k| f.c[k].to_i64().unwrap());
        let disc = f.invariants().unwrap().disc;
        let mut primes: Vec<i64> = vec![2, 3];
        for (p, _) in factor(&disc) {
            let p = p.to_i64().unwrap();
            if p < 50 && !primes.contains(&p) {
                primes.push(p);
            }
        }
        for p in primes {
            if let Some(want) = oracle(&c, p, 2_000_000) {
                let got = qp_soluble(&f, &Integer::from(p));
                assert_eq!(got, want, "Q_{p} solubility of {f}");
                cases += 1;
                insoluble += (!want) as usize;
                *by_p.entry(p).or_insert(0) += 1;
            }
        }
    }
    eprintln!("{cases} (form, p) cases, {insoluble} insoluble; by p: {by_p:?}");
    assert!(insoluble > 500, "the sample must contain insoluble cases");
}

#[test]
fn large_prime_path_agrees_with_the_oracle() {
    // Primes above 50 dividing Disc take the sub-disc shortcut (module doc of `local`).
    let mut rng = Rng(405);
    let mut n = 0;
    while n < 150 {
        let f = random_form(&mut rng, 40);
        let disc = f.invariants().unwrap().disc;
        let c: [i64; 5] = std::array::from_fn(|k| f.c[k].to_i64().unwrap());
        for (p, e) in factor(&disc) {
            let p = p.to_i64().unwrap();
            if (53..=140).contains(&p) {
                if let Some(want) = oracle(&c, p, 3_000_000) {
                    assert_eq!(
                        qp_soluble(&f, &Integer::from(p)),
                        want,
                        "Q_{p} solubility of {f} (v_p(Disc) = {e})"
                    );
                    n += 1;
                }
            }
        }
    }
}

#[test]
fn published_example_and_points_imply_local_solubility() {
    // 2z² = 1 − 17x⁴ (Lind 1940, Reichardt 1942): everywhere locally soluble.
    let f = Form::<Integer>::from_i64([-34, 0, 0, 0, 2]);
    let inv = f.invariants().unwrap();
    let ld = local_data(&f, &factor(&inv.disc), f.signature(&inv).unwrap());
    assert!(everywhere_soluble(&ld), "{ld:?}");
    // A form with a rational point (f(x, y) a square for small x, y) is locally soluble
    // everywhere.
    let mut rng = Rng(7);
    let mut checked = 0;
    while checked < 300 {
        let f = random_form(&mut rng, 15);
        let c: Vec<i64> = f.c.iter().map(|v| v.to_i64().unwrap()).collect();
        let has_point = (-6i64..=6).any(|x| {
            (0i64..=6).any(|y| {
                let v: i64 = (0..5)
                    .map(|k| c[k] * x.pow(4 - k as u32) * y.pow(k as u32))
                    .sum();
                (x, y) != (0, 0) && v >= 0 && Integer::from(v).is_perfect_square()
            })
        });
        if has_point {
            let inv = f.invariants().unwrap();
            let ld = local_data(&f, &factor(&inv.disc), f.signature(&inv).unwrap());
            assert!(
                everywhere_soluble(&ld),
                "{f} has a rational point but {:?}",
                insoluble_places(&ld).collect::<Vec<_>>()
            );
            checked += 1;
        }
    }
}

#[test]
fn negative_definite_forms_fail_at_infinity_and_data_are_invariant() {
    let mut rng = Rng(9);
    for _ in 0..400 {
        let f = random_form(&mut rng, 10);
        let inv = f.invariants().unwrap();
        let s = f.signature(&inv).unwrap();
        let fac = factor(&inv.disc);
        let ld = local_data(&f, &fac, s);
        assert_eq!(
            insoluble_places(&ld).any(|p| *p == Place::Real),
            s == Signature::NegativeDefinite,
            "{f}"
        );
        let g = f.act(&random_gl2(&mut rng, 50)).unwrap();
        let lg = local_data(&g, &fac, s);
        assert_eq!(ld, lg, "{f} and {g}");
        for (p, _) in &fac {
            assert_eq!(pattern_mod_p(&f, p), pattern_mod_p(&g, p));
        }
    }
}

#[test]
fn patterns_mod_p_of_known_factorisations() {
    let p = |c: [i64; 5], q: u32| pattern_mod_p(&Form::from_i64(c), &Integer::from(q));
    assert_eq!(p([1, 0, 0, 0, 1], 2), "1^4"); // x⁴ + y⁴ = (x + y)⁴ mod 2
    assert_eq!(p([0, 0, 1, 0, 0], 5), "1^2 1^2"); // x²y²
    assert_eq!(p([1, 0, 0, 0, -2], 7), "1 1 2"); // x⁴ − 2: 2 = 4² mod 7 → (x² − 4)(x² + 4)
    assert_eq!(p([1, 0, 1, 0, 1], 2), "2^2"); // (x² + x + 1)² mod 2
    assert_eq!(p([5, 10, 0, 15, 5], 5), "0");
    assert_eq!(p([1, 0, 0, 0, 1], 3), "2 2"); // x⁴ + 1 = (x² + x + 2)(x² + 2x + 2) mod 3
    assert_eq!(p([1, 0, 0, -1, -1], 2), "4"); // x⁴ + x + 1 irreducible mod 2
                                              // y(x³ − 2) mod 5: 3³ = 27 ≡ 2, and x² + 3x + 4 has discriminant 3, a non-square mod 5.
    assert_eq!(p([0, 1, 0, 0, -2], 5), "1 1 2");
}
