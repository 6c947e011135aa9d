//! Stage 4, the table: row types ([`row`]), the classification of candidates
//! ([`classify`]), the grouping into labelled pairs ([`group`]), the pipeline and the build
//! ([`pipeline`]), the storage contract ([`schema`]) and the kinds of file ([`format`]), the writer ([`writer`]) with its
//! atomic files ([`atomic`]), the reader ([`reader`]) and what it checks of a file before
//! reading it ([`validate`], [`header`], [`schema_check`], [`pair_check`]), the hashes
//! ([`hash`], computed in parallel by [`pieces`]), manifests ([`manifest`]), verification ([`verify`], [`pages`]), the JSON
//! number rule ([`json`]), queries by invariants ([`query`]), selections ([`select`]),
//! lookups of any form ([`lookup`]), exports ([`export`]), counts against the asymptotic
//! main terms ([`stats`]), and the scalable build: plan ([`plan`]), sorted runs ([`runs`]),
//! their merge ([`merge`]), the build itself ([`build`]) and shards ([`shard`]), the
//! commit of a finished table and the work directories ([`commit`]), and failed writes for
//! lack of space ([`space`]).

pub mod atomic;
pub mod build;
pub mod classify;
pub mod commit;
pub mod export;
pub mod format;
pub mod group;
pub mod hash;
pub mod header;
pub mod json;
pub mod lookup;
pub mod manifest;
pub mod merge;
pub mod pages;
pub mod pair_check;
pub mod pieces;
pub mod pipeline;
pub mod plan;
pub mod query;
pub mod reader;
pub mod row;
pub mod runs;
pub mod schema;
pub mod schema_check;
pub mod select;
pub mod shard;
pub mod space;
pub mod stats;
pub mod validate;
pub mod verify;
pub mod writer;
