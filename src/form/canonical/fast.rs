//! The fast path of the canonical rule for table-sized forms: the reduction into F driven by
//! the f64 covariant point alone ([`canonical_f64`]); points near the boundary of `F_η` are
//! decided by `in_f_eta`, exactly from the symmetries of the form where they settle it.
//!
//! ```
//! use qorbits::form::canonical::canonical_f64;
//! use qorbits::form::Form;
//! // x⁴ + 3x²y² + y⁴ is fixed by all three reflections: its point is i.
//! let c = canonical_f64(&Form::<i128>::new([1, 0, 3, 0, 1])).unwrap();
//! assert_eq!(c.form.c, [1, 0, 3, 0, 1]);
//! assert_eq!(c.stabiliser.len(), 4);
//! ```

use super::{best_member, coeffs_f64, move_point, near_f, Canonical, ETA, NEIGHBOURS, WINDOW};
use crate::error::{Error, Result};
use crate::form::covariant::{point_f64, Point};
use crate::form::{Form, Gl2};

/// [`moves_into_f`] on an f64 point, for the fast path: `None` when a translation would not
/// fit the matrix entries.
fn moves_into_f_f64(mut z: (f64, f64)) -> Option<(Gl2<i128>, (f64, f64))> {
    const TOL: f64 = 1e-10;
    let mut m = Gl2::<i128>::identity();
    for _ in 0..10_000 {
        if z.0.abs() > 0.5 + TOL {
            let k = z.0.round();
            if k.abs() > 1e15 {
                return None;
            }
            m = Gl2 {
                m: [1, 0, k as i128, 1],
            }
            .mul(&m)?;
            z.0 -= k;
            continue;
        }
        let n = z.0 * z.0 + z.1 * z.1;
        if n < 1.0 - TOL {
            z = (-z.0 / n, z.1 / n);
            m = Gl2::new(0, 1, -1, 0).mul(&m)?;
            continue;
        }
        if z.0 < -TOL {
            z.0 = -z.0;
            m = Gl2::new(1, 0, 0, -1).mul(&m)?;
        }
        return Some((m, z));
    }
    None
}

/// A member of the class of a table-sized form in F, found with the f64 point alone.
#[derive(Clone, Debug)]
pub struct Settled {
    /// The member `g = gamma·f` with its point in F.
    pub form: Form<i128>,
    /// `gamma`.
    pub gamma: Gl2<i128>,
    /// The f64 point of `g`.
    pub point: Point<f64>,
    /// The point moved into F (equal to `point` up to rounding).
    pub z: (f64, f64),
}

impl Settled {
    /// The members `n·g` (with `n·gamma`) of the class whose point may lie in `F_η`: the
    /// canonical representative is one of them (DESIGN §3, the eight neighbours).
    pub fn candidates(&self) -> Result<Vec<(Form<i128>, Gl2<i128>)>> {
        let mut out = Vec::new();
        for n in NEIGHBOURS {
            if near_f(move_point(&n, self.z), ETA + WINDOW) {
                let step = Gl2::new(n[0], n[1], n[2], n[3]);
                out.push((
                    self.form.act(&step).ok_or(Error::Overflow)?,
                    step.mul(&self.gamma).ok_or(Error::Overflow)?,
                ));
            }
        }
        Ok(out)
    }
}

/// The reduction of a table-sized form into F driven by the f64 point alone. Precondition:
/// Disc(f) ≠ 0. [`Error::Overflow`] when the f64 point is not reliable or `i128` overflows.
pub fn settle_f64(f: &Form<i128>) -> Result<Settled> {
    let mut g = f.clone();
    let mut gamma = Gl2::<i128>::identity();
    for _ in 0..200 {
        let p = point_f64(&coeffs_f64(&g)).ok_or(Error::Overflow)?;
        let (mv, z) = moves_into_f_f64((p.x, p.y)).ok_or(Error::Overflow)?;
        if mv == Gl2::identity() {
            return Ok(Settled {
                form: g,
                gamma,
                point: p,
                z,
            });
        }
        g = g.act(&mv).ok_or(Error::Overflow)?;
        gamma = mv.mul(&gamma).ok_or(Error::Overflow)?;
    }
    Err(Error::Overflow)
}

/// Fast path of [`canonical`](super::canonical) for table-sized forms: [`settle_f64`], then
/// the rule on the neighbours (MPFR only when a decision near the boundary of `F_η` needs
/// it, certified as always). Precondition: Disc(f) ≠ 0. Returns [`Error::Overflow`] when
/// the f64 point is not reliable or `i128` overflows: then ask
/// [`canonical_in`](super::canonical_in).
pub fn canonical_f64(f: &Form<i128>) -> Result<Canonical<i128>> {
    let s = settle_f64(f)?;
    best_member(f, &s.form, &s.gamma, s.z, Some(&s.point))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::form::canonical::canonical_in;

    #[test]
    fn the_fast_path_agrees_with_the_general_one() {
        // Forms on each mirror, at the corners, and moved off F by a few matrices.
        let forms: [[i128; 5]; 6] = [
            [1, 0, 3, 0, 2],
            [2, 1, 5, 1, 2],
            [1, 0, 0, 0, 1],
            [3, -1, 4, 1, -5],
            [1, 2, 3, 1, 1],
            [1, 1, 2, 1, 1],
        ];
        for c in forms {
            let f = Form::<i128>::new(c);
            for g in [[1, 0, 0, 1], [2, 1, 1, 1], [1, 3, 0, 1], [5, 2, 7, 3]] {
                let h = f.act(&Gl2::new(g[0], g[1], g[2], g[3])).unwrap();
                let fast = canonical_f64(&h).unwrap();
                let general = canonical_in(&h).unwrap();
                assert_eq!(fast.form, general.form, "{h}");
                assert_eq!(h.act(&fast.gamma).unwrap(), fast.form, "{h}");
                assert_eq!(fast.stabiliser.len(), general.stabiliser.len(), "{h}");
            }
        }
    }
}
