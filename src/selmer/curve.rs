//! Elliptic curves over Q by Weierstrass coefficients: c4, c6, the discriminant, the
//! invariants (I, J) = (c4, 2·c6) of their quartics and rational 2-torsion.

use crate::error::{Error, Result};
use crate::form::galois::resolvent_roots;
use rug::ops::Pow;
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
            return Err(Error::Input(format!(
                "the curve {} is singular (discriminant 0); give a non-singular model",
                e.equation()
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

    /// The coefficients `a1 a2 a3 a4 a6` separated by spaces, as the command line takes them.
    pub fn coefficients_text(&self) -> String {
        self.ainvs
            .iter()
            .map(ToString::to_string)
            .collect::<Vec<_>>()
            .join(" ")
    }

    /// The Weierstrass equation, e.g. `y^2 + y = x^3 - x`.
    pub fn equation(&self) -> String {
        let [a1, a2, a3, a4, a6] = &self.ainvs;
        let terms = |lead: &str, rest: &[(&Integer, &str)]| {
            let mut t = lead.to_string();
            for (c, m) in rest {
                if **c == 0 {
                    continue;
                }
                let sign = if **c < 0 { " - " } else { " + " };
                let a = Integer::from(c.abs_ref());
                let coeff = if a == 1 && !m.is_empty() {
                    String::new()
                } else {
                    a.to_string()
                };
                t += &format!("{sign}{coeff}{m}");
            }
            t
        };
        format!(
            "{} = {}",
            terms("y^2", &[(a1, "xy"), (a3, "y")]),
            terms("x^3", &[(a2, "x^2"), (a4, "x"), (a6, "")])
        )
    }

    /// An integral model with these c-invariants, if there is one. Every integral model is
    /// isomorphic over Z (x ↦ x + r, y ↦ y + s·x + t, which keep c4 and c6) to one with
    /// `a1, a3 ∈ {0, 1}` and `a2 ∈ {−1, 0, 1}`: s moves a1 by 2s, then r moves a2 by 3r,
    /// then t moves a3 by 2t (derived here). For each of those twelve shapes the
    /// b-invariants, hence a4 and a6, are determined by c4 = b2² − 24·b4 and
    /// c6 = −b2³ + 36·b2·b4 − 216·b6; the model exists iff those divisions are exact.
    pub fn from_c_invariants(c4: &Integer, c6: &Integer) -> Option<Curve> {
        for a1 in 0..=1i32 {
            for a3 in 0..=1i32 {
                for a2 in -1..=1i32 {
                    let b2 = Integer::from(a1 * a1 + 4 * a2);
                    let b4 = Integer::from(&b2 * &b2) - c4;
                    let Some(b4) = exact(b4, 24) else { continue };
                    let b6 = Integer::from(36) * &b2 * &b4 - Integer::from(&b2 * &b2) * &b2 - c6;
                    let Some(b6) = exact(b6, 216) else { continue };
                    let Some(a4) = exact(b4 - a1 * a3, 2) else {
                        continue;
                    };
                    let Some(a6) = exact(b6 - a3 * a3, 4) else {
                        continue;
                    };
                    let e = Curve {
                        ainvs: [a1.into(), a2.into(), a3.into(), a4, a6],
                    };
                    if e.discriminant() != 0 {
                        return Some(e);
                    }
                }
            }
        }
        None
    }

    /// A model that is minimal at every prime it can be tested at, and the scale u with
    /// `c4 = u⁴·c4'`, `c6 = u⁶·c6'` (u = 1 when the model is minimal already). A model is
    /// not minimal at p exactly when some integral model has invariants (c4/p⁴, c6/p⁶)
    /// (scaling an integral model by an integer keeps it integral); the primes tried are
    /// those of gcd(c4, c6), factored within a budget (huge curves may stay unminimised at a
    /// prime beyond it).
    pub fn minimal_model(&self) -> (Curve, Integer) {
        let (mut c4, mut c6) = (self.c4(), self.c6());
        let g = Integer::from(c4.gcd_ref(&c6));
        let primes = crate::arith::primes::try_factor(&g, 4_000_000).unwrap_or_default();
        let mut u = Integer::from(1);
        let mut best = self.clone();
        for (p, _) in primes {
            loop {
                let (p4, p6) = (p.clone().pow(4), p.clone().pow(6));
                if !c4.is_divisible(&p4) || !c6.is_divisible(&p6) {
                    break;
                }
                let (d4, d6) = (Integer::from(&c4 / &p4), Integer::from(&c6 / &p6));
                match Curve::from_c_invariants(&d4, &d6) {
                    Some(e) => {
                        (c4, c6, best) = (d4, d6, e);
                        u *= &p;
                    }
                    None => break,
                }
            }
        }
        (best, u)
    }
}

/// `n / k` when k divides n.
fn exact(n: Integer, k: u32) -> Option<Integer> {
    n.is_divisible_u(k).then(|| n / k)
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

    #[test]
    fn minimal_models_and_equations() {
        // y² = x³ − 7·2⁴x + 10·2⁶ is y² = x³ − 7x + 10 scaled by u = 2.
        let e = Curve::short(Integer::from(-7 * 16), Integer::from(10 * 64)).unwrap();
        let (m, u) = e.minimal_model();
        assert_eq!(u, 2);
        assert_eq!((m.c4(), m.c6()), (Integer::from(336), Integer::from(-8640)));
        let (same, one) = m.minimal_model();
        assert_eq!((same.c4(), one), (m.c4(), Integer::from(1)));
        // y² + y = x³ − x is recovered from its c-invariants (48, −216).
        let f = Curve::from_c_invariants(&Integer::from(48), &Integer::from(-216)).unwrap();
        assert_eq!((f.c4(), f.c6()), (Integer::from(48), Integer::from(-216)));
        assert_eq!(f.equation(), "y^2 + y = x^3 - x");
        // (1, 1) are not the invariants of any integral model (c4³ − c6² = 0 aside, 24 ∤ b2² − 1
        // for every shape).
        assert!(Curve::from_c_invariants(&Integer::from(1), &Integer::from(1)).is_none());
        assert_eq!(
            Curve::short(Integer::from(-7), Integer::from(10))
                .unwrap()
                .equation(),
            "y^2 = x^3 - 7x + 10"
        );
    }
}
