//! Equivalence over Q of integral quartic forms with the same invariants (I, J), through
//! the cubic algebra `L = Q[φ]/(φ³ − 3Iφ + J)` of the resolvent.
//!
//! A form f with invariants (I, J) gives the element `z(f) = (4aφ − P)/3` of L, where
//! `P = 8ac − 3b²`; at a root φᵢ of the resolvent it equals `a²(αⱼ + αₖ − αₗ − αₘ)²/… ` up to
//! the factor 4/3, so it is a square in the splitting field, and its class in `L*/L*²`
//! depends only on the class of f under GL2(Q) acting with the scaling that keeps (I, J).
//! Two forms with the same (I, J) are equivalent over Q exactly when `z(f)·z(g)` is a square
//! in L. The common factor 1/3 cancels in that product, so we work with `w = 4aφ − P`, an
//! element of `Z[φ]`.
//!
//! When the resolvent has rational roots (the curve `E_{I,J}` has rational 2-torsion), L
//! splits into components `Q[φ]/(gₖ)`, one per irreducible factor gₖ of the resolvent
//! (linear, or linear and quadratic), and squares are tested componentwise. On a linear
//! component φ = r the value `4ar − P` can vanish; then w is read off an equivalent form
//! `γ·f` (γ ∈ GL2(Z), which keeps the class) where no component vanishes.
//!
//! The square test is exact both ways:
//! - *not a square*: a degree-one prime 𝔭 = (p, φ − r) of a component, p odd and prime to
//!   the discriminant of gₖ, where `u(r)` is a non-residue mod p. Such a prime exists for
//!   every non-square (Chebotarev in `K(√u)/K`), and it certifies (a square reduces to a
//!   square in the residue field F_p).
//! - *a square*: a square root `s` found numerically from the complex embeddings, scaled by
//!   `D = |disc gₖ|` (which kills the denominators of the integral element s: the index
//!   m = [O_K : Z[φ]] satisfies m² | D), rounded to integers and verified by exact
//!   multiplication `(D·s)² = D²·u` modulo gₖ. The root is first sought in f64 (roots of
//!   gₖ by the closed form), which suffices while `D·s` has small coefficients, and only
//!   then in MPFR; the exact check makes both certain.
//!
//! The test alternates between more primes and more precision until one side certifies.
//!
//! ```
//! use qorbits::form::Form;
//! use qorbits::form::rational::Algebra;
//! use rug::Integer;
//! // x⁴ + 3 and its image under x ↦ x + y have the same invariants and are equivalent.
//! let f = Form::<Integer>::from_i64([1, 0, 0, 0, 3]);
//! let g = Form::<Integer>::from_i64([1, 4, 6, 4, 4]);
//! let l = Algebra::new(&Integer::from(36), &Integer::from(0)).unwrap();
//! let (x, y) = (l.element(&f).unwrap(), l.element(&g).unwrap());
//! assert!(l.equivalent(&x, &y).unwrap());
//! ```

use crate::arith::cubic::{complex_roots, complex_roots_f64, discriminant};
use crate::arith::fp::{self, Field, Fp64};
use crate::arith::primes::odd_primes_from;
use crate::arith::real::Cx;
use crate::arith::small::Small;
use crate::error::{Error, Result};
use crate::form::galois::resolvent_roots;
use crate::form::{resolvent_cubic, Form, Gl2};
use rug::{Complex, Float, Integer};
use std::sync::OnceLock;

/// Degree-one primes whose residue symbols every element gets, also tested before any
/// square root is tried. In the merge of H < 10⁷ every pair of inequivalent elements
/// already differed at one of them (all 16 880 square tests that followed found a square).
const FIRST_PLACES: usize = 16;
/// Degree-one primes added at each further round of the square test.
const MORE_PLACES: usize = 16;
/// The working precision is never raised above this many bits.
const MAX_PREC: u32 = 1 << 20;

/// One factor `g` of the resolvent (monic, irreducible over Q) and its degree-one primes.
#[derive(Clone, Debug)]
struct Component {
    /// Ascending coefficients, monic, degree 1, 2 or 3.
    g: Vec<Integer>,
    /// `|disc g|` (1 for a linear factor).
    disc: Integer,
    /// The first degree-one primes `(p, r)`: p odd, `p ∤ disc`, `g(r) ≡ 0 (mod p)`
    /// ([`FIRST_PLACES`] of them for degree ≥ 2, none for a linear factor).
    places: Vec<(u64, u64)>,
    /// The complex roots of g (degree ≥ 2), at a precision enough for most square tests:
    /// computed at the first numerical square root.
    roots: OnceLock<Vec<Complex>>,
    /// The roots in f64, for the first, cheap attempt at a square root.
    roots_f64: OnceLock<Vec<Cx<f64>>>,
}

