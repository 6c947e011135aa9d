//! Binary quartic forms: coefficients, the GL2(Z) action, invariants, height, eligibility
//! of (I, J) and the real-root signature (DESIGN §2).
//!
//! Everything here is exact. Functions return `None` when the fast `i128` path would
//! overflow; the same function on `Form<rug::Integer>` never fails.
//!
//! ```
//! use qorbits::form::{Form, Gl2};
//! let f = Form::<i128>::new([1, -2, -3, -1, 5]);
//! let inv = f.invariants().unwrap();
//! assert_eq!((inv.i, inv.j), (63, -1647));
//! // Invariants do not change under GL2(Z): translate x ↦ x + 3y.
//! let g = f.act(&Gl2::new(1, 0, 3, 1)).unwrap();
//! assert_eq!(g.invariants().unwrap(), inv);
//! ```

use crate::int::{sum_of_products, Int};
use rug::Integer;
use std::fmt;

/// The form `a x⁴ + b x³y + c x²y² + d xy³ + e y⁴`, stored as `[a, b, c, d, e]`.
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Form<T> {
    /// Coefficients `[a, b, c, d, e]`.
    pub c: [T; 5],
}

/// A matrix `γ = [[p, q], [r, s]]` of GL2(Z), acting by `(γ·f)(x, y) = f(p x + r y, q x + s y)`.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Gl2<T> {
    /// Entries `[p, q, r, s]`.
    pub m: [T; 4],
}

/// The invariants of a form (DESIGN §2).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Invariants<T> {
    /// `I = 12ae − 3bd + c²`.
    pub i: T,
    /// `J = 72ace + 9bcd − 27ad² − 27eb² − 2c³`.
    pub j: T,
    /// The discriminant, `(4I³ − J²)/27`.
    pub disc: T,
    /// `H4 = max(4|I|³, J²)`, four times the height.
    pub h4: T,
}

/// Number of real roots, and the sign for forms without real roots.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Signature {
    /// Four real roots (Disc > 0).
    FourReal,
    /// Two real roots (Disc < 0).
    TwoReal,
    /// No real root, positive definite (Disc > 0).
    PositiveDefinite,
    /// No real root, negative definite (Disc > 0).
    NegativeDefinite,
}

impl Signature {
    /// Number of real roots in P¹(R).
    pub fn real_roots(self) -> u8 {
        match self {
            Signature::FourReal => 4,
            Signature::TwoReal => 2,
            _ => 0,
        }
    }

    /// A short stable name: `4real`, `2real`, `posdef`, `negdef`.
    pub fn name(self) -> &'static str {
        match self {
            Signature::FourReal => "4real",
            Signature::TwoReal => "2real",
            Signature::PositiveDefinite => "posdef",
            Signature::NegativeDefinite => "negdef",
        }
    }

    /// All four, in table order.
    pub const ALL: [Signature; 4] = [
        Signature::FourReal,
        Signature::TwoReal,
        Signature::PositiveDefinite,
        Signature::NegativeDefinite,
    ];
}

impl<T: Int> Form<T> {
    /// The form with coefficients `[a, b, c, d, e]`.
    pub fn new(c: [T; 5]) -> Self {
        Form { c }
    }

    /// The form from machine integers.
    pub fn from_i64(c: [i64; 5]) -> Self {
        Form {
            c: c.map(T::from_i64),
        }
    }

    /// The same form over [`rug::Integer`].
    pub fn to_big(&self) -> Form<Integer> {
        Form {
            c: std::array::from_fn(|k| self.c[k].to_integer()),
        }
    }

    /// The same form over `i128`, if every coefficient fits.
    pub fn try_small(f: &Form<Integer>) -> Option<Form<T>> {
        let mut out = Vec::with_capacity(5);
        for x in &f.c {
            out.push(T::try_from_integer(x)?);
        }
        Some(Form {
            c: out.try_into().ok()?,
        })
    }

    /// Whether every coefficient is zero.
    pub fn is_zero(&self) -> bool {
        self.c.iter().all(Int::is_zero)
    }

