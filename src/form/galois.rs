//! Factorisation pattern over Q and Galois group of binary quartic forms, exactly.
//!
//! * Rational roots in P¹(Q) come from [`crate::arith::poly::rational_roots`] (a root at infinity
//!   when `a = 0`).
//! * Without rational roots, `f` splits into two rational quadratics iff the resolvent cubic
//!   `φ³ − 3Iφ + J` has an integer root φ (roots are `3a(α₁α₂ + α₃α₄) − c`, DESIGN §2) for
//!   which `D₁ = (φ + c)² − 36ae` and `D₂ = 3(4aφ − P)` are both squares: up to square factors
//!   they are the discriminants of `t² − s t + e/a` (roots α₁α₂, α₃α₄) and of
//!   `u² + (b/a)u + (c/a − s)` (roots α₁+α₂, α₃+α₄), with `s = (φ + c)/(3a)` (derived here).
//! * Galois group of an irreducible quartic: S4/A4 when the resolvent has no rational root
//!   (A4 iff Disc is a square), V4 when it splits, and for exactly one root C4 iff both
//!   `D₁` and `D₂` are squares in Q(√Disc) (L.-C. Kappe and B. Warren, Amer. Math. Monthly
//!   96 (1989), "An elementary test for the Galois group of a quartic polynomial"), else D4.
//!
//! ```
//! use qorbits::form::Form;
//! use qorbits::form::galois::{factor_pattern, galois_group, FactorPattern, GaloisGroup};
//! let f = Form::<i128>::new([1, 0, 0, 0, 2]); // x⁴ + 2y⁴
//! assert_eq!(factor_pattern(&f), Some(FactorPattern::Irreducible));
//! assert_eq!(galois_group(&f), Some(Some(GaloisGroup::D4)));
//! ```

use crate::arith::int::{sum_of_products, Int};
use crate::arith::poly::{integer_roots, rational_roots};
use crate::form::{resolvent_cubic, Form};

/// How a form with non-zero discriminant factors over Q (degrees of the irreducible factors).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum FactorPattern {
    /// Irreducible.
    Irreducible,
    /// Linear times irreducible cubic.
    LinearCubic,
    /// Two irreducible quadratics.
    QuadraticQuadratic,
    /// Two linear factors times an irreducible quadratic.
    LinearLinearQuadratic,
    /// Four linear factors.
    Linear4,
}

impl FactorPattern {
    /// Stable short name, the degrees of the factors: `4`, `1+3`, `2+2`, `1+1+2`, `1+1+1+1`.
    pub fn name(self) -> &'static str {
        match self {
            FactorPattern::Irreducible => "4",
            FactorPattern::LinearCubic => "1+3",
            FactorPattern::QuadraticQuadratic => "2+2",
            FactorPattern::LinearLinearQuadratic => "1+1+2",
            FactorPattern::Linear4 => "1+1+1+1",
        }
    }

    /// Every pattern, in the order of the enum.
    pub const ALL: [FactorPattern; 5] = [
        FactorPattern::Irreducible,
        FactorPattern::LinearCubic,
        FactorPattern::QuadraticQuadratic,
        FactorPattern::LinearLinearQuadratic,
        FactorPattern::Linear4,
    ];

    /// Whether forms with this pattern have no rational root: irreducible, or two
    /// irreducible quadratics. These are the forms whose classes over Q carry 2-Selmer
    /// elements.
    pub fn without_rational_root(self) -> bool {
        matches!(
            self,
            FactorPattern::Irreducible | FactorPattern::QuadraticQuadratic
        )
    }
}

/// Galois group of the splitting field of an irreducible quartic, as a permutation group.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum GaloisGroup {
    /// The symmetric group, order 24.
    S4,
    /// The alternating group, order 12.
    A4,
    /// The dihedral group, order 8.
    D4,
    /// The cyclic group, order 4.
    C4,
    /// The Klein four-group, order 4.
    V4,
}

impl GaloisGroup {
    /// `S4`, `A4`, `D4`, `C4` or `V4`.
    pub fn name(self) -> &'static str {
        match self {
            GaloisGroup::S4 => "S4",
            GaloisGroup::A4 => "A4",
            GaloisGroup::D4 => "D4",
            GaloisGroup::C4 => "C4",
            GaloisGroup::V4 => "V4",
        }
    }

    /// Order of the group.
    pub fn order(self) -> u32 {
        match self {
            GaloisGroup::S4 => 24,
            GaloisGroup::A4 => 12,
            GaloisGroup::D4 => 8,
            GaloisGroup::C4 | GaloisGroup::V4 => 4,
        }
    }

    /// All five, in table order.
    pub const ALL: [GaloisGroup; 5] = [
        GaloisGroup::S4,
        GaloisGroup::A4,
        GaloisGroup::D4,
        GaloisGroup::C4,
        GaloisGroup::V4,
    ];
}

/// Distinct roots of `f` in P¹(Q), as `(x, y)` with `f(x, y) = 0`; `(1, 0)` is infinity.
pub fn rational_points_of_roots<T: Int>(f: &Form<T>) -> Option<Vec<(T, T)>> {
    let mut out = Vec::new();
    let lead = f.c.iter().position(|x| !x.is_zero()).unwrap_or(5);
    if lead > 0 {
        out.push((T::from_i64(1), T::from_i64(0)));
    }
    if lead < 4 {
        out.extend(rational_roots(&f.c[lead..])?);
    }
    Some(out)
}

