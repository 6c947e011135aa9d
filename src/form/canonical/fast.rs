//! The fast paths of the canonical rule for table-sized forms: the reduction into F driven by
//! the f64 covariant point alone ([`canonical_f64`]), and exact decisions for points on the
//! mirrors of F ([`decide_on_mirrors`]).
//!
//! **Mirrors.** If a reflection γ of PGL2(Z) fixes f up to sign (γ·f = ±f), then
//! z(f) = φ_γ(z(f)) by covariance (DESIGN §3; z(−f) = z(f), the roots are the same), so z(f)
//! lies exactly on the fixed line of φ_γ. The three pieces of the boundary of `F_η` lie at
//! distance η from the mirrors `Re z = 0` (of `z ↦ −z̄`), `Re z = ½` (of `z ↦ 1 − z̄`) and
//! `|z| = 1` (of `z ↦ 1/z̄`), so a point on a mirror is inside that piece by exactly η:
//! no multiple-precision recomputation is needed for it. Forms of the table with a
//! stabiliser, or with `b = d = 0` or `a = e, b = d`, are such forms.
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
use crate::arith::int::Int;
use crate::error::{Error, Result};
use crate::form::covariant::{point_f64, Point};
use crate::form::{Form, Gl2};

/// The reflection whose mirror lies at distance η inside each boundary piece of `F_η`, in
/// the order of the distances of `boundary_distances`: `z ↦ −z̄`, `z ↦ 1 − z̄`, `z ↦ 1/z̄`.
const MIRRORS: [[i64; 4]; 3] = [NEIGHBOURS[1], NEIGHBOURS[2], NEIGHBOURS[3]];

/// Whether γ·f = ±f.
fn fixed_up_to_sign<T: Int>(f: &Form<T>, g: &[i64; 4]) -> Result<bool> {
    let h = f
        .act(&Gl2::new(g[0], g[1], g[2], g[3]))
        .ok_or(Error::Overflow)?;
    if h == *f {
        return Ok(true);
    }
    for k in 0..5 {
        if h.c[k] != f.c[k].neg().ok_or(Error::Overflow)? {
            return Ok(false);
        }
    }
    Ok(true)
}

/// Whether the point of `f` is in `F_η`, given the f64 distances `d` of its point to the
/// three boundary pieces: a piece within [`WINDOW`] counts as passed when `f` is fixed by
/// its mirror (its point then lies on the mirror, exactly η inside); `None` when a piece is
/// within the window and its mirror does not fix `f` (then only MPFR can decide).
pub(crate) fn decide_on_mirrors<T: Int>(f: &Form<T>, d: &[f64; 3]) -> Result<Option<bool>> {
    let mut inside = true;
    for (dk, mirror) in d.iter().zip(&MIRRORS) {
        if dk.abs() > WINDOW {
            inside &= *dk >= 0.0;
        } else if !fixed_up_to_sign(f, mirror)? {
            return Ok(None);
        }
    }
    Ok(Some(inside))
}

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

    #[test]
    fn a_point_off_every_mirror_is_left_to_mpfr() {
        // (1, 0, 3, 0, 2) is fixed by z ↦ −z̄ only.
        let f = Form::<i128>::new([1, 0, 3, 0, 2]);
        assert_eq!(
            decide_on_mirrors(&f, &[1e-9, 0.5, 0.3]).unwrap(),
            Some(true)
        );
        assert_eq!(decide_on_mirrors(&f, &[1e-9, 0.5, 1e-8]).unwrap(), None);
        assert_eq!(
            decide_on_mirrors(&f, &[1e-9, -0.5, 0.3]).unwrap(),
            Some(false)
        );
    }
}
