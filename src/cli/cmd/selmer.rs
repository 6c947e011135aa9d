//! `qorbits selmer`: the 2-Selmer group of one elliptic curve from the classes of its
//! quartics.

use crate::out::emit;
use crate::progress::Bar;
use crate::render::{aligned, form_text};
use qorbits::arith::parse::parse_integer;
use qorbits::error::Error;
use qorbits::progress::Progress;
use qorbits::selmer::{two_selmer, Curve, Selmer};
use qorbits::table::json;
use rug::Integer;
use serde_json::Value;

/// The 2-Selmer group of an elliptic curve from the quartic forms with invariants
/// (c4, 2·c6): its rank and one canonical quartic per non-trivial element. Curves with
/// rational 2-torsion are handled; a model that is not minimal is minimised first.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits selmer --short -7 10\n  qorbits selmer --weierstrass 0 0 1 -1 0 --json"
)]
pub struct Args {
    /// Weierstrass coefficients a1 a2 a3 a4 a6 of y^2 + a1 xy + a3 y = x^3 + a2 x^2 + a4 x + a6.
    #[arg(long, num_args = 5, allow_negative_numbers = true, value_names = ["A1", "A2", "A3", "A4", "A6"], conflicts_with = "short", required_unless_present = "short")]
    weierstrass: Option<Vec<String>>,
    /// The curve y^2 = x^3 + A x + B.
    #[arg(long, num_args = 2, allow_negative_numbers = true, value_names = ["A", "B"])]
    short: Option<Vec<String>>,
    /// Print one JSON object instead of text (keys in docs/output.md).
    #[arg(long)]
    json: bool,
    /// No progress spinner.
    #[arg(long)]
    quiet: bool,
}

pub fn run(a: Args) -> Result<(), Error> {
    let given = match (a.weierstrass, a.short) {
        (Some(w), _) => {
            let mut c = Vec::with_capacity(5);
            for (name, v) in ["a1", "a2", "a3", "a4", "a6"].iter().zip(&w) {
                c.push(parse_integer(name, v)?);
            }
            Curve::new(c.try_into().expect("five coefficients"))?
        }
        (None, Some(s)) => Curve::short(parse_integer("A", &s[0])?, parse_integer("B", &s[1])?)?,
        (None, None) => unreachable!("clap requires --weierstrass or --short"),
    };
    let (curve, u) = given.minimal_model();
    let (i, j) = curve.quartic_invariants();
    let bar = Bar::new(a.quiet);
    bar.start(&format!("classes with I = {i}, J = {j}"), 0);
    let s = two_selmer(&curve);
    bar.finish();
    let s = s?;
    emit(&if a.json {
        format!("{}\n", selmer_json(&given, &curve, &u, &s))
    } else {
        selmer_text(&given, &curve, &u, &s)
    });
    Ok(())
}

fn curve_json(e: &Curve) -> Value {
    json::object(vec![
        (
            "weierstrass",
            Value::Array(e.ainvs.iter().map(json::int).collect()),
        ),
        ("equation", Value::from(e.equation())),
        ("c4", json::int(&e.c4())),
        ("c6", json::int(&e.c6())),
        ("disc", json::int(&e.discriminant())),
    ])
}

fn selmer_json(given: &Curve, curve: &Curve, u: &Integer, s: &Selmer) -> Value {
    json::object(vec![
        ("curve", curve_json(curve)),
        ("given", curve_json(given)),
        ("minimised", Value::from(*u != 1)),
        ("scale", json::int(u)),
        ("I", json::int(&s.i)),
        ("J", json::int(&s.j)),
        ("two_torsion_rank", Value::from(s.two_torsion_rank)),
        ("selmer_rank", Value::from(s.rank)),
        ("selmer_order", json::int(&(Integer::from(1) << s.rank))),
        (
            "classes_without_rational_root",
            Value::from(s.irreducible_classes),
        ),
        ("els_classes", Value::from(s.els_classes)),
        (
            "elements",
            Value::Array(
                s.elements
                    .iter()
                    .map(|r| {
                        let f = qorbits::form::Form::<Integer>::from_i64(r.form);
                        json::object(vec![
                            ("label", Value::from(r.label.clone())),
                            ("form", json::form(&f)),
                        ])
                    })
                    .collect(),
            ),
        ),
    ])
}

fn selmer_text(given: &Curve, curve: &Curve, u: &Integer, s: &Selmer) -> String {
    let model = if *u == 1 {
        format!("{} (minimal)", curve.coefficients_text())
    } else {
        format!(
            "{} (minimised from {}: the given model has c4, c6 divisible by u^4, u^6 with u = {u})",
            curve.coefficients_text(),
            given.coefficients_text()
        )
    };
    let rows = [
        ("curve", curve.equation()),
        ("model", model),
        ("c4", curve.c4().to_string()),
        ("c6", curve.c6().to_string()),
        ("Disc", curve.discriminant().to_string()),
        ("I", s.i.to_string()),
        ("J", s.j.to_string()),
        ("2-torsion", format!("rank {} over Q", s.two_torsion_rank)),
        (
            "classes",
            format!(
                "{} without a rational root, {} everywhere locally soluble, {} over Q",
                s.irreducible_classes,
                s.els_classes,
                s.elements.len()
            ),
        ),
        (
            "2-Selmer rank",
            format!("{} (order {})", s.rank, Integer::from(1) << s.rank),
        ),
    ];
    let mut out: String = rows.iter().map(|(k, v)| format!("{k:<15}{v}\n")).collect();
    if s.elements.is_empty() {
        out += "elements       none besides the identity\n";
    } else {
        out += "elements       one canonical quartic per non-trivial element:\n";
        let records: Vec<Vec<String>> = s
            .elements
            .iter()
            .map(|r| {
                let mut f = vec![r.label.clone()];
                f.extend(form_text(&r.form).split(' ').map(str::to_string));
                f
            })
            .collect();
        let t = aligned(&["label", "a", "b", "c", "d", "e"], &records);
        out += &t.lines().map(|l| format!("  {l}\n")).collect::<String>();
    }
    out
}
