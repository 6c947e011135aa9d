//! Stage 1, arithmetic: checked machine integers and big integers ([`int`]), reals and
//! complex numbers at two precisions ([`real`]), roots of cubics over R and C ([`cubic`]),
//! exact roots of integer polynomials ([`poly`]), prime factorisation and its text form
//! ([`primes`], machine integers in [`factor64`]), all arithmetic over F_p ([`fp`]),
//! fixed-capacity vectors for the allocation-free paths ([`small`]), and parsing numbers as
//! users write them ([`parse`]). Nothing here knows about quartic forms.

pub mod cubic;
pub mod factor64;
pub mod fp;
pub mod int;
pub mod parse;
pub mod poly;
pub mod primes;
pub mod real;
pub mod small;
