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

use crate::arith::fp::{self, with_field, Field};
use crate::arith::primes::powers_text;
use crate::form::{Form, Signature};
use rug::ops::Pow;
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

/// The local data of f at every prime dividing 2·Disc, in increasing order, then at the
/// real place, given the factorisation of Disc (DESIGN §4).
pub fn local_data(
    f: &Form<Integer>,
    disc_factors: &[(Integer, u32)],
    s: Signature,
) -> Vec<LocalPlace<Integer>> {
    let mut primes: Vec<(Integer, u32)> = disc_factors.to_vec();
    if !primes.iter().any(|(p, _)| *p == 2) {
        primes.push((Integer::from(2), 0));
    }
    primes.sort();
    let mut places: Vec<LocalPlace<Integer>> = primes
        .into_iter()
        .map(|(p, v)| LocalPlace {
            pattern: pattern_mod_p(f, &p),
            soluble: qp_soluble(f, &p),
            v_disc: Some(v),
            place: Place::Prime(p),
        })
        .collect();
    places.push(LocalPlace {
        place: Place::Real,
        v_disc: None,
        pattern: s.name().into(),
        soluble: real_soluble(s),
    });
    places
}

/// Whether z² = f(x, y) has a real point: unless f is negative definite.
pub fn real_soluble(s: Signature) -> bool {
    s != Signature::NegativeDefinite
}

// ---------------------------------------------------------------------------------------
// The factorisation pattern of f mod p.

/// Degrees (with multiplicities) of the irreducible factors of f mod p, a root at
/// infinity included, e.g. `1 1^3`, `2 2`, `1^2 2`; `0` when f vanishes mod p.
///
/// A quartic without roots mod p is `2^2` when it has a repeated factor; otherwise, for odd
/// p, `2 2` or `4` according as its discriminant is a square mod p or not (Stickelberger:
/// the discriminant of a squarefree polynomial of degree n is a square iff the number of
/// its irreducible factors is ≡ n mod 2); over F_2 the only rootless quartic products of
/// quadratics are squares, so it is `4`.
pub fn pattern_mod_p(f: &Form<Integer>, p: &Integer) -> String {
    with_field!(p, |fld| pattern_in(fld, f))
}

fn pattern_in<F: Field>(fld: &F, f: &Form<Integer>) -> String {
    let c: Vec<F::E> = f.c.iter().map(|x| fld.reduce(x)).collect();
    if c.iter().all(|x| fld.is_zero(x)) {
        return "0".into();
    }
    let inf = c.iter().take_while(|x| fld.is_zero(x)).count() as u32;
    // f(x, 1) in ascending order: e + d x + c x² + b x³ + a x⁴.
    let mut g = fp::normalise(fld, c.into_iter().rev().collect());
    let mut parts: Vec<(usize, u32)> = Vec::new();
    if inf > 0 {
        parts.push((1, inf));
    }
    for r in fp::roots(fld, &g) {
        let lin = vec![fld.sub(&fld.zero(), &r), fld.one()];
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
        2 | 3 => parts.push((g.len() - 1, 1)),
        4 => {
            // No linear factor: a repeated factor makes it the square of a quadratic (in
            // characteristic 2 the derivative of a square vanishes, and gcd(g, 0) = g).
            let d = fp::gcd(fld, &g, &fp::derivative(fld, &g));
            if d.len() > 1 {
                parts.push((2, 2));
            } else if fld.order() != 2 && fld.legendre(&quartic_disc(fld, &g)) == 1 {
                parts.push((2, 1));
                parts.push((2, 1));
            } else {
                parts.push((4, 1));
            }
        }
        _ => unreachable!("degree at most 4"),
    }
    parts.sort();
    powers_text(&parts)
}

/// The discriminant mod p of the quartic `g` (ascending), from the invariants of the binary
/// form: `27·Disc = 4I³ − J²` (DESIGN §2).
fn quartic_disc<F: Field>(fld: &F, g: &[F::E]) -> F::E {
    let c: [Integer; 5] = std::array::from_fn(|k| fld.to_integer(&g[4 - k]));
    fld.reduce(&Form::new(c).invariants().expect("big integers").disc)
}

// ---------------------------------------------------------------------------------------
// Solubility over Q_p.

fn val(n: &Integer, p: &Integer) -> u32 {
    if *n == 0 {
        return u32::MAX;
    }
    let mut m = n.clone();
    let mut v = 0;
    while m.is_divisible(p) {
        m /= p;
        v += 1;
    }
    v
}

