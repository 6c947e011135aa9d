//! The row types of the table: the parameters of a build, one class ([`ClassRow`]), the
//! classes of one pair (I, J) with their grouping over Q ([`Pair`]), and a whole table in
//! memory ([`Table`]).
//!
//! ```
//! use qorbits::table::row::Params;
//! let p = Params { height: 1_000_000, include_reducible: false };
//! assert_eq!(serde_json::to_string(&p).unwrap(), r#"{"height":1000000,"include_reducible":false}"#);
//! ```

use crate::form::describe::height_decimal;
use crate::form::galois::{FactorPattern, GaloisGroup};
use crate::form::local::{everywhere_soluble, insoluble_places, LocalPlace, Place};
use crate::form::{Form, Signature};
use crate::table::json;
use rug::Integer;
use serde::{Deserialize, Serialize, Serializer};
use serde_json::Value;

/// What a table is built from (also the `parameters` of its manifest).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Params {
    /// Classes with `H < height`.
    pub height: i128,
    /// Also the classes with a rational linear or quadratic factor (Disc ≠ 0).
    pub include_reducible: bool,
}

impl Params {
    /// The default file name of the table: `qorbits-h1e6.sqlite` (or
    /// `qorbits-h1e6-all.sqlite` with reducible classes).
    pub fn default_file_name(&self) -> String {
        let mut x = self.height;
        let mut k = 0;
        while x % 10 == 0 && x > 0 {
            x /= 10;
            k += 1;
        }
        let h = if k >= 3 && x < 10 {
            format!("{x}e{k}")
        } else {
            self.height.to_string()
        };
        let suffix = if self.include_reducible { "-all" } else { "" };
        format!("qorbits-h{h}{suffix}.sqlite")
    }
}

/// The sort key of a row in table order, `(H4, I, J, (a, b, c, d, e))` (DESIGN §4).
pub type Key = (i64, i64, i64, [i64; 5]);

/// One class: canonical representative and everything the kernel computes about it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ClassRow {
    /// Canonical representative `[a, b, c, d, e]`.
    pub form: [i64; 5],
    /// Invariant I.
    pub i: i64,
    /// Invariant J.
    pub j: i64,
    /// Discriminant.
    pub disc: i64,
    /// Four times the height.
    pub h4: i64,
    /// Real roots and definiteness.
    pub signature: Signature,
    /// Factorisation pattern over Q.
    pub pattern: FactorPattern,
    /// Galois group (irreducible classes).
    pub galois: Option<GaloisGroup>,
    /// Order of the PGL2(Z)-stabiliser.
    pub stabiliser: u8,
    /// Stable label ([`crate::table::group`]); empty until the pair is grouped.
    pub label: String,
    /// For an everywhere locally soluble class without a rational root (irreducible, or
    /// `2+2`): the label of the first class (in table order) of its class over Q among the
    /// classes with the same (I, J) ([`crate::form::rational`]); `None` otherwise.
    pub rational: Option<String>,
    /// Local data: every prime dividing 2·Disc in increasing order, then the real place.
    /// Empty only in benchmark builds without local data.
    pub local: Vec<LocalPlace<i64>>,
}

impl ClassRow {
    /// Irreducible over Q.
    pub fn irreducible(&self) -> bool {
        self.pattern == FactorPattern::Irreducible
    }

    /// Everywhere locally soluble.
    pub fn els(&self) -> bool {
        everywhere_soluble(&self.local)
    }

    /// The places without a point, comma-separated (`""` when ELS), e.g. `2,inf`.
    pub fn insoluble_at(&self) -> String {
        insoluble_places(&self.local)
            .map(ToString::to_string)
            .collect::<Vec<_>>()
            .join(",")
    }

    /// Whether the class is grouped over Q (has a `rational` class): everywhere locally
    /// soluble, with local data, and without a rational root.
    pub fn grouped_over_q(&self) -> bool {
        self.pattern.without_rational_root() && !self.local.is_empty() && self.els()
    }

