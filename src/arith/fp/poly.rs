//! Polynomials over F_p on fixed-capacity arrays ([`Poly`], degree at most 8): products,
//! division, gcd, powers modulo a polynomial, roots (Cantor–Zassenhaus, or a direct search
//! in small fields), the squarefree decomposition and the test "a constant times a square".
//! On the machine fields nothing here allocates.
//!
//! ```
//! use qorbits::arith::fp::{gcd, mul, Fp64};
//! let f = Fp64::new(5);
//! // gcd((x + 1)(x + 2), (x + 1)(x + 3)) = x + 1 over F_5.
//! let (a, b) = (mul(&f, &[1, 1], &[2, 1]), mul(&f, &[1, 1], &[3, 1]));
//! assert_eq!(gcd(&f, &a, &b), [1, 1]);
//! ```

use super::{Exponent, Field, Fp64};
use crate::arith::small::Small;
use rug::Integer;

/// Coefficients of a polynomial over F_p, ascending, without trailing zeros (capacity 9:
/// degree at most 8). Also the type of small lists of elements (roots).
pub type Poly<E> = Small<E, 9>;

/// Drop trailing zero coefficients.
pub fn normalise<F: Field>(f: &F, mut a: Poly<F::E>) -> Poly<F::E> {
    while a.last().is_some_and(|c| f.is_zero(c)) {
        a.pop();
    }
    a
}

/// The polynomial of the residues of integer coefficients (ascending).
pub fn reduce_poly<F: Field>(f: &F, a: &[Integer]) -> Poly<F::E> {
    normalise(f, a.iter().map(|c| f.reduce(c)).collect())
}

/// `a(x)` by Horner's rule.
pub fn eval<F: Field>(f: &F, a: &[F::E], x: &F::E) -> F::E {
    a.iter()
        .rev()
        .fold(f.zero(), |acc, c| f.add(&f.mul(&acc, x), c))
}

/// `a · b`.
pub fn mul<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Poly<F::E> {
    if a.is_empty() || b.is_empty() {
        return Poly::new();
    }
    let mut out: Poly<F::E> = (0..a.len() + b.len() - 1).map(|_| f.zero()).collect();
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] = f.add(&out[i + j], &f.mul(x, y));
        }
    }
    normalise(f, out)
}

/// `a − b`.
pub fn sub<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Poly<F::E> {
    let z = f.zero();
    let v = (0..a.len().max(b.len()))
        .map(|i| f.sub(a.get(i).unwrap_or(&z), b.get(i).unwrap_or(&z)))
        .collect();
    normalise(f, v)
}

/// The formal derivative.
pub fn derivative<F: Field>(f: &F, a: &[F::E]) -> Poly<F::E> {
    let v = a
        .iter()
        .enumerate()
        .skip(1)
        .map(|(i, c)| f.mul(c, &f.elem(i as u64)))
        .collect();
    normalise(f, v)
}

/// Quotient and remainder of `a` by a non-zero `b`.
pub fn divrem<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> (Poly<F::E>, Poly<F::E>) {
    let lb = f.inv(b.last().expect("a non-zero divisor"));
    let mut r = normalise(f, Poly::from_slice(a));
    let mut q: Poly<F::E> = (0..r.len().saturating_sub(b.len()) + 1)
        .map(|_| f.zero())
        .collect();
    while r.len() >= b.len() && !r.is_empty() {
        let shift = r.len() - b.len();
        let c = f.mul(r.last().expect("non-empty"), &lb);
        for (i, x) in b.iter().enumerate() {
            r[i + shift] = f.sub(&r[i + shift], &f.mul(&c, x));
        }
        q[shift] = c;
        r.pop(); // the leading coefficient is now zero
        r = normalise(f, r);
    }
    (normalise(f, q), r)
}

/// The monic greatest common divisor (empty when both are zero).
pub fn gcd<F: Field>(f: &F, a: &[F::E], b: &[F::E]) -> Poly<F::E> {
    let (mut x, mut y) = (
        normalise(f, Poly::from_slice(a)),
        normalise(f, Poly::from_slice(b)),
    );
    while !y.is_empty() {
        let r = divrem(f, &x, &y).1;
        x = y;
        y = r;
    }
    if let Some(l) = x.last() {
        let li = f.inv(l);
        for c in x.iter_mut() {
            *c = f.mul(c, &li);
        }
    }
    x
}

/// `base^e mod m`.
pub fn powmod<F: Field>(f: &F, base: &[F::E], e: &impl Exponent, m: &[F::E]) -> Poly<F::E> {
    let mut r: Poly<F::E> = Poly::from_slice(&[f.one()]);
    let b = divrem(f, base, m).1;
    for i in (0..e.bits()).rev() {
        r = divrem(f, &mul(f, &r, &r), m).1;
        if e.bit(i) {
            r = divrem(f, &mul(f, &r, &b), m).1;
        }
    }
    divrem(f, &r, m).1
}

