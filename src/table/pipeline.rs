//! The pipeline: enumerate → classify → group → write → manifest (DESIGN §4, §5), for a
//! whole table ([`enumerate_classes`], [`build`]) and for the classes of one pair
//! ([`classes_with_invariants`], through the search by invariants, no table needed).
//!
//! ```
//! use qorbits::progress::Silent;
//! use qorbits::table::pipeline::enumerate_classes;
//! use qorbits::table::row::Params;
//! let t = enumerate_classes(&Params { height: 2000, include_reducible: false }, &Silent).unwrap();
//! assert!(t.rows().all(|r| r.h4 < 8000 && r.irreducible()));
//! ```

use crate::enumerate::bounds::{Bounds, Task};
use crate::enumerate::by_invariants::forms_with_invariants;
use crate::enumerate::congruent::for_each_congruent;
use crate::error::{Error, Result};
use crate::form::{invariants_from_ij, Form};
use crate::progress::Progress;
use crate::table::classify::{classify, Annotation};
use crate::table::group::{group_rows, make_pair};
use crate::table::manifest::{default_manifest_path, manifest_for, write_manifest, Manifest};
use crate::table::row::{ClassRow, Pair, Params, Table};
use crate::table::writer::write_table;
use rayon::prelude::*;
use rug::Integer;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Every class with `H < height` (irreducible, or all with `include_reducible`), in table
/// order. Runs on the current rayon pool; `progress` advances once per task.
pub fn enumerate_classes(params: &Params, progress: &dyn Progress) -> Result<Table> {
    enumerate_classes_with(params, progress, true)
}

/// [`enumerate_classes`] with the local data left out when `with_local` is false (rows
/// with an empty `local`; for benchmarks — such rows do not make a valid table).
pub fn enumerate_classes_with(
    params: &Params,
    progress: &dyn Progress,
    with_local: bool,
) -> Result<Table> {
    let bounds = Bounds::for_height(params.height)?;
    let tasks = Task::all(&bounds, params.include_reducible);
    let what = Annotation {
        include_reducible: params.include_reducible,
        with_local,
    };
    progress.start("enumerating", tasks.len() as u64);
    let parts: Vec<Result<(Vec<ClassRow>, u64)>> = tasks
        .par_iter()
        .map(|t| {
            let r = run_task(t, &bounds, what);
            progress.advance(1);
            r
        })
        .collect();
    let mut rows = Vec::new();
    let mut candidates = 0;
    for part in parts {
        let (r, n) = part?;
        rows.extend(r);
        candidates += n;
    }
    Ok(Table {
        params: *params,
        pairs: group_rows(rows)?,
        candidates,
    })
}

fn run_task(task: &Task, bounds: &Bounds, what: Annotation) -> Result<(Vec<ClassRow>, u64)> {
    let mut rows = Vec::new();
    let mut failure = None;
    let n = task.for_each(bounds, |c| {
        if failure.is_some() {
            return;
        }
        match classify(&Form::new(c.map(i128::from)), what) {
            Ok(Some(row)) => rows.push(row),
            Ok(None) => {}
            Err(e) => failure = Some(e),
        }
    });
    match failure {
        Some(e) => Err(e),
        None => Ok((rows, n)),
    }
}

/// Every class with invariants (I, J) (irreducible, or all with `include_reducible`), each
/// with every column of the table, as one pair — at any height, without a table. Runs on
/// the current rayon pool.
pub fn classes_with_invariants(i: &Integer, j: &Integer, include_reducible: bool) -> Result<Pair> {
    let forms = forms_with_invariants(i, j, include_reducible)?;
    let what = Annotation {
        include_reducible,
        with_local: true,
    };
    let rows: Vec<Option<ClassRow>> = forms
        .par_iter()
        .map(|f| classify(&Form::new(*f), what))
        .collect::<Result<_>>()?;
    let mut rows: Vec<ClassRow> = rows.into_iter().flatten().collect();
    rows.sort_by_key(ClassRow::key);
    let (ii, jj) = (
        i.to_i64().expect("checked by the search"),
        j.to_i64().expect("checked by the search"),
    );
    make_pair(ii, jj, rows)
}

