//! The inner loop of the search by invariants: for one task (a, b) with `a ≠ 0`, every c
//! of its range for which the syzygy `27R² = 48·I·a²·P − P³ − 64·J·a³` (`P = 8ac − 3b²`)
//! has an integer solution R ≥ 0, with that R.
//!
//! The right-hand side `v(c)` is a cubic in c. Rather than evaluating it at every c, the
//! loop sieves the whole range of c of the task by residues
//! ([`crate::enumerate::squares::sieve`]: one period of `v mod m` per modulus m ≤ 64,
//! computed by forward differences mod m on 64-bit words, ANDed 64 values of c at a time),
//! so that the cost per c is a few word operations per modulus, shared by 64 values of c.
//! Only the c that survive the moduli (few: each odd prime keeps about half) are
//! evaluated exactly: by Horner's rule on checked `i128`, or on [`rug::Integer`] when that
//! overflows, followed by an exact integer square root. No step can overflow silently: the
//! residue arithmetic stays below `2·64²` (`docs/family-enumeration.md` §4), the exact
//! evaluation is checked.
//!
//! ```
//! use qorbits::enumerate::syzygy::{syzygy_cubic, solutions};
//! // (a, b) = (1, 0), (I, J) = (10, −29): every c with 27R² = v(c) solvable.
//! let cubic = syzygy_cubic(10, -29, 1, 0).unwrap();
//! let mut out = Vec::new();
//! solutions(&cubic, (-40, 40), true, &mut out).unwrap();
//! for &(c, r) in &out {
//!     let p = 8 * c as i128;
//!     assert_eq!(27 * r * r, 48 * 10 * p - p * p * p + 64 * 29);
//! }
//! ```

use crate::arith::int::Int;
use crate::enumerate::squares::sieve;
use rug::Integer;

/// `v(c) = k[3]·c³ + k[2]·c² + k[1]·c + k[0]`, the right-hand side `27R²` of the syzygy
/// for fixed (I, J, a, b).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SyzygyCubic {
    /// The coefficients, constant term first.
    pub k: [i128; 4],
}

/// The cubic of the syzygy, or `None` if a coefficient does not fit `i128`. With
/// `P = p1·c + p0`, `p1 = 8a`, `p0 = −3b²`:
/// `v = −p1³c³ − 3p1²p0·c² + (48·I·a²·p1 − 3p1·p0²)·c + 48·I·a²·p0 − p0³ − 64·J·a³`.
pub fn syzygy_cubic(i: i128, j: i128, a: i128, b: i128) -> Option<SyzygyCubic> {
    let p1 = a.checked_mul(8)?;
    let p0 = b.checked_mul(b)?.checked_mul(-3)?;
    let ia2 = i.checked_mul(48)?.checked_mul(a.checked_mul(a)?)?;
    let k3 = p1.checked_pow(3)?.checked_neg()?;
    let k2 = p1.checked_mul(p1)?.checked_mul(p0)?.checked_mul(-3)?;
    let k1 = ia2
        .checked_mul(p1)?
        .checked_sub(p1.checked_mul(3)?.checked_mul(p0.checked_mul(p0)?)?)?;
    let k0 = ia2
        .checked_mul(p0)?
        .checked_sub(p0.checked_pow(3)?)?
        .checked_sub(j.checked_mul(64)?.checked_mul(a.checked_pow(3)?)?)?;
    Some(SyzygyCubic {
        k: [k0, k1, k2, k3],
    })
}

impl SyzygyCubic {
    /// `v(c)` exactly.
    pub fn eval_big(&self, c: i64) -> Integer {
        let c = Integer::from(c);
        let mut acc = Integer::from(self.k[3]);
        for k in self.k[..3].iter().rev() {
            acc = acc * &c + Integer::from(*k);
        }
        acc
    }

    fn eval(&self, c: i128) -> Option<i128> {
        let mut acc = self.k[3];
        for k in self.k[..3].iter().rev() {
            acc = acc.checked_mul(c)?.checked_add(*k)?;
        }
        Some(acc)
    }
}

