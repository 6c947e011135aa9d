//! An independent computation of Julia's covariant point z(f), written for the tests from the
//! definition in DESIGN §3 alone (no code of the library): for the roots α_j of f(x, 1)
//! (and a root at ∞ when a = 0), z = x + iy minimises
//! `G(z) = Σ_j log(w_j/y)`, `w_j = (x − Re α_j)² + y² + (Im α_j)²` (`w = 1` at ∞).
//!
//! Roots: Aberth–Ehrlich iteration in f64 from a circle, continued in MPFR (rug) at the
//! working precision. Minimum: a descent in f64 (Newton when the Hessian is positive
//! definite, else the natural gradient `−y²∇G`, Armijo backtracking), then plain Newton on
//! ∇G in MPFR until the step is at the working precision. The error estimate is a-posteriori
//! (common practice, not a proof): four times the last Newton step plus 10³ times the
//! largest Aberth radius `n·|p/p'|`.

use rug::{Float, Integer};

/// A point of the upper half plane with an a-posteriori error estimate.
#[derive(Clone, Debug)]
pub struct Point {
    pub x: Float,
    pub y: Float,
    pub err: Float,
}

// ---------- f64 part ----------

#[derive(Clone, Copy, Debug)]
struct C64(f64, f64);

impl C64 {
    fn add(self, o: C64) -> C64 {
        C64(self.0 + o.0, self.1 + o.1)
    }
    fn sub(self, o: C64) -> C64 {
        C64(self.0 - o.0, self.1 - o.1)
    }
    fn mul(self, o: C64) -> C64 {
        C64(self.0 * o.0 - self.1 * o.1, self.0 * o.1 + self.1 * o.0)
    }
    fn div(self, o: C64) -> C64 {
        let n = o.0 * o.0 + o.1 * o.1;
        C64(
            (self.0 * o.0 + self.1 * o.1) / n,
            (self.1 * o.0 - self.0 * o.1) / n,
        )
    }
    fn abs(self) -> f64 {
        self.0.hypot(self.1)
    }
}

fn horner64(p: &[f64], z: C64) -> (C64, C64) {
    let (mut v, mut dv) = (C64(0.0, 0.0), C64(0.0, 0.0));
    for &c in p {
        dv = dv.mul(z).add(v);
        v = v.mul(z).add(C64(c, 0.0));
    }
    (v, dv)
}

/// Approximate roots of p (descending, p[0] ≠ 0) in f64: Aberth from a circle.
fn roots_f64(p: &[f64]) -> Vec<C64> {
    let n = p.len() - 1;
    let mut r: f64 = 0.0;
    for (k, c) in p.iter().enumerate().skip(1) {
        r = r.max((c / p[0]).abs().powf(1.0 / k as f64));
    }
    let r = 2.0 * r.max(1e-3);
    let centre = -p[1] / (n as f64 * p[0]);
    let mut z: Vec<C64> = (0..n)
        .map(|k| {
            let t = 0.4 + std::f64::consts::TAU * k as f64 / n as f64;
            C64(centre + r * t.cos(), r * t.sin())
        })
        .collect();
    for _ in 0..500 {
        let mut biggest: f64 = 0.0;
        for k in 0..n {
            let (v, dv) = horner64(p, z[k]);
            if v.abs() == 0.0 {
                continue;
            }
            let ratio = v.div(dv);
            let mut s = C64(0.0, 0.0);
            for j in 0..n {
                if j != k {
                    s = s.add(C64(1.0, 0.0).div(z[k].sub(z[j])));
                }
            }
            let w = ratio.div(C64(1.0, 0.0).sub(ratio.mul(s)));
            if w.0.is_finite() && w.1.is_finite() {
                z[k] = z[k].sub(w);
                biggest = biggest.max(w.abs() / (1.0 + z[k].abs()));
            }
        }
        if biggest < 1e-15 {
            break;
        }
    }
    z
}

/// G and its derivatives at (x, y) for finite roots `rs` and `total` roots in all.
fn g_derivs64(rs: &[C64], total: f64, x: f64, y: f64) -> [f64; 6] {
    let (mut g, mut gx, mut gy, mut hxx, mut hxy, mut hyy) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for a in rs {
        let dx = x - a.0;
        let w = dx * dx + y * y + a.1 * a.1;
        g += w.ln();
        gx += 2.0 * dx / w;
        gy += 2.0 * y / w;
        hxx += 2.0 / w - 4.0 * dx * dx / (w * w);
        hxy -= 4.0 * dx * y / (w * w);
        hyy += 2.0 / w - 4.0 * y * y / (w * w);
    }
    g -= total * y.ln();
    gy -= total / y;
    hyy += total / (y * y);
    [g, gx, gy, hxx, hxy, hyy]
}

