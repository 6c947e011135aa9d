//! The machine path of the local data (`local_data_machine`, `pattern_mod_machine`,
//! `qp_soluble_machine`: i128, u64 factorisation, fields on u64) against the general path
//! (`local_data` on rug::Integer, factorisation by big-integer trial division and rho, FpBig
//! above 2³²), and the patterns mod large primes against PARI/GP.
//!
//! External source for the patterns: PARI/GP (Debian package pari-gp), `factor` of the
//! polynomial f(x, 1) with coefficients in Z/pZ, with a root at infinity of multiplicity
//! 4 − deg added as gp computes it. Correctness of the solubility itself is checked against
//! a brute-force search modulo p^k in `tests/local_oracle.rs`.

mod common;

use common::{gp_lines, Rng};
use qorbits::arith::factor64::factor_u64;
use qorbits::arith::primes::try_factor_big;
use qorbits::form::local::{
    local_data, local_data_machine, pattern_mod_machine, pattern_mod_p, qp_soluble,
    qp_soluble_machine,
};
use qorbits::form::Form;
use rug::Integer;
use std::collections::BTreeMap;

/// What the sample covered: (form, p) cases by kind.
#[derive(Default, Debug)]
struct Seen {
    cases: usize,
    insoluble: usize,
    by_kind: BTreeMap<&'static str, usize>,
}

/// Both paths on the form with coefficients `c` (Disc ≠ 0 and fitting i64 required).
fn compare(c: [i128; 5], seen: &mut Seen) {
    let small = Form::<i128>::new(c);
    let big = small.to_big();
    let inv = big.invariants().unwrap();
    let Some(disc) = inv.disc.to_i64().filter(|d| *d != 0) else {
        return;
    };
    let s = big.signature(&inv).unwrap();
    let fac64 = factor_u64(disc.unsigned_abs());
    let fac = try_factor_big(&inv.disc, u64::MAX).unwrap();
    let as_big: Vec<(Integer, u32)> = fac64.iter().map(|&(p, e)| (p.into(), e)).collect();
    assert_eq!(fac, as_big, "factorisations of {disc}");
    let general: Vec<_> = local_data(&big, &fac, s)
        .into_iter()
        .map(|l| l.map_prime(|p| p.to_i64().unwrap()))
        .collect();
    let machine = local_data_machine(&small, &fac64, s);
    assert_eq!(machine, general, "local data of {big}");
    let content = c.iter().fold(0i128, |g, &x| gcd(g, x));
    for l in &machine[..machine.len() - 1] {
        let p = match l.place {
            qorbits::form::local::Place::Prime(p) => p,
            _ => unreachable!(),
        };
        seen.cases += 1;
        seen.insoluble += (!l.soluble) as usize;
        let v = l.v_disc.unwrap();
        let kind = match p {
            2 | 3 if v >= 6 => "p = 2, 3 with v_p(Disc) ≥ 6",
            2 | 3 => "p = 2, 3",
            p if p >= 1 << 32 => "p > 2³²",
            p if v >= 2 && p > 50 => "p > 50 with v_p(Disc) ≥ 2",
            _ => "other",
        };
        *seen.by_kind.entry(kind).or_default() += 1;
        if content % p as i128 == 0 {
            *seen.by_kind.entry("p divides the content").or_default() += 1;
        }
        if c[0] % p as i128 == 0 {
            *seen
                .by_kind
                .entry("p divides a (root at infinity)")
                .or_default() += 1;
        }
    }
}

fn gcd(a: i128, b: i128) -> i128 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}

#[test]
fn machine_path_equals_general_path() {
    let mut rng = Rng(2718);
    let mut seen = Seen::default();
    for k in 0..12_000usize {
        let m = [3i64, 12, 40, 1000, 30_000][k % 5];
        let mut c: [i128; 5] = std::array::from_fn(|_| rng.range(m) as i128);
        match k % 8 {
            0 => c[0] = 0,
            // f(x, q^e y): q^{e·i} divides the i-th coefficient, high powers of q in Disc.
            1 | 2 => {
                let q = [2i128, 3, 5, 7, 53, 101][(k / 8) % 6];
                let e = 1 + (rng.next() % 3) as u32;
                for (i, x) in c.iter_mut().enumerate() {
                    *x *= q.pow(e * i as u32);
                }
            }
            // Non-primitive forms.
            3 => {
                let q = [2i128, 3, 4, 9, 8, 27, 59][(k / 8) % 7];
                c.iter_mut().for_each(|x| *x *= q);
            }
            4 => c = [c[0], 0, c[2], 0, c[4]],
            _ => {}
        }
        compare(c, &mut seen);
    }
    // Discriminants near 2⁶³: primes above 2³² (FpWide against FpBig).
    let mut wide = 0;
    while wide < 300 {
        let c: [i128; 5] = std::array::from_fn(|_| rng.range(400) as i128);
        let disc = Form::<i128>::new(c).invariants().unwrap().disc;
        if disc != 0 && i64::try_from(disc).is_ok() {
            let before = seen.by_kind.get("p > 2³²").copied().unwrap_or(0);
            compare(c, &mut seen);
            wide += (seen.by_kind["p > 2³²"] > before) as usize;
        }
    }
    eprintln!("{seen:?}");
    assert!(seen.cases > 25_000 && seen.insoluble > 1000, "{seen:?}");
    for (kind, least) in [
        ("p = 2, 3 with v_p(Disc) ≥ 6", 1000),
        ("p > 50 with v_p(Disc) ≥ 2", 100),
        ("p divides the content", 1000),
        ("p divides a (root at infinity)", 1000),
    ] {
        assert!(
            seen.by_kind.get(kind).copied().unwrap_or(0) >= least,
            "{kind}: {seen:?}"
        );
    }
}

