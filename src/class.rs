//! Everything the kernel knows about the class of one form, for `qorbits reduce` and
//! for any program that wants the same answer: canonical form, γ, invariants, height,
//! signature, factorisation, Galois group, stabiliser.
//!
//! ```
//! use qorbits::class::describe;
//! use qorbits::form::Form;
//! let d = describe(&Form::from_i64([2, -7, 4, 13, -6])).unwrap();
//! assert_eq!(d.canonical.form, Form::from_i64([2, -1, -5, -8, 6]));
//! assert_eq!((d.invariants.i, d.invariants.j), (145.into(), (-8048).into()));
//! ```

use crate::canonical::{canonical, Canonical};
use crate::error::Result;
use crate::form::{Form, Invariants, Signature};
use crate::galois::{factor_pattern, galois_group, FactorPattern, GaloisGroup};
use rug::Integer;
use serde_json::{json, Number, Value};

/// The description of a class, computed from any of its members.
#[derive(Clone, Debug)]
pub struct Description {
    /// The form given.
    pub input: Form<Integer>,
    /// Canonical representative, reducing matrix and stabiliser.
    pub canonical: Canonical<Integer>,
    /// I, J, Disc, H4.
    pub invariants: Invariants<Integer>,
    /// Real roots and definiteness.
    pub signature: Signature,
    /// Factorisation pattern over Q.
    pub pattern: FactorPattern,
    /// Galois group (irreducible forms only).
    pub galois: Option<GaloisGroup>,
}

/// Describe the class of `f`; fails for Disc = 0 (and on numerical failure).
pub fn describe(f: &Form<Integer>) -> Result<Description> {
    let canonical = canonical(f)?;
    let g = &canonical.form;
    let invariants = g.invariants().expect("big integers do not overflow");
    let signature = g
        .signature(&invariants)
        .expect("big integers do not overflow");
    let pattern = factor_pattern(g).expect("big integers do not overflow");
    let galois = galois_group(g).expect("big integers do not overflow");
    Ok(Description {
        input: f.clone(),
        canonical,
        invariants,
        signature,
        pattern,
        galois,
    })
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

/// `H4/4` written exactly in decimal (H4 is an integer, so at most two decimals).
pub fn height_decimal(h4: &Integer) -> String {
    let (q, r) = h4.clone().div_rem_euc(Integer::from(4));
    match r.to_u32().unwrap_or(0) {
        0 => q.to_string(),
        1 => format!("{q}.25"),
        2 => format!("{q}.5"),
        _ => format!("{q}.75"),
    }
}

impl Description {
    /// One JSON object with every field (integers exact).
    pub fn to_json(&self) -> Value {
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
        })
    }

    /// Aligned `name  value` lines for a terminal.
    pub fn to_text(&self) -> String {
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
            ("Disc", self.invariants.disc.to_string()),
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
        ];
        rows.iter().map(|(k, v)| format!("{k:<13}{v}\n")).collect()
    }
}
