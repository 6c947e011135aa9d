//! Local-data benchmark: µs per class for the local data (patterns mod p, Q_p and real
//! solubility at every p | 2·Disc) on the general path (`rug::Integer`, `FpBig` above 2³²)
//! and on the machine path (`i128`, fixed arrays), on the same forms in the same run; and µs
//! per discriminant for its factorisation (big-integer trial division and rho against the
//! `u64` path). The two paths must agree on every form (checked here too).
//!
//! Samples: the canonical forms of the table below a moderate height (default 10⁶), and
//! canonical forms of random forms with H ≈ 10¹⁰ and H ≈ 10¹⁸ (where Disc has primes
//! above 2³²). Single-threaded; each figure is the best of three passes.
//!
//! Run: `cargo bench --bench local` (`QORBITS_BENCH_TABLE=1e5` for a smaller table,
//! `QORBITS_BENCH_FORMS=500` for fewer random forms per height).

use qorbits::arith::factor64::factor_u64;
use qorbits::arith::primes::try_factor_big;
use qorbits::form::canonical::canonical;
use qorbits::form::local::{local_data, local_data_machine};
use qorbits::form::{Form, Signature};
use qorbits::progress::Silent;
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::Params;
use rug::Integer;
use std::hint::black_box;
use std::time::Instant;

/// splitmix64 (common practice, no source needed).
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn range(&mut self, m: i64) -> i64 {
        (self.next() % (2 * m as u64 + 1)) as i64 - m
    }
}

/// One class: the form on both integer types, Disc and the signature.
struct Class {
    small: Form<i128>,
    big: Form<Integer>,
    disc: Integer,
    s: Signature,
}

fn class(big: Form<Integer>) -> Class {
    let inv = big.invariants().unwrap();
    Class {
        small: Form::try_small(&big).unwrap(),
        s: big.signature(&inv).unwrap(),
        disc: inv.disc,
        big,
    }
}

/// Canonical forms of random forms with `lo ≤ H < hi` (coefficients up to `m`).
fn random_classes(rng: &mut Rng, n: usize, m: i64, lo: f64, hi: f64) -> Vec<Class> {
    let mut out = Vec::new();
    while out.len() < n {
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(m)));
        let inv = f.invariants().unwrap();
        let h = inv.h4.to_f64() / 4.0;
        if inv.disc == 0 || !(lo..hi).contains(&h) || inv.disc.to_i64().is_none() {
            continue;
        }
        out.push(class(canonical(&f).unwrap().form));
    }
    out
}

/// Best of three passes of `run` over the sample, in µs per item.
fn time(n: usize, mut run: impl FnMut() -> usize) -> f64 {
    (0..3)
        .map(|_| {
            let t = Instant::now();
            black_box(run());
            t.elapsed().as_secs_f64() * 1e6 / n as f64
        })
        .fold(f64::INFINITY, f64::min)
}

fn report(name: &str, sample: &[Class]) {
    let n = sample.len();
    let f_big = time(n, || {
        sample
            .iter()
            .map(|c| try_factor_big(&c.disc, u64::MAX).unwrap().len())
            .sum()
    });
    let f_u64 = time(n, || {
        sample
            .iter()
            .map(|c| factor_u64(c.disc.to_i64().unwrap().unsigned_abs()).len())
            .sum()
    });
    let big_factors: Vec<Vec<(Integer, u32)>> = sample
        .iter()
        .map(|c| try_factor_big(&c.disc, u64::MAX).unwrap())
        .collect();
    let small_factors: Vec<Vec<(u64, u32)>> = sample
        .iter()
        .map(|c| factor_u64(c.disc.to_i64().unwrap().unsigned_abs()).to_vec())
        .collect();
    let mut wide = 0;
    for ((c, b), s) in sample.iter().zip(&big_factors).zip(&small_factors) {
        let general: Vec<_> = local_data(&c.big, b, c.s)
            .into_iter()
            .map(|l| l.map_prime(|p| p.to_i64().unwrap()))
            .collect();
        assert_eq!(general, local_data_machine(&c.small, s, c.s), "{}", c.big);
        wide += s.iter().any(|&(p, _)| p >= 1 << 32) as usize;
    }
    let l_big = time(n, || {
        sample
            .iter()
            .zip(&big_factors)
            .map(|(c, f)| local_data(&c.big, f, c.s).len())
            .sum()
    });
    let l_small = time(n, || {
        sample
            .iter()
            .zip(&small_factors)
            .map(|(c, f)| local_data_machine(&c.small, f, c.s).len())
            .sum()
    });
    println!(
        "{name:<22} {n:>6} {wide:>6} {f_big:>10.2} {f_u64:>10.2} {l_big:>10.2} {l_small:>10.2} {:>10.2} {:>10.2} {:>7.1}",
        f_big + l_big,
        f_u64 + l_small,
        (f_big + l_big) / (f_u64 + l_small)
    );
}

fn parse(s: &str) -> i128 {
    match s.split_once('e') {
        Some((m, e)) => m.parse::<i128>().unwrap() * 10i128.pow(e.parse().unwrap()),
        None => s.parse().unwrap(),
    }
}

fn main() {
    let height = parse(&std::env::var("QORBITS_BENCH_TABLE").unwrap_or_else(|_| "1e6".into()));
    let forms: usize = std::env::var("QORBITS_BENCH_FORMS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(2000);
    let params = Params {
        height,
        include_reducible: false,
    };
    let table: Vec<Class> = enumerate_classes(&params, &Silent)
        .unwrap()
        .rows()
        .map(|r| class(Form::from_i64(r.form)))
        .collect();
    let mut rng = Rng(2024);
    let h10 = random_classes(&mut rng, forms, 15, 5e9, 2e10);
    let h18 = random_classes(&mut rng, forms, 300, 5e17, 2e18);
    println!("qorbits local-data benchmark (1 thread; µs, best of 3)");
    println!(
        "{:<22} {:>6} {:>6} {:>10} {:>10} {:>10} {:>10} {:>10} {:>10} {:>7}",
        "sample",
        "forms",
        ">2^32",
        "fac rug",
        "fac u64",
        "local rug",
        "local mach",
        "both rug",
        "both mach",
        "ratio"
    );
    report(&format!("table H < {height}"), &table);
    report("random H ≈ 1e10", &h10);
    report("random H ≈ 1e18", &h18);
}
