//! Build benchmark, measured by running the `qorbits` binary the way a user does:
//!
//! * per height: wall time, classes per second, candidates per class, peak RSS, bytes per
//!   class, the ratio of the whole build to a plain SQLite insert of the same rows (read
//!   back from the table, inserted into one table without indexes, in the same run), the
//!   plan's predictions of time and size against what was measured, and the fitted
//!   exponent of build time against X;
//! * shard balance: every shard of an n-shard build run one after another on one thread,
//!   in rounds (each shard's time its fastest round), the slowest shard's time over the
//!   mean, for n = 4, 16, 64;
//! * the merge of the 16 shards against a plain insert of the same rows (interleaved, in
//!   as many rounds, each its fastest).
//!
//! Run: `cargo bench --bench build` (heights 1e6, 1e7, 1e8; `QORBITS_BENCH_HEIGHTS=1e6,1e9`
//! for others; `QORBITS_BENCH_SHARDS=1e7` for the shard height, `none` to skip;
//! `QORBITS_BENCH_SHARD_COUNTS=16` for other shard counts, the merge measured when 16 is
//! among them; `QORBITS_BENCH_SHARD_ROUNDS=1` for one round instead of two).

use rusqlite::Connection;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/release/qorbits")
}

fn parse(s: &str) -> i128 {
    match s.split_once('e') {
        Some((m, e)) => m.parse::<i128>().unwrap() * 10i128.pow(e.parse().unwrap()),
        None => s.parse().unwrap(),
    }
}

/// Runs the binary; returns (wall seconds, peak RSS of the child in MB).
fn run(args: &[&str], dir: &Path) -> (f64, f64) {
    let before = children_max_rss();
    let t = Instant::now();
    let o = Command::new(bin())
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the release binary (cargo build --release)");
    let secs = t.elapsed().as_secs_f64();
    assert!(
        o.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    let after = children_max_rss();
    (secs, after.max(before) / 1024.0)
}

/// The largest peak RSS (KB) of the children waited for so far.
fn children_max_rss() -> f64 {
    let mut u: libc::rusage = unsafe { std::mem::zeroed() };
    // SAFETY: a valid out-pointer.
    unsafe { libc::getrusage(libc::RUSAGE_CHILDREN, &mut u) };
    u.ru_maxrss as f64
}

/// Plain insert of the rows of every data table of a table file (classes, local, pairs,
/// pair_primes) into a fresh file: one transaction, tables without keys or indexes, no
/// checks. Returns the seconds and the rows of `classes`.
fn plain_insert(table: &Path, dir: &Path) -> (f64, u64) {
    let src = Connection::open(table).unwrap();
    let mut all = Vec::new();
    for name in ["classes", "local", "pairs", "pair_primes"] {
        let mut st = src.prepare(&format!("SELECT * FROM {name}")).unwrap();
        let n = st.column_count();
        let rows: Vec<Vec<rusqlite::types::Value>> = st
            .query_map([], |r| (0..n).map(|k| r.get(k)).collect())
            .unwrap()
            .map(Result::unwrap)
            .collect();
        all.push((name, n, rows));
    }
    let path = dir.join("plain.sqlite");
    let _ = std::fs::remove_file(&path);
    let t = Instant::now();
    let mut c = Connection::open(&path).unwrap();
    let tx = c.transaction().unwrap();
    for (name, n, rows) in &all {
        let cols: Vec<String> = (0..*n).map(|k| format!("c{k}")).collect();
        tx.execute_batch(&format!("CREATE TABLE {name} ({});", cols.join(", ")))
            .unwrap();
        let q: Vec<String> = (1..=*n).map(|k| format!("?{k}")).collect();
        let mut ins = tx
            .prepare(&format!("INSERT INTO {name} VALUES ({})", q.join(",")))
            .unwrap();
        for r in rows {
            ins.execute(rusqlite::params_from_iter(r.iter())).unwrap();
        }
    }
    tx.commit().unwrap();
    drop(c);
    let s = t.elapsed().as_secs_f64();
    let _ = std::fs::remove_file(&path);
    (s, all[0].2.len() as u64)
}

fn plan_prediction(x: i128, dir: &Path) -> (f64, f64) {
    let o = Command::new(bin())
        .args(["plan", "--height", &x.to_string(), "--quiet", "--jobs", "2"])
        .current_dir(dir)
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&o.stdout).into_owned();
    let unit = |key: &str| -> f64 {
        let line = text.lines().find(|l| l.starts_with(key)).unwrap_or("");
        let w: Vec<&str> = line.split_whitespace().collect();
        let v: f64 = w.get(2).and_then(|v| v.parse().ok()).unwrap_or(f64::NAN);
        match w.get(3).copied() {
            Some("s") => v,
            Some("min") => 60.0 * v,
            Some("h") => 3600.0 * v,
            Some("GB") => v * 1e9,
            Some("MB") => v * 1e6,
            _ => v,
        }
    };
    (unit("time"), unit("table"))
}

