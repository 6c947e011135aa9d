//! Julia's covariant point z(f) of a binary quartic form (DESIGN §3).
//!
//! For the roots α_j of f in P¹(C), z(f) is the unique point of the upper half plane
//! minimising `G(z) = Σ_j log(w_j(z)/Im z)` with `w_j = (x − Re α_j)² + y² + (Im α_j)²`
//! for a finite root and `w_j = 1` for the root at infinity (G. Julia 1917; M. Stoll and
//! J. Cremona, J. reine angew. Math. 565 (2003)).
//!
//! Numerics, generic over [`Real`] (f64 or MPFR):
//! * roots by the Aberth–Ehrlich simultaneous iteration, polished to full working precision;
//! * G is minimised by a descent that respects the hyperbolic metric (natural gradient
//!   `y²∇G`, steps of hyperbolic length ≤ ½, Armijo backtracking) switching to plain Newton
//!   on ∇G near the minimum; convergence is decided on the Newton step, not on the value of G;
//! * `w_j` is evaluated as a sum of squares, never in expanded form.
//!
//! The result carries an a-posteriori error estimate (twice the last Newton step plus the
//! propagated root error); [`point_f64`] declines (returns `None`) when the f64 computation
//! is not trustworthy (huge coefficients, clustered roots, no convergence), and the caller
//! then uses [`point_mp`].
//!
//! ```
//! use qorbits::form::covariant::point_f64;
//! // x⁴ + y⁴: its roots are symmetric about i, so z = i.
//! let z = point_f64(&[1.0, 0.0, 0.0, 0.0, 1.0]).unwrap();
//! assert!(z.x.abs() < 1e-12 && (z.y - 1.0).abs() < 1e-12);
//! ```

use crate::arith::cubic::{largest_real_root, quadratic_roots};
use crate::arith::real::{Cx, Real};
use crate::arith::small::Small;

mod precise;
pub use precise::{point_mp, point_mp_near};

/// A point `x + i·y` of the upper half plane with an error estimate (Euclidean).
#[derive(Clone, Debug)]
pub struct Point<R> {
    /// Real part.
    pub x: R,
    /// Imaginary part (positive).
    pub y: R,
    /// Estimated absolute error of `x` and `y`.
    pub err: f64,
}

/// Horner evaluation of `p` and `p'` at `z` (descending coefficients).
fn horner<R: Real>(p: &[R], z: &Cx<R>) -> (Cx<R>, Cx<R>) {
    let zero = p[0].lit(0.0);
    let mut v = Cx::new(zero.clone(), zero.clone());
    let mut dv = Cx::new(zero.clone(), zero);
    for c in p {
        dv = dv.mul(z).add(&v);
        v = v.mul(z);
        v.re = v.re.clone() + c.clone();
    }
    (v, dv)
}

/// Initial guesses for Aberth: a circle around the centroid of the roots.
fn initial_guesses(p: &[f64]) -> Vec<Cx<f64>> {
    let n = p.len() - 1;
    let center = -p[1] / (n as f64 * p[0]);
    let mut radius: f64 = 0.0;
    for (k, c) in p.iter().enumerate().skip(1) {
        radius = radius.max((c / p[0]).abs().powf(1.0 / k as f64));
    }
    let radius = radius.max(1e-3) * 1.5;
    (0..n)
        .map(|k| {
            let t = 0.7 + std::f64::consts::TAU * k as f64 / n as f64;
            Cx::new(center + radius * t.cos(), radius * t.sin())
        })
        .collect()
}

/// `√z` on the principal branch, as a pair.
fn csqrt(re: f64, im: f64) -> (f64, f64) {
    let r = Cx::new(re, im).sqrt();
    (r.re, r.im)
}

