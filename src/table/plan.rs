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
    /// Classes expected in the segment: its candidates, each weighted by the yield of
    /// [`class_yield`] at its a, b and c, rounded.
    pub classes: u64,
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
/// `limit` candidates (a single value of c may exceed it), with their expected classes
/// below X = `x`.
fn split(task: Task, counts: &[(i64, u64)], limit: u64, x: f64) -> Vec<(Segment, u64)> {
    let mut out: Vec<(Segment, u64, f64)> = Vec::new();
    for &(c, n) in counts {
        let classes = classes_at(task, c, n, x);
        match out.last_mut() {
            Some((seg, m, k)) if *m + n <= limit => {
                seg.c_hi = c;
                seg.candidates += n;
                *m += n;
                *k += classes;
            }
            _ => out.push((
                Segment {
                    a: task.a,
                    b: task.b,
                    c_lo: c,
                    c_hi: c,
                    candidates: n,
                    classes: 0,
                },
                n,
                classes,
            )),
        }
    }
    out.into_iter()
        .map(|(mut seg, n, k)| {
            seg.classes = k.round() as u64;
            (seg, n)
        })
        .collect()
}

/// The classes expected among the `n` candidates of one task with third coefficient `c`.
fn classes_at(task: Task, c: i64, n: u64, x: f64) -> f64 {
    n as f64 * class_yield(task.a, task.b, c, x)
}

