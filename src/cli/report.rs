//! Reports of the command line: citations of a table, counts against the asymptotic main
//! terms, 2-Selmer groups and their averages.

use qorbits::error::Result;
use qorbits::selmer::{Curve, Selmer, SelmerBin, SelmerStats};
use qorbits::table::row::Params;
use qorbits::table::stats::stats_counts;
use rusqlite::Connection;
use serde_json::{json, Value};
use std::fmt::Write;
use std::path::Path;

/// A BibTeX entry and a CITATION.cff fragment naming the content hash.
pub fn citation(p: &Params, content_sha256: &str, file: &Path) -> String {
    let kind = if p.include_reducible {
        "integral binary quartic forms (reducible included)"
    } else {
        "irreducible integral binary quartic forms"
    };
    let title = format!(
        "Table of the GL2(Z)-classes of {kind} with height H < {}",
        p.height
    );
    let version = env!("CARGO_PKG_VERSION");
    let schema = qorbits::table::schema::SCHEMA_VERSION;
    let name = file
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let key = format!(
        "qorbits-h{}-{}",
        p.height,
        &content_sha256[..12.min(content_sha256.len())]
    );
    format!(
        "@misc{{{key},\n  title        = {{{title}}},\n  author       = {{{{qorbits developers}}}},\n  howpublished = {{SQLite file {name}, built by qorbits {version} (schema {schema}) with height {h}, include\\_reducible {r}}},\n  note         = {{Content SHA-256 {content_sha256}}}\n}}\n\n# CITATION.cff fragment\ncff-version: 1.2.0\nmessage: \"Cite this table by its content hash.\"\ntitle: \"{title}\"\nauthors:\n  - name: \"qorbits developers\"\nversion: \"qorbits {version}, schema {schema}\"\nidentifiers:\n  - type: other\n    value: \"sha256:{content_sha256}\"\n    description: \"content SHA-256 of the table (recipe in the qorbits README)\"\nkeywords:\n  - \"binary quartic forms\"\n  - \"height {h}\"\n  - \"include_reducible {r}\"\n",
        h = p.height,
        r = p.include_reducible,
    )
}

/// The `qorbits stats` report.
pub fn stats(conn: &Connection) -> Result<String> {
    let params = qorbits::table::reader::table_params(conn)?;
    let counts = stats_counts(conn)?;
    let mut out = String::new();
    writeln!(out, "irreducible classes with H < {}", params.height).expect("string");
    writeln!(
        out,
        "{:<12}{:>12}{:>14}{:>9}",
        "real roots", "classes", "main term", "ratio"
    )
    .expect("string");
    let (mut n_all, mut m_all) = (0u64, 0.0);
    for (real, n, m) in counts {
        let name = if real == 0 {
            "0 (both signs)".to_string()
        } else {
            real.to_string()
        };
        writeln!(out, "{name:<12}{n:>12}{m:>14.1}{:>9.3}", n as f64 / m).expect("string");
        n_all += n;
        m_all += m;
    }
    writeln!(
        out,
        "{:<12}{n_all:>12}{m_all:>14.1}{:>9.3}",
        "all",
        n_all as f64 / m_all
    )
    .expect("string");
    writeln!(
        out,
        "main terms (4, 32, 8)/135 · ζ(2) · X^(5/6) (published asymptotics, recalled from memory); the ratios tend to 1 slowly"
    )
    .expect("string");
    Ok(out)
}

fn form_text(f: &[i64; 5]) -> String {
    format!("({}, {}, {}, {}, {})", f[0], f[1], f[2], f[3], f[4])
}

/// The 2-Selmer group of a curve, as text or one JSON object.
pub fn selmer(curve: &Curve, s: &Selmer, json: bool) -> String {
    if json {
        let v = json!({
            "curve": curve.ainvs.iter().map(|a| a.to_string()).collect::<Vec<_>>(),
            "c4": curve.c4().to_string(),
            "c6": curve.c6().to_string(),
            "discriminant": curve.discriminant().to_string(),
            "I": s.i.to_string(),
            "J": s.j.to_string(),
            "selmer_rank": s.rank,
            "two_torsion_rank": s.two_torsion_rank,
            "selmer_order": 1u64 << s.rank,
            "irreducible_classes": s.irreducible_classes,
            "els_classes": s.els_classes,
            "elements": s.elements.iter().map(|r| json!({
                "label": r.label,
                "quartic": r.form,
            })).collect::<Vec<_>>(),
        });
        return format!("{v}\n");
    }
    let mut out = String::new();
    let w = &mut out;
    writeln!(w, "curve          {}", curve.name()).expect("string");
    writeln!(w, "c4, c6         {}, {}", curve.c4(), curve.c6()).expect("string");
    writeln!(w, "discriminant   {}", curve.discriminant()).expect("string");
    writeln!(w, "quartics       I = {}, J = {}", s.i, s.j).expect("string");
    writeln!(w, "2-torsion      rank {} over Q", s.two_torsion_rank).expect("string");
    writeln!(
        w,
        "classes        {} without a rational root, {} everywhere locally soluble, {} over Q",
        s.irreducible_classes,
        s.els_classes,
        s.elements.len()
    )
    .expect("string");
    writeln!(w, "2-Selmer rank  {} (order {})", s.rank, 1u64 << s.rank).expect("string");
    if !s.elements.is_empty() {
        writeln!(
            w,
            "non-trivial elements, one canonical quartic (a, b, c, d, e) each:"
        )
        .expect("string");
    }
    for r in &s.elements {
        writeln!(w, "  {}  {}", form_text(&r.form), r.label).expect("string");
    }
    out
}

