//! Local data of a form: the factorisation pattern of f mod p, and whether the curve
//! z² = f(x, y) has a point over Q_p (for the primes dividing 2·Disc) and over R.
//!
//! **Q_p test** (derived here; checked against a brute-force search modulo p^k in `tests/local_oracle.rs`). A point
//! exists iff some (x : y) ∈ P¹(Q_p) has f(x, y) ∈ Q_p² (zero included); the line is
//! covered by the discs `x ∈ Z_p` (with y = 1) and `y ∈ pZ_p` (with x = 1). On a disc
//! `x0 + p^k·Z_p`, write `g(x0 + p^k t) = Σ t_i p^{ik} t^i` (Taylor coefficients `t_i`) and
//! `v = v_p(t_0)`, `w = min_{i≥1} v_p(t_i) + ik`:
//! * `t_0 = 0`: a root, hence a point;
//! * `v > 2·v_p(t_1)`: Hensel's lemma gives a root in Z_p, hence a point;
//! * `w > v` (p odd) or `w > v + 2` (p = 2): every value on the disc is `t_0·(1 + p^{w−v}u)`,
//!   in the square class of `t_0`, so the disc has a point iff `t_0` is a square;
//! * otherwise split the disc into its p sub-discs.
//!
//! *Termination.* Along any nested sequence of discs shrinking to β ∈ Z_p: if `g(β) ≠ 0`,
//! v stabilises while w grows with k, so the third case is reached; if `g(β) = 0`, β is a
//! simple root (Disc ≠ 0), `v_p(t_1) → v_p(g'(β))` while `v → ∞`, so the second case is
//! reached. König's lemma then bounds the whole search tree.
//!
//! *Large primes.* For odd `p > 50` the p sub-discs are not visited one by one: with
//! `g(x0 + p^k t) = p^m·ḡ(t)`, ḡ primitive, a sub-disc where `ḡ(r) ≢ 0 (mod p)` is decided by
//! the parity of m and the Legendre symbol of `ḡ(r)`; only the roots of ḡ mod p need a
//! deeper look. A value `ḡ(r)` that is a non-zero square is searched for directly; when
//! none turns up, ḡ is tested for being a constant times a square mod p — if it is not, the
//! Weil bound `|Σ χ(ḡ(r))| ≤ 3√p` guarantees such an r, so a point exists.
//!
//! **Why p ∤ 2·Disc needs no test.** Then f mod p is squarefree of degree 4 (or 3 with a root
//! at infinity), z² = f is a smooth genus-one curve over F_p, which has `p + 1 − a` points
//! with `|a| ≤ 2√p` (Hasse), so at least one, and a smooth F_p-point lifts by Hensel's lemma.
//!
//! **At infinity**: a real point exists unless f is negative definite.
//!
//! **Two paths, one algorithm.** The search ([`qp`]) and the pattern ([`pattern`]) are
//! written once, generic over the integers (checked `i128` or [`rug::Integer`]) and over the
//! field ([`crate::arith::fp`]). The general entry points ([`local_data`], [`qp_soluble`],
//! [`pattern_mod_p`]) take forms and primes of any size. The machine entry points
//! ([`local_data_machine`], [`qp_soluble_machine`], [`pattern_mod_machine`]) take a form on
//! `i128` and primes below 2⁶³ (every prime of a discriminant that fits `i64`); they work
//! on machine integers and fixed arrays, and when a value of the search would not fit
//! `i128` they run the general path on that prime instead, so the answers are the same.
//!
//! ```
//! use qorbits::form::Form;
//! use qorbits::form::local::qp_soluble;
//! use rug::Integer;
//! // 2z² = 1 − 17x⁴ as z'² = f(x, y) with f = (−34, 0, 0, 0, 2): soluble everywhere
//! // locally (Lind 1940, Reichardt 1942).
//! let f = Form::<Integer>::from_i64([-34, 0, 0, 0, 2]);
//! for p in [2u32, 17] {
//!     assert!(qp_soluble(&f, &Integer::from(p)));
//! }
//! ```

mod pattern;
mod qp;

use crate::arith::fp::{with_field, with_machine_field, Field};
use crate::form::{Form, Signature};
use qp::qp_in;
use rug::Integer;
use std::fmt;

// ---------------------------------------------------------------------------------------
// Places and the local data of a form.

/// A place of Q: a prime, or the real place (written `inf`).
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Place<P> {
    /// A prime p.
    Prime(P),
    /// The real place.
    Real,
}

