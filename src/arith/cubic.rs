//! Monic integer polynomials of degree at most 3 over the reals and complex numbers: the
//! discriminant, a real root of a cubic to any precision, and all complex roots.
//!
//! A real root of a cubic is bracketed by bisection (in f64 when the coefficients allow,
//! else at low MPFR precision from the Cauchy interval `[−M, M]`, `M = 1 + max |gₖ|`) and
//! polished by Newton's method at full precision inside the bracket, with plain bisection as
//! the fallback when Newton leaves it or stalls. The other roots come from deflation.
//!
//! In f64 only: the largest real root by the closed form, and from it all complex roots
//! (starting points and guesses that the callers verify or polish).
//!
//! ```
//! use qorbits::arith::cubic::{complex_roots, discriminant};
//! use rug::Integer;
//! // x³ − 3x + 1 = 0 has three real roots; disc = −4·(−3)³ − 27 = 81.
//! let g = [1, -3, 0, 1].map(Integer::from);
//! assert_eq!(discriminant(&g), 81);
//! let r = complex_roots(&g, 128);
//! assert!(r.iter().all(|z| z.imag().clone().abs() < 1e-30));
//! ```

use crate::arith::real::Cx;
use rug::{Complex, Float, Integer};

/// Discriminant of a monic polynomial of degree 1, 2 or 3 (ascending coefficients).
pub fn discriminant(g: &[Integer]) -> Integer {
    match g.len() {
        2 => Integer::from(1),
        3 => g[1].clone() * &g[1] - Integer::from(4) * &g[0],
        4 => {
            // x³ + bx² + cx + d: b²c² − 4c³ − 4b³d − 27d² + 18bcd.
            let (d, c, b) = (&g[0], &g[1], &g[2]);
            let b2: Integer = b.clone() * b;
            let c2: Integer = c.clone() * c;
            b2.clone() * &c2
                - Integer::from(4) * c2 * c
                - Integer::from(4) * b2 * b * d
                - Integer::from(27) * d.clone() * d
                + Integer::from(18) * b.clone() * c * d
        }
        _ => unreachable!("components have degree 1 to 3"),
    }
}

/// The largest real root of `m³ + c2·m² + c1·m + c0`, by the trigonometric or Cardano form
/// and two Newton steps, or `None` if f64 breaks down.
pub fn largest_real_root(c2: f64, c1: f64, c0: f64) -> Option<f64> {
    // m = u − c2/3: u³ + p·u + q.
    let p = c1 - c2 * c2 / 3.0;
    let q = 2.0 * c2 * c2 * c2 / 27.0 - c2 * c1 / 3.0 + c0;
    let disc = q * q / 4.0 + p * p * p / 27.0;
    let u = if disc > 0.0 {
        let s = disc.sqrt();
        (-q / 2.0 + s).cbrt() + (-q / 2.0 - s).cbrt()
    } else if p < 0.0 {
        let r = (-p / 3.0).sqrt();
        let arg = (3.0 * q / (2.0 * p * r)).clamp(-1.0, 1.0);
        2.0 * r * (arg.acos() / 3.0).cos()
    } else {
        0.0
    };
    let mut m = u - c2 / 3.0;
    for _ in 0..2 {
        let v = ((m + c2) * m + c1) * m + c0;
        let dv = (3.0 * m + 2.0 * c2) * m + c1;
        if dv != 0.0 {
            let next = m - v / dv;
            if next.is_finite() {
                m = next;
            }
        }
    }
    m.is_finite().then_some(m)
}

/// The roots of `x² + b·x + c` in f64, `(−b ± √(b² − 4c))/2`.
pub fn quadratic_roots(b: f64, c: f64) -> [Cx<f64>; 2] {
    let s = Cx::new(b * b - 4.0 * c, 0.0).sqrt();
    [
        Cx::new((s.re - b) / 2.0, s.im / 2.0),
        Cx::new((-b - s.re) / 2.0, -s.im / 2.0),
    ]
}

/// The complex roots of a monic polynomial of degree 2 or 3 in f64 (ascending
/// coefficients): the cubic's largest real root by [`largest_real_root`], then the deflated
/// quadratic. `None` if f64 breaks down. Only good to f64's rounding and the root's
/// conditioning: callers verify what they build from them.
pub fn complex_roots_f64(g: &[Integer]) -> Option<Vec<Cx<f64>>> {
    let gf: Vec<f64> = g.iter().map(Integer::to_f64).collect();
    let out = match gf[..] {
        [c, b, _] => quadratic_roots(b, c).to_vec(),
        [c0, c1, c2, _] => {
            let r = largest_real_root(c2, c1, c0)?;
            // g = (x − r)(x² + (g₂ + r)x + (g₁ + r(g₂ + r))).
            let b = c2 + r;
            let mut v = vec![Cx::new(r, 0.0)];
            v.extend(quadratic_roots(b, c1 + r * b));
            v
        }
        _ => return None,
    };
    out.iter()
        .all(|z| z.re.is_finite() && z.im.is_finite())
        .then_some(out)
}

