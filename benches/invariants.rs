//! Search-by-invariants benchmark: time per pair at H ≈ 10⁹, 10¹², 10¹⁵ (irreducible and
//! all classes), and the fitted exponent of the time against H.
//! Run: `cargo bench --bench invariants` (`QORBITS_BENCH_MAX=12` stops at 10¹²).

use qorbits::table::pipeline::classes_with_invariants;
use rug::Integer;
use std::time::Instant;

/// CPU seconds of this process so far (all threads; `/proc/self/stat` fields 14 and 15 at
/// 100 ticks per second, Linux's usual `CLK_TCK`): on a shared machine the wall time
/// depends on other users' load, the CPU time much less.
fn cpu_seconds() -> f64 {
    let stat = std::fs::read_to_string("/proc/self/stat").expect("Linux /proc");
    let f: Vec<&str> = stat[stat.rfind(')').expect("(comm)") + 2..]
        .split_whitespace()
        .collect();
    (f[11].parse::<f64>().expect("utime") + f[12].parse::<f64>().expect("stime")) / 100.0
}

fn main() {
    let max: u32 = std::env::var("QORBITS_BENCH_MAX")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(15);
    // Pairs (I, J) with H = max(|I|³, J²/4) just below 10^k: I = 10^{k/3} − 1, J ≡ 0 (mod 27).
    let pairs: [(u32, i64, i64); 3] = [(9, 999, 27), (12, 9999, -54), (15, 99_999, 81)];
    println!(
        "qorbits search by invariants ({} threads)",
        rayon::current_num_threads()
    );
    let mut pts = Vec::new();
    for (k, i, j) in pairs {
        if k > max {
            continue;
        }
        for reducible in [false, true] {
            let (t, cpu) = (Instant::now(), cpu_seconds());
            let rows =
                classes_with_invariants(&Integer::from(i), &Integer::from(j), reducible).unwrap();
            let s = t.elapsed().as_secs_f64();
            let cpu = cpu_seconds() - cpu;
            println!("H ≈ 1e{k:<3} (I, J) = ({i}, {j})  reducible {reducible:<5}  {:>3} classes  {s:>8.3} s wall  {cpu:>7.2} s CPU", rows.classes.len());
            if !reducible {
                pts.push(((i as f64).powi(3).ln(), s.ln()));
            }
        }
    }
    if pts.len() >= 2 {
        let n = pts.len() as f64;
        let (mx, my) = (
            pts.iter().map(|p| p.0).sum::<f64>() / n,
            pts.iter().map(|p| p.1).sum::<f64>() / n,
        );
        let slope = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum::<f64>()
            / pts.iter().map(|p| (p.0 - mx).powi(2)).sum::<f64>();
        println!("fitted exponent of time against H: {slope:.3}");
    }
}
