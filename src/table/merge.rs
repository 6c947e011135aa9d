//! The merge of sorted runs into a table, in one streaming pass in bounded memory (DESIGN
//! §7): a k-way merge by the row key `(H4, I, J, a, b, c, d, e)`; the rows of one pair
//! (I, J) are consecutive in that order, so each pair is labelled, grouped over Q and its
//! discriminant factored as soon as it is complete — in parallel over batches of pairs —
//! and written in order. The rows are the same whichever runs they came from, so a sharded
//! build merges to the single-machine bytes by construction.
//!
//! With more runs than [`FAN_IN`], groups of runs are first merged into intermediate runs
//! (the same merge), so the number of files open at once stays bounded.

use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::table::group::make_pair;
use crate::table::row::{ClassRow, Key, Pair, Params};
use crate::table::runs::{RunReader, RunWriter};
use crate::table::writer::TableWriter;
use rayon::prelude::*;
use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::path::{Path, PathBuf};

/// The most runs read at once.
pub const FAN_IN: usize = 256;

/// Rows grouped into pairs before a batch is handed to the workers.
const BATCH_ROWS: usize = 50_000;

/// Batches of grouped pairs waiting for the writer thread at most.
const IN_FLIGHT: usize = 2;

/// A run to merge: its chunk index and its file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Run {
    /// The chunk index in the run's header.
    pub chunk: u32,
    /// The file.
    pub path: PathBuf,
}

/// Merges runs into a stream of rows in key order, calling `row` for each.
fn merge_rows(
    runs: &[Run],
    params: &Params,
    mut row: impl FnMut(ClassRow) -> Result<()>,
) -> Result<()> {
    let mut readers = runs
        .iter()
        .map(|r| RunReader::open(&r.path, r.chunk, params))
        .collect::<Result<Vec<_>>>()?;
    let mut current: Vec<Option<ClassRow>> = Vec::with_capacity(readers.len());
    let mut heap: BinaryHeap<Reverse<(Key, usize)>> = BinaryHeap::new();
    for (k, r) in readers.iter_mut().enumerate() {
        let first = r.next_row()?;
        if let Some(f) = &first {
            heap.push(Reverse((f.key(), k)));
        }
        current.push(first);
    }
    let mut last: Option<Key> = None;
    while let Some(Reverse((key, k))) = heap.pop() {
        if last.is_some_and(|l| l >= key) {
            return Err(Error::Input(format!(
                "the runs {} and another hold the same class: they are not chunks of one build",
                runs[k].path.display()
            )));
        }
        last = Some(key);
        let r = current[k].take().expect("a row for each heap entry");
        let next = readers[k].next_row()?;
        if let Some(n) = &next {
            heap.push(Reverse((n.key(), k)));
        }
        current[k] = next;
        row(r)?;
    }
    Ok(())
}

/// Merges groups of at most [`FAN_IN`] runs into intermediate runs in `work` until at most
/// [`FAN_IN`] remain.
fn reduce_fan_in(mut runs: Vec<Run>, params: &Params, work: &Path) -> Result<Vec<Run>> {
    let mut level = 0u32;
    while runs.len() > FAN_IN {
        level += 1;
        let groups: Vec<Vec<Run>> = runs.chunks(FAN_IN).map(<[Run]>::to_vec).collect();
        runs = groups
            .into_par_iter()
            .enumerate()
            .map(|(g, group)| {
                let chunk = u32::MAX - (level << 20) - g as u32;
                let path = work.join(format!("level{level}-{g:06}.run"));
                let mut w = RunWriter::create(&path, chunk, params)?;
                merge_rows(&group, params, |r| w.push(&r))?;
                w.finish()?;
                for r in &group {
                    if r.chunk >= u32::MAX - (1 << 30) {
                        let _ = std::fs::remove_file(&r.path);
                    }
                }
                Ok(Run { chunk, path })
            })
            .collect::<Result<Vec<_>>>()?;
    }
    Ok(runs)
}

/// Groups a batch of complete pairs' rows (each inner vector one pair, in order) into
/// pairs, in parallel on the current rayon pool.
fn group_batch(batch: Vec<Vec<ClassRow>>) -> Result<Vec<Pair>> {
    batch
        .into_par_iter()
        .map(|rows| {
            let (i, j) = (rows[0].i, rows[0].j);
            make_pair(i, j, rows)
        })
        .collect()
}

/// Merges `runs` (the chunks of one build with `params`) into `writer`, on the current
/// rayon pool; `work` holds intermediate runs when there are many. `progress` advances by
/// the rows merged.
///
/// The writer runs on a thread of its own, fed batches of grouped pairs through a channel
/// of [`IN_FLIGHT`] batches, so that SQLite's inserts overlap the reading of the runs and
/// the grouping of the next batch. Batches reach it in order, so the bytes do not depend
/// on the threads.
pub fn merge_into(
    runs: Vec<Run>,
    params: &Params,
    work: &Path,
    writer: &mut TableWriter,
    progress: &dyn Progress,
) -> Result<u64> {
    let runs = reduce_fan_in(runs, params, work)?;
    std::thread::scope(|scope| {
        let (send, receive) = std::sync::mpsc::sync_channel::<Vec<Pair>>(IN_FLIGHT);
        let writing = scope.spawn(move || -> Result<()> {
            for pairs in receive {
                writer.push_all(&pairs)?;
            }
            Ok(())
        });
        // A failed writer drops its receiver: the next send fails, the merge stops, and
        // the writer's own error, not this one, is the one reported.
        let flush = |batch: &mut Vec<Vec<ClassRow>>| -> Result<()> {
            let pairs = group_batch(std::mem::take(batch))?;
            send.send(pairs)
                .map_err(|_| Error::Io("the table writer stopped".into()))
        };
        let mut batch: Vec<Vec<ClassRow>> = Vec::new();
        let mut in_batch = 0usize;
        let mut pair: Vec<ClassRow> = Vec::new();
        let mut rows = 0u64;
        let merged = merge_rows(&runs, params, |r| {
            rows += 1;
            if rows % 4096 == 0 {
                progress.advance(4096);
            }
            if pair.first().is_some_and(|p| (p.i, p.j) != (r.i, r.j)) {
                in_batch += pair.len();
                batch.push(std::mem::take(&mut pair));
                if in_batch >= BATCH_ROWS {
                    flush(&mut batch)?;
                    in_batch = 0;
                }
            }
            pair.push(r);
            Ok(())
        })
        .and_then(|()| {
            if !pair.is_empty() {
                batch.push(std::mem::take(&mut pair));
            }
            flush(&mut batch)
        });
        drop(send);
        let written = writing.join().expect("the table writer does not panic");
        written.and(merged).map(|()| rows)
    })
}
