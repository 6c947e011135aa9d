//! Numbers as users write them: integers of any size, and height bounds in decimal or
//! e-notation (`1e6`, `2.5e5`, `1000000`), exactly.
//!
//! ```
//! use qorbits::arith::parse::{parse_height, parse_integer};
//! assert_eq!(parse_height("2.5e5").unwrap(), 250_000);
//! assert_eq!(parse_integer("I", "-12").unwrap(), -12);
//! assert!(parse_height("1.5").is_err());
//! ```

use crate::error::{Error, Result};
use rug::ops::Pow;
use rug::Integer;

/// The input as it goes into a one-line message: escaped (`\n` stays two characters) and
/// cut after 40 characters.
fn shown(s: &str) -> String {
    let mut out: String = s.chars().take(40).flat_map(char::escape_debug).collect();
    if s.chars().nth(40).is_some() {
        out.push('…');
    }
    out
}

/// An integer of any size: an optional sign and decimal digits, with surrounding whitespace
/// ignored (nothing else: `1 2` or `1_000` are refused, not read as 12 or 1000); `name` says
/// what it is in the error message.
pub fn parse_integer(name: &str, s: &str) -> Result<Integer> {
    let t = s.trim();
    let digits = t.strip_prefix(['+', '-']).unwrap_or(t);
    let bad = || Error::Input(format!("{name} '{}' is not an integer", shown(s)));
    if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return Err(bad());
    }
    Integer::parse(t).map(Integer::from).map_err(|_| bad())
}

/// A positive integer written in decimal or e-notation (`1e6`, `2.5e5`, `1000000`).
pub fn parse_height(s: &str) -> Result<i128> {
    let bad = || {
        Error::Input(format!(
            "height '{}' is not a positive integer (write e.g. 1e6 or 1000000)",
            shown(s)
        ))
    };
    let t = s.trim().to_ascii_lowercase();
    let (mant, exp) = match t.split_once('e') {
        Some((m, e)) => (m.to_string(), e.parse::<u32>().map_err(|_| bad())?),
        None => (t.clone(), 0),
    };
    let (int, frac) = mant.split_once('.').unwrap_or((&mant, ""));
    if int.is_empty() && frac.is_empty()
        || !int.chars().chain(frac.chars()).all(|c| c.is_ascii_digit())
    {
        return Err(bad());
    }
    if frac.len() as u32 > exp && frac.trim_end_matches('0').len() as u32 > exp {
        return Err(bad());
    }
    if exp > 60 {
        return Err(bad());
    }
    let digits = format!("{int}{frac}");
    let shift = exp.checked_sub(frac.len() as u32);
    let v = Integer::parse(if digits.is_empty() { "0" } else { &digits }).map_err(|_| bad())?;
    let mut v = Integer::from(v);
    match shift {
        Some(k) => v *= Integer::from(10).pow(k),
        None => v /= Integer::from(10).pow(frac.len() as u32 - exp),
    }
    let v = v.to_i128().ok_or_else(bad)?;
    if v < 1 {
        return Err(bad());
    }
    Ok(v)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn heights_in_e_notation() {
        assert_eq!(parse_height("1e6").unwrap(), 1_000_000);
        assert_eq!(parse_height("2.5e5").unwrap(), 250_000);
        assert_eq!(parse_height("1000").unwrap(), 1000);
        assert_eq!(parse_height("1E8").unwrap(), 100_000_000);
        for bad in ["1.5", "-3", "0", "abc", "1e", "e5", "", "1e4000000000"] {
            assert!(parse_height(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn integers_are_a_sign_and_digits() {
        assert_eq!(parse_integer("I", " -12 ").unwrap(), -12);
        assert_eq!(parse_integer("I", "+7").unwrap(), 7);
        for bad in ["1 2", "1_000", "1\n2", "", "-", "+-1", "0x10", "1e3", "١٢"] {
            assert!(parse_integer("I", bad).is_err(), "{bad:?}");
        }
    }

    #[test]
    fn messages_stay_on_one_line() {
        for s in ["1\n2", "x\r\ny", &format!("{}x", "9".repeat(100_000))] {
            let e = parse_integer("coefficient", s).unwrap_err().to_string();
            let h = parse_height(&format!("{s}.5")).unwrap_err().to_string();
            assert!(
                !e.contains('\n') && !h.contains('\n') && e.len() < 200,
                "{e}"
            );
        }
    }
}
