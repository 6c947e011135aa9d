//! Finding the class of any form in a table: the canonical representative of its class
//! (DESIGN §3), then the class's row through the index of `pairs` (schema/README.md: the
//! classes of a pair are the ids `first_id .. first_id + classes − 1`), or the reason the
//! table cannot hold it (its height is not below the table's bound, or it is reducible and
//! the table holds only irreducible classes). Also the batch form of the same: one line of
//! text per form, one result per line, an error on one line never stopping the others.
//!
//! ```
//! use qorbits::table::lookup::{reduce_text, BatchLine};
//! match reduce_text(1, "2 -7 4 13 -6") {
//!     BatchLine::Reduced(r) => assert_eq!(r.canonical.form.c, [2, -1, -5, -8, 6].map(rug::Integer::from)),
//!     BatchLine::Failed { .. } => unreachable!(),
//! }
//! assert!(matches!(reduce_text(2, "1 2 3"), BatchLine::Failed { .. }));
//! ```

use crate::arith::parse::parse_integer;
use crate::error::{Error, Result};
use crate::form::canonical::{
    canonical, canonical_f64, settle_f64, stabiliser_of_member, Canonical,
};
use crate::form::describe::height_decimal;
use crate::form::galois::{factor_pattern, FactorPattern};
use crate::form::{Form, Gl2, Invariants};
use crate::table::json;
use crate::table::query::NotCovered;
use crate::table::reader::{open_table, read_error, table_params};
use crate::table::row::Params;
use rug::Integer;
use rusqlite::{Connection, OptionalExtension};
use serde_json::Value;
use std::path::Path;

/// The class with canonical form (?3, …, ?7) of the pair (?1, ?2): the pair through
/// `pairs_ij`, the class inside its id range.
pub const FIND_CLASS_SQL: &str = "SELECT c.id, c.label FROM pairs p JOIN classes c \
     ON c.id BETWEEN p.first_id AND p.first_id + p.classes - 1 \
     WHERE p.I = ?1 AND p.J = ?2 AND c.a = ?3 AND c.b = ?4 AND c.c = ?5 AND c.d = ?6 AND c.e = ?7";

/// Where a class is in a table.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum InTable {
    /// The class's row: `classes.id` and `classes.label`.
    Found {
        /// `classes.id`.
        id: i64,
        /// `classes.label`.
        label: String,
    },
    /// The table does not hold the class, and why.
    NotCovered(NotCovered),
}

/// A table opened for lookups.
pub struct Lookup {
    conn: Connection,
    params: Params,
}

impl Lookup {
    /// Opens the table at `db` read-only.
    pub fn open(db: &Path) -> Result<Lookup> {
        let conn = open_table(db)?;
        let params = table_params(&conn)?;
        Ok(Lookup { conn, params })
    }

    /// The parameters of the table.
    pub fn params(&self) -> Params {
        self.params
    }

    /// Where the class with canonical representative `form` (invariants `inv`) is in the
    /// table. A class below the bound that the table should hold and does not is reported
    /// as damage.
    pub fn find(&self, form: &Form<Integer>, inv: &Invariants<Integer>) -> Result<InTable> {
        if inv.h4 >= Integer::from(4) * self.params.height {
            return Ok(InTable::NotCovered(NotCovered::Height {
                pair: height_decimal(&inv.h4),
                bound: self.params.height,
            }));
        }
        // Below the bound, every value fits i64 (the table's bound is at most 10^18).
        let small = |v: &Integer| v.to_i64().ok_or(Error::Overflow);
        let key = [
            small(&inv.i)?,
            small(&inv.j)?,
            small(&form.c[0])?,
            small(&form.c[1])?,
            small(&form.c[2])?,
            small(&form.c[3])?,
            small(&form.c[4])?,
        ];
        if let Some((id, label)) = self.row_of(key)? {
            return Ok(InTable::Found { id, label });
        }
        let reducible = factor_pattern(form) != Some(FactorPattern::Irreducible);
        if reducible && !self.params.include_reducible {
            return Ok(InTable::NotCovered(NotCovered::Reducible));
        }
        Err(Error::Database(format!(
            "{}: the class of {form} has H below the table's bound but is not in it; the \
             table is damaged (verify it against its manifest)",
            crate::table::reader::shown(&self.conn)
        )))
    }
}