impl Component {
    fn new(g: Vec<Integer>) -> Component {
        let disc = discriminant(&g).abs();
        let mut c = Component {
            g,
            disc,
            places: Vec::new(),
            roots: OnceLock::new(),
            roots_f64: OnceLock::new(),
        };
        if c.g.len() > 2 {
            c.places = degree_one_places(&c, 2, FIRST_PLACES);
        }
        c
    }

    /// The complex roots of g at the default precision.
    fn roots(&self) -> &[Complex] {
        self.roots.get_or_init(|| {
            let size = self
                .g
                .iter()
                .map(Integer::significant_bits)
                .max()
                .unwrap_or(1);
            let prec = 128 + 2 * self.disc.significant_bits() + 4 * size + 32;
            complex_roots(&self.g, prec)
        })
    }

    /// The roots in f64 (empty if f64 breaks down).
    fn roots_f64(&self) -> &[Cx<f64>] {
        self.roots_f64
            .get_or_init(|| complex_roots_f64(&self.g).unwrap_or_default())
    }
}

/// The algebra `L = Q[φ]/(φ³ − 3Iφ + J)` of a pair (I, J) with `4I³ ≠ J²`, as a product of
/// number fields.
#[derive(Clone, Debug)]
pub struct Algebra {
    i: Integer,
    j: Integer,
    components: Vec<Component>,
}

/// The element `w = 4aφ − P` of a form in each component of L (ascending coordinates in
/// the power basis of the component), never zero in any component.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Element {
    parts: Vec<Vec<Integer>>,
}

impl Algebra {
    /// The algebra of (I, J); an input error when `4I³ = J²`.
    pub fn new(i: &Integer, j: &Integer) -> Result<Algebra> {
        let d: Integer = Integer::from(4) * i.clone() * i * i - j.clone() * j;
        if d == 0 {
            return Err(Error::Input(format!(
                "(I, J) = ({i}, {j}) has 4I³ = J²: the resolvent cubic has a repeated root"
            )));
        }
        let roots = rational_roots(i, j);
        let i3: Integer = Integer::from(-3) * i;
        let components = match roots.as_slice() {
            [] => {
                let mut g = resolvent_cubic(i, j).expect("big integers").to_vec();
                g.reverse();
                vec![g]
            }
            [r] => {
                let c0: Integer = r.clone() * r + &i3;
                vec![
                    vec![Integer::from(-r), Integer::from(1)],
                    vec![c0, r.clone(), Integer::from(1)],
                ]
            }
            rs => rs
                .iter()
                .map(|r| vec![Integer::from(-r), Integer::from(1)])
                .collect(),
        };
        let components = components.into_iter().map(Component::new).collect();
        Ok(Algebra {
            i: i.clone(),
            j: j.clone(),
            components,
        })
    }

    /// Whether the resolvent has a rational root (L is not a field).
    pub fn splits(&self) -> bool {
        self.components.len() > 1
    }

    /// The degrees of the components of L, e.g. `[3]`, `[1, 2]` or `[1, 1, 1]`.
    pub fn degrees(&self) -> Vec<usize> {
        self.components.iter().map(|c| c.g.len() - 1).collect()
    }

    /// The element `w = 4aφ − P` of `f` (which must have invariants (I, J)), read off an
    /// equivalent form when it vanishes in a component of L.
    pub fn element(&self, f: &Form<Integer>) -> Result<Element> {
        let inv = f.invariants().expect("big integers do not overflow");
        if inv.i != self.i || inv.j != self.j {
            return Err(Error::Input(format!(
                "the form {f} has invariants ({}, {}), not ({}, {})",
                inv.i, inv.j, self.i, self.j
            )));
        }
        // f itself, then (x, y) ↦ f(tx + y, x) for t = 0, 1, −1, 2, −2, …
        let shifts = (0..40i64).map(|k| if k % 2 == 0 { -(k / 2) } else { k / 2 + 1 });
        let forms = std::iter::once(f.clone()).chain(shifts.map(|t| {
            f.act(&Gl2::<Integer>::new(t, 1, 1, 0))
                .expect("big integers")
        }));
        for g in forms {
            if let Some(e) = self.element_of(&g) {
                return Ok(e);
            }
        }
        Err(Error::Numerical(format!(
            "no equivalent form of {f} gives a non-zero element of the resolvent algebra"
        )))
    }

