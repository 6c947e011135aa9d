//! Factorisation of machine integers (`n < 2⁶⁴`, every discriminant of a table) without
//! allocation: trial division by the primes below 1024 (a multiplication by the inverse
//! modulo 2⁶⁴ per prime), a deterministic Miller–Rabin test and Pollard–Brent rho, both
//! in Montgomery arithmetic (P. L. Montgomery, Math. Comp. 44 (1985)).
//!
//! Primality: the strong test to the bases 2, 3, 5, 7 is deterministic below
//! ψ₄ = 3 215 031 751 (C. Pomerance, J. L. Selfridge and S. S. Wagstaff, Math. Comp. 35
//! (1980)), and to the first twelve primes 2, …, 37 below
//! ψ₁₂ = 318 665 857 834 031 151 167 461 > 2⁶⁴ (J. Sorenson and J. Webster, Math. Comp. 86
//! (2017)); both bounds as published (recalled; the pseudoprimes themselves are checked in
//! the tests). So every answer here is proved.
//!
//! ```
//! use qorbits::arith::factor64::{factor_u64, is_prime_u64};
//! assert_eq!(&factor_u64(1_947_252)[..], &[(2, 2), (3, 1), (263, 1), (617, 1)]);
//! assert!(!is_prime_u64(3_215_031_751)); // = 151 · 751 · 28351
//! ```

use crate::arith::small::Small;

/// The factorisation of a machine integer: `(prime, exponent)` in increasing order (at
/// most 15 distinct primes divide a number below 2⁶⁴).
pub type Factors64 = Small<(u64, u32), 16>;

/// An odd prime below 1024 with its inverse modulo 2⁶⁴ and `⌊(2⁶⁴ − 1)/p⌋`: `p | n` iff
/// `n·p⁻¹ mod 2⁶⁴ ≤ ⌊(2⁶⁴ − 1)/p⌋` (the multiplication maps the multiples of p onto
/// `0..=⌊(2⁶⁴ − 1)/p⌋`; T. Granlund and P. L. Montgomery, PLDI 1994, §9).
#[derive(Clone, Copy)]
struct TrialPrime {
    p: u64,
    inv: u64,
    max: u64,
}

const TRIAL_BOUND: u64 = 1024;
/// There are 171 odd primes below 1024 (172 primes, counted by the sieve below).
const TRIAL_COUNT: usize = 171;

const fn trial_primes() -> [TrialPrime; TRIAL_COUNT] {
    let mut out = [TrialPrime {
        p: 0,
        inv: 0,
        max: 0,
    }; TRIAL_COUNT];
    let (mut n, mut k) = (3u64, 0usize);
    while n < TRIAL_BOUND {
        let mut d = 3;
        let mut prime = true;
        while d * d <= n {
            if n % d == 0 {
                prime = false;
            }
            d += 2;
        }
        if prime {
            out[k] = TrialPrime {
                p: n,
                inv: inverse_mod_2_64(n),
                max: u64::MAX / n,
            };
            k += 1;
        }
        n += 2;
    }
    assert!(k == TRIAL_COUNT);
    out
}

static TRIAL: [TrialPrime; TRIAL_COUNT] = trial_primes();

/// `n⁻¹ mod 2⁶⁴` for odd n by Newton's iteration `x ← x(2 − nx)`, which doubles the number
/// of correct low bits; `x = n` is right to 3 bits (n² ≡ 1 mod 8), five steps give 96.
const fn inverse_mod_2_64(n: u64) -> u64 {
    let mut x = n;
    let mut i = 0;
    while i < 5 {
        x = x.wrapping_mul(2u64.wrapping_sub(n.wrapping_mul(x)));
        i += 1;
    }
    x
}

/// Arithmetic modulo an odd `n` on Montgomery representatives `aR mod n`, `R = 2⁶⁴`.
struct Montgomery {
    n: u64,
    /// `n⁻¹ mod 2⁶⁴`.
    inv: u64,
    /// `R² mod n`.
    r2: u64,
}

impl Montgomery {
    fn new(n: u64) -> Montgomery {
        debug_assert!(n % 2 == 1 && n > 1);
        let r1 = ((1u128 << 64) % n as u128) as u64;
        let r2 = (r1 as u128 * r1 as u128 % n as u128) as u64;
        Montgomery {
            n,
            inv: inverse_mod_2_64(n),
            r2,
        }
    }