impl<P: fmt::Display> fmt::Display for Place<P> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Place::Prime(p) => write!(f, "{p}"),
            Place::Real => write!(f, "inf"),
        }
    }
}

/// The local data of a form at one place (DESIGN §4).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LocalPlace<P> {
    /// The place.
    pub place: Place<P>,
    /// `v_p(Disc)` at a prime; `None` at the real place.
    pub v_disc: Option<u32>,
    /// Factorisation pattern of f mod p (e.g. `1 1^3`, `0` when f vanishes mod p), or the
    /// signature name at the real place.
    pub pattern: String,
    /// Whether z² = f(x, y) has a point there.
    pub soluble: bool,
}

impl<P> LocalPlace<P> {
    /// The same data with the prime converted (e.g. to a machine integer for a table).
    pub fn map_prime<Q>(self, f: impl FnOnce(P) -> Q) -> LocalPlace<Q> {
        LocalPlace {
            place: match self.place {
                Place::Prime(p) => Place::Prime(f(p)),
                Place::Real => Place::Real,
            },
            v_disc: self.v_disc,
            pattern: self.pattern,
            soluble: self.soluble,
        }
    }
}

/// Everywhere locally soluble: a point at every place listed (the others always have one).
pub fn everywhere_soluble<P>(places: &[LocalPlace<P>]) -> bool {
    places.iter().all(|l| l.soluble)
}

/// The places without a point, in order (primes increasing, then the real place).
pub fn insoluble_places<P>(places: &[LocalPlace<P>]) -> impl Iterator<Item = &Place<P>> {
    places.iter().filter(|l| !l.soluble).map(|l| &l.place)
}

/// The places of 2·Disc in increasing order, each with what `at` computes there (pattern,
/// solubility), then the real place.
fn places<P: Ord>(
    mut primes: Vec<(P, u32)>,
    two: P,
    at: impl Fn(&P) -> (String, bool),
    s: Signature,
) -> Vec<LocalPlace<P>> {
    if !primes.iter().any(|(p, _)| *p == two) {
        primes.push((two, 0));
    }
    primes.sort();
    let mut out: Vec<LocalPlace<P>> = Vec::with_capacity(primes.len() + 1);
    for (p, v) in primes {
        let (pattern, soluble) = at(&p);
        out.push(LocalPlace {
            place: Place::Prime(p),
            v_disc: Some(v),
            pattern,
            soluble,
        });
    }
    out.push(LocalPlace {
        place: Place::Real,
        v_disc: None,
        pattern: s.name().into(),
        soluble: real_soluble(s),
    });
    out
}

/// The local data of f at every prime dividing 2·Disc, in increasing order, then at the
/// real place, given the factorisation of Disc (DESIGN §4).
pub fn local_data(
    f: &Form<Integer>,
    disc_factors: &[(Integer, u32)],
    s: Signature,
) -> Vec<LocalPlace<Integer>> {
    let at = |p: &Integer| (pattern_mod_p(f, p), qp_soluble(f, p));
    places(disc_factors.to_vec(), Integer::from(2), at, s)
}

/// [`local_data`] on the machine path (module doc): f on `i128`, the factorisation of
/// |Disc| on `u64` with primes below 2⁶³ (as [`crate::arith::factor64::factor_u64`] gives
/// it for a discriminant that fits `i64`); the same answer.
pub fn local_data_machine(
    f: &Form<i128>,
    disc_factors: &[(u64, u32)],
    s: Signature,
) -> Vec<LocalPlace<i64>> {
    let primes = disc_factors
        .iter()
        .map(|&(p, e)| (i64::try_from(p).expect("primes below 2^63"), e))
        .collect();
    let at = |&p: &i64| {
        let p = p as u64;
        (pattern_mod_machine(f, p), qp_soluble_machine(f, p))
    };
    places(primes, 2, at, s)
}

/// Whether z² = f(x, y) has a real point: unless f is negative definite.
pub fn real_soluble(s: Signature) -> bool {
    s != Signature::NegativeDefinite
}

/// Degrees (with multiplicities) of the irreducible factors of f mod p, a root at
/// infinity included, e.g. `1 1^3`, `2 2`, `1^2 2`; `0` when f vanishes mod p (the method
/// is in [`pattern`]).
pub fn pattern_mod_p(f: &Form<Integer>, p: &Integer) -> String {
    with_field!(p, |fld| pattern::pattern_in(
        fld,
        f.c.each_ref().map(|x| fld.reduce(x))
    ))
}