/// `Some(R)` with `R ≥ 0` if `v(c) = 27R²`, exactly (i128 when the evaluation fits, big
/// integers otherwise); `Err` if R itself exceeds i128.
fn exact_root(cubic: &SyzygyCubic, c: i64) -> Result<Option<i128>, ()> {
    match cubic.eval(i128::from(c)) {
        Some(v) => {
            if v < 0 || v % 27 != 0 {
                return Ok(None);
            }
            let s = v / 27;
            let r = Int::isqrt(&s).expect("non-negative");
            Ok((r * r == s).then_some(r))
        }
        None => {
            let v = cubic.eval_big(c);
            if v < 0 || !v.is_divisible_u(27) {
                return Ok(None);
            }
            let s = v / 27u32;
            let r = s.clone().sqrt();
            if Integer::from(&r * &r) != s {
                return Ok(None);
            }
            r.to_i128().map(Some).ok_or(())
        }
    }
}

/// Every `(c, R)` with `c_lo ≤ c ≤ c_hi`, `R ≥ 0` and `27R² = v(c)`, in increasing c: with
/// `sieved`, the residue sieve of [`crate::enumerate::squares`] and an exact test of each
/// survivor; without, the plain loop — an exact test of every c, the oracle the tests
/// compare the sieve with. `None` if a solution has R beyond i128 (then nothing is claimed
/// about the task).
#[must_use]
pub fn solutions(
    cubic: &SyzygyCubic,
    (c_lo, c_hi): (i64, i64),
    sieved: bool,
    out: &mut Vec<(i64, i128)>,
) -> Option<()> {
    if c_lo > c_hi {
        return Some(());
    }
    let len = (c_hi - c_lo + 1) as usize;
    let mut bits = vec![!0u64; len.div_ceil(64)];
    if len % 64 != 0 {
        *bits.last_mut().expect("len > 0") = (1u64 << (len % 64)) - 1;
    }
    if sieved {
        sieve(&cubic.k, c_lo, &mut bits);
    }
    for (w, &word) in bits.iter().enumerate() {
        let mut word = word;
        while word != 0 {
            let c = c_lo + (64 * w + word.trailing_zeros() as usize) as i64;
            word &= word - 1;
            if let Some(r) = exact_root(cubic, c).ok()? {
                out.push((c, r));
            }
        }
    }
    Some(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::form::Form;

    #[test]
    fn the_sieve_and_the_plain_loop_agree() {
        // Tasks (a, b) of forms of growing height, so that each has a solution at its own c;
        // the sieve and the plain loop must give the same solutions.
        let mut state: u64 = 7;
        let mut next = |m: i64| {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            ((state >> 33) as i64).rem_euclid(2 * m + 1) - m
        };
        let mut seen = 0;
        for scale in [3i64, 30, 300, 3000, 30_000] {
            for _ in 0..8 {
                let f = [
                    next(scale / 3).max(1),
                    next(scale),
                    next(scale),
                    next(scale),
                    next(scale),
                ];
                let [a, b, c, d, _] = f.map(i128::from);
                let inv = Form::<i128>::new(f.map(i128::from)).invariants().unwrap();
                let cubic = syzygy_cubic(inv.i, inv.j, a, b).unwrap();
                let (lo, hi) = (f[2] - 3000, f[2] + 3000);
                let mut fast = Vec::new();
                solutions(&cubic, (lo, hi), true, &mut fast).unwrap();
                let mut plain = Vec::new();
                solutions(&cubic, (lo, hi), false, &mut plain).unwrap();
                assert_eq!(fast, plain, "{f:?}");
                // R = b³ + 8a²d − 4abc at the form's own c.
                let r = (b.pow(3) + 8 * a * a * d - 4 * a * b * c).abs();
                assert!(plain.contains(&(f[2], r)), "{f:?}");
                seen += plain.len();
            }
        }
        assert!(seen >= 40);
    }
}
