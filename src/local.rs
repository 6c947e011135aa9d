//! Local data of a form: the factorisation pattern of f mod p, and whether the curve
//! z² = f(x, y) has a point over Q_p (for the primes dividing 2·Disc) and over R.
//!
//! **Q_p test** (derived here, module tests check it against a brute-force oracle). A point
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
//! use qorbits::local::qp_soluble;
//! use rug::Integer;
//! // 2z² = 1 − 17x⁴ as z'² = f(x, y) with f = (−34, 0, 0, 0, 2): soluble everywhere
//! // locally (Lind 1940, Reichardt 1942).
//! let f = Form::<Integer>::from_i64([-34, 0, 0, 0, 2]);
//! for p in [2u32, 17] {
//!     assert!(qp_soluble(&f, &Integer::from(p)));
//! }
//! ```

use crate::form::{Form, Signature};
use rug::ops::Pow;
use rug::Integer;

// ---------------------------------------------------------------------------------------
// Polynomials over F_p (ascending coefficients, no trailing zeros).

/// `x mod p` in `0..p`.
fn md(x: &Integer, p: &Integer) -> Integer {
    let r = Integer::from(x % p);
    if r < 0 {
        r + p
    } else {
        r
    }
}

fn norm(mut a: Vec<Integer>, p: &Integer) -> Vec<Integer> {
    for c in a.iter_mut() {
        *c = md(c, p);
    }
    while a.last().is_some_and(|c| *c == 0) {
        a.pop();
    }
    a
}

fn pmul(a: &[Integer], b: &[Integer], p: &Integer) -> Vec<Integer> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![Integer::new(); a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] += Integer::from(x * y);
        }
    }
    norm(out, p)
}

fn inv(a: &Integer, p: &Integer) -> Integer {
    a.clone().invert(p).expect("unit mod p")
}

/// `a mod b` over F_p.
fn prem(a: &[Integer], b: &[Integer], p: &Integer) -> Vec<Integer> {
    let mut r = a.to_vec();
    let lb = inv(b.last().expect("non-zero divisor"), p);
    while r.len() >= b.len() {
        let shift = r.len() - b.len();
        let q = Integer::from(r.last().unwrap() * &lb) % p;
        for (i, c) in b.iter().enumerate() {
            r[i + shift] -= Integer::from(&q * c);
        }
        r = norm(r, p);
    }
    r
}

fn pgcd(a: &[Integer], b: &[Integer], p: &Integer) -> Vec<Integer> {
    let (mut x, mut y) = (a.to_vec(), b.to_vec());
    while !y.is_empty() {
        let r = prem(&x, &y, p);
        x = y;
        y = r;
    }
    if let Some(l) = x.last() {
        let li = inv(l, p);
        x = norm(x.iter().map(|c| Integer::from(c * &li)).collect(), p);
    }
    x
}

/// `base^e mod (m, p)`.
fn ppow(base: &[Integer], e: &Integer, m: &[Integer], p: &Integer) -> Vec<Integer> {
    let mut result = vec![Integer::from(1)];
    let mut b = prem(base, m, p);
    let bits = e.significant_bits();
    for i in 0..bits {
        if e.get_bit(i) {
            result = prem(&pmul(&result, &b, p), m, p);
        }
        b = prem(&pmul(&b, &b, p), m, p);
    }
    result
}

fn psub(a: &[Integer], b: &[Integer], p: &Integer) -> Vec<Integer> {
    let n = a.len().max(b.len());
    let v = (0..n)
        .map(|i| a.get(i).cloned().unwrap_or_default() - b.get(i).cloned().unwrap_or_default())
        .collect();
    norm(v, p)
}

fn deriv(a: &[Integer], p: &Integer) -> Vec<Integer> {
    norm(
        a.iter()
            .enumerate()
            .skip(1)
            .map(|(i, c)| Integer::from(c * i as u32))
            .collect(),
        p,
    )
}

