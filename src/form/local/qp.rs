//! The search over discs that decides whether z² = f(x, y) has a point over Q_p (the
//! mathematics and the termination argument are in the parent module's doc), written once
//! over [`Padic`]: checked `i128` for table-sized forms (`None` as soon as a value would not
//! fit) and [`rug::Integer`] for any size.
//!
//! A disc `x0 + p^k·Z_p` is carried as the polynomial `h(s) = p^{−2j}·g(x0 + p^k s)` of the
//! local variable s, with k and j beside it: `h_i = t_i·p^{ik−2j}` for the Taylor
//! coefficients `t_i` of g at x0. Dividing by the square `p^{2j}` keeps the numbers small and
//! changes no square class, and every quantity of the search is read off h:
//! `v_p(t_0) = v_p(h_0) + 2j`, `v_p(t_1) = v_p(h_1) − k + 2j`, and
//! `min_{i≥1} v_p(t_i) + ik = min_{i≥1} v_p(h_i) + 2j`. A sub-disc `x0 + p^k r + p^{k+1}·Z_p`
//! is `h(r + p s)`. So the cases taken are exactly those of the search on the Taylor
//! coefficients.

use crate::arith::fp::{self, Field, Poly};
use crate::arith::int::Int;
use rug::Integer;

/// The integers the search runs on.
pub(crate) trait Padic: Int {
    /// `v_p(self)` for `self ≠ 0`.
    fn val(&self, p: &Self) -> u32;
    /// The residue of `self` in the field of p elements.
    fn to_field<F: Field>(&self, f: &F) -> F::E;
    /// An element of the field as an integer in `0..p`.
    fn from_field<F: Field>(f: &F, e: &F::E) -> Option<Self>;
}

impl Padic for i128 {
    fn val(&self, p: &i128) -> u32 {
        if *p == 2 {
            return self.trailing_zeros();
        }
        // p < 2⁶³ (a prime of a machine discriminant); divide in 64 bits once |self| fits.
        let (p, mut u, mut v) = (*p as u128, self.unsigned_abs(), 0);
        while u > u64::MAX as u128 {
            if u % p != 0 {
                return v;
            }
            u /= p;
            v += 1;
        }
        let (p, mut u) = (p as u64, u as u64);
        while u % p == 0 {
            u /= p;
            v += 1;
        }
        v
    }
    fn to_field<F: Field>(&self, f: &F) -> F::E {
        f.reduce_i128(*self)
    }
    fn from_field<F: Field>(f: &F, e: &F::E) -> Option<i128> {
        f.to_u64(e).map(i128::from)
    }
}

impl Padic for Integer {
    fn val(&self, p: &Integer) -> u32 {
        let mut m = self.clone();
        let mut v = 0;
        while m.is_divisible(p) {
            m /= p;
            v += 1;
        }
        v
    }
    fn to_field<F: Field>(&self, f: &F) -> F::E {
        f.reduce(self)
    }
    fn from_field<F: Field>(f: &F, e: &F::E) -> Option<Integer> {
        Some(f.to_integer(e))
    }
}

/// `x / p^m` (exact by the caller's choice of m).
fn div_pow<T: Padic>(x: &T, p: &T, m: u32) -> Option<T> {
    let mut q = x.clone();
    for _ in 0..m {
        q = q.div_exact(p)?;
    }
    Some(q)
}

/// What stays fixed along the search: the prime (also as a machine integer when it is
/// small enough to visit its sub-discs one by one) and its field.
struct Search<'a, T, F> {
    p: T,
    small_p: Option<u64>,
    fld: &'a F,
}

/// A disc: `h(s) = p^{−2j}·g(x0 + p^k s)`, ascending, degree at most 4.
struct Disc<T> {
    h: [T; 5],
    k: u32,
    j: u32,
}

