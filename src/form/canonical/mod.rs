//! The canonical representative of a GL2(Z)-class, the reducing matrix and the stabiliser
//! (DESIGN §3).
//!
//! **Rule.** The canonical representative of a class is the lexicographically smallest
//! coefficient tuple `(a, b, c, d, e)` among the members `g` of the class whose covariant
//! point `z(g)` lies in `F_η = {−η ≤ Re z ≤ ½ + η, |z| ≥ 1 − η}`, `η = 10⁻⁹`.
//!
//! **Computation.** Reduce any member until its point is in `F = {0 ≤ Re z ≤ ½, |z| ≥ 1}`
//! (translate by `round(Re z)`, invert when `|z| < 1`, reflect when `Re z < 0`), recomputing
//! the point from the reduced form's own coefficients until no move is needed. The members
//! with point in `F_η` are then images under the eight elements of PGL2(Z) that move `F_η`
//! onto itself or a neighbour ([`NEIGHBOURS`]); each candidate is prefiltered by moving the
//! point and decided from its *own* coefficients. Points within `10⁻⁶` of the boundary of
//! `F_η` are recomputed with MPFR, at increasing precision, until the distance to the
//! boundary exceeds the error estimate by a factor 10⁶.
//!
//! **Stabiliser.** A stabiliser element fixes `z(g) ∈ F_η`, so it is one of [`NEIGHBOURS`]:
//! the PGL2(Z)-stabiliser of a member is found by testing those eight exactly.
//!
//! ```
//! use qorbits::form::canonical::canonical;
//! use qorbits::form::{Form, Gl2};
//! use rug::Integer;
//! let f = Form::<Integer>::from_i64([1, -2, -3, -1, 5]);
//! let c = canonical(&f).unwrap();
//! assert_eq!(f.act(&c.gamma).unwrap(), c.form);
//! // Any transform has the same canonical form.
//! let g = f.act(&Gl2::new(2, 1, 7, 4)).unwrap();
//! assert_eq!(canonical(&g).unwrap().form, c.form);
//! ```

use crate::arith::int::Int;
use crate::arith::real::{Cx, Mp, Real};
use crate::error::{Error, Result};
use crate::form::covariant::{locate_f64, point_f64, point_mp, point_mp_near, Located, Point};
use crate::form::{Form, Gl2};
use rug::Integer;

mod fast;
mod symmetry;
pub use fast::{canonical_f64, settle_f64, Settled};

/// The tolerance η of the fundamental domain `F_η`.
pub const ETA: f64 = 1e-9;
/// Points closer than this to the boundary of `F_η` are decided with MPFR.
pub const WINDOW: f64 = 1e-6;

/// The eight elements γ of PGL2(Z) with `γF_η ∩ F_η ≠ ∅`, as `[p, q, r, s]`, with the map
/// they induce on the covariant point: identity; `z ↦ −z̄`; `z ↦ 1 − z̄`; `z ↦ 1/z̄`;
/// `z ↦ −1/z`; and three that fix the corner `e^{πi/3}`.
pub const NEIGHBOURS: [[i64; 4]; 8] = [
    [1, 0, 0, 1],
    [1, 0, 0, -1],
    [1, 0, -1, -1],
    [0, 1, 1, 0],
    [0, 1, -1, 0],
    [0, 1, -1, -1],
    [1, 1, -1, 0],
    [1, 1, 0, -1],
];

/// The canonical representative of the class of a form, with the matrix reaching it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Canonical<T> {
    /// The canonical representative.
    pub form: Form<T>,
    /// `γ` with `γ·input = form`.
    pub gamma: Gl2<T>,
    /// The PGL2(Z)-stabiliser of `form` (each element up to sign), the identity first.
    pub stabiliser: Vec<Gl2<T>>,
}

impl<T: Int> Canonical<T> {
    /// The same result over [`rug::Integer`].
    pub fn to_big(&self) -> Canonical<Integer> {
        Canonical {
            form: self.form.to_big(),
            gamma: self.gamma.to_big(),
            stabiliser: self.stabiliser.iter().map(Gl2::to_big).collect(),
        }
    }
}

