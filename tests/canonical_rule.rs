//! The documented canonical rule, tested directly (DESIGN §3): the canonical representative
//! of a class is the lexicographically smallest (a, b, c, d, e) among the members g of the
//! class with z(g) ∈ F_η = {−η ≤ Re z ≤ ½ + η, |z| ≥ 1 − η}, η = 10⁻⁹.
//!
//! Everything on the test's side is computed here, independently of the library: the
//! covariant point (`canonical_rule/julia.rs`, from the definition of G in DESIGN §3, in
//! MPFR), the action of a matrix on a form, the members of each class and the rule itself.
//! The library contributes only the grouping into classes (`canonical` of every member, each
//! with its matrix checked exactly) and the answer under test.
//!
//! Members of a class: the members found in a brute-force box (or the seed forms below),
//! and their images under every γ ∈ PGL2(Z) with entries in −2..=2 whose moved point
//! φ_γ(z) (covariance, DESIGN §3) is near F_η. That catches every member with z ∈ F_η: if
//! z and φ_γ(z) both lie in F_η then |entries| ≤ 1 (derived here: Im φ_γ(z) = y/|p − qz|²
//! with y ≥ 0.866 on both sides forces |q| ≤ 1 and then |p − qx| ≤ ½, so |p| ≤ 1; likewise
//! for r, s with γ⁻¹). Membership in F_η is decided from each member's own coefficients, in
//! f64 only far from the boundary (margin > 10⁻³ with an error estimate below 10⁻⁸), in
//! MPFR otherwise; an MPFR decision needs a margin 10⁶ times its error estimate, and near
//! the boundary (margin < 10⁻⁶) it is repeated at twice the precision and must agree.
//!
//! Classes: every form with coefficients in −3..=3 (Disc ≠ 0); forms invariant under the
//! stabiliser of i, under each reflection of PGL2(Z) through a boundary line of F and under
//! the third reflection fixing e^{πi/3} (`common::symmetrise`; a form fixed by the whole
//! stabiliser of e^{πi/3} has Disc = 0, checked); and forms built so that their point lies
//! 10⁻³¹ or 10⁻⁴⁵ inside or outside each of the three boundary pieces of F_η, where the
//! library's own F_η test is compared with the test's too. The run prints how many classes
//! have a member on each line of ∂F, at i, at e^{πi/3}, or a non-trivial stabiliser.

mod common;
#[path = "canonical_rule/julia.rs"]
mod julia;

use common::{symmetrise, Rng, STAB_I, STAB_LINES, STAB_RHO};
use julia::{f_distances, f_eta_distances, point, point64};
use qorbits::form::canonical::{canonical, in_f_eta};
use qorbits::form::Form;
use rayon::prelude::*;
use rug::ops::Pow;
use rug::{Float, Integer};
use std::collections::{BTreeMap, BTreeSet};

type Coeffs = [Integer; 5];

/// `(γ·f)(x, y) = f(p x + r y, q x + s y)` for any integer matrix `[p, q, r, s]`
/// (DESIGN §2), by expanding `Σ c_k (p x + r y)^{4−k} (q x + s y)^k` here.
fn act(f: &Coeffs, g: &[Integer; 4]) -> Coeffs {
    // Binary forms as coefficient vectors of x^{n−i} y^i.
    fn mul(u: &[Integer], v: &[Integer]) -> Vec<Integer> {
        let mut out = vec![Integer::new(); u.len() + v.len() - 1];
        for (i, a) in u.iter().enumerate() {
            for (j, b) in v.iter().enumerate() {
                out[i + j] += Integer::from(a * b);
            }
        }
        out
    }
    let l1 = [g[0].clone(), g[2].clone()];
    let l2 = [g[1].clone(), g[3].clone()];
    let mut out: Vec<Integer> = vec![Integer::new(); 5];
    for (k, c) in f.iter().enumerate() {
        let mut t = vec![c.clone()];
        for _ in 0..4 - k {
            t = mul(&t, &l1);
        }
        for _ in 0..k {
            t = mul(&t, &l2);
        }
        for i in 0..5 {
            out[i] += &t[i];
        }
    }
    out.try_into().unwrap()
}

fn act_small(f: &Coeffs, g: &[i64; 4]) -> Coeffs {
    act(f, &g.map(Integer::from))
}

fn coeffs(f: &[i64; 5]) -> Coeffs {
    f.map(Integer::from)
}

