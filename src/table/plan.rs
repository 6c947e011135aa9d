//! The plan of a build: the deterministic list of chunks of the enumeration with the
//! candidates each holds (counted by the loops themselves, without classifying anything),
//! the partition of the chunks into shards balanced by that work, and the model that turns
//! candidates into expected classes, time, disk and memory (DESIGN §7).
//!
//! A chunk is a few consecutive segments of the loops (a task (a, b) and a range of its
//! values of c), cut so that no chunk holds more than [`CHUNK_CANDIDATES`] candidates: its
//! classified rows fit in memory, sorted, before they are written as a run. The list
//! depends only on the parameters and the number of shards, so every machine of a cluster
//! computes the same one.
//!
//! ```
//! use qorbits::progress::Silent;
//! use qorbits::table::plan::plan;
//! use qorbits::table::row::Params;
//! let p = plan(&Params { height: 100_000, include_reducible: false }, 4, &Silent).unwrap();
//! let shards = p.shards(4);
//! assert_eq!(shards.iter().map(Vec::len).sum::<usize>(), p.chunks.len());
//! ```

use crate::enumerate::bounds::{Bounds, Task};
use crate::enumerate::bulk::Chunk;
use crate::error::Result;
use crate::progress::Progress;
use crate::table::row::Params;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};

/// The most candidates a chunk holds (about 2·10⁵ classes, a few hundred MB of rows in
/// memory at most while they are sorted).
pub const CHUNK_CANDIDATES: u64 = 2_000_000;

/// The fewest candidates a chunk is cut down to (smaller chunks only cost files).
pub const MIN_CHUNK_CANDIDATES: u64 = 20_000;

/// Chunks per shard that the cut aims at, so that shards can be balanced.
pub const CHUNKS_PER_SHARD: u64 = 32;

/// A part of the loops: one task and a range of its values of c.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Segment {
    /// Leading coefficient.
    pub a: i64,
    /// Second coefficient.
    pub b: i64,
    /// First value of c.
    pub c_lo: i64,
    /// Last value of c.
    pub c_hi: i64,
    /// Candidates the loops meet in the segment.
    pub candidates: u64,
}

impl Segment {
    /// The chunk of the loops.
    pub fn chunk(&self) -> Chunk {
        Chunk {
            task: Task {
                a: self.a,
                b: self.b,
            },
            c_lo: self.c_lo,
            c_hi: self.c_hi,
        }
    }
}

/// One chunk: consecutive segments of the loops, and its work.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct PlannedChunk {
    /// The segments.
    pub segments: Vec<Segment>,
    /// Candidates the loops meet in the chunk.
    pub candidates: u64,
}

/// The chunks of a build, in a fixed order (their index names their run).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Plan {
    /// The parameters.
    pub params: Params,
    /// The shards the chunks were cut for (1 for a build on one machine).
    pub shards: usize,
    /// The chunks.
    pub chunks: Vec<PlannedChunk>,
}

/// Splits the candidates of one task, counted per value of c, into segments of at most
/// `limit` candidates (a single value of c may exceed it).
fn split(task: Task, counts: &[(i64, u64)], limit: u64) -> Vec<(Segment, u64)> {
    let mut out: Vec<(Segment, u64)> = Vec::new();
    for &(c, n) in counts {
        match out.last_mut() {
            Some((seg, m)) if *m + n <= limit => {
                seg.c_hi = c;
                seg.candidates += n;
                *m += n;
            }
            _ => out.push((
                Segment {
                    a: task.a,
                    b: task.b,
                    c_lo: c,
                    c_hi: c,
                    candidates: n,
                },
                n,
            )),
        }
    }
    out
}