/// Distinct roots in F_p of a non-zero polynomial (Cantor–Zassenhaus splitting of
/// `gcd(g, x^p − x)`).
fn roots_mod_p(g: &[Integer], p: &Integer) -> Vec<Integer> {
    let g = norm(g.to_vec(), p);
    if g.len() <= 1 {
        return Vec::new();
    }
    let x = vec![Integer::new(), Integer::from(1)];
    let xp = ppow(&x, p, &g, p);
    let mut lin = pgcd(&g, &psub(&xp, &x, p), p);
    if lin.len() <= 1 {
        return Vec::new();
    }
    let mut out = Vec::new();
    let mut stack = vec![std::mem::take(&mut lin)];
    let half = Integer::from(p - 1u32) / 2u32;
    while let Some(h) = stack.pop() {
        match h.len() {
            0 | 1 => {}
            2 => out.push(md(&(Integer::from(-&h[0]) * inv(&h[1], p)), p)),
            _ => {
                if *p == 2 {
                    // Only 0 and 1 can be roots.
                    for r in [0u32, 1] {
                        let v: Integer = h.iter().rev().fold(Integer::new(), |acc, c| acc * r + c);
                        if v.is_divisible(p) {
                            out.push(Integer::from(r));
                        }
                    }
                    continue;
                }
                let mut split = false;
                for d in 0u32.. {
                    let t = vec![Integer::from(d), Integer::from(1)];
                    let s = psub(&ppow(&t, &half, &h, p), &[Integer::from(1)], p);
                    let f = pgcd(&h, &s, p);
                    if f.len() > 1 && f.len() < h.len() {
                        let q = pdiv(&h, &f, p);
                        stack.push(f);
                        stack.push(q);
                        split = true;
                        break;
                    }
                    if *p <= d {
                        break;
                    }
                }
                assert!(split, "a product of distinct linear factors splits");
            }
        }
    }
    out.sort();
    out.dedup();
    out
}

/// Exact quotient `a / b` over F_p.
fn pdiv(a: &[Integer], b: &[Integer], p: &Integer) -> Vec<Integer> {
    let mut r = a.to_vec();
    let lb = inv(b.last().unwrap(), p);
    let mut q = vec![Integer::new(); a.len() - b.len() + 1];
    while r.len() >= b.len() {
        let shift = r.len() - b.len();
        let c = Integer::from(r.last().unwrap() * &lb) % p;
        for (i, x) in b.iter().enumerate() {
            r[i + shift] -= Integer::from(&c * x);
        }
        q[shift] = c;
        r = norm(r, p);
    }
    norm(q, p)
}

fn legendre_square(a: &Integer, p: &Integer) -> bool {
    // a a non-zero residue mod odd p: Euler's criterion.
    let e = Integer::from(p - 1u32) / 2u32;
    Integer::from(a.pow_mod_ref(&e, p).expect("p > 0")) == 1
}

/// Whether `g` (a polynomial of degree ≥ 1 over F_p, p odd) is a constant times a square.
fn is_constant_times_square(g: &[Integer], p: &Integer) -> bool {
    if g.len() % 2 == 0 {
        return false; // odd degree
    }
    // Squarefree part: g = c·s² iff every root multiplicity over the algebraic closure is
    // even iff gcd(g, g') has degree (deg g)/2 and g / gcd² is constant.
    let d = pgcd(g, &deriv(g, p), p);
    if d.len() != g.len() / 2 + 1 {
        return false;
    }
    let s2 = pmul(&d, &d, p);
    prem(g, &s2, p).is_empty() && pdiv(g, &s2, p).len() == 1
}

// ---------------------------------------------------------------------------------------
// The factorisation pattern of f mod p.

/// Distinct roots mod p of `g` (ascending, reduced, non-zero): on machine integers for
/// `p < 2³²` ([`crate::fp::roots`]), else by [`roots_mod_p`].
fn roots_any(g: &[Integer], p: &Integer) -> Vec<Integer> {
    match p.to_u64().filter(|q| *q < 1 << 32) {
        Some(q) => {
            let c: Vec<u64> = g
                .iter()
                .map(|x| x.to_u64().expect("reduced mod p"))
                .collect();
            crate::fp::roots(&c, q)
                .into_iter()
                .map(Integer::from)
                .collect()
        }
        None => roots_mod_p(g, p),
    }
}

/// The discriminant of the quartic `g` (ascending) mod p, from the invariants of the binary
/// form: `27·Disc = 4I³ − J²` (DESIGN §2).
fn quartic_disc_mod_p(g: &[Integer], p: &Integer) -> Integer {
    let f = Form::new([
        g[4].clone(),
        g[3].clone(),
        g[2].clone(),
        g[1].clone(),
        g[0].clone(),
    ]);
    md(&f.invariants().expect("big integers").disc, p)
}

