//! Real and complex numbers for the numerical parts of the kernel, at two precisions.
//!
//! [`Real`] is implemented by `f64` (the fast path) and by [`Mp`], an MPFR number of fixed
//! precision (the certified path), so the root finder and the covariant are written once.
//! Constants are made with [`Real::lit`], which takes the precision of the receiver.
//!
//! ```
//! use qorbits::arith::real::{Mp, Real};
//! let x = Mp::new(200, 2.0);
//! let r = x.sqrt();
//! assert!((r.clone() * r - x).abs().to_f64() < 1e-55);
//! ```

use rug::ops::Pow;
use rug::Float;
use std::ops::{Add, Div, Mul, Neg, Sub};

/// An ordered field with square root and logarithm, at a fixed working precision.
pub trait Real:
    Clone
    + PartialOrd
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
    + std::fmt::Debug
{
    /// The constant `v` at the precision of `self`.
    fn lit(&self, v: f64) -> Self;
    /// Square root.
    fn sqrt(&self) -> Self;
    /// Natural logarithm.
    fn ln(&self) -> Self;
    /// Absolute value.
    fn abs(&self) -> Self;
    /// Nearest `f64`.
    fn to_f64(&self) -> f64;
    /// Nearest integer, as an exact integer.
    fn round_integer(&self) -> rug::Integer;
    /// The exact integer `n` at the precision of `self` (rounded if it has more bits).
    fn int_lit(&self, n: &rug::Integer) -> Self;
    /// Unit in the last place at this precision, relative to 1 (2⁻ᵖʳᵉᶜ), as a number of this
    /// precision (it underflows f64 beyond 1074 bits).
    fn epsilon(&self) -> Self;
}

impl Real for f64 {
    fn lit(&self, v: f64) -> Self {
        v
    }
    fn sqrt(&self) -> Self {
        f64::sqrt(*self)
    }
    fn ln(&self) -> Self {
        f64::ln(*self)
    }
    fn abs(&self) -> Self {
        f64::abs(*self)
    }
    fn to_f64(&self) -> f64 {
        *self
    }
    fn round_integer(&self) -> rug::Integer {
        rug::Integer::from_f64(self.round()).unwrap_or_default()
    }
    fn int_lit(&self, n: &rug::Integer) -> Self {
        n.to_f64()
    }
    fn epsilon(&self) -> Self {
        f64::EPSILON
    }
}

/// An MPFR floating-point number; every result keeps the precision of its left operand.
#[derive(Clone, Debug, PartialEq, PartialOrd)]
pub struct Mp(pub Float);

impl Mp {
    /// The value `v` with `prec` bits.
    pub fn new(prec: u32, v: f64) -> Mp {
        Mp(Float::with_val(prec, v))
    }

    /// The precision in bits.
    pub fn prec(&self) -> u32 {
        self.0.prec()
    }
}

macro_rules! mp_op {
    ($tr:ident, $f:ident, $op:tt) => {
        impl $tr for Mp {
            type Output = Mp;
            fn $f(self, o: Mp) -> Mp {
                Mp(self.0 $op o.0)
            }
        }
    };
}
mp_op!(Add, add, +);
mp_op!(Sub, sub, -);
mp_op!(Mul, mul, *);
mp_op!(Div, div, /);

impl Neg for Mp {
    type Output = Mp;
    fn neg(self) -> Mp {
        Mp(-self.0)
    }
}

impl Real for Mp {
    fn lit(&self, v: f64) -> Self {
        Mp(Float::with_val(self.0.prec(), v))
    }
    fn sqrt(&self) -> Self {
        Mp(self.0.clone().sqrt())
    }
    fn ln(&self) -> Self {
        Mp(self.0.clone().ln())
    }
    fn abs(&self) -> Self {
        Mp(self.0.clone().abs())
    }
    fn to_f64(&self) -> f64 {
        self.0.to_f64()
    }
    fn round_integer(&self) -> rug::Integer {
        self.0.to_integer().unwrap_or_default()
    }
    fn int_lit(&self, n: &rug::Integer) -> Self {
        Mp(Float::with_val(self.0.prec(), n))
    }
    fn epsilon(&self) -> Self {
        let p = self.0.prec();
        Mp(Float::with_val(p, 2u32).pow(-(p as i32)))
    }
}

/// A complex number over a [`Real`].
#[derive(Clone, Debug, Default)]
pub struct Cx<R> {
    /// Real part.
    pub re: R,
    /// Imaginary part.
    pub im: R,
}

impl<R: Real> Cx<R> {
    /// `re + i·im`.
    pub fn new(re: R, im: R) -> Self {
        Cx { re, im }
    }
    /// `|z|²`.
    pub fn norm2(&self) -> R {
        self.re.clone() * self.re.clone() + self.im.clone() * self.im.clone()
    }
    /// `|z|`.
    pub fn abs(&self) -> R {
        self.norm2().sqrt()
    }
    /// `z + w`.
    pub fn add(&self, w: &Self) -> Self {
        Cx::new(
            self.re.clone() + w.re.clone(),
            self.im.clone() + w.im.clone(),
        )
    }
    /// `z − w`.
    pub fn sub(&self, w: &Self) -> Self {
        Cx::new(
            self.re.clone() - w.re.clone(),
            self.im.clone() - w.im.clone(),
        )
    }
    /// `z · w`.
    pub fn mul(&self, w: &Self) -> Self {
        Cx::new(
            self.re.clone() * w.re.clone() - self.im.clone() * w.im.clone(),
            self.re.clone() * w.im.clone() + self.im.clone() * w.re.clone(),
        )
    }
    /// `z / w`.
    pub fn div(&self, w: &Self) -> Self {
        let d = w.norm2();
        Cx::new(
            (self.re.clone() * w.re.clone() + self.im.clone() * w.im.clone()) / d.clone(),
            (self.im.clone() * w.re.clone() - self.re.clone() * w.im.clone()) / d,
        )
    }
    /// `z · k` for real `k`.
    pub fn scale(&self, k: &R) -> Self {
        Cx::new(self.re.clone() * k.clone(), self.im.clone() * k.clone())
    }
    /// Complex conjugate.
    pub fn conj(&self) -> Self {
        Cx::new(self.re.clone(), -self.im.clone())
    }
}

impl Cx<f64> {
    /// `√z` on the principal branch (`Re √z ≥ 0`).
    pub fn sqrt(&self) -> Cx<f64> {
        let r = self.abs();
        let u = ((r + self.re) / 2.0).max(0.0).sqrt();
        let v = ((r - self.re) / 2.0).max(0.0).sqrt();
        Cx::new(u, if self.im < 0.0 { -v } else { v })
    }
}
