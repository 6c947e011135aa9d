//! Property tests (proptest) of the kernel and of every parser of user input.
//!
//! * The canonical form is a class invariant (DESIGN §3) under random moves of GL2(Z) with
//!   entries up to 10⁶, on coefficients up to 10⁴⁰, of one size and of mixed sizes (the
//!   latter give roots in tight pairs, the hard case of the covariant point).
//! * Parsers of heights, integers, forms (`qorbits reduce` arguments, through the binary),
//!   curves (`Curve::new` on parsed coefficients) and manifests (`read_manifest` on mutated
//!   copies of a committed manifest) fed random and mutated bytes: no panic, and an error
//!   is one line. Structured inputs are checked against an exact reference written here.
//!
//! The long run of the same parsers (≥ 10⁶ inputs) is `cargo bench --bench fuzz`.

mod common;

use common::mutate::{Mutator, CURVE_SEEDS, FORM_SEEDS, HEIGHT_SEEDS, INTEGER_SEEDS};
use proptest::prelude::*;
use proptest::test_runner::RngSeed;
use qorbits::arith::parse::{parse_height, parse_integer};
use qorbits::form::canonical::canonical;
use qorbits::form::{Form, Gl2};
use qorbits::selmer::Curve;
use qorbits::table::manifest::{check_file_name, read_manifest};
use rug::ops::Pow;
use rug::Integer;
use std::path::PathBuf;

/// Cases of the parser properties (each is cheap).
const PARSER_CASES: u32 = 5000;

/// A fixed seed keeps the suite reproducible (the long fuzz run varies its inputs); no
/// failure files: a failing input found here becomes an explicit regression test.
fn config(cases: u32) -> ProptestConfig {
    ProptestConfig {
        cases,
        rng_seed: RngSeed::Fixed(0x0005_eed0_f0e5),
        failure_persistence: None,
        max_shrink_time: 30_000,
        ..ProptestConfig::default()
    }
}

fn one_line(e: &impl std::fmt::Display) -> Result<(), TestCaseError> {
    let m = e.to_string();
    prop_assert!(
        !m.contains('\n') && !m.contains('\r'),
        "error spans lines: {m:?}"
    );
    prop_assert!(!m.is_empty());
    Ok(())
}

// ---------- the kernel ----------

/// A random integer below 10^digits in absolute value.
fn below_ten_to(digits: u32, hi: u128, lo: u128, neg: bool) -> Integer {
    let v: Integer = (Integer::from(hi) << 128) + lo;
    let v = v % Integer::from(10).pow(digits);
    if neg {
        -v
    } else {
        v
    }
}

/// Five coefficients below 10^d for one d in 1..=40 (forms of one size).
fn form_of_one_size() -> impl Strategy<Value = [Integer; 5]> {
    (
        1u32..=40,
        proptest::array::uniform5((any::<u128>(), any::<u128>(), any::<bool>())),
    )
        .prop_map(|(d, parts)| parts.map(|(hi, lo, neg)| below_ten_to(d, hi, lo, neg)))
}

/// Five coefficients with independent sizes 10^0..10^40 (zero included).
fn form_of_mixed_sizes() -> impl Strategy<Value = [Integer; 5]> {
    proptest::array::uniform5((0u32..=40, any::<u128>(), any::<u128>(), any::<bool>()))
        .prop_map(|parts| parts.map(|(d, hi, lo, neg)| below_ten_to(d, hi, lo, neg)))
}

fn ext_gcd(a: i64, b: i64) -> (i64, i64, i64) {
    if b == 0 {
        (a.abs(), a.signum(), 0)
    } else {
        let (g, x, y) = ext_gcd(b, a.rem_euclid(b));
        (g, y, x - a.div_euclid(b) * y)
    }
}