/// Degrees (with multiplicities) of the irreducible factors of f mod p, a root at
/// infinity included, e.g. `1 1^3`, `2 2`, `1^2 2`; `0` when f vanishes mod p.
///
/// A quartic without roots mod p is `2^2` when it has a repeated factor; otherwise, for odd
/// p, `2 2` or `4` according as its discriminant is a square mod p or not (Stickelberger:
/// the discriminant of a squarefree polynomial of degree n is a square iff the number of
/// its irreducible factors is ≡ n mod 2); over F_2 the only rootless quartic products of
/// quadratics are squares, so it is `4`.
pub fn pattern_mod_p(f: &Form<Integer>, p: &Integer) -> String {
    let c: Vec<Integer> = f.c.iter().map(|x| md(x, p)).collect();
    if c.iter().all(|x| *x == 0) {
        return "0".into();
    }
    let inf = c.iter().take_while(|x| **x == 0).count();
    // f(x, 1) in ascending order: e + d x + c x² + b x³ + a x⁴.
    let mut g = norm(c.iter().rev().cloned().collect(), p);
    let mut parts: Vec<(usize, usize)> = Vec::new();
    if inf > 0 {
        parts.push((1, inf));
    }
    for r in roots_any(&g, p) {
        let lin = vec![md(&Integer::from(-&r), p), Integer::from(1)];
        let mut m = 0;
        while g.len() > 1 && prem(&g, &lin, p).is_empty() {
            g = pdiv(&g, &lin, p);
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
            let d = pgcd(&g, &deriv(&g, p), p);
            if d.len() > 1 {
                parts.push((2, 2));
            } else if *p != 2 && legendre_square(&quartic_disc_mod_p(&g, p), p) {
                parts.push((2, 1));
                parts.push((2, 1));
            } else {
                parts.push((4, 1));
            }
        }
        _ => unreachable!("degree at most 4"),
    }
    parts.sort();
    parts
        .iter()
        .map(|(d, m)| {
            if *m == 1 {
                d.to_string()
            } else {
                format!("{d}^{m}")
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
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
        legendre_square(&md(&u, p), p)
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
    let gbar = norm(h.iter().map(|c| Integer::from(c / &pm)).collect(), p);
    if m % 2 == 0 {
        let eval = |r: &Integer| {
            gbar.iter()
                .rev()
                .fold(Integer::new(), |acc, c| (acc * r + c) % p)
        };
        for r in 0u32..64 {
            let v = md(&eval(&Integer::from(r)), p);
            if v != 0 && legendre_square(&v, p) {
                return true;
            }
        }
        if gbar.len() == 1 {
            return false; // a constant non-square (or the search above found it)
        }
        if !is_constant_times_square(&gbar, p) {
            // Weil: Σ_r χ(ḡ(r)) ≥ −3√p, and fewer than 5 roots, so some ḡ(r) is a non-zero
            // square once p − 3√p − 4 > 0, true for p > 50.
            return true;
        }
    }
    roots_any(&gbar, p)
        .into_iter()
        .any(|r| disc_soluble(g, p, x0 + (pk * r), k + 1))
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

/// Whether z² = f(x, y) has a real point: unless f is negative definite.
pub fn real_soluble(s: Signature) -> bool {
    s != Signature::NegativeDefinite
}

/// Local data at one place.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PlaceData {
    /// The prime, or `None` for the real place.
    pub prime: Option<Integer>,
    /// `v_p(Disc)` (primes only).
    pub v_disc: Option<u32>,
    /// Factorisation pattern of f mod p (primes), or the signature name (infinity).
    pub pattern: String,
    /// Whether z² = f(x, y) has a point there.
    pub soluble: bool,
}

/// Local data at every prime dividing 2·Disc and at infinity, and the summary.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LocalData {
    /// The places, primes in increasing order, then infinity.
    pub places: Vec<PlaceData>,
}

impl LocalData {
    /// Everywhere locally soluble.
    pub fn els(&self) -> bool {
        self.places.iter().all(|p| p.soluble)
    }

    /// The places where there is no point: primes in increasing order, then `inf`.
    pub fn failures(&self) -> Vec<String> {
        self.places
            .iter()
            .filter(|p| !p.soluble)
            .map(|p| {
                p.prime
                    .as_ref()
                    .map(|q| q.to_string())
                    .unwrap_or_else(|| "inf".into())
            })
            .collect()
    }
}

/// The local data of f, given the factorisation of its discriminant (DESIGN §4).
pub fn local_data(f: &Form<Integer>, disc_factors: &[(Integer, u32)], s: Signature) -> LocalData {
    let mut primes: Vec<(Integer, u32)> = disc_factors.to_vec();
    if !primes.iter().any(|(p, _)| *p == 2) {
        primes.push((Integer::from(2), 0));
    }
    primes.sort();
    let mut places: Vec<PlaceData> = primes
        .into_iter()
        .map(|(p, v)| PlaceData {
            pattern: pattern_mod_p(f, &p),
            soluble: qp_soluble(f, &p),
            v_disc: Some(v),
            prime: Some(p),
        })
        .collect();
    places.push(PlaceData {
        prime: None,
        v_disc: None,
        pattern: s.name().into(),
        soluble: real_soluble(s),
    });
    LocalData { places }
}
