//! Everything the kernel knows about the class of one form, for `qorbits reduce` and
//! for any program that wants the same answer: canonical form, γ, invariants, height,
//! signature, factorisation, Galois group, stabiliser, local data. Rendering is the
//! command line's.
//!
//! ```
//! use qorbits::form::describe::describe;
//! use qorbits::form::Form;
//! let d = describe(&Form::from_i64([2, -7, 4, 13, -6])).unwrap();
//! assert_eq!(d.canonical.form, Form::from_i64([2, -1, -5, -8, 6]));
//! assert_eq!((d.invariants.i, d.invariants.j), (145.into(), (-8048).into()));
//! ```

use crate::arith::primes::{factor_text, try_factor};
use crate::error::Result;
use crate::form::canonical::{canonical, Canonical};
use crate::form::galois::{factor_pattern, galois_group_with, FactorPattern, GaloisGroup};
use crate::form::local::{local_data, LocalPlace};
use crate::form::{Form, Invariants, Signature};
use rug::Integer;

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
    pub local: Option<Vec<LocalPlace<Integer>>>,
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
    let galois = galois_group_with(g, pattern).expect("big integers do not overflow");
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
    /// The factorisation of |Disc| as text ([`factor_text`]), if Disc was factored.
    pub fn factors_text(&self) -> Option<String> {
        Some(factor_text(self.disc_factors.as_ref()?))
    }
}
