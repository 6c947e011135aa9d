//! Exact integer arithmetic shared by the fast and the general path.
//!
//! The kernel is written once over the [`Int`] trait and instantiated twice: with `i128`
//! (every operation checked, `None` on overflow) for table-sized forms, and with
//! [`rug::Integer`] (never fails) for everything else. A caller runs the fast path and falls
//! back to the general path when it returns `None`; nothing ever wraps silently.
//!
//! ```
//! use qorbits::arith::int::{Int, sum_of_products};
//! let (a, b) = (3i128, 5i128);
//! // 2·a·b − b² = 5
//! assert_eq!(sum_of_products(&[(2, &[&a, &b]), (-1, &[&b, &b])]), Some(5));
//! assert_eq!(i128::MAX.mul(&2), None);
//! ```

use rug::Integer;
use std::fmt::{Debug, Display};
use std::hash::Hash;

/// An exact integer type: `i128` with checked arithmetic or [`rug::Integer`].
pub trait Int: Clone + Ord + Eq + Hash + Debug + Display + Send + Sync + 'static {
    /// The value `v`.
    fn from_i64(v: i64) -> Self;
    /// `self + o`, or `None` on overflow.
    fn add(&self, o: &Self) -> Option<Self>;
    /// `self − o`, or `None` on overflow.
    fn sub(&self, o: &Self) -> Option<Self>;
    /// `self · o`, or `None` on overflow.
    fn mul(&self, o: &Self) -> Option<Self>;
    /// `self · k` for a small integer `k`, or `None` on overflow.
    fn mul_i64(&self, k: i64) -> Option<Self> {
        self.mul(&Self::from_i64(k))
    }
    /// `−self`, or `None` on overflow.
    fn neg(&self) -> Option<Self>;
    /// −1, 0 or 1.
    fn signum(&self) -> i32;
    /// Whether the value is zero.
    fn is_zero(&self) -> bool {
        self.signum() == 0
    }
    /// Nearest `f64` (may round; used only for numerical approximations).
    fn to_f64(&self) -> f64;
    /// The exact value as a [`rug::Integer`].
    fn to_integer(&self) -> Integer;
    /// The value of `v` in this type, if it fits.
    fn try_from_integer(v: &Integer) -> Option<Self>;
    /// Number of significant bits of `|self|` (0 for zero).
    fn bits(&self) -> u32;
    /// `self / o` if `o` divides `self` exactly, else `None` (also `None` for `o = 0`).
    fn div_exact(&self, o: &Self) -> Option<Self>;
    /// `⌊self / o⌋` for `o ≠ 0`, or `None` on overflow or `o = 0`.
    fn div_floor(&self, o: &Self) -> Option<Self>;
    /// `⌊√self⌋` for `self ≥ 0`, `None` for negative values.
    fn isqrt(&self) -> Option<Self>;
    /// Whether `self` is the square of an integer (zero included, negatives excluded).
    fn is_square(&self) -> bool {
        match self.isqrt() {
            Some(r) => r.mul(&r).as_ref() == Some(self),
            None => false,
        }
    }
    /// `self mod m` in `0..m` for `m > 0`.
    fn rem_euclid_i64(&self, m: i64) -> i64;
    /// `|self|`, or `None` on overflow.
    fn abs(&self) -> Option<Self> {
        if self.signum() < 0 {
            self.neg()
        } else {
            Some(self.clone())
        }
    }
}

impl Int for i128 {
    fn from_i64(v: i64) -> Self {
        v as i128
    }
    fn add(&self, o: &Self) -> Option<Self> {
        self.checked_add(*o)
    }
    fn sub(&self, o: &Self) -> Option<Self> {
        self.checked_sub(*o)
    }
    fn mul(&self, o: &Self) -> Option<Self> {
        self.checked_mul(*o)
    }
    fn neg(&self) -> Option<Self> {
        self.checked_neg()
    }
    fn signum(&self) -> i32 {
        i128::signum(*self) as i32
    }
    fn to_f64(&self) -> f64 {
        *self as f64
    }
    fn to_integer(&self) -> Integer {
        Integer::from(*self)
    }
    fn try_from_integer(v: &Integer) -> Option<Self> {
        v.to_i128()
    }
    fn bits(&self) -> u32 {
        128 - self.unsigned_abs().leading_zeros()
    }
    fn div_exact(&self, o: &Self) -> Option<Self> {
        if *o == 0 || self.checked_rem(*o)? != 0 {
            return None;
        }
        self.checked_div(*o)
    }
    fn div_floor(&self, o: &Self) -> Option<Self> {
        if *o == 0 {
            return None;
        }
        let q = self.checked_div(*o)?;
        let r = self.checked_rem(*o)?;
        if r != 0 && ((r < 0) != (*o < 0)) {
            q.checked_sub(1)
        } else {
            Some(q)
        }
    }
    fn rem_euclid_i64(&self, m: i64) -> i64 {
        self.rem_euclid(m as i128) as i64
    }
    fn isqrt(&self) -> Option<Self> {
        if *self < 0 {
            return None;
        }
        // Floating estimate, then exact correction (the estimate is within a few units).
        let mut r = (*self as f64).sqrt() as i128;
        while r > 0 && r.checked_mul(r).is_none_or(|s| s > *self) {
            r -= 1;
        }
        while (r + 1).checked_mul(r + 1).is_some_and(|s| s <= *self) {
            r += 1;
        }
        Some(r)
    }
}

