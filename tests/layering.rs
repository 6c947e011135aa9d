//! The data flows one way (DEVELOPERS.md, "Architecture"): each folder of `src/` is a stage,
//! and a module may use only its own stage and earlier ones. An import that goes upward
//! must stand out: it is allowed only on a line marked `// upward:` with the reason. This
//! test reads every library source file and fails on any unmarked upward reference.

use std::path::Path;

/// The stages in data-flow order; `error` and `progress` serve all of them.
const STAGES: [&str; 5] = ["arith", "form", "enumerate", "table", "selmer"];

fn stage(name: &str) -> Option<usize> {
    match name {
        "error" | "progress" => Some(0),
        _ => STAGES.iter().position(|s| *s == name).map(|k| k + 1),
    }
}

fn sources(dir: &Path, out: &mut Vec<std::path::PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            sources(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

#[test]
fn no_stage_uses_a_later_one_unmarked() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    sources(&src, &mut files);
    let mut checked = 0;
    let mut violations = Vec::new();
    for f in files {
        let rel = f.strip_prefix(&src).unwrap();
        let top = rel
            .components()
            .next()
            .unwrap()
            .as_os_str()
            .to_string_lossy();
        let top = top.trim_end_matches(".rs");
        if top == "cli" || top == "lib" {
            continue; // the binary sits above every stage; lib.rs only declares them
        }
        let own = stage(top).unwrap_or_else(|| panic!("{} is in no stage", rel.display()));
        let text = std::fs::read_to_string(&f).unwrap();
        for (n, line) in text.lines().enumerate() {
            let code = line.split("//").next().unwrap_or("");
            for (k, _) in code.match_indices("crate::") {
                let rest = &code[k + "crate::".len()..];
                let name: String = rest
                    .chars()
                    .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
                    .collect();
                let Some(used) = stage(&name) else { continue };
                checked += 1;
                if used > own && !line.contains("// upward:") {
                    violations.push(format!("{}:{}: {}", rel.display(), n + 1, line.trim()));
                }
            }
        }
    }
    assert!(checked > 100, "only {checked} references read");
    assert!(
        violations.is_empty(),
        "upward imports without an `// upward:` mark:\n{}",
        violations.join("\n")
    );
}
