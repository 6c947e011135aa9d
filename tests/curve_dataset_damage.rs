//! The curve dataset of `qorbits selmer-stats --out` under damage: a changed value with the
//! file hash updated, truncation, flipped bytes, hostile schemas (triggers, views, column
//! types) — each caught with a one-line diagnosis — and SIGKILL at many moments of a run,
//! after which no file at the final name fails to verify and a rerun gives the right
//! content hash ("kills tried N, corrupt finished files M" with `--nocapture`).
//!
//! External sources: SQLite's file format (a page is 4096 bytes, the header records the
//! page count) for the damage; the content hash as the manifest's recipe defines it.

mod common;

use common::curves::{manifest, ok, qorbits, verify, write};
use common::fixture::{assert_one_line, TestDir};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

/// Sets the manifest's file size and SHA-256 to those of the file as it now is.
fn rehash(dir: &Path) {
    let db = std::fs::read(dir.join("curves.sqlite")).unwrap();
    let mut m = manifest(dir);
    m["file"]["bytes"] = db.len().into();
    m["file"]["sha256"] = qorbits::table::hash::hex(&sha2_digest(&db)).into();
    std::fs::write(
        dir.join("curves.manifest.json"),
        serde_json::to_string_pretty(&m).unwrap(),
    )
    .unwrap();
}

fn sha2_digest(b: &[u8]) -> Vec<u8> {
    use sha2::Digest;
    sha2::Sha256::digest(b).to_vec()
}

/// A copy of the fresh dataset in `dir/name`, with `edit` run on the file.
fn case(fresh: &Path, d: &TestDir, name: &str, edit: impl FnOnce(&Path)) -> PathBuf {
    let dir = d.join(name);
    std::fs::create_dir_all(&dir).unwrap();
    for f in ["curves.sqlite", "curves.manifest.json"] {
        std::fs::copy(fresh.join(f), dir.join(f)).unwrap();
    }
    edit(&dir.join("curves.sqlite"));
    dir
}

fn sql(db: &Path, s: &str) {
    rusqlite::Connection::open(db)
        .unwrap()
        .execute_batch(s)
        .unwrap();
}

/// `verify` fails (exit 1) with a one-line diagnosis containing `want`.
fn caught(dir: &Path, want: &str) -> String {
    let (code, out, err) = verify(dir);
    assert_eq!(code, 1, "{out}{err}");
    let last = out.lines().last().unwrap_or("");
    assert!(last.starts_with("verification FAILED"), "{out}");
    assert!(last.contains(want), "wanted {want:?} in {last}");
    last.to_string()
}

#[test]
fn damage_and_hostile_files_are_caught_in_one_line() {
    let d = TestDir::new("curves-damage");
    let fresh = d.join("fresh");
    std::fs::create_dir_all(&fresh).unwrap();
    write(&fresh, "1e4", "2");
    // A changed value, the manifest's file hash updated to match.
    let dir = case(&fresh, &d, "value", |db| {
        sql(
            db,
            "UPDATE elements SET e = e + 1 WHERE curve_id = 2 AND n = 1",
        )
    });
    rehash(&dir);
    caught(
        &dir,
        "content sha256 differs although the file sha256 matches",
    );
    // A changed rank with the file hash updated: the counts name it.
    let dir = case(&fresh, &d, "rank", |db| {
        sql(db, "UPDATE curves SET selmer_rank = 5 WHERE id = 1")
    });
    rehash(&dir);
    caught(&dir, "selmer rank");
    // Truncated by one page.
    let dir = case(&fresh, &d, "truncated", |db| {
        let n = std::fs::metadata(db).unwrap().len();
        std::fs::OpenOptions::new()
            .write(true)
            .open(db)
            .unwrap()
            .set_len(n - 4096)
            .unwrap();
    });
    caught(&dir, "truncated");
    // Hostile schema: a trigger, a view, a column of another type. Refused unread, by
    // verify (one-line diagnosis) and by cite (one line on stderr, exit 2).
    let hostile = [
        (
            "trigger",
            "CREATE TRIGGER t AFTER INSERT ON meta BEGIN SELECT 1; END",
            "has a trigger 't'",
        ),
        (
            "view",
            "CREATE VIEW v AS SELECT * FROM curves",
            "has a view 'v'",
        ),
        (
            "types",
            "CREATE TABLE c2 (id INTEGER PRIMARY KEY, A TEXT NOT NULL, B INTEGER NOT NULL, \
             height INTEGER NOT NULL, disc INTEGER NOT NULL, I INTEGER NOT NULL, J INTEGER NOT \
             NULL, two_torsion_rank INTEGER NOT NULL, selmer_rank INTEGER NOT NULL, elements \
             INTEGER NOT NULL); INSERT INTO c2 SELECT * FROM curves; DROP TABLE curves; \
             ALTER TABLE c2 RENAME TO curves; CREATE UNIQUE INDEX curves_ab ON curves (A, B);",
            "declares column curves.A as TEXT",
        ),
    ];
    for (name, edit, want) in hostile {
        let dir = case(&fresh, &d, name, |db| sql(db, edit));
        rehash(&dir);
        let last = caught(&dir, want);
        assert!(last.contains("the file is refused"), "{last}");
        let o = qorbits(&["cite", "curves.manifest.json"], &dir);
        let err = String::from_utf8_lossy(&o.stderr).into_owned();
        assert_eq!(o.status.code(), Some(2), "{err}");
        assert!(err.contains(want), "{err}");
        assert_one_line(err.trim_end());
    }
    // Flipped bytes all over the file, the manifest untouched: each is caught; count the
    // flips also caught by a check other than the file's SHA-256.
    let bytes = std::fs::read(fresh.join("curves.sqlite")).unwrap();
    let (mut tried, mut deep) = (0, 0);
    for k in 0..24usize {
        let at = 17 + k * (bytes.len() - 40) / 24;
        let dir = case(&fresh, &d, &format!("flip{k}"), |db| {
            let mut b = bytes.clone();
            b[at] ^= 0x5a;
            std::fs::write(db, b).unwrap();
        });
        let (code, out, err) = verify(&dir);
        assert_eq!(code, 1, "flip at {at}: {out}{err}");
        let last = out.lines().last().unwrap();
        assert!(last.starts_with("verification FAILED"), "{out}");
        tried += 1;
        let failed: Vec<&str> = out.lines().filter(|l| l.starts_with("FAIL")).collect();
        if failed.iter().any(|l| !l.contains("file sha256")) {
            deep += 1;
        }
        std::fs::remove_dir_all(&dir).unwrap();
    }
    println!("flips tried {tried}, caught {tried}, caught beyond the file hash {deep}");
}