impl Int for Integer {
    fn from_i64(v: i64) -> Self {
        Integer::from(v)
    }
    fn add(&self, o: &Self) -> Option<Self> {
        Some(Integer::from(self + o))
    }
    fn sub(&self, o: &Self) -> Option<Self> {
        Some(Integer::from(self - o))
    }
    fn mul(&self, o: &Self) -> Option<Self> {
        Some(Integer::from(self * o))
    }
    fn mul_i64(&self, k: i64) -> Option<Self> {
        Some(Integer::from(self * k))
    }
    fn neg(&self) -> Option<Self> {
        Some(Integer::from(-self))
    }
    fn signum(&self) -> i32 {
        match self.cmp0() {
            std::cmp::Ordering::Less => -1,
            std::cmp::Ordering::Equal => 0,
            std::cmp::Ordering::Greater => 1,
        }
    }
    fn to_f64(&self) -> f64 {
        Integer::to_f64(self)
    }
    fn to_integer(&self) -> Integer {
        self.clone()
    }
    fn try_from_integer(v: &Integer) -> Option<Self> {
        Some(v.clone())
    }
    fn bits(&self) -> u32 {
        self.significant_bits()
    }
    fn div_exact(&self, o: &Self) -> Option<Self> {
        if o.is_zero() || !self.is_divisible(o) {
            return None;
        }
        Some(Integer::from(self.div_exact_ref(o)))
    }
    fn div_floor(&self, o: &Self) -> Option<Self> {
        if o.is_zero() {
            return None;
        }
        let (q, _) = <(Integer, Integer)>::from(self.div_rem_floor_ref(o));
        Some(q)
    }
    fn isqrt(&self) -> Option<Self> {
        if self.signum() < 0 {
            return None;
        }
        Some(Integer::from(self.sqrt_ref()))
    }
    fn is_square(&self) -> bool {
        self.is_perfect_square()
    }
    fn rem_euclid_i64(&self, m: i64) -> i64 {
        self.mod_u(m as u32) as i64
    }
}

/// `Σ k·Π factors` over the given terms, exactly, or `None` on overflow.
///
/// Formulas in the kernel are written with it so that they read like the formulas they
/// implement: `I = 12ae − 3bd + c²` is `sum_of_products(&[(12, &[a, e]), (-3, &[b, d]), (1, &[c, c])])`.
pub fn sum_of_products<T: Int>(terms: &[(i64, &[&T])]) -> Option<T> {
    let mut total = T::from_i64(0);
    for (k, factors) in terms {
        let mut p = T::from_i64(*k);
        for f in factors.iter() {
            p = p.mul(f)?;
        }
        total = total.add(&p)?;
    }
    Some(total)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn checked_i128_refuses_overflow() {
        assert_eq!(Int::mul(&(1i128 << 100), &(1i128 << 30)), None);
        assert_eq!(Int::add(&i128::MAX, &1), None);
        assert_eq!(Int::neg(&i128::MIN), None);
    }

    #[test]
    fn floor_division_and_roots_agree_between_types() {
        for n in [-17i128, -16, -1, 0, 1, 15, 16, 17, 1 << 90] {
            for d in [-5i128, -1, 1, 3, 7] {
                let big = Int::div_floor(&Integer::from(n), &Integer::from(d)).unwrap();
                assert_eq!(Int::div_floor(&n, &d).unwrap(), big.to_i128().unwrap());
            }
            let r = Int::isqrt(&n);
            let rb = Int::isqrt(&Integer::from(n));
            assert_eq!(r.map(Integer::from), rb);
            assert_eq!(Int::is_square(&n), Int::is_square(&Integer::from(n)));
        }
        assert!(Int::is_square(&(((1i128 << 62) + 3) * ((1i128 << 62) + 3))));
        assert!(!Int::is_square(
            &(((1i128 << 62) + 3) * ((1i128 << 62) + 3) - 1)
        ));
    }

    #[test]
    fn sum_of_products_matches_hand_value() {
        let (a, b, c) = (Integer::from(2), Integer::from(-3), Integer::from(7));
        // 12·a·c − 3·b² = 168 − 27
        let v = sum_of_products(&[(12, &[&a, &c]), (-3, &[&b, &b])]).unwrap();
        assert_eq!(v, 141);
    }
}
