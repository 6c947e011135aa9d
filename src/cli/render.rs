//! Rendering for people and programs: rows of the table as aligned text, JSON or CSV, and
//! the description of one class (`qorbits reduce`) as text or JSON.

use qorbits::form::describe::{height_decimal, Description};
use qorbits::form::galois::FactorPattern;
use qorbits::form::local::{everywhere_soluble, insoluble_places, Place};
use qorbits::form::{Form, Signature};
use qorbits::table::row::ClassRow;
use rug::Integer;
use serde_json::{json, Number, Value};
use std::fmt::Write;

/// Output format of a list of rows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Aligned columns with a header.
    Text,
    /// One JSON array of objects.
    Json,
    /// CSV with a header line.
    Csv,
}

const COLUMNS: [&str; 18] = [
    "label",
    "a",
    "b",
    "c",
    "d",
    "e",
    "I",
    "J",
    "disc",
    "H4",
    "real_roots",
    "signature",
    "factorisation",
    "galois",
    "stabiliser",
    "els",
    "insoluble_at",
    "rational_class",
];

fn fields(r: &ClassRow) -> Vec<String> {
    let [a, b, c, d, e] = r.form;
    vec![
        r.label.clone(),
        a.to_string(),
        b.to_string(),
        c.to_string(),
        d.to_string(),
        e.to_string(),
        r.i.to_string(),
        r.j.to_string(),
        r.disc.to_string(),
        r.h4.to_string(),
        r.signature.real_roots().to_string(),
        r.signature.name().to_string(),
        r.pattern.name().to_string(),
        r.galois.map(|g| g.name()).unwrap_or("").to_string(),
        r.stabiliser.to_string(),
        u8::from(r.els()).to_string(),
        r.insoluble_at(),
        r.rational.clone().unwrap_or_default(),
    ]
}

/// Rows in the chosen format (text ends with a count line).
pub fn render_rows(rows: &[ClassRow], format: Format) -> String {
    let mut out = String::new();
    match format {
        Format::Json => {
            writeln!(
                out,
                "{}",
                serde_json::to_string(rows).expect("rows serialise")
            )
            .expect("string");
        }
        Format::Csv => {
            writeln!(out, "{}", COLUMNS.join(",")).expect("string");
            for r in rows {
                writeln!(out, "{}", fields(r).join(",")).expect("string");
            }
        }
        Format::Text => {
            let table: Vec<Vec<String>> = rows.iter().map(fields).collect();
            let widths: Vec<usize> = (0..COLUMNS.len())
                .map(|k| {
                    table
                        .iter()
                        .map(|f| f[k].len())
                        .chain([COLUMNS[k].len()])
                        .max()
                        .unwrap_or(0)
                })
                .collect();
            let line = |f: &[String]| {
                f.iter()
                    .zip(&widths)
                    .map(|(s, w)| format!("{s:>w$}"))
                    .collect::<Vec<_>>()
                    .join("  ")
            };
            let header: Vec<String> = COLUMNS.iter().map(|s| s.to_string()).collect();
            writeln!(out, "{}", line(&header)).expect("string");
            for f in &table {
                writeln!(out, "{}", line(f)).expect("string");
            }
            writeln!(out, "{} classes", rows.len()).expect("string");
        }
    }
    out
}

/// An exact integer as a JSON number (any size).
pub fn json_int(n: &Integer) -> Value {
    Value::Number(
        n.to_string()
            .parse::<Number>()
            .expect("integers are JSON numbers"),
    )
}

fn json_form(f: &Form<Integer>) -> Value {
    Value::Array(f.c.iter().map(json_int).collect())
}

/// The description of a class as one JSON object and as aligned text.
pub trait DescriptionView {
    /// One JSON object with every field (integers exact).
    fn to_json(&self) -> Value;
    /// Aligned `name  value` lines for a terminal.
    fn to_text(&self) -> String;
}