/// `φ_γ(τ) = (sτ − r)/(p − qτ)`, conjugated when `det γ = −1` (DESIGN §3).
pub fn move_point(g: &[i64; 4], z: (f64, f64)) -> (f64, f64) {
    let [p, q, r, s] = g.map(|v| v as f64);
    let num = Cx::new(s * z.0 - r, s * z.1);
    let den = Cx::new(p - q * z.0, -q * z.1);
    let w = num.div(&den);
    if p * s - q * r < 0.0 {
        (w.re, -w.im)
    } else {
        (w.re, w.im)
    }
}

/// The smallest imaginary part of a point of `F_η`: `√((1 − η)² − (½ + η)²)`, rounded down.
pub fn y_min() -> f64 {
    let (r, x) = (1.0 - ETA, 0.5 + ETA);
    (r * r - x * x).sqrt() * (1.0 - 1e-12)
}

/// A member of a translation class with its covariant point (when f64 is reliable).
pub type Translate = (Form<i128>, Option<Point<f64>>);

/// The members of the translation class of `f` whose covariant point has real part in
/// `[−η, ½ + η]` (at most one; up to two are returned when the point is within 10⁻⁶ of the
/// strip's edge, to be decided exactly by the caller). Each comes with its moved point.
pub fn translates_into_strip(f: &Form<i128>) -> Result<Vec<Translate>> {
    // Most candidates have their point far below the strip's floor; a proof of that ends the
    // descent early. The margin keeps the proof on the same side as the test below, whose
    // points are good to 1e-7.
    let p = match locate_f64(&f.c.map(|v| v as f64), y_min() - WINDOW - 1e-6) {
        Some(Located::Below) => return Ok(Vec::new()),
        Some(Located::Point(p)) => Some(p),
        None => None,
    };
    let (x, y) = match &p {
        Some(p) => (p.x, p.y),
        None => approximate_point_f64(f)?,
    };
    if y < y_min() - WINDOW {
        // |z| ≥ 1 − η forces Im z ≥ y_min in the strip, whatever the translation.
        return Ok(Vec::new());
    }
    let lo = (x - 0.5 - ETA - WINDOW).ceil() as i64;
    let hi = (x + ETA + WINDOW).floor() as i64;
    let mut out = Vec::new();
    for k in lo..=hi {
        let t = f.act(&Gl2::new(1, 0, k, 1)).ok_or(Error::Overflow)?;
        let moved = p.as_ref().map(|p| Point {
            x: p.x - k as f64,
            y: p.y,
            err: p.err,
        });
        out.push((t, moved));
    }
    Ok(out)
}

/// Whether `z` lies in `F_{tol}` (a cheap f64 prefilter).
pub(crate) fn near_f(z: (f64, f64), tol: f64) -> bool {
    z.1 > 0.0
        && z.0 >= -tol
        && z.0 <= 0.5 + tol
        && z.0 * z.0 + z.1 * z.1 >= (1.0 - tol) * (1.0 - tol)
}

pub(crate) fn coeffs_f64<T: Int>(f: &Form<T>) -> [f64; 5] {
    std::array::from_fn(|k| f.c[k].to_f64())
}

fn max_bits<T: Int>(f: &Form<T>) -> u32 {
    f.c.iter().map(Int::bits).max().unwrap_or(0)
}

/// MPFR precisions to try for a form with coefficients of `bits` bits.
fn precisions(bits: u32) -> impl Iterator<Item = u32> {
    let base = (3 * bits + 128).max(192);
    (0..5).map(move |k| base << k)
}

/// Signed distances of `z` to the three boundary pieces of `F_η`; z ∈ F_η iff all ≥ 0.
fn boundary_distances<R: Real>(x: &R, y: &R) -> [R; 3] {
    let eta = x.lit(1.0) / x.lit(1e9);
    let half = x.lit(0.5);
    let r = (x.clone() * x.clone() + y.clone() * y.clone()).sqrt();
    [
        x.clone() + eta.clone(),
        half + eta.clone() - x.clone(),
        r - (x.lit(1.0) - eta),
    ]
}

/// Inside (`Some(true)`), outside (`Some(false)`) or too close to call (`None`).
fn decide<R: Real>(p: &Point<R>, window: f64) -> Option<bool> {
    let d = boundary_distances(&p.x, &p.y);
    let margin = d
        .iter()
        .map(|v| v.to_f64().abs())
        .fold(f64::INFINITY, f64::min);
    if margin <= window {
        return None;
    }
    Some(d.iter().all(|v| v.to_f64() >= 0.0))
}

