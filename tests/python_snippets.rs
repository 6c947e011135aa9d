//! The README section "Reading a table from Python", run as written: every ```python block
//! of the section in order, in one Python 3 session with only the standard library, in a
//! directory holding the published H < 10⁵ tier; what each block prints must be exactly
//! the ```text block after it. A second check asks the same questions through qorbits'
//! own reader, so the shown outputs are also the table's content.

mod common;

use common::tier::tier_1e5;
use std::process::Command;

/// (code, expected output) of each snippet of the README section.
fn snippets() -> Vec<(String, String)> {
    let readme =
        std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    let section = readme
        .split("## Reading a table from Python")
        .nth(1)
        .expect("README.md has the section")
        .split("\n## ")
        .next()
        .unwrap();
    let mut out = Vec::new();
    let mut rest = section;
    while let Some(k) = rest.find("```python\n") {
        let after = &rest[k + 10..];
        let end = after.find("```\n").unwrap();
        let code = after[..end].to_string();
        let after = &after[end + 4..];
        let t = after
            .find("```text\n")
            .expect("a text block after each python block");
        let body = &after[t + 8..];
        let tend = body.find("```\n").unwrap();
        out.push((code, body[..tend].to_string()));
        rest = &body[tend + 4..];
    }
    out
}

#[test]
fn the_python_snippets_print_what_the_readme_shows() {
    let s = snippets();
    assert_eq!(
        s.len(),
        4,
        "pair, Galois counts, local data, join with pairs"
    );
    let db = tier_1e5();
    let dir = db.parent().unwrap();
    let mark = "=== qorbits snippet end ===";
    let program: String = s
        .iter()
        .map(|(code, _)| format!("{code}print({mark:?})\n"))
        .collect();
    let o = Command::new("python3")
        .arg("-c")
        .arg(&program)
        .current_dir(dir)
        .output()
        .expect("python3 is needed for this test");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let printed = String::from_utf8(o.stdout).unwrap();
    let parts: Vec<&str> = printed.split(&format!("{mark}\n")).collect();
    assert_eq!(parts.len(), s.len() + 1);
    for ((code, want), got) in s.iter().zip(&parts) {
        assert_eq!(got, want, "the snippet\n{code}\nprints something else");
    }
}

#[test]
fn the_shown_outputs_are_the_tables_content() {
    use qorbits::table::reader::{open_table, pair_from_table};
    let conn = open_table(&tier_1e5()).unwrap();
    let pair = pair_from_table(&conn, 28, -160).unwrap();
    let s = snippets();
    let shown: Vec<&str> = s[0].1.lines().collect();
    assert_eq!(shown.len(), pair.classes.len());
    for (line, r) in shown.iter().zip(&pair.classes) {
        let f: Vec<String> = r.form.iter().map(|c| c.to_string()).collect();
        let want = format!(
            "{} {} {} {}",
            r.label,
            f.join(" "),
            r.galois.unwrap().name(),
            u8::from(r.els())
        );
        assert_eq!(*line, want);
    }
    // The Galois counts are the manifest's.
    let m = qorbits::table::manifest::read_manifest(std::path::Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/manifests/qorbits-h1e5.manifest.json"
    )))
    .unwrap();
    for line in s[1].1.lines() {
        let (g, n) = line.split_once(' ').unwrap();
        assert_eq!(m.counts.by_galois[g].to_string(), n, "{line}");
    }
}
