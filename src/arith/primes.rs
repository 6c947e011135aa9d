//! Integer factorisation for discriminants: trial division, Pollard–Brent rho and a
//! deterministic Miller–Rabin test. Numbers below 2⁶⁴ go to the allocation-free machine
//! path [`crate::arith::factor64`] (the same answers: factorisations are unique and both
//! primality tests are proved there); this module handles the larger ones.
//!
//! Primality: Miller–Rabin with the first thirteen prime bases is deterministic below
//! 3 317 044 064 679 887 385 961 981 ≈ 3.3·10²⁴ (J. Sorenson and J. Webster, Math. Comp. 86
//! (2017)); above that bound the answer is "probable prime" (GMP's test, Baillie–PSW plus
//! random Miller–Rabin rounds), which no known composite passes.
//!
//! ```
//! use qorbits::arith::primes::factor;
//! use rug::Integer;
//! let f = factor(&Integer::from(-1947252));
//! let want: Vec<(Integer, u32)> = [(2, 2), (3, 1), (263, 1), (617, 1)].map(|(p, e)| (Integer::from(p), e)).to_vec();
//! assert_eq!(f, want);
//! ```

use crate::arith::factor64::{factor_u64, is_prime_u64};
use rug::Integer;

const BASES: [u32; 13] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41];

fn deterministic_bound() -> Integer {
    Integer::from_str_radix("3317044064679887385961981", 10).expect("literal")
}

/// Whether `n` is prime (proved below ≈3.3·10²⁴, probable above; see the module doc).
pub fn is_prime(n: &Integer) -> bool {
    if *n < 2 {
        return false;
    }
    if let Some(m) = n.to_u64() {
        return is_prime_u64(m);
    }
    for b in BASES {
        if *n == b {
            return true;
        }
        if n.is_divisible_u(b) {
            return false;
        }
    }
    if *n >= deterministic_bound() {
        return n.is_probably_prime(40) != rug::integer::IsPrime::No;
    }
    let n1 = Integer::from(n - 1u32);
    let s = n1.find_one(0).expect("n > 2");
    let d = Integer::from(&n1 >> s);
    'bases: for b in BASES {
        let mut x = Integer::from(b).pow_mod(&d, n).expect("modulus > 0");
        if x == 1 || x == n1 {
            continue;
        }
        for _ in 1..s {
            x = x.square() % n;
            if x == n1 {
                continue 'bases;
            }
        }
        return false;
    }
    true
}

/// The odd primes `≥ start` in increasing order, by trial division (for the small primes
/// that residue tests walk through).
pub fn odd_primes_from(start: u64) -> impl Iterator<Item = u64> {
    (start.max(3)..).filter(|&n| {
        n % 2 == 1
            && (3..)
                .step_by(2)
                .take_while(|d| d * d <= n)
                .all(|d| n % d != 0)
    })
}

/// A non-trivial factor of the odd composite `n` (Pollard's rho, Brent's variant), or
/// `None` once `budget` iterations are spent.
fn rho(n: &Integer, budget: &mut u64) -> Option<Integer> {
    for c in 1u32.. {
        let f = |x: &Integer| (Integer::from(x.square_ref()) + c) % n;
        let (mut x, mut y, mut g) = (Integer::from(2), Integer::from(2), Integer::from(1));
        let mut q = Integer::from(1);
        let mut r: u64 = 1;
        let mut ys = Integer::new();
        while g == 1 {
            if *budget < r {
                return None;
            }
            *budget -= r;
            x = y.clone();
            for _ in 0..r {
                y = f(&y);
            }
            let mut k = 0;
            while k < r && g == 1 {
                ys = y.clone();
                for _ in 0..(128.min(r - k)) {
                    y = f(&y);
                    q = q * Integer::from(&x - &y).abs() % n;
                }
                g = q.clone().gcd(n);
                k += 128;
            }
            r *= 2;
        }
        if g == *n {
            // Backtrack one step at a time.
            loop {
                ys = f(&ys);
                g = Integer::from(&x - &ys).abs().gcd(n);
                if g > 1 {
                    break;
                }
            }
        }
        if g != *n {
            return Some(g);
        }
    }
    unreachable!("rho always finds a factor for some constant")
}

/// The prime factorisation of `|n|` as `(prime, exponent)` pairs in increasing order
/// (empty for |n| ≤ 1).
pub fn factor(n: &Integer) -> Vec<(Integer, u32)> {
    try_factor(n, u64::MAX).expect("an unlimited budget always finishes")
}

/// [`factor`] within a budget of rho iterations (about 10⁶ per second); `None` when the
/// budget runs out (only for numbers with two large prime factors, far beyond 10²⁴).
pub fn try_factor(n: &Integer, budget: u64) -> Option<Vec<(Integer, u32)>> {
    match n.clone().abs().to_u64() {
        Some(m) => Some(
            factor_u64(m)
                .iter()
                .map(|&(p, e)| (Integer::from(p), e))
                .collect(),
        ),
        None => try_factor_big(n, budget),
    }
}

