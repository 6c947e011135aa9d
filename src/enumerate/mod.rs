//! Stage 3, enumeration: the loops that meet the canonical representative of every class —
//! the shared bounds ([`bounds`], proved in `docs/enumeration.md`), the bulk loops below a
//! height ([`bulk`]) and the search for the forms with given invariants
//! ([`by_invariants`]), and the work they do ([`cost`]). They yield candidate forms; the table stage classifies them.

pub mod bounds;
pub mod bulk;
pub mod by_invariants;
pub mod congruent;
pub mod cost;
pub mod squares;
pub mod syzygy;
