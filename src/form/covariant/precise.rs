//! The covariant point in multiple precision (MPFR), for forms beyond f64 and for certified
//! decisions: the roots at the working precision, the minimum of G on the roots moved to
//! mean 0 and spread 1, and for roots in tight pairs after the inversion about the closest
//! pair (where the valley of G is a straight line).

use super::{best_start, minimise, root_error_bound, roots, start_point, Point, Roots};
use crate::arith::real::{Cx, Mp, Real};
use rug::Integer;

/// Julia's point of the integral form `c` at `prec` bits of MPFR precision; `None` if the
/// iteration fails at this precision.
pub fn point_mp(c: &[Integer; 5], prec: u32) -> Option<Point<Mp>> {
    point_mp_near(c, prec, None)
}

/// [`point_mp`], with the descent started at `near` when given (an f64 point of the form,
/// say): from there Newton's method reaches the working precision in a few steps. G has a
/// single minimum, so the start changes the cost only; should the descent from `near`
/// fail, the normalised descent of [`point_mp`] runs as without it.
pub fn point_mp_near(c: &[Integer; 5], prec: u32, near: Option<(f64, f64)>) -> Option<Point<Mp>> {
    let zero = Mp::new(prec, 0.0);
    let cr: [Mp; 5] = std::array::from_fn(|k| zero.int_lit(&c[k]));
    // Start the roots from an f64 solve when it converges (fast), else from a circle.
    let cf: Vec<f64> = c.iter().map(|v| v.to_f64()).collect();
    let guess = roots::<f64>(&[cf[0], cf[1], cf[2], cf[3], cf[4]], None)
        .filter(|r| {
            r.finite
                .iter()
                .all(|z| z.re.is_finite() && z.im.is_finite())
        })
        .map(|r| r.finite);
    // Guesses from f64 can stall inside a tight cluster; then restart from a circle.
    let good = |r: &Roots<Mp>| root_error_bound(r) < zero.epsilon().sqrt().to_f64();
    let r = match roots(&cr, guess.as_deref()) {
        Some(r) if good(&r) => r,
        first => match (first, roots(&cr, None)) {
            (Some(a), Some(b)) => {
                if root_error_bound(&a) <= root_error_bound(&b) {
                    a
                } else {
                    b
                }
            }
            (a, b) => a.or(b)?,
        },
    };
    let scale = r
        .finite
        .iter()
        .map(|z| z.abs().to_f64())
        .fold(1.0, f64::max);
    let from_near = near
        .filter(|(_, y)| *y > 0.0)
        .and_then(|(x, y)| minimise(&r.finite, (zero.lit(x), zero.lit(y))));
    let (x, y, err) = match from_near.or_else(|| normalised_minimum(&r.finite)) {
        Some(p) => p,
        None => inverted_minimum(&r)?,
    };
    Some(Point {
        x,
        y,
        err: err + 4.0 * root_error_bound(&r) * (1.0 + scale),
    })
}

/// The minimum of G for these finite roots (with `−4 log y`, so a missing fourth root is
/// the one at infinity), computed on the roots moved to mean 0 and spread 1 and moved back.
/// z(f) is covariant under the real affine maps x ↦ s·x + m (s > 0): they multiply every
/// w_j and Im z by s², s, so G changes by a constant; at spread 1 the steps and tolerances
/// of the descent are at their natural scale, also for a cluster of roots.
fn normalised_minimum(finite: &[Cx<Mp>]) -> Option<(Mp, Mp, f64)> {
    let zero = finite[0].re.lit(0.0);
    let n = zero.lit(finite.len() as f64);
    let m = finite
        .iter()
        .fold(zero.clone(), |acc, z| acc + z.re.clone())
        / n.clone();
    let spread = (finite.iter().fold(zero.clone(), |acc, z| {
        let d = z.re.clone() - m.clone();
        acc + d.clone() * d + z.im.clone() * z.im.clone()
    }) / n)
        .sqrt();
    if spread <= zero {
        return None;
    }
    let moved = Roots {
        finite: finite
            .iter()
            .map(|z| {
                Cx::new(
                    (z.re.clone() - m.clone()) / spread.clone(),
                    z.im.clone() / spread.clone(),
                )
            })
            .collect(),
        at_infinity: finite.len() < 4,
        err: Default::default(),
    };
    // The centroid start is right almost always and cheap; the best of the pair midpoints
    // (seven evaluations of G) only when the descent from it fails.
    let (x, y, err) = minimise(&moved.finite, start_point(&moved))
        .or_else(|| minimise(&moved.finite, best_start(&moved)))?;
    Some((
        m + spread.clone() * x,
        spread.clone() * y,
        spread.to_f64() * err,
    ))
}

/// The minimum of G after the map z ↦ −1/(z − c) of SL2(R) that sends the midpoint c of
/// the two closest roots to infinity (and a root at infinity to 0), moved back by
/// z = c − 1/z'. When the roots form two tight pairs of very different widths the minimum
/// lies far along the geodesic between them; in these coordinates that geodesic is a
/// vertical line, which the descent follows, where in the original ones it is a
/// semicircle along which G is nearly flat (derived here; G is SL2(R)-covariant like the
/// point itself, DESIGN §3).
fn inverted_minimum(r: &Roots<Mp>) -> Option<(Mp, Mp, f64)> {
    let f = &r.finite;
    let mut closest: Option<(usize, usize, Mp)> = None;
    for j in 0..f.len() {
        for k in j + 1..f.len() {
            let d = f[j].sub(&f[k]).abs();
            if closest.as_ref().is_none_or(|c| d < c.2) {
                closest = Some((j, k, d));
            }
        }
    }
    let (j, k, _) = closest?;
    let zero = f[0].re.lit(0.0);
    let c = (f[j].re.clone() + f[k].re.clone()) * zero.lit(0.5);
    let one = Cx::new(zero.lit(1.0), zero.clone());
    let mut moved = Vec::with_capacity(4);
    for z in f {
        let d = Cx::new(z.re.clone() - c.clone(), z.im.clone());
        if d.norm2() <= zero {
            return None;
        }
        moved.push(Cx::new(zero.clone(), zero.clone()).sub(&one.div(&d)));
    }
    if r.at_infinity {
        moved.push(Cx::new(zero.clone(), zero.clone()));
    }
    let (x, y, err) = normalised_minimum(&moved)?;
    // z = c − 1/z'; |dz/dz'| = 1/|z'|².
    let zp = Cx::new(x, y);
    let n2 = zp.norm2();
    let z = Cx::new(c, zero).sub(&one.div(&zp));
    Some((z.re, z.im, err / n2.to_f64()))
}