fn bin_json(b: &SelmerBin) -> Value {
    json!({
        "from": b.lo.to_string(),
        "below": b.hi.to_string(),
        "curves": b.curves,
        "selmer_total": b.total,
        "average": b.average(),
        "curves_by_rank": b.by_rank,
    })
}

/// The statement of the family of the short family for a height bound.
pub fn selmer_family(y: i128) -> String {
    format!(
        "all integer pairs (A, B) with max(4|A|^3, 27B^2) < {y}, 4A^3 + 27B^2 != 0, no prime p \
         with p^4 | A and p^6 | B, and x^3 + Ax + B without a rational root; each pair is one \
         curve y^2 = x^3 + Ax + B"
    )
}

/// Averages of the 2-Selmer group over the family, by height bin, as text or JSON.
pub fn selmer_stats(st: &SelmerStats, json: bool, curves: bool) -> String {
    if json {
        let mut v = json!({
            "height": st.height.to_string(),
            "family": selmer_family(st.height),
            "curves": st.all.curves,
            "average": st.all.average(),
            "curves_by_rank": st.all.by_rank,
            "bins": st.bins.iter().map(bin_json).collect::<Vec<_>>(),
        });
        if curves {
            v["ranks"] = Value::Array(
                st.curves
                    .iter()
                    .map(|(a, b, r)| json!({"A": a, "B": b, "selmer_rank": r}))
                    .collect(),
            );
        }
        return format!("{v}\n");
    }
    let mut out = String::new();
    let w = &mut out;
    writeln!(w, "family: {}", selmer_family(st.height)).expect("string");
    writeln!(
        w,
        "{} curves, average size of the 2-Selmer group {:.4}",
        st.all.curves,
        st.all.average()
    )
    .expect("string");
    let ranks = st.all.by_rank.len().max(1);
    let mut header = format!(
        "{:>12} {:>12} {:>8} {:>9} {:>10}",
        "H from", "H below", "curves", "average", "cumulative"
    );
    for r in 0..ranks {
        write!(header, " {:>7}", format!("rank {r}")).expect("string");
    }
    writeln!(w, "{header}").expect("string");
    let (mut n, mut t) = (0u64, 0u64);
    for b in &st.bins {
        n += b.curves;
        t += b.total;
        let mut line = format!(
            "{:>12} {:>12} {:>8} {:>9.4} {:>10.4}",
            b.lo,
            b.hi,
            b.curves,
            b.average(),
            t as f64 / n.max(1) as f64
        );
        for r in 0..ranks {
            write!(line, " {:>7}", b.by_rank.get(r).copied().unwrap_or(0)).expect("string");
        }
        writeln!(w, "{line}").expect("string");
    }
    if curves {
        writeln!(w, "A B selmer_rank").expect("string");
        for (a, b, r) in &st.curves {
            writeln!(w, "{a} {b} {r}").expect("string");
        }
    }
    out
}

/// The lines of a verification, and the verdict.
pub fn checks(checks: &[qorbits::table::manifest::Check]) -> String {
    let mut out = String::new();
    for c in checks {
        writeln!(
            out,
            "{} {:<22} {}",
            if c.ok { "ok  " } else { "FAIL" },
            c.name,
            c.detail
        )
        .expect("string");
    }
    let failed = checks.iter().filter(|c| !c.ok).count();
    if failed == 0 {
        writeln!(out, "verified: all {} checks passed", checks.len()).expect("string");
    } else {
        writeln!(
            out,
            "verification FAILED: {failed} of {} checks",
            checks.len()
        )
        .expect("string");
    }
    out
}
