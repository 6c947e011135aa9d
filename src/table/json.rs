//! The JSON contract of qorbits' outputs (docs/output.md): integers are JSON numbers when
//! they are exactly representable in an IEEE double (|n| ≤ 2⁵³ − 1), decimal strings
//! otherwise, so that no common JSON reader rounds them; the height H = H4/4 follows the
//! same rule through H4; the same quantity has the same key everywhere. These helpers build
//! the values; [`crate::table::row::ClassRow`] serialises through them.
//!
//! ```
//! use qorbits::table::json::small;
//! assert_eq!(small(7).to_string(), "7");
//! assert_eq!(small(1 << 60).to_string(), "\"1152921504606846976\"");
//! ```

use crate::form::local::LocalPlace;
use crate::form::Form;
use rug::Integer;
use serde_json::{json, Map, Number, Value};

/// The largest integer every common JSON reader reads exactly: 2⁵³ − 1.
const SAFE: i64 = (1 << 53) - 1;

/// An integer under the contract: a number when |n| ≤ 2⁵³ − 1, else its decimal string.
pub fn int(n: &Integer) -> Value {
    match n.to_i64() {
        Some(v) if v.abs() <= SAFE => Value::Number(v.into()),
        _ => Value::String(n.to_string()),
    }
}

/// [`int`] for machine integers.
pub fn small(n: i64) -> Value {
    int(&Integer::from(n))
}

/// H = H4/4: a number (exact, at most two binary decimals) when H4 is a safe integer,
/// else the exact decimal string.
pub fn height(h4: &Integer, decimal: &str) -> Value {
    match h4.to_i64() {
        Some(v) if v.abs() <= SAFE => {
            Value::Number(Number::from_f64(v as f64 / 4.0).expect("finite"))
        }
        _ => Value::String(decimal.to_string()),
    }
}

/// A form as a list of five integers.
pub fn form(f: &Form<Integer>) -> Value {
    Value::Array(f.c.iter().map(int).collect())
}

/// A factorisation as a list of `[p, e]`.
pub fn factors<P: Clone + Into<Integer>>(f: &[(P, u32)]) -> Value {
    Value::Array(
        f.iter()
            .map(|(p, e)| json!([int(&p.clone().into()), e]))
            .collect(),
    )
}

/// The local data as a list of objects.
pub fn local<P: std::fmt::Display>(places: &[LocalPlace<P>]) -> Value {
    Value::Array(
        places
            .iter()
            .map(|l| {
                json!({
                    "place": l.place.to_string(),
                    "v_disc": l.v_disc,
                    "pattern": l.pattern,
                    "soluble": l.soluble,
                })
            })
            .collect(),
    )
}

/// An object from key–value pairs, in that order.
pub fn object(fields: Vec<(&str, Value)>) -> Value {
    let mut m = Map::new();
    for (k, v) in fields {
        m.insert(k.to_string(), v);
    }
    Value::Object(m)
}
