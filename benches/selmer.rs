//! 2-Selmer benchmark, side by side with PARI/GP in the same run: for each height Y,
//! `selmer_stats(Y)` on a rayon pool of one thread, and a gp loop (`nbthreads = 1`) calling
//! `ellrank(ellinit([0,0,0,A,B]))` on every curve of the same family and summing
//! `2^(R + s)`; both times, their ratio, and both exact averages (numerator and
//! denominator), which must agree. Then the share of the local data (factorisation of
//! Disc and solubility at every place, for every class found, timed alone), and
//! `two_selmer` on six single curves.
//! The PARI half is skipped, with a notice, only when `gp` is not installed.
//! Run: `cargo bench --bench selmer` (`QORBITS_BENCH_STATS=1e5,1e6,1e7` sets the heights;
//! default `1e5,1e6`).

use qorbits::arith::primes::factor;
use qorbits::form::local::local_data;
use qorbits::form::Form;
use qorbits::progress::Silent;
use qorbits::selmer::{cheaper_route, selmer_stats, short_family, two_selmer, Curve};
use qorbits::table::pipeline::classes_of_congruent_pairs;
use rug::Integer;
use std::io::Write;
use std::process::{Command, Stdio};
use std::time::Instant;

/// CPU seconds used by this process so far (all threads; `/proc/self/stat` fields 14 and
/// 15, in clock ticks of `getconf CLK_TCK`): on a shared machine the comparison is made on
/// CPU time, which other users' load does not inflate, and gp reports CPU time too.
fn cpu_seconds(ticks: f64) -> f64 {
    let stat = std::fs::read_to_string("/proc/self/stat").expect("Linux /proc");
    let rest = &stat[stat.rfind(')').expect("(comm)") + 2..];
    let f: Vec<&str> = rest.split_whitespace().collect();
    // rest starts at field 3 (state): utime is field 14, stime field 15.
    let t = |k: usize| f[k - 3].parse::<f64>().expect("a tick count");
    (t(14) + t(15)) / ticks
}

/// Runs `f`, returning its value, wall seconds and CPU seconds.
fn timed<T>(ticks: f64, f: impl FnOnce() -> T) -> (T, f64, f64) {
    let (w, c) = (Instant::now(), cpu_seconds(ticks));
    let v = f();
    (v, w.elapsed().as_secs_f64(), cpu_seconds(ticks) - c)
}

/// gp's loop over the family: `(curves, Σ 2^(R+s), CPU seconds, wall seconds)` measured
/// inside gp (`getabstime`, `getwalltime`).
fn pari(family: &[(i64, i64)]) -> Option<(u64, u64, f64, f64)> {
    let mut script = String::from("default(nbthreads, 1);\nF = [");
    for (k, (a, b)) in family.iter().enumerate() {
        script.push_str(if k == 0 { "" } else { ";" });
        script.push_str(&format!("{a},{b}"));
    }
    script.push_str(
        "];\nt = getabstime(); w = getwalltime(); S = 0; \
         for(k = 1, matsize(F)[1], r = ellrank(ellinit([0,0,0,F[k,1],F[k,2]])); S += 2^(r[2]+r[3])); \
         print(matsize(F)[1], \" \", S, \" \", getabstime() - t, \" \", getwalltime() - w);\n",
    );
    let mut child = Command::new("gp")
        .args(["-q", "-f", "-D", "colors=no", "-s", "1000000000"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .ok()?;
    child
        .stdin
        .take()
        .expect("piped")
        .write_all(script.as_bytes())
        .expect("gp reads its script");
    let out = child.wait_with_output().expect("gp runs");
    let text = String::from_utf8(out.stdout).expect("gp prints text");
    let v: Vec<u64> = text
        .split_whitespace()
        .map(|w| w.parse().expect("three integers"))
        .collect();
    Some((v[0], v[1], v[2] as f64 / 1000.0, v[3] as f64 / 1000.0))
}

fn main() {
    let heights: Vec<f64> = std::env::var("QORBITS_BENCH_STATS")
        .unwrap_or_else(|_| "1e5,1e6".into())
        .split(',')
        .map(|v| v.trim().parse().expect("heights like 1e5,1e6"))
        .collect();
    let ticks: f64 = Command::new("getconf")
        .arg("CLK_TCK")
        .output()
        .ok()
        .and_then(|o| String::from_utf8(o.stdout).ok()?.trim().parse().ok())
        .unwrap_or(100.0);
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .expect("a pool of one thread");
    let has_gp = Command::new("gp")
        .args(["-q", "--version"])
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok();
    if !has_gp {
        println!(
            "notice: gp (PARI/GP) is not installed: the PARI half of the comparison is skipped"
        );
    }
    println!("selmer-stats against a PARI/GP ellrank loop, one thread each");
    for y in heights {
        let y = y as i128;
        let family = short_family(y);
        let route = cheaper_route(y, &family);
        let (st, wall, ours) = timed(ticks, || one.install(|| selmer_stats(y, &Silent)).unwrap());
        println!(
            "Y = {y:.0e}: {} curves, Σ #Sel2 = {}, average {:.6}; qorbits {ours:.2} s CPU ({wall:.2} s wall, {route:?} route)",
            st.all.curves,
            st.all.total,
            st.all.average()
        );
        if has_gp {
            let (n, s, theirs, their_wall) = pari(&family).expect("gp runs");
            let same = (n, s) == (st.all.curves, st.all.total);
            println!(
                "          PARI/GP {theirs:.2} s CPU ({their_wall:.2} s wall), {n} curves, Σ = {s}, average {:.6}; \
                 ratio PARI/qorbits {:.2} (CPU), {:.2} (wall); averages {}",
                s as f64 / n as f64,
                theirs / ours,
                their_wall / wall,
                if same { "identical" } else { "DIFFER" }
            );
        }
        // The share of the local data: the calls `table::classify` makes for every class
        // found (factorisation of Disc, then Q_p and R solubility), timed on their own on
        // the same classes, against the whole run above.
        let pairs: Vec<(i64, i64)> = family.iter().map(|&(a, b)| (-48 * a, -1728 * b)).collect();
        let found = one
            .install(|| classes_of_congruent_pairs(&pairs, 27_648 * y, &Silent))
            .unwrap();
        let forms: Vec<(Form<Integer>, _)> = found
            .iter()
            .flat_map(|p| &p.classes)
            .map(|r| (Form::from_i64(r.form), r.signature))
            .collect();
        let (places, _, local) = timed(ticks, || {
            let mut places = 0;
            for (f, s) in &forms {
                let factors = factor(&f.invariants().expect("big integers").disc);
                places += local_data(f, &factors, *s).len();
            }
            places
        });
        println!(
            "          local data of the {} classes ({places} places): {local:.2} s CPU = {:.1} % of qorbits' time",
            forms.len(),
            100.0 * local / ours
        );
    }
    println!(
        "two_selmer on single curves ({} threads)",
        rayon::current_num_threads()
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
        println!(
            "{:>16} rank {} {:>8.3} s",
            format!("({a}, {b})"),
            s.rank,
            t.elapsed().as_secs_f64()
        );
    }
}