/// Initial guesses for Aberth from Ferrari's closed form of the roots of a quartic (`p` of
/// degree 4), or `None` (not a quartic, or the formula broke down in f64). They only start
/// the iteration, which then converges in a step or two instead of a dozen from a circle;
/// the roots are those of Aberth as before.
fn quartic_guesses(p: &[f64]) -> Option<[Cx<f64>; 4]> {
    if p.len() != 5 || p[0] == 0.0 {
        return None;
    }
    let (a, b, c, d) = (p[1] / p[0], p[2] / p[0], p[3] / p[0], p[4] / p[0]);
    // x = t − a/4: t⁴ + P·t² + Q·t + R.
    let shift = a / 4.0;
    let big_p = b - 3.0 * a * a / 8.0;
    let big_q = c - a * b / 2.0 + a * a * a / 8.0;
    let big_r = d - a * c / 4.0 + a * a * b / 16.0 - 3.0 * a * a * a * a / 256.0;
    let mut out: Small<Cx<f64>, 4> = Small::new();
    let mut push_quadratic = |s: f64, q: f64| {
        for t in quadratic_roots(s, q) {
            out.push(Cx::new(t.re - shift, t.im));
        }
    };
    // The largest root m of the resolvent m³ + P·m² + (P²/4 − R)·m − Q²/8 (m ≥ 0).
    let (c2, c1, c0) = (big_p, big_p * big_p / 4.0 - big_r, -big_q * big_q / 8.0);
    let m = largest_real_root(c2, c1, c0)?;
    if m > 1e-12 * (1.0 + big_p.abs()) {
        let s = (2.0 * m).sqrt();
        let h = big_q / (2.0 * s);
        push_quadratic(s, big_p / 2.0 + m - h);
        push_quadratic(-s, big_p / 2.0 + m + h);
    } else {
        // Q ≈ 0: t⁴ + P·t² + R, a quadratic in t².
        let (dr, di) = csqrt(big_p * big_p - 4.0 * big_r, 0.0);
        for (ur, ui) in [
            ((-big_p + dr) / 2.0, di / 2.0),
            ((-big_p - dr) / 2.0, -di / 2.0),
        ] {
            let (tr, ti) = csqrt(ur, ui);
            out.push(Cx::new(tr - shift, ti));
            out.push(Cx::new(-tr - shift, -ti));
        }
    }
    // Aberth needs distinct starting points.
    let ok = out.iter().all(|z| z.re.is_finite() && z.im.is_finite())
        && (0..4).all(|i| (i + 1..4).all(|j| out[i].sub(&out[j]).abs() > 0.0));
    ok.then(|| std::array::from_fn(|k| out[k].clone()))
}

/// Aberth–Ehrlich iteration from `z`. Runs until every correction is at the working
/// precision, or every residual `|p(z)|` is at the level of its own rounding error
/// (`ε·Σ|cᵢ||z|ⁱ`: clustered roots cannot be located better at this precision). Returns
/// for each root the classical a-posteriori radius `n·|p(z)/p'(z)|` (a disc of that radius
/// about z contains a root), or `None` if the iteration diverged or never settled.
fn aberth<R: Real>(p: &[R], z: &mut [Cx<R>], max_iter: usize) -> Option<Small<f64, 4>> {
    let n = z.len();
    let eps = p[0].epsilon();
    let one = p[0].lit(1.0);
    let zero = one.lit(0.0);
    for _ in 0..max_iter {
        let mut worst = zero.clone();
        let mut at_noise = true;
        for k in 0..n {
            let (v, dv) = horner(p, &z[k]);
            if v.re == zero && v.im == zero {
                continue; // an exact root
            }
            let r = z[k].abs();
            let mut noise = zero.clone();
            for c in p {
                noise = noise * r.clone() + c.abs();
            }
            if v.abs() > noise * eps.clone() * one.lit(64.0) {
                at_noise = false;
            }
            let w = v.div(&dv);
            let mut s = Cx::new(zero.clone(), zero.clone());
            for (j, zj) in z.iter().enumerate() {
                if j != k {
                    s = s.add(&Cx::new(one.clone(), zero.clone()).div(&z[k].sub(zj)));
                }
            }
            let denom = Cx::new(one.clone(), zero.clone()).sub(&w.mul(&s));
            let corr = w.div(&denom);
            let scale = if r > one { r } else { one.clone() };
            z[k] = z[k].sub(&corr);
            let rel = corr.abs() / scale;
            if rel > worst {
                worst = rel;
            }
        }
        if !worst.to_f64().is_finite() {
            return None;
        }
        if worst < eps.clone() * one.lit(16.0) || at_noise {
            let radii = z
                .iter()
                .map(|zk| {
                    let (v, dv) = horner(p, zk);
                    let r = n as f64 * (v.abs() / dv.abs()).to_f64();
                    if r.is_finite() {
                        r
                    } else {
                        f64::INFINITY
                    }
                })
                .collect();
            return Some(radii);
        }
    }
    None
}