fn main() {
    let heights: Vec<i128> = std::env::var("QORBITS_BENCH_HEIGHTS")
        .unwrap_or_else(|_| "1e6,1e7,1e8".into())
        .split(',')
        .map(parse)
        .collect();
    let dir = std::env::temp_dir().join(format!("qorbits-bench-build-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    println!(
        "qorbits build benchmark (2 threads)\n{:>8} {:>10} {:>8} {:>11} {:>10} {:>8} {:>9} {:>8} {:>8} {:>9} {:>9}",
        "X", "classes", "wall s", "classes/s", "cand/class", "RSS MB", "B/class", "plain s", "ratio", "plan s", "plan size"
    );
    let mut pts = Vec::new();
    for x in heights {
        let xs = x.to_string();
        let out = dir.join(format!("t{x}.sqlite"));
        let _ = std::fs::remove_file(&out);
        let _ = std::fs::remove_file(dir.join(format!("t{x}.manifest.json")));
        let (secs, rss) = run(
            &[
                "build",
                "--height",
                &xs,
                "--out",
                out.to_str().unwrap(),
                "--quiet",
                "--jobs",
                "2",
            ],
            &dir,
        );
        let bytes = std::fs::metadata(&out).unwrap().len() as f64;
        let conn = Connection::open(&out).unwrap();
        let classes: f64 = conn
            .query_row("SELECT count(*) FROM classes", [], |r| r.get::<_, i64>(0))
            .unwrap() as f64;
        drop(conn);
        let (t_plain, _) = plain_insert(&out, &dir);
        let (plan_s, plan_b) = plan_prediction(x, &dir);
        let candidates = candidates_of(x, &dir);
        println!(
            "{:>8} {:>10} {:>8.2} {:>11.0} {:>10.2} {:>8.0} {:>9.0} {:>8.2} {:>8.1} {:>9.2} {:>9.2}",
            format!("{:.0e}", x as f64),
            classes,
            secs,
            classes / secs,
            candidates / classes,
            rss,
            bytes / classes,
            t_plain,
            secs / t_plain,
            plan_s / secs,
            plan_b / bytes
        );
        pts.push(((x as f64).ln(), secs.ln()));
        let _ = std::fs::remove_file(&out);
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
    println!("(plan s, plan size: the plan's prediction over what was measured)");
    let shard_height = std::env::var("QORBITS_BENCH_SHARDS").unwrap_or_else(|_| "1e8".into());
    if shard_height != "none" {
        shards(parse(&shard_height), &dir);
    }
    let _ = std::fs::remove_dir_all(&dir);
}

/// The candidates of a build, from `plan`.
fn candidates_of(x: i128, dir: &Path) -> f64 {
    let o = Command::new(bin())
        .args(["plan", "--height", &x.to_string(), "--quiet"])
        .current_dir(dir)
        .output()
        .unwrap();
    String::from_utf8_lossy(&o.stdout)
        .lines()
        .find(|l| l.starts_with("candidates"))
        .and_then(|l| {
            l.split_whitespace()
                .nth(1)
                .map(|v| v.parse().unwrap_or(f64::NAN))
        })
        .unwrap_or(f64::NAN)
}

fn shards(x: i128, dir: &Path) {
    let xs = x.to_string();
    let rounds: usize = std::env::var("QORBITS_BENCH_SHARD_ROUNDS")
        .map(|s| s.trim().parse().expect("shard rounds"))
        .unwrap_or(2)
        .max(1);
    println!(
        "\nshard balance at X = {:.0e}: every shard on one thread, one after another, in \
         {rounds} rounds; a shard's time is its fastest round (the rounds take out the \
         machine's drift, not the plan's error)",
        x as f64
    );
    println!(
        "{:>6} {:>10} {:>10} {:>10} {:>9}",
        "shards", "mean s", "slowest s", "fastest s", "balance"
    );
    let counts: Vec<usize> = std::env::var("QORBITS_BENCH_SHARD_COUNTS")
        .map(|s| {
            s.split(',')
                .map(|n| n.trim().parse().expect("shard counts"))
                .collect()
        })
        .unwrap_or_else(|_| vec![4, 16, 64]);
    for n in counts {
        let base = dir.join(format!("shards{n}"));
        let mut times = vec![f64::INFINITY; n];
        for round in 0..rounds {
            for k in 1..=n {
                let d = base.join(format!("s{k:03}"));
                if round > 0 {
                    // A shard that verifies is not recomputed: start from nothing again.
                    let _ = std::fs::remove_dir_all(&d);
                }
                let (s, _) = run(
                    &[
                        "build",
                        "--height",
                        &xs,
                        "--shard",
                        &format!("{k}/{n}"),
                        "--out",
                        d.to_str().unwrap(),
                        "--quiet",
                        "--jobs",
                        "1",
                    ],
                    dir,
                );
                times[k - 1] = times[k - 1].min(s);
            }
        }
        let mean = times.iter().sum::<f64>() / n as f64;
        let max = times.iter().cloned().fold(0.0, f64::max);
        let min = times.iter().cloned().fold(f64::INFINITY, f64::min);
        println!(
            "{n:>6} {mean:>10.2} {max:>10.2} {min:>10.2} {:>9.3}",
            max / mean
        );
        if n == 16 {
            let out = dir.join("merged.sqlite");
            let mut args: Vec<String> = vec!["merge".into()];
            for k in 1..=n {
                args.push(base.join(format!("s{k:03}")).display().to_string());
            }
            args.extend([
                "--out".into(),
                out.display().to_string(),
                "--quiet".into(),
                "--jobs".into(),
                "2".into(),
            ]);
            let a: Vec<&str> = args.iter().map(String::as_str).collect();
            // Merge and plain insert interleaved, in as many rounds, each its fastest.
            let (mut t_merge, mut t_plain, mut rows) = (f64::INFINITY, f64::INFINITY, 0);
            for _ in 0..rounds {
                let _ = std::fs::remove_file(&out);
                let _ = std::fs::remove_file(dir.join("merged.manifest.json"));
                t_merge = t_merge.min(run(&a, dir).0);
                let (t, r) = plain_insert(&out, dir);
                (t_plain, rows) = (t_plain.min(t), r);
            }
            println!(
                "merge of the 16 shards: {rows} rows in {t_merge:.2} s ({:.0} rows/s); plain insert {t_plain:.2} s ({:.0} rows/s); ratio {:.2}",
                rows as f64 / t_merge,
                rows as f64 / t_plain,
                t_merge / t_plain
            );
        }
        let _ = std::fs::remove_dir_all(&base);
    }
}
