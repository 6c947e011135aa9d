//! Queries by invariants: the classes with given (I, J), from a table when it covers the
//! pair and the classes asked for, else computed by the search by invariants, with the
//! filters of `qorbits classes` (reducible classes, everywhere local solubility, one class
//! per class over Q).
//!
//! ```
//! use qorbits::progress::Silent;
//! use qorbits::table::query::{Query, Source};
//! use rug::Integer;
//! let q = Query::new(Integer::from(10), Integer::from(-29)).unwrap();
//! let a = q.answer(None, &Silent).unwrap();
//! assert_eq!(a.source, Source::Computed);
//! assert_eq!(a.rows.len(), 1);
//! ```

use crate::enumerate::by_invariants::refusal;
use crate::error::{Error, Result};
use crate::form::describe::height_decimal;
use crate::form::invariants_from_ij;
use crate::progress::Progress;
use crate::table::pipeline::classes_with_invariants;
use crate::table::reader::{open_table, pair_from_table, table_params};
use crate::table::row::{ClassRow, Pair, Params};
use rug::Integer;
use std::path::Path;

/// The classes with invariants (I, J), and which of them to keep.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Query {
    /// Invariant I.
    pub i: Integer,
    /// Invariant J.
    pub j: Integer,
    /// `H4 = max(4|I|³, J²)` of the pair.
    pub h4: Integer,
    /// Also the classes with a rational factor.
    pub include_reducible: bool,
    /// Only the everywhere locally soluble classes.
    pub els: bool,
    /// Only the first class of each class over Q (among the everywhere locally soluble
    /// classes without a rational root).
    pub over_q: bool,
}

/// Why a table does not answer a query.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum NotCovered {
    /// The pair's height is not below the table's bound.
    Height {
        /// H of the pair, exactly in decimal.
        pair: String,
        /// The table's bound.
        bound: i128,
    },
    /// Reducible classes were asked for and the table holds only irreducible ones.
    Reducible,
}

impl std::fmt::Display for NotCovered {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            NotCovered::Height { pair, bound } => {
                write!(
                    f,
                    "the pair has H = {pair}, not below the table's bound {bound}"
                )
            }
            NotCovered::Reducible => write!(
                f,
                "the table holds only irreducible classes and reducible ones were asked for"
            ),
        }
    }
}

/// Where an answer came from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Source {
    /// Read from the table.
    Table,
    /// The table does not cover the query (the reason); computed from the invariants.
    NotInTable(NotCovered),
    /// No table given; computed from the invariants.
    Computed,
}

/// The answer to a query.
#[derive(Clone, Debug)]
pub struct Answer {
    /// The rows kept by the filters, in table order.
    pub rows: Vec<ClassRow>,
    /// Where they came from.
    pub source: Source,
}

impl Query {
    /// All irreducible classes with invariants (I, J); refuses pairs no class has
    /// ([`refusal`]: ineligible, or Disc = 0).
    pub fn new(i: Integer, j: Integer) -> Result<Query> {
        if let Some(why) = refusal(&i, &j) {
            return Err(Error::Input(why));
        }
        let h4 = invariants_from_ij(i.clone(), j.clone())
            .expect("eligible pair")
            .h4;
        Ok(Query {
            i,
            j,
            h4,
            include_reducible: false,
            els: false,
            over_q: false,
        })
    }

    /// `H` of the pair, exactly in decimal.
    pub fn height(&self) -> String {
        height_decimal(&self.h4)
    }

    /// Whether a table built with `params` holds every class this query asks for.
    pub fn covered_by(&self, params: &Params) -> std::result::Result<(), NotCovered> {
        if self.h4 >= Integer::from(4) * params.height {
            return Err(NotCovered::Height {
                pair: self.height(),
                bound: params.height,
            });
        }
        if self.include_reducible && !params.include_reducible {
            return Err(NotCovered::Reducible);
        }
        Ok(())
    }

    /// Whether the table at `db` covers this query (opening and checking the table).
    pub fn coverage(&self, db: &Path) -> Result<std::result::Result<(), NotCovered>> {
        Ok(self.covered_by(&table_params(&open_table(db)?)?))
    }

    /// The rows of `pair` this query keeps.
    pub fn filter(&self, pair: &Pair) -> Vec<ClassRow> {
        let firsts: Vec<usize> = pair.over_q.iter().map(|c| c[0]).collect();
        pair.classes
            .iter()
            .enumerate()
            .filter(|(k, r)| {
                (self.include_reducible || r.irreducible())
                    && (!self.els || r.els())
                    && (!self.over_q || firsts.contains(k))
            })
            .map(|(_, r)| r.clone())
            .collect()
    }

    /// The answer from the table at `db` when it covers the query, else computed (on the
    /// current rayon pool; `progress` hears of the search).
    pub fn answer(&self, db: Option<&Path>, progress: &dyn Progress) -> Result<Answer> {
        let mut source = Source::Computed;
        if let Some(db) = db {
            let conn = open_table(db)?;
            match self.covered_by(&table_params(&conn)?) {
                Ok(()) => {
                    let (i, j) = (
                        self.i.to_i64().expect("below the bound"),
                        self.j.to_i64().expect("below the bound"),
                    );
                    let pair = pair_from_table(&conn, i, j)?;
                    return Ok(Answer {
                        rows: self.filter(&pair),
                        source: Source::Table,
                    });
                }
                Err(why) => source = Source::NotInTable(why),
            }
        }
        progress.start(&format!("classes with I = {}, J = {}", self.i, self.j), 0);
        let pair = classes_with_invariants(&self.i, &self.j, self.include_reducible)?;
        Ok(Answer {
            rows: self.filter(&pair),
            source,
        })
    }
}