    fn element_of(&self, f: &Form<Integer>) -> Option<Element> {
        let w = |phi: Integer| f.resolvent_element(&phi).expect("big integers");
        // w = 4aφ − P is linear in φ: its coordinates are w(0) and w(1) − w(0).
        let (w0, w1) = (w(Integer::new()), w(Integer::from(1)));
        let slope = Integer::from(&w1 - &w0);
        let mut parts = Vec::with_capacity(self.components.len());
        for c in &self.components {
            let part = if c.g.len() == 2 {
                // φ = −g₀.
                vec![w(Integer::from(-&c.g[0]))]
            } else {
                let mut v = vec![w0.clone(), slope.clone()];
                v.resize(c.g.len() - 1, Integer::new());
                v
            };
            if part.iter().all(|x| *x == 0) {
                return None;
            }
            parts.push(part);
        }
        Some(Element { parts })
    }

    /// Whether the forms of `x` and `y` are equivalent over Q (`x·y` a square in L; the
    /// square test starts with the residue symbols at the first degree-one primes).
    pub fn equivalent(&self, x: &Element, y: &Element) -> Result<bool> {
        for (k, c) in self.components.iter().enumerate() {
            let u = mul_mod(&x.parts[k], &y.parts[k], &c.g);
            if !is_square(&u, c)? {
                return Ok(false);
            }
        }
        Ok(true)
    }

    /// Quadratic residue symbols of `x` at the first degree-one primes of every component
    /// (0 where the prime divides x). Equal symbols at primes where both are non-zero are
    /// necessary for equivalence.
    pub fn residues(&self, x: &Element) -> Vec<i8> {
        let mut out = Vec::new();
        for (k, c) in self.components.iter().enumerate() {
            for &(p, r) in &c.places {
                out.push(symbol_at(&x.parts[k], (p, r)));
            }
        }
        out
    }

    fn conflict(&self, a: &[i8], b: &[i8]) -> bool {
        a.iter().zip(b).any(|(x, y)| x * y == -1)
    }

    /// Sorts elements into classes over Q: the class number of each element, classes
    /// numbered 0, 1, … in order of first appearance.
    pub fn classes(&self, elements: &[Element]) -> Result<Vec<usize>> {
        let symbols: Vec<Vec<i8>> = elements.iter().map(|e| self.residues(e)).collect();
        let mut reps: Vec<usize> = Vec::new();
        let mut out = Vec::with_capacity(elements.len());
        'next: for (n, e) in elements.iter().enumerate() {
            for (k, &r) in reps.iter().enumerate() {
                if !self.conflict(&symbols[n], &symbols[r]) && self.equivalent(e, &elements[r])? {
                    out.push(k);
                    continue 'next;
                }
            }
            out.push(reps.len());
            reps.push(n);
        }
        Ok(out)
    }
}

/// The integer roots of the resolvent `φ³ − 3Iφ + J`: on machine integers when they do
/// not overflow (the same exact search), else on big integers.
fn rational_roots(i: &Integer, j: &Integer) -> Vec<Integer> {
    if let (Some(i), Some(j)) = (i.to_i128(), j.to_i128()) {
        if let Some(roots) = resolvent_roots(&i, &j) {
            return roots.into_iter().map(Integer::from).collect();
        }
    }
    resolvent_roots(i, j).expect("big integers do not overflow")
}

/// The first `count` degree-one primes `(p, r)` of a component with `p ≥ from`.
fn degree_one_places(c: &Component, from: u64, count: usize) -> Vec<(u64, u64)> {
    let mut out = Vec::with_capacity(count);
    for p in odd_primes_from(from) {
        if p >= 1 << 32 {
            break;
        }
        if c.disc.is_divisible_u(p as u32) {
            continue;
        }
        let f = Fp64::new(p);
        let g = fp::reduce_poly(&f, &c.g);
        if p < 1 << 12 {
            fp::roots_by_walking(&f, &g, |r| out.push((p, r)));
        } else {
            out.extend(fp::roots(&f, &g).into_iter().map(|r| (p, r)));
        }
        if out.len() >= count {
            break;
        }
    }
    out
}

/// The residue symbol of `x` (coordinates in the power basis) at the prime `(p, φ − r)`.
fn symbol_at(x: &[Integer], (p, r): (u64, u64)) -> i8 {
    let f = Fp64::new(p);
    f.legendre(&fp::eval(&f, &fp::reduce_poly(&f, x), &r))
}

