//! Exact decisions for covariant points on the boundary of `F_η` from the symmetries of the
//! form: an element g of PGL2(Z) with g·f = ±f puts z(f) on the fixed set of g (DESIGN §3),
//! so points on a mirror of F, at i or at e^{πi/3}, need no multiple-precision recomputation.

use super::{boundary_distances, NEIGHBOURS, WINDOW};
use crate::arith::int::Int;
use crate::error::{Error, Result};
use crate::form::covariant::Point;
use crate::form::{Form, Gl2};

/// Where the elements of [`NEIGHBOURS`] (after the identity) fix points of H: the line or
/// circle of a reflection, or the one fixed point of a rotation. Index k + 1 of NEIGHBOURS
/// has `FIXED[k]`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Fixed {
    /// Re z = 0 (z ↦ −z̄), boundary piece 0.
    LineZero,
    /// Re z = ½ (z ↦ 1 − z̄), boundary piece 1.
    LineHalf,
    /// |z| = 1 (z ↦ 1/z̄), boundary piece 2.
    Circle,
    /// |z − 1| = 1 (z ↦ z̄/(z̄ − 1)), not a boundary piece.
    CircleOne,
    /// The point i (z ↦ −1/z).
    PointI,
    /// The point e^{πi/3} (the rotations of order 3).
    PointRho,
}

const FIXED: [Fixed; 7] = [
    Fixed::LineZero,
    Fixed::LineHalf,
    Fixed::Circle,
    Fixed::PointI,
    Fixed::PointRho,
    Fixed::PointRho,
    Fixed::CircleOne,
];

/// [`decide`] for a point near the boundary of `F_η` from the symmetries of `f`: if g·f = ±f
/// for g ∈ PGL2(Z) then z(f) = z(g·f) = g(z(f)) (DESIGN §3), so z(f) lies exactly on the
/// fixed set of g. Two such sets that meet (or a rotation) give the point exactly — i or
/// e^{πi/3}, both in `F_η` — and one line gives the distance to its boundary piece exactly
/// (+η, inside); the pieces the point is not near are decided from the f64 point as in
/// [`decide`]. `None` when the symmetries do not settle it (then MPFR decides).
pub(super) fn decide_by_symmetry<T: Int>(f: &Form<T>, p: &Point<f64>) -> Result<Option<bool>> {
    let minus = f.scale(-1).ok_or(Error::Overflow)?;
    let mut fixed = Vec::new();
    for (n, kind) in NEIGHBOURS[1..].iter().zip(FIXED) {
        let g = f
            .act(&Gl2::new(n[0], n[1], n[2], n[3]))
            .ok_or(Error::Overflow)?;
        if g == *f || g == minus {
            fixed.push(kind);
        }
    }
    let has = |k: Fixed| fixed.contains(&k);
    let lines = [
        Fixed::LineZero,
        Fixed::LineHalf,
        Fixed::Circle,
        Fixed::CircleOne,
    ];
    let on: Vec<Fixed> = lines.into_iter().filter(|k| has(*k)).collect();
    if has(Fixed::PointI) || has(Fixed::PointRho) || on.len() >= 2 {
        // z(f) is i or e^{πi/3} (Re z = 0 and Re z = ½ never meet in H): inside F_η.
        return Ok(Some(!(has(Fixed::LineZero) && has(Fixed::LineHalf))));
    }
    let d = boundary_distances(&p.x, &p.y);
    let piece_line = [Fixed::LineZero, Fixed::LineHalf, Fixed::Circle];
    let mut inside = true;
    for (k, dist) in d.iter().enumerate() {
        if on.first() == Some(&piece_line[k]) {
            continue; // exactly on this piece's line: distance +η
        }
        if dist.abs() <= WINDOW {
            return Ok(None);
        }
        inside &= *dist >= 0.0;
    }
    Ok(Some(inside))
}