/// Integer roots of the resolvent cubic `φ³ − 3Iφ + J` ([`crate::form::resolvent_cubic`]).
pub fn resolvent_roots<T: Int>(i: &T, j: &T) -> Option<Vec<T>> {
    integer_roots(&resolvent_cubic(i, j)?)
}

/// `D₁ = (φ + c)² − 36ae` and `D₂ = 3(4aφ − P)` for a resolvent root φ (module doc).
fn pairing_discriminants<T: Int>(f: &Form<T>, phi: &T) -> Option<(T, T)> {
    let [a, _, c, _, e] = &f.c;
    let pc = phi.add(c)?;
    let d1 = sum_of_products(&[(1, &[&pc, &pc]), (-36, &[a, e])])?;
    let d2 = f.resolvent_element(phi)?.mul_i64(3)?;
    Some((d1, d2))
}

/// The factorisation pattern over Q of a form with non-zero discriminant; `None` on overflow.
pub fn factor_pattern<T: Int>(f: &Form<T>) -> Option<FactorPattern> {
    let roots = rational_points_of_roots(f)?.len();
    Some(match roots {
        0 => {
            let (i, j) = (f.i_invariant()?, f.j_invariant()?);
            let mut split = false;
            for phi in resolvent_roots(&i, &j)? {
                let (d1, d2) = pairing_discriminants(f, &phi)?;
                if d1.is_square() && d2.is_square() {
                    split = true;
                    break;
                }
            }
            if split {
                FactorPattern::QuadraticQuadratic
            } else {
                FactorPattern::Irreducible
            }
        }
        1 => FactorPattern::LinearCubic,
        2 => FactorPattern::LinearLinearQuadratic,
        _ => FactorPattern::Linear4,
    })
}

/// Whether `d` is a square in Q(√disc): zero, a square, or `d·disc` a square.
fn square_in_quadratic_field<T: Int>(d: &T, disc: &T) -> Option<bool> {
    Some(d.is_zero() || d.is_square() || d.mul(disc)?.is_square())
}

/// The Galois group of an irreducible form (`Some(None)` for reducible forms), exactly;
/// `None` on overflow.
pub fn galois_group<T: Int>(f: &Form<T>) -> Option<Option<GaloisGroup>> {
    galois_group_with(f, factor_pattern(f)?)
}

/// [`galois_group`] of a form whose [`factor_pattern`] is already known to be `pattern`
/// (it is not computed a second time).
pub fn galois_group_with<T: Int>(
    f: &Form<T>,
    pattern: FactorPattern,
) -> Option<Option<GaloisGroup>> {
    if pattern != FactorPattern::Irreducible {
        return Some(None);
    }
    let inv = f.invariants()?;
    let roots = resolvent_roots(&inv.i, &inv.j)?;
    Some(Some(match roots.len() {
        0 if inv.disc.is_square() => GaloisGroup::A4,
        0 => GaloisGroup::S4,
        1 => {
            let (d1, d2) = pairing_discriminants(f, &roots[0])?;
            if square_in_quadratic_field(&d1, &inv.disc)?
                && square_in_quadratic_field(&d2, &inv.disc)?
            {
                GaloisGroup::C4
            } else {
                GaloisGroup::D4
            }
        }
        _ => GaloisGroup::V4,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn g(c: [i128; 5]) -> Option<GaloisGroup> {
        galois_group(&Form::new(c)).unwrap()
    }

    #[test]
    fn textbook_galois_groups() {
        // Standard textbook examples (e.g. Kappe–Warren 1989, loc. cit.):
        // x⁴ − x − 1: S4; x⁴ + 8x + 12: A4; x⁴ − 2: D4; x⁴ + 5x² + 5: C4; x⁴ + 1: V4.
        assert_eq!(g([1, 0, 0, -1, -1]), Some(GaloisGroup::S4));
        assert_eq!(g([1, 0, 0, 8, 12]), Some(GaloisGroup::A4));
        assert_eq!(g([1, 0, 0, 0, -2]), Some(GaloisGroup::D4));
        assert_eq!(g([1, 0, 5, 0, 5]), Some(GaloisGroup::C4));
        assert_eq!(g([1, 0, 0, 0, 1]), Some(GaloisGroup::V4));
    }

    #[test]
    fn factor_patterns() {
        let p = |c: [i128; 5]| factor_pattern(&Form::new(c)).unwrap();
        // (x² + 1)(x² − 3) = x⁴ − 2x² − 3
        assert_eq!(p([1, 0, -2, 0, -3]), FactorPattern::QuadraticQuadratic);
        // y·(x³ − 2y³): root at infinity and an irreducible cubic
        assert_eq!(p([0, 1, 0, 0, -2]), FactorPattern::LinearCubic);
        // x·y·(x² + y²)
        assert_eq!(p([0, 1, 0, 1, 0]), FactorPattern::LinearLinearQuadratic);
        // (2x − y)(x + y)(x − 3y)(x + 2y)
        let f = [2i128, -1, -14, -5, 6];
        assert_eq!(p(f), FactorPattern::Linear4);
        assert_eq!(p([1, 0, 0, -1, -1]), FactorPattern::Irreducible);
        // (x² + x + 1)(x² − x + 1) = x⁴ + x² + 1: no rational root, 2+2
        assert_eq!(p([1, 0, 1, 0, 1]), FactorPattern::QuadraticQuadratic);
    }
}