fn disc_nonzero(f: &Coeffs) -> bool {
    Form::new(f.clone()).invariants().unwrap().disc != 0
}

/// The elements of PGL2(Z) with entries in −2..=2 (one of ±γ each).
fn small_matrices() -> Vec<[i64; 4]> {
    let mut out = Vec::new();
    for p in -2..=2i64 {
        for q in -2..=2i64 {
            for r in -2..=2i64 {
                for s in -2..=2i64 {
                    let first = [p, q, r, s].into_iter().find(|v| *v != 0).unwrap_or(0);
                    if (p * s - q * r).abs() == 1 && first > 0 {
                        out.push([p, q, r, s]);
                    }
                }
            }
        }
    }
    out
}

/// `φ_γ(τ) = (sτ − r)/(p − qτ)`, conjugated when det γ = −1 (DESIGN §3), in f64.
fn move_point(g: &[i64; 4], z: (f64, f64)) -> (f64, f64) {
    let [p, q, r, s] = g.map(|v| v as f64);
    let (nr, ni) = (s * z.0 - r, s * z.1);
    let (dr, di) = (p - q * z.0, -q * z.1);
    let n = dr * dr + di * di;
    let (wr, wi) = ((nr * dr + ni * di) / n, (ni * dr - nr * di) / n);
    if p * s - q * r < 0.0 {
        (wr, -wi)
    } else {
        (wr, wi)
    }
}

fn near_f_eta(z: (f64, f64), tol: f64) -> bool {
    z.1 > 0.0 && z.0 >= -tol && z.0 <= 0.5 + tol && z.0.hypot(z.1) >= 1.0 - tol
}

/// The test's verdict on one form: is z(f) in F_η, and where the point is.
#[derive(Clone, Debug)]
struct Verdict {
    inside: bool,
    z: (f64, f64),
    /// Decided in MPFR (else in f64, far from the boundary).
    mp: bool,
    /// Distance to the boundary of F_η (as f64; only recorded for MPFR decisions).
    margin: f64,
    /// For points inside: within 10⁻²⁰ of the lines Re z = 0, Re z = ½, |z| = 1 of ∂F.
    on_f_boundary: [bool; 3],
}

fn verdict_mp(f: &Coeffs) -> Verdict {
    let bits = f.iter().map(|v| v.significant_bits()).max().unwrap();
    let mut prec = (4 * bits + 192).max(256);
    for _ in 0..4 {
        let p = point(f, prec);
        let d = f_eta_distances(&p);
        let margin = d
            .iter()
            .map(|v| Float::with_val(prec, v.abs_ref()))
            .min_by(|a, b| a.partial_cmp(b).unwrap())
            .unwrap();
        let needed = Float::with_val(prec, &p.err * 1_000_000u32);
        if margin <= needed {
            prec *= 2;
            continue;
        }
        let inside = d.iter().all(|v| *v >= 0);
        if margin < 1e-6 {
            // Near the boundary: the same answer at twice the precision, within the estimate.
            let q = point(f, 2 * prec);
            let d2 = f_eta_distances(&q);
            assert_eq!(
                d2.iter().all(|v| *v >= 0),
                inside,
                "{f:?}: decisions differ at {prec} and {} bits",
                2 * prec
            );
            let dx = Float::with_val(prec, &p.x - &q.x).abs();
            let dy = Float::with_val(prec, &p.y - &q.y).abs();
            assert!(
                dx <= p.err && dy <= p.err,
                "{f:?}: points at {prec} and {} bits differ by {dx}, {dy} > {}",
                2 * prec,
                p.err
            );
        }
        let fd = f_distances(&p);
        let on_f_boundary = std::array::from_fn(|k| fd[k].clone().abs() < 1e-20);
        return Verdict {
            inside,
            z: (p.x.to_f64(), p.y.to_f64()),
            mp: true,
            margin: margin.to_f64(),
            on_f_boundary,
        };
    }
    panic!("{f:?}: the covariant point cannot be placed relative to F_eta up to {prec} bits");
}