/// The minimiser of G in f64 by a globally convergent descent.
fn minimise64(rs: &[C64], total: f64) -> (f64, f64) {
    let n = rs.len() as f64;
    let mut x = rs.iter().map(|a| a.0).sum::<f64>() / n;
    let mut y = (rs.iter().map(|a| a.1.abs() + (a.0 - x).abs()).sum::<f64>() / n).max(1e-3);
    for _ in 0..500 {
        let [g, gx, gy, hxx, hxy, hyy] = g_derivs64(rs, total, x, y);
        let det = hxx * hyy - hxy * hxy;
        let (mut dx, mut dy) = if hxx > 0.0 && det > 0.0 {
            (-(hyy * gx - hxy * gy) / det, -(hxx * gy - hxy * gx) / det)
        } else {
            (-y * y * gx, -y * y * gy)
        };
        if dx * gx + dy * gy >= 0.0 {
            (dx, dy) = (-y * y * gx, -y * y * gy);
        }
        // Hyperbolic step length at most ½.
        let len = dx.hypot(dy) / y;
        if len > 0.5 {
            dx *= 0.5 / len;
            dy *= 0.5 / len;
        }
        let slope = dx * gx + dy * gy;
        let mut t = 1.0;
        let mut moved = false;
        while t > 1e-12 {
            let (nx, ny) = (x + t * dx, y + t * dy);
            if ny > 0.0 && g_derivs64(rs, total, nx, ny)[0] <= g + 1e-4 * t * slope {
                (x, y) = (nx, ny);
                moved = true;
                break;
            }
            t *= 0.5;
        }
        if !moved || (dx.hypot(dy) * t) < 1e-15 * (1.0 + x.abs() + y) {
            break;
        }
    }
    (x, y)
}

/// z(f) in f64 with an a-posteriori error estimate (last Newton step plus 10³ times the
/// largest Aberth radius), for coefficients of moderate size; `None` when f64 is unfit.
pub fn point64(c: &[i64; 5]) -> Option<(f64, f64, f64)> {
    let lead = c.iter().position(|v| *v != 0)?;
    if lead > 1 {
        return None;
    }
    let p: Vec<f64> = c[lead..].iter().map(|&v| v as f64).collect();
    let rs = roots_f64(&p);
    let n = rs.len() as f64;
    let mut radius: f64 = 0.0;
    for r in &rs {
        let (v, dv) = horner64(&p, *r);
        let bound = p.iter().fold(0.0, |acc, c| acc * r.abs() + c.abs());
        radius = radius.max(n * (v.abs() + 4.0 * n * f64::EPSILON * bound) / dv.abs());
    }
    let (mut x, mut y) = minimise64(&rs, 4.0);
    let mut last = f64::INFINITY;
    for _ in 0..3 {
        let [_, gx, gy, hxx, hxy, hyy] = g_derivs64(&rs, 4.0, x, y);
        let det = hxx * hyy - hxy * hxy;
        let (dx, dy) = (-(hyy * gx - hxy * gy) / det, -(hxx * gy - hxy * gx) / det);
        x += dx;
        y += dy;
        last = dx.abs().max(dy.abs());
    }
    let err = 4.0 * last + 1000.0 * radius + 1e-13 * (1.0 + x.abs() + y);
    (err.is_finite() && y > 0.0).then_some((x, y, err))
}

// ---------- MPFR part ----------

#[derive(Clone, Debug)]
struct Cm {
    re: Float,
    im: Float,
}

impl Cm {
    fn new(prec: u32, re: f64, im: f64) -> Cm {
        Cm {
            re: Float::with_val(prec, re),
            im: Float::with_val(prec, im),
        }
    }
    fn prec(&self) -> u32 {
        self.re.prec()
    }
    fn add(&self, o: &Cm) -> Cm {
        let p = self.prec();
        Cm {
            re: Float::with_val(p, &self.re + &o.re),
            im: Float::with_val(p, &self.im + &o.im),
        }
    }
    fn sub(&self, o: &Cm) -> Cm {
        let p = self.prec();
        Cm {
            re: Float::with_val(p, &self.re - &o.re),
            im: Float::with_val(p, &self.im - &o.im),
        }
    }
    fn mul(&self, o: &Cm) -> Cm {
        let p = self.prec();
        let rr = Float::with_val(p, &self.re * &o.re);
        let ii = Float::with_val(p, &self.im * &o.im);
        let ri = Float::with_val(p, &self.re * &o.im);
        let ir = Float::with_val(p, &self.im * &o.re);
        Cm {
            re: rr - ii,
            im: ri + ir,
        }
    }
    fn norm2(&self) -> Float {
        let p = self.prec();
        Float::with_val(p, self.re.square_ref()) + Float::with_val(p, self.im.square_ref())
    }
    fn div(&self, o: &Cm) -> Cm {
        let n = o.norm2();
        let p = self.prec();
        let re = Float::with_val(p, &self.re * &o.re) + Float::with_val(p, &self.im * &o.im);
        let im = Float::with_val(p, &self.im * &o.re) - Float::with_val(p, &self.re * &o.im);
        Cm {
            re: re / &n,
            im: im / &n,
        }
    }
    fn abs(&self) -> Float {
        self.norm2().sqrt()
    }
}

