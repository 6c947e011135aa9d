//! qorbits: the table of GL2(Z)-classes of integral binary quartic forms.
//!
//! The library holds the exact kernel (forms, invariants, canonical representatives,
//! factorisation and Galois groups); the `qorbits` binary is a thin command line over it.
//! See DEVELOPERS.md for the map of the code and `../shared/DESIGN.md` for the mathematics.
//!
//! ```
//! use qorbits::canonical::canonical;
//! use qorbits::form::Form;
//! use rug::Integer;
//! let c = canonical(&Form::<Integer>::from_i64([1, 0, 0, 0, 2])).unwrap();
//! assert_eq!(c.form, Form::from_i64([1, 0, 0, 0, 2]));
//! ```
#![deny(missing_docs)]

pub mod by_invariants;
pub mod canonical;
pub mod class;
pub mod covariant;
pub mod enumerate;
pub mod error;
pub mod form;
pub mod fp;
pub mod galois;
pub mod int;
pub mod local;
pub mod manifest;
pub mod poly;
pub mod primes;
pub mod rational;
pub mod real;
pub mod report;
pub mod selmer;
pub mod store;
pub mod table;
