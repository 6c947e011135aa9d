//! Selections of classes beyond one pair (I, J): by discriminant, height range, Galois
//! group, signature, stabiliser order, local solubility, label or id, with a limit and the
//! table order (`classes.id`). Every selection runs through an index of the table
//! (schema/README.md): a property of the pair through `pairs_ij`, `pairs_disc` or `pairs_h4`
//! and then the id range `first_id .. first_id + classes − 1` of `classes`; the per-class
//! facets alone through the expression index `classes_facets` on the codes of
//! [`FACET_EXPR`](crate::table::schema::FACET_EXPR) ([`facet_code`]); an id through the key.
//!
//! ```
//! use qorbits::table::select::Selection;
//! let mut s = Selection::default();
//! s.disc = Some(-283);
//! let (sql, params) = s.sql();
//! assert!(sql.contains("p.disc = ?"));
//! assert_eq!(params, vec![-283]);
//! ```

use crate::error::{Error, Result};
use crate::form::galois::GaloisGroup;
use crate::form::Signature;
use crate::table::group::parse_label;
use crate::table::reader::{class_rows, CLASS_COLUMNS};
use crate::table::row::ClassRow;
use crate::table::schema::{facet_code, FACET_EXPR};
use rusqlite::Connection;

/// Which classes to select; empty fields select everything on that axis.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Selection {
    /// Invariants (I, J).
    pub pair: Option<(i64, i64)>,
    /// The discriminant.
    pub disc: Option<i64>,
    /// `H4 ≥` this (H ≥ H4/4).
    pub h4_from: Option<i64>,
    /// `H4 <` this.
    pub h4_below: Option<i64>,
    /// Galois groups (irreducible classes); empty: any.
    pub galois: Vec<GaloisGroup>,
    /// Signatures; empty: any.
    pub signature: Vec<Signature>,
    /// Stabiliser orders; empty: any.
    pub stabiliser: Vec<u8>,
    /// Everywhere locally soluble (`Some(true)`), not (`Some(false)`), or either.
    pub els: Option<bool>,
    /// A label (`Q10_-29_001`).
    pub label: Option<String>,
    /// A class id.
    pub id: Option<i64>,
    /// Also reducible classes (else only irreducible ones).
    pub include_reducible: bool,
    /// At most this many classes (the first in table order).
    pub limit: Option<u64>,
}

/// The stabiliser orders a class can have (DESIGN §3).
const STABILISERS: [u8; 3] = [1, 2, 4];

impl Selection {
    /// Whether a per-class facet (Galois group, signature, stabiliser, ELS) is restricted.
    fn has_facets(&self) -> bool {
        !self.galois.is_empty()
            || !self.signature.is_empty()
            || !self.stabiliser.is_empty()
            || self.els.is_some()
    }

    /// Whether something other than the facets selects (then the pairs or the key drive).
    fn has_key(&self) -> bool {
        self.pair.is_some()
            || self.disc.is_some()
            || self.h4_from.is_some()
            || self.h4_below.is_some()
            || self.label.is_some()
            || self.id.is_some()
    }

    /// Whether the selection names anything at all.
    pub fn is_empty(&self) -> bool {
        !self.has_key() && !self.has_facets()
    }

    /// The codes of [`FACET_EXPR`] the selection keeps.
    pub fn facet_codes(&self) -> Vec<i64> {
        let mut groups: Vec<Option<GaloisGroup>> = if self.galois.is_empty() {
            GaloisGroup::ALL.into_iter().map(Some).collect()
        } else {
            self.galois.iter().copied().map(Some).collect()
        };
        if self.include_reducible && self.galois.is_empty() {
            groups.push(None);
        }
        let sigs = if self.signature.is_empty() {
            Signature::ALL.to_vec()
        } else {
            self.signature.clone()
        };
        let stabs = if self.stabiliser.is_empty() {
            STABILISERS.to_vec()
        } else {
            self.stabiliser.clone()
        };
        let els: Vec<bool> = self.els.map_or(vec![false, true], |e| vec![e]);
        let mut out = Vec::new();
        for g in &groups {
            for s in &sigs {
                for st in &stabs {
                    for e in &els {
                        out.push(facet_code(*g, *s, *st, *e));
                    }
                }
            }
        }
        out.sort_unstable();
        out
    }