/// A class identified through the table: canonical form, invariants, its row.
type Identified = (Canonical<Integer>, Invariants<Integer>, InTable);

impl Lookup {
    /// `classes.id` and `label` of the class with key `[I, J, a, b, c, d, e]`, if present.
    fn row_of(&self, key: [i64; 7]) -> Result<Option<(i64, String)>> {
        self.conn
            .prepare_cached(FIND_CLASS_SQL)
            .and_then(|mut st| {
                st.query_row(rusqlite::params_from_iter(key), |r| {
                    Ok((r.get(0)?, r.get(1)?))
                })
                .optional()
            })
            .map_err(|e| read_error(&self.conn, e))
    }

    /// The canonical representative of a table-sized form below the table's bound, read
    /// off the table: the table holds exactly one member of each class below its bound,
    /// its canonical representative, which is one of the members near F
    /// ([`Settled::candidates`](crate::form::canonical::Settled::candidates)); so the candidate found is it, and no decision near the
    /// boundary of `F_η` has to be made in multiple precision. `None` when the form is not
    /// such a form or no candidate is in the table (then [`reduce_text`] and
    /// [`Lookup::place`] compute the rule and say why).
    fn through_table(&self, f: &Form<Integer>) -> Result<Option<Identified>> {
        let Some(small) = Form::<i128>::try_small(f) else {
            return Ok(None);
        };
        let Some(inv) = small.invariants() else {
            return Ok(None);
        };
        if inv.disc == 0 || inv.h4 >= 4 * self.params.height {
            return Ok(None);
        }
        let Ok(settled) = settle_f64(&small) else {
            return Ok(None);
        };
        let fits = |v: i128| i64::try_from(v).map_err(|_| Error::Overflow);
        for (h, gamma) in settled.candidates()? {
            let [a, b, c, d, e] = h.c;
            let key = [inv.i, inv.j, a, b, c, d, e].map(fits);
            let Ok(key) = key.into_iter().collect::<Result<Vec<i64>>>() else {
                continue;
            };
            if let Some((id, label)) = self.row_of(key.try_into().expect("seven"))? {
                let stabiliser = stabiliser_of_member(&h)?;
                let canonical = Canonical {
                    form: h,
                    gamma,
                    stabiliser,
                };
                let inv = Invariants {
                    i: Integer::from(inv.i),
                    j: Integer::from(inv.j),
                    disc: Integer::from(inv.disc),
                    h4: Integer::from(inv.h4),
                };
                return Ok(Some((
                    canonical.to_big(),
                    inv,
                    InTable::Found { id, label },
                )));
            }
        }
        Ok(None)
    }

    /// The form on line `line` reduced and found in the table (through the table when it
    /// holds the class, else by the rule computed in full).
    pub fn identify(&self, line: u64, text: &str) -> BatchLine {
        let Ok(input) = parse_form_line(text) else {
            return reduce_text(line, text);
        };
        match self.through_table(&input) {
            Ok(Some((canonical, invariants, t))) => BatchLine::Reduced(Box::new(Reduced {
                line,
                input,
                canonical,
                invariants,
                in_table: Some(t),
            })),
            Ok(None) => self.place(reduce_text(line, text)),
            Err(e) => BatchLine::Failed {
                line,
                text: text.to_string(),
                error: e.to_string(),
            },
        }
    }
}

/// One form reduced: the input, its canonical representative with γ and stabiliser, the
/// invariants, and (after [`Lookup::place`]) where its class is in a table.
#[derive(Clone, Debug)]
pub struct Reduced {
    /// The line number (from 1) the form came from.
    pub line: u64,
    /// The form given.
    pub input: Form<Integer>,
    /// Canonical representative, γ with γ·input = form, stabiliser.
    pub canonical: Canonical<Integer>,
    /// I, J, Disc, H4 of the class.
    pub invariants: Invariants<Integer>,
    /// Where the class is in the table; `None` without a table.
    pub in_table: Option<InTable>,
}