/// The classes expected among the candidates of one task, counted per value of c.
fn expected_classes(task: Task, counts: &[(i64, u64)], x: f64) -> u64 {
    let k: f64 = counts.iter().map(|&(c, n)| classes_at(task, c, n, x)).sum();
    k.round() as u64
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
    let x = params.height as f64;
    let totals: Vec<(u64, u64)> = tasks
        .par_iter()
        .map(|t| {
            let counts = whole(t).count_by_c(&hb);
            let n = counts.iter().map(|x| x.1).sum();
            progress.advance(1);
            (n, expected_classes(*t, &counts, x))
        })
        .collect();
    let total: u64 = totals.iter().map(|t| t.0).sum();
    let limit = (total / (shards.max(1) as u64 * CHUNKS_PER_SHARD))
        .clamp(MIN_CHUNK_CANDIDATES, CHUNK_CANDIDATES);
    let pieces: Vec<Vec<(Segment, u64)>> = tasks
        .par_iter()
        .zip(&totals)
        .map(|(t, &(n, classes))| {
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
                        classes,
                    },
                    n,
                )]
            } else {
                split(*t, &whole(t).count_by_c(&hb), limit, x)
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
    /// candidate costs 1, and each expected class ([`Segment::classes`]) costs
    /// [`CLASS_COST`] more.
    pub fn work(&self) -> Vec<f64> {
        self.chunks
            .iter()
            .map(|c| {
                c.segments
                    .iter()
                    .map(|s| s.candidates as f64 + CLASS_COST * s.classes as f64)
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

/// The fraction of the candidates with coefficients a, b, c that are classes below X, as a
/// function of `t = |a|/X^{1/6}`, `v = |a|·|c|/X^{1/3}` and `s = b/a`, in which it barely
/// moves with the height: [`YIELD`] holds it measured on the table of 10⁹ (classes over
/// candidates, by |a| and by bins of v of width [`YIELD_V_STEP`]), and [`YIELD_B`] the
/// factor by which it is higher or lower at each s (classes over the classes [`YIELD`]
/// expects, by |a| and by s at the nodes [`YIELD_S`]). The function interpolates both
/// linearly (t between the rows, v between the bins' middles and down to 0 past the last
/// bin, s between the nodes). Checked against the classes counted at 10⁷, 10⁸ and 10⁹ in
/// the tests. Leading coefficient 0 (reducible tasks) gets a fair share, 0.1. (X^{1/6}
/// comes from the same function as the loop bounds, so machines that run the same binary
/// compute the same plan.)
pub fn class_yield(a: i64, b: i64, c: i64, x: f64) -> f64 {
    if a == 0 {
        return 0.1;
    }
    let k = x.powf(1.0 / 6.0);
    let t = a.unsigned_abs() as f64 / k;
    let v = a.unsigned_abs() as f64 * c.unsigned_abs() as f64 / (k * k);
    let s = (b * a.signum()) as f64 / a.unsigned_abs() as f64;
    let last = YIELD_T.len() - 1;
    if t >= YIELD_T[last] {
        return 0.0;
    }
    let i = YIELD_T
        .iter()
        .rposition(|&n| n <= t)
        .unwrap_or(0)
        .min(last - 1);
    let f = (t - YIELD_T[i]) / (YIELD_T[i + 1] - YIELD_T[i]);
    let p = v / YIELD_V_STEP - 0.5;
    let along_v = |row: &[f64; YIELD_V_BINS]| -> f64 {
        if p <= 0.0 {
            return row[0];
        }
        let j = p.floor() as usize;
        let at = |j: usize| row.get(j).copied().unwrap_or(0.0);
        at(j) + (p - j as f64) * (at(j + 1) - at(j))
    };
    let q = ((s - YIELD_S[0]) / YIELD_S_STEP).clamp(0.0, (YIELD_S_NODES - 1) as f64);
    let along_s = |row: &[f64; YIELD_S_NODES]| -> f64 {
        let j = (q.floor() as usize).min(YIELD_S_NODES - 2);
        row[j] + (q - j as f64) * (row[j + 1] - row[j])
    };
    let y = |i: usize| along_v(&YIELD[i]) * along_s(&YIELD_B[i]);
    y(i) * (1.0 - f) + y(i + 1) * f
}

/// The nodes of s = b/a in [`YIELD_B`]: −1.75 to 2 in steps of [`YIELD_S_STEP`] (b runs
/// over −2|a| < b·sign(a) ≤ 2|a|).
pub const YIELD_S: [f64; YIELD_S_NODES] = [
    -1.75, -1.5, -1.25, -1.0, -0.75, -0.5, -0.25, 0.0, 0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 1.75, 2.0,
];

/// The step of [`YIELD_S`].
pub const YIELD_S_STEP: f64 = 0.25;

/// The nodes of [`YIELD_S`].
pub const YIELD_S_NODES: usize = 16;

/// The factor of the yield at each s = b/a, measured on the table of 10⁹: by |a| (rows, at
/// [`YIELD_T`]; the row of t = 0 repeats that of |a| = 1, the last row is 1) and by the
/// nodes of [`YIELD_S`] (columns: the classes counted at the values of b whose s lies
/// within half a step of the node over the classes [`YIELD`] expects there; a node no b
/// reaches is interpolated from its neighbours), rounded to 10⁻³.
#[rustfmt::skip]
pub const YIELD_B: [[f64; YIELD_S_NODES]; 14] = [
    [1.025, 1.025, 1.025, 1.025, 1.020, 1.015, 1.010, 1.005, 0.996, 0.987, 0.978, 0.969, 0.977, 0.985, 0.993, 1.001],
    [1.025, 1.025, 1.025, 1.025, 1.020, 1.015, 1.010, 1.005, 0.996, 0.987, 0.978, 0.969, 0.977, 0.985, 0.993, 1.001],
    [1.026, 1.026, 1.039, 1.052, 1.042, 1.033, 1.024, 1.015, 0.983, 0.950, 0.951, 0.952, 0.949, 0.947, 0.975, 1.003],
    [1.037, 1.055, 1.074, 1.095, 1.088, 1.077, 1.067, 1.030, 0.952, 0.935, 0.918, 0.907, 0.901, 0.913, 0.924, 0.992],
    [1.039, 1.058, 1.091, 1.082, 1.088, 1.063, 1.049, 1.000, 0.942, 0.902, 0.899, 0.882, 0.889, 0.889, 0.925, 0.987],
    [1.011, 1.080, 1.131, 1.153, 1.161, 1.142, 1.085, 1.032, 0.937, 0.869, 0.827, 0.815, 0.808, 0.827, 0.866, 0.963],
    [1.142, 1.250, 1.314, 1.358, 1.321, 1.266, 1.166, 1.044, 0.855, 0.745, 0.669, 0.638, 0.636, 0.693, 0.810, 1.029],
    [1.340, 1.491, 1.545, 1.529, 1.468, 1.317, 1.095, 0.910, 0.695, 0.523, 0.436, 0.445, 0.503, 0.647, 0.885, 1.198],
    [1.657, 1.713, 1.671, 1.615, 1.485, 1.262, 0.902, 0.574, 0.320, 0.218, 0.224, 0.332, 0.498, 0.733, 1.042, 1.454],
    [2.228, 2.222, 2.086, 1.740, 1.270, 0.867, 0.493, 0.114, 0.028, 0.024, 0.082, 0.252, 0.514, 0.827, 1.209, 1.758],
    [3.176, 2.891, 2.089, 0.978, 0.180, 0.022, 0.000, 0.000, 0.000, 0.002, 0.033, 0.145, 0.444, 0.970, 1.760, 2.728],
    [4.627, 2.549, 0.840, 0.058, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.015, 0.172, 0.860, 2.000, 4.420],
    [6.286, 0.464, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.000, 0.464, 1.397, 6.584],
    [1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000, 1.000],
];

/// The width of the bins of v in [`YIELD`].
pub const YIELD_V_STEP: f64 = 0.02;

/// The bins of v in [`YIELD`].
pub const YIELD_V_BINS: usize = 16;

/// The values of t of the rows of [`YIELD`]: 0, then |a|/10^{9/6} for |a| = 1 … 13.
pub const YIELD_T: [f64; 14] = [
    0.0000, 0.0316, 0.0632, 0.0949, 0.1265, 0.1581, 0.1897, 0.2214, 0.2530, 0.2846, 0.3162, 0.3479,
    0.3795, 0.4111,
];

/// The yield of classes among the candidates of the table of 10⁹, by |a| (rows, at
/// [`YIELD_T`]; the row of t = 0 repeats that of |a| = 1) and by bins of v (columns),
/// rounded to 10⁻⁴. Counted by classifying every candidate of the build.
#[rustfmt::skip]
pub const YIELD: [[f64; YIELD_V_BINS]; 14] = [
    [0.4794, 0.4566, 0.4123, 0.3522, 0.2764, 0.1831, 0.0911, 0.0277, 0.0059, 0.0007, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.4794, 0.4566, 0.4123, 0.3522, 0.2764, 0.1831, 0.0911, 0.0277, 0.0059, 0.0007, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.4623, 0.4445, 0.4019, 0.3306, 0.2582, 0.1635, 0.0703, 0.0227, 0.0048, 0.0003, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.4411, 0.4249, 0.3884, 0.3284, 0.2199, 0.1276, 0.0560, 0.0158, 0.0021, 0.0001, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.4013, 0.3910, 0.3604, 0.3088, 0.2327, 0.1252, 0.0361, 0.0054, 0.0011, 0.0002, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.3449, 0.3365, 0.3130, 0.2678, 0.2043, 0.1307, 0.0622, 0.0191, 0.0031, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.2534, 0.2470, 0.2339, 0.2017, 0.1530, 0.1074, 0.0634, 0.0298, 0.0151, 0.0057, 0.0005, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
    [0.1534, 0.1528, 0.1470, 0.1329, 0.1064, 0.0753, 0.0525, 0.0341, 0.0199, 0.0111, 0.0053, 0.0015, 0.0001, 0.0000, 0.0000, 0.0000],
    [0.0782, 0.0778, 0.0741, 0.0709, 0.0593, 0.0461, 0.0363, 0.0271, 0.0188, 0.0125, 0.0076, 0.0041, 0.0018, 0.0004, 0.0000, 0.0000],
    [0.0274, 0.0264, 0.0259, 0.0257, 0.0236, 0.0205, 0.0187, 0.0168, 0.0146, 0.0109, 0.0068, 0.0042, 0.0023, 0.0009, 0.0003, 0.0000],
    [0.0060, 0.0061, 0.0064, 0.0062, 0.0061, 0.0062, 0.0066, 0.0065, 0.0069, 0.0067, 0.0058, 0.0045, 0.0027, 0.0011, 0.0004, 0.0001],
    [0.0006, 0.0009, 0.0009, 0.0009, 0.0010, 0.0010, 0.0011, 0.0012, 0.0016, 0.0014, 0.0017, 0.0017, 0.0016, 0.0011, 0.0004, 0.0001],
    [0.0000, 0.0000, 0.0000, 0.0001, 0.0001, 0.0000, 0.0001, 0.0000, 0.0000, 0.0000, 0.0000, 0.0001, 0.0000, 0.0001, 0.0001, 0.0001],
    [0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000, 0.0000],
];

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
                .map(|s| s.classes as f64)
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

    /// The classes a plan expects against the classes the published tables hold (their
    /// manifests' counts, `manifests/`): within 6 % at 10⁷, 10⁸ and 10⁹ (the yield was
    /// measured at 10⁹; 10⁷ and 10⁸ are heights it was not fitted on).
    #[test]
    fn the_expected_classes_agree_with_the_published_tables() {
        for (x, manifest) in [
            (
                10_000_000i128,
                include_str!("../../manifests/qorbits-h1e7.manifest.json"),
            ),
            (
                100_000_000,
                include_str!("../../manifests/qorbits-h1e8.manifest.json"),
            ),
            (
                1_000_000_000,
                include_str!("../../manifests/qorbits-h1e9.manifest.json"),
            ),
        ] {
            let m: serde_json::Value = serde_json::from_str(manifest).unwrap();
            let counted = m["counts"]["classes"].as_u64().unwrap() as f64;
            let params = Params {
                height: x,
                include_reducible: false,
            };
            let expected = plan(&params, 16, &Silent)
                .unwrap()
                .estimate(None, 2, &MODEL);
            let r = expected.classes / counted;
            assert!((0.94..=1.06).contains(&r), "{x}: {r}");
        }
    }

    /// Segment by segment at 10⁷ (a height the yield was not measured at; 6 % missed, and
    /// 39 % by one yield per |a|, when this was written):
    /// every candidate classified, the classes counted in each segment against the
    /// expected ones. Summed over the segments, the misses stay below 10 % of the classes,
    /// and within a third of what the yield by |a| alone (one value per row) would miss.
    #[test]
    fn the_expected_classes_follow_the_counted_ones_segment_by_segment() {
        use crate::form::Form;
        use crate::table::classify::{classify, Annotation};
        let params = Params {
            height: 10_000_000,
            include_reducible: false,
        };
        let p = plan(&params, 16, &Silent).unwrap();
        let hb = Bounds::for_height(params.height).unwrap();
        let what = Annotation {
            include_reducible: false,
            with_local: false,
        };
        let segments: Vec<&Segment> = p.chunks.iter().flat_map(|c| &c.segments).collect();
        let counted: Vec<u64> = segments
            .par_iter()
            .map(|s| {
                let mut n = 0;
                s.chunk().for_each(&hb, |c| {
                    if let Ok(Some(_)) = classify(&Form::new(c.map(i128::from)), what) {
                        n += 1;
                    }
                });
                n
            })
            .collect();
        let total: u64 = counted.iter().sum();
        // The same rows with one yield per |a|: its classes spread over the candidates.
        let mut by_a = std::collections::BTreeMap::<u64, (u64, u64)>::new();
        for (s, &k) in segments.iter().zip(&counted) {
            let e = by_a.entry(s.a.unsigned_abs()).or_default();
            e.0 += s.candidates;
            e.1 += k;
        }
        let (mut miss, mut miss_by_a) = (0f64, 0f64);
        for (s, &k) in segments.iter().zip(&counted) {
            miss += (s.classes as f64 - k as f64).abs();
            let (n, c) = by_a[&s.a.unsigned_abs()];
            let flat = s.candidates as f64 * c as f64 / n as f64;
            miss_by_a += (flat - k as f64).abs();
        }
        assert_eq!(total, 143_848, "the classes of the published table of 10⁷");
        assert!(miss < 0.10 * total as f64, "{miss} of {total}");
        assert!(miss < miss_by_a / 3.0, "{miss} against {miss_by_a}");
    }
}
