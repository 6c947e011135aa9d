//! All arithmetic over a prime field F_p: elements, polynomials ([`poly`]), their roots,
//! Legendre symbols and the test "a constant times a square".
//!
//! The algorithms are written once over the [`Field`] trait and run on three
//! representations: [`Fp64`] on machine integers for `p < 2³²` (products stay below 2⁶⁴:
//! every prime of a table), [`FpWide`] on machine integers with 128-bit products for
//! `2³² ≤ p < 2⁶³` (the large primes of a discriminant that fits `i64`), and [`FpBig`] on
//! [`rug::Integer`] for primes of any size (forms of any size in `qorbits reduce`).
//! Polynomials are fixed-capacity arrays ([`poly::Poly`]) of ascending coefficients with no
//! trailing zeros; the zero polynomial is empty. On the two machine fields nothing
//! allocates.
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
//! assert_eq!(roots(&f, &g), [3, 4]);
//! assert_eq!(f.legendre(&2), 1);
//! ```

pub mod poly;

pub use poly::{
    derivative, divrem, eval, gcd, is_constant_times_square, mul, normalise, powmod, reduce_poly,
    roots, roots_by_walking, squarefree_parts, sub, Poly,
};

use rug::Integer;
use std::fmt::Debug;

/// An exponent: a machine integer or a big one, read bit by bit.
pub trait Exponent {
    /// Number of significant bits.
    fn bits(&self) -> u32;
    /// Bit `i` (0 = least significant).
    fn bit(&self, i: u32) -> bool;
}

impl Exponent for u64 {
    fn bits(&self) -> u32 {
        64 - self.leading_zeros()
    }
    fn bit(&self, i: u32) -> bool {
        (self >> i) & 1 == 1
    }
}

impl Exponent for Integer {
    fn bits(&self) -> u32 {
        self.significant_bits()
    }
    fn bit(&self, i: u32) -> bool {
        self.get_bit(i)
    }
}

