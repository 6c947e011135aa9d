//! The group GL2(Z) acting on forms: matrices, products, inverses, the names of the
//! elements of PGL2(Z), and the text form of forms and matrices.

use crate::arith::int::Int;
use crate::form::{Form, Gl2};
use rug::Integer;
use std::fmt;

impl<T: Int> Gl2<T> {
    /// `[[p, q], [r, s]]`, from machine integers.
    pub fn new(p: i64, q: i64, r: i64, s: i64) -> Self {
        Gl2 {
            m: [p, q, r, s].map(T::from_i64),
        }
    }

    /// The identity.
    pub fn identity() -> Self {
        Self::new(1, 0, 0, 1)
    }

    /// `ps − qr`, or `None` on overflow.
    pub fn det(&self) -> Option<T> {
        let [p, q, r, s] = &self.m;
        p.mul(s)?.sub(&q.mul(r)?)
    }

    /// The matrix product `self · o`. With the action above, `(h·g)·f = h·(g·f)` is written
    /// `f.act(&h.mul(&g))`, i.e. `act(act(f, g), h) = act(f, h·g)`.
    pub fn mul(&self, o: &Gl2<T>) -> Option<Gl2<T>> {
        let [a, b, c, d] = &self.m;
        let [e, f, g, h] = &o.m;
        Some(Gl2 {
            m: [
                a.mul(e)?.add(&b.mul(g)?)?,
                a.mul(f)?.add(&b.mul(h)?)?,
                c.mul(e)?.add(&d.mul(g)?)?,
                c.mul(f)?.add(&d.mul(h)?)?,
            ],
        })
    }

    /// The inverse (entries of an integral matrix of determinant ±1).
    pub fn inverse(&self) -> Option<Gl2<T>> {
        let det = self.det()?;
        let [p, q, r, s] = &self.m;
        let adj = [s.clone(), q.neg()?, r.neg()?, p.clone()];
        let mut out = adj;
        if det.signum() < 0 {
            for x in out.iter_mut() {
                *x = x.neg()?;
            }
        }
        Some(Gl2 { m: out })
    }

    /// The same matrix over [`rug::Integer`].
    pub fn to_big(&self) -> Gl2<Integer> {
        Gl2 {
            m: std::array::from_fn(|k| self.m[k].to_integer()),
        }
    }

    /// `γ` or `−γ`, whichever has its first non-zero entry positive: both act the same way
    /// on quartic forms, so this picks one name per element of PGL2(Z).
    pub fn normalised(&self) -> Option<Gl2<T>> {
        let first = self
            .m
            .iter()
            .find(|x| !x.is_zero())
            .map(|x| x.signum())
            .unwrap_or(1);
        if first >= 0 {
            return Some(self.clone());
        }
        let mut out = self.m.clone();
        for x in out.iter_mut() {
            *x = x.neg()?;
        }
        Some(Gl2 { m: out })
    }
}

impl<T: fmt::Display> fmt::Display for Form<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let [a, b, c, d, e] = &self.c;
        write!(f, "({a}, {b}, {c}, {d}, {e})")
    }
}

impl<T: fmt::Display> fmt::Display for Gl2<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let [p, q, r, s] = &self.m;
        write!(f, "[[{p}, {q}], [{r}, {s}]]")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn composition_rule_of_the_action() {
        // DESIGN §2: act(act(f, g), h) = act(f, h·g).
        let f = Form::<i128>::new([3, -1, 4, 1, -5]);
        let g = Gl2::new(2, 1, 1, 1);
        let h = Gl2::new(0, 1, -1, 3);
        let lhs = f.act(&g).unwrap().act(&h).unwrap();
        let rhs = f.act(&h.mul(&g).unwrap()).unwrap();
        assert_eq!(lhs, rhs);
        let back = lhs.act(&h.mul(&g).unwrap().inverse().unwrap()).unwrap();
        assert_eq!(back, f);
    }
}
