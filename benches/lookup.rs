//! Batch lookup benchmark: forms per second on one thread through the whole of
//! `qorbits reduce --batch --db` (parse a line, reduce, find the class in the table, render
//! the JSON line), for members of the classes of the published H < 10⁵ tier: the canonical
//! forms themselves and the same forms moved by random matrices of GL2(Z) with entries up
//! to 3 and up to 30; and, in the same run, the general `canonical` against the f64 fast
//! path on the moved forms. Run: `cargo bench --bench lookup`.

use qorbits::form::canonical::{canonical, canonical_f64};
use qorbits::form::{Form, Gl2};
use qorbits::table::lookup::Lookup;
use rug::Integer;
use std::io::Read;
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

fn moved(rng: &mut Rng, f: &Form<Integer>, m: i64) -> Form<Integer> {
    let g = loop {
        let (p, q, r, s) = (rng.range(m), rng.range(m), rng.range(m), rng.range(m));
        if (p * s - q * r).abs() == 1 {
            break Gl2::new(p, q, r, s);
        }
    };
    f.act(&g).unwrap()
}

fn text(f: &Form<Integer>) -> String {
    f.c.iter()
        .map(|c| c.to_string())
        .collect::<Vec<_>>()
        .join(" ")
}

fn per_second(name: &str, n: usize, seconds: f64) -> f64 {
    let r = n as f64 / seconds;
    println!(
        "{name:<58}{r:>10.0} /s   ({n} forms, {:.2} µs each)",
        1e6 * seconds / n as f64
    );
    r
}

fn main() {
    let dir = std::env::temp_dir().join(format!("qorbits-bench-lookup-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let db = dir.join("qorbits-h1e5.sqlite");
    let gz = std::fs::File::open(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/releases/qorbits-h1e5.sqlite.gz"
    ))
    .expect("releases/qorbits-h1e5.sqlite.gz");
    let mut bytes = Vec::new();
    flate2::read::GzDecoder::new(gz)
        .read_to_end(&mut bytes)
        .unwrap();
    std::fs::write(&db, bytes).unwrap();
    let conn = rusqlite::Connection::open(&db).unwrap();
    let forms: Vec<Form<Integer>> = conn
        .prepare("SELECT a, b, c, d, e FROM classes ORDER BY id")
        .unwrap()
        .query_map([], |r| {
            Ok(Form::<Integer>::from_i64([
                r.get(0)?,
                r.get(1)?,
                r.get(2)?,
                r.get(3)?,
                r.get(4)?,
            ]))
        })
        .unwrap()
        .collect::<Result<_, _>>()
        .unwrap();
    let lookup = Lookup::open(&db).unwrap();
    let mut rng = Rng(7);
    let rounds = 20;
    println!(
        "qorbits batch lookup benchmark (one thread, {} classes of H < 10^5, {rounds} rounds)",
        forms.len()
    );
    for (name, m) in [
        ("reduce --batch --db: canonical forms", 0),
        ("reduce --batch --db: moved by |gamma| <= 3", 3),
        ("reduce --batch --db: moved by |gamma| <= 30", 30),
    ] {
        let lines: Vec<String> = (0..rounds)
            .flat_map(|_| forms.iter())
            .map(|f| {
                if m == 0 {
                    text(f)
                } else {
                    text(&moved(&mut rng, f, m))
                }
            })
            .collect();
        let t = Instant::now();
        let mut bytes = 0usize;
        let mut found = 0usize;
        for (k, l) in lines.iter().enumerate() {
            let r = lookup.identify(k as u64 + 1, l);
            let mut out = String::new();
            r.write_json_line(&mut out);
            found += usize::from(out.contains("\"covered\":true"));
            bytes += out.len();
        }
        per_second(name, lines.len(), t.elapsed().as_secs_f64());
        assert_eq!(found, lines.len(), "every class is in the table");
        assert!(bytes > 0);
    }
    let sample: Vec<Form<Integer>> = forms.iter().map(|f| moved(&mut rng, f, 30)).collect();
    let t = Instant::now();
    for f in &sample {
        canonical(f).unwrap();
    }
    let general = per_second(
        "canonical (general entry point), moved by <= 30",
        sample.len(),
        t.elapsed().as_secs_f64(),
    );
    let small: Vec<Form<i128>> = sample.iter().map(|f| Form::try_small(f).unwrap()).collect();
    let t = Instant::now();
    let mut fallbacks = 0;
    for f in &small {
        fallbacks += usize::from(canonical_f64(f).is_err());
    }
    let fast = per_second(
        "canonical_f64 (fast path), same forms",
        small.len(),
        t.elapsed().as_secs_f64(),
    );
    println!(
        "fast path / general: {:.2}; fast path declined {fallbacks} forms",
        fast / general
    );
    std::fs::remove_dir_all(&dir).unwrap();
}
