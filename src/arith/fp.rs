//! All arithmetic over a prime field F_p: elements, polynomials, their roots, Legendre
//! symbols and the test "a constant times a square".
//!
//! The algorithms are written once over the [`Field`] trait and run on two
//! representations: [`Fp64`] on machine integers for `p < 2³²` (products stay below 2⁶⁴:
//! every prime of a table) and [`FpBig`] on [`rug::Integer`] for larger primes (forms of
//! any size in `qorbits reduce`). Polynomials are `Vec<E>` of ascending coefficients with
//! no trailing zeros; the zero polynomial is empty.
//!
//! Roots are found by Cantor–Zassenhaus: `gcd(g, x^p − x)` collects the distinct linear
//! factors, which `gcd(h, (x + d)^{(p−1)/2} − 1)` splits for some small d (each d separates
//! two given roots with probability about ½). Small fields are searched directly.
//!
//! ```
//! use qorbits::arith::fp::{roots, Field, Fp64};
//! let f = Fp64::new(7);
//! // x² − 2 over F_7: 3² = 9 ≡ 2 and 4² ≡ 2.
//! let g = [5, 0, 1].map(|c| f.elem(c));
//! assert_eq!(roots(&f, &g), vec![3, 4]);
//! assert_eq!(f.legendre(&2), 1);
//! ```

use rug::Integer;
use std::fmt::Debug;