fn verdict(f: &Coeffs) -> Verdict {
    let small: Option<[i64; 5]> = f
        .iter()
        .map(|v| v.to_i64().filter(|x| x.abs() < 1 << 20))
        .collect::<Option<Vec<_>>>()
        .map(|v| v.try_into().unwrap());
    if let Some((x, y, err)) = small.and_then(|c| point64(&c)) {
        let eta = 1e-9;
        let d = [x + eta, 0.5 + eta - x, x.hypot(y) - (1.0 - eta)];
        let margin = d.iter().map(|v| v.abs()).fold(f64::INFINITY, f64::min);
        if err < 1e-8 && margin > 1e-3 {
            return Verdict {
                inside: d.iter().all(|v| *v >= 0.0),
                z: (x, y),
                mp: false,
                margin,
                on_f_boundary: [false; 3],
            };
        }
    }
    verdict_mp(f)
}

/// What one class showed.
#[derive(Debug, Default)]
struct Report {
    members_in_f_eta: usize,
    on_boundary: [bool; 3],
    at_i: bool,
    near_rho: bool,
    symmetric: bool,
    mp_decisions: usize,
    min_margin: f64,
}

/// Check the rule on the class of `seeds` (all members of one class): the library's
/// canonical form must be the lexicographically smallest member with z in F_η.
fn check_class(seeds: &[Coeffs], small: &[[i64; 4]]) -> Report {
    let c = canonical(&Form::new(seeds[0].clone())).unwrap_or_else(|e| panic!("{seeds:?}: {e}"));
    let canon: Coeffs = c.form.c.clone();
    let mut verdicts: BTreeMap<Coeffs, Verdict> = BTreeMap::new();
    let mut starts: Vec<Coeffs> = seeds.to_vec();
    starts.push(canon.clone());
    for s in &starts {
        if !verdicts.contains_key(s) {
            verdicts.insert(s.clone(), verdict(s));
        }
    }
    for s in &starts {
        let z = verdicts[s].z;
        for g in small {
            if near_f_eta(move_point(g, z), 1e-2) {
                let h = act_small(s, g);
                if let std::collections::btree_map::Entry::Vacant(slot) = verdicts.entry(h) {
                    let v = verdict(slot.key());
                    slot.insert(v);
                }
            }
        }
    }
    let members: Vec<(&Coeffs, &Verdict)> = verdicts.iter().filter(|(_, v)| v.inside).collect();
    assert!(
        !members.is_empty(),
        "no member with z in F_eta found for the class of {seeds:?} (library: {canon:?})"
    );
    // BTreeMap order on [Integer; 5] is the lexicographic order of the integer tuples.
    let smallest = members[0].0;
    assert_eq!(
        &canon,
        smallest,
        "class of {:?}: the library's canonical form is not the smallest member in F_eta; \
         members in F_eta: {:?}",
        seeds[0],
        members.iter().map(|m| m.0).collect::<Vec<_>>()
    );
    let mut r = Report {
        members_in_f_eta: members.len(),
        min_margin: f64::INFINITY,
        ..Report::default()
    };
    for (m, v) in &members {
        for k in 0..3 {
            r.on_boundary[k] |= v.on_f_boundary[k];
        }
        r.at_i |= v.on_f_boundary[0] && v.on_f_boundary[2];
        r.near_rho |= (v.z.0 - 0.5).abs() < 1e-12 && (v.z.1 - 0.75f64.sqrt()).abs() < 1e-12;
        r.symmetric |= small
            .iter()
            .filter(|g| **g != [1, 0, 0, 1])
            .any(|g| act_small(m, g) == **m);
    }
    for v in verdicts.values().filter(|v| v.mp) {
        r.mp_decisions += 1;
        r.min_margin = r.min_margin.min(v.margin);
    }
    r
}

/// Every form with coefficients in −m..=m and Disc ≠ 0, grouped by the library's canonical
/// form (each grouping checked: the returned matrix maps the member to it exactly).
fn box_classes(m: i64) -> Vec<Vec<Coeffs>> {
    let range: Vec<i64> = (-m..=m).collect();
    let grouped: BTreeMap<Coeffs, Vec<Coeffs>> = range
        .par_iter()
        .map(|&a| {
            let mut out: BTreeMap<Coeffs, Vec<Coeffs>> = BTreeMap::new();
            for b in -m..=m {
                for c in -m..=m {
                    for d in -m..=m {
                        for e in -m..=m {
                            let f = coeffs(&[a, b, c, d, e]);
                            if !disc_nonzero(&f) {
                                continue;
                            }
                            let k = canonical(&Form::new(f.clone())).unwrap();
                            let g: [Integer; 4] = k.gamma.m.clone();
                            assert_eq!(act(&f, &g), k.form.c, "{f:?}");
                            out.entry(k.form.c).or_default().push(f);
                        }
                    }
                }
            }
            out
        })
        .reduce(BTreeMap::new, |mut x, y| {
            for (k, mut v) in y {
                x.entry(k).or_default().append(&mut v);
            }
            x
        });
    grouped.into_values().collect()
}