    /// `t·R⁻¹ mod n` for `t < n·R`: with `m = t·n⁻¹ mod R`, `t − m·n` is divisible by R
    /// and `(t − m·n)/R = ⌊t/R⌋ − ⌊m·n/R⌋` lies in `(−n, n)`; no intermediate overflows.
    fn redc(&self, t: u128) -> u64 {
        let m = (t as u64).wrapping_mul(self.inv);
        let mn = m as u128 * self.n as u128;
        let (hi, mh) = ((t >> 64) as u64, (mn >> 64) as u64);
        if hi >= mh {
            hi - mh
        } else {
            hi + (self.n - mh)
        }
    }

    fn mul(&self, a: u64, b: u64) -> u64 {
        self.redc(a as u128 * b as u128)
    }

    fn to_mont(&self, a: u64) -> u64 {
        self.mul(a % self.n, self.r2)
    }

    fn add(&self, a: u64, b: u64) -> u64 {
        let (s, carry) = a.overflowing_add(b);
        if carry || s >= self.n {
            s.wrapping_sub(self.n)
        } else {
            s
        }
    }

    fn pow(&self, a: u64, mut e: u64) -> u64 {
        let (mut b, mut r) = (a, self.to_mont(1));
        while e > 0 {
            if e & 1 == 1 {
                r = self.mul(r, b);
            }
            b = self.mul(b, b);
            e >>= 1;
        }
        r
    }
}

/// Whether `n` is prime (deterministic for every `u64`; see the module doc).
pub fn is_prime_u64(n: u64) -> bool {
    const BASES: [u64; 12] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];
    if n < 2 {
        return false;
    }
    for b in BASES {
        if n % b == 0 {
            return n == b;
        }
    }
    if n < 41 * 41 {
        return true;
    }
    let bases: &[u64] = if n < 3_215_031_751 {
        &BASES[..4]
    } else {
        &BASES
    };
    let m = Montgomery::new(n);
    let s = (n - 1).trailing_zeros();
    let d = (n - 1) >> s;
    let one = m.to_mont(1);
    let minus_one = n - one;
    bases.iter().all(|&b| {
        let mut x = m.pow(m.to_mont(b), d);
        if x == one || x == minus_one {
            return true;
        }
        (1..s).any(|_| {
            x = m.mul(x, x);
            x == minus_one
        })
    })
}

fn gcd(mut a: u64, mut b: u64) -> u64 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

/// A non-trivial factor of the odd composite `n`, not a perfect square (Pollard's rho
/// with Brent's cycle finding and products of 128 differences per gcd).
fn rho(n: u64) -> u64 {
    let m = Montgomery::new(n);
    for c in 1u64.. {
        let c = m.to_mont(c);
        let step = |x: u64| m.add(m.mul(x, x), c);
        let (mut y, mut ys, mut x) = (m.to_mont(2), 0, 0);
        let (mut q, mut g, mut r) = (m.to_mont(1), 1u64, 1u64);
        while g == 1 {
            x = y;
            for _ in 0..r {
                y = step(y);
            }
            let mut k = 0;
            while k < r && g == 1 {
                ys = y;
                for _ in 0..128.min(r - k) {
                    y = step(y);
                    q = m.mul(q, x.abs_diff(y));
                }
                g = gcd(q, n);
                k += 128;
            }
            r *= 2;
        }
        if g == n {
            // The batch overshot: walk it again one difference at a time.
            loop {
                ys = step(ys);
                g = gcd(x.abs_diff(ys), n);
                if g > 1 {
                    break;
                }
            }
        }
        if g != n {
            return g;
        }
    }
    unreachable!("rho finds a factor for some constant")
}

fn isqrt(n: u64) -> u64 {
    let mut r = (n as f64).sqrt() as u64;
    while r.checked_mul(r).is_none_or(|s| s > n) {
        r -= 1;
    }
    while (r + 1).checked_mul(r + 1).is_some_and(|s| s <= n) {
        r += 1;
    }
    r
}