/// A prime field: the operations the polynomial algorithms need.
pub trait Field {
    /// An element, always reduced into `0..p`.
    type E: Clone + PartialEq + Ord + Debug;
    /// The characteristic p.
    fn order(&self) -> Integer;
    /// The residue of an integer.
    fn reduce(&self, x: &Integer) -> Self::E;
    /// The residue of a machine integer.
    fn elem(&self, x: u64) -> Self::E;
    /// `a + b`.
    fn add(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a − b`.
    fn sub(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a · b`.
    fn mul(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a⁻¹` for `a ≠ 0`.
    fn inv(&self, a: &Self::E) -> Self::E;
    /// `a^e`.
    fn pow(&self, a: &Self::E, e: &Integer) -> Self::E;
    /// Whether `a = 0`.
    fn is_zero(&self, a: &Self::E) -> bool;
    /// The element as an integer in `0..p`.
    fn to_integer(&self, a: &Self::E) -> Integer;

    /// Zero.
    fn zero(&self) -> Self::E {
        self.elem(0)
    }
    /// One.
    fn one(&self) -> Self::E {
        self.elem(1)
    }
    /// The Legendre symbol of `a` (p odd): 0, 1 or −1, by Euler's criterion.
    fn legendre(&self, a: &Self::E) -> i8 {
        if self.is_zero(a) {
            return 0;
        }
        let half = (self.order() - 1u32) / 2u32;
        if self.pow(a, &half) == self.one() {
            1
        } else {
            -1
        }
    }
}

/// F_p for a prime `p < 2³²`, on `u64`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Fp64 {
    p: u64,
}

impl Fp64 {
    /// The field of `p` elements; panics unless `2 ≤ p < 2³²` (primality is the caller's).
    pub fn new(p: u64) -> Fp64 {
        assert!((2..1 << 32).contains(&p), "Fp64 needs 2 <= p < 2^32");
        Fp64 { p }
    }

    /// The characteristic as a machine integer.
    pub fn p(&self) -> u64 {
        self.p
    }
}

impl Field for Fp64 {
    type E = u64;
    fn order(&self) -> Integer {
        Integer::from(self.p)
    }
    fn reduce(&self, x: &Integer) -> u64 {
        // mod_u is the non-negative residue of any integer.
        u64::from(x.mod_u(self.p as u32))
    }
    fn elem(&self, x: u64) -> u64 {
        x % self.p
    }
    fn add(&self, a: &u64, b: &u64) -> u64 {
        let s = a + b;
        if s >= self.p {
            s - self.p
        } else {
            s
        }
    }
    fn sub(&self, a: &u64, b: &u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a + self.p - b
        }
    }
    fn mul(&self, a: &u64, b: &u64) -> u64 {
        a * b % self.p
    }
    fn inv(&self, a: &u64) -> u64 {
        self.pow(a, &Integer::from(self.p - 2))
    }
    fn pow(&self, a: &u64, e: &Integer) -> u64 {
        let mut e = e.to_u64().expect("exponents below p fit 64 bits");
        let (mut b, mut r) = (*a % self.p, 1 % self.p);
        while e > 0 {
            if e & 1 == 1 {
                r = r * b % self.p;
            }
            b = b * b % self.p;
            e >>= 1;
        }
        r
    }
    fn is_zero(&self, a: &u64) -> bool {
        *a == 0
    }
    fn to_integer(&self, a: &u64) -> Integer {
        Integer::from(*a)
    }
}

/// F_p for a prime of any size, on [`rug::Integer`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FpBig {
    p: Integer,
}

impl FpBig {
    /// The field of `p` elements (`p ≥ 2` prime; primality is the caller's).
    pub fn new(p: Integer) -> FpBig {
        assert!(p >= 2, "FpBig needs p >= 2");
        FpBig { p }
    }
}

impl Field for FpBig {
    type E = Integer;
    fn order(&self) -> Integer {
        self.p.clone()
    }
    fn reduce(&self, x: &Integer) -> Integer {
        {
            let r = Integer::from(x % &self.p);
            if r < 0 {
                r + &self.p
            } else {
                r
            }
        }
    }
    fn elem(&self, x: u64) -> Integer {
        Integer::from(x) % &self.p
    }
    fn add(&self, a: &Integer, b: &Integer) -> Integer {
        let s = Integer::from(a + b);
        if s >= self.p {
            s - &self.p
        } else {
            s
        }
    }
    fn sub(&self, a: &Integer, b: &Integer) -> Integer {
        let s = Integer::from(a - b);
        if s < 0 {
            s + &self.p
        } else {
            s
        }
    }
    fn mul(&self, a: &Integer, b: &Integer) -> Integer {
        Integer::from(a * b) % &self.p
    }
    fn inv(&self, a: &Integer) -> Integer {
        a.clone().invert(&self.p).expect("a unit mod p")
    }
    fn pow(&self, a: &Integer, e: &Integer) -> Integer {
        a.clone().pow_mod(e, &self.p).expect("p > 0")
    }
    fn is_zero(&self, a: &Integer) -> bool {
        *a == 0
    }
    fn to_integer(&self, a: &Integer) -> Integer {
        a.clone()
    }
}

/// Runs `$body` with `$f` bound to the field of `$p` elements (`$p: &Integer`, prime):
/// [`Fp64`] when `p < 2³²`, else [`FpBig`]. The body is generic code over [`Field`].
macro_rules! with_field {
    ($p:expr, |$f:ident| $body:expr) => {
        match $p.to_u64().filter(|q| *q < 1 << 32) {
            Some(q) => {
                let $f = &$crate::arith::fp::Fp64::new(q);
                $body
            }
            None => {
                let $f = &$crate::arith::fp::FpBig::new($p.clone());
                $body
            }
        }
    };
}
pub(crate) use with_field;

/// Drop trailing zero coefficients.
pub fn normalise<F: Field>(f: &F, mut a: Vec<F::E>) -> Vec<F::E> {
    while a.last().is_some_and(|c| f.is_zero(c)) {
        a.pop();
    }
    a
}

/// The polynomial of the residues of integer coefficients (ascending).
pub fn reduce_poly<F: Field>(f: &F, a: &[Integer]) -> Vec<F::E> {
    normalise(f, a.iter().map(|c| f.reduce(c)).collect())
}

/// `a(x)` by Horner's rule.
pub fn eval<F: Field>(f: &F, a: &[F::E], x: &F::E) -> F::E {
    a.iter()
        .rev()
        .fold(f.zero(), |acc, c| f.add(&f.mul(&acc, x), c))
}

/// `a · b`.
pub fn mul<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Vec<F::E> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![f.zero(); a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] = f.add(&out[i + j], &f.mul(x, y));
        }
    }
    normalise(f, out)
}

/// `a − b`.
pub fn sub<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Vec<F::E> {
    let n = a.len().max(b.len());
    let z = f.zero();
    let v = (0..n)
        .map(|i| f.sub(a.get(i).unwrap_or(&z), b.get(i).unwrap_or(&z)))
        .collect();
    normalise(f, v)
}

/// The formal derivative.
pub fn derivative<F: Field>(f: &F, a: &[F::E]) -> Vec<F::E> {
    let v = a
        .iter()
        .enumerate()
        .skip(1)
        .map(|(i, c)| f.mul(c, &f.elem(i as u64)))
        .collect();
    normalise(f, v)
}

/// Quotient and remainder of `a` by a non-zero `b`.
pub fn divrem<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> (Vec<F::E>, Vec<F::E>) {
    let lb = f.inv(b.last().expect("a non-zero divisor"));
    let mut r = normalise(f, a.to_vec());
    let mut q = vec![f.zero(); r.len().saturating_sub(b.len()) + 1];
    while r.len() >= b.len() && !r.is_empty() {
        let shift = r.len() - b.len();
        let c = f.mul(r.last().expect("non-empty"), &lb);
        for (i, x) in b.iter().enumerate() {
            r[i + shift] = f.sub(&r[i + shift], &f.mul(&c, x));
        }
        q[shift] = c;
        r = normalise(f, r);
    }
    (normalise(f, q), r)
}

/// The monic greatest common divisor (empty when both are zero).
pub fn gcd<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Vec<F::E> {
    let (mut x, mut y) = (normalise(f, a.to_vec()), normalise(f, b.to_vec()));
    while !y.is_empty() {
        let r = divrem(f, &x, &y).1;
        x = y;
        y = r;
    }
    if let Some(l) = x.last() {
        let li = f.inv(l);
        x = x.iter().map(|c| f.mul(c, &li)).collect();
    }
    x
}

/// `base^e mod m`.
pub fn powmod<F: Field>(f: &F, base: &[F::E], e: &Integer, m: &[F::E]) -> Vec<F::E> {
    let mut r = vec![f.one()];
    let mut b = divrem(f, base, m).1;
    for i in 0..e.significant_bits() {
        if e.get_bit(i) {
            r = divrem(f, &mul(f, &r, &b), m).1;
        }
        b = divrem(f, &mul(f, &b, &b), m).1;
    }
    normalise(f, r)
}

/// Distinct roots in F_p of `g` (reduced, ascending), sorted; none for constants and the
/// zero polynomial.
pub fn roots<F: Field>(f: &F, g: &[F::E]) -> Vec<F::E> {
    let g = normalise(f, g.to_vec());
    if g.len() <= 1 {
        return Vec::new();
    }
    let p = f.order();
    if p < 64 {
        let n = p.to_u64().expect("small");
        return (0..n)
            .map(|r| f.elem(r))
            .filter(|r| f.is_zero(&eval(f, &g, r)))
            .collect();
    }
    let x = vec![f.zero(), f.one()];
    let lin = gcd(f, &g, &sub(f, &powmod(f, &x, &p, &g), &x));
    let half = (p.clone() - 1u32) / 2u32;
    let mut out = Vec::new();
    let mut stack = vec![lin];
    while let Some(h) = stack.pop() {
        match h.len() {
            0 | 1 => {}
            2 => out.push(f.sub(&f.zero(), &f.mul(&h[0], &f.inv(&h[1])))),
            _ => {
                let mut d = 0u64;
                loop {
                    let t = vec![f.elem(d), f.one()];
                    let s = sub(f, &powmod(f, &t, &half, &h), &[f.one()]);
                    let fac = gcd(f, &h, &s);
                    if fac.len() > 1 && fac.len() < h.len() {
                        let q = divrem(f, &h, &fac).0;
                        stack.push(fac);
                        stack.push(q);
                        break;
                    }
                    d += 1;
                    assert!(p > d, "distinct linear factors always split");
                }
            }
        }
    }
    out.sort();
    out
}

/// Whether `g` (degree ≥ 1, p odd) is a constant times a square: every root over the
/// algebraic closure has even multiplicity, i.e. `gcd(g, g')` has degree `deg g / 2` and
/// `g / gcd²` is a constant.
pub fn is_constant_times_square<F: Field>(f: &F, g: &[F::E]) -> bool {
    if g.len() % 2 == 0 {
        return false; // odd degree
    }
    let d = gcd(f, g, &derivative(f, g));
    if d.len() != g.len() / 2 + 1 {
        return false;
    }
    let (q, r) = divrem(f, g, &mul(f, &d, &d));
    r.is_empty() && q.len() == 1
}

/// Every root in F_p of `g` (reduced, ascending, degree n ≥ 1) by walking x = 0, 1, …, p − 1
/// with the forward differences of g: n additions per step, no multiplication. For small
/// primes (p below a few thousand), where it beats [`roots`].
pub fn roots_by_walking(f: &Fp64, g: &[u64], mut found: impl FnMut(u64)) {
    let n = g.len() - 1;
    // d[k] = Δᵏg(0), from g(0), …, g(n).
    let mut d: Vec<u64> = (0..=n as u64).map(|x| eval(f, g, &x)).collect();
    for k in 1..=n {
        for m in (k..=n).rev() {
            d[m] = f.sub(&d[m], &d[m - 1]);
        }
    }
    for x in 0..f.p() {
        if d[0] == 0 {
            found(x);
        }
        for k in 0..n {
            d[k] = f.add(&d[k], &d[k + 1]);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn expand<F: Field>(f: &F, roots: &[u64]) -> Vec<F::E> {
        let mut g = vec![f.one()];
        for r in roots {
            g = mul(f, &g, &[f.sub(&f.zero(), &f.elem(*r)), f.one()]);
        }
        g
    }

    #[test]
    fn roots_of_products_of_linear_factors_on_both_representations() {
        let p = 1_000_003u64;
        let small = Fp64::new(p);
        let big = FpBig::new(Integer::from(p));
        // (x − 5)(x − 77)(x − 999 999)(x² + 1); −1 is a non-square mod p ≡ 3 (mod 4).
        let g = mul(&small, &expand(&small, &[5, 77, 999_999]), &[1, 0, 1]);
        assert_eq!(roots(&small, &g), vec![5, 77, 999_999]);
        let gb = mul(
            &big,
            &expand(&big, &[5, 77, 999_999]),
            &[1, 0, 1].map(Integer::from),
        );
        assert_eq!(
            roots(&big, &gb),
            [5, 77, 999_999].map(Integer::from).to_vec()
        );
        let f7 = Fp64::new(7);
        assert_eq!(roots(&f7, &[3, 0, 1]), vec![2, 5]); // x² + 3: −3 ≡ 4 = 2² mod 7
    }

    #[test]
    fn walking_finds_the_same_roots() {
        let f = Fp64::new(1009);
        let g = expand(&f, &[0, 3, 1008]);
        let mut walked = Vec::new();
        roots_by_walking(&f, &g, |r| walked.push(r));
        assert_eq!(walked, roots(&f, &g));
    }

    #[test]
    fn squares_and_symbols() {
        let f = Fp64::new(11);
        // (x + 1)²·3 is a constant times a square; (x + 1)(x + 2) is not.
        let sq = mul(&f, &mul(&f, &[1, 1], &[1, 1]), &[3]);
        assert!(is_constant_times_square(&f, &sq));
        assert!(!is_constant_times_square(&f, &mul(&f, &[1, 1], &[2, 1])));
        // Squares mod 11 are 1, 3, 4, 5, 9 (Euler's criterion, checked by hand).
        let symbols: Vec<i8> = (0..11).map(|a| f.legendre(&a)).collect();
        assert_eq!(symbols, vec![0, 1, -1, 1, 1, 1, -1, -1, -1, 1, -1]);
        let big = FpBig::new(Integer::from(11));
        assert_eq!(big.legendre(&Integer::from(5)), 1);
    }
}