/// `x·y mod g` (ascending coordinates of length `deg g`).
fn mul_mod(x: &[Integer], y: &[Integer], g: &[Integer]) -> Vec<Integer> {
    let n = g.len() - 1;
    let mut prod = vec![Integer::new(); 2 * n - 1];
    for (i, a) in x.iter().enumerate() {
        for (j, b) in y.iter().enumerate() {
            prod[i + j] += a.clone() * b;
        }
    }
    for k in (n..prod.len()).rev() {
        let t = std::mem::take(&mut prod[k]);
        if t != 0 {
            for (m, gm) in g.iter().take(n).enumerate() {
                prod[k - n + m] -= t.clone() * gm;
            }
        }
    }
    prod.truncate(n);
    prod
}

/// Whether `u` (non-zero, in `Z[φ]/(g)`) is a square in the component; exact (module doc).
fn is_square(u: &[Integer], c: &Component) -> Result<bool> {
    if c.g.len() == 2 {
        return Ok(u[0] > 0 && u[0].is_perfect_square());
    }
    if c.places.iter().any(|&place| symbol_at(u, place) == -1) {
        return Ok(false);
    }
    if f64_root(u, c) {
        return Ok(true);
    }
    let bits = |x: &Integer| x.significant_bits();
    let size = u.iter().chain(&c.g).map(bits).max().unwrap_or(1);
    let mut prec = 128 + 2 * bits(&c.disc) + 2 * size;
    let mut next = c.places.last().map_or(2, |&(p, _)| p + 1);
    loop {
        if let Some(true) = numerical_root(u, c, prec) {
            return Ok(true);
        }
        let more = degree_one_places(c, next, MORE_PLACES);
        if more.iter().any(|&place| symbol_at(u, place) == -1) {
            return Ok(false);
        }
        next = more.last().map_or(next, |&(p, _)| p + 1);
        prec *= 2;
        if prec > MAX_PREC {
            return Err(Error::Numerical(format!(
                "could not decide whether {u:?} is a square modulo {:?}",
                c.g
            )));
        }
    }
}

/// Whether a square root of `u` modulo `g` is found in f64 and verified exactly: the cheap
/// first attempt of [`is_square`], enough while `D·s` has small coefficients. The
/// interpolation is that of [`numerical_root`], written out for degree 2 and 3; the sign of
/// the first embedding's root is fixed (−s is the other root), and a sign pattern whose
/// coefficients are not real to within ¼ is skipped (the coefficients of `D·s` are
/// integers). `false` proves nothing: [`numerical_root`] decides then.
fn f64_root(u: &[Integer], c: &Component) -> bool {
    let theta = c.roots_f64();
    let n = theta.len();
    if n + 1 != c.g.len() {
        return false;
    }
    let scale = c.disc.to_f64();
    let uf: Small<f64, 3> = u.iter().map(Integer::to_f64).collect();
    let mut values: Small<Cx<f64>, 3> = Small::new();
    let mut basis: Small<[Cx<f64>; 3], 3> = Small::new();
    for (i, t) in theta.iter().enumerate() {
        let mut acc = Cx::new(0.0, 0.0);
        for k in (0..n).rev() {
            acc = acc.mul(t).add(&Cx::new(uf[k], 0.0));
        }
        values.push(acc.sqrt());
        // ∏_{j≠i} (x − θⱼ) / (θᵢ − θⱼ), ascending coefficients.
        let others: Small<Cx<f64>, 2> = (0..n)
            .filter(|&j| j != i)
            .map(|j| theta[j].clone())
            .collect();
        let denom = others
            .iter()
            .fold(Cx::new(1.0, 0.0), |d, tj| d.mul(&t.sub(tj)));
        let one = Cx::new(1.0, 0.0);
        let zero = Cx::new(0.0, 0.0);
        let poly = match &others[..] {
            [a] => [a.scale(&-1.0), one, zero],
            [a, b] => [a.mul(b), a.add(b).scale(&-1.0), one],
            _ => return false,
        };
        basis.push(poly.map(|p| p.div(&denom)));
    }
    let target: Vec<Integer> = u.iter().map(|x| x.clone() * &c.disc * &c.disc).collect();
    for signs in 0..(1u32 << (n - 1)) {
        let mut s = Vec::with_capacity(n);
        for k in 0..n {
            let mut co = Cx::new(0.0, 0.0);
            for (i, v) in values.iter().enumerate() {
                let term = v.mul(&basis[i][k]);
                co = if i > 0 && signs >> (i - 1) & 1 == 1 {
                    co.sub(&term)
                } else {
                    co.add(&term)
                };
            }
            let (re, im) = (co.re * scale, co.im * scale);
            if !re.is_finite() || re.abs() >= 2f64.powi(52) {
                return false; // beyond f64's integers, or not finite
            }
            if im.abs() > 0.25 {
                break;
            }
            s.push(Integer::from(re.round() as i64));
        }
        if s.len() == n && mul_mod(&s, &s, &c.g) == target {
            return true;
        }
    }
    false
}