/// Whether `z(f) ∈ F_η`, decided from the coefficients of `f` (certified near the boundary).
/// `hint` is an already computed f64 point of `f`.
pub fn in_f_eta<T: Int>(f: &Form<T>, hint: Option<&Point<f64>>) -> Result<bool> {
    let computed;
    let p64 = match hint {
        Some(p) => Some(p),
        None => {
            computed = point_f64(&coeffs_f64(f));
            computed.as_ref()
        }
    };
    if let Some(p) = p64 {
        if let Some(inside) = decide(p, WINDOW) {
            return Ok(inside);
        }
        if let Some(inside) = symmetry::decide_by_symmetry(f, p)? {
            return Ok(inside);
        }
    }
    // Near the boundary the f64 point is good to far better than the window: Newton's
    // method from it reaches the MPFR precision in a few steps.
    let big: [Integer; 5] = std::array::from_fn(|k| f.c[k].to_integer());
    let near = p64.map(|p| (p.x, p.y));
    for prec in precisions(max_bits(f)) {
        if let Some(p) = point_mp_near(&big, prec, near) {
            if let Some(inside) = decide(&p, (1e6 * p.err).max(1e-300)) {
                return Ok(inside);
            }
        }
    }
    Err(Error::Numerical(format!(
        "cannot place the covariant point of {f} relative to F_eta"
    )))
}

/// An approximation of `z(f)` good enough to drive the reduction, at `prec` bits.
fn approximate_point<T: Int>(f: &Form<T>) -> Result<Cx<Mp>> {
    let bits = max_bits(f);
    let prec = (2 * bits + 64).max(64);
    if let Some(p) = point_f64(&coeffs_f64(f)) {
        return Ok(Cx::new(Mp::new(prec, p.x), Mp::new(prec, p.y)));
    }
    let big: [Integer; 5] = std::array::from_fn(|k| f.c[k].to_integer());
    for prec in precisions(bits) {
        if let Some(p) = point_mp(&big, prec) {
            let scale = 1.0 + p.x.to_f64().abs() + p.y.to_f64();
            if p.err < 1e-12 * scale.min(p.y.to_f64()) {
                return Ok(Cx::new(p.x, p.y));
            }
        }
    }
    Err(Error::Numerical(format!("no covariant point for {f}")))
}

/// The matrix moving `z` into F (translations, inversions, a final reflection), and the
/// moved point.
fn moves_into_f<T: Int>(mut z: Cx<Mp>) -> Result<(Gl2<T>, Cx<Mp>)> {
    // Stop inside F_tol, tol ≪ η: points on the boundary of F must not flip back and forth.
    const TOL: f64 = 1e-10;
    let mut m = Gl2::<T>::identity();
    let one = z.re.lit(1.0);
    for _ in 0..100_000 {
        if z.re.to_f64().abs() > 0.5 + TOL {
            let k = z.re.round_integer();
            let kt = T::try_from_integer(&k).ok_or(Error::Overflow)?;
            let t = Gl2 {
                m: [T::from_i64(1), T::from_i64(0), kt, T::from_i64(1)],
            };
            m = t.mul(&m).ok_or(Error::Overflow)?;
            z.re = z.re.clone() - z.re.int_lit(&k);
            continue;
        }
        let n = z.norm2();
        if n < one.clone() - one.lit(TOL) {
            // z ↦ −1/z = −z̄/|z|², by [[0, 1], [−1, 0]].
            z = Cx::new(-(z.re.clone() / n.clone()), z.im.clone() / n);
            m = Gl2::new(0, 1, -1, 0).mul(&m).ok_or(Error::Overflow)?;
            continue;
        }
        if z.re.to_f64() < -TOL {
            // z ↦ −z̄, by [[1, 0], [0, −1]].
            z.re = -z.re.clone();
            m = Gl2::new(1, 0, 0, -1).mul(&m).ok_or(Error::Overflow)?;
        }
        return Ok((m, z));
    }
    Err(Error::Numerical(
        "reduction into F did not terminate".into(),
    ))
}