impl<T: Padic, F: Field> Search<'_, T, F> {
    /// Whether the disc has a point, or `None` on overflow.
    fn soluble(&self, mut d: Disc<T>) -> Option<bool> {
        if d.h[0].is_zero() {
            return Some(true); // a root
        }
        let p = &self.p;
        let mut vals = d.h.each_ref().map(|c| (!c.is_zero()).then(|| c.val(p)));
        // Take out the largest even power of p dividing every coefficient.
        let half = vals.iter().flatten().min().expect("h_0 ≠ 0") / 2;
        if half > 0 {
            for (c, v) in d.h.iter_mut().zip(vals.iter_mut()) {
                if let Some(v) = v {
                    *c = div_pow(c, p, 2 * half)?;
                    *v -= 2 * half;
                }
            }
            d.j += half;
        }
        let v0 = vals[0].expect("h_0 ≠ 0");
        // Hensel: v(t_0) > 2·v(t_1), i.e. v(h_0) + 2j > 2·(v(h_1) − k + 2j).
        if let Some(v1) = vals[1] {
            if i64::from(v0) + 2 * i64::from(d.k) > 2 * i64::from(v1) + 2 * i64::from(d.j) {
                return Some(true);
            }
        }
        let w = vals[1..].iter().flatten().min().copied();
        let margin = if self.small_p == Some(2) { 2 } else { 0 };
        if w.is_none_or(|w| w > v0 + margin) {
            return Some(self.is_square(&d.h[0], v0));
        }
        match self.small_p.filter(|&q| q <= 50) {
            Some(q) => {
                for r in 0..q {
                    if self.soluble(self.sub_disc(&d, &T::from_i64(r as i64))?)? {
                        return Some(true);
                    }
                }
                Some(false)
            }
            None => self.large_prime_split(&d, &vals),
        }
    }

    /// Whether the non-zero `x` with `v_p(x) = v` is a square in Q_p.
    fn is_square(&self, x: &T, v: u32) -> bool {
        if v % 2 == 1 {
            return false;
        }
        let u = div_pow(x, &self.p, v).expect("p^v divides x");
        if self.small_p == Some(2) {
            u.rem_euclid_i64(8) == 1
        } else {
            self.fld.legendre(&u.to_field(self.fld)) == 1
        }
    }

    /// The sub-disc at r: `h(r + p s)`, one level down.
    fn sub_disc(&self, d: &Disc<T>, r: &T) -> Option<Disc<T>> {
        let mut h = d.h.clone();
        // Taylor shift by r (Horner), then s ↦ p s.
        if !r.is_zero() {
            for i in 0..4 {
                for m in (i..4).rev() {
                    h[m] = h[m].add(&h[m + 1].mul(r)?)?;
                }
            }
        }
        let mut pk = T::from_i64(1);
        for c in h.iter_mut().skip(1) {
            pk = pk.mul(&self.p)?;
            if !c.is_zero() {
                *c = c.mul(&pk)?;
            }
        }
        Some(Disc {
            h,
            k: d.k + 1,
            j: d.j,
        })
    }

    /// The sub-disc step for odd p > 50 (parent module doc, "Large primes"): with
    /// `p^{2j}·h = p^m·ḡ`, ḡ primitive, the residues of ḡ decide every sub-disc but those at
    /// its roots mod p.
    fn large_prime_split(&self, d: &Disc<T>, vals: &[Option<u32>; 5]) -> Option<bool> {
        let mu = vals.iter().flatten().min().copied().expect("h_0 ≠ 0");
        let mut gbar: Poly<F::E> = Poly::new();
        for c in &d.h {
            gbar.push(div_pow(c, &self.p, mu)?.to_field(self.fld));
        }
        let gbar = fp::normalise(self.fld, gbar);
        match residue_split(self.fld, &gbar, mu % 2 == 0) {
            Ok(decided) => Some(decided),
            Err(roots) => {
                for r in roots.iter() {
                    let r = T::from_field(self.fld, r)?;
                    if self.soluble(self.sub_disc(d, &r)?)? {
                        return Some(true);
                    }
                }
                Some(false)
            }
        }
    }
}

/// The F_p part of the large-prime step: `Ok(found)` when the residues of ḡ decide the
/// disc, else `Err(roots of ḡ mod p)`, the sub-discs that need a deeper look.
fn residue_split<F: Field>(
    fld: &F,
    gbar: &[F::E],
    even: bool,
) -> std::result::Result<bool, Poly<F::E>> {
    if even {
        for r in 0u64..64 {
            if fld.legendre(&fp::eval(fld, gbar, &fld.elem(r))) == 1 {
                return Ok(true);
            }
        }
        if gbar.len() == 1 {
            return Ok(false); // a constant non-square (or the search above found it)
        }
        if !fp::is_constant_times_square(fld, gbar) {
            // Weil: Σ_r χ(ḡ(r)) ≥ −3√p, and fewer than 5 roots, so some ḡ(r) is a non-zero
            // square once p − 3√p − 4 > 0, true for p > 50.
            return Ok(true);
        }
    }
    Err(fp::roots(fld, gbar))
}

/// Whether z² = f(x, y) (coefficients `[a, b, c, d, e]`) has a point over Q_p, searched
/// on `T`; `None` when a value does not fit `T`. `p` is prime and `Disc(f) ≠ 0`.
pub(crate) fn qp_in<T: Padic, F: Field>(fld: &F, f: &[T; 5], p: &T) -> Option<bool> {
    let search = Search {
        p: p.clone(),
        small_p: fld.small_order(),
        fld,
    };
    // x ∈ Z_p, y = 1: g(x) = f(x, 1), ascending.
    let mut g1 = f.clone();
    g1.reverse();
    if search.soluble(Disc { h: g1, k: 0, j: 0 })? {
        return Some(true);
    }
    // x = 1, y = p·t: g(t) = f(1, p t) = Σ c_k p^k t^k.
    let mut g2 = f.clone();
    let mut pk = T::from_i64(1);
    for c in g2.iter_mut().skip(1) {
        pk = pk.mul(p)?;
        *c = c.mul(&pk)?;
    }
    search.soluble(Disc { h: g2, k: 0, j: 0 })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::arith::fp::FpWide;
    use rug::ops::Pow;

    #[test]
    fn i128_refuses_what_does_not_fit() {
        // h(r + p s) for p = 2⁶¹ − 1 has a coefficient p⁴ ≈ 2²⁴⁴: i128 says so, rug computes.
        let p = (1u64 << 61) - 1;
        let fld = &FpWide::new(p);
        let small = Search {
            p: i128::from(p),
            small_p: Some(p),
            fld,
        };
        fn disc<T>(h: [T; 5]) -> Disc<T> {
            Disc { h, k: 0, j: 0 }
        }
        assert!(small.sub_disc(&disc([1i128; 5]), &1).is_none());
        let big = Search {
            p: Integer::from(p),
            small_p: Some(p),
            fld,
        };
        let h = big
            .sub_disc(&disc([1, 1, 1, 1, 1].map(Integer::from)), &Integer::from(1))
            .unwrap()
            .h;
        assert_eq!(h[4], Integer::from(p).pow(4)); // h(1 + p s) = Σ (1 + p s)^i: s⁴ term p⁴
        assert_eq!(h[0], 5);
        // Small values stay on i128: the valuations agree with the big ones.
        for x in [1i128, -48, 3i128.pow(40) * 7, -(1i128 << 100)] {
            for q in [2i128, 3, 7] {
                assert_eq!(
                    x.val(&q),
                    Integer::from(x).val(&Integer::from(q)),
                    "{x} {q}"
                );
            }
        }
    }
}