fn horner_mp(p: &[Float], z: &Cm) -> (Cm, Cm) {
    let prec = z.prec();
    let mut v = Cm::new(prec, 0.0, 0.0);
    let mut dv = Cm::new(prec, 0.0, 0.0);
    for c in p {
        dv = dv.mul(z).add(&v);
        v = v.mul(z);
        v.re += c;
    }
    (v, dv)
}

/// Aberth in MPFR from approximations `z`; returns the largest radius `n·|p/p'|`.
fn polish(p: &[Float], z: &mut [Cm], prec: u32) -> Float {
    let n = z.len();
    let one = Cm::new(prec, 1.0, 0.0);
    let tol = Float::with_val(prec, 1) >> (prec - 8);
    for _ in 0..200 {
        let mut done = true;
        for k in 0..n {
            let (v, dv) = horner_mp(p, &z[k]);
            if v.re.is_zero() && v.im.is_zero() {
                continue;
            }
            let ratio = v.div(&dv);
            let mut s = Cm::new(prec, 0.0, 0.0);
            for j in 0..n {
                if j != k {
                    s = s.add(&one.div(&z[k].sub(&z[j])));
                }
            }
            let w = ratio.div(&one.sub(&ratio.mul(&s)));
            let scale = Float::with_val(prec, 1) + z[k].abs();
            if w.abs() > Float::with_val(prec, &tol * &scale) {
                done = false;
            }
            if w.re.is_finite() && w.im.is_finite() {
                z[k] = z[k].sub(&w);
            }
        }
        if done {
            break;
        }
    }
    // The radius n·|p/p'| with |p| raised by the rounding error of Horner's rule,
    // 4n·ε·Σ|c_i||z|^i (common practice bound), so it cannot vanish below the precision.
    let eps = Float::with_val(prec, 1) >> (prec - 1);
    let mut radius = Float::with_val(prec, 0);
    for zk in z.iter() {
        let (v, dv) = horner_mp(p, zk);
        let az = zk.abs();
        let mut bound = Float::with_val(prec, 0);
        for c in p {
            bound = Float::with_val(prec, &bound * &az) + Float::with_val(prec, c.abs_ref());
        }
        let noise = Float::with_val(prec, &bound * &eps) * (4 * n as u32);
        let r = Float::with_val(prec, (v.abs() + noise) / dv.abs()) * n as u32;
        if r > radius {
            radius = r;
        }
    }
    radius
}