/// The PGL2(Z)-stabiliser of a form whose point lies in `F_η`, from [`NEIGHBOURS`].
pub fn stabiliser_of_member<T: Int>(f: &Form<T>) -> Result<Vec<Gl2<T>>> {
    stabiliser_near(f, None)
}

/// [`stabiliser_of_member`] given an f64 approximation of the point (error below 10⁻⁶):
/// an element that does not fix the point within 10⁻⁵ cannot fix the form (a stabiliser
/// element fixes z(f) exactly, DESIGN §3), so it is not tried.
pub fn stabiliser_near<T: Int>(f: &Form<T>, point: Option<(f64, f64)>) -> Result<Vec<Gl2<T>>> {
    let mut out = Vec::new();
    for n in NEIGHBOURS {
        if let Some(z) = point {
            let w = move_point(&n, z);
            if (w.0 - z.0).abs() + (w.1 - z.1).abs() > 1e-5 {
                continue;
            }
        }
        let g = Gl2::new(n[0], n[1], n[2], n[3]);
        if f.act(&g).ok_or(Error::Overflow)? == *f {
            out.push(g);
        }
    }
    Ok(out)
}

/// The canonical representative on one integer type. Precondition: Disc(f) ≠ 0. Returns
/// [`Error::Overflow`] when `T = i128` overflows.
pub fn canonical_in<T: Int>(f: &Form<T>) -> Result<Canonical<T>> {
    let mut g = f.clone();
    let mut gamma = Gl2::<T>::identity();
    let mut settled = None;
    for _ in 0..200 {
        let z = approximate_point(&g)?;
        let (mv, moved) = moves_into_f::<T>(z)?;
        if mv == Gl2::identity() {
            settled = Some(moved);
            break;
        }
        g = g.act(&mv).ok_or(Error::Overflow)?;
        gamma = mv.mul(&gamma).ok_or(Error::Overflow)?;
    }
    let z = settled.ok_or_else(|| Error::Numerical(format!("reduction of {f} did not settle")))?;
    best_member(f, &g, &gamma, (z.re.to_f64(), z.im.to_f64()), None)
}

/// The canonical representative from a member `g = gamma·f` whose point `z` is in F: the
/// smallest neighbour of `g` with its own point in `F_η` (`hint`: the f64 point of `g`).
pub(crate) fn best_member<T: Int>(
    f: &Form<T>,
    g: &Form<T>,
    gamma: &Gl2<T>,
    z: (f64, f64),
    hint: Option<&Point<f64>>,
) -> Result<Canonical<T>> {
    let mut best: Option<(Form<T>, Gl2<T>)> = None;
    for (k, n) in NEIGHBOURS.iter().enumerate() {
        if !near_f(move_point(n, z), ETA + WINDOW) {
            continue;
        }
        let step = Gl2::new(n[0], n[1], n[2], n[3]);
        let h = g.act(&step).ok_or(Error::Overflow)?;
        if best.as_ref().is_some_and(|(b, _)| *b <= h) {
            continue;
        }
        if in_f_eta(&h, if k == 0 { hint } else { None })? {
            best = Some((h, step.mul(gamma).ok_or(Error::Overflow)?));
        }
    }
    let (form, gamma) =
        best.ok_or_else(|| Error::Numerical(format!("no member of the class of {f} in F_eta")))?;
    let stabiliser = stabiliser_of_member(&form)?;
    Ok(Canonical {
        form,
        gamma,
        stabiliser,
    })
}

/// The canonical representative of the class of `f` (DESIGN §3), with `γ` and the
/// stabiliser. Uses the `i128` fast path when it can and big integers otherwise.
pub fn canonical(f: &Form<Integer>) -> Result<Canonical<Integer>> {
    let inv = f.invariants().expect("big integers do not overflow");
    if inv.disc == 0 {
        return Err(Error::ZeroDiscriminant(f.to_string()));
    }
    if f.c.iter().any(|v| v.significant_bits() > 1000) {
        return Err(Error::TooLarge(format!(
            "the coefficients of {f} exceed 1000 bits, beyond what the reduction handles"
        )));
    }
    if let Some(small) = Form::<i128>::try_small(f) {
        match canonical_f64(&small) {
            Ok(c) => return Ok(c.to_big()),
            Err(Error::Overflow) => {}
            Err(e) => return Err(e),
        }
        match canonical_in(&small) {
            Ok(c) => return Ok(c.to_big()),
            Err(Error::Overflow) => {}
            Err(e) => return Err(e),
        }
    }
    canonical_in(f)
}