/// An element of GL2(Z) with entries up to about 10⁶: a coprime first column (p, r), the
/// second column from Bézout shifted by k·(p, r), and a random determinant sign.
fn gl2() -> impl Strategy<Value = Gl2<Integer>> {
    const M: i64 = 1_000_000;
    (-M..=M, -M..=M, any::<i64>(), any::<bool>())
        .prop_filter("coprime column", |(p, r, _, _)| ext_gcd(*p, *r).0 == 1)
        .prop_map(|(p, r, k, neg)| {
            let (_, x, y) = ext_gcd(p, r);
            // p·x + r·y = 1: [[p, −y], [r, x]] has det 1.
            let room = M / (1 + p.abs().max(r.abs()));
            let k = if room == 0 {
                0
            } else {
                k.rem_euclid(2 * room + 1) - room
            };
            let (q, s) = (-y + k * p, x + k * r);
            let sign = if neg { -1 } else { 1 };
            Gl2::<Integer>::new(p, q * sign, r, s * sign)
        })
}

fn check_invariance(c: [Integer; 5], g: Gl2<Integer>) -> Result<(), TestCaseError> {
    let f = Form::new(c);
    prop_assume!(f.invariants().unwrap().disc != 0);
    prop_assert_eq!(g.det().unwrap().abs(), Integer::from(1));
    let moved = f.act(&g).unwrap();
    let cf = canonical(&f).map_err(|e| TestCaseError::fail(format!("{f}: {e}")))?;
    let cm = canonical(&moved).map_err(|e| TestCaseError::fail(format!("{moved}: {e}")))?;
    prop_assert_eq!(&f.act(&cf.gamma).unwrap(), &cf.form);
    prop_assert_eq!(&moved.act(&cm.gamma).unwrap(), &cm.form);
    prop_assert_eq!(
        &cf.form,
        &cm.form,
        "canonical of {} and of its move by {:?}",
        f,
        g
    );
    prop_assert_eq!(cf.stabiliser.len(), cm.stabiliser.len());
    Ok(())
}

proptest! {
    #![proptest_config(config(128))]

    #[test]
    fn canonical_form_is_invariant_under_big_moves(c in form_of_one_size(), g in gl2()) {
        check_invariance(c, g)?;
    }
}

proptest! {
    #![proptest_config(config(64))]

    /// Forms whose coefficients differ wildly in size (roots spread over many orders of
    /// magnitude, some in tight pairs), moved by entries up to 10⁶: these once ended in
    /// "numerical failure (no covariant point …)"; inputs that did are kept in
    /// `canonical_regressions_of_mixed_size_forms`.
    #[test]
    fn canonical_form_is_invariant_for_mixed_sizes(c in form_of_mixed_sizes(), g in gl2()) {
        check_invariance(c, g)?;
    }
}

/// Inputs on which `canonical` returns a numerical failure today (found by the property
/// above): the first is the move of (0, −6959, 35889903437304348727042357934,
/// 35515085962663787, 32) by [[198374, −494389], [75513, −188194]].
#[test]
fn canonical_regressions_of_mixed_size_forms() {
    let forms = [[
        "345206837665681737207265703465870171628285420261478",
        "525625413255759329478919744443073873081266257320825",
        "300126668545151305012039111576834610739508254251378",
        "76164097854041616947299649688465387928144992117187",
        "7248151876222710774505338136695369695978537686286",
    ]];
    for f in forms {
        let f = Form::new(f.map(|s| Integer::from(Integer::parse(s).unwrap())));
        canonical(&f).unwrap_or_else(|e| panic!("{f}: {e}"));
    }
}

// ---------- heights ----------

/// The exact value of `int.frac × 10^exp` when it is an integer.
fn exact_height(int: &str, frac: &str, exp: u32) -> Option<Integer> {
    let digits = format!("{int}{frac}");
    let n = Integer::from(Integer::parse(if digits.is_empty() { "0" } else { &digits }).ok()?);
    let num = n * Integer::from(10).pow(exp);
    let den = Integer::from(10).pow(frac.len() as u32);
    num.is_divisible(&den).then(|| num / den)
}