impl DescriptionView for Description {
    fn to_json(&self) -> Value {
        let gamma = &self.canonical.gamma.m;
        json!({
            "input": json_form(&self.input),
            "canonical": json_form(&self.canonical.form),
            "gamma": [[json_int(&gamma[0]), json_int(&gamma[1])], [json_int(&gamma[2]), json_int(&gamma[3])]],
            "I": json_int(&self.invariants.i),
            "J": json_int(&self.invariants.j),
            "disc": json_int(&self.invariants.disc),
            "H4": json_int(&self.invariants.h4),
            "H": height_decimal(&self.invariants.h4),
            "real_roots": self.signature.real_roots(),
            "signature": self.signature.name(),
            "factorisation": self.pattern.name(),
            "irreducible": self.pattern == FactorPattern::Irreducible,
            "galois": self.galois.map(|g| g.name()),
            "stabiliser_order": self.canonical.stabiliser.len(),
            "stabiliser": self.canonical.stabiliser.iter().map(|g| {
                Value::Array(g.m.iter().map(json_int).collect())
            }).collect::<Vec<_>>(),
            "disc_factors": self.factors_text(),
            "els": self.local.as_deref().map(everywhere_soluble),
            "insoluble_at": self.local.as_deref().map(|l| insoluble_places(l).map(ToString::to_string).collect::<Vec<_>>()),
            "local": self.local.as_ref().map(|l| l.iter().map(|p| json!({
                "place": p.place.to_string(),
                "v_disc": p.v_disc,
                "pattern": p.pattern,
                "soluble": p.soluble,
            })).collect::<Vec<_>>()),
        })
    }

    fn to_text(&self) -> String {
        let sig = match self.signature {
            Signature::FourReal => "4 real roots".to_string(),
            Signature::TwoReal => "2 real roots".to_string(),
            Signature::PositiveDefinite => "0 real roots, positive definite".to_string(),
            Signature::NegativeDefinite => "0 real roots, negative definite".to_string(),
        };
        let pattern = match self.pattern {
            FactorPattern::Irreducible => "irreducible".to_string(),
            p => format!("reducible, factor degrees {}", p.name()),
        };
        let stab: Vec<String> = self
            .canonical
            .stabiliser
            .iter()
            .map(|g| g.to_string())
            .collect();
        let rows = [
            ("input", self.input.to_string()),
            ("canonical", self.canonical.form.to_string()),
            (
                "gamma",
                format!("{}   (gamma . input = canonical)", self.canonical.gamma),
            ),
            ("I", self.invariants.i.to_string()),
            ("J", self.invariants.j.to_string()),
            (
                "Disc",
                match self.factors_text() {
                    Some(t) => format!("{} = {t}", self.invariants.disc),
                    None => format!(
                        "{} (not factored within the time budget)",
                        self.invariants.disc
                    ),
                },
            ),
            (
                "H",
                format!(
                    "{}   (H4 = max(4|I|^3, J^2) = {})",
                    height_decimal(&self.invariants.h4),
                    self.invariants.h4
                ),
            ),
            ("signature", sig),
            ("over Q", pattern),
            (
                "Galois group",
                self.galois.map(|g| g.name()).unwrap_or("-").to_string(),
            ),
            (
                "stabiliser",
                format!("order {} in PGL2(Z): {}", stab.len(), stab.join(", ")),
            ),
            (
                "local",
                match &self.local {
                    None => "not computed: Disc could not be factored".to_string(),
                    Some(l) if everywhere_soluble(l) => "everywhere locally soluble".to_string(),
                    Some(l) => format!(
                        "no local point at {}",
                        insoluble_places(l)
                            .map(ToString::to_string)
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                },
            ),
        ];
        let mut out: String = rows.iter().map(|(k, v)| format!("{k:<13}{v}\n")).collect();
        for p in self.local.iter().flatten() {
            let place = format!("p = {}", p.place);
            let v = p
                .v_disc
                .map(|v| format!("v(Disc) = {v}, "))
                .unwrap_or_default();
            let what = if p.place != Place::Real {
                "mod p"
            } else {
                "signature"
            };
            out.push_str(&format!(
                "  {place:<11}{v}{what} {}, {}\n",
                p.pattern,
                if p.soluble { "soluble" } else { "NOT soluble" }
            ));
        }
        out
    }
}