/// The plan of the build of `params` cut for `shards` shards, counting on the current
/// rayon pool: the candidates of every task, the size of a chunk (at most
/// [`CHUNK_CANDIDATES`], aiming at [`CHUNKS_PER_SHARD`] chunks a shard), the tasks cut by c
/// where they are larger, and consecutive segments packed into chunks. `progress` advances
/// once per task.
pub fn plan(params: &Params, shards: usize, progress: &dyn Progress) -> Result<Plan> {
    let hb = Bounds::for_height(params.height)?;
    let tasks = Task::all(&hb, params.include_reducible);
    progress.start("planning", 2 * tasks.len() as u64);
    let whole = |t: &Task| {
        let (lo, hi) = t.c_values(&hb);
        Chunk {
            task: *t,
            c_lo: lo,
            c_hi: hi,
        }
    };
    let totals: Vec<u64> = tasks
        .par_iter()
        .map(|t| {
            let n = whole(t).count_by_c(&hb).iter().map(|x| x.1).sum();
            progress.advance(1);
            n
        })
        .collect();
    let total: u64 = totals.iter().sum();
    let limit = (total / (shards.max(1) as u64 * CHUNKS_PER_SHARD))
        .clamp(MIN_CHUNK_CANDIDATES, CHUNK_CANDIDATES);
    let pieces: Vec<Vec<(Segment, u64)>> = tasks
        .par_iter()
        .zip(&totals)
        .map(|(t, &n)| {
            let out = if n == 0 {
                Vec::new()
            } else if n <= limit {
                let (lo, hi) = t.c_values(&hb);
                vec![(
                    Segment {
                        a: t.a,
                        b: t.b,
                        c_lo: lo,
                        c_hi: hi,
                        candidates: n,
                    },
                    n,
                )]
            } else {
                split(*t, &whole(t).count_by_c(&hb), limit)
            };
            progress.advance(1);
            out
        })
        .collect();
    let mut chunks: Vec<PlannedChunk> = Vec::new();
    for (seg, n) in pieces.into_iter().flatten() {
        match chunks.last_mut() {
            Some(ch) if ch.candidates + n <= limit => {
                ch.segments.push(seg);
                ch.candidates += n;
            }
            _ => chunks.push(PlannedChunk {
                segments: vec![seg],
                candidates: n,
            }),
        }
    }
    Ok(Plan {
        params: *params,
        shards: shards.max(1),
        chunks,
    })
}

impl Plan {
    /// All candidates of the build.
    pub fn candidates(&self) -> u64 {
        self.chunks.iter().map(|c| c.candidates).sum()
    }

    /// The expected work of each chunk, in units of one classless candidate: every
    /// candidate costs 1, and each class found costs [`CLASS_COST`] more; the classes of a
    /// segment are its candidates times the yield of [`class_yield`] at its leading
    /// coefficient.
    pub fn work(&self) -> Vec<f64> {
        let x = self.params.height as f64;
        self.chunks
            .iter()
            .map(|c| {
                c.segments
                    .iter()
                    .map(|s| {
                        let n = s.candidates as f64;
                        n * (1.0 + CLASS_COST * class_yield(s.a, x))
                    })
                    .sum()
            })
            .collect()
    }

    /// The chunk indices of each of `n` shards, balanced by [`Plan::work`]: the largest
    /// chunks first, each to the shard with the least work so far (ties to the lower index),
    /// then each shard's chunks in index order. Deterministic.
    pub fn shards(&self, n: usize) -> Vec<Vec<usize>> {
        let work = self.work();
        let mut order: Vec<usize> = (0..self.chunks.len()).collect();
        order.sort_by(|&i, &j| work[j].total_cmp(&work[i]).then(i.cmp(&j)));
        let mut load = vec![0f64; n.max(1)];
        let mut out = vec![Vec::new(); n.max(1)];
        for k in order {
            let s = (0..load.len())
                .min_by(|&s, &t| load[s].total_cmp(&load[t]).then(s.cmp(&t)))
                .expect("one shard");
            load[s] += work[k];
            out[s].push(k);
        }
        for s in &mut out {
            s.sort();
        }
        out
    }
}