proptest! {
    #![proptest_config(config(PARSER_CASES))]

    #[test]
    fn heights_agree_with_exact_decimal_arithmetic(
        ws in "[ \t]{0,2}",
        int in "[0-9]{0,25}",
        frac in proptest::option::of("[0-9]{0,12}"),
        exp in proptest::option::of((0u32..=70, any::<bool>())),
    ) {
        let mut s = format!("{ws}{int}");
        if let Some(f) = &frac {
            s.push('.');
            s.push_str(f);
        }
        if let Some((e, upper)) = exp {
            s.push(if upper { 'E' } else { 'e' });
            s.push_str(&e.to_string());
        }
        s.push_str(&ws);
        let frac = frac.unwrap_or_default();
        let e = exp.map(|x| x.0).unwrap_or(0);
        let want = if int.is_empty() && frac.is_empty() {
            None
        } else {
            exact_height(&int, &frac, e)
                .filter(|v| *v >= 1)
                .and_then(|v| v.to_i128())
        };
        match parse_height(&s) {
            Ok(v) => prop_assert_eq!(Some(v), want, "{:?}", s),
            Err(err) => {
                one_line(&err)?;
                // Refusing is right when the value is no positive i128; exponents above 60
                // are refused outright (documented limit of the parser).
                prop_assert!(want.is_none() || e > 60, "{:?} refused: {}", s, err);
            }
        }
    }

    #[test]
    fn heights_survive_random_and_mutated_bytes(seed in any::<u64>()) {
        let s = Mutator(seed).text(HEIGHT_SEEDS);
        match parse_height(&s) {
            Ok(v) => prop_assert!(v >= 1, "{:?} gave {}", s, v),
            Err(e) => one_line(&e)?,
        }
    }

    #[test]
    fn heights_survive_arbitrary_strings(s in any::<String>()) {
        if let Err(e) = parse_height(&s) {
            one_line(&e)?;
        }
    }
}

// ---------- integers ----------

proptest! {
    #![proptest_config(config(PARSER_CASES))]

    #[test]
    fn integers_are_exactly_a_sign_and_digits(
        ws in "[ \t]{0,2}",
        sign in "[+-]?",
        digits in "[0-9]{1,60}",
    ) {
        let s = format!("{ws}{sign}{digits}{ws}");
        let mut want = Integer::new();
        for d in digits.bytes() {
            want = want * 10u32 + u32::from(d - b'0');
        }
        if sign == "-" {
            want = -want;
        }
        prop_assert_eq!(parse_integer("I", &s).unwrap(), want);
    }

    #[test]
    fn integers_survive_random_and_mutated_bytes(seed in any::<u64>()) {
        let s = Mutator(seed).text(INTEGER_SEEDS);
        match parse_integer("coefficient", &s) {
            Ok(v) => {
                // Accepted only if it is a sign and digits, with the value they spell.
                let t = s.trim();
                let body = t.strip_prefix(['+', '-']).unwrap_or(t);
                prop_assert!(!body.is_empty() && body.bytes().all(|b| b.is_ascii_digit()), "{:?}", s);
                prop_assert_eq!(v.to_string(), Integer::from(Integer::parse(t).unwrap()).to_string());
            }
            Err(e) => one_line(&e)?,
        }
    }

    #[test]
    fn integers_survive_arbitrary_strings(s in any::<String>()) {
        if let Err(e) = parse_integer("J", &s) {
            one_line(&e)?;
        }
    }
}

// ---------- curves ----------

proptest! {
    #![proptest_config(config(PARSER_CASES))]

    #[test]
    fn curves_from_mutated_coefficients(seed in any::<u64>()) {
        let text = Mutator(seed).text(CURVE_SEEDS);
        let parsed: Result<Vec<Integer>, _> = text
            .split_whitespace()
            .map(|t| parse_integer("a-invariant", t))
            .collect();
        match parsed {
            Err(e) => one_line(&e)?,
            Ok(v) if v.len() != 5 => {}
            Ok(v) => match Curve::new(v.try_into().unwrap()) {
                Err(e) => one_line(&e)?,
                Ok(e) => {
                    prop_assert!(e.discriminant() != 0);
                    let (i, j) = e.quartic_invariants();
                    // 4I³ − J² = 4(c4³ − c6²) = 4·1728·Δ (DESIGN §2 with Curve's c4, c6).
                    let lhs: Integer = Integer::from(4) * i.clone().pow(3) - j.clone().square();
                    prop_assert_eq!(lhs, Integer::from(6912) * e.discriminant());
                    prop_assert!(e.two_torsion_rank() <= 2);
                }
            },
        }
    }
}

