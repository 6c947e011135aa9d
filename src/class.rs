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
use crate::local::{local_data, LocalData};
use crate::primes::try_factor;
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
    /// Local data at every prime dividing 2·Disc and at infinity; `None` when Disc could not
    /// be factored within the time budget (huge discriminants only).
    pub local: Option<LocalData>,
    /// The factorisation of Disc, if found.
    pub disc_factors: Option<Vec<(Integer, u32)>>,
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
    // A few seconds of rho at most; discriminants up to 10²⁴ take milliseconds.
    let disc_factors = try_factor(&invariants.disc, 4_000_000);
    let local = disc_factors
        .as_ref()
        .map(|fac| local_data(g, fac, signature));
    Ok(Description {
        input: f.clone(),
        canonical,
        invariants,
        signature,
        pattern,
        galois,
        local,
        disc_factors,
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
    /// `-1 * 2^2 * 3 * …`, if Disc was factored.
    pub fn factors_text(&self) -> Option<String> {
        let f = self.disc_factors.as_ref()?;
        let mut parts: Vec<String> = Vec::new();
        if self.invariants.disc < 0 {
            parts.push("-1".into());
        }
        parts.extend(f.iter().map(|(p, e)| {
            if *e == 1 {
                p.to_string()
            } else {
                format!("{p}^{e}")
            }
        }));
        Some(if parts.is_empty() {
            "1".into()
        } else {
            parts.join(" * ")
        })
    }

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
            "disc_factors": self.factors_text(),
            "els": self.local.as_ref().map(|l| l.els()),
            "insoluble_at": self.local.as_ref().map(|l| l.failures()),
            "local": self.local.as_ref().map(|l| l.places.iter().map(|p| json!({
                "place": p.prime.as_ref().map(|q| q.to_string()).unwrap_or_else(|| "inf".into()),
                "v_disc": p.v_disc,
                "pattern": p.pattern,
                "soluble": p.soluble,
            })).collect::<Vec<_>>()),
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
                    Some(l) if l.els() => "everywhere locally soluble".to_string(),
                    Some(l) => format!("no local point at {}", l.failures().join(", ")),
                },
            ),
        ];
        let mut out: String = rows.iter().map(|(k, v)| format!("{k:<13}{v}\n")).collect();
        for p in self.local.iter().flat_map(|l| &l.places) {
            let place = p
                .prime
                .as_ref()
                .map(|q| format!("p = {q}"))
                .unwrap_or_else(|| "p = inf".into());
            let v = p
                .v_disc
                .map(|v| format!("v(Disc) = {v}, "))
                .unwrap_or_default();
            let what = if p.prime.is_some() {
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