/// Forms invariant under a finite group, from random small forms, Disc ≠ 0.
fn symmetric_forms(group: &[[i64; 4]], n: usize, rng: &mut Rng) -> Vec<Coeffs> {
    let mut out = BTreeSet::new();
    let mut tries = 0;
    while out.len() < n {
        tries += 1;
        assert!(tries < 1000 * n, "too few symmetric forms for {group:?}");
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(6)));
        let s = symmetrise(&f, group).c;
        if disc_nonzero(&s) {
            // Check the invariance exactly with the test's own action.
            for g in group {
                assert_eq!(act_small(&s, g), s, "{s:?} not fixed by {g:?}");
            }
            out.insert(s);
        }
    }
    out.into_iter().collect()
}

/// Forms whose point lies `σ·δ` inside (σ = +1) or outside (σ = −1) a boundary piece of
/// F_η, for δ = 10^−k: from a symmetric form g with z(g) on a line of ∂F, moved by a
/// rational translation or scaling (covariance holds for any real matrix of positive
/// determinant up to a scalar, DESIGN §3): f(x, y) = g(Q x + P y, Q y) has z(f) = z(g) − P/Q,
/// and f(x, y) = g(P x, S y) has z(f) = (S/P)·z(g).
fn near_boundary_forms() -> Vec<(Coeffs, bool, &'static str)> {
    let mut out = Vec::new();
    let ten = |k: u32| Integer::from(10).pow(k);
    // Bases: z on Re z = 0 with Im z > 1.05; on Re z = ½ with |z| > 1.05; on |z| = 1 with
    // 0.05 < Re z < 0.45 (checked with the f64 point).
    let mut rng = Rng(0xb0da_1e55);
    let mut bases: [Vec<[i64; 5]>; 3] = [Vec::new(), Vec::new(), Vec::new()];
    let mut tries = 0;
    while bases.iter().any(|b| b.len() < 3) {
        tries += 1;
        assert!(tries < 100_000, "no base forms found");
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(3)));
        for (k, group) in STAB_LINES.iter().enumerate() {
            let s = symmetrise(&f, group).c;
            if !disc_nonzero(&s) || bases[k].len() >= 3 {
                continue;
            }
            let s: [i64; 5] = s.map(|v| v.to_i64().unwrap());
            let Some((x, y, _)) = point64(&s) else {
                continue;
            };
            let ok = match k {
                0 => y > 1.05,
                1 => x.hypot(y) > 1.05,
                _ => x > 0.05 && x < 0.45,
            };
            if ok {
                bases[k].push(s);
            }
        }
    }
    for (k, list) in bases.iter().enumerate() {
        for g in list {
            let g = coeffs(g);
            for digits in [31u32, 45] {
                for sigma in [1i64, -1] {
                    let q = ten(digits);
                    let shift = ten(digits - 9);
                    let (m, piece): ([Integer; 4], &str) = match k {
                        // Re z(f) = −η + σδ: P/Q = η − σδ.
                        0 => ([q.clone(), 0.into(), shift - sigma, q], "Re z = -eta"),
                        // Re z(f) = ½ + η − σδ: P/Q = −(η − σδ).
                        1 => (
                            [q.clone(), 0.into(), -(shift - sigma), q],
                            "Re z = 1/2 + eta",
                        ),
                        // |z(f)| = 1 − η + σδ: S/P = 1 − η + σδ.
                        _ => {
                            let s = q.clone() - shift + sigma;
                            ([q, 0.into(), 0.into(), s], "|z| = 1 - eta")
                        }
                    };
                    out.push((act(&g, &m), sigma > 0, piece));
                }
            }
        }
    }
    out
}

