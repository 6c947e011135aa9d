//! The content hash a paper cites can be recomputed without qorbits: the manifest's recipe,
//! run with Debian's sqlite3 shell and sha256sum (coreutils), gives the same hex digest.
//! Our own rendering equals the shell's, line by line.

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
    let out = Command::new("sh")
        .arg("-c")
        .arg(&m.content_recipe)
        .current_dir(&dir)
        .output()
        .unwrap();
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
    let again = Command::new("sh")
        .arg("-c")
        .arg(&m.content_recipe)
        .current_dir(&dir)
        .output()
        .unwrap();
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
    let shell = m
        .content_recipe
        .strip_suffix(" | sha256sum")
        .expect("the recipe pipes into sha256sum");
    let probe = Command::new("sqlite3").arg("-version").output();
    assert!(
        probe.is_ok_and(|o| o.status.success()),
        "the sqlite3 shell is needed for this test: apt-get install sqlite3"
    );
    // The recipe as printed, minus the final hash, run by a POSIX shell in the table's directory.
    let out = Command::new("sh")
        .arg("-c")
        .arg(shell)
        .current_dir(&d.0)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
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
    let full = Command::new("sh")
        .arg("-c")
        .arg(&m.content_recipe)
        .current_dir(&d.0)
        .output()
        .unwrap();
    assert!(full.status.success());
    let text = String::from_utf8(full.stdout).unwrap();
    assert_eq!(
        text.split_whitespace().next(),
        Some(m.content_sha256.as_str())
    );
}