    /// Whether a row is selected (the same conditions as [`Selection::sql`], for rows that
    /// were computed rather than read).
    pub fn keeps(&self, r: &ClassRow) -> bool {
        let code = facet_code(r.galois, r.signature, r.stabiliser, r.els());
        (self.include_reducible || r.irreducible())
            && self.pair.is_none_or(|p| p == (r.i, r.j))
            && self.disc.is_none_or(|d| d == r.disc)
            && self.h4_from.is_none_or(|h| r.h4 >= h)
            && self.h4_below.is_none_or(|h| r.h4 < h)
            && self.label.as_ref().is_none_or(|l| *l == r.label)
            && (!self.has_facets() || self.facet_codes().contains(&code))
    }

    /// The SQL of the selection and its parameters (for `EXPLAIN QUERY PLAN` too). The
    /// connection must run it with `PRAGMA automatic_index = OFF` ([`select`] does), so
    /// that SQLite never builds a temporary index over the whole table.
    pub fn sql(&self) -> (String, Vec<i64>) {
        let mut params = Vec::new();
        let mut wh: Vec<String> = Vec::new();
        let mut pair = self.pair;
        if let Some((i, j, _, _)) = self.label.as_deref().and_then(parse_label) {
            pair = Some((i, j));
        }
        let from = if let Some(id) = self.id {
            wh.push("c.id = ?".into());
            params.push(id);
            "classes c".to_string()
        } else if pair.is_some()
            || self.disc.is_some()
            || self.h4_from.is_some()
            || self.h4_below.is_some()
        {
            if let Some((i, j)) = pair {
                wh.push("p.I = ? AND p.J = ?".into());
                params.extend([i, j]);
            }
            if let Some(d) = self.disc {
                wh.push("p.disc = ?".into());
                params.push(d);
            }
            if let Some(h) = self.h4_from {
                wh.push("p.h4 >= ?".into());
                params.push(h);
            }
            if let Some(h) = self.h4_below {
                wh.push("p.h4 < ?".into());
                params.push(h);
            }
            // CROSS JOIN keeps the pairs outside: their index, then the id range.
            "pairs p CROSS JOIN classes c ON c.id BETWEEN p.first_id AND p.first_id + p.classes - 1"
                .to_string()
        } else {
            "classes c".to_string()
        };
        let facet = format!("({})", qualified_facet_expr());
        let codes = self
            .facet_codes()
            .iter()
            .map(i64::to_string)
            .collect::<Vec<_>>()
            .join(", ");
        if !self.has_key() {
            // The facets drive: a search of `classes_facets` on each code.
            wh.push(format!("{facet} IN ({codes})"));
        } else {
            if self.has_facets() {
                // `+` keeps the facet test a filter on the rows the key found.
                wh.push(format!("+{facet} IN ({codes})"));
            }
            if !self.include_reducible {
                wh.push("+c.irreducible = 1".into());
            }
        }
        if let Some(l) = &self.label {
            wh.push(format!("c.label = '{}'", l.replace('\'', "''")));
        }
        let mut sql = format!("SELECT {CLASS_COLUMNS} FROM {from}");
        if !wh.is_empty() {
            sql += &format!(" WHERE {}", wh.join(" AND "));
        }
        sql += " ORDER BY c.id";
        if let Some(n) = self.limit {
            sql += &format!(" LIMIT {n}");
        }
        (sql, params)
    }
}

/// [`FACET_EXPR`] with its columns qualified by the alias `c` (the same expression for
/// SQLite, which matches it with the index).
pub fn qualified_facet_expr() -> String {
    FACET_EXPR
        .replace("CASE galois", "CASE c.galois")
        .replace("CASE signature", "CASE c.signature")
        .replace("+ stabiliser", "+ c.stabiliser")
        .replace("+ els", "+ c.els")
}

/// The selected classes of the table, in table order.
pub fn select(conn: &Connection, s: &Selection) -> Result<Vec<ClassRow>> {
    if s.is_empty() {
        return Err(Error::Input(
            "the selection names no class; give invariants, a discriminant, a height range, \
             a facet, a label or an id (every class: export the table)"
                .into(),
        ));
    }
    if let Some(l) = &s.label {
        if parse_label(l).is_none() {
            return Err(Error::Input(format!(
                "'{l}' is not a class label (labels look like Q10_-29_001; schema/labels.md)"
            )));
        }
    }
    conn.pragma_update(None, "automatic_index", false)?;
    let (sql, params) = s.sql();
    class_rows(conn, &sql, rusqlite::params_from_iter(params))
}