/// The finite roots of `f(x, 1)` and whether there is a root at infinity.
struct Roots<R> {
    finite: Vec<Cx<R>>,
    at_infinity: bool,
    /// Estimated absolute error of each finite root.
    err: Small<f64, 4>,
}

fn roots<R: Real>(c: &[R; 5], guess: Option<&[Cx<f64>]>) -> Option<Roots<R>> {
    let zero = c[0].lit(0.0);
    let at_infinity = c[0] == zero;
    let p: &[R] = if at_infinity { &c[1..] } else { &c[..] };
    if p[0] == zero {
        return None; // Disc = 0: at least a double root at infinity.
    }
    let lit = |g: &Cx<f64>| Cx::new(zero.lit(g.re), zero.lit(g.im));
    let mut z: Vec<Cx<R>> = match guess.filter(|g| g.len() == p.len() - 1) {
        Some(g) => g.iter().map(lit).collect(),
        None => {
            let pf: Small<f64, 5> = p.iter().map(|x| x.to_f64()).collect();
            initial_guesses(&pf).iter().map(lit).collect()
        }
    };
    let radii = aberth(p, &mut z, 400)?;
    let eps = zero.epsilon().to_f64();
    let err = z
        .iter()
        .zip(&radii)
        .map(|(r, l)| l + 64.0 * eps * r.abs().to_f64().max(1.0))
        .collect();
    Some(Roots {
        finite: z,
        at_infinity,
        err,
    })
}

/// Value, gradient and Hessian of G at (x, y).
struct Local<R> {
    g: R,
    gx: R,
    gy: R,
    hxx: R,
    hxy: R,
    hyy: R,
}

fn local<R: Real>(roots: &[Cx<R>], x: &R, y: &R) -> Local<R> {
    let zero = x.lit(0.0);
    let (two, four) = (x.lit(2.0), x.lit(4.0));
    let mut prod = x.lit(1.0);
    let mut l = Local {
        g: zero.clone(),
        gx: zero.clone(),
        gy: zero.clone(),
        hxx: zero.clone(),
        hxy: zero.clone(),
        hyy: zero,
    };
    for r in roots {
        let dx = x.clone() - r.re.clone();
        let w = dx.clone() * dx.clone() + y.clone() * y.clone() + r.im.clone() * r.im.clone();
        let w2 = w.clone() * w.clone();
        prod = prod * (w.clone() / y.clone());
        l.gx = l.gx + two.clone() * dx.clone() / w.clone();
        l.gy = l.gy + two.clone() * y.clone() / w.clone();
        l.hxx =
            l.hxx + two.clone() / w.clone() - four.clone() * dx.clone() * dx.clone() / w2.clone();
        l.hxy = l.hxy - four.clone() * dx * y.clone() / w2.clone();
        l.hyy = l.hyy + two.clone() / w - four.clone() * y.clone() * y.clone() / w2;
    }
    l.g = g_of_product(prod, roots, x, y);
    // The −4 log y of G: all four roots, the one at infinity included.
    l.gy = l.gy - four.clone() / y.clone();
    l.hyy = l.hyy + four / (y.clone() * y.clone());
    l
}

/// `w_j` of a finite root at (x, y), as a sum of squares.
fn w_of<R: Real>(r: &Cx<R>, x: &R, y: &R) -> R {
    let dx = x.clone() - r.re.clone();
    dx.clone() * dx + y.clone() * y.clone() + r.im.clone() * r.im.clone()
}

/// G at (x, y), as `log Π_j (w_j/y)` over the four roots (`w = 1` for one at infinity):
/// one logarithm instead of five.
fn value<R: Real>(roots: &[Cx<R>], x: &R, y: &R) -> R {
    let mut prod = x.lit(1.0);
    for r in roots {
        prod = prod * (w_of(r, x, y) / y.clone());
    }
    g_of_product(prod, roots, x, y)
}

/// G from `Π_j (w_j/y)` over the finite roots: the division for a root at infinity, then
/// the one logarithm. Should the product leave the normal range of f64, G is the sum of
/// the five logarithms instead.
fn g_of_product<R: Real>(mut prod: R, roots: &[Cx<R>], x: &R, y: &R) -> R {
    for _ in roots.len()..4 {
        prod = prod / y.clone();
    }
    if (1e-300..1e300).contains(&prod.to_f64()) {
        return prod.ln();
    }
    let mut g = x.lit(0.0);
    for r in roots {
        g = g + w_of(r, x, y).ln();
    }
    g - x.lit(4.0) * y.ln()
}