/// The covariant point of `(a, b, c, d, e)` (Disc ≠ 0) at `prec` bits.
pub fn point(c: &[Integer; 5], prec: u32) -> Point {
    // f(x, 1) as a polynomial; a root at ∞ when a = 0 (then b ≠ 0 since Disc ≠ 0).
    let lead = c.iter().position(|v| *v != 0).expect("zero form");
    assert!(
        lead <= 1,
        "a = b = 0 means a double root at infinity (Disc = 0)"
    );
    let poly = &c[lead..];
    let total = 4.0;
    let total_u = 4u32;
    // Scale to the largest coefficient for the f64 start.
    let big = poly.iter().map(|v| v.clone().abs()).max().unwrap();
    let p64: Vec<f64> = poly
        .iter()
        .map(|v| Float::with_val(64, v).to_f64() / Float::with_val(64, &big).to_f64())
        .map(|v| if v.is_finite() { v } else { 0.0 })
        .collect();
    let p64: Vec<f64> = if p64.iter().all(|v| v.is_finite() && v.abs() <= 1.0) && p64[0] != 0.0 {
        p64
    } else {
        // Coefficients beyond f64's range: scale by a power of two exactly.
        let shift = big.significant_bits() as i32 - 60;
        poly.iter()
            .map(|v| {
                let mut f = Float::with_val(128, v);
                f >>= shift;
                f.to_f64() / (Float::with_val(128, &big) >> shift).to_f64()
            })
            .collect()
    };
    let r64 = roots_f64(&p64);
    let pm: Vec<Float> = poly.iter().map(|v| Float::with_val(prec, v)).collect();
    let mut rm: Vec<Cm> = r64.iter().map(|r| Cm::new(prec, r.0, r.1)).collect();
    let radius = polish(&pm, &mut rm, prec);
    // f64 start of the minimisation from the polished roots.
    let rs: Vec<C64> = rm
        .iter()
        .map(|r| C64(r.re.to_f64(), r.im.to_f64()))
        .collect();
    let (x0, y0) = minimise64(&rs, total);
    let mut x = Float::with_val(prec, x0);
    let mut y = Float::with_val(prec, y0);
    let tol = Float::with_val(prec, 1) >> (prec - 24);
    let mut last = Float::with_val(prec, 1);
    for _ in 0..100 {
        let mut gx = Float::with_val(prec, 0);
        let mut gy = Float::with_val(prec, 0);
        let mut hxx = Float::with_val(prec, 0);
        let mut hxy = Float::with_val(prec, 0);
        let mut hyy = Float::with_val(prec, 0);
        let y2 = Float::with_val(prec, y.square_ref());
        for r in &rm {
            let dx = Float::with_val(prec, &x - &r.re);
            // w as a sum of squares (never expanded).
            let w = Float::with_val(prec, dx.square_ref())
                + &y2
                + Float::with_val(prec, r.im.square_ref());
            let w2 = Float::with_val(prec, w.square_ref());
            gx += Float::with_val(prec, &dx * 2u32) / &w;
            gy += Float::with_val(prec, &y * 2u32) / &w;
            let two_w = Float::with_val(prec, 2u32 / &w);
            hxx += Float::with_val(
                prec,
                &two_w - Float::with_val(prec, dx.square_ref()) * 4u32 / &w2,
            );
            hxy -= Float::with_val(prec, &dx * &y) * 4u32 / &w2;
            hyy += Float::with_val(prec, &two_w - Float::with_val(prec, &y2 * 4u32) / &w2);
        }
        gy -= Float::with_val(prec, total_u / &y);
        hyy += Float::with_val(prec, total_u / &y2);
        let det = Float::with_val(prec, &hxx * &hyy) - Float::with_val(prec, hxy.square_ref());
        let dx = -(Float::with_val(prec, &hyy * &gx) - Float::with_val(prec, &hxy * &gy)) / &det;
        let dy = -(Float::with_val(prec, &hxx * &gy) - Float::with_val(prec, &hxy * &gx)) / &det;
        x += &dx;
        y += &dy;
        let step = Float::with_val(prec, dx.abs_ref()).max(&Float::with_val(prec, dy.abs_ref()));
        let scale = Float::with_val(prec, 1) + Float::with_val(prec, x.abs_ref()) + &y;
        last = step;
        if last <= Float::with_val(prec, &tol * &scale) {
            break;
        }
    }
    assert!(y > 0, "the minimum left the upper half plane");
    // Floor: the evaluation of ∇G itself rounds at 2^−prec (times a safety factor 2²⁰).
    let scale = Float::with_val(prec, 1) + Float::with_val(prec, x.abs_ref()) + &y;
    let floor = scale >> (prec - 20);
    let err =
        Float::with_val(prec, &last * 4u32) + Float::with_val(prec, &radius * 1000u32) + floor;
    Point { x, y, err }
}

/// Signed distances of z to the three boundary pieces of
/// `F_η = {−η ≤ Re z ≤ ½ + η, |z| ≥ 1 − η}`, η = 10⁻⁹: z ∈ F_η iff all are ≥ 0.
pub fn f_eta_distances(p: &Point) -> [Float; 3] {
    let prec = p.x.prec();
    let eta = Float::with_val(prec, 1) / Float::with_val(prec, 1_000_000_000u32);
    let half = Float::with_val(prec, 0.5);
    let r =
        (Float::with_val(prec, p.x.square_ref()) + Float::with_val(prec, p.y.square_ref())).sqrt();
    [
        Float::with_val(prec, &p.x + &eta),
        Float::with_val(prec, &half + &eta) - &p.x,
        r - (Float::with_val(prec, 1) - eta),
    ]
}

/// Signed distances of z to the three boundary pieces of F itself (η = 0).
pub fn f_distances(p: &Point) -> [Float; 3] {
    let prec = p.x.prec();
    let r =
        (Float::with_val(prec, p.x.square_ref()) + Float::with_val(prec, p.y.square_ref())).sqrt();
    [
        p.x.clone(),
        Float::with_val(prec, 0.5) - &p.x,
        r - Float::with_val(prec, 1),
    ]
}
