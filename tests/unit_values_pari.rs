//! The hand values of the unit tests in `src/arith` and `src/form`, re-derived with PARI/GP
//! (Debian package pari-gp: `isprime`, `nextprime`, `factor`, `factormod`, `kronecker`,
//! `polgalois`) and compared with the library on the same inputs, plus random ones: the
//! primes and factorisations of `arith::primes`, the Legendre symbols of `arith::fp`, the
//! patterns mod p of `form::local` and the Galois groups and factor patterns of
//! `form::galois`. A value a unit test states without a source is sourced here.

mod common;

use common::{gp_lines, random_form, Rng};
use qorbits::arith::fp::{Field, Fp64};
use qorbits::arith::primes::{factor_string, is_prime};
use qorbits::form::galois::{factor_pattern, galois_group, FactorPattern, GaloisGroup};
use qorbits::form::local::pattern_mod_p;
use qorbits::form::Form;
use rug::Integer;

fn int(s: &str) -> Integer {
    Integer::from(Integer::parse(s).unwrap())
}

#[test]
fn primes_of_the_unit_tests_and_random_ones_agree_with_pari_isprime() {
    // The numbers that the unit tests of arith::primes, arith::fp and form::local take as
    // primes or composites.
    let mut ns: Vec<Integer> = [
        "1000000007",
        "999999999989",
        "100000000003",
        "2305843009213693951", // 2^61 − 1
        "1000003",
        "1009",
        "11",
        "4294967311",
        "3215031751",
        "3825123056546413051",
    ]
    .iter()
    .map(|s| int(s))
    .collect();
    let mut rng = Rng(0x9e1_3e5);
    for _ in 0..400 {
        ns.push(rng.big_upto(25).abs() + 2u32);
    }
    let script: String = ns
        .iter()
        .map(|n| format!("print(isprime({n}))\n"))
        .collect();
    let pari = gp_lines(&script, ns.len());
    for (n, line) in ns.iter().zip(&pari) {
        assert_eq!(
            is_prime(n),
            line.trim() == "1",
            "{n}: PARI isprime says {line}"
        );
    }
    let primes = pari.iter().filter(|l| l.trim() == "1").count();
    assert!(primes >= 20, "only {primes} primes in the sample");
    // 4294967311 is the first prime after 2^32 (the unit test of form::local says so from
    // memory).
    let next = gp_lines("print(nextprime(2^32))\n", 1);
    assert_eq!(next[0].trim(), "4294967311");
}

/// PARI's factorisation of |n| in the library's text form `p^e q` (PARI lists the sign as
/// the factor −1, which the text form leaves to the sign of n).
fn pari_factor_texts(ns: &[Integer]) -> Vec<String> {
    let script: String = ns
        .iter()
        .map(|n| {
            format!(
                "F=factor({n}); print(\"F \", strjoin(vector(#F~, i, Str(F[i,1], \"^\", F[i,2])), \" \"))\n"
            )
        })
        .collect();
    gp_lines(&script, ns.len())
        .iter()
        .map(|line| {
            let tokens: Vec<String> = line
                .trim_start_matches('F')
                .split_whitespace()
                .filter(|t| !t.starts_with("-1^"))
                .map(|t| {
                    let (p, e) = t.split_once('^').unwrap();
                    if e == "1" {
                        p.to_string()
                    } else {
                        t.to_string()
                    }
                })
                .collect();
            if tokens.is_empty() {
                "1".to_string()
            } else {
                tokens.join(" ")
            }
        })
        .collect()
}

#[test]
fn factorisations_of_the_unit_tests_and_random_ones_agree_with_pari_factor() {
    let mut ns: Vec<Integer> = [
        "1000000000000000000000000",
        "999999999999999999999999",
        "123456789012345678901234",
        "-86",
        "-1947252",
        "-3024",
        "229",
        "25",
        "1",
        "-1",
        "-2",
        "-999999999989",
        "100000000001899999999967", // 999999999989 · 100000000003
    ]
    .iter()
    .map(|s| int(s))
    .collect();
    ns.push(Integer::from(i64::MAX));
    ns.push(Integer::from(i64::MIN));
    let mut rng = Rng(0xfac7_0125);
    for _ in 0..300 {
        ns.push(rng.big_upto(24));
    }
    ns.retain(|n| *n != 0);
    let pari = pari_factor_texts(&ns);
    for (n, want) in ns.iter().zip(&pari) {
        assert_eq!(
            &factor_string(n),
            want,
            "factorisation of {n} (PARI factor)"
        );
    }
}