/// A prime field: the operations the polynomial algorithms need.
pub trait Field {
    /// An element, always reduced into `0..p`.
    type E: Clone + PartialEq + Ord + Debug + Default;
    /// The exponents the field raises to (p, (p − 1)/2).
    type N: Exponent;
    /// The characteristic p.
    fn order(&self) -> Integer;
    /// The characteristic, if it fits 64 bits.
    fn small_order(&self) -> Option<u64>;
    /// p as an exponent.
    fn order_exp(&self) -> Self::N;
    /// (p − 1)/2 as an exponent.
    fn half_exp(&self) -> Self::N;
    /// The residue of an integer.
    fn reduce(&self, x: &Integer) -> Self::E;
    /// The residue of a machine integer.
    fn elem(&self, x: u64) -> Self::E;
    /// The residue of a signed machine integer.
    fn reduce_i128(&self, x: i128) -> Self::E {
        self.reduce(&Integer::from(x))
    }
    /// `a + b`.
    fn add(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a − b`.
    fn sub(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a · b`.
    fn mul(&self, a: &Self::E, b: &Self::E) -> Self::E;
    /// `a⁻¹` for `a ≠ 0`.
    fn inv(&self, a: &Self::E) -> Self::E;
    /// Whether `a = 0`.
    fn is_zero(&self, a: &Self::E) -> bool;
    /// The element as an integer in `0..p`.
    fn to_integer(&self, a: &Self::E) -> Integer;
    /// The element as a machine integer, if it fits.
    fn to_u64(&self, a: &Self::E) -> Option<u64> {
        self.to_integer(a).to_u64()
    }

    /// Zero.
    fn zero(&self) -> Self::E {
        self.elem(0)
    }
    /// One.
    fn one(&self) -> Self::E {
        self.elem(1)
    }
    /// `a^e` by squaring.
    fn pow(&self, a: &Self::E, e: &impl Exponent) -> Self::E {
        let mut r = self.one();
        for i in (0..e.bits()).rev() {
            r = self.mul(&r, &r);
            if e.bit(i) {
                r = self.mul(&r, a);
            }
        }
        r
    }
    /// The Legendre symbol of `a` (p odd): 0, 1 or −1, by Euler's criterion.
    fn legendre(&self, a: &Self::E) -> i8 {
        if self.is_zero(a) {
            return 0;
        }
        if self.pow(a, &self.half_exp()) == self.one() {
            1
        } else {
            -1
        }
    }
}

/// The Jacobi symbol `(a / n)` for odd `n`, by the binary algorithm with quadratic
/// reciprocity (H. Cohen, *A Course in Computational Algebraic Number Theory*, Algorithm
/// 1.4.10); for a prime n it is the Legendre symbol.
fn jacobi(a: u64, n: u64) -> i8 {
    debug_assert!(n % 2 == 1);
    let (mut a, mut n, mut t) = (a % n, n, 1i8);
    while a != 0 {
        let z = a.trailing_zeros();
        a >>= z;
        if z % 2 == 1 && (n % 8 == 3 || n % 8 == 5) {
            t = -t;
        }
        if a % 4 == 3 && n % 4 == 3 {
            t = -t;
        }
        (a, n) = (n % a, a);
    }
    if n == 1 {
        t
    } else {
        0
    }
}

/// `a⁻¹ mod p` for `0 < a < p < 2⁶³` by the extended Euclidean algorithm (the cofactors
/// stay below p in absolute value, so they fit `i64`; products are taken in `i128`).
fn inv_mod(a: u64, p: u64) -> u64 {
    let (mut r0, mut r1) = (p, a);
    let (mut s0, mut s1) = (0i64, 1i64);
    while r1 != 0 {
        let q = r0 / r1;
        (r0, r1) = (r1, r0 - q * r1);
        let s = s0 as i128 - q as i128 * s1 as i128;
        (s0, s1) = (s1, s as i64);
    }
    debug_assert_eq!(r0, 1, "a unit mod p");
    s0.rem_euclid(p as i64) as u64
}

/// The field operations shared by the two machine representations; only the product
/// differs.
macro_rules! machine_field {
    ($t:ident, $mul:expr) => {
        impl Field for $t {
            type E = u64;
            type N = u64;
            fn order(&self) -> Integer {
                Integer::from(self.p)
            }
            fn small_order(&self) -> Option<u64> {
                Some(self.p)
            }
            fn order_exp(&self) -> u64 {
                self.p
            }
            fn half_exp(&self) -> u64 {
                (self.p - 1) / 2
            }
            fn reduce(&self, x: &Integer) -> u64 {
                // mod_u is the non-negative residue of any integer (p < 2³²), else exact.
                match u32::try_from(self.p) {
                    Ok(q) => u64::from(x.mod_u(q)),
                    Err(_) => {
                        let r = Integer::from(x % self.p).to_i64().expect("|r| < p < 2⁶³");
                        r.rem_euclid(self.p as i64) as u64
                    }
                }
            }
            fn reduce_i128(&self, x: i128) -> u64 {
                x.rem_euclid(self.p as i128) as u64
            }
            fn elem(&self, x: u64) -> u64 {
                x % self.p
            }
            fn add(&self, a: &u64, b: &u64) -> u64 {
                // a, b < p < 2⁶³: the sum does not overflow.
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
                    a + (self.p - b)
                }
            }
            fn mul(&self, a: &u64, b: &u64) -> u64 {
                let m: fn(u64, u64, u64) -> u64 = $mul;
                m(*a, *b, self.p)
            }
            fn inv(&self, a: &u64) -> u64 {
                inv_mod(*a, self.p)
            }
            fn is_zero(&self, a: &u64) -> bool {
                *a == 0
            }
            fn to_integer(&self, a: &u64) -> Integer {
                Integer::from(*a)
            }
            fn to_u64(&self, a: &u64) -> Option<u64> {
                Some(*a)
            }
            fn legendre(&self, a: &u64) -> i8 {
                if self.p == 2 {
                    return (*a != 0) as i8; // Euler's criterion with exponent 0
                }
                jacobi(*a, self.p)
            }
        }
    };
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

// a, b < p < 2³²: the product is below 2⁶⁴.
machine_field!(Fp64, |a, b, p| a * b % p);

/// F_p for a prime `2³² ≤ p < 2⁶³`, on `u64` with 128-bit products.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct FpWide {
    p: u64,
}

impl FpWide {
    /// The field of `p` elements; panics unless `2³² ≤ p < 2⁶³` (primality is the caller's).
    pub fn new(p: u64) -> FpWide {
        assert!(
            (1 << 32..1 << 63).contains(&p),
            "FpWide needs 2^32 <= p < 2^63"
        );
        FpWide { p }
    }
}

machine_field!(FpWide, |a, b, p| (a as u128 * b as u128 % p as u128) as u64);

/// F_p for a prime of any size, on [`rug::Integer`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FpBig {
    p: Integer,
    half: Integer,
}

