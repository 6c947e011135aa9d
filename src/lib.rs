//! qorbits: the table of GL2(Z)-classes of integral binary quartic forms.
//!
//! The library is organised as the stages of the data flow, each a module that uses only
//! the stages before it (DEVELOPERS.md has the map):
//!
//! 1. [`arith`]: exact integers, reals and complex numbers, integer polynomials, prime
//!    factorisation and all arithmetic over F_p;
//! 2. [`form`]: the mathematics of one quartic form — invariants, the covariant point, the
//!    canonical representative, Galois group, local data, classes over Q;
//! 3. [`enumerate`]: the loops that meet every canonical form, in bulk or with given (I, J);
//! 4. [`table`]: classify → group → write → hash → manifest, the reader and the queries;
//! 5. [`selmer`]: curves, their 2-Selmer groups and the averages over a family.
//!
//! [`error`] and [`progress`] serve every stage. The `qorbits` binary (`src/cli/`) is a
//! thin command line over this API: argument parsing, rendering and progress bars.
//!
//! ```
//! use qorbits::form::canonical::canonical;
//! use qorbits::form::Form;
//! use rug::Integer;
//! let c = canonical(&Form::<Integer>::from_i64([1, 0, 0, 0, 2])).unwrap();
//! assert_eq!(c.form, Form::from_i64([1, 0, 0, 0, 2]));
//! ```
#![deny(missing_docs)]

pub mod arith;
pub mod enumerate;
pub mod error;
pub mod form;
pub mod progress;
pub mod selmer;
pub mod table;