/// The irreducible classes of many pairs at once, each with `48 | I`, `1728 | J` and
/// `H < height` (the pairs of a family of short curves): one enumeration of every candidate
/// with such invariants ([`for_each_congruent`]), keeping those of the pairs asked for whose
/// (a, b, c) also lie in the ranges of the search for their own pair — so each pair gets
/// exactly the candidates, hence the classes, of [`classes_with_invariants`] (without
/// reducible classes). One [`Pair`] per pair asked for, in that order. Runs on the current
/// rayon pool; `progress` advances once per task.
pub fn classes_of_congruent_pairs(
    pairs: &[(i64, i64)],
    height: i128,
    progress: &dyn Progress,
) -> Result<Vec<Pair>> {
    let bounds = Bounds::for_height(height)?;
    let mut index = HashMap::new();
    for (k, &(i, j)) in pairs.iter().enumerate() {
        let inv = invariants_from_ij(i128::from(i), i128::from(j))
            .filter(|inv| inv.disc != 0 && inv.h4 < 4 * height && i % 48 == 0 && j % 1728 == 0)
            .ok_or_else(|| {
                Error::Input(format!(
                    "({i}, {j}) is not a pair with 48 | I, 1728 | J, Disc ≠ 0 and H < {height}"
                ))
            })?;
        index.insert((i, j), (k, Bounds::for_pair(inv.h4 as f64)));
    }
    let what = Annotation {
        include_reducible: false,
        with_local: true,
    };
    let tasks = Task::all(&bounds, false);
    progress.start("enumerating", tasks.len() as u64);
    let parts: Vec<Result<Vec<(usize, ClassRow)>>> = tasks
        .par_iter()
        .map(|&task| {
            let mut rows = Vec::new();
            let mut failure = None;
            for_each_congruent(&bounds, task, |f| {
                let form = Form::new(f.map(i128::from));
                let (Some(i), Some(j)) = (form.i_invariant(), form.j_invariant()) else {
                    return;
                };
                let key = (i as i64, j as i64); // |I|, |J| < 2·10⁹ below H < 1e18
                let Some(&(k, own)) = index.get(&key) else {
                    return;
                };
                let (c_lo, c_hi) = own.c_range(task.a, task.b);
                if !own.holds_task(task.a, task.b) || f[2] < c_lo || f[2] > c_hi {
                    return;
                }
                match classify(&form, what) {
                    Ok(Some(row)) => rows.push((k, row)),
                    Ok(None) => {}
                    Err(e) => failure = failure.take().or(Some(e)),
                }
            });
            progress.advance(1);
            failure.map_or(Ok(rows), Err)
        })
        .collect();
    let mut by_pair: Vec<Vec<ClassRow>> = vec![Vec::new(); pairs.len()];
    for part in parts {
        for (k, row) in part? {
            by_pair[k].push(row);
        }
    }
    by_pair
        .into_par_iter()
        .zip(pairs.par_iter())
        .map(|(mut rows, &(i, j))| {
            rows.sort_by_key(ClassRow::key);
            make_pair(i, j, rows)
        })
        .collect()
}

/// What [`build`] wrote.
#[derive(Clone, Debug)]
pub struct BuildSummary {
    /// The table file.
    pub table: PathBuf,
    /// Its manifest, beside it.
    pub manifest_path: PathBuf,
    /// The manifest.
    pub manifest: Manifest,
}

/// Builds the table of `params` into `out` and its manifest beside it
/// ([`default_manifest_path`]), on the current rayon pool. Existing files are refused
/// ([`Error::Exists`]) unless `replace`, before any work is done.
pub fn build(
    params: &Params,
    out: &Path,
    replace: bool,
    progress: &dyn Progress,
) -> Result<BuildSummary> {
    let manifest_path = default_manifest_path(out);
    // Both outputs are checked before any work: neither may be a directory or a link, so
    // a build never stops after the table with its manifest refused.
    for target in [out, manifest_path.as_path()] {
        crate::table::atomic::check_target(target, replace)?;
    }
    let table = enumerate_classes(params, progress)?;
    write_table(out, &table, replace)?;
    let manifest = manifest_for(out)?;
    write_manifest(&manifest_path, &manifest, replace)?;
    Ok(BuildSummary {
        table: out.to_path_buf(),
        manifest_path,
        manifest,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::progress::Silent;

    #[test]
    fn pairs_are_ordered_consistent_and_found_again_by_the_search() {
        let params = Params {
            height: 20_000,
            include_reducible: true,
        };
        let t = enumerate_classes(&params, &Silent).unwrap();
        assert!(t.candidates as usize >= t.classes());
        for pair in t.pairs.iter().step_by(7) {
            let got = classes_with_invariants(&Integer::from(pair.i), &Integer::from(pair.j), true)
                .unwrap();
            assert_eq!(&got, pair, "({}, {})", pair.i, pair.j);
        }
        let keys: Vec<_> = t.rows().map(ClassRow::key).collect();
        assert!(keys.windows(2).all(|w| w[0] < w[1]));
        for p in &t.pairs {
            assert!(p
                .classes
                .iter()
                .all(|r| (r.i, r.j, r.disc, r.h4) == (p.i, p.j, p.disc, p.h4)));
            let prod: i128 = p
                .disc_factors
                .iter()
                .map(|&(q, e)| i128::from(q).pow(e))
                .product();
            assert_eq!(prod, i128::from(p.disc).abs());
            let grouped: usize = p.over_q.iter().map(Vec::len).sum();
            assert_eq!(
                grouped,
                p.classes.iter().filter(|r| r.grouped_over_q()).count()
            );
        }
    }
}
