//! Shared helpers for the integration tests: a deterministic PRNG and random forms and
//! matrices of GL2(Z); in the modules, fixtures, hostile inputs, mutations, the published
//! tier, running (and killing) the binary, and small mounted file systems.
#![allow(dead_code)]

pub mod curves;
pub mod fixture;
pub mod hostile;
pub mod mutate;
pub mod run;
pub mod tier;
pub mod tmpfs;

use qorbits::form::{Form, Gl2};
use rug::Integer;

/// splitmix64: a small deterministic generator (common practice, no source needed).
pub struct Rng(pub u64);

impl Rng {
    pub fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in `-m..=m`.
    pub fn range(&mut self, m: i64) -> i64 {
        (self.next() % (2 * m as u64 + 1)) as i64 - m
    }

    /// Uniform in `-m..=m` without zero.
    pub fn nonzero(&mut self, m: i64) -> i64 {
        loop {
            let v = self.range(m);
            if v != 0 {
                return v;
            }
        }
    }

    /// A value with a random number of digits in `1..=max_digits`.
    pub fn big_upto(&mut self, max_digits: u32) -> Integer {
        let d = 1 + (self.next() % max_digits as u64) as u32;
        self.big(d)
    }

    /// Uniform in `-10^digits < v < 10^digits`, any size.
    pub fn big(&mut self, digits: u32) -> Integer {
        let mut v = Integer::new();
        for _ in 0..digits {
            v = v * 10u32 + (self.next() % 10) as u32;
        }
        if self.next() % 2 == 0 {
            -v
        } else {
            v
        }
    }
}

/// A random element of GL2(Z) with entries of absolute value at most `m`.
pub fn random_gl2(rng: &mut Rng, m: i64) -> Gl2<Integer> {
    loop {
        let (p, r) = (rng.range(m), rng.range(m));
        let (g, x, y) = ext_gcd(p, r);
        if g != 1 {
            continue;
        }
        // p·x + r·y = 1, so [[p, q], [r, s]] with s = x, q = −y has det 1.
        let (mut q, mut s) = (-y, x);
        // Shift (q, s) by multiples of (p, r) to spread the entries over the range.
        let k = rng.range(m / (1 + p.abs().max(r.abs())).max(1));
        q += k * p;
        s += k * r;
        if q.abs() > m || s.abs() > m {
            continue;
        }
        let sign = if rng.next() % 2 == 0 { 1 } else { -1 };
        let g = Gl2::<Integer>::new(p, q * sign, r, s * sign);
        assert_eq!(g.det().unwrap().abs(), 1);
        return g;
    }
}

fn ext_gcd(a: i64, b: i64) -> (i64, i64, i64) {
    if b == 0 {
        if a < 0 {
            (-a, -1, 0)
        } else {
            (a, 1, 0)
        }
    } else {
        let (g, x, y) = ext_gcd(b, a.rem_euclid(b));
        (g, y, x - (a.div_euclid(b)) * y)
    }
}

/// A random form with coefficients in `-m..=m` and non-zero discriminant.
pub fn random_form(rng: &mut Rng, m: i64) -> Form<Integer> {
    loop {
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(m)));
        if f.invariants().unwrap().disc != 0 {
            return f;
        }
    }
}

/// A random form with coefficients of up to `digits` decimal digits and Disc ≠ 0.
pub fn random_big_form(rng: &mut Rng, digits: u32) -> Form<Integer> {
    loop {
        let f = Form::new(std::array::from_fn(|_| rng.big(digits)));
        if f.invariants().unwrap().disc != 0 {
            return f;
        }
    }
}

/// Elements of PGL2(Z) (as [p, q, r, s]) forming the stabiliser of i and of e^{πi/3}.
pub const STAB_I: [[i64; 4]; 4] = [[1, 0, 0, 1], [1, 0, 0, -1], [0, 1, 1, 0], [0, 1, -1, 0]];
pub const STAB_RHO: [[i64; 4]; 6] = [
    [1, 0, 0, 1],
    [1, 0, -1, -1],
    [0, 1, 1, 0],
    [0, 1, -1, -1],
    [1, 1, -1, 0],
    [1, 1, 0, -1],
];
pub const STAB_LINES: [[[i64; 4]; 2]; 3] = [
    [[1, 0, 0, 1], [1, 0, 0, -1]],  // Re z = 0
    [[1, 0, 0, 1], [1, 0, -1, -1]], // Re z = 1/2
    [[1, 0, 0, 1], [0, 1, 1, 0]],   // |z| = 1
];

/// `Σ_{g ∈ G} g·f`: a form invariant under the finite group G (Disc may vanish).
pub fn symmetrise(f: &Form<Integer>, group: &[[i64; 4]]) -> Form<Integer> {
    let mut out = Form::<Integer>::from_i64([0; 5]);
    for g in group {
        let h = f.act(&Gl2::new(g[0], g[1], g[2], g[3])).unwrap();
        for k in 0..5 {
            out.c[k] += &h.c[k];
        }
    }
    out
}

/// Run a PARI/GP script (Debian package pari-gp) and return its output lines, failing the
/// test unless gp ran cleanly and printed exactly `expected` lines.
///
/// gp exits with status 0 even when a line of the script raised an error: it prints
/// `***` on stderr, drops the rest of that line and goes on. So a check whose gp line failed
/// would silently vanish from a `zip`; here any `***` on stderr or stdout (errors and
/// warnings alike) and any other line count are fatal. Fails with an instruction when `gp`
/// is missing: CI installs it.
pub fn gp_lines(script: &str, expected: usize) -> Vec<String> {
    use std::io::Write;
    use std::process::{Command, Stdio};
    let mut child = Command::new("gp")
        .args(["-q", "-f", "-D", "colors=no", "-s", "200000000"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("PARI/GP's `gp` is needed for this test: apt-get install pari-gp");
    // Feed stdin from a thread: a long script must not block on a full stdout pipe.
    let mut stdin = child.stdin.take().unwrap();
    let input = script.to_string();
    let writer = std::thread::spawn(move || stdin.write_all(input.as_bytes()));
    let out = child.wait_with_output().unwrap();
    writer
        .join()
        .unwrap()
        .expect("cannot write the script to gp");
    let stdout = String::from_utf8(out.stdout).expect("gp printed non-UTF-8 output");
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "gp failed: {stderr}");
    assert!(
        !stderr.contains("***") && !stdout.contains("***"),
        "gp reported an error: {stderr}{stdout}"
    );
    let lines: Vec<String> = stdout.lines().map(str::to_string).collect();
    assert_eq!(
        lines.len(),
        expected,
        "gp printed {} lines where the test expects {expected}; stderr: {stderr}",
        lines.len()
    );
    lines
}
