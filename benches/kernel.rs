//! Kernel benchmark: canonicalisations per second for random table-sized forms (moved by
//! random GL2(Z) matrices), for forms whose covariant lies on the boundary of F, and for
//! the builder's fast test. Run: `cargo bench --bench kernel`.

use qorbits::form::canonical::{canonical, is_canonical};
use qorbits::form::{Form, Gl2};
use rug::Integer;
use std::time::Instant;

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

fn forms(rng: &mut Rng, n: usize, shape: impl Fn(&mut Rng) -> [i64; 5]) -> Vec<Form<Integer>> {
    let mut out = Vec::with_capacity(n);
    while out.len() < n {
        let f = Form::<Integer>::from_i64(shape(rng));
        if f.invariants().unwrap().disc != 0 {
            out.push(f);
        }
    }
    out
}

fn rate(name: &str, items: &[Form<Integer>], f: impl Fn(&Form<Integer>)) {
    let t = Instant::now();
    for x in items {
        f(x);
    }
    let s = t.elapsed().as_secs_f64();
    println!(
        "{name:<46}{:>10.0} /s   ({} forms, {:.2} µs each)",
        items.len() as f64 / s,
        items.len(),
        1e6 * s / items.len() as f64
    );
}

fn main() {
    let mut rng = Rng(1);
    let n = 20_000;
    let table = forms(&mut rng, n, |r| std::array::from_fn(|_| r.range(10)));
    let moved: Vec<Form<Integer>> = table
        .iter()
        .map(|f| {
            let g = loop {
                let (p, q, r, s) = (rng.range(30), rng.range(30), rng.range(30), rng.range(30));
                if (p * s - q * r).abs() == 1 {
                    break Gl2::new(p, q, r, s);
                }
            };
            f.act(&g).unwrap()
        })
        .collect();
    // Boundary of F: b = d = 0 (Re z = 0), palindromic (|z| = 1), and Klein-symmetric.
    let boundary = forms(&mut rng, n, |r| match r.next() % 3 {
        0 => [r.range(10), 0, r.range(10), 0, r.range(10)],
        1 => {
            let (a, b, c) = (r.range(10), r.range(10), r.range(10));
            [a, b, c, b, a]
        }
        _ => {
            let (a, c) = (r.range(10), r.range(10));
            [a, 0, c, 0, a]
        }
    });
    println!("qorbits kernel benchmark (one thread)");
    rate("canonical: random |c| <= 10", &table, |f| {
        canonical(f).unwrap();
    });
    rate(
        "canonical: same forms moved by |gamma| <= 30",
        &moved,
        |f| {
            canonical(f).unwrap();
        },
    );
    rate(
        "canonical: covariant on the boundary of F",
        &boundary,
        |f| {
            canonical(f).unwrap();
        },
    );
    let small: Vec<Form<Integer>> = table.clone();
    rate("is_canonical (builder fast path), random", &small, |f| {
        is_canonical(&Form::<i128>::try_small(f).unwrap()).unwrap();
    });
    rate(
        "is_canonical (builder fast path), boundary",
        &boundary,
        |f| {
            is_canonical(&Form::<i128>::try_small(f).unwrap()).unwrap();
        },
    );
}