/// A square root of `u` modulo `g` found numerically at precision `prec` and verified
/// exactly: `Some(true)` when verified, `Some(false)` when no rounding verified.
fn numerical_root(u: &[Integer], c: &Component, prec: u32) -> Option<bool> {
    let n = c.g.len() - 1;
    let fresh;
    let theta: &[Complex] = match c.roots().first() {
        Some(r) if r.prec().0 >= prec => c.roots(),
        _ => {
            fresh = complex_roots(&c.g, prec);
            &fresh
        }
    };
    let prec = theta[0].prec().0;
    let values: Vec<Complex> = theta
        .iter()
        .map(|t| {
            let mut acc = Complex::with_val(prec, 0);
            for k in (0..n).rev() {
                acc = acc * t + Float::with_val(prec, &u[k]);
            }
            acc.sqrt()
        })
        .collect();
    // Lagrange basis: coefficient vectors of ∏_{j≠i}(x − θⱼ)/(θᵢ − θⱼ).
    let basis: Vec<Vec<Complex>> = (0..n)
        .map(|i| {
            let mut poly = vec![Complex::with_val(prec, 1)];
            let mut denom = Complex::with_val(prec, 1);
            for (j, tj) in theta.iter().enumerate() {
                if j == i {
                    continue;
                }
                let mut next = vec![Complex::with_val(prec, 0); poly.len() + 1];
                for (k, a) in poly.iter().enumerate() {
                    next[k + 1] += a;
                    next[k] -= Complex::with_val(prec, a * tj);
                }
                poly = next;
                denom *= Complex::with_val(prec, &theta[i] - tj);
            }
            poly.into_iter().map(|a| a / &denom).collect()
        })
        .collect();
    let target: Vec<Integer> = u.iter().map(|x| x.clone() * &c.disc * &c.disc).collect();
    let scale = Float::with_val(prec, &c.disc);
    // The sign of the last embedding's root is fixed: −s is a root as well.
    for signs in 0..(1u32 << (n - 1)) {
        let mut coeffs = vec![Complex::with_val(prec, 0); n];
        for i in 0..n {
            let s = if signs >> i & 1 == 1 {
                Complex::with_val(prec, -&values[i])
            } else {
                values[i].clone()
            };
            for (k, b) in basis[i].iter().enumerate() {
                coeffs[k] += Complex::with_val(prec, &s * b);
            }
        }
        let mut s = Vec::with_capacity(n);
        for co in &coeffs {
            let re = Float::with_val(prec, co.real() * &scale).round();
            s.push(re.to_integer()?);
        }
        if mul_mod(&s, &s, &c.g) == target {
            return Some(true);
        }
    }
    Some(false)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::arith::cubic::{real_root_from_f64, real_root_of_cubic};
    use rug::ops::Pow;

    fn int(v: i64) -> Integer {
        Integer::from(v)
    }

    #[test]
    fn squares_are_recognised_in_a_cubic_field() {
        // L = Q[φ]/(φ³ − 3φ + 1) (I = 1, J = 1 is not eligible, but the algebra exists).
        let l = Algebra::new(&int(1), &int(1)).unwrap();
        let c = &l.components[0];
        for x in [[1, 2, 0], [3, -1, 1], [5, 7, -2], [1000, -3, 17]] {
            let x: Vec<Integer> = x.iter().map(|&v| int(v)).collect();
            let sq = mul_mod(&x, &x, &c.g);
            assert!(is_square(&sq, c).unwrap(), "{x:?}²");
            let minus: Vec<Integer> = sq.iter().map(|v| Integer::from(-v)).collect();
            assert!(
                !is_square(&minus, c).unwrap(),
                "−{x:?}² is negative at a real place"
            );
            let times2: Vec<Integer> = sq.iter().map(|v| Integer::from(2 * v)).collect();
            assert!(!is_square(&times2, c).unwrap(), "2·{x:?}²");
        }
    }

    #[test]
    fn the_f64_square_root_is_found_and_never_wrong() {
        // A cubic field with one real place (φ³ − 6φ + 11, irreducible: no root among ±1,
        // ±11; discriminant 4·6³ − 27·11² < 0) and the quadratic component of
        // φ³ − 3φ − 18 = (φ − 3)(φ² + 3φ + 6) (factored by hand). For squares x² with small
        // coefficients f64 finds the root; for non-squares it never claims one (the check
        // is exact, so a failure here is a wrong root accepted).
        let cubic = Algebra::new(&int(2), &int(11)).unwrap();
        assert_eq!(cubic.degrees(), vec![3]);
        let split = Algebra::new(&int(1), &int(-18)).unwrap();
        assert_eq!(split.degrees(), vec![1, 2]);
        let mut comps: Vec<&Component> = cubic.components.iter().collect();
        comps.extend(split.components.iter().filter(|c| c.g.len() > 2));
        for c in comps {
            let n = c.g.len() - 1;
            for x in [[1, 2, 0], [3, -1, 1], [5, 7, -2], [40, -3, 17]] {
                let x: Vec<Integer> = x[..n].iter().map(|&v| int(v)).collect();
                let sq = mul_mod(&x, &x, &c.g);
                assert!(f64_root(&sq, c), "{:?}: {x:?}²", c.g);
                for k in [-1, 2, 3] {
                    let other: Vec<Integer> = sq.iter().map(|v| Integer::from(k * v)).collect();
                    assert!(!f64_root(&other, c), "{:?}: {k}·{x:?}²", c.g);
                }
            }
        }
    }

    #[test]
    fn roots_of_huge_cubics_take_the_bisection_path() {
        // Coefficients beyond f64's range for the fast path: the fallback must still give a
        // root, and the square test must still decide.
        let i: Integer = Integer::from(10).pow(70) + 7;
        let j: Integer = Integer::from(10).pow(104) * 3 + 1;
        let l = Algebra::new(&i, &j).unwrap();
        assert_eq!(l.degrees(), vec![3]);
        let c = &l.components[0];
        assert!(real_root_from_f64(&c.g, 400).is_none(), "m > 1e100");
        let r = real_root_of_cubic(&c.g, 600);
        let mut v = Float::with_val(700, 1);
        for k in (0..3).rev() {
            v = v * &r + &c.g[k];
        }
        let scale = Float::with_val(700, &j);
        let rel = Float::with_val(700, v.abs_ref()) / scale;
        assert!(rel < 1e-100, "{rel}");
        let x = vec![int(12345), int(-678), int(9)];
        let sq = mul_mod(&x, &x, &c.g);
        assert!(is_square(&sq, c).unwrap());
        let times3: Vec<Integer> = sq.iter().map(|v| Integer::from(3 * v)).collect();
        assert!(!is_square(&times3, c).unwrap());
    }

    #[test]
    fn squares_with_denominators_are_recognised() {
        // φ³ − 3·3φ + 0 = φ(φ² − 9) splits; take a field with a non-monogenic-looking
        // element instead: g = x² − x·0 − 5 (component of (I, J) with a rational root).
        let c = Component::new(vec![int(-5), int(0), int(1)]);
        assert_eq!(c.disc, 20);
        // ((1 + √5)/2)² = (3 + √5)/2 is not in Z[√5], but 4·that = 6 + 2√5 is a square.
        assert!(is_square(&[int(6), int(2)], &c).unwrap());
        assert!(!is_square(&[int(3), int(1)], &c).unwrap());
        assert!(is_square(&[int(5), int(0)], &c).unwrap(), "√5² = 5");
    }

    #[test]
    fn algebra_components_follow_the_resolvent() {
        // I = 3, J = 0: φ³ − 9φ = φ(φ − 3)(φ + 3).
        assert_eq!(
            Algebra::new(&int(3), &int(0)).unwrap().degrees(),
            vec![1, 1, 1]
        );
        // I = 36, J = 0 (x⁴ + 3): φ(φ² − 108).
        assert_eq!(
            Algebra::new(&int(36), &int(0)).unwrap().degrees(),
            vec![1, 2]
        );
        assert_eq!(Algebra::new(&int(-3), &int(27)).unwrap().degrees(), vec![3]);
        assert!(Algebra::new(&int(1), &int(2)).is_err(), "4I³ = J² = 4");
    }
}