#[test]
fn canonical_form_is_the_smallest_member_in_f_eta() {
    let small = small_matrices();
    assert!(small.contains(&[0, 1, 1, 0]));
    // Classes of the brute-force box.
    let boxed = box_classes(3);
    // Symmetric forms: the Klein four at i and each reflection through a line of ∂F.
    // A form fixed by all of the stabiliser of e^{πi/3} has Disc = 0 (its elements of order 3
    // fix only e^{πi/3} and its conjugate in P¹(C), DESIGN §3), checked here.
    let mut rng = Rng(0x5e1f_5a3e);
    for _ in 0..200 {
        let f = Form::<Integer>::from_i64(std::array::from_fn(|_| rng.range(5)));
        let s = symmetrise(&f, &STAB_RHO);
        assert!(!disc_nonzero(&s.c), "{s} is fixed by the stabiliser of rho");
    }
    let mut symmetric: Vec<Coeffs> = symmetric_forms(&STAB_I, 150, &mut rng);
    for group in &STAB_LINES {
        symmetric.extend(symmetric_forms(group, 150, &mut rng));
    }
    symmetric.extend(symmetric_forms(
        &[[1, 0, 0, 1], [1, 1, 0, -1]],
        150,
        &mut rng,
    ));
    let near = near_boundary_forms();
    // The test's own decision and the library's on the constructed forms.
    for (f, inside, piece) in &near {
        let v = verdict(f);
        assert_eq!(v.inside, *inside, "{f:?} near {piece}: margin {}", v.margin);
        assert!(v.margin < 1e-30, "{f:?}: margin {}", v.margin);
        assert_eq!(
            in_f_eta(&Form::new(f.clone()), None).unwrap(),
            *inside,
            "library's F_eta test on {f:?} near {piece}"
        );
    }
    // One list of classes: box classes, then each symmetric or near-boundary form as a class
    // of its own unless its class was already seen.
    let mut seen: BTreeSet<Coeffs> = BTreeSet::new();
    let mut classes: Vec<(&str, Vec<Coeffs>)> = Vec::new();
    let key = |f: &Coeffs| canonical(&Form::new(f.clone())).unwrap().form.c;
    for cl in boxed {
        seen.insert(key(&cl[0]));
        classes.push(("box", cl));
    }
    for f in symmetric {
        if seen.insert(key(&f)) {
            classes.push(("symmetric", vec![f]));
        }
    }
    for (f, _, _) in near {
        if seen.insert(key(&f)) {
            classes.push(("near boundary", vec![f]));
        }
    }
    let reports: Vec<(&str, Report)> = classes
        .par_iter()
        .map(|(kind, cl)| (*kind, check_class(cl, &small)))
        .collect();
    let count = |p: &dyn Fn(&Report) -> bool| reports.iter().filter(|(_, r)| p(r)).count();
    let by_kind = |k: &str| reports.iter().filter(|(kind, _)| *kind == k).count();
    let min_margin = reports
        .iter()
        .map(|(_, r)| r.min_margin)
        .fold(f64::INFINITY, f64::min);
    println!(
        "canonical rule: {} classes ({} from the box |coeffs| <= 3, {} symmetric seeds, {} near \
         the boundary of F_eta); with a member on Re z = 0: {}, on Re z = 1/2: {}, on |z| = 1: \
         {}; at i: {}; at e^(pi i/3): {}; with a non-trivial stabiliser: {}; with >= 2 members \
         in F_eta: {} (max {}); MPFR decisions: {}, smallest margin {:e}",
        reports.len(),
        by_kind("box"),
        by_kind("symmetric"),
        by_kind("near boundary"),
        count(&|r| r.on_boundary[0]),
        count(&|r| r.on_boundary[1]),
        count(&|r| r.on_boundary[2]),
        count(&|r| r.at_i),
        count(&|r| r.near_rho),
        count(&|r| r.symmetric),
        count(&|r| r.members_in_f_eta >= 2),
        reports
            .iter()
            .map(|(_, r)| r.members_in_f_eta)
            .max()
            .unwrap(),
        reports.iter().map(|(_, r)| r.mp_decisions).sum::<usize>(),
        min_margin
    );
    assert!(reports.len() >= 2000, "{} classes", reports.len());
    assert!(count(&|r| r.on_boundary.iter().all(|b| !b)) > 0);
    for k in 0..3 {
        assert!(count(&|r| r.on_boundary[k]) >= 50, "boundary piece {k}");
    }
    assert!(count(&|r| r.at_i) >= 20 && count(&|r| r.symmetric) >= 200);
    assert!(by_kind("near boundary") >= 24 && min_margin < 1e-40);
}