/// Minimise G from `start`; `None` if the descent fails.
fn minimise<R: Real>(roots: &[Cx<R>], start: (R, R)) -> Option<(R, R, f64)> {
    match descend(roots, start, None)? {
        Descent::Minimum(x, y, err) => Some((x, y, err)),
        Descent::Below => None,
    }
}

/// The end of a descent: the minimum of G with its error estimate, or a proof that the
/// minimum lies below a given height.
enum Descent<R> {
    Minimum(R, R, f64),
    Below,
}

/// A height to prove the minimum below, for roots known to within `root_err` each.
#[derive(Clone, Copy)]
struct Cut {
    y: f64,
    root_err: f64,
}

/// Whether the gradient `(gx, gy)` of G at `(x, y)`, computed from roots within `root_err`,
/// proves that the minimum of G lies strictly below height `cut`.
///
/// G is convex along geodesics, so the minimum lies in the closed hyperbolic half-plane
/// that the geodesic through z orthogonal to ∇G(z) bounds on the side of −∇G. When
/// `∂_y G > 0` that geodesic is the semicircle centred at `x − y·gx/gy` on the real axis
/// with Euclidean radius `y·|∇G|/gy`, and the half-plane is its inside, so the minimum has
/// imaginary part at most that radius. Each term of ∇G moves by at most `8δ/w ≤ 8δ/y²`
/// when its root moves by δ (w ≥ y²), and is at most `2/y` in size; `e` bounds both
/// effects, doubled, over the four terms and `−4/y`.
fn proves_below(y: f64, gx: f64, gy: f64, cut: Cut) -> bool {
    if y.is_nan() || y <= 0.0 || cut.root_err > 1e-6 * y {
        return false;
    }
    let e = 64.0 * cut.root_err / (y * y) + 1e-13 * 12.0 / y;
    let norm = (gx * gx + gy * gy).sqrt();
    gy > e && y * (norm + 2.0 * e) / (gy - e) < cut.y
}

/// [`minimise`], and with a cut: stop as soon as the minimum is proved below it.
fn descend<R: Real>(roots: &[Cx<R>], start: (R, R), cut: Option<Cut>) -> Option<Descent<R>> {
    let (mut x, mut y) = start;
    let eps = x.epsilon();
    let mut last_step = f64::INFINITY;
    let mut newton_phase = false;
    for _ in 0..400 {
        let l = local(roots, &x, &y);
        if let Some(cut) = cut {
            if proves_below(y.to_f64(), l.gx.to_f64(), l.gy.to_f64(), cut) {
                return Some(Descent::Below);
            }
        }
        let det = l.hxx.clone() * l.hyy.clone() - l.hxy.clone() * l.hxy.clone();
        let zero = x.lit(0.0);
        let pd = l.hxx > zero && det > zero;
        let (mut dx, mut dy) = if pd {
            (
                -(l.hyy.clone() * l.gx.clone() - l.hxy.clone() * l.gy.clone()) / det.clone(),
                -(l.hxx.clone() * l.gy.clone() - l.hxy.clone() * l.gx.clone()) / det,
            )
        } else {
            let y2 = y.clone() * y.clone();
            (-(y2.clone() * l.gx.clone()), -(y2 * l.gy.clone()))
        };
        let yf = y.to_f64();
        let len = (dx.clone() * dx.clone() + dy.clone() * dy.clone())
            .sqrt()
            .to_f64()
            / yf;
        let grad = yf
            * (l.gx.clone() * l.gx.clone() + l.gy.clone() * l.gy.clone())
                .sqrt()
                .to_f64();
        // Plain Newton on ∇G near the minimum; a long Newton step (the minimum lies along a
        // nearly flat valley of G, as when the roots form two tight pairs) is damped by the
        // line search below instead.
        if pd && len < 0.1 && (newton_phase || (grad < 1e-3 && len < 1e-2)) {
            newton_phase = true;
            let ny = y.clone() + dy.clone();
            if ny <= zero {
                return None;
            }
            let step_r = (dx.clone() * dx.clone() + dy.clone() * dy.clone()).sqrt();
            x = x + dx;
            y = ny;
            let tiny_r = eps.clone() * x.lit(64.0) * (x.lit(1.0) + x.abs() + y.clone());
            let (step, tiny) = (step_r.to_f64(), tiny_r.to_f64());
            if step_r <= tiny_r {
                // Quadratic convergence: the error after this step is far below the step.
                return Some(Descent::Minimum(x, y, 2.0 * step + tiny));
            }
            // Steps are measured against the scale of the point: for y ≥ ½ against 1 + y
            // (the fundamental domain), below against y itself, so that a point near a
            // tight cluster of roots (y ≪ 1) is not taken for converged while its steps are
            // still large in the hyperbolic metric.
            // The noise floor is that of the working precision: about 1e-8 in f64, far
            // lower with MPFR, where Newton is left to converge (it is affine invariant, so
            // a nearly flat valley of G, as for two tight pairs of roots, does not stop it).
            let floor = if yf >= 0.5 { 1.0 + yf } else { yf };
            let noise = eps.to_f64().sqrt().min(1e-8);
            if step < noise * floor && step >= last_step * 0.5 {
                // Rounding noise: successive steps no longer shrink.
                return Some(Descent::Minimum(x, y, 4.0 * step + tiny));
            }
            last_step = step;
            continue;
        }
        if len > 0.5 {
            let k = x.lit(0.5 / len);
            dx = dx * k.clone();
            dy = dy * k;
        }
        let slope = (l.gx.clone() * dx.clone() + l.gy.clone() * dy.clone()).to_f64();
        let mut t = 1.0;
        let mut moved = false;
        for _ in 0..80 {
            let tt = x.lit(t);
            let (nx, ny) = (
                x.clone() + tt.clone() * dx.clone(),
                y.clone() + tt * dy.clone(),
            );
            if ny.to_f64() > 0.0 {
                let gv = value(roots, &nx, &ny);
                if (gv.clone() - l.g.clone()).to_f64() <= 1e-4 * t * slope {
                    x = nx;
                    y = ny;
                    moved = true;
                    break;
                }
            }
            t *= 0.5;
        }
        if !moved {
            // No descent possible at this precision: we are at the minimum to rounding.
            newton_phase = pd;
            if !pd {
                return None;
            }
        }
    }
    None
}