/// [`pattern_mod_p`] on machine integers, for a prime `p < 2⁶³`.
pub fn pattern_mod_machine(f: &Form<i128>, p: u64) -> String {
    with_machine_field!(p, |fld| pattern::pattern_in(
        fld,
        f.c.map(|x| fld.reduce_i128(x))
    ))
}

/// Whether z² = f(x, y) has a point over Q_p (p prime, Disc(f) ≠ 0).
pub fn qp_soluble(f: &Form<Integer>, p: &Integer) -> bool {
    with_field!(p, |fld| qp_in(fld, &f.c, p)).expect("big integers do not overflow")
}

/// [`qp_soluble`] on machine integers for a prime `p < 2⁶³`; when a value of the search
/// would not fit `i128`, the same search runs on big integers.
pub fn qp_soluble_machine(f: &Form<i128>, p: u64) -> bool {
    with_machine_field!(p, |fld| qp_in(fld, &f.c, &i128::from(p)))
        .unwrap_or_else(|| qp_soluble(&f.to_big(), &Integer::from(p)))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn form(c: [i64; 5]) -> Form<Integer> {
        Form::from_i64(c)
    }

    #[test]
    fn patterns_mod_p_by_hand() {
        // x⁴ − 1 = (x − 1)(x + 1)(x² + 1) mod 3, and −1 is not a square mod 3.
        assert_eq!(pattern_mod_p(&form([1, 0, 0, 0, -1]), &3.into()), "1 1 2");
        // mod 5 it splits completely (2² ≡ −1).
        assert_eq!(pattern_mod_p(&form([1, 0, 0, 0, -1]), &5.into()), "1 1 1 1");
        // x⁴ + 1 mod 2 is (x + 1)⁴; 3·(x² + 1)(x² + 2) mod 7 has no roots: 2 2.
        assert_eq!(pattern_mod_p(&form([1, 0, 0, 0, 1]), &2.into()), "1^4");
        assert_eq!(pattern_mod_p(&form([3, 0, 9, 0, 6]), &7.into()), "2 2");
        // y·(x³ − 2y³) mod 7: root at infinity and an irreducible cubic (2 is not a cube
        // mod 7: the cubes are 0, 1, 6).
        assert_eq!(pattern_mod_p(&form([0, 1, 0, 0, -2]), &7.into()), "1 3");
        assert_eq!(pattern_mod_p(&form([7, 14, 0, 21, 7]), &7.into()), "0");
        // The same on a prime above 2³² (the big-integer field).
        let big = Integer::from(4_294_967_311u64); // the first prime after 2³² (from memory)
        assert_eq!(pattern_mod_p(&form([1, 0, 0, 0, -1]), &big), "1 1 2");
    }

    #[test]
    fn qp_solubility_on_known_curves() {
        // z² = x⁴ − 3y⁴ over Q_3: v(f) is even only where 3 ∤ x, and then f ≡ 1 mod 3 is a
        // square: soluble. z² = 3x⁴ + 3y⁴… has odd valuation at small discs but the point
        // (1 : 1) gives 6 = 2·3, not a square in Q_3; every (x : y) gives 3·(x⁴ + y⁴) with
        // x⁴ + y⁴ ≢ 0 mod 3 (fourth powers are 0, 1), so v_3 is odd: insoluble.
        assert!(qp_soluble(&form([1, 0, 0, 0, -3]), &3.into()));
        assert!(!qp_soluble(&form([3, 0, 0, 0, 3]), &3.into()));
        // Over Q_2: z² = −x⁴ − y⁴ has no real point but x⁴ + y⁴ ≡ 1, 2 mod 16 makes
        // −(x⁴ + y⁴) ≡ 7 mod 8 or 2·odd: not a square in Q_2 either.
        assert!(!qp_soluble(&form([-1, 0, 0, 0, -1]), &2.into()));
        assert!(!real_soluble(Signature::NegativeDefinite));
    }

    #[test]
    fn local_data_lists_two_then_the_real_place() {
        let f = form([1, 0, 0, 0, 2]); // x⁴ + 2y⁴, Disc = 2048 = 2¹¹
        let places = local_data(&f, &[(Integer::from(2), 11)], Signature::PositiveDefinite);
        let names: Vec<String> = places.iter().map(|l| l.place.to_string()).collect();
        assert_eq!(names, ["2", "inf"]);
        assert_eq!(places[0].v_disc, Some(11));
        assert!(everywhere_soluble(&places), "(1 : 0) gives z² = 1");
        assert_eq!(insoluble_places(&places).count(), 0);
    }
}
