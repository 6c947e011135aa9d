//! Counts of a table against the asymptotic main terms of the number of classes.
//!
//! ```
//! use qorbits::table::stats::main_term;
//! // (32/135)·ζ(2)·X^{5/6} at X = 10⁶
//! assert!((main_term(2, 1e6) - 38990.7).abs() < 1.0);
//! ```

use crate::error::Result;
use rusqlite::Connection;

/// The main term of the number of irreducible classes with H < X and `real` real roots
/// (from memory of the published asymptotics, DESIGN §6): `(4, 32, 8)/135 · ζ(2) · X^{5/6}`
/// for 4, 2 and 0 real roots (both definite signs together for 0).
pub fn main_term(real: u8, x: f64) -> f64 {
    let zeta2 = std::f64::consts::PI * std::f64::consts::PI / 6.0;
    let k = match real {
        4 => 4.0,
        2 => 32.0,
        _ => 8.0,
    };
    k / 135.0 * zeta2 * x.powf(5.0 / 6.0)
}

/// Counts of irreducible classes by real roots, with the ratio to the main terms. The
/// values of `classes` are checked first (types and domains, one scan), so a count never
/// silently skips a row that holds something else.
pub fn stats_counts(conn: &Connection) -> Result<[(u8, u64, f64); 3]> {
    let params = crate::table::reader::table_params(conn)?;
    crate::table::validate::check_values(conn, "classes")?;
    let x = params.height as f64;
    let mut out = [(4u8, 0u64, 0.0f64), (2, 0, 0.0), (0, 0, 0.0)];
    for slot in out.iter_mut() {
        let n: i64 = conn.query_row(
            "SELECT count(*) FROM classes WHERE irreducible = 1 AND real_roots = ?1",
            [slot.0 as i64],
            |r| r.get(0),
        )?;
        *slot = (slot.0, n as u64, main_term(slot.0, x));
    }
    Ok(out)
}

/// The numbers of irreducible classes with H < X and 4, 2, 0 real roots, for each X of
/// `xs` (increasing): one pass over the classes in table order, which is height order.
pub fn counts_below(conn: &Connection, xs: &[f64]) -> Result<Vec<[u64; 3]>> {
    let mut st =
        conn.prepare("SELECT h4, real_roots FROM classes WHERE irreducible = 1 ORDER BY id")?;
    let mut rows = st.query([])?;
    let mut out = vec![[0u64; 3]; xs.len()];
    let mut now = [0u64; 3];
    let mut k = 0;
    while let Some(r) = rows.next()? {
        let (h4, real): (i64, i64) = (r.get(0)?, r.get(1)?);
        // Close every X at or below this class's height (H = H4/4 ≥ X).
        while k < xs.len() && h4 as f64 >= 4.0 * xs[k] {
            out[k] = now;
            k += 1;
        }
        now[match real {
            4 => 0,
            2 => 1,
            _ => 2,
        }] += 1;
    }
    for slot in &mut out[k..] {
        *slot = now;
    }
    Ok(out)
}