#[test]
fn legendre_symbols_agree_with_pari_kronecker() {
    let mut cases: Vec<(u64, u64)> = (0..11).map(|a| (11, a)).collect();
    let mut rng = Rng(0x01e9_ed7e);
    let primes = [3u64, 5, 7, 1009, 1_000_003, 4_294_967_291];
    for _ in 0..300 {
        let p = primes[(rng.next() % primes.len() as u64) as usize];
        cases.push((p, rng.next() % p));
    }
    let script: String = cases
        .iter()
        .map(|(p, a)| format!("print(kronecker({a}, {p}))\n"))
        .collect();
    for ((p, a), line) in cases.iter().zip(gp_lines(&script, cases.len())) {
        let f = Fp64::new(*p);
        assert_eq!(
            f.legendre(a).to_string(),
            line.trim(),
            "({a} / {p}), PARI kronecker"
        );
    }
}

/// PARI's pattern of f mod p as sorted (degree, multiplicity) pairs, the root at infinity
/// included (multiplicity 4 − deg(f mod p)); `None` when f ≡ 0.
const GP_PATTERN: &str = r#"
pat(a, b, c, d, e, p) =
{
  my(g = Pol([a, b, c, d, e]), gm = g * Mod(1, p), v = List(), F);
  if (gm == 0, print("0"); return);
  if (poldegree(gm) < 4, listput(v, [1, 4 - poldegree(gm)]));
  F = factormod(g, p);
  for (i = 1, #F~, listput(v, [poldegree(F[i, 1]), F[i, 2]]));
  print(concat(apply(t -> Str(" ", t[1], "^", t[2]), Vec(v))));
}
"#;

fn pairs_of_library_pattern(s: &str) -> Vec<(u32, u32)> {
    let mut v: Vec<(u32, u32)> = s
        .split_whitespace()
        .map(|t| match t.split_once('^') {
            Some((d, m)) => (d.parse().unwrap(), m.parse().unwrap()),
            None => (t.parse().unwrap(), 1),
        })
        .collect();
    v.sort();
    v
}

#[test]
fn patterns_mod_p_agree_with_pari_factormod() {
    // The forms and primes of the unit test of form::local, then random ones.
    let mut cases: Vec<([i64; 5], Integer)> = vec![
        ([1, 0, 0, 0, -1], 3.into()),
        ([1, 0, 0, 0, -1], 5.into()),
        ([1, 0, 0, 0, 1], 2.into()),
        ([3, 0, 9, 0, 6], 7.into()),
        ([0, 1, 0, 0, -2], 7.into()),
        ([7, 14, 0, 21, 7], 7.into()),
        ([1, 0, 0, 0, -1], int("4294967311")),
    ];
    let mut rng = Rng(0x9a77_e125);
    let primes = [2i64, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];
    for _ in 0..600 {
        let f = random_form(&mut rng, 20);
        let p = primes[(rng.next() % primes.len() as u64) as usize];
        cases.push((f.c.map(|v| v.to_i64().unwrap()), p.into()));
    }
    let mut script = String::from(GP_PATTERN);
    for (f, p) in &cases {
        script.push_str(&format!(
            "pat({}, {}, {}, {}, {}, {p})\n",
            f[0], f[1], f[2], f[3], f[4]
        ));
    }
    let pari = gp_lines(&script, cases.len());
    for ((f, p), line) in cases.iter().zip(&pari) {
        let ours = pattern_mod_p(&Form::from_i64(*f), p);
        if line.trim() == "0" {
            assert_eq!(ours, "0", "{f:?} mod {p}");
            continue;
        }
        let mut want: Vec<(u32, u32)> = line
            .split_whitespace()
            .map(|t| {
                let (d, m) = t.split_once('^').unwrap();
                (d.parse().unwrap(), m.parse().unwrap())
            })
            .collect();
        want.sort();
        assert_eq!(
            pairs_of_library_pattern(&ours),
            want,
            "{f:?} mod {p}: ours {ours}, PARI factormod {line}"
        );
    }
}

#[test]
fn textbook_galois_groups_and_unit_test_patterns_agree_with_pari() {
    // The forms of the unit tests of form::galois with their stated answers.
    let groups: [([i64; 5], GaloisGroup); 5] = [
        ([1, 0, 0, -1, -1], GaloisGroup::S4),
        ([1, 0, 0, 8, 12], GaloisGroup::A4),
        ([1, 0, 0, 0, -2], GaloisGroup::D4),
        ([1, 0, 5, 0, 5], GaloisGroup::C4),
        ([1, 0, 0, 0, 1], GaloisGroup::V4),
    ];
    let script: String = groups
        .iter()
        .map(|(c, _)| {
            format!(
                "G=polgalois(Pol([{},{},{},{},{}])); print(G[1], \" \", G[2])\n",
                c[0], c[1], c[2], c[3], c[4]
            )
        })
        .collect();
    for ((c, want), line) in groups.iter().zip(gp_lines(&script, groups.len())) {
        // polgalois: order 24 S4, 12 A4, 8 D4, 4 with sign −1 C4, 4 with sign +1 V4.
        let pari = match line.trim() {
            "24 -1" => GaloisGroup::S4,
            "12 1" => GaloisGroup::A4,
            "8 -1" => GaloisGroup::D4,
            "4 -1" => GaloisGroup::C4,
            "4 1" => GaloisGroup::V4,
            other => panic!("polgalois of {c:?}: {other}"),
        };
        assert_eq!(pari, *want, "{c:?}");
        assert_eq!(
            galois_group(&Form::<Integer>::from_i64(*c)).unwrap(),
            Some(pari)
        );
    }
    // Factor patterns over Q: PARI's factor degrees, plus a linear factor for a = 0.
    let patterns: [([i64; 5], FactorPattern); 6] = [
        ([1, 0, -2, 0, -3], FactorPattern::QuadraticQuadratic),
        ([0, 1, 0, 0, -2], FactorPattern::LinearCubic),
        ([0, 1, 0, 1, 0], FactorPattern::LinearLinearQuadratic),
        ([2, -1, -14, -5, 6], FactorPattern::Linear4),
        ([1, 0, 0, -1, -1], FactorPattern::Irreducible),
        ([1, 0, 1, 0, 1], FactorPattern::QuadraticQuadratic),
    ];
    let script: String = patterns
        .iter()
        .map(|(c, _)| {
            format!(
                "g=Pol([{},{},{},{},{}]); F=factor(g); v=vector(4-poldegree(g),i,1); \
                 for(i=1,#F~,if(poldegree(F[i,1])>0,for(m=1,F[i,2],v=concat(v,[poldegree(F[i,1])])))); \
                 print(vecsort(v))\n",
                c[0], c[1], c[2], c[3], c[4]
            )
        })
        .collect();
    for ((c, want), line) in patterns.iter().zip(gp_lines(&script, patterns.len())) {
        let pari = match line.trim() {
            "[4]" => FactorPattern::Irreducible,
            "[1, 3]" => FactorPattern::LinearCubic,
            "[2, 2]" => FactorPattern::QuadraticQuadratic,
            "[1, 1, 2]" => FactorPattern::LinearLinearQuadratic,
            "[1, 1, 1, 1]" => FactorPattern::Linear4,
            other => panic!("factor of {c:?}: {other}"),
        };
        assert_eq!(pari, *want, "{c:?}");
        assert_eq!(
            factor_pattern(&Form::<Integer>::from_i64(*c)).unwrap(),
            pari
        );
    }
}
