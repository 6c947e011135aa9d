//! Elliptic curves over Q by Weierstrass coefficients: c4, c6, the discriminant, the
//! invariants (I, J) = (c4, 2·c6) of their quartics and rational 2-torsion.

use crate::error::{Error, Result};
use crate::form::galois::resolvent_roots;
use rug::Integer;

/// An elliptic curve over Q by integral Weierstrass coefficients `[a1, a2, a3, a4, a6]`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Curve {
    /// `[a1, a2, a3, a4, a6]`.
    pub ainvs: [Integer; 5],
}

impl Curve {
    /// The curve with these coefficients; an input error when it is singular.
    pub fn new(ainvs: [Integer; 5]) -> Result<Curve> {
        let e = Curve { ainvs };
        if e.discriminant() == 0 {
            let [a1, a2, a3, a4, a6] = &e.ainvs;
            return Err(Error::Input(format!(
                "the curve [{a1}, {a2}, {a3}, {a4}, {a6}] is singular (discriminant 0)"
            )));
        }
        Ok(e)
    }

    /// `y² = x³ + Ax + B`.
    pub fn short(a: Integer, b: Integer) -> Result<Curve> {
        Curve::new([Integer::new(), Integer::new(), Integer::new(), a, b])
    }

    fn b_invariants(&self) -> (Integer, Integer, Integer) {
        let [a1, a2, a3, a4, a6] = &self.ainvs;
        let b2 = Integer::from(a1 * a1) + Integer::from(4) * a2;
        let b4 = Integer::from(2) * a4 + Integer::from(a1 * a3);
        let b6 = Integer::from(a3 * a3) + Integer::from(4) * a6;
        (b2, b4, b6)
    }

    /// `c4 = b2² − 24·b4`.
    pub fn c4(&self) -> Integer {
        let (b2, b4, _) = self.b_invariants();
        Integer::from(&b2 * &b2) - Integer::from(24) * b4
    }

    /// `c6 = −b2³ + 36·b2·b4 − 216·b6`.
    pub fn c6(&self) -> Integer {
        let (b2, b4, b6) = self.b_invariants();
        let b2c: Integer = b2.clone() * &b2 * &b2;
        Integer::from(36) * b2 * b4 - b2c - Integer::from(216) * b6
    }

    /// The discriminant `Δ = (c4³ − c6²)/1728`.
    pub fn discriminant(&self) -> Integer {
        let (c4, c6) = (self.c4(), self.c6());
        (c4.clone() * &c4 * &c4 - c6.clone() * &c6) / 1728
    }

    /// The invariants `(I, J) = (c4, 2·c6)` of the quartics whose 2-coverings are E's.
    pub fn quartic_invariants(&self) -> (Integer, Integer) {
        (self.c4(), Integer::from(2) * self.c6())
    }

    /// The x-coordinate of a rational point of order 2 on the model `y² = x³ − 27c4·x −
    /// 54c6`, if there is one.
    pub fn two_torsion(&self) -> Option<Integer> {
        let (i, j) = self.quartic_invariants();
        let roots = resolvent_roots(&i, &j).expect("big integers do not overflow");
        // The roots of x³ − 27Ix − 27J are −3φ for the resolvent roots φ.
        roots.into_iter().next().map(|phi| Integer::from(-3) * phi)
    }

    /// The rank of E(Q)[2]: 0, 1 or 2 for 0, 1 or 3 rational roots of the resolvent.
    pub fn two_torsion_rank(&self) -> u32 {
        let (i, j) = self.quartic_invariants();
        match resolvent_roots(&i, &j)
            .expect("big integers do not overflow")
            .len()
        {
            0 => 0,
            1 => 1,
            _ => 2,
        }
    }

    /// The curve as `[a1, a2, a3, a4, a6]` text.
    pub fn name(&self) -> String {
        let [a1, a2, a3, a4, a6] = &self.ainvs;
        format!("[{a1}, {a2}, {a3}, {a4}, {a6}]")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn invariants_of_a_general_model() {
        // y² + y = x³ − x (conductor 37): c4 = 48, c6 = −216, Δ = 37 (from memory, the
        // standard first curve of rank 1).
        let ai = [0, 0, 1, -1, 0].map(Integer::from);
        let e = Curve::new(ai).unwrap();
        assert_eq!(
            (e.c4(), e.c6(), e.discriminant()),
            (48.into(), (-216).into(), 37.into())
        );
        assert!(e.two_torsion().is_none());
        // y² = x³ − x has three points of order 2.
        let e = Curve::short((-1).into(), 0.into()).unwrap();
        assert!(e.two_torsion().is_some());
        assert!(Curve::short(0.into(), 0.into()).is_err());
        assert!(
            Curve::short((-3).into(), 2.into()).is_err(),
            "4·(−27) + 27·4 = 0"
        );
    }
}