/// `z(f)` as f64, from the f64 path when it is reliable and from MPFR otherwise.
pub fn approximate_point_f64<T: Int>(f: &Form<T>) -> Result<(f64, f64)> {
    let p = approximate_point(f)?;
    Ok((p.re.to_f64(), p.im.to_f64()))
}

/// Fast path for the builder: whether a table-sized form (Disc ≠ 0) is the canonical
/// representative of its class. `Err(Overflow)` means: ask [`canonical`] instead.
pub fn is_canonical(f: &Form<i128>) -> Result<bool> {
    is_canonical_with(f, point_f64(&coeffs_f64(f)))
}

/// [`is_canonical`] with the f64 point of `f` already computed (`None`: not reliable).
pub fn is_canonical_with(f: &Form<i128>, hint: Option<Point<f64>>) -> Result<bool> {
    let z = match &hint {
        Some(p) => (p.x, p.y),
        None => approximate_point_f64(f)?,
    };
    if !near_f(z, ETA + WINDOW) || !in_f_eta(f, hint.as_ref())? {
        return Ok(false);
    }
    for n in &NEIGHBOURS[1..] {
        if !near_f(move_point(n, z), ETA + WINDOW) {
            continue;
        }
        let h = f
            .act(&Gl2::new(n[0], n[1], n[2], n[3]))
            .ok_or(Error::Overflow)?;
        if h < *f && in_f_eta(&h, None)? {
            return Ok(false);
        }
    }
    Ok(true)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn neighbours_move_points_as_documented() {
        let z = (0.3, 1.7);
        let close = |a: (f64, f64), b: (f64, f64)| (a.0 - b.0).abs() + (a.1 - b.1).abs() < 1e-12;
        assert!(close(move_point(&NEIGHBOURS[0], z), z));
        assert!(close(move_point(&NEIGHBOURS[1], z), (-0.3, 1.7)));
        assert!(close(move_point(&NEIGHBOURS[2], z), (0.7, 1.7)));
        let n = 0.3 * 0.3 + 1.7 * 1.7;
        assert!(close(move_point(&NEIGHBOURS[3], z), (0.3 / n, 1.7 / n)));
        assert!(close(move_point(&NEIGHBOURS[4], z), (-0.3 / n, 1.7 / n)));
        let rho = (0.5, 3f64.sqrt() / 2.0);
        for g in &NEIGHBOURS[5..] {
            assert!(close(move_point(g, rho), rho));
        }
        // Each neighbour is an involution or of order 3 in PGL2(Z): none is the identity.
        for g in &NEIGHBOURS[1..] {
            assert!(!close(move_point(g, z), z));
        }
    }

    #[test]
    fn symmetric_forms_have_their_point_stabilisers() {
        // x⁴ + y⁴: point i, Klein four stabiliser (x ↔ y, x ↦ −x, ...).
        let c = canonical(&Form::from_i64([1, 0, 0, 0, 1])).unwrap();
        assert_eq!(c.form, Form::from_i64([1, 0, 0, 0, 1]));
        assert_eq!(c.stabiliser.len(), 4);
        // xy(x − y)(x + y) has point i, but x ↦ −x and x ↔ y change its sign: only
        // (x, y) ↦ (−y, x) fixes it.
        let c = canonical(&Form::from_i64([0, 1, 0, -1, 0])).unwrap();
        assert_eq!(c.stabiliser.len(), 2, "{:?}", c);
    }

    #[test]
    fn zero_discriminant_is_refused() {
        let e = canonical(&Form::from_i64([1, 2, 1, 0, 0])).unwrap_err();
        assert!(matches!(e, Error::ZeroDiscriminant(_)));
    }

    #[test]
    fn is_canonical_agrees_with_canonical() {
        let f = Form::<Integer>::from_i64([3, -1, 4, 1, -5]);
        let c = canonical(&f).unwrap();
        let small = Form::<i128>::try_small(&c.form).unwrap();
        assert!(is_canonical(&small).unwrap());
        let other = Form::<i128>::try_small(&f).unwrap();
        assert_eq!(is_canonical(&other).unwrap(), other == small);
    }
}