    /// `γ·f`, exactly (DESIGN §2), or `None` on overflow.
    pub fn act(&self, g: &Gl2<T>) -> Option<Form<T>> {
        let [p, q, r, s] = &g.m;
        // Powers of the linear forms p x + r y and q x + s y, as coefficient vectors in x, y.
        let pow = |u: &T, v: &T| -> Option<Vec<Vec<T>>> {
            let mut out = vec![vec![T::from_i64(1)]];
            for k in 1..=4 {
                let prev: &Vec<T> = &out[k - 1];
                let mut next = vec![T::from_i64(0); k + 1];
                for (i, x) in prev.iter().enumerate() {
                    next[i] = next[i].add(&x.mul(u)?)?;
                    next[i + 1] = next[i + 1].add(&x.mul(v)?)?;
                }
                out.push(next);
            }
            Some(out)
        };
        let l1 = pow(p, r)?;
        let l2 = pow(q, s)?;
        let mut out: [T; 5] = std::array::from_fn(|_| T::from_i64(0));
        for k in 0..=4 {
            if self.c[k].is_zero() {
                continue;
            }
            // c_k · (p x + r y)^{4−k} · (q x + s y)^k
            let (u, v) = (&l1[4 - k], &l2[k]);
            for (i, x) in u.iter().enumerate() {
                let cx = self.c[k].mul(x)?;
                for (j, y) in v.iter().enumerate() {
                    out[i + j] = out[i + j].add(&cx.mul(y)?)?;
                }
            }
        }
        Some(Form { c: out })
    }

    /// The scalar multiple `k·f`.
    pub fn scale(&self, k: i64) -> Option<Form<T>> {
        let mut out = self.c.clone();
        for x in out.iter_mut() {
            *x = x.mul_i64(k)?;
        }
        Some(Form { c: out })
    }

    /// `I = 12ae − 3bd + c²`.
    pub fn i_invariant(&self) -> Option<T> {
        let [a, b, c, d, e] = &self.c;
        sum_of_products(&[(12, &[a, e]), (-3, &[b, d]), (1, &[c, c])])
    }

    /// `J = 72ace + 9bcd − 27ad² − 27eb² − 2c³`.
    pub fn j_invariant(&self) -> Option<T> {
        let [a, b, c, d, e] = &self.c;
        sum_of_products(&[
            (72, &[a, c, e]),
            (9, &[b, c, d]),
            (-27, &[a, d, d]),
            (-27, &[e, b, b]),
            (-2, &[c, c, c]),
        ])
    }

    /// I, J, Disc and H4, or `None` on overflow.
    pub fn invariants(&self) -> Option<Invariants<T>> {
        invariants_from_ij(self.i_invariant()?, self.j_invariant()?)
    }

    /// The seminvariant `P = 8ac − 3b²` (DESIGN §2).
    pub fn seminvariant_p(&self) -> Option<T> {
        let [a, b, c, _, _] = &self.c;
        sum_of_products(&[(8, &[a, c]), (-3, &[b, b])])
    }

    /// Real roots and definiteness from exact integer tests (DESIGN §2); `None` on overflow.
    ///
    /// Panics only if called with `disc = 0`, which no caller does: such forms are refused
    /// before they reach the kernel.
    pub fn signature(&self, inv: &Invariants<T>) -> Option<Signature> {
        assert!(
            !inv.disc.is_zero(),
            "signature of a form with zero discriminant"
        );
        if inv.disc.signum() < 0 {
            return Some(Signature::TwoReal);
        }
        let a = &self.c[0];
        if a.is_zero() {
            // The root at infinity is real; with Disc > 0 all four are.
            return Some(Signature::FourReal);
        }
        let p = self.seminvariant_p()?;
        // P² > 16a²I  ⇔  −3·(64a³e − 16a²c² + 16ab²c − 16a²bd − 3b⁴) > 0.
        let lhs = p.mul(&p)?;
        let rhs = sum_of_products(&[(16, &[a, a, &inv.i])])?;
        if p.signum() < 0 && lhs > rhs {
            Some(Signature::FourReal)
        } else if a.signum() > 0 {
            Some(Signature::PositiveDefinite)
        } else {
            Some(Signature::NegativeDefinite)
        }
    }
}

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

