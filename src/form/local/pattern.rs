//! The factorisation pattern of f mod p: the degrees (with multiplicities) of the
//! irreducible factors of f over F_p, a root at infinity included, written once over
//! [`Field`] on the residues of the coefficients.
//!
//! For p < 64 the roots are found by a direct search and divided out; what is left has no
//! root: degree 2 or 3 is irreducible, and a quartic is `2^2` when it has a repeated factor;
//! otherwise, for odd p, `2 2` or `4` according as its discriminant is a square mod p or not
//! (Stickelberger: the discriminant of a squarefree polynomial of degree n is a square iff
//! the number of its irreducible factors is ≡ n mod 2); over F_2 the only rootless quartic
//! products of quadratics are squares, so it is `4`.
//!
//! For p ≥ 64 (so p exceeds the degree) the squarefree decomposition `g = lc·Π s_i^i`
//! comes first: a part of degree 1 is a root of multiplicity i, one of degree 2 splits or not
//! by the Legendre symbol of its discriminant, and only a squarefree part of degree 3 or 4
//! goes through root finding as above. When p divides Disc, f mod p has a repeated root in
//! P¹(F̄_p), so no part has degree above 2: the pattern costs a few gcds and one symbol.

use crate::arith::fp::{self, Field, Poly};
use crate::arith::small::Small;
use std::fmt::Write;

/// `(degree, multiplicity)` of the irreducible factors found so far.
type Parts = Small<(u8, u8), 8>;

/// The pattern of the form with the residues `c = [a, b, c, d, e]` (e.g. `1 1^3`, `2 2`,
/// `1^2 2`; `0` when f vanishes mod p).
pub(crate) fn pattern_in<F: Field>(fld: &F, c: [F::E; 5]) -> String {
    if c.iter().all(|x| fld.is_zero(x)) {
        return "0".into();
    }
    let inf = c.iter().take_while(|x| fld.is_zero(x)).count();
    // f(x, 1) in ascending order: e + d x + c x² + b x³ + a x⁴.
    let g = fp::normalise(fld, c.into_iter().rev().collect());
    let mut parts = Parts::new();
    if inf > 0 {
        parts.push((1, inf as u8));
    }
    if fld.small_order().is_some_and(|p| p < 64) {
        by_roots(fld, g, &mut parts);
    } else {
        for (i, s) in fp::squarefree_parts(fld, &g).iter().enumerate() {
            let m = i as u8 + 1;
            match s.len() {
                1 => {}
                2 => parts.push((1, m)),
                3 => {
                    // Monic s = x² + s₁x + s₀; p is odd and s squarefree, so the discriminant
                    // s₁² − 4s₀ is non-zero.
                    let disc = fld.sub(&fld.mul(&s[1], &s[1]), &fld.mul(&fld.elem(4), &s[0]));
                    if fld.legendre(&disc) == 1 {
                        parts.push((1, m));
                        parts.push((1, m));
                    } else {
                        parts.push((2, m));
                    }
                }
                _ => by_roots(fld, s.clone(), &mut parts),
            }
        }
    }
    parts.sort();
    let mut out = String::new();
    for (k, (d, m)) in parts.iter().enumerate() {
        let sep = if k == 0 { "" } else { " " };
        let _ = match m {
            1 => write!(out, "{sep}{d}"),
            _ => write!(out, "{sep}{d}^{m}"),
        };
    }
    out
}

/// The factors of `g` by dividing out its roots, then the rootless rest (module doc).
fn by_roots<F: Field>(fld: &F, mut g: Poly<F::E>, parts: &mut Parts) {
    for r in fp::roots(fld, &g).iter() {
        let lin = [fld.sub(&fld.zero(), r), fld.one()];
        let mut m = 0;
        loop {
            let (q, rem) = fp::divrem(fld, &g, &lin);
            if g.len() <= 1 || !rem.is_empty() {
                break;
            }
            g = q;
            m += 1;
        }
        parts.push((1, m));
    }
    match g.len().saturating_sub(1) {
        0 => {}
        n @ (2 | 3) => parts.push((n as u8, 1)),
        4 => {
            // No linear factor: a repeated factor makes it the square of a quadratic (in
            // characteristic 2 the derivative of a square vanishes, and gcd(g, 0) = g).
            let d = fp::gcd(fld, &g, &fp::derivative(fld, &g));
            if d.len() > 1 {
                parts.push((2, 2));
            } else if fld.small_order() != Some(2) && fld.legendre(&quartic_disc(fld, &g)) == 1 {
                parts.push((2, 1));
                parts.push((2, 1));
            } else {
                parts.push((4, 1));
            }
        }
        _ => unreachable!("degree at most 4"),
    }
}

/// The discriminant of the binary quartic `(a, b, c, d, e)` as a polynomial in its
/// coefficients (the standard 16-term expansion, e.g. `256e³ − 27d⁴` for `x⁴ + dx + e`,
/// the handbook value of DESIGN §6): `(coefficient, exponents of a, b, c, d, e)`. It has
/// integer coefficients, so it holds in every characteristic. Checked against
/// `(4I³ − J²)/27` in the tests.
const DISC_TERMS: [(i64, [u8; 5]); 16] = [
    (256, [3, 0, 0, 0, 3]),
    (-192, [2, 1, 0, 1, 2]),
    (-128, [2, 0, 2, 0, 2]),
    (144, [2, 0, 1, 2, 1]),
    (-27, [2, 0, 0, 4, 0]),
    (144, [1, 2, 1, 0, 2]),
    (-6, [1, 2, 0, 2, 1]),
    (-80, [1, 1, 2, 1, 1]),
    (18, [1, 1, 1, 3, 0]),
    (16, [1, 0, 4, 0, 1]),
    (-4, [1, 0, 3, 2, 0]),
    (-27, [0, 4, 0, 0, 2]),
    (18, [0, 3, 1, 1, 1]),
    (-4, [0, 3, 0, 3, 0]),
    (-4, [0, 2, 3, 0, 1]),
    (1, [0, 2, 2, 2, 0]),
];

/// The discriminant of the quartic `g` (ascending, degree 4) in the field.
fn quartic_disc<F: Field>(fld: &F, g: &[F::E]) -> F::E {
    let coef = [&g[4], &g[3], &g[2], &g[1], &g[0]];
    let mut total = fld.zero();
    for (k, exps) in DISC_TERMS {
        let mut t = fld.elem(k.unsigned_abs());
        for (x, e) in coef.iter().zip(exps) {
            for _ in 0..e {
                t = fld.mul(&t, x);
            }
        }
        total = if k > 0 {
            fld.add(&total, &t)
        } else {
            fld.sub(&total, &t)
        };
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::arith::fp::Fp64;
    use crate::form::Form;
    use rug::Integer;

    #[test]
    fn the_expansion_is_the_discriminant() {
        // Against Disc = (4I³ − J²)/27 of `Form::invariants` on integers, both reduced
        // mod a prime near 2³²: a wrong term would show on almost every random form.
        let fld = Fp64::new(4_294_967_291);
        let mut x = 7u64;
        for _ in 0..2000 {
            let c: [i64; 5] = std::array::from_fn(|_| {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                (x >> 58) as i64 - 32
            });
            let disc = Form::<Integer>::from_i64(c).invariants().unwrap().disc;
            let g: Vec<u64> = c.iter().rev().map(|&v| fld.reduce_i128(v.into())).collect();
            assert_eq!(quartic_disc(&fld, &g), fld.reduce(&disc), "{c:?}");
        }
    }
}
