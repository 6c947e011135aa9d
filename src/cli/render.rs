//! Rendering for people and programs (docs/output.md): rows of the table as aligned text
//! (whitespace-separated, `-` for an empty cell), JSON, JSON Lines or CSV (RFC 4180), and
//! the description of one class (`qorbits reduce`) as text or JSON.

use qorbits::form::describe::{height_decimal, Description};
use qorbits::form::galois::FactorPattern;
use qorbits::form::local::{everywhere_soluble, insoluble_places, LocalPlace};
use qorbits::form::Signature;
use qorbits::table::export::{core_fields, FORM_COLUMNS};
use qorbits::table::json;
use qorbits::table::lookup::matrix_json;
use qorbits::table::row::ClassRow;
use rug::Integer;
use serde_json::Value;

/// Output format of a list of rows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Aligned columns with a header and a count line.
    Text,
    /// One JSON array of objects.
    Json,
    /// One JSON object per line.
    Jsonl,
    /// CSV with a header line.
    Csv,
}

/// The columns of a list of classes: [`FORM_COLUMNS`], then the class data.
fn columns() -> Vec<&'static str> {
    let mut c = FORM_COLUMNS.to_vec();
    c.extend([
        "H4",
        "real_roots",
        "signature",
        "factorisation",
        "galois",
        "stabiliser",
        "els",
        "insoluble_at",
        "rational_class",
    ]);
    c
}

fn fields(r: &ClassRow) -> Vec<String> {
    let mut f = core_fields(r);
    f.extend([
        r.galois.map(|g| g.name()).unwrap_or("").to_string(),
        r.stabiliser.to_string(),
        u8::from(r.els()).to_string(),
        r.insoluble_at(),
        r.rational.clone().unwrap_or_default(),
    ]);
    f
}

/// CSV text (RFC 4180 quoting) of a header and records.
pub fn csv<I: IntoIterator<Item = Vec<String>>>(header: &[&str], records: I) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(header).expect("CSV into memory");
    for r in records {
        w.write_record(&r).expect("CSV into memory");
    }
    String::from_utf8(w.into_inner().expect("CSV into memory")).expect("UTF-8")
}

/// Aligned columns: right-aligned, two spaces apart, `-` for an empty cell, so that every
/// line splits on whitespace into the same number of fields.
pub fn aligned(header: &[&str], records: &[Vec<String>]) -> String {
    let cell = |s: &str| {
        if s.is_empty() {
            "-".to_string()
        } else {
            s.to_string()
        }
    };
    let widths: Vec<usize> = (0..header.len())
        .map(|k| {
            records
                .iter()
                .map(|f| cell(&f[k]).chars().count())
                .chain([header[k].len()])
                .max()
                .unwrap_or(0)
        })
        .collect();
    let line = |f: Vec<String>| {
        f.iter()
            .zip(&widths)
            .map(|(s, w)| format!("{s:>w$}"))
            .collect::<Vec<_>>()
            .join("  ")
            + "\n"
    };
    let mut out = line(header.iter().map(|s| s.to_string()).collect());
    for r in records {
        out += &line(r.iter().map(|s| cell(s)).collect());
    }
    out
}

/// `n class(es)`.
pub fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// Rows in the chosen format (text ends with a count line).
pub fn rows(rows: &[ClassRow], format: Format) -> String {
    match format {
        Format::Json => serde_json::to_string(rows).expect("rows serialise") + "\n",
        Format::Jsonl => rows
            .iter()
            .map(|r| serde_json::to_string(r).expect("rows serialise") + "\n")
            .collect(),
        Format::Csv => csv(&columns(), rows.iter().map(fields)),
        Format::Text => {
            let table: Vec<Vec<String>> = rows.iter().map(fields).collect();
            aligned(&columns(), &table) + &count(rows.len(), "class", "classes") + "\n"
        }
    }
}

/// A form as its coefficients separated by spaces, as `qorbits reduce` takes them.
pub fn form_text<T: std::fmt::Display>(c: &[T]) -> String {
    c.iter()
        .map(ToString::to_string)
        .collect::<Vec<_>>()
        .join(" ")
}

