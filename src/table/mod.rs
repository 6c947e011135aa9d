//! Stage 4, the table: row types ([`row`]), the classification of candidates
//! ([`classify`]), the grouping into labelled pairs ([`group`]), the pipeline and the build
//! ([`pipeline`]), the storage contract ([`schema`]), the writer ([`writer`]) with its
//! atomic files ([`atomic`]), the reader ([`reader`]) and what it checks of a file before
//! reading it ([`validate`], [`header`], [`schema_check`], [`pair_check`]), the hashes
//! ([`hash`]), manifests ([`manifest`]), verification ([`verify`], [`pages`]), the JSON
//! number rule ([`json`]), queries by invariants ([`query`]) and counts against the
//! asymptotic main terms ([`stats`]).

pub mod atomic;
pub mod classify;
pub mod group;
pub mod hash;
pub mod header;
pub mod json;
pub mod manifest;
pub mod pages;
pub mod pair_check;
pub mod pipeline;
pub mod query;
pub mod reader;
pub mod row;
pub mod schema;
pub mod schema_check;
pub mod stats;
pub mod validate;
pub mod verify;
pub mod writer;
