//! The row types of the table: the parameters of a build, one class ([`ClassRow`]), the
//! classes of one pair (I, J) with their grouping over Q ([`Pair`]), and a whole table in
//! memory ([`Table`]).
//!
//! ```
//! use qorbits::table::row::Params;
//! let p = Params { height: 1_000_000, include_reducible: false };
//! assert_eq!(serde_json::to_string(&p).unwrap(), r#"{"height":1000000,"include_reducible":false}"#);
//! ```

use crate::form::galois::{FactorPattern, GaloisGroup};
use crate::form::local::{everywhere_soluble, insoluble_places, LocalPlace};
use crate::form::Signature;
use serde::ser::SerializeStruct;
use serde::{Deserialize, Serialize, Serializer};

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
    pub fn key(&self) -> (i64, i64, i64, [i64; 5]) {
        (self.h4, self.i, self.j, self.form)
    }
}

/// The JSON object of a class (integers as numbers).
impl Serialize for ClassRow {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        #[derive(Serialize)]
        struct Place<'a> {
            place: String,
            v_disc: Option<u32>,
            pattern: &'a str,
            soluble: bool,
        }
        let mut o = s.serialize_struct("class", 15)?;
        o.serialize_field("label", &self.label)?;
        o.serialize_field("canonical", &self.form)?;
        o.serialize_field("I", &self.i)?;
        o.serialize_field("J", &self.j)?;
        o.serialize_field("disc", &self.disc)?;
        o.serialize_field("H4", &self.h4)?;
        o.serialize_field("real_roots", &self.signature.real_roots())?;
        o.serialize_field("signature", self.signature.name())?;
        o.serialize_field("factorisation", self.pattern.name())?;
        o.serialize_field("galois", &self.galois.map(GaloisGroup::name))?;
        o.serialize_field("stabiliser_order", &self.stabiliser)?;
        o.serialize_field("els", &self.els())?;
        let insoluble: Vec<String> = insoluble_places(&self.local)
            .map(ToString::to_string)
            .collect();
        o.serialize_field("insoluble_at", &insoluble)?;
        o.serialize_field("rational_class", &self.rational)?;
        let local: Vec<Place> = self
            .local
            .iter()
            .map(|l| Place {
                place: l.place.to_string(),
                v_disc: l.v_disc,
                pattern: &l.pattern,
                soluble: l.soluble,
            })
            .collect();
        o.serialize_field("local", &local)?;
        o.end()
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