impl FpBig {
    /// The field of `p` elements (`p ≥ 2` prime; primality is the caller's).
    pub fn new(p: Integer) -> FpBig {
        assert!(p >= 2, "FpBig needs p >= 2");
        let half = Integer::from(&p - 1u32) / 2u32;
        FpBig { p, half }
    }
}

impl Field for FpBig {
    type E = Integer;
    type N = Integer;
    fn order(&self) -> Integer {
        self.p.clone()
    }
    fn small_order(&self) -> Option<u64> {
        self.p.to_u64()
    }
    fn order_exp(&self) -> Integer {
        self.p.clone()
    }
    fn half_exp(&self) -> Integer {
        self.half.clone()
    }
    fn reduce(&self, x: &Integer) -> Integer {
        let r = Integer::from(x % &self.p);
        if r < 0 {
            r + &self.p
        } else {
            r
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
    fn pow(&self, a: &Integer, e: &impl Exponent) -> Integer {
        let mut r = Integer::from(1);
        for i in (0..e.bits()).rev() {
            r.square_mut();
            if e.bit(i) {
                r *= a;
            }
            r %= &self.p;
        }
        r % &self.p
    }
    fn is_zero(&self, a: &Integer) -> bool {
        *a == 0
    }
    fn to_integer(&self, a: &Integer) -> Integer {
        a.clone()
    }
    fn legendre(&self, a: &Integer) -> i8 {
        if self.p == 2 {
            return (*a != 0) as i8; // Euler's criterion with exponent 0
        }
        a.legendre(&self.p) as i8
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

/// Runs `$body` with `$f` bound to the field of `$p` elements (`$p: u64`, prime, below
/// 2⁶³) on machine integers: [`Fp64`] when `p < 2³²`, else [`FpWide`].
macro_rules! with_machine_field {
    ($p:expr, |$f:ident| $body:expr) => {
        match $p {
            q if q < 1 << 32 => {
                let $f = &$crate::arith::fp::Fp64::new(q);
                $body
            }
            q => {
                let $f = &$crate::arith::fp::FpWide::new(q);
                $body
            }
        }
    };
}
pub(crate) use with_machine_field;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn squares_and_symbols() {
        let f = Fp64::new(11);
        // Squares mod 11 are 1, 3, 4, 5, 9 (Euler's criterion, checked by hand).
        let symbols: Vec<i8> = (0..11).map(|a| f.legendre(&a)).collect();
        assert_eq!(symbols, vec![0, 1, -1, 1, 1, 1, -1, -1, -1, 1, -1]);
        let big = FpBig::new(Integer::from(11));
        assert_eq!(big.legendre(&Integer::from(5)), 1);
    }

    #[test]
    fn the_three_fields_agree() {
        // Euler's criterion and Fermat inverses on FpBig against the Jacobi symbol and the
        // extended Euclidean algorithm on the machine fields, for primes on both sides of
        // 2³² (4294967311 is the first prime after 2³², 2⁶¹ − 1 a Mersenne prime; from memory,
        // re-checked by the Miller–Rabin test of `primes`).
        for p in [
            3u64,
            5,
            1_000_003,
            4_294_967_291,
            4_294_967_311,
            (1 << 61) - 1,
        ] {
            assert!(crate::arith::primes::is_prime(&Integer::from(p)));
            let big = FpBig::new(Integer::from(p));
            let mut x = 0x9E37_79B9_7F4A_7C15u64;
            for _ in 0..200 {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                let (a, b) = (x % p, (x >> 7) % p);
                let (ab, bb) = (Integer::from(a), Integer::from(b));
                let check = |m: u64, l: i8, i: Option<u64>| {
                    assert_eq!(Integer::from(m), big.mul(&ab, &bb), "{a}·{b} mod {p}");
                    assert_eq!(l, big.legendre(&ab), "({a}/{p})");
                    if let Some(i) = i {
                        assert_eq!(Integer::from(i), big.inv(&ab));
                    }
                };
                let inv = |f: &dyn Fn(u64) -> u64| (a != 0).then(|| f(a));
                if p < 1 << 32 {
                    let f = Fp64::new(p);
                    check(f.mul(&a, &b), f.legendre(&a), inv(&|a| f.inv(&a)));
                    assert_eq!(f.reduce_i128(-(a as i128)), f.sub(&0, &a));
                } else {
                    let f = FpWide::new(p);
                    check(f.mul(&a, &b), f.legendre(&a), inv(&|a| f.inv(&a)));
                    assert_eq!(f.reduce(&Integer::from(-(a as i128))), f.sub(&0, &a));
                }
            }
        }
    }
}
