//! Factorisation pattern over Q and Galois group against PARI/GP (DESIGN §6).
//!
//! External source: PARI/GP (Debian package pari-gp 2.15), functions `factor`,
//! `polisirreducible` and `polgalois`, run through the `gp` binary on one batched script.
//! For each form `(a, b, c, d, e)` gp factors `a x⁴ + b x³ + c x² + d x + e` over Q (adding
//! a linear factor for the root at infinity when `a = 0`), checks `polisirreducible` when
//! `a ≠ 0`, and for irreducible forms reads the group off `polgalois` = [order, sign, …]:
//! 24 → S4, 12 → A4, 8 → D4, 4 with sign −1 → C4, 4 with sign +1 → V4.
//!
//! The sample mixes random forms of three sizes with forms built to be reducible in each
//! way and to have the small groups, all with non-zero discriminant.

mod common;

use common::Rng;
use qorbits::form::galois::{factor_pattern, galois_group, FactorPattern, GaloisGroup};
use qorbits::form::{Form, Gl2};
use rug::ops::Pow;
use rug::Integer;
use std::collections::BTreeMap;

fn big_form(c: [Integer; 5]) -> Form<Integer> {
    Form::new(c)
}

fn small_form(c: [i64; 5]) -> Form<Integer> {
    Form::from_i64(c)
}

/// `(p x² + q xy + r y²)(s x² + t xy + u y²)`.
fn quad_times_quad(l: [Integer; 3], m: [Integer; 3]) -> Form<Integer> {
    let [p, q, r] = l;
    let [s, t, u] = m;
    big_form([
        Integer::from(&p * &s),
        Integer::from(&p * &t) + Integer::from(&q * &s),
        Integer::from(&p * &u) + Integer::from(&q * &t) + Integer::from(&r * &s),
        Integer::from(&q * &u) + Integer::from(&r * &t),
        Integer::from(&r * &u),
    ])
}

/// `(p x + q y)(s x³ + t x²y + u xy² + w y³)`.
fn linear_times_cubic(l: [Integer; 2], m: [Integer; 4]) -> Form<Integer> {
    let [p, q] = l;
    let [s, t, u, w] = m;
    big_form([
        Integer::from(&p * &s),
        Integer::from(&p * &t) + Integer::from(&q * &s),
        Integer::from(&p * &u) + Integer::from(&q * &t),
        Integer::from(&p * &w) + Integer::from(&q * &u),
        Integer::from(&q * &w),
    ])
}

/// `k · f(u x, v y)`: same factorisation pattern and Galois group as `f` (a GL2(Q) change of
/// variables and a constant factor).
fn rescale(f: &Form<Integer>, k: i64, u: i64, v: i64) -> Form<Integer> {
    let mut c = f.c.clone();
    for (n, x) in c.iter_mut().enumerate() {
        let un = Integer::from(u).pow(4 - n as u32);
        let vn = Integer::from(v).pow(n as u32);
        *x *= un * vn * k;
    }
    big_form(c)
}

/// A random GL2(Z)-image of `f` (products of translations and swaps): hides the shape a
/// family was built with while keeping pattern and group.
fn scramble(rng: &mut Rng, f: &Form<Integer>, steps: usize) -> Form<Integer> {
    let mut g = f.clone();
    for _ in 0..steps {
        let k = rng.nonzero(3);
        g = g.act(&Gl2::new(1, 0, k, 1)).unwrap();
        if rng.next() % 2 == 0 {
            g = g.act(&Gl2::new(0, 1, 1, 0)).unwrap();
        }
    }
    g
}

/// `N` random coefficients, small (|c| ≤ 6) or large (up to 12 digits).
fn coeffs<const N: usize>(rng: &mut Rng, large: bool) -> [Integer; N] {
    std::array::from_fn(|_| {
        if large {
            rng.big_upto(12)
        } else {
            Integer::from(rng.range(6))
        }
    })
}

