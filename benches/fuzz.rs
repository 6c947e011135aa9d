//! Long fuzz run of every parser of user input, outside the test suite: random and mutated
//! inputs (the mutator of `tests/common/mutate.rs`) fed to the height and integer parsers,
//! to forms as `qorbits reduce` reads them (five integers, then the kernel: invariants and,
//! for forms below 2⁴⁰, the canonical form), to curves (`Curve::new` on parsed coefficients,
//! then its invariants and 2-torsion), to manifests (`read_manifest` on mutated copies of
//! `manifests/qorbits-h1e4.manifest.json`), and a smaller number of argument lists to the
//! binary itself (`qorbits reduce -- …`). Each input runs under `catch_unwind`; the run
//! prints the number of inputs, panics and errors that span more than one line.
//!
//! Run: `QORBITS_FUZZ_INPUTS=1000000 cargo bench --bench fuzz` (inputs to the library
//! parsers, default 10⁶; `QORBITS_FUZZ_CLI` runs of the binary, default 500;
//! `QORBITS_FUZZ_SEED` the seed).

#[path = "../tests/common/mutate.rs"]
#[allow(dead_code)]
mod mutate;

use mutate::{Mutator, CURVE_SEEDS, FORM_SEEDS, HEIGHT_SEEDS, INTEGER_SEEDS};
use qorbits::arith::parse::{parse_height, parse_integer};
use qorbits::form::canonical::canonical;
use qorbits::form::Form;
use qorbits::selmer::Curve;
use qorbits::table::manifest::read_manifest;
use rug::Integer;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::Mutex;

/// Valid forms (Disc ≠ 0) on which `canonical` returned an error: not a parser refusal but
/// a kernel failure, counted apart.
static KERNEL_FAILURES: AtomicU64 = AtomicU64::new(0);
static KERNEL_EXAMPLES: Mutex<Vec<String>> = Mutex::new(Vec::new());
use std::path::{Path, PathBuf};
use std::time::Instant;

fn env_number(name: &str, default: u64) -> u64 {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

#[derive(Default)]
struct Tally {
    inputs: u64,
    accepted: u64,
    panics: u64,
    multi_line: u64,
    examples: Vec<String>,
}

impl Tally {
    /// Run one input: `Ok(true)` accepted, `Ok(false)` refused with a one-line message,
    /// `Err(message)` refused with a message spanning lines.
    fn run(&mut self, input: &str, f: impl FnOnce() -> Result<bool, String>) {
        self.inputs += 1;
        match catch_unwind(AssertUnwindSafe(f)) {
            Ok(Ok(true)) => self.accepted += 1,
            Ok(Ok(false)) => {}
            Ok(Err(m)) => {
                self.multi_line += 1;
                if self.examples.len() < 5 {
                    self.examples
                        .push(format!("multi-line error on {input:?}: {m:?}"));
                }
            }
            Err(_) => {
                self.panics += 1;
                if self.examples.len() < 5 {
                    self.examples.push(format!("panic on {input:?}"));
                }
            }
        }
    }
}

/// `Ok(false)` for a one-line error, `Err` for a message spanning lines.
fn refused(e: impl std::fmt::Display) -> Result<bool, String> {
    let m = e.to_string();
    if m.contains('\n') || m.contains('\r') || m.is_empty() {
        Err(m)
    } else {
        Ok(false)
    }
}

fn form_input(text: &str) -> Result<bool, String> {
    let tokens: Vec<&str> = text.split_whitespace().collect();
    if tokens.len() != 5 {
        return Ok(false);
    }
    let mut c = Vec::new();
    for t in tokens {
        match parse_integer("coefficient", t) {
            Ok(v) => c.push(v),
            Err(e) => return refused(e),
        }
    }
    let f = Form::new(<[Integer; 5]>::try_from(c).unwrap());
    let inv = f.invariants().unwrap();
    if inv.disc == 0 || f.c.iter().any(|v| v.significant_bits() > 40) {
        return Ok(true);
    }
    match canonical(&f) {
        Ok(c) => {
            assert_eq!(f.act(&c.gamma).unwrap(), c.form);
            Ok(true)
        }
        Err(e) => {
            KERNEL_FAILURES.fetch_add(1, Ordering::Relaxed);
            let mut ex = KERNEL_EXAMPLES.lock().unwrap();
            if ex.len() < 5 {
                ex.push(format!("{f}: {e}"));
            }
            refused(e)
        }
    }
}

fn curve_input(text: &str) -> Result<bool, String> {
    let mut c = Vec::new();
    for t in text.split_whitespace() {
        match parse_integer("a-invariant", t) {
            Ok(v) => c.push(v),
            Err(e) => return refused(e),
        }
    }
    let Ok(c) = <[Integer; 5]>::try_from(c) else {
        return Ok(false);
    };
    match Curve::new(c) {
        Ok(e) => {
            let _ = e.quartic_invariants();
            assert!(e.two_torsion_rank() <= 2);
            Ok(true)
        }
        Err(e) => refused(e),
    }
}

fn manifest_input(path: &Path, bytes: &[u8]) -> Result<bool, String> {
    // A fresh file each time: rewriting a file in place makes ext4 flush it (slow).
    let _ = std::fs::remove_file(path);
    std::fs::write(path, bytes).unwrap();
    match read_manifest(path) {
        Ok(_) => Ok(true),
        Err(e) => refused(e),
    }
}

fn cli_input(bin: &Path, args: &[String]) -> Result<bool, String> {
    let out = std::process::Command::new(bin)
        .arg("reduce")
        .arg("--")
        .args(args)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "{err}");
    match out.status.code() {
        Some(0) => Ok(true),
        Some(2) if err.trim_end().lines().count() == 1 => Ok(false),
        Some(2) => Err(err.into_owned()),
        other => panic!("exit {other:?}: {err}"),
    }
}

