//! Stage 4, the table: row types ([`row`]), the classification of candidates
//! ([`classify`]), the grouping into labelled pairs ([`group`]), the pipeline and the build
//! ([`pipeline`]), the storage contract ([`schema`]), the writer ([`writer`]) with its
//! atomic files ([`atomic`]), the reader ([`reader`]), the hashes ([`hash`]), manifests and
//! verification ([`manifest`]), the JSON number rule ([`json`]), queries by invariants ([`query`]), lookups of
//! any form ([`lookup`]) and counts against the asymptotic main terms ([`stats`]).

pub mod atomic;
pub mod build;
pub mod classify;
pub mod export;
pub mod group;
pub mod hash;
pub mod json;
pub mod lookup;
pub mod manifest;
pub mod merge;
pub mod pipeline;
pub mod plan;
pub mod query;
pub mod reader;
pub mod row;
pub mod runs;
pub mod schema;
pub mod select;
pub mod shard;
pub mod stats;
pub mod writer;
