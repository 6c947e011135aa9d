//! Build benchmark: at each height, classes per second, candidates examined per class,
//! the ratio of the whole build to a plain SQLite insert of the same rows (measured in the
//! same run), and the fitted exponent of build time against X.
//!
//! Run: `cargo bench --bench build` (heights 1e6, 1e7, 1e8; override with
//! `QORBITS_BENCH_HEIGHTS=1e5,1e6`).

use qorbits::progress::Silent;
use qorbits::table::pipeline::{enumerate_classes, enumerate_classes_with};
use qorbits::table::row::{ClassRow, Params};
use qorbits::table::writer::write_table;
use rusqlite::{params, Connection};
use std::time::Instant;

fn plain_insert<'a>(rows: impl Iterator<Item = &'a ClassRow>, path: &std::path::Path) -> f64 {
    let _ = std::fs::remove_file(path);
    let t = Instant::now();
    let mut conn = Connection::open(path).unwrap();
    conn.execute_batch(
        "CREATE TABLE t (id INTEGER PRIMARY KEY, label TEXT, a INTEGER, b INTEGER, c INTEGER, \
         d INTEGER, e INTEGER, I INTEGER, J INTEGER, disc INTEGER, h4 INTEGER, real_roots INTEGER, \
         signature TEXT, factorisation TEXT, irreducible INTEGER, galois TEXT, stabiliser INTEGER);",
    )
    .unwrap();
    let tx = conn.transaction().unwrap();
    {
        let mut st = tx
            .prepare(
                "INSERT INTO t VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12,?13,?14,?15,?16,?17)",
            )
            .unwrap();
        for (n, r) in rows.enumerate() {
            st.execute(params![
                n as i64 + 1,
                r.label,
                r.form[0],
                r.form[1],
                r.form[2],
                r.form[3],
                r.form[4],
                r.i,
                r.j,
                r.disc,
                r.h4,
                r.signature.real_roots(),
                r.signature.name(),
                r.pattern.name(),
                r.galois.is_some(),
                r.galois.map(|g| g.name()),
                r.stabiliser
            ])
            .unwrap();
        }
    }
    tx.commit().unwrap();
    drop(conn);
    let s = t.elapsed().as_secs_f64();
    let _ = std::fs::remove_file(path);
    s
}

fn parse(s: &str) -> i128 {
    match s.split_once('e') {
        Some((m, e)) => m.parse::<i128>().unwrap() * 10i128.pow(e.parse().unwrap()),
        None => s.parse().unwrap(),
    }
}

fn main() {
    let heights: Vec<i128> = std::env::var("QORBITS_BENCH_HEIGHTS")
        .unwrap_or_else(|_| "1e6,1e7,1e8".into())
        .split(',')
        .map(parse)
        .collect();
    let dir = std::env::temp_dir().join(format!("qorbits-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    println!(
        "qorbits build benchmark ({} threads)\n{:>10} {:>10} {:>12} {:>10} {:>9} {:>9} {:>9} {:>9}",
        rayon::current_num_threads(),
        "X",
        "classes",
        "classes/s",
        "cand/class",
        "enum s",
        "write s",
        "plain s",
        "ratio"
    );
    let mut pts = Vec::new();
    let mut local_figures = Vec::new();
    for x in heights {
        let params = Params {
            height: x,
            include_reducible: false,
        };
        let t = Instant::now();
        let out = enumerate_classes(&params, &Silent).unwrap();
        let t_enum = t.elapsed().as_secs_f64();
        let path = dir.join(format!("h{x}.sqlite"));
        let t = Instant::now();
        write_table(&path, &out, true).unwrap();
        let t_write = t.elapsed().as_secs_f64();
        let t_plain = plain_insert(out.rows(), &dir.join("plain.sqlite"));
        // The same build without local data, in the same run.
        let t = Instant::now();
        let bare = enumerate_classes_with(&params, &Silent, false).unwrap();
        write_table(&path, &bare, true).unwrap();
        let t_bare = t.elapsed().as_secs_f64();
        let total = t_enum + t_write;
        local_figures.push((
            x,
            total,
            t_bare,
            out.classes(),
            out.rows().map(|r| r.local.len()).sum::<usize>(),
        ));
        println!(
            "{x:>10} {:>10} {:>12.0} {:>10.2} {t_enum:>9.2} {t_write:>9.2} {t_plain:>9.2} {:>9.2}",
            out.classes(),
            out.classes() as f64 / total,
            out.candidates as f64 / out.classes() as f64,
            total / t_plain
        );
        pts.push(((x as f64).ln(), total.ln()));
        let _ = std::fs::remove_file(&path);
    }
    if pts.len() >= 2 {
        let n = pts.len() as f64;
        let (mx, my) = (
            pts.iter().map(|p| p.0).sum::<f64>() / n,
            pts.iter().map(|p| p.1).sum::<f64>() / n,
        );
        let slope = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum::<f64>()
            / pts.iter().map(|p| (p.0 - mx).powi(2)).sum::<f64>();
        println!("fitted exponent of build time against X: {slope:.3}");
    }
    let threads = rayon::current_num_threads() as f64;
    for (x, total, bare, classes, places) in local_figures {
        println!(
            "X = {x}: build {total:.2} s with local data, {bare:.2} s without: ratio {:.2}; \
             local data {:.1} µs of CPU per class ({:.2} places per class)",
            total / bare,
            1e6 * (total - bare) * threads / classes as f64,
            places as f64 / classes as f64
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}