/// The result of one line of a batch.
#[derive(Clone, Debug)]
pub enum BatchLine {
    /// The form of the line, reduced.
    Reduced(Box<Reduced>),
    /// The line is not a form qorbits reduces, and why (one line).
    Failed {
        /// Line number, from 1.
        line: u64,
        /// The text of the line.
        text: String,
        /// What is wrong with it.
        error: String,
    },
}

/// The form on a line of text: five integers separated by spaces, tabs or commas, with
/// optional surrounding brackets (`1 0 0 0 2`, `1,0,0,0,2`, `[1, 0, 0, 0, 2]`).
pub fn parse_form_line(text: &str) -> Result<Form<Integer>> {
    let t = text.trim();
    let t = t
        .strip_prefix(['[', '('])
        .and_then(|r| r.strip_suffix([']', ')']))
        .unwrap_or(t);
    let tokens: Vec<&str> = t
        .split(|c: char| c == ',' || c.is_whitespace())
        .filter(|s| !s.is_empty())
        .collect();
    if tokens.len() != 5 {
        return Err(Error::Input(format!(
            "expected 5 integer coefficients a b c d e, got {}",
            tokens.len()
        )));
    }
    let mut c: [Integer; 5] = Default::default();
    for (slot, tok) in c.iter_mut().zip(&tokens) {
        *slot = match tok.parse::<i64>() {
            Ok(v) => Integer::from(v),
            Err(_) => parse_integer("coefficient", tok)?,
        };
    }
    Ok(Form::new(c))
}

/// The canonical representative of `f` with the i128 fast paths first.
fn reduce_form(f: &Form<Integer>) -> Result<Canonical<Integer>> {
    if let Some(small) = Form::<i128>::try_small(f) {
        if small.invariants().is_some_and(|inv| inv.disc != 0) {
            if let Ok(c) = canonical_f64(&small) {
                return Ok(c.to_big());
            }
        }
    }
    canonical(f)
}

/// Reduces the form on line `line` (text `text`) without a table: pure, so lines may be
/// reduced in parallel and placed in a table afterwards ([`Lookup::place`]).
pub fn reduce_text(line: u64, text: &str) -> BatchLine {
    let failed = |e: Error| BatchLine::Failed {
        line,
        text: text.to_string(),
        error: e.to_string(),
    };
    let input = match parse_form_line(text) {
        Ok(f) => f,
        Err(e) => return failed(e),
    };
    match reduce_form(&input) {
        Ok(canonical) => {
            let invariants = canonical
                .form
                .invariants()
                .expect("big integers do not overflow");
            BatchLine::Reduced(Box::new(Reduced {
                line,
                input,
                canonical,
                invariants,
                in_table: None,
            }))
        }
        Err(e) => failed(e),
    }
}

impl Lookup {
    /// Fills in where the class of a reduced line is in the table; a table error becomes
    /// the line's error.
    pub fn place(&self, b: BatchLine) -> BatchLine {
        let BatchLine::Reduced(mut r) = b else {
            return b;
        };
        match self.find(&r.canonical.form, &r.invariants) {
            Ok(t) => {
                r.in_table = Some(t);
                BatchLine::Reduced(r)
            }
            Err(e) => BatchLine::Failed {
                line: r.line,
                text: r
                    .input
                    .c
                    .iter()
                    .map(|c| c.to_string())
                    .collect::<Vec<_>>()
                    .join(" "),
                error: e.to_string(),
            },
        }
    }
}

/// `[[p, q], [r, s]]` as JSON.
pub fn matrix_json(g: &Gl2<Integer>) -> Value {
    let [p, q, r, s] = &g.m;
    Value::Array(vec![
        Value::Array(vec![json::int(p), json::int(q)]),
        Value::Array(vec![json::int(r), json::int(s)]),
    ])
}

