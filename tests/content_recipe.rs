//! The content hash a paper cites can be recomputed without qorbits: the manifest's recipe,
//! run with Debian's sqlite3 shell and sha256sum (coreutils), gives the same hex digest.
//! Also: files that are not qorbits tables are refused with a clear message.

use qorbits::manifest::manifest_for;
use qorbits::store::{open_table, write_table};
use qorbits::table::{enumerate_classes, Params};
use std::process::Command;

#[test]
fn shell_recipe_reproduces_the_content_hash() {
    let dir = std::env::temp_dir().join(format!("qorbits-recipe-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let params = Params {
        height: 20_000,
        include_reducible: true,
    };
    let rows = enumerate_classes(&params, None).unwrap().rows;
    let db = dir.join("t.sqlite");
    write_table(&db, &params, &rows, true).unwrap();
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
fn foreign_files_are_refused_clearly() {
    let dir = std::env::temp_dir().join(format!("qorbits-foreign-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let junk = dir.join("junk.sqlite");
    std::fs::write(&junk, vec![7u8; 10_000]).unwrap();
    let e = open_table(&junk).unwrap_err().to_string();
    assert!(e.contains("junk.sqlite") && !e.contains('\n'), "{e}");
    let other = dir.join("other.sqlite");
    let c = rusqlite::Connection::open(&other).unwrap();
    c.execute_batch("CREATE TABLE t (x INTEGER); INSERT INTO t VALUES (1);")
        .unwrap();
    drop(c);
    let e = open_table(&other).unwrap_err().to_string();
    assert!(e.contains("other.sqlite") && !e.contains('\n'), "{e}");
    let e = open_table(&dir.join("missing.sqlite"))
        .unwrap_err()
        .to_string();
    assert!(e.contains("missing.sqlite"), "{e}");
    let _ = std::fs::remove_dir_all(&dir);
}
