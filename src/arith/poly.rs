//! Exact integer roots of univariate integer polynomials, by monotone bisection.
//!
//! Method (derived here): a polynomial is monotone between consecutive real roots of its
//! derivative. Recursively we find, for every sign change of `p'`, an integer `k` with
//! `k ≤ ρ ≤ k + 1` for the root `ρ`; these split the integers of the Cauchy interval
//! `[−B, B]`, `B = 1 + max|cᵢ|` (all real roots of a polynomial with integral coefficients
//! lie strictly inside it), into ranges on which `p` is monotone, and each range holds at most
//! one root, found by exact bisection. No floating point; `O(deg² · log B)` evaluations.
//!
//! ```
//! use qorbits::arith::poly::integer_roots;
//! // (x − 3)(x + 5)(2x − 1) = 2x³ + 3x² − 32x + 15
//! assert_eq!(integer_roots(&[2i128, 3, -32, 15]), Some(vec![-5, 3]));
//! ```

use crate::arith::int::Int;

/// `p(x)` for `p` given by its coefficients in descending order.
pub fn eval<T: Int>(p: &[T], x: &T) -> Option<T> {
    let mut acc = T::from_i64(0);
    for c in p {
        acc = acc.mul(x)?.add(c)?;
    }
    Some(acc)
}

fn derivative<T: Int>(p: &[T]) -> Option<Vec<T>> {
    let n = p.len() - 1;
    p[..n]
        .iter()
        .enumerate()
        .map(|(i, c)| c.mul_i64((n - i) as i64))
        .collect()
}

fn strip<T: Int>(p: &[T]) -> &[T] {
    let first = p.iter().position(|c| !c.is_zero()).unwrap_or(p.len());
    &p[first..]
}

/// Distinct integer roots of `p` (descending coefficients), sorted; `None` on overflow.
/// The zero polynomial and constants have no roots by convention.
pub fn integer_roots<T: Int>(p: &[T]) -> Option<Vec<T>> {
    let p = strip(p);
    if p.len() < 2 {
        return Some(Vec::new());
    }
    let mut bound = T::from_i64(0);
    for c in p {
        let a = c.abs()?;
        if a > bound {
            bound = a;
        }
    }
    let bound = bound.add(&T::from_i64(1))?;
    let bound = match fujiwara_bound(p) {
        Some(f) if f < bound => f,
        _ => bound,
    };
    let lo = bound.neg()?;
    let mut roots = Vec::new();
    for (l, h) in monotone_ranges(p, &lo, &bound)? {
        if let Some(r) = root_in_monotone_range(p, &l, &h)? {
            if roots.last() != Some(&r) {
                roots.push(r);
            }
        }
    }
    Some(roots)
}

/// An integer `B` with every complex root of `p` strictly inside `|z| < B`, from Fujiwara's
/// bound `|z| ≤ 2·max_k |c_k/c_0|^{1/k}` (M. Fujiwara, Tôhoku Math. J. 10 (1916)), computed
/// in f64 and widened far beyond its rounding error (relative 10⁻⁹, plus 2); `None` when f64
/// cannot hold the coefficients. Much smaller than the Cauchy bound `1 + max|c_k|` when the
/// coefficients are large, so the bisections below take fewer steps; the roots of the
/// derivatives lie in the convex hull of those of `p` (Gauss–Lucas), so inside it too.
fn fujiwara_bound<T: Int>(p: &[T]) -> Option<T> {
    let lead = p[0].to_f64().abs();
    let mut m: f64 = 0.0;
    for (k, c) in p.iter().enumerate().skip(1) {
        if !c.is_zero() {
            m = m.max((c.to_f64().abs() / lead).powf(1.0 / k as f64));
        }
    }
    let b = (2.0 * m * (1.0 + 1e-9)).ceil() + 2.0;
    (lead.is_finite() && lead > 0.0 && b.is_finite() && b < 1e15).then(|| T::from_i64(b as i64))
}