/// The `table` object of a class's place in a table (docs/output.md).
pub fn in_table_json(t: &InTable) -> Value {
    let (id, label, reason) = match t {
        InTable::Found { id, label } => (json::small(*id), Value::from(label.as_str()), None),
        InTable::NotCovered(why) => (Value::Null, Value::Null, Some(why.to_string())),
    };
    json::object(vec![
        ("covered", Value::from(reason.is_none())),
        ("id", id),
        ("label", label),
        ("reason", reason.into()),
    ])
}

/// Appends an integer under the JSON contract ([`json::int`]) without building a value.
fn push_int(out: &mut String, n: &Integer) {
    use std::fmt::Write;
    const SAFE: i64 = (1 << 53) - 1;
    match n.to_i64() {
        Some(v) if v.abs() <= SAFE => write!(out, "{v}").expect("into a string"),
        _ => write!(out, "\"{n}\"").expect("into a string"),
    }
}

fn push_ints<'a>(out: &mut String, ns: impl IntoIterator<Item = &'a Integer>) {
    out.push('[');
    for (k, n) in ns.into_iter().enumerate() {
        if k > 0 {
            out.push(',');
        }
        push_int(out, n);
    }
    out.push(']');
}

impl BatchLine {
    /// Appends the JSON text of [`BatchLine::to_json`] and a newline, written directly (the
    /// batch's hot path; a unit test holds the two equal).
    pub fn write_json_line(&self, out: &mut String) {
        let BatchLine::Reduced(r) = self else {
            out.push_str(&self.to_json().to_string());
            out.push('\n');
            return;
        };
        out.push_str("{\"line\":");
        out.push_str(&r.line.to_string());
        out.push_str(",\"input\":");
        push_ints(out, &r.input.c);
        out.push_str(",\"form\":");
        push_ints(out, &r.canonical.form.c);
        let [p, q, s, t] = &r.canonical.gamma.m;
        out.push_str(",\"gamma\":[");
        push_ints(out, [p, q]);
        out.push(',');
        push_ints(out, [s, t]);
        out.push_str("],\"I\":");
        push_int(out, &r.invariants.i);
        out.push_str(",\"J\":");
        push_int(out, &r.invariants.j);
        out.push_str(",\"H4\":");
        push_int(out, &r.invariants.h4);
        out.push_str(",\"table\":");
        match &r.in_table {
            Some(t) => out.push_str(&in_table_json(t).to_string()),
            None => out.push_str("null"),
        }
        out.push_str("}\n");
    }

    /// The JSON object of the line (docs/output.md, `reduce --batch`).
    pub fn to_json(&self) -> Value {
        match self {
            BatchLine::Failed { line, text, error } => json::object(vec![
                ("line", Value::from(*line)),
                ("text", Value::from(text.as_str())),
                ("error", Value::from(error.as_str())),
            ]),
            BatchLine::Reduced(r) => json::object(vec![
                ("line", Value::from(r.line)),
                ("input", json::form(&r.input)),
                ("form", json::form(&r.canonical.form)),
                ("gamma", matrix_json(&r.canonical.gamma)),
                ("I", json::int(&r.invariants.i)),
                ("J", json::int(&r.invariants.j)),
                ("H4", json::int(&r.invariants.h4)),
                (
                    "table",
                    r.in_table.as_ref().map_or(Value::Null, in_table_json),
                ),
            ]),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_direct_json_line_is_the_json_value() {
        for text in [
            "2 -7 4 13 -6",
            "1 0 0 0 123456789012345678901",
            "1 2",
            "1 2 1 0 0",
        ] {
            let b = reduce_text(3, text);
            let mut line = String::new();
            b.write_json_line(&mut line);
            assert_eq!(line, b.to_json().to_string() + "\n", "{text}");
        }
        let mut b = reduce_text(1, "1 0 0 0 2");
        if let BatchLine::Reduced(r) = &mut b {
            r.in_table = Some(InTable::Found {
                id: 7,
                label: "Q24_0_002".into(),
            });
        }
        let mut line = String::new();
        b.write_json_line(&mut line);
        assert_eq!(line, b.to_json().to_string() + "\n");
    }
}
