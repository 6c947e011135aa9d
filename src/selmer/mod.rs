//! 2-Selmer groups of elliptic curves over Q from the classes of integral binary quartic
//! forms with invariants `(I, J) = (c4, 2·c6)`, and the average size of the 2-Selmer group
//! over a family of short Weierstrass curves; [`dataset`] writes that family's curves and
//! Selmer elements as a citable SQLite file.
//!
//! The curve `E: y² + a1xy + a3y = x³ + a2x² + a4x + a6` is isomorphic over Q to
//! `E_{I,J}: y² = x³ − 27Ix − 27J` for `(I, J) = (c4, 2c6)` (substitute x ↦ x/36 − b2/12
//! and scale by u = 1/6). A form with these invariants gives a 2-covering of E; the
//! everywhere locally soluble ones give elements of the 2-Selmer group, and two forms give
//! the same element exactly when they are equivalent over Q ([`crate::form::rational`]). A form
//! with a rational root gives the trivial element, so the non-trivial elements are the
//! classes over Q of the everywhere locally soluble forms without a rational root, and
//! `#Sel² = 1 + (number of those classes over Q)`. Without rational 2-torsion these forms
//! are irreducible (a form with two quadratic factors over Q pairs its roots rationally,
//! which is a rational root of the resolvent); with it, forms with two quadratic factors
//! occur too, and the search includes reducible forms. That every element has an integral
//! representative with exactly these invariants is a published fact of 2-descent, recalled
//! from memory and checked by the tests against PARI/GP.
//!
//! ```
//! use qorbits::selmer::{two_selmer, Curve};
//! use rug::Integer;
//! // y² = x³ − x + 1 has rank 1 and trivial 2-torsion; its 2-Selmer group has order 2.
//! let e = Curve::short(Integer::from(-1), Integer::from(1)).unwrap();
//! let s = two_selmer(&e).unwrap();
//! assert_eq!((s.rank, s.elements.len()), (1, 1));
//! ```
mod curve;
pub mod dataset;
mod family;
mod group;

pub use curve::Curve;
pub use family::{
    cheaper_route, estimated_seconds, family_selmer, family_statement, selmer_stats,
    selmer_stats_by, short_family, short_height, stats_from_groups, FamilyRoute, SelmerBin,
    SelmerStats,
};
pub use group::{selmer_of_pair, two_selmer, Selmer};