/// The big-integer algorithm of [`try_factor`] for any `n` (trial division below 10⁴, then
/// rho); `try_factor` uses it above 2⁶⁴, and `benches/local.rs` compares it with
/// [`factor_u64`] on numbers below 2⁶⁴.
pub fn try_factor_big(n: &Integer, budget: u64) -> Option<Vec<(Integer, u32)>> {
    let mut budget = budget;
    let mut m = n.clone().abs();
    let mut out: Vec<(Integer, u32)> = Vec::new();
    let push =
        |p: Integer, out: &mut Vec<(Integer, u32)>| match out.iter_mut().find(|(q, _)| *q == p) {
            Some(e) => e.1 += 1,
            None => out.push((p, 1)),
        };
    for p in 2u32..10_000 {
        if Integer::from(p) * p > m {
            break;
        }
        while m.is_divisible_u(p) {
            m /= p;
            push(Integer::from(p), &mut out);
        }
    }
    let mut stack = vec![m];
    while let Some(x) = stack.pop() {
        if x == 1 {
            continue;
        }
        if is_prime(&x) {
            push(x, &mut out);
        } else if x.is_perfect_square() {
            let r = x.sqrt();
            stack.push(r.clone());
            stack.push(r);
        } else {
            let d = rho(&x, &mut budget)?;
            stack.push(Integer::from(&x / &d));
            stack.push(d);
        }
    }
    out.sort();
    Some(out)
}

/// The text form of a factorisation of |n| (the table's `disc_factors`): the prime powers
/// `p^e` in increasing order, separated by single spaces, the exponent left out when it is
/// 1, e.g. `2^2 3 263 617`; `1` for |n| = 1 (no factors). Split on spaces, then on `^`, to
/// read it back.
pub fn factor_text<P: std::fmt::Display>(factors: &[(P, u32)]) -> String {
    if factors.is_empty() {
        return "1".into();
    }
    powers_text(factors)
}

/// `b^e` tokens separated by single spaces, the exponent left out when it is 1: the house
/// text form of factorisations (`2^2 3 263 617`) and of factor patterns mod p (`1^2 2`).
pub fn powers_text<P: std::fmt::Display, E: Into<u64> + Copy>(items: &[(P, E)]) -> String {
    let parts: Vec<String> = items
        .iter()
        .map(|(b, e)| match (*e).into() {
            1 => b.to_string(),
            e => format!("{b}^{e}"),
        })
        .collect();
    parts.join(" ")
}

/// [`factor_text`] of the factorisation of `|n|`.
pub fn factor_string(n: &Integer) -> String {
    factor_text(&factor(n))
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::ops::Pow;

    #[test]
    fn primes_and_composites() {
        // Strong pseudoprimes to many bases (published lists): 3215031751 = 151·751·28351
        // fools bases 2, 3, 5, 7; 3825123056546413051 fools bases up to 23.
        assert!(!is_prime(&Integer::from(3_215_031_751u64)));
        assert!(!is_prime(&Integer::from(3_825_123_056_546_413_051u64)));
        assert!(is_prime(&Integer::from(1_000_000_007u64)));
        // 2^61 − 1 is a Mersenne prime.
        assert!(is_prime(&((Integer::from(1) << 61) - 1u32)));
    }

    #[test]
    fn factors_multiply_back() {
        let cases = [
            "1000000000000000000000000",
            "999999999999999999999999",
            "123456789012345678901234",
            "-86",
        ];
        for c in cases {
            let n = Integer::from_str_radix(c, 10).unwrap();
            let f = factor(&n);
            let mut prod = Integer::from(1);
            for (p, e) in &f {
                assert!(is_prime(p), "{p}");
                prod *= p.clone().pow(*e);
            }
            assert_eq!(prod, n.clone().abs(), "{c}");
        }
        // Two 12-digit primes: the rho step must split it.
        let (p, q) = (
            Integer::from(999_999_999_989u64),
            Integer::from(100_000_000_003u64),
        );
        assert_eq!(factor(&Integer::from(&p * &q)), vec![(q, 1), (p, 1)]);
        assert_eq!(factor_string(&Integer::from(-1947252)), "2^2 3 263 617");
    }

    #[test]
    fn factor_text_edge_cases() {
        let t = |n: i64| factor_string(&Integer::from(n));
        assert_eq!(t(1), "1");
        assert_eq!(t(-1), "1");
        assert_eq!(t(-2), "2");
        assert_eq!(t(-3024), "2^4 3^3 7");
        assert_eq!(t(229), "229");
        assert_eq!(t(25), "5^2");
        assert_eq!(t(i64::MIN), "2^63");
        // 2^63 − 1 = 7² · 73 · 127 · 337 · 92737 · 649657 (checked with coreutils `factor`).
        assert_eq!(t(i64::MAX), "7^2 73 127 337 92737 649657");
        // 999999999989 is prime (coreutils `factor`).
        assert_eq!(t(-999_999_999_989), "999999999989");
    }
}