/// Whether the non-zero integer `n` is a square in Q_p.
fn is_square_qp(n: &Integer, p: &Integer) -> bool {
    let v = val(n, p);
    if v % 2 == 1 {
        return false;
    }
    let u = n / p.clone().pow(v);
    if *p == 2 {
        u.mod_u(8) == 1
    } else {
        with_field!(p, |fld| fld.legendre(&fld.reduce(&u)) == 1)
    }
}

/// Taylor coefficients of g at x0 (g ascending): `g(x0 + y) = Σ t_i y^i`.
fn taylor(g: &[Integer], x0: &Integer) -> Vec<Integer> {
    let mut t = g.to_vec();
    let n = t.len();
    for i in 0..n {
        for j in (i..n - 1).rev() {
            let add = Integer::from(&t[j + 1] * x0);
            t[j] += add;
        }
    }
    t
}

fn disc_soluble(g: &[Integer], p: &Integer, x0: Integer, k: u32) -> bool {
    let t = taylor(g, &x0);
    if t[0] == 0 {
        return true;
    }
    let v = val(&t[0], p);
    if t.len() > 1 && t[1] != 0 && v > 2 * val(&t[1], p) {
        return true; // Hensel
    }
    let w = t
        .iter()
        .enumerate()
        .skip(1)
        .filter(|(_, c)| **c != 0)
        .map(|(i, c)| val(c, p) as u64 + i as u64 * k as u64)
        .min()
        .unwrap_or(u64::MAX);
    let margin = if *p == 2 { 2 } else { 0 };
    if w > v as u64 + margin {
        return is_square_qp(&t[0], p);
    }
    let pk = p.clone().pow(k);
    if *p > 50 {
        return large_prime_split(g, &t, p, &x0, &pk, k);
    }
    let pu = p.to_u32().expect("small prime");
    (0..pu).any(|r| disc_soluble(g, p, &x0 + Integer::from(&pk * r), k + 1))
}

/// The sub-disc step for odd p > 50 (module doc, "Large primes").
fn large_prime_split(
    g: &[Integer],
    t: &[Integer],
    p: &Integer,
    x0: &Integer,
    pk: &Integer,
    k: u32,
) -> bool {
    // h(s) = Σ t_i p^{ik} s^i = p^m·ḡ(s).
    let h: Vec<Integer> = t
        .iter()
        .enumerate()
        .map(|(i, c)| c * pk.clone().pow(i as u32))
        .collect();
    let m = h
        .iter()
        .filter(|c| **c != 0)
        .map(|c| val(c, p))
        .min()
        .expect("non-zero");
    let pm = p.clone().pow(m);
    let gbar: Vec<Integer> = h.iter().map(|c| Integer::from(c / &pm)).collect();
    let deeper = with_field!(p, |fld| residue_split(fld, &gbar, m % 2 == 0));
    match deeper {
        Ok(decided) => decided,
        Err(roots) => roots
            .into_iter()
            .any(|r| disc_soluble(g, p, x0 + (pk * r), k + 1)),
    }
}

/// The F_p part of [`large_prime_split`]: `Ok(found)` when the residues of ḡ decide the
/// disc, else `Err(roots of ḡ mod p)`, the sub-discs that need a deeper look.
fn residue_split<F: Field>(
    fld: &F,
    gbar: &[Integer],
    even: bool,
) -> std::result::Result<bool, Vec<Integer>> {
    let gbar = fp::reduce_poly(fld, gbar);
    if even {
        for r in 0u64..64 {
            if fld.legendre(&fp::eval(fld, &gbar, &fld.elem(r))) == 1 {
                return Ok(true);
            }
        }
        if gbar.len() == 1 {
            return Ok(false); // a constant non-square (or the search above found it)
        }
        if !fp::is_constant_times_square(fld, &gbar) {
            // Weil: Σ_r χ(ḡ(r)) ≥ −3√p, and fewer than 5 roots, so some ḡ(r) is a non-zero
            // square once p − 3√p − 4 > 0, true for p > 50.
            return Ok(true);
        }
    }
    Err(fp::roots(fld, &gbar)
        .iter()
        .map(|r| fld.to_integer(r))
        .collect())
}

/// Whether z² = f(x, y) has a point over Q_p (p prime, Disc(f) ≠ 0).
pub fn qp_soluble(f: &Form<Integer>, p: &Integer) -> bool {
    // x ∈ Z_p, y = 1: g(x) = f(x, 1), ascending.
    let g1: Vec<Integer> = f.c.iter().rev().cloned().collect();
    // x = 1, y = p·t: g(t) = f(1, p t) = Σ c_k p^k t^k.
    let g2: Vec<Integer> =
        f.c.iter()
            .enumerate()
            .map(|(k, c)| c * p.clone().pow(k as u32))
            .collect();
    disc_soluble(&g1, p, Integer::new(), 0) || disc_soluble(&g2, p, Integer::new(), 0)
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
