//! The 2-Selmer group of one curve from the classes over Q of its quartics (module doc of
//! [`crate::selmer`]).

use crate::error::{Error, Result};
use crate::selmer::Curve;
use crate::table::pipeline::classes_with_invariants;
use crate::table::row::{ClassRow, Pair};
use rug::Integer;

/// The 2-Selmer group of a curve.
#[derive(Clone, Debug)]
pub struct Selmer {
    /// The rank of E(Q)[2]: 0, 1 or 2.
    pub two_torsion_rank: u32,
    /// Invariant I = c4 of the quartics.
    pub i: Integer,
    /// Invariant J = 2·c6 of the quartics.
    pub j: Integer,
    /// The 2-Selmer rank: `#Sel² = 2^rank`.
    pub rank: u32,
    /// One canonical quartic per non-trivial element: the first class (in table order) of
    /// each class over Q (irreducible, or `2+2` when E has rational 2-torsion).
    pub elements: Vec<ClassRow>,
    /// All everywhere locally soluble classes without a rational root with these
    /// invariants.
    pub els_classes: usize,
    /// All classes without a rational root (irreducible, or `2+2`) with these invariants.
    pub irreducible_classes: usize,
}

/// The 2-Selmer group of `curve`.
pub fn two_selmer(curve: &Curve) -> Result<Selmer> {
    let (i, j) = curve.quartic_invariants();
    let pair = classes_with_invariants(&i, &j, curve.two_torsion_rank() > 0)?;
    selmer_of_pair(curve, &pair)
}

/// The 2-Selmer group of `curve` from the classes of its pair `(I, J) = (c4, 2c6)`, found
/// by any route: irreducible classes only when E(Q)[2] is trivial, all classes otherwise.
pub fn selmer_of_pair(curve: &Curve, pair: &Pair) -> Result<Selmer> {
    let (i, j) = curve.quartic_invariants();
    let two_torsion_rank = curve.two_torsion_rank();
    if (Integer::from(pair.i), Integer::from(pair.j)) != (i.clone(), j.clone()) {
        return Err(Error::Input(format!(
            "the classes of ({}, {}) are not those of the curve {}",
            pair.i,
            pair.j,
            curve.equation()
        )));
    }
    let irreducible_classes = pair
        .classes
        .iter()
        .filter(|r| r.pattern.without_rational_root())
        .count();
    let els_classes = pair.over_q.iter().map(Vec::len).sum();
    let elements: Vec<ClassRow> = pair.first_over_q().cloned().collect();
    let size = elements.len() + 1;
    if !size.is_power_of_two() {
        return Err(Error::Numerical(format!(
            "the curve {} gave {} non-trivial Selmer elements, so the group would have order {size}, \
             not a power of 2; please report this curve",
            curve.equation(),
            elements.len()
        )));
    }
    Ok(Selmer {
        two_torsion_rank,
        i,
        j,
        rank: size.trailing_zeros(),
        elements,
        els_classes,
        irreducible_classes,
    })
}