/// Distinct roots in F_p of `g` (reduced, ascending), sorted; none for constants and the
/// zero polynomial.
pub fn roots<F: Field>(f: &F, g: &[F::E]) -> Poly<F::E> {
    let g = normalise(f, Poly::from_slice(g));
    let mut out = Poly::new();
    if g.len() <= 1 {
        return out;
    }
    if let Some(n) = f.small_order().filter(|&n| n < 64) {
        return (0..n)
            .map(|r| f.elem(r))
            .filter(|r| f.is_zero(&eval(f, &g, r)))
            .collect();
    }
    let x = [f.zero(), f.one()];
    let lin = gcd(f, &g, &sub(f, &powmod(f, &x, &f.order_exp(), &g), &x));
    let half = f.half_exp();
    let mut stack: Small<Poly<F::E>, 9> = Small::new();
    stack.push(lin);
    while let Some(h) = stack.pop() {
        match h.len() {
            0 | 1 => {}
            2 => out.push(f.sub(&f.zero(), &f.mul(&h[0], &f.inv(&h[1])))),
            _ => {
                let mut d = 0u64;
                loop {
                    let t = [f.elem(d), f.one()];
                    let s = sub(f, &powmod(f, &t, &half, &h), &[f.one()]);
                    let fac = gcd(f, &h, &s);
                    if fac.len() > 1 && fac.len() < h.len() {
                        let q = divrem(f, &h, &fac).0;
                        stack.push(fac);
                        stack.push(q);
                        break;
                    }
                    d += 1;
                    assert!(f.small_order().is_none_or(|p| p > d), "roots always split");
                }
            }
        }
    }
    out.sort();
    out
}

/// The squarefree decomposition of a non-zero `g` of degree n < p (Yun's algorithm:
/// D. Y. Y. Yun, Proc. SYMSAC 1976): monic squarefree, pairwise coprime `s_1, s_2, …` with
/// `g = lc(g)·Π s_i^i`; entry `i − 1` is `s_i` (the list ends with the last non-constant
/// one). Needs p > n so that the derivative sees every multiplicity.
pub fn squarefree_parts<F: Field>(f: &F, g: &[F::E]) -> Small<Poly<F::E>, 4> {
    let gp = derivative(f, g);
    let b = gcd(f, g, &gp);
    let mut c = divrem(f, g, &b).0;
    let mut d = sub(f, &divrem(f, &gp, &b).0, &derivative(f, &c));
    let mut out: Small<Poly<F::E>, 4> = Small::new();
    while c.len() > 1 {
        let a = gcd(f, &c, &d);
        c = divrem(f, &c, &a).0;
        d = sub(f, &divrem(f, &d, &a).0, &derivative(f, &c));
        out.push(a);
    }
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
    let mut d: Poly<u64> = (0..=n as u64).map(|x| eval(f, g, &x)).collect();
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
    use super::super::FpBig;
    use super::*;

    fn expand<F: Field>(f: &F, roots: &[u64]) -> Poly<F::E> {
        let mut g = Poly::from_slice(&[f.one()]);
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
        assert_eq!(roots(&small, &g), [5, 77, 999_999]);
        let gb = mul(
            &big,
            &expand(&big, &[5, 77, 999_999]),
            &[1, 0, 1].map(Integer::from),
        );
        assert_eq!(roots(&big, &gb), [5, 77, 999_999].map(Integer::from));
        let f7 = Fp64::new(7);
        assert_eq!(roots(&f7, &[3, 0, 1]), [2, 5]); // x² + 3: −3 ≡ 4 = 2² mod 7
    }

    #[test]
    fn walking_finds_the_same_roots() {
        let f = Fp64::new(1009);
        let g = expand(&f, &[0, 3, 1008]);
        let mut walked = Vec::new();
        roots_by_walking(&f, &g, |r| walked.push(r));
        assert_eq!(roots(&f, &g), walked[..]);
    }

    #[test]
    fn squarefree_parts_by_hand() {
        let f = Fp64::new(101);
        // 3·(x − 1)·(x − 2)³ = 3·s₁·s₃ with s₂ = 1.
        let g = mul(&f, &expand(&f, &[1, 2, 2, 2]), &[3]);
        let parts = squarefree_parts(&f, &g);
        assert_eq!(parts.len(), 3);
        assert_eq!(parts[0], expand(&f, &[1]));
        assert_eq!(parts[1], [1]);
        assert_eq!(parts[2], expand(&f, &[2]));
        // (x² + 1)² over F_103 (−1 a non-square since 103 ≡ 3 mod 4): s₁ = 1, s₂ = x² + 1.
        let f = Fp64::new(103);
        let parts = squarefree_parts(&f, &mul(&f, &[1, 0, 1], &[1, 0, 1]));
        assert_eq!((parts[0].len(), &parts[1][..]), (1, &[1, 0, 1][..]));
    }

    #[test]
    fn constant_times_square() {
        let f = Fp64::new(11);
        // (x + 1)²·3 is a constant times a square; (x + 1)(x + 2) is not.
        let sq = mul(&f, &mul(&f, &[1, 1], &[1, 1]), &[3]);
        assert!(is_constant_times_square(&f, &sq));
        assert!(!is_constant_times_square(&f, &mul(&f, &[1, 1], &[2, 1])));
    }
}