/// The best of several starting points by the value of G: the centroid start of
/// [`start_point`], and for each pair of roots the point above their midpoint at half their
/// distance. When two roots are much closer than the others (a tight pair), the minimum
/// lies deep towards them, far along a nearly flat valley of G from the centroid; starting
/// there keeps the descent short.
fn best_start<R: Real>(roots: &Roots<R>) -> (R, R) {
    let mut best = start_point(roots);
    let mut best_g = value(&roots.finite, &best.0, &best.1);
    let zero = best.0.lit(0.0);
    let half = zero.lit(0.5);
    for (j, a) in roots.finite.iter().enumerate() {
        for b in &roots.finite[j + 1..] {
            let x = (a.re.clone() + b.re.clone()) * half.clone();
            let y = a.sub(b).abs() * half.clone();
            if y <= zero {
                continue;
            }
            let g = value(&roots.finite, &x, &y);
            if g < best_g {
                (best, best_g) = ((x, y), g);
            }
        }
    }
    best
}

fn start_point<R: Real>(roots: &Roots<R>) -> (R, R) {
    let n = roots.finite.len() as f64;
    let mx: f64 = roots.finite.iter().map(|r| r.re.to_f64()).sum::<f64>() / n;
    let spread: f64 = roots
        .finite
        .iter()
        .map(|r| {
            let d = r.re.to_f64() - mx;
            d * d + r.im.to_f64() * r.im.to_f64()
        })
        .sum::<f64>()
        / n;
    let y0 = spread.sqrt().max(1e-300) * if roots.at_infinity { 2.0 } else { 1.0 };
    let z = &roots.finite[0].re;
    (z.lit(mx), z.lit(y0))
}

fn root_error_bound(roots: &Roots<impl Real>) -> f64 {
    roots.err.iter().cloned().fold(0.0, f64::max)
}

/// Julia's point of the form with coefficients `c` (as f64), if the f64 computation can be
/// trusted (coefficients exactly representable, roots converged and not clustered).
pub fn point_f64(c: &[f64; 5]) -> Option<Point<f64>> {
    match locate_f64(c, 0.0)? {
        Located::Point(p) => Some(p),
        Located::Below => None,
    }
}

/// Where [`locate_f64`] found the point.
#[derive(Clone, Debug)]
pub enum Located {
    /// The point, as [`point_f64`] gives it.
    Point(Point<f64>),
    /// Proved: the point has imaginary part below the cut.
    Below,
}