/// The complex roots of a monic polynomial of degree 2 or 3 at precision `prec`.
pub fn complex_roots(g: &[Integer], prec: u32) -> Vec<Complex> {
    let fl = |x: &Integer| Float::with_val(prec, x);
    let quadratic = |b: Complex, c: Complex| {
        // x² + bx + c.
        let disc = Complex::with_val(prec, &b * &b) - c * 4u32;
        let s = disc.sqrt();
        let r1 = (s.clone() - &b) / 2u32;
        let r2 = -(b + s) / 2u32;
        vec![r1, r2]
    };
    if g.len() == 3 {
        return quadratic(
            Complex::with_val(prec, (fl(&g[1]), 0)),
            Complex::with_val(prec, (fl(&g[0]), 0)),
        );
    }
    let r = real_root_of_cubic(g, prec);
    // Deflate: g = (x − r)(x² + (g₂ + r)x + (g₁ + r(g₂ + r))).
    let b = Float::with_val(prec, &r + &g[2]);
    let cc = Float::with_val(prec, &r * &b) + &g[1];
    let mut out = vec![Complex::with_val(prec, (r, 0))];
    out.extend(quadratic(
        Complex::with_val(prec, (b, 0)),
        Complex::with_val(prec, (cc, 0)),
    ));
    out
}

/// `(lo, hi)` after `steps` halvings of a bracket of a monic cubic's root (g(lo) < 0 ≤ g(hi)).
fn bisect(g: &[Integer], mut lo: Float, mut hi: Float, steps: u32, prec: u32) -> (Float, Float) {
    for _ in 0..steps {
        let mid = Float::with_val(prec, &lo + &hi) / 2u32;
        let mut v = Float::with_val(prec + 32, 1);
        for k in (0..3).rev() {
            v = v * &mid + &g[k];
        }
        if v < 0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    (lo, hi)
}

/// A real root of a monic cubic to about `prec` bits: bisection at low precision from
/// `[−M, M]` (M = 1 + max |gₖ|, so g(−M) < 0 < g(M)), then Newton at full precision inside
/// the bracket, with plain bisection as the fallback when Newton leaves it or stalls.
pub fn real_root_of_cubic(g: &[Integer], prec: u32) -> Float {
    if let Some(x) = real_root_from_f64(g, prec) {
        return x;
    }
    let mbits = g.iter().map(Integer::significant_bits).max().unwrap_or(1) + 2;
    let low = mbits + 96;
    let m = Float::with_val(
        low,
        g.iter().take(3).map(|x| x.clone().abs()).max().unwrap(),
    ) + 1u32;
    let (lo, hi) = bisect(g, Float::with_val(low, -&m), m, mbits + 80, low);
    let (lo, hi) = (Float::with_val(prec, lo), Float::with_val(prec, hi));
    let start = Float::with_val(prec, &lo + &hi) / 2u32;
    newton(g, start, &lo, &hi, prec).unwrap_or_else(|| bisect(g, lo, hi, prec + 8, prec).0)
}

/// Newton's method for a monic cubic at precision `prec` from `x`, as long as the iterates
/// stay in `[lo, hi]`: the root once the step is below the precision, `None` when an
/// iterate leaves the interval, the derivative vanishes or 64 steps do not converge.
fn newton(g: &[Integer], mut x: Float, lo: &Float, hi: &Float, prec: u32) -> Option<Float> {
    for _ in 0..64 {
        // g(x) and g'(x) by Horner.
        let (mut v, mut d) = (Float::with_val(prec + 32, 1), Float::with_val(prec + 32, 0));
        for k in (0..3).rev() {
            d = d * &x + &v;
            v = v * &x + &g[k];
        }
        if d == 0 {
            return None;
        }
        let step = v / d;
        x -= &step;
        if x < *lo || x > *hi {
            return None;
        }
        let tiny = match (step.get_exp(), x.get_exp()) {
            (None, _) => true,
            (Some(es), Some(ex)) => es < ex - prec as i32 + 4,
            (Some(es), None) => es < -(prec as i32),
        };
        if tiny {
            return Some(x);
        }
    }
    None
}

/// The fast path of [`real_root_of_cubic`]: a root by bisection in f64, polished by Newton
/// at full precision; `None` when Newton wanders off or stalls (then the caller bisects).
pub(crate) fn real_root_from_f64(g: &[Integer], prec: u32) -> Option<Float> {
    let c: Vec<f64> = g.iter().map(Integer::to_f64).collect();
    let m = 1.0 + c[..3].iter().fold(0.0f64, |a, x| a.max(x.abs()));
    if !m.is_finite() || m > 1e100 {
        return None;
    }
    let value = |x: f64| ((x + c[2]) * x + c[1]) * x + c[0];
    let (mut lo, mut hi) = (-m, m);
    for _ in 0..400 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if value(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let x0 = 0.5 * (lo + hi);
    let width = x0.abs().max(1.0) * 1e-6;
    let (a, b) = (
        Float::with_val(prec, x0 - width),
        Float::with_val(prec, x0 + width),
    );
    newton(g, Float::with_val(prec, x0), &a, &b, prec)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn f64_roots_agree_with_the_multiple_precision_ones() {
        // Three real roots (x³ − 3x + 1), one (x³ − 6x + 11), a quadratic (x² + 3x + 6),
        // and two close roots: (x − 1000)(x − 1001)(x + 2001) = x³ − 3 003 001x +
        // 2 003 001 000 (expanded by hand).
        for g in [
            vec![1, -3, 0, 1],
            vec![11, -6, 0, 1],
            vec![6, 3, 1],
            vec![2_003_001_000, -3_003_001, 0, 1],
        ] {
            let g: Vec<Integer> = g.into_iter().map(Integer::from).collect();
            let fast = complex_roots_f64(&g).unwrap();
            let exact = complex_roots(&g, 200);
            assert_eq!(fast.len(), exact.len());
            for z in &exact {
                let (re, im) = (z.real().to_f64(), z.imag().to_f64());
                let near = fast.iter().any(|w| {
                    (w.re - re).abs() + (w.im - im).abs() < 1e-9 * (1.0 + re.abs() + im.abs())
                });
                assert!(near, "{g:?}: no f64 root near {re} + {im}i in {fast:?}");
            }
        }
    }
}