/// Whether a temporary file of the dataset (`.curves.sqlite.tmp-PID`) is in `dir`.
fn temp_exists(dir: &Path) -> bool {
    std::fs::read_dir(dir).unwrap().any(|e| {
        let n = e.unwrap().file_name().to_string_lossy().into_owned();
        n.starts_with(".curves.sqlite.tmp-") || n.starts_with(".curves.manifest.json.tmp-")
    })
}

/// One run killed by SIGKILL when `when` first holds (polled every 100 µs); whether it
/// was killed before it finished.
fn killed_run(dir: &Path, when: &mut dyn FnMut(Duration) -> bool) -> bool {
    let mut child = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args([
            "selmer-stats",
            "--height",
            "3e4",
            "--out",
            "curves.sqlite",
            "--quiet",
            "--force",
        ])
        .args(["--jobs", "2"])
        .current_dir(dir)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    let t = Instant::now();
    loop {
        if child.try_wait().unwrap().is_some() {
            return false;
        }
        if when(t.elapsed()) {
            // Child::kill sends SIGKILL on Unix.
            let killed = child.kill().is_ok();
            child.wait().unwrap();
            return killed;
        }
        std::thread::sleep(Duration::from_micros(100));
    }
}

#[test]
fn sigkill_at_any_moment_leaves_no_finished_looking_corrupt_file() {
    let d = TestDir::new("curves-kill");
    let reference = d.join("reference");
    std::fs::create_dir_all(&reference).unwrap();
    let t = Instant::now();
    write(&reference, "3e4", "2");
    let run = t.elapsed();
    let want = manifest(&reference)["content_sha256"].clone();
    let work = d.join("work");
    std::fs::create_dir_all(&work).unwrap();
    let (mut tried, mut corrupt, mut during_temp, mut finished) = (0, 0, 0, 0);
    let (db, man) = (
        work.join("curves.sqlite"),
        work.join("curves.manifest.json"),
    );
    let mut after_kill = |tried: &mut u32, corrupt: &mut u32, killed: bool| {
        *tried += u32::from(killed);
        if db.exists() {
            finished += 1;
            let (code, out, _) = verify(&work);
            if code != 0 {
                *corrupt += 1;
                eprintln!("a killed run left a finished-looking file that fails: {out}");
            }
        }
        // The next run starts without the final files (leftover temporary files stay).
        let _ = std::fs::remove_file(&db);
        let _ = std::fs::remove_file(&man);
    };
    // 12 moments spread evenly over the measured run.
    for k in 0..12u32 {
        let at = run.mul_f64((f64::from(k) + 0.5) / 12.0);
        let killed = killed_run(&work, &mut |e| e >= at);
        after_kill(&mut tried, &mut corrupt, killed);
    }
    // 12 moments after the temporary file appears (while it is written and flushed):
    // k² polls later for k = 0 … 11.
    for k in 0..12u32 {
        let mut seen: Option<u32> = None;
        let killed = killed_run(&work, &mut |_| {
            if let Some(n) = seen.as_mut() {
                *n += 1;
                return *n > k * k;
            }
            if temp_exists(&work) {
                seen = Some(0);
                return k == 0;
            }
            false
        });
        during_temp += u32::from(killed && seen.is_some());
        after_kill(&mut tried, &mut corrupt, killed);
    }
    // 6 moments around the final rename: 0 to 5 polls after the manifest (written just
    // before the rename) appears.
    for k in 0..6u32 {
        let mut seen: Option<u32> = None;
        let killed = killed_run(&work, &mut |_| {
            if let Some(n) = seen.as_mut() {
                *n += 1;
                return *n > k;
            }
            if man.exists() {
                seen = Some(0);
                return k == 0;
            }
            false
        });
        during_temp += u32::from(killed && seen.is_some());
        after_kill(&mut tried, &mut corrupt, killed);
    }
    println!(
        "kills tried {tried}, corrupt finished files {corrupt} ({during_temp} after the \
         temporary file appeared, {finished} runs left a finished file, run {run:?})"
    );
    assert!(
        tried >= 20,
        "only {tried} runs were killed before they finished"
    );
    assert!(
        during_temp >= 5,
        "only {during_temp} kills after the temporary file appeared"
    );
    assert_eq!(corrupt, 0);
    // A rerun (leftover temporary files and a lone manifest may be there) ends right.
    let o = qorbits(
        &[
            "selmer-stats",
            "--height",
            "3e4",
            "--out",
            "curves.sqlite",
            "--quiet",
            "--force",
        ],
        &work,
    );
    ok(&o);
    assert_eq!(manifest(&work)["content_sha256"], want);
    assert_eq!(verify(&work).0, 0);
}