/// [`point_f64`], or a proof that `Im z(f) < y_cut` (found on the way to the minimum, often
/// after a step or two, see [`proves_below`]). When there is no such proof the result is
/// exactly that of [`point_f64`], bit for bit; `y_cut = 0` never proves.
pub fn locate_f64(c: &[f64; 5], y_cut: f64) -> Option<Located> {
    if c.iter().any(|x| !x.is_finite() || x.abs() >= 2f64.powi(52)) {
        return None;
    }
    // Ferrari's start only here: the multiple-precision path keeps the circle, its fallback
    // for guesses that stall in a cluster.
    let r = roots(c, quartic_guesses(c).as_ref().map(|g| &g[..]))?;
    let scale = r.finite.iter().map(|z| z.abs()).fold(1.0, f64::max);
    for (i, a) in r.finite.iter().enumerate() {
        for b in &r.finite[i + 1..] {
            if a.sub(b).abs() < 1e-5 * scale {
                return None;
            }
        }
    }
    let root_err = root_error_bound(&r);
    let cut = (y_cut > 0.0).then_some(Cut { y: y_cut, root_err });
    let (x, y, err) = match descend(&r.finite, start_point(&r), cut)? {
        Descent::Minimum(x, y, err) => (x, y, err),
        Descent::Below => return Some(Located::Below),
    };
    let err = err + 4.0 * root_err * (1.0 + scale);
    (err < 1e-7).then_some(Located::Point(Point { x, y, err }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::Integer;

    #[test]
    fn covariance_under_translation_and_inversion() {
        // f(x, y) = x⁴ − 2x³y − 3x²y² − xy³ + 5y⁴ and its translate f(x + 2y, y):
        // z(γ·f) = z(f) − 2 for γ = [[1, 0], [2, 1]] (DESIGN §3).
        let f = [1.0, -2.0, -3.0, -1.0, 5.0];
        let g = [1.0, 6.0, 9.0, -5.0, -9.0]; // f(x + 2y, y)
        let (zf, zg) = (point_f64(&f).unwrap(), point_f64(&g).unwrap());
        assert!((zf.x - 2.0 - zg.x).abs() < 1e-10 && (zf.y - zg.y).abs() < 1e-10);
        // f(y, −x) reverses the coefficients with signs: z ↦ −1/z.
        let h = [5.0, 1.0, -3.0, 2.0, 1.0];
        let zh = point_f64(&h).unwrap();
        let n = zf.x * zf.x + zf.y * zf.y;
        assert!((zh.x + zf.x / n).abs() < 1e-10 && (zh.y - zf.y / n).abs() < 1e-10);
    }

    #[test]
    fn mpfr_agrees_with_f64() {
        let c = [3i64, -1, 4, 1, -5];
        let zf = point_f64(&c.map(|v| v as f64)).unwrap();
        let zm = point_mp(&c.map(Integer::from), 256).unwrap();
        assert!((zm.x.to_f64() - zf.x).abs() < 1e-12 && (zm.y.to_f64() - zf.y).abs() < 1e-12);
        assert!(zm.err < 1e-60, "{}", zm.err);
    }

    #[test]
    fn root_at_infinity() {
        // y(x³ − 2y³): finite roots of x³ − 2 and a root at infinity.
        // The three finite roots are balanced about Re z = 0 (derived by hand: the x-gradient
        // of G vanishes there for every y).
        let z = point_f64(&[0.0, 1.0, 0.0, 0.0, -2.0]).unwrap();
        assert!(z.x.abs() < 1e-12 && z.y > 1.0 && z.err < 1e-12);
        let m = point_mp(&[0, 1, 0, 0, -2].map(Integer::from), 200).unwrap();
        assert!((m.y.to_f64() - z.y).abs() < 1e-13 && m.err < 1e-50, "{m:?}");
    }

    #[test]
    fn g_by_one_logarithm_is_the_sum_of_logarithms() {
        // G = Σ log w_j − 4 log y (DESIGN §3), against the product form of `value`, with and
        // without a root at infinity, and where the product leaves f64 (y = 1e-200).
        let four = [(1.0, 0.5), (-2.0, 0.0), (0.3, -0.5), (7.0, 3.0)];
        let roots: Vec<Cx<f64>> = four.iter().map(|&(re, im)| Cx::new(re, im)).collect();
        for n in [4, 3] {
            for (x, y) in [(0.2, 0.9), (-3.0, 0.01), (40.0, 25.0), (0.5, 1e-200)] {
                let direct: f64 = roots[..n]
                    .iter()
                    .map(|r| ((x - r.re) * (x - r.re) + y * y + r.im * r.im).ln())
                    .sum::<f64>()
                    - 4.0 * f64::ln(y);
                let g = value(&roots[..n], &x, &y);
                assert!(
                    (g - direct).abs() < 1e-12 * (1.0 + direct.abs()),
                    "{n} {x} {y}"
                );
            }
        }
    }

    #[test]
    fn the_multiple_precision_point_does_not_depend_on_its_start() {
        // G has one minimum: a start at the f64 point, far from it, or not in the upper half
        // plane gives the point of the normalised descent.
        let c = [-3i64, 4, -4, 4, -3].map(Integer::from);
        let plain = point_mp(&c, 192).unwrap();
        let z = point_f64(&[-3.0, 4.0, -4.0, 4.0, -3.0]).unwrap();
        for near in [
            Some((z.x, z.y)),
            Some((30.0, 0.001)),
            Some((0.0, -1.0)),
            None,
        ] {
            let p = point_mp_near(&c, 192, near).unwrap();
            let d = (p.x.clone() - plain.x.clone()).abs() + (p.y.clone() - plain.y.clone()).abs();
            assert!(
                d.to_f64() < 1e-50 && p.err < 1e-50,
                "{near:?}: {d:?} {}",
                p.err
            );
        }
    }

    #[test]
    fn ferrari_guesses_are_near_the_roots() {
        // (x − 1)(x − 2)(x² + 1) = x⁴ − 3x³ + 3x² − 3x + 2 (expanded by hand), and
        // (x² + 1)(x² + 4) = x⁴ + 5x² + 4, where Q = 0 and Ferrari's resolvent root is 0.
        for (p, want) in [
            (
                [1.0, -3.0, 3.0, -3.0, 2.0],
                [(1.0, 0.0), (2.0, 0.0), (0.0, 1.0), (0.0, -1.0)],
            ),
            (
                [1.0, 0.0, 5.0, 0.0, 4.0],
                [(0.0, 1.0), (0.0, -1.0), (0.0, 2.0), (0.0, -2.0)],
            ),
        ] {
            let g = quartic_guesses(&p).unwrap();
            for (re, im) in want {
                let near = g
                    .iter()
                    .any(|z| (z.re - re).abs() + (z.im - im).abs() < 1e-9);
                assert!(near, "{p:?}: no guess near {re} + {im}i in {g:?}");
            }
        }
        assert!(quartic_guesses(&[0.0, 1.0, 0.0, 0.0, -2.0]).is_none());
    }

    #[test]
    fn a_proof_below_the_cut_is_only_given_when_true() {
        // 16x⁴ + y⁴ = (2x)⁴ + y⁴: the point of x⁴ + y⁴ (i) moved by x ↦ x/2, so i/2.
        // The descent starts at the minimum there (the roots' centroid and spread), so no
        // proof is needed or found, whatever the cut.
        let f = [16.0, 0.0, 0.0, 0.0, 1.0];
        match locate_f64(&f, 0.86) {
            Some(Located::Point(p)) => assert!(p.x.abs() < 1e-12 && (p.y - 0.5).abs() < 1e-12),
            other => panic!("{other:?}"),
        }
        // Without a proof the point is that of point_f64, bit for bit; with one, the point
        // really is below the cut. The forms are a deterministic spread of small quartics.
        let mut proved = 0;
        for k in 0..4000i64 {
            let c = [1 + k % 7, k % 11 - 5, k % 13 - 6, k % 17 - 8, k % 19 - 9].map(|v| v as f64);
            let (Some(p), located) = (point_f64(&c), locate_f64(&c, 0.8)) else {
                continue;
            };
            match located {
                Some(Located::Below) => {
                    assert!(p.y < 0.8, "{c:?}: proved below 0.8 but y = {}", p.y);
                    proved += 1;
                }
                Some(Located::Point(q)) => assert!(q.x == p.x && q.y == p.y, "{c:?}"),
                None => panic!("{c:?}: point_f64 found the point, locate_f64 did not"),
            }
        }
        assert!(proved > 100, "only {proved} proofs");
    }
}