/// Integer ranges `[l, h]` covering `[lo, hi]` on each of which `p` is monotone.
///
/// Cuts are placed inside each monotone range of `p'` where `p'` changes sign, and at every
/// boundary between two such ranges (a root of `p'` may lie between the two integers there).
fn monotone_ranges<T: Int>(p: &[T], lo: &T, hi: &T) -> Option<Vec<(T, T)>> {
    let one = T::from_i64(1);
    let mut cuts = Vec::new();
    if p.len() > 2 {
        let dp = derivative(p)?;
        let sub = monotone_ranges(&dp, lo, hi)?;
        let last = sub.len().saturating_sub(1);
        for (n, (l, h)) in sub.into_iter().enumerate() {
            if let Some(k) = sign_change_cut(&dp, &l, &h)? {
                cuts.push(k);
            }
            if n < last {
                cuts.push(h);
            }
        }
        cuts.sort();
        cuts.dedup();
    }
    let mut ranges = Vec::new();
    let mut start = lo.clone();
    for k in cuts {
        if k >= start && &k <= hi {
            ranges.push((start.clone(), k.clone()));
            start = k.add(&one)?;
        }
    }
    if &start <= hi {
        ranges.push((start, hi.clone()));
    }
    Some(ranges)
}

fn sign_at<T: Int>(p: &[T], x: &T) -> Option<i32> {
    Some(eval(p, x)?.signum())
}

/// Where a polynomial that is monotone on an integer range changes sign.
enum Crossing<T> {
    /// It vanishes at this integer.
    At(T),
    /// It has opposite signs at this integer and the next.
    Between(T),
}

/// For `q` monotone on `[l, h]`: where it vanishes or changes sign there, by exact
/// bisection; `None` when it keeps one strict sign.
fn crossing<T: Int>(q: &[T], l: &T, h: &T) -> Option<Option<Crossing<T>>> {
    let (sl, sh) = (sign_at(q, l)?, sign_at(q, h)?);
    if sl == 0 {
        return Some(Some(Crossing::At(l.clone())));
    }
    if sh == 0 {
        return Some(Some(Crossing::At(h.clone())));
    }
    if sl == sh {
        return Some(None);
    }
    let (mut a, mut b) = (l.clone(), h.clone());
    let one = T::from_i64(1);
    while b.sub(&a)? > one {
        let mid = a.add(&b)?.div_floor(&T::from_i64(2))?;
        match sign_at(q, &mid)? {
            0 => return Some(Some(Crossing::At(mid))),
            s if s == sl => a = mid,
            _ => b = mid,
        }
    }
    Some(Some(Crossing::Between(a)))
}

/// For `q` monotone on `[l, h]`: an integer `k` with `k ≤ ρ ≤ k + 1` for the root `ρ` of `q`
/// in the range, if `q` vanishes or changes sign there.
fn sign_change_cut<T: Int>(q: &[T], l: &T, h: &T) -> Option<Option<T>> {
    Some(crossing(q, l, h)?.map(|c| match c {
        Crossing::At(k) | Crossing::Between(k) => k,
    }))
}

/// The integer root of `p` in `[l, h]`, where `p` is monotone, if there is one.
fn root_in_monotone_range<T: Int>(p: &[T], l: &T, h: &T) -> Option<Option<T>> {
    Some(match crossing(p, l, h)? {
        Some(Crossing::At(k)) => Some(k),
        _ => None,
    })
}

/// Distinct rational roots of `p` (descending coefficients, leading coefficient non-zero),
/// as pairs `(num, den)` in lowest terms with `den > 0`; `None` on overflow.
///
/// Uses the monic substitution `X = c₀x`: `c₀^{n−1} p(X/c₀)` is monic with integral
/// coefficients, so its rational roots are integers.
pub fn rational_roots<T: Int>(p: &[T]) -> Option<Vec<(T, T)>> {
    let p = strip(p);
    if p.len() < 2 {
        return Some(Vec::new());
    }
    let lead = &p[0];
    let mut monic = Vec::with_capacity(p.len());
    let mut power = T::from_i64(1);
    monic.push(T::from_i64(1));
    for c in &p[1..] {
        monic.push(c.mul(&power)?);
        power = power.mul(lead)?;
    }
    let mut out = Vec::new();
    for x in integer_roots(&monic)? {
        // root x / lead in lowest terms
        let (mut num, mut den) = (x, lead.clone());
        let g = gcd(&num, &den)?;
        num = num.div_exact(&g)?;
        den = den.div_exact(&g)?;
        if den.signum() < 0 {
            num = num.neg()?;
            den = den.neg()?;
        }
        out.push((num, den));
    }
    Some(out)
}