impl<T: Int> Gl2<T> {
    /// `[[p, q], [r, s]]`, from machine integers.
    pub fn new(p: i64, q: i64, r: i64, s: i64) -> Self {
        Gl2 {
            m: [p, q, r, s].map(T::from_i64),
        }
    }

    /// The identity.
    pub fn identity() -> Self {
        Self::new(1, 0, 0, 1)
    }

    /// `ps − qr`, or `None` on overflow.
    pub fn det(&self) -> Option<T> {
        let [p, q, r, s] = &self.m;
        p.mul(s)?.sub(&q.mul(r)?)
    }

    /// The matrix product `self · o`. With the action above, `(h·g)·f = h·(g·f)` is written
    /// `f.act(&h.mul(&g))`, i.e. `act(act(f, g), h) = act(f, h·g)`.
    pub fn mul(&self, o: &Gl2<T>) -> Option<Gl2<T>> {
        let [a, b, c, d] = &self.m;
        let [e, f, g, h] = &o.m;
        Some(Gl2 {
            m: [
                a.mul(e)?.add(&b.mul(g)?)?,
                a.mul(f)?.add(&b.mul(h)?)?,
                c.mul(e)?.add(&d.mul(g)?)?,
                c.mul(f)?.add(&d.mul(h)?)?,
            ],
        })
    }

    /// The inverse (entries of an integral matrix of determinant ±1).
    pub fn inverse(&self) -> Option<Gl2<T>> {
        let det = self.det()?;
        let [p, q, r, s] = &self.m;
        let adj = [s.clone(), q.neg()?, r.neg()?, p.clone()];
        let mut out = adj;
        if det.signum() < 0 {
            for x in out.iter_mut() {
                *x = x.neg()?;
            }
        }
        Some(Gl2 { m: out })
    }

    /// The same matrix over [`rug::Integer`].
    pub fn to_big(&self) -> Gl2<Integer> {
        Gl2 {
            m: std::array::from_fn(|k| self.m[k].to_integer()),
        }
    }

    /// `γ` or `−γ`, whichever has its first non-zero entry positive: both act the same way
    /// on quartic forms, so this picks one name per element of PGL2(Z).
    pub fn normalised(&self) -> Option<Gl2<T>> {
        let first = self
            .m
            .iter()
            .find(|x| !x.is_zero())
            .map(|x| x.signum())
            .unwrap_or(1);
        if first >= 0 {
            return Some(self.clone());
        }
        let mut out = self.m.clone();
        for x in out.iter_mut() {
            *x = x.neg()?;
        }
        Some(Gl2 { m: out })
    }
}

impl<T: fmt::Display> fmt::Display for Form<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let [a, b, c, d, e] = &self.c;
        write!(f, "({a}, {b}, {c}, {d}, {e})")
    }
}

impl<T: fmt::Display> fmt::Display for Gl2<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let [p, q, r, s] = &self.m;
        write!(f, "[[{p}, {q}], [{r}, {s}]]")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::ops::Pow;

    #[test]
    fn composition_rule_of_the_action() {
        // DESIGN §2: act(act(f, g), h) = act(f, h·g).
        let f = Form::<i128>::new([3, -1, 4, 1, -5]);
        let g = Gl2::new(2, 1, 1, 1);
        let h = Gl2::new(0, 1, -1, 3);
        let lhs = f.act(&g).unwrap().act(&h).unwrap();
        let rhs = f.act(&h.mul(&g).unwrap()).unwrap();
        assert_eq!(lhs, rhs);
        let back = lhs.act(&h.mul(&g).unwrap().inverse().unwrap()).unwrap();
        assert_eq!(back, f);
    }

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