/// The prime factorisation of `n` as `(prime, exponent)` in increasing order (empty for
/// n ≤ 1).
pub fn factor_u64(n: u64) -> Factors64 {
    let mut out = Factors64::new();
    if n <= 1 {
        return out;
    }
    let z = n.trailing_zeros();
    if z > 0 {
        out.push((2, z));
    }
    let mut m = n >> z;
    // Once p² > m, the rest has no prime factor below p and at most one above: a prime.
    let mut proved = false;
    for t in &TRIAL {
        if t.p * t.p > m {
            proved = true;
            break;
        }
        let mut e = 0;
        while m.wrapping_mul(t.inv) <= t.max {
            m = m.wrapping_mul(t.inv); // the exact quotient m / p
            e += 1;
        }
        if e > 0 {
            out.push((t.p, e));
        }
    }
    if m > 1 {
        if proved || m < TRIAL_BOUND * TRIAL_BOUND || is_prime_u64(m) {
            out.push((m, 1));
        } else {
            split(m, &mut out);
            out.sort();
        }
    }
    out
}

/// Adds the prime factors of the odd `m > 1` (no prime factor below 1024) to `out`.
fn split(m: u64, out: &mut Factors64) {
    let mut stack: Small<u64, 64> = Small::new();
    stack.push(m);
    while let Some(x) = stack.pop() {
        if x < TRIAL_BOUND * TRIAL_BOUND || is_prime_u64(x) {
            match out.iter_mut().find(|(q, _)| *q == x) {
                Some(e) => e.1 += 1,
                None => out.push((x, 1)),
            }
            continue;
        }
        let r = isqrt(x);
        let d = if r * r == x { r } else { rho(x) };
        stack.push(x / d);
        stack.push(d);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::ops::Pow;
    use rug::Integer;

    #[test]
    fn trial_table_and_montgomery() {
        assert_eq!(TRIAL[0].p, 3);
        assert_eq!(TRIAL[TRIAL_COUNT - 1].p, 1021);
        let m = Montgomery::new((1 << 63) + 29);
        let (a, b) = (123_456_789_012_345_678u64, 987_654_321_098_765_432u64);
        let want = (a as u128 * b as u128 % m.n as u128) as u64;
        assert_eq!(m.redc(m.mul(m.to_mont(a), m.to_mont(b)) as u128), want);
    }

    #[test]
    fn published_pseudoprimes_are_composite() {
        // Strong pseudoprimes: ψ₄ = 3215031751 = 151·751·28351 (bases 2, 3, 5, 7),
        // ψ₉ = 3825123056546413051 (bases 2, …, 23), both as published.
        assert!(!is_prime_u64(3_215_031_751));
        assert!(!is_prime_u64(3_825_123_056_546_413_051));
        assert_eq!(
            &factor_u64(3_215_031_751)[..],
            &[(151, 1), (751, 1), (28351, 1)]
        );
        // 2⁶¹ − 1 is a Mersenne prime; 2⁶⁴ − 59 the largest prime below 2⁶⁴ (from memory,
        // confirmed by GMP below).
        assert!(is_prime_u64((1 << 61) - 1));
        assert!(is_prime_u64(u64::MAX - 58));
    }

    #[test]
    fn agrees_with_gmp_on_many_numbers() {
        let mut x = 1u64;
        for k in 0..20_000u64 {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            // All sizes, and products of two primes of similar size (the hard case for rho).
            let n = match k % 4 {
                0 => x >> (k % 64),
                1 => {
                    let p = Integer::from(x >> 34).next_prime().to_u64().unwrap();
                    let q = Integer::from((x << 30) >> 34)
                        .next_prime()
                        .to_u64()
                        .unwrap();
                    p.saturating_mul(q)
                }
                2 => (x % 1_000_000).pow(3) / (1 + k % 7),
                _ => x,
            };
            let big = Integer::from(n);
            assert_eq!(
                is_prime_u64(n),
                big.is_probably_prime(30) != rug::integer::IsPrime::No,
                "{n}"
            );
            let f = factor_u64(n);
            let mut prod = Integer::from(1);
            for w in f.windows(2) {
                assert!(w[0].0 < w[1].0, "{n}: {f:?}");
            }
            for &(p, e) in f.iter() {
                assert!(Integer::from(p).is_probably_prime(30) != rug::integer::IsPrime::No);
                prod *= Integer::from(p).pow(e);
            }
            assert_eq!(prod, big.max(Integer::from(1)), "{n}");
        }
    }
}