/// The description of a class as one JSON object (docs/output.md, `reduce`).
pub fn description_json(d: &Description) -> Value {
    let inv = &d.invariants;
    let local = d.local.as_deref();
    json::object(vec![
        ("input", json::form(&d.input)),
        ("form", json::form(&d.canonical.form)),
        ("gamma", matrix_json(&d.canonical.gamma)),
        ("I", json::int(&inv.i)),
        ("J", json::int(&inv.j)),
        ("disc", json::int(&inv.disc)),
        (
            "disc_factors",
            d.disc_factors.as_deref().map_or(Value::Null, json::factors),
        ),
        ("H4", json::int(&inv.h4)),
        ("H", json::height(&inv.h4, &height_decimal(&inv.h4))),
        ("real_roots", Value::from(d.signature.real_roots())),
        ("signature", Value::from(d.signature.name())),
        ("factorisation", Value::from(d.pattern.name())),
        (
            "irreducible",
            Value::from(d.pattern == FactorPattern::Irreducible),
        ),
        ("galois", d.galois.map(|g| g.name()).into()),
        ("stabiliser", Value::from(d.canonical.stabiliser.len())),
        (
            "stabiliser_matrices",
            Value::Array(d.canonical.stabiliser.iter().map(matrix_json).collect()),
        ),
        ("els", local.map(everywhere_soluble).into()),
        (
            "insoluble_at",
            local.map_or(Value::Null, |l| {
                Value::Array(
                    insoluble_places(l)
                        .map(|p| Value::String(p.to_string()))
                        .collect(),
                )
            }),
        ),
        ("local", local.map_or(Value::Null, json::local)),
    ])
}

/// The local data as an aligned table under `local` (any length of prime).
fn local_table(places: &[LocalPlace<Integer>]) -> String {
    let records: Vec<Vec<String>> = places
        .iter()
        .map(|l| {
            vec![
                l.place.to_string(),
                l.v_disc.map(|v| v.to_string()).unwrap_or_default(),
                l.pattern.clone(),
                if l.soluble { "yes" } else { "no" }.to_string(),
            ]
        })
        .collect();
    let t = aligned(&["place", "v(Disc)", "mod p", "point"], &records);
    t.lines().map(|l| format!("  {l}\n")).collect()
}

/// The description of a class as aligned `name  value` lines for a terminal.
pub fn description_text(d: &Description) -> String {
    let sig = match d.signature {
        Signature::FourReal => "4 real roots".to_string(),
        Signature::TwoReal => "2 real roots".to_string(),
        Signature::PositiveDefinite => "0 real roots, positive definite".to_string(),
        Signature::NegativeDefinite => "0 real roots, negative definite".to_string(),
    };
    let pattern = match d.pattern {
        FactorPattern::Irreducible => "irreducible".to_string(),
        p => format!("reducible, factor degrees {}", p.name()),
    };
    let stab: Vec<String> = d
        .canonical
        .stabiliser
        .iter()
        .map(|g| form_text(&g.m))
        .collect();
    let inv = &d.invariants;
    let rows = [
        ("input", form_text(&d.input.c)),
        ("canonical", form_text(&d.canonical.form.c)),
        (
            "gamma",
            format!(
                "{}   (p q r s: canonical(x, y) = input(p x + r y, q x + s y))",
                form_text(&d.canonical.gamma.m)
            ),
        ),
        ("I", inv.i.to_string()),
        ("J", inv.j.to_string()),
        (
            "Disc",
            match d.factors_text() {
                Some(t) => format!("{}   (|Disc| = {t})", inv.disc),
                None => format!("{}   (not factored within the time budget)", inv.disc),
            },
        ),
        (
            "H",
            format!(
                "{}   (H4 = max(4|I|^3, J^2) = {})",
                height_decimal(&inv.h4),
                inv.h4
            ),
        ),
        ("signature", sig),
        ("over Q", pattern),
        (
            "Galois group",
            d.galois.map(|g| g.name()).unwrap_or("-").to_string(),
        ),
        (
            "stabiliser",
            format!("order {} in PGL2(Z): {}", stab.len(), stab.join(" | ")),
        ),
        (
            "local",
            match &d.local {
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
    if let Some(l) = &d.local {
        out += &local_table(l);
    }
    out
}