fn main() {
    let total = env_number("QORBITS_FUZZ_INPUTS", 1_000_000);
    let cli_runs = env_number("QORBITS_FUZZ_CLI", 500);
    let seed = env_number("QORBITS_FUZZ_SEED", 0xf0_22ed);
    // Panics are counted, not printed.
    std::panic::set_hook(Box::new(|_| {}));
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let committed = std::fs::read(root.join("manifests/qorbits-h1e4.manifest.json")).unwrap();
    let dir = std::env::temp_dir().join(format!("qorbits-fuzz-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let mpath = dir.join("m.json");
    let mut m = Mutator(seed);
    let names = ["heights", "integers", "forms", "curves", "manifests"];
    let mut tallies: Vec<Tally> = (0..names.len()).map(|_| Tally::default()).collect();
    let start = Instant::now();
    let mut spent = [std::time::Duration::ZERO; 5];
    for n in 0..total {
        let t0 = Instant::now();
        let k = (n % 10) as usize;
        // Mostly the cheap parsers; one input in ten is a manifest.
        match k {
            0..=2 => {
                let s = m.text(HEIGHT_SEEDS);
                tallies[0].run(&s, || parse_height(&s).map(|_| true).or_else(refused));
            }
            3..=5 => {
                let s = m.text(INTEGER_SEEDS);
                tallies[1].run(&s, || parse_integer("I", &s).map(|_| true).or_else(refused));
            }
            6 | 7 => {
                let s = m.text(FORM_SEEDS);
                tallies[2].run(&s, || form_input(&s));
            }
            8 => {
                let s = m.text(CURVE_SEEDS);
                tallies[3].run(&s, || curve_input(&s));
            }
            _ => {
                let bytes = m.mutate(&committed, &committed);
                let shown = String::from_utf8_lossy(&bytes[..bytes.len().min(60)]).into_owned();
                tallies[4].run(&shown, || manifest_input(&mpath, &bytes));
            }
        }
        spent[[0, 0, 0, 1, 1, 1, 2, 2, 3, 4][k]] += t0.elapsed();
    }
    let lib_time = start.elapsed();
    let bin = root.join("target/release/qorbits");
    let mut cli = Tally::default();
    if bin.exists() {
        for _ in 0..cli_runs {
            let text = m.text(FORM_SEEDS);
            let args: Vec<String> = text
                .split(' ')
                .map(|t| t.chars().filter(|c| *c != '\0').take(12).collect())
                .collect();
            cli.run(&text, || cli_input(&bin, &args));
        }
    } else {
        println!(
            "fuzz: {} not built (cargo build --release); binary runs skipped",
            bin.display()
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
    println!(
        "fuzz: seed {seed:#x}, {total} library inputs in {:.1} s",
        lib_time.as_secs_f64()
    );
    let mut all = Tally::default();
    let mut rows: Vec<(&str, &Tally)> = names.iter().copied().zip(tallies.iter()).collect();
    rows.push(("cli reduce", &cli));
    for (name, t) in rows {
        let secs = names
            .iter()
            .position(|n| *n == name)
            .map(|i| format!(", {:.1} s", spent[i].as_secs_f64()))
            .unwrap_or_default();
        println!(
            "  {name:<10} {:>9} inputs, {:>9} accepted, {} panics, {} multi-line errors{secs}",
            t.inputs, t.accepted, t.panics, t.multi_line
        );
        all.inputs += t.inputs;
        all.panics += t.panics;
        all.multi_line += t.multi_line;
        for e in &t.examples {
            println!("    {e}");
        }
    }
    println!(
        "fuzz: {} inputs in total, {} panics, {} multi-line errors; canonical failed on {} \
         valid forms",
        all.inputs,
        all.panics,
        all.multi_line,
        KERNEL_FAILURES.load(Ordering::Relaxed)
    );
    for e in KERNEL_EXAMPLES.lock().unwrap().iter() {
        println!("    canonical failed: {e}");
    }
}