// ---------- manifests ----------

fn committed_manifest() -> Vec<u8> {
    std::fs::read(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("manifests/qorbits-h1e4.manifest.json"),
    )
    .unwrap()
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("qorbits-prop-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// A leaf of the manifest replaced by a hostile value (JSON-aware mutation).
fn mutate_json(m: &mut Mutator, v: &mut serde_json::Value) {
    use serde_json::Value;
    match v {
        Value::Object(map) if !map.is_empty() => {
            let k = map.keys().nth(m.below(map.len())).unwrap().clone();
            if m.below(8) == 0 {
                map.remove(&k);
            } else {
                mutate_json(m, map.get_mut(&k).unwrap());
            }
        }
        _ => {
            let hostile: [Value; 12] = [
                Value::Null,
                Value::Bool(true),
                serde_json::json!(-1),
                serde_json::json!(0),
                serde_json::json!(u64::MAX),
                serde_json::json!(1.5),
                serde_json::json!("../x.sqlite"),
                serde_json::json!("a\nb"),
                serde_json::json!(""),
                serde_json::json!([1, 2]),
                serde_json::json!({"k": 1}),
                serde_json::from_str("170141183460469231731687303715884105728").unwrap(),
            ];
            *v = hostile[m.below(hostile.len())].clone();
        }
    }
}

proptest! {
    #![proptest_config(config(PARSER_CASES))]

    #[test]
    fn manifests_survive_mutation(seed in any::<u64>()) {
        let committed = committed_manifest();
        let mut m = Mutator(seed);
        let bytes = if m.below(2) == 0 {
            m.mutate(&committed, &committed)
        } else {
            let mut v: serde_json::Value = serde_json::from_slice(&committed).unwrap();
            for _ in 0..1 + m.below(3) {
                mutate_json(&mut m, &mut v);
            }
            serde_json::to_vec_pretty(&v).unwrap()
        };
        let dir = scratch("manifest");
        let path = dir.join(format!("m{seed}.json"));
        std::fs::write(&path, &bytes).unwrap();
        let got = read_manifest(&path);
        let _ = std::fs::remove_file(&path);
        match got {
            Err(e) => one_line(&e)?,
            Ok(man) => {
                // Accepted manifests passed the checks of untrusted input.
                prop_assert!(check_file_name(&man.file.name).is_ok());
                prop_assert!(man.file.sha256.len() == 64 && man.content_sha256.len() == 64);
                prop_assert!(man.parameters.height >= 1 && man.file.bytes >= 1);
            }
        }
    }
}

// ---------- forms, through the binary ----------

proptest! {
    #![proptest_config(config(200))]

    /// `qorbits reduce -- ARGS` (after `--`, so every argument reaches the form parser):
    /// success, or exit code 2 with one line on stderr; never a panic.
    #[test]
    fn reduce_arguments_survive_mutation(seed in any::<u64>()) {
        let text = Mutator(seed).text(FORM_SEEDS);
        // Tokens of at most 12 characters: large coefficients make `reduce` factor large
        // discriminants, which is slow, not what this property is about.
        let args: Vec<String> = text
            .split(' ')
            .map(|t| t.chars().filter(|c| *c != '\0').take(12).collect())
            .collect();
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_qorbits"))
            .arg("reduce")
            .arg("--")
            .args(&args)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        prop_assert!(!err.contains("panicked"), "{:?}: {}", args, err);
        match out.status.code() {
            Some(0) => prop_assert!(err.is_empty(), "{:?}: {}", args, err),
            Some(2) => prop_assert_eq!(err.trim_end().lines().count(), 1, "{:?}: {}", args, err),
            other => prop_assert!(false, "{:?}: exit {:?}, {}", args, other, err),
        }
    }
}
