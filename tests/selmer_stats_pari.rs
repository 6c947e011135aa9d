//! The exact average of `selmer-stats` against PARI/GP: below Y = 10⁴, the number of curves
//! of the family and the sum of #Sel₂ over them, each computed by qorbits and by gp in this
//! run, must be equal — and so must the 2-Selmer rank of every curve.
//!
//! External source: PARI/GP (Debian package pari-gp), `ellrank`, whose documented output
//! `[r, R, s, L]` gives the 2-Selmer rank `R + s` for a curve without rational 2-torsion
//! (read as in `tests/selmer_pari.rs`). gp also builds the family on its own from its
//! definition: integers A, B with `max(4|A|³, 27B²) < Y`, `4A³ + 27B² ≠ 0`, no prime p with
//! `p⁴ | A` and `p⁶ | B`, and `x³ + Ax + B` without a rational root (`nfroots`).

mod common;

use qorbits::progress::Silent;
use qorbits::selmer::selmer_stats;

#[test]
fn numerator_and_denominator_match_pari_at_1e4() {
    let y = 10_000i64;
    let ours = selmer_stats(i128::from(y), &Silent).unwrap();
    let script = format!(
        "Y={y}; n=0; S=0;\n\
         for(A=-30,30, for(B=-30,30, \
           if(max(4*abs(A)^3, 27*B^2) >= Y || 4*A^3 + 27*B^2 == 0, next); \
           if(#nfroots(, x^3 + A*x + B), next); \
           m=0; forprime(p=2, 30, if(A % p^4 == 0 && B % p^6 == 0, m=1)); if(m, next); \
           r=ellrank(ellinit([0,0,0,A,B])); n++; S += 2^(r[2]+r[3]); \
           print(A, \" \", B, \" \", r[2]+r[3])));\n\
         print(\"total \", n, \" \", S);\n"
    );
    let lines = common::gp_lines(&script, ours.all.curves as usize + 1);
    let (total, per_curve) = lines.split_last().expect("gp printed nothing");
    let t: Vec<u64> = total
        .split_whitespace()
        .skip(1)
        .map(|v| v.parse().unwrap())
        .collect();
    assert_eq!(
        (ours.all.curves, ours.all.total),
        (t[0], t[1]),
        "curves and Σ #Sel₂ below {y}: qorbits against gp"
    );
    let mut gp: Vec<(i64, i64, u32)> = per_curve
        .iter()
        .map(|l| {
            let v: Vec<i64> = l.split_whitespace().map(|w| w.parse().unwrap()).collect();
            (v[0], v[1], v[2] as u32)
        })
        .collect();
    let mut mine = ours.curves.clone();
    gp.sort();
    mine.sort();
    assert_eq!(mine, gp, "the 2-Selmer rank of each curve");
    println!(
        "{} curves, Σ #Sel₂ = {}, average {:.4} (qorbits = gp)",
        t[0],
        t[1],
        t[1] as f64 / t[0] as f64
    );
}