/// The cost of a class over a classless candidate (annotation with local data, grouping and
/// writing), measured by the bench (`cargo bench --bench build`, per-|a| timings).
pub const CLASS_COST: f64 = 12.0;

/// The fraction of the candidates with leading coefficient a that are classes below X, as a
/// function of `t = |a|/X^{1/6}`: measured on the tables of 10⁷ and 10⁸, where it nearly
/// agrees between heights (0.33 at t = 0.05, 0.18 at 0.14, 0.05 at 0.23, 0.0025 at 0.33,
/// none beyond 0.4); linear in between. (X^{1/6} comes from the same function as the loop
/// bounds, so machines that run the same binary compute the same plan.)
pub fn class_yield(a: i64, x: f64) -> f64 {
    const POINTS: [(f64, f64); 10] = [
        (0.0, 0.36),
        (0.046, 0.333),
        (0.093, 0.252),
        (0.139, 0.181),
        (0.186, 0.110),
        (0.232, 0.050),
        (0.278, 0.015),
        (0.325, 0.0025),
        (0.37, 0.0001),
        (0.40, 0.0),
    ];
    if a == 0 {
        return 0.1; // reducible tasks: a fair share
    }
    let t = a.unsigned_abs() as f64 / x.powf(1.0 / 6.0);
    for w in POINTS.windows(2) {
        let ((t0, y0), (t1, y1)) = (w[0], w[1]);
        if t <= t1 {
            return y0 + (t - t0) / (t1 - t0) * (y1 - y0);
        }
    }
    0.0
}

/// The model of a build, calibrated on the development machine (2 cores) by the builds of
/// H < 10⁸ and 10⁹ (README, "Research heights": wall 46 s and 336 s, user 80 s and 591 s)
/// and the shard part of `cargo bench --bench build`, which times the enumeration without
/// the merge (16 shards of 10⁸ on one thread, 53 s in all): CPU seconds per unit of
/// [`Plan::work`] in the enumeration, which runs on every thread (53 s over the work of
/// 10⁸), seconds per class of the merge, which is bound by its one writer thread (the rest
/// of the 46 s), and bytes per class of the table (the largest measured, 266 at 10¹⁰, so
/// that the disk check errs on the safe side) and of the runs. With these the model gives
/// 337 s for the build of 10⁹. A rule of thumb, not a bound: `plan` prints it, `build`
/// checks the free disk against it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Model {
    /// CPU seconds per unit of work (a classless candidate), on one core.
    pub seconds_per_unit: f64,
    /// Wall seconds per class of the merge (grouping over Q, writing, hashing).
    pub merge_seconds_per_class: f64,
    /// Bytes per class of the finished table.
    pub table_bytes_per_class: f64,
    /// Bytes per class of the runs (deleted after the merge).
    pub run_bytes_per_class: f64,
}

/// The calibrated model (see [`Model`]).
pub const MODEL: Model = Model {
    seconds_per_unit: 2.03e-6,
    merge_seconds_per_class: 1.62e-5,
    table_bytes_per_class: 266.0,
    run_bytes_per_class: 60.0,
};

/// What a build (or a share of it) is expected to take.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Estimate {
    /// Candidates (exact, counted).
    pub candidates: u64,
    /// Classes expected.
    pub classes: f64,
    /// Wall-clock seconds on the threads given.
    pub seconds: f64,
    /// Bytes of the table.
    pub table_bytes: f64,
    /// Peak bytes on disk during the build (runs and table together).
    pub disk_bytes: f64,
    /// Peak resident memory in bytes.
    pub memory_bytes: f64,
}

