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

pub mod canonical;
pub mod covariant;
pub mod describe;
pub mod galois;
mod gl2;
mod invariants;
pub mod local;
pub mod rational;

pub use invariants::{eligible, form_with_invariants, invariants_from_ij};

use crate::arith::int::{sum_of_products, Int};
use rug::Integer;

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
        // Powers of the linear forms p x + r y and q x + s y, as coefficient arrays in x, y
        // (row k holds the k + 1 coefficients of the k-th power), on the stack.
        let zero = || T::from_i64(0);
        let pow = |u: &T, v: &T| -> Option<[[T; 5]; 5]> {
            let mut out: [[T; 5]; 5] = std::array::from_fn(|_| std::array::from_fn(|_| zero()));
            out[0][0] = T::from_i64(1);
            for k in 1..=4 {
                for i in 0..k {
                    let x = out[k - 1][i].clone();
                    out[k][i] = out[k][i].add(&x.mul(u)?)?;
                    out[k][i + 1] = out[k][i + 1].add(&x.mul(v)?)?;
                }
            }
            Some(out)
        };
        let l1 = pow(p, r)?;
        let l2 = pow(q, s)?;
        let mut out: [T; 5] = std::array::from_fn(|_| zero());
        for k in 0..=4 {
            if self.c[k].is_zero() {
                continue;
            }
            // c_k · (p x + r y)^{4−k} · (q x + s y)^k
            let (u, v) = (&l1[4 - k][..=4 - k], &l2[k][..=k]);
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
    /// The seminvariant `R = b³ + 8a²d − 4abc`; with P it satisfies the syzygy
    /// `27R² = 48·I·a²·P − P³ − 64·J·a³` (DESIGN §2; checked symbolically in the tests).
    pub fn seminvariant_r(&self) -> Option<T> {
        let [a, b, c, d, _] = &self.c;
        sum_of_products(&[(1, &[b, b, b]), (8, &[a, a, d]), (-4, &[a, b, c])])
    }

    /// `w(φ) = 4aφ − P` at a root φ of the resolvent cubic: the element of the resolvent
    /// algebra that classifies the form over Q ([`crate::form::rational`]), and up to the
    /// factor 3 the discriminant of the pairing of the roots that φ describes
    /// ([`crate::form::galois`]).
    pub fn resolvent_element(&self, phi: &T) -> Option<T> {
        sum_of_products(&[(4, &[&self.c[0], phi])])?.sub(&self.seminvariant_p()?)
    }
}

/// The resolvent cubic `φ³ − 3Iφ + J` (descending coefficients); its roots are
/// `3a(α_iα_j + α_kα_l) − c` for the roots α of f(x, 1) (DESIGN §2).
pub fn resolvent_cubic<T: Int>(i: &T, j: &T) -> Option<[T; 4]> {
    Some([T::from_i64(1), T::from_i64(0), i.mul_i64(-3)?, j.clone()])
}