/// Forms collected by family, all with `Disc ≠ 0`.
struct Sample {
    rng: Rng,
    forms: Vec<(&'static str, Form<Integer>)>,
}

impl Sample {
    /// Add `want` forms of `family` from `make` (which may decline with `None`).
    fn fill(
        &mut self,
        family: &'static str,
        want: usize,
        mut make: impl FnMut(&mut Rng) -> Option<Form<Integer>>,
    ) {
        let mut got = 0;
        while got < want {
            if let Some(f) = make(&mut self.rng) {
                if f.invariants().unwrap().disc != 0 {
                    self.forms.push((family, f));
                    got += 1;
                }
            }
        }
    }
}

/// The sample: `(family, form)` pairs, all with `Disc ≠ 0`.
fn sample() -> Vec<(&'static str, Form<Integer>)> {
    let mut s = Sample {
        rng: Rng(0x5141_7262_6974_7301),
        forms: Vec::new(),
    };

    // Random forms of three sizes.
    s.fill("small", 700, |r| {
        Some(small_form(std::array::from_fn(|_| r.range(5))))
    });
    s.fill("medium", 300, |r| {
        Some(small_form(std::array::from_fn(|_| r.range(1000))))
    });
    s.fill("large", 250, |r| {
        Some(big_form(std::array::from_fn(|_| r.big_upto(30))))
    });

    // Reducible by construction: two quadratics, linear times cubic, a = 0 and/or e = 0.
    s.fill("quad*quad", 250, |r| {
        let large = r.next() % 3 == 0;
        let (l, m) = (coeffs(r, large), coeffs(r, large));
        Some(quad_times_quad(l, m))
    });
    s.fill("lin*cubic", 200, |r| {
        let large = r.next() % 3 == 0;
        let (l, m) = (coeffs(r, large), coeffs(r, large));
        Some(linear_times_cubic(l, m))
    });
    s.fill("a=0/e=0", 200, |r| {
        let m = if r.next() % 2 == 0 { 5 } else { 1000 };
        let mut c: [i64; 5] = std::array::from_fn(|_| r.range(m));
        match r.next() % 3 {
            0 => c[0] = 0,
            1 => c[4] = 0,
            _ => (c[0], c[4]) = (0, 0),
        }
        Some(small_form(c))
    });

    // Biquadratics a x⁴ + c x²y² + e y⁴: often D4, C4 or V4.
    s.fill("biquadratic", 250, |r| {
        let m = if r.next() % 2 == 0 { 12 } else { 1000 };
        Some(small_form([r.nonzero(m), 0, r.range(m), 0, r.nonzero(m)]))
    });
    // C4 family (derived here): x⁴ + p x² + q with q = (k² + 4)m², p = ±(k² + 4)m, so that
    // q(p² − 4q) = (q k)² is a square while q is not (k ≠ 0); rescaled and scrambled.
    s.fill("C4-family", 120, |r| {
        let (k, m) = (r.nonzero(6), r.nonzero(6));
        let n = k * k + 4;
        let sign = if r.next() % 2 == 0 { 1 } else { -1 };
        let f = small_form([1, 0, sign * n * m, 0, n * m * m]);
        let f = rescale(&f, r.nonzero(3), r.nonzero(3), r.nonzero(3));
        let steps = (r.next() % 4) as usize;
        Some(scramble(r, &f, steps))
    });
    // V4 family: x⁴ + p x² + s², V4 whenever irreducible since the constant term is a square;
    // rescaled and scrambled.
    s.fill("V4-family", 120, |r| {
        let (p, q) = (r.range(30), r.nonzero(30));
        let f = small_form([1, 0, p, 0, q * q]);
        let f = rescale(&f, r.nonzero(3), r.nonzero(3), r.nonzero(3));
        let steps = (r.next() % 4) as usize;
        Some(scramble(r, &f, steps))
    });
    // Square discriminant (A4, V4, C4 or reducible): random small forms, kept only when
    // Disc is a perfect square.
    s.fill("square-disc", 150, |r| {
        let f = small_form(std::array::from_fn(|_| r.range(8)));
        let disc = f.invariants().unwrap().disc;
        (disc > 0 && disc.is_perfect_square()).then_some(f)
    });
    // x⁴ + 8x + 12 (a standard A4 example) under random changes of variables.
    s.fill("A4-image", 60, |r| {
        let f = small_form([1, 0, 0, 8, 12]);
        let f = rescale(&f, r.nonzero(3), r.nonzero(4), r.nonzero(4));
        let steps = 1 + (r.next() % 5) as usize;
        Some(scramble(r, &f, steps))
    });
    // Large structured forms: biquadratics with big coefficients and big members of the C4
    // family above.
    s.fill("large-biquadratic", 100, |r| {
        let (a, c, e) = (r.big_upto(15), r.big_upto(15), r.big_upto(15));
        let f = big_form([a, Integer::new(), c, Integer::new(), e]);
        let steps = (r.next() % 3) as usize;
        Some(scramble(r, &f, steps))
    });
    s.fill("large-C4-family", 60, |r| {
        let k = r.nonzero(1_000);
        let n = k * k + 4;
        let m = r.big_upto(12);
        let f = big_form([
            Integer::from(1),
            Integer::new(),
            Integer::from(&m * n),
            Integer::new(),
            Integer::from(m.square_ref()) * n,
        ]);
        let steps = (r.next() % 3) as usize;
        Some(scramble(r, &f, steps))
    });
    s.forms
}

/// The gp side: one line `index degrees irreducible order sign` per form, e.g.
/// `17 1+3 0 0 0`; `irreducible` is `polisirreducible` (−1 when a = 0), order and sign come
/// from `polgalois` (0 0 for reducible forms).
const GP_PRELUDE: &str = r#"
qf(k, a0, a1, a2, a3, a4) =
{
  my(P = a0*x^4 + a1*x^3 + a2*x^2 + a3*x + a4, F = factor(P), v = List(), irr = -1, g = [0, 0]);
  if (a0 == 0, listput(v, 1));
  for (i = 1, #F~,
    my(n = poldegree(F[i, 1]));
    if (n > 0, for (m = 1, F[i, 2], listput(v, n))));
  v = vecsort(Vec(v));
  if (a0 != 0, irr = polisirreducible(P));
  if (#v == 1, my(G = polgalois(P)); g = [G[1], G[2]]);
  print(k, " ", strjoin(apply(n -> Str(n), v), "+"), " ", irr, " ", g[1], " ", g[2]);
}
"#;

/// The pattern named by gp's sorted factor degrees.
fn pattern_from_degrees(degrees: &str) -> FactorPattern {
    match degrees {
        "4" => FactorPattern::Irreducible,
        "1+3" => FactorPattern::LinearCubic,
        "2+2" => FactorPattern::QuadraticQuadratic,
        "1+1+2" => FactorPattern::LinearLinearQuadratic,
        "1+1+1+1" => FactorPattern::Linear4,
        other => panic!("gp gave factor degrees {other}, not a quartic with Disc ≠ 0"),
    }
}

/// The group named by `polgalois`' order and sign (`0 0` means reducible).
fn group_from_polgalois(order: i64, sign: i64) -> Option<GaloisGroup> {
    match (order, sign) {
        (0, 0) => None,
        (24, _) => Some(GaloisGroup::S4),
        (12, _) => Some(GaloisGroup::A4),
        (8, _) => Some(GaloisGroup::D4),
        (4, -1) => Some(GaloisGroup::C4),
        (4, 1) => Some(GaloisGroup::V4),
        other => panic!("polgalois gave (order, sign) = {other:?}, not a transitive quartic group"),
    }
}

#[test]
fn factor_pattern_and_galois_group_agree_with_pari() {
    let start = std::time::Instant::now();
    let forms = sample();
    assert!(forms.len() >= 2000, "sample too small: {}", forms.len());

    let mut script = String::from(GP_PRELUDE);
    for (k, (_, f)) in forms.iter().enumerate() {
        let [a, b, c, d, e] = &f.c;
        script.push_str(&format!("qf({k}, {a}, {b}, {c}, {d}, {e});\n"));
    }
    script.push_str("quit\n");
    let lines = common::gp_lines(&script, forms.len());

    let mut mismatches = Vec::new();
    let mut by_pattern: BTreeMap<&str, usize> = BTreeMap::new();
    let mut by_group: BTreeMap<&str, usize> = BTreeMap::new();
    for (k, ((family, f), line)) in forms.iter().zip(&lines).enumerate() {
        let fields: Vec<&str> = line.split_whitespace().collect();
        assert_eq!(fields.len(), 5, "unexpected gp line {line:?}");
        assert_eq!(
            fields[0],
            k.to_string(),
            "gp lines out of order at {line:?}"
        );
        let pari_pattern = pattern_from_degrees(fields[1]);
        let pari_irreducible: i64 = fields[2].parse().unwrap();
        let order: i64 = fields[3].parse().unwrap();
        let sign: i64 = fields[4].parse().unwrap();
        let pari_group = group_from_polgalois(order, sign);

        // PARI's two irreducibility answers must agree with each other (a ≠ 0 only).
        if f.c[0] != 0 {
            let by_factor = pari_pattern == FactorPattern::Irreducible;
            assert_eq!(
                pari_irreducible,
                i64::from(by_factor),
                "PARI factor and polisirreducible disagree on {f:?}"
            );
        }

        let ours_pattern = factor_pattern(f).expect("factor_pattern on rug::Integer failed");
        let ours_group = galois_group(f).expect("galois_group on rug::Integer failed");
        if ours_pattern != pari_pattern || ours_group != pari_group {
            mismatches.push(format!(
                "[{family}] f = ({}, {}, {}, {}, {}): qorbits {} {:?}, PARI {} {:?}",
                f.c[0],
                f.c[1],
                f.c[2],
                f.c[3],
                f.c[4],
                ours_pattern.name(),
                ours_group.map(GaloisGroup::name),
                pari_pattern.name(),
                pari_group.map(GaloisGroup::name),
            ));
        }
        // The fast i128 path, where it applies, must give the same answers.
        if let Some(small) = Form::<i128>::try_small(f) {
            if let Some(p) = factor_pattern(&small) {
                assert_eq!(p, ours_pattern, "i128 and rug patterns differ on {f:?}");
            }
            if let Some(g) = galois_group(&small) {
                assert_eq!(g, ours_group, "i128 and rug groups differ on {f:?}");
            }
        }

        *by_pattern.entry(pari_pattern.name()).or_default() += 1;
        if let Some(g) = pari_group {
            *by_group.entry(g.name()).or_default() += 1;
        }
    }

    let fmt = |m: &BTreeMap<&str, usize>| {
        m.iter()
            .map(|(k, v)| format!("{k}:{v}"))
            .collect::<Vec<_>>()
            .join(" ")
    };
    eprintln!(
        "galois_pari: {} forms in {:.2?}; patterns {}; groups {}",
        forms.len(),
        start.elapsed(),
        fmt(&by_pattern),
        fmt(&by_group)
    );
    assert!(
        mismatches.is_empty(),
        "{} of {} forms disagree with PARI/GP:\n{}",
        mismatches.len(),
        forms.len(),
        mismatches.join("\n")
    );

    // Coverage: the sample must reach every pattern and every group, or it proves little.
    for p in [
        FactorPattern::Irreducible,
        FactorPattern::LinearCubic,
        FactorPattern::QuadraticQuadratic,
        FactorPattern::LinearLinearQuadratic,
        FactorPattern::Linear4,
    ] {
        assert!(
            by_pattern.contains_key(p.name()),
            "no form with pattern {} in the sample",
            p.name()
        );
    }
    for g in GaloisGroup::ALL {
        assert!(
            by_group.contains_key(g.name()),
            "no form with group {} in the sample",
            g.name()
        );
    }
}
