//! The content hash a paper cites can be recomputed without qorbits: the manifest's recipe,
//! run with Debian's sqlite3 shell and sha256sum (coreutils), gives the same hex digest.
//! Our own rendering equals the shell's, line by line.
//!
//! The recipe is a pipe `sqlite3 … | sha256sum`. A POSIX `sh` pipe has the status of its
//! last command, so a failing sqlite3 would still print a hash (of its partial output); the
//! tests run the recipe under bash with `set -o pipefail`, check sqlite3's own exit status
//! separately, and show that a failing sqlite3 makes the recipe fail.

mod common;

use common::fixture::{table, TestDir};
use qorbits::progress::Silent;
use qorbits::table::hash::{content_sha256, render_content};
use qorbits::table::manifest::{content_recipe, manifest_for};
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::reader::open_table;
use qorbits::table::row::Params;
use qorbits::table::schema::CONTENT_SQL;
use qorbits::table::writer::write_table;
use sha2::{Digest, Sha256};
use std::process::Command;

/// Run a shell command line in `dir` under bash with `set -o pipefail`: a pipe fails when
/// any of its commands fails.
fn run_pipefail(line: &str, dir: &std::path::Path) -> std::process::Output {
    Command::new("bash")
        .arg("-c")
        .arg(format!("set -o pipefail; {line}"))
        .current_dir(dir)
        .output()
        .expect("bash is needed for this test")
}

/// The sqlite3 part of a recipe (everything before `| sha256sum`).
fn sqlite3_part(recipe: &str) -> &str {
    recipe
        .strip_suffix(" | sha256sum")
        .expect("the recipe pipes into sha256sum")
}

/// Run the recipe's sqlite3 command alone and require exit status 0 and no stderr.
fn assert_sqlite3_succeeds(recipe: &str, dir: &std::path::Path) {
    let out = run_pipefail(sqlite3_part(recipe), dir);
    assert!(
        out.status.success() && out.stderr.is_empty(),
        "sqlite3 failed ({:?}): {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(!out.stdout.is_empty(), "sqlite3 printed nothing");
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

#[test]
fn shell_recipe_reproduces_the_content_hash() {
    let dir = std::env::temp_dir().join(format!("qorbits-recipe-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let params = Params {
        height: 20_000,
        include_reducible: true,
    };
    let t = enumerate_classes(&params, &Silent).unwrap();
    let db = dir.join("t.sqlite");
    write_table(&db, &t, true).unwrap();
    let m = manifest_for(&db).unwrap();
    assert!(
        Command::new("sqlite3").arg("-version").output().is_ok(),
        "the sqlite3 shell is needed for this test: apt-get install sqlite3"
    );
    assert_sqlite3_succeeds(&m.content_recipe, &dir);
    let out = run_pipefail(&m.content_recipe, &dir);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let shell = String::from_utf8(out.stdout).unwrap();
    assert_eq!(shell.split_whitespace().next().unwrap(), m.content_sha256);
    // Changing one value changes the content hash computed by the shell.
    let st = Command::new("sqlite3")
        .arg(&db)
        .arg("UPDATE classes SET stabiliser = stabiliser + 1 WHERE id = 7")
        .status()
        .unwrap();
    assert!(st.success());
    assert_sqlite3_succeeds(&m.content_recipe, &dir);
    let again = run_pipefail(&m.content_recipe, &dir);
    assert!(again.status.success());
    assert_ne!(
        String::from_utf8(again.stdout)
            .unwrap()
            .split_whitespace()
            .next()
            .unwrap(),
        m.content_sha256
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn content_hash_equals_the_sqlite3_shell_recipe() {
    let d = TestDir::new("shell");
    let p = d.join("t.sqlite");
    write_table(&p, table(), false).unwrap();
    let m = manifest_for(&p).unwrap();
    assert_eq!(m.content_recipe, content_recipe("t.sqlite"));
    assert!(m.content_recipe.contains(CONTENT_SQL));
    let shell = sqlite3_part(&m.content_recipe);
    let probe = Command::new("sqlite3").arg("-version").output();
    assert!(
        probe.is_ok_and(|o| o.status.success()),
        "the sqlite3 shell is needed for this test: apt-get install sqlite3"
    );
    // The recipe as printed, minus the final hash, run in the table's directory; sqlite3's
    // own exit status must be 0.
    let out = run_pipefail(shell, &d.0);
    assert!(
        out.status.success() && out.stderr.is_empty(),
        "sqlite3: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let mut ours = Vec::new();
    render_content(&open_table(&p).unwrap(), &mut ours).unwrap();
    assert!(!ours.is_empty());
    if out.stdout != ours {
        let (a, b) = (
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&ours),
        );
        let first = a.lines().zip(b.lines()).find(|(x, y)| x != y);
        panic!("rendering differs from the sqlite3 shell; first differing lines: {first:?}");
    }
    assert_eq!(hex(&Sha256::digest(&out.stdout)), m.content_sha256);
    assert_eq!(
        content_sha256(&open_table(&p).unwrap()).unwrap(),
        m.content_sha256
    );
    // The whole recipe, with coreutils sha256sum.
    let full = run_pipefail(&m.content_recipe, &d.0);
    assert!(full.status.success());
    let text = String::from_utf8(full.stdout).unwrap();
    assert_eq!(
        text.split_whitespace().next(),
        Some(m.content_sha256.as_str())
    );
}

#[test]
fn a_failing_sqlite3_makes_the_recipe_fail_instead_of_hashing() {
    let d = TestDir::new("failing-sqlite3");
    // No table of that name exists in the directory: sqlite3 opens an empty database, the
    // first SELECT fails ("no such table") and sqlite3 exits non-zero.
    let recipe = content_recipe("missing.sqlite");
    let alone = run_pipefail(sqlite3_part(&recipe), &d.0);
    assert!(
        !alone.status.success(),
        "sqlite3 succeeded on a missing table"
    );
    assert!(!alone.stderr.is_empty(), "sqlite3 said nothing");
    // With pipefail the recipe fails.
    let out = run_pipefail(&recipe, &d.0);
    assert!(
        !out.status.success(),
        "the recipe succeeded: {}",
        String::from_utf8_lossy(&out.stdout)
    );
    // Without it, a POSIX sh pipe reports sha256sum's success and a hash of nothing, the
    // SHA-256 of the empty string (computed here by the sha2 crate; the constant below is
    // recalled from memory): this is why the tests use pipefail and check sqlite3 alone.
    let plain = Command::new("sh")
        .arg("-c")
        .arg(&recipe)
        .current_dir(&d.0)
        .output()
        .unwrap();
    assert!(plain.status.success());
    assert_eq!(
        String::from_utf8(plain.stdout)
            .unwrap()
            .split_whitespace()
            .next(),
        Some(hex(&Sha256::digest(b"")).as_str())
    );
    assert_eq!(
        hex(&Sha256::digest(b"")),
        "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
    );
}