/// Greatest common divisor, non-negative; `gcd(0, 0) = 0`.
pub fn gcd<T: Int>(a: &T, b: &T) -> Option<T> {
    let (mut x, mut y) = (a.abs()?, b.abs()?);
    while !y.is_zero() {
        let q = x.div_floor(&y)?;
        let r = x.sub(&q.mul(&y)?)?;
        x = y;
        y = r;
    }
    Some(x)
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::ops::Pow;
    use rug::Integer;

    fn expand(roots: &[i128], lead: i128) -> Vec<i128> {
        let mut p = vec![lead];
        for r in roots {
            let mut next = vec![0i128; p.len() + 1];
            for (i, c) in p.iter().enumerate() {
                next[i] += c;
                next[i + 1] -= c * r;
            }
            p = next;
        }
        p
    }

    #[test]
    fn finds_planted_roots_with_multiplicity_and_zero() {
        for roots in [
            vec![0, 0, 7],
            vec![-3, -3, -3, 2],
            vec![1, 2, 3, 4],
            vec![-100, 99],
        ] {
            let p = expand(&roots, 3);
            let mut want = roots.clone();
            want.sort();
            want.dedup();
            assert_eq!(integer_roots(&p).unwrap(), want, "{p:?}");
        }
    }

    #[test]
    fn no_roots_for_irreducible_and_close_pairs() {
        // x² − 2 and x⁴ − 10x² + 1 have no rational roots; (x² − 2)(x − 5) has one.
        assert!(integer_roots(&[1i128, 0, -2]).unwrap().is_empty());
        assert!(integer_roots(&[1i128, 0, -10, 0, 1]).unwrap().is_empty());
        assert_eq!(integer_roots(&[1i128, -5, -2, 10]).unwrap(), vec![5]);
    }

    #[test]
    fn big_integers_roots() {
        let r: Integer = Integer::from(10).pow(40u32) + 7;
        // (x − r)(x² + 1)
        let p = [Integer::from(1), -r.clone(), Integer::from(1), -r.clone()];
        assert_eq!(integer_roots(&p).unwrap(), vec![r]);
    }

    #[test]
    fn rational_roots_in_lowest_terms() {
        // 6x³ − 5x² + x = x(2x − 1)(3x − 1)
        let got = rational_roots(&[6i128, -5, 1, 0]).unwrap();
        assert_eq!(got, vec![(0, 1), (1, 3), (1, 2)]);
    }

    #[test]
    fn fujiwara_bound_holds_and_keeps_the_roots() {
        // Planted integer roots, alone and times x² + x + 1 (no real roots), with
        // coefficients up to about 10¹⁸: the bound is above every root, far below the
        // Cauchy bound, and the search still finds exactly the planted roots.
        for roots in [
            vec![1_000_000, -999_999, 3],
            vec![123_456, 123_457, -2],
            vec![-77_777, 5],
            vec![0, 31_622, -31_623, 9],
        ] {
            let p = expand(&roots, 3);
            let b = fujiwara_bound(&p).unwrap();
            let cauchy = 1 + p.iter().map(|c| i128::abs(*c)).max().unwrap();
            assert!(
                roots.iter().all(|r| i128::abs(*r) < b) && b < cauchy,
                "{p:?}: {b}"
            );
            let mut want = roots.clone();
            want.sort();
            want.dedup();
            assert_eq!(integer_roots(&p).unwrap(), want, "{p:?}");
            let mut q = vec![0i128; p.len() + 2];
            for (k, c) in p.iter().enumerate() {
                for (j, d) in [1i128, 1, 1].iter().enumerate() {
                    q[k + j] += c * d;
                }
            }
            assert_eq!(integer_roots(&q).unwrap(), want, "{q:?}");
        }
        // Coefficients beyond f64: no bound, and the Cauchy bound is used.
        let huge = [Integer::from(1), Integer::from(10).pow(400u32)];
        assert!(fujiwara_bound(&huge).is_none());
    }
}