#[test]
fn huge_coefficients_fall_back_to_big_integers() {
    // Coefficients near 10¹⁸ (Disc far beyond i64): the search overflows i128 at once for
    // large primes and deep discs; the machine entry must still give the general answer.
    let mut rng = Rng(99);
    let mut n = 0;
    while n < 300 {
        let m = 1i128 << (40 + rng.next() % 22);
        let c: [i128; 5] = std::array::from_fn(|_| rng.range(i64::MAX) as i128 % m);
        let f = Form::<i128>::new(c);
        let big = f.to_big();
        if big.invariants().unwrap().disc == 0 {
            continue;
        }
        // Primes whose powers make the numbers of the search large.
        for p in [2u64, 3, 5, 1_000_003, 4_294_967_311, (1 << 61) - 1] {
            let pb = Integer::from(p);
            assert_eq!(
                qp_soluble_machine(&f, p),
                qp_soluble(&big, &pb),
                "{big} at {p}"
            );
            assert_eq!(
                pattern_mod_machine(&f, p),
                pattern_mod_p(&big, &pb),
                "{big} mod {p}"
            );
        }
        n += 1;
    }
}

/// gp: `pat(a, b, c, d, e, p)` prints the pattern in the project's notation.
const GP_PATTERN: &str = r#"
pat(a0,a1,a2,a3,a4,p) = {
  my(P = Mod(a0,p)*x^4 + Mod(a1,p)*x^3 + Mod(a2,p)*x^2 + Mod(a3,p)*x + Mod(a4,p), v = List(), s = "");
  if (P == 0, return("0"));
  if (poldegree(P) < 4, listput(v, [1, 4 - poldegree(P)]));
  if (poldegree(P) > 0, my(F = factor(P)); for (i = 1, #F~, listput(v, [poldegree(F[i, 1]), F[i, 2]])));
  v = vecsort(Vec(v));
  for (i = 1, #v, s = concat(s, concat(if (i > 1, " ", ""), if (v[i][2] == 1, Str(v[i][1]), Str(v[i][1], "^", v[i][2])))));
  s
};
"#;

#[test]
fn patterns_mod_large_primes_against_pari() {
    // Primes p ≥ 64 (the squarefree-decomposition branch), dividing Disc or not, on both
    // machine fields; forms built to have repeated factors mod p as well.
    let mut rng = Rng(31);
    let mut cases: Vec<([i128; 5], u64)> = Vec::new();
    while cases.len() < 600 {
        let c: [i128; 5] = std::array::from_fn(|_| rng.range(300) as i128);
        let disc = Form::<i128>::new(c).invariants().unwrap().disc;
        if disc == 0 || i64::try_from(disc).is_err() {
            continue;
        }
        for &(p, _) in factor_u64(disc.unsigned_abs() as u64).iter() {
            if p >= 64 {
                cases.push((c, p));
            }
        }
        // (x − r y)²·(quadratic) + p·(anything): a double root mod a chosen prime.
        let p = [67u64, 1009, 65_537, 4_294_967_311, (1 << 61) - 1][cases.len() % 5];
        let r = rng.next() % p;
        let (u, v, w) = (rng.range(50), rng.range(50), rng.range(50));
        let pi = p as i128;
        let sq = [
            1,
            (-2 * r as i128).rem_euclid(pi),
            (r as i128) * (r as i128) % pi,
        ];
        let q = [u as i128, v as i128, w as i128];
        let mut g = [0i128; 5];
        for i in 0..3 {
            for j in 0..3 {
                g[i + j] += sq[i] * q[j];
            }
        }
        cases.push((g, p));
        cases.push((c, p));
    }
    let mut script = String::from(GP_PATTERN);
    for (c, p) in &cases {
        script += &format!(
            "print(pat({},{},{},{},{},{p}));\n",
            c[0], c[1], c[2], c[3], c[4]
        );
    }
    let want = gp_lines(&script, cases.len());
    assert_eq!(want.len(), cases.len(), "one line per case from gp");
    let mut repeated = 0;
    for ((c, p), w) in cases.iter().zip(&want) {
        let got = pattern_mod_machine(&Form::new(*c), *p);
        assert_eq!(&got, w, "{c:?} mod {p}");
        assert_eq!(
            pattern_mod_p(&Form::<i128>::new(*c).to_big(), &(*p).into()),
            got
        );
        repeated += got.contains('^') as usize;
    }
    assert!(repeated > 200, "repeated factors in the sample: {repeated}");
}
