//! 2-Selmer benchmark: time of `two_selmer` for short curves with |A|, |B| ≈ 10, 100, 1000
//! (and the share spent grouping classes over Q), and of `selmer_stats` at Y = 10⁴, 10⁵
//! with the averages obtained, and the cost of grouping a table's classes over Q against
//! the rest of its build, measured in the same run.
//! Run: `cargo bench --bench selmer` (`QORBITS_BENCH_STATS=1e4` stops the averages at 10⁴).

use qorbits::progress::Silent;
use qorbits::selmer::{selmer_stats, two_selmer, Curve};
use qorbits::table::group::group_rows;
use qorbits::table::pipeline::classes_with_invariants;
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::{ClassRow, Params};
use rug::Integer;
use std::time::Instant;

fn main() {
    let max_stats: f64 = std::env::var("QORBITS_BENCH_STATS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(1e5);
    println!(
        "qorbits 2-Selmer ({} threads)",
        rayon::current_num_threads()
    );
    println!(
        "{:>16} {:>6} {:>8} {:>10} {:>10}",
        "curve (A, B)", "rank", "classes", "selmer s", "search s"
    );
    for (a, b) in [
        (10, 10),
        (-10, 11),
        (100, 100),
        (-100, 101),
        (1000, 1000),
        (-1000, 1001),
    ] {
        let e = Curve::short(Integer::from(a), Integer::from(b)).unwrap();
        let t = Instant::now();
        let s = two_selmer(&e).unwrap();
        let total = t.elapsed().as_secs_f64();
        // The search alone (with local data and grouping, which run inside it), to show
        // where the time goes: the rest of `two_selmer` is bookkeeping.
        let (i, j) = e.quartic_invariants();
        let t = Instant::now();
        let rows = classes_with_invariants(&i, &j, false).unwrap();
        let search = t.elapsed().as_secs_f64();
        println!(
            "{:>16} {:>6} {:>8} {total:>10.3} {search:>10.3}",
            format!("({a}, {b})"),
            s.rank,
            rows.classes.len()
        );
    }
    for x in [1_000_000i128, 10_000_000] {
        let t = Instant::now();
        let rows = enumerate_classes(
            &Params {
                height: x,
                include_reducible: false,
            },
            &Silent,
        )
        .unwrap()
        .rows()
        .cloned()
        .collect::<Vec<ClassRow>>();
        let build = t.elapsed().as_secs_f64();
        let t = Instant::now();
        let pairs = group_rows(rows.clone()).unwrap();
        let grouped: usize = pairs
            .iter()
            .map(|p| p.over_q.iter().map(Vec::len).sum::<usize>())
            .sum();
        let classes: usize = pairs.iter().map(|p| p.over_q.len()).sum();
        let group = t.elapsed().as_secs_f64();
        println!(
            "table X = {x:.0e}: {} classes, {grouped} els irreducible, {classes} classes over Q; \
             grouping and labelling {group:.3} s = {:.1}% of the enumeration ({build:.2} s, which includes it)",
            rows.len(),
            100.0 * group / build
        );
    }
    for y in [1e4, 1e5] {
        if y > max_stats {
            continue;
        }
        let t = Instant::now();
        let st = selmer_stats(y as i128, &Silent).unwrap();
        let secs = t.elapsed().as_secs_f64();
        println!(
            "selmer-stats Y = {y:.0e}: {} curves, average #Sel2 = {:.4}, by rank {:?}, {secs:.2} s ({:.1} ms per curve)",
            st.all.curves,
            st.all.average(),
            st.all.by_rank,
            1e3 * secs / st.all.curves as f64
        );
    }
}