    /// The sort key of the table.
    pub fn key(&self) -> Key {
        (self.h4, self.i, self.j, self.form)
    }
}

impl ClassRow {
    /// The factorisation of |Disc|, read off the local data (the primes with v_p(Disc) > 0).
    pub fn disc_factors(&self) -> Vec<(i64, u32)> {
        self.local
            .iter()
            .filter_map(|l| match (&l.place, l.v_disc) {
                (Place::Prime(p), Some(v)) if v > 0 => Some((*p, v)),
                _ => None,
            })
            .collect()
    }

    /// H = H4/4 exactly in decimal.
    pub fn height(&self) -> String {
        height_decimal(&Integer::from(self.h4))
    }
}

/// The JSON object of a class under the output contract (docs/output.md).
impl Serialize for ClassRow {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let insoluble: Vec<Value> = insoluble_places(&self.local)
            .map(|p| Value::String(p.to_string()))
            .collect();
        json::object(vec![
            ("label", Value::String(self.label.clone())),
            ("form", json::form(&Form::<Integer>::from_i64(self.form))),
            ("I", json::small(self.i)),
            ("J", json::small(self.j)),
            ("disc", json::small(self.disc)),
            ("disc_factors", json::factors(&self.disc_factors())),
            ("H4", json::small(self.h4)),
            ("H", json::height(&Integer::from(self.h4), &self.height())),
            ("real_roots", Value::from(self.signature.real_roots())),
            ("signature", Value::from(self.signature.name())),
            ("factorisation", Value::from(self.pattern.name())),
            ("irreducible", Value::from(self.irreducible())),
            ("galois", self.galois.map(GaloisGroup::name).into()),
            ("stabiliser", Value::from(self.stabiliser)),
            ("els", Value::from(self.els())),
            ("insoluble_at", Value::Array(insoluble)),
            ("rational_class", self.rational.clone().into()),
            ("local", json::local(&self.local)),
        ])
        .serialize(s)
    }
}

/// The classes of one pair (I, J), in table order, with the aggregates of the pair.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Pair {
    /// Invariant I.
    pub i: i64,
    /// Invariant J.
    pub j: i64,
    /// The discriminant `(4I³ − J²)/27`.
    pub disc: i64,
    /// Four times the height.
    pub h4: i64,
    /// The factorisation of |Disc|: primes in increasing order with exponents.
    pub disc_factors: Vec<(i64, u32)>,
    /// The classes, labelled, in table order.
    pub classes: Vec<ClassRow>,
    /// The classes over Q of the everywhere locally soluble classes without a rational
    /// root: each a list of positions in `classes`, in table order; the lists in order of
    /// their first member.
    pub over_q: Vec<Vec<usize>>,
}

impl Pair {
    /// The irreducible classes.
    pub fn irreducible(&self) -> usize {
        self.classes.iter().filter(|r| r.irreducible()).count()
    }

    /// The everywhere locally soluble classes.
    pub fn els(&self) -> usize {
        self.classes.iter().filter(|r| r.els()).count()
    }

    /// The first class of each class over Q: one quartic per non-trivial 2-Selmer element
    /// of `y² = x³ − 27Ix − 27J` carried by these invariants.
    pub fn first_over_q(&self) -> impl Iterator<Item = &ClassRow> {
        self.over_q.iter().map(|c| &self.classes[c[0]])
    }
}

/// A whole table in memory: its pairs in table order.
#[derive(Clone, Debug)]
pub struct Table {
    /// The parameters it was built with.
    pub params: Params,
    /// Pairs in table order `(H4, I, J)`.
    pub pairs: Vec<Pair>,
    /// Candidate forms examined by the loops.
    pub candidates: u64,
}

impl Table {
    /// Every class in table order.
    pub fn rows(&self) -> impl Iterator<Item = &ClassRow> {
        self.pairs.iter().flat_map(|p| &p.classes)
    }

    /// The number of classes.
    pub fn classes(&self) -> usize {
        self.pairs.iter().map(|p| p.classes.len()).sum()
    }
}