impl Plan {
    /// The expected estimate for the chunks `share` (all when `None`) on `threads` cores,
    /// the merge included only for the whole build.
    pub fn estimate(&self, share: Option<&[usize]>, threads: usize, m: &Model) -> Estimate {
        let x = self.params.height as f64;
        let all: Vec<usize> = (0..self.chunks.len()).collect();
        let ks = share.unwrap_or(&all);
        let work = self.work();
        let (mut candidates, mut classes, mut units) = (0u64, 0f64, 0f64);
        for &k in ks {
            candidates += self.chunks[k].candidates;
            units += work[k];
            classes += self.chunks[k]
                .segments
                .iter()
                .map(|s| s.candidates as f64 * class_yield(s.a, x))
                .sum::<f64>();
        }
        let merge = if share.is_none() {
            classes * m.merge_seconds_per_class
        } else {
            0.0
        };
        let seconds = units * m.seconds_per_unit / threads.max(1) as f64 + merge;
        let table = classes * m.table_bytes_per_class;
        // Each worker holds one chunk's rows (about 500 bytes each in memory) while it
        // sorts them; the merge a batch of pairs and a buffer per run.
        let biggest = self.chunks.iter().map(|c| c.candidates).max().unwrap_or(0) as f64;
        let memory = 80e6 + threads as f64 * biggest * 0.36 * 500.0;
        Estimate {
            candidates,
            classes,
            seconds,
            table_bytes: table,
            disk_bytes: table + classes * m.run_bytes_per_class,
            memory_bytes: memory,
        }
    }
}

/// Bytes on disk a merge of `classes` classes from `runs` runs writes: the table, and the
/// intermediate runs when there are more runs than the merge reads at once.
pub fn merge_bytes(classes: u64, runs: usize) -> f64 {
    let c = classes as f64;
    let intermediate = if runs > crate::table::merge::FAN_IN {
        c * MODEL.run_bytes_per_class
    } else {
        0.0
    };
    c * MODEL.table_bytes_per_class + intermediate
}

/// Bytes per class of an export, measured on the published tier H < 10⁵ (1498 classes,
/// local data included: CSV 176 644 bytes, JSON Lines 828 660; gzipped 31 917 and 48 411):
/// CSV, JSON Lines, and the share gzip leaves of either (rounded up).
pub const EXPORT_BYTES_PER_CLASS: (f64, f64, f64) = (120.0, 560.0, 0.2);

/// Bytes an export of `classes` classes writes ([`EXPORT_BYTES_PER_CLASS`]).
pub fn export_bytes(classes: u64, jsonl: bool, gzip: bool) -> f64 {
    let (csv, json, gz) = EXPORT_BYTES_PER_CLASS;
    let plain = classes as f64 * if jsonl { json } else { csv };
    if gzip {
        plain * gz
    } else {
        plain
    }
}

/// Bytes a release folder of a table of `table_bytes` writes: the gzipped table (at most
/// the table, SQLite pages of small integers compress well) and the small files beside it
/// (manifest, citation, picture, page: below 100 kB).
pub fn release_bytes(table_bytes: u64) -> f64 {
    table_bytes as f64 + 100e3
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::progress::Silent;

    /// The model against the builds measured on the development machine with
    /// `/usr/bin/time -v qorbits build --height X --jobs 2 --quiet` (README, "Research
    /// heights"): time and table size within a factor 1.5, the accuracy `plan` promises.
    #[test]
    fn the_model_predicts_the_measured_builds_within_a_factor_one_and_a_half() {
        for (x, wall, bytes) in [
            (100_000_000i128, 46.2, 297_263_104.0),
            (1_000_000_000, 335.5, 2_436_673_536.0),
        ] {
            let p = plan(
                &Params {
                    height: x,
                    include_reducible: false,
                },
                1,
                &Silent,
            )
            .unwrap();
            let e = p.estimate(None, 2, &MODEL);
            for (what, got, want) in [("time", e.seconds, wall), ("size", e.table_bytes, bytes)] {
                let r = got / want;
                assert!(
                    (1.0 / 1.5..=1.5).contains(&r),
                    "{what} at {x}: {got} against {want}"
                );
            }
            assert!(
                e.disk_bytes >= bytes,
                "the disk check needs at least the table"
            );
        }
    }
}
