//! The build through sorted runs (DESIGN §5, §7): it gives the bytes of the committed
//! manifests, a killed build resumed with `--resume` ends with the same bytes (and without
//! `--resume` its leftovers are removed), shards merge to the single-machine bytes, and a
//! missing, foreign or damaged shard is refused with one line naming it.

mod common;

use common::fixture::TestDir;
use common::run::{command, kill_at, ok, qorbits, verify_against, Point};
use std::process::Command;
use std::time::{Duration, Instant};

#[test]
fn a_killed_build_resumes_to_the_same_bytes() {
    let d = TestDir::new("resume");
    let table = d.join("qorbits-h1e6.sqlite");
    let work = d.join(".qorbits-h1e6.sqlite.work");
    let mut kills = 0;
    // Kill the build at several moments (after 0.3 s, 0.6 s, ...) and resume each time.
    for delay in [300u64, 600, 900] {
        let mut build = command(
            &[
                "build", "--height", "1e6", "--quiet", "--jobs", "2", "--resume",
            ],
            &d.0,
        );
        if kill_at(&mut build, &Point::At(Duration::from_millis(delay))).is_some() {
            kills += 1;
        }
        if table.exists() {
            break;
        }
    }
    assert!(
        kills > 0,
        "the build finished before the first kill; lower the delays"
    );
    // The resumed build finishes the work, or finds the table complete and removes what
    // a kill after the rename left.
    let s = ok(&qorbits(
        &["build", "--height", "1e6", "--quiet", "--resume"],
        &d.0,
    ));
    assert!(s.contains("wrote") || s.contains("is complete"), "{s}");
    verify_against(&table, "1e6", &d.0);
    assert!(
        !work.exists(),
        "the work directory is removed after the build"
    );
}

#[test]
fn without_resume_leftovers_are_removed_and_foreign_directories_refused() {
    let d = TestDir::new("leftovers");
    let work = d.join(".t.sqlite.work");
    // Leftovers of an interrupted build: a marked work directory with a stray file.
    std::fs::create_dir(&work).unwrap();
    std::fs::write(work.join("qorbits-work"), b"").unwrap();
    std::fs::write(work.join("chunk-000000.run"), b"garbage from a crash").unwrap();
    ok(&qorbits(
        &["build", "--height", "1e5", "--out", "t.sqlite", "--quiet"],
        &d.0,
    ));
    verify_against(&d.join("t.sqlite"), "1e5", &d.0);
    assert!(!work.exists());
    // A directory that is not ours is never removed.
    let foreign = d.join(".u.sqlite.work");
    std::fs::create_dir(&foreign).unwrap();
    std::fs::write(foreign.join("precious.txt"), b"keep").unwrap();
    let o = qorbits(
        &["build", "--height", "1e4", "--out", "u.sqlite", "--quiet"],
        &d.0,
    );
    assert_eq!(o.status.code(), Some(2));
    let e = String::from_utf8_lossy(&o.stderr);
    assert!(
        e.contains("not a qorbits work directory") && e.lines().count() == 1,
        "{e}"
    );
    assert_eq!(
        std::fs::read(foreign.join("precious.txt")).unwrap(),
        b"keep"
    );
    // A damaged run of a resumed build is recomputed, not merged.
    let v = d.join(".v.sqlite.work");
    let mut child = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args([
            "build", "--height", "1e6", "--out", "v.sqlite", "--quiet", "--jobs", "1",
        ])
        .current_dir(&d.0)
        .spawn()
        .unwrap();
    let t = Instant::now();
    while t.elapsed() < Duration::from_secs(20) {
        let runs = std::fs::read_dir(&v)
            .map(|r| {
                r.filter(|e| {
                    e.as_ref()
                        .unwrap()
                        .file_name()
                        .to_string_lossy()
                        .ends_with(".run")
                })
                .count()
            })
            .unwrap_or(0);
        if runs >= 1 || child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(Duration::from_millis(10));
    }
    let _ = child.kill();
    child.wait().unwrap();
    if let Some(run) = std::fs::read_dir(&v).ok().and_then(|mut r| {
        r.find(|e| {
            e.as_ref()
                .unwrap()
                .file_name()
                .to_string_lossy()
                .ends_with(".run")
        })
    }) {
        let run = run.unwrap().path();
        let mut bytes = std::fs::read(&run).unwrap();
        let k = bytes.len() / 2;
        bytes[k] ^= 0x55;
        std::fs::write(&run, bytes).unwrap();
    }
    ok(&qorbits(
        &[
            "build", "--height", "1e6", "--out", "v.sqlite", "--quiet", "--resume",
        ],
        &d.0,
    ));
    verify_against(&d.join("v.sqlite"), "1e6", &d.0);
}

#[test]
fn shards_merge_to_the_single_machine_bytes() {
    let d = TestDir::new("shards");
    for k in 1..=4 {
        let s = ok(&qorbits(
            &[
                "build",
                "--height",
                "1e6",
                "--shard",
                &format!("{k}/4"),
                "--out",
                &format!("s{k}"),
                "--quiet",
            ],
            &d.0,
        ));
        assert!(s.contains(&format!("shard {k} of 4")), "{s}");
    }
    // A finished shard is not recomputed (its files are kept as they are).
    let before = std::fs::read(d.join("s2/shard.json")).unwrap();
    ok(&qorbits(
        &[
            "build", "--height", "1e6", "--shard", "2/4", "--out", "s2", "--quiet",
        ],
        &d.0,
    ));
    assert_eq!(std::fs::read(d.join("s2/shard.json")).unwrap(), before);
    ok(&qorbits(
        &[
            "merge", "s1", "s2", "s3", "s4", "--out", "m.sqlite", "--quiet",
        ],
        &d.0,
    ));
    verify_against(&d.join("m.sqlite"), "1e6", &d.0);
    let refuse = |args: &[&str], needle: &str| {
        let o = qorbits(args, &d.0);
        let e = String::from_utf8_lossy(&o.stderr).into_owned();
        assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
        assert_eq!(e.lines().count(), 1, "{e}");
        assert!(e.contains(needle), "{args:?}: {e} lacks {needle}");
    };
    refuse(
        &["merge", "s1", "s2", "s4", "--out", "x.sqlite"],
        "shard 3 of 4 is missing",
    );
    refuse(
        &["merge", "s1", "s2", "s2", "s4", "--out", "x.sqlite"],
        "given twice",
    );
    ok(&qorbits(
        &[
            "build", "--height", "1e5", "--shard", "3/4", "--out", "f3", "--quiet",
        ],
        &d.0,
    ));
    refuse(
        &["merge", "s1", "s2", "f3", "s4", "--out", "x.sqlite"],
        "f3 is a shard of another build",
    );
    refuse(
        &["merge", "s1", "s2", "nothere", "s4", "--out", "x.sqlite"],
        "nothere is not a finished shard",
    );
    // A damaged run is caught by its hash, the shard named; rebuilding the shard repairs it.
    let run = std::fs::read_dir(d.join("s4"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .find(|p| p.extension().is_some_and(|x| x == "run"))
        .unwrap();
    let mut bytes = std::fs::read(&run).unwrap();
    let k = bytes.len() / 3;
    bytes[k] ^= 1;
    std::fs::write(&run, &bytes).unwrap();
    refuse(
        &["merge", "s1", "s2", "s3", "s4", "--out", "x.sqlite"],
        "s4",
    );
    assert!(!d.join("x.sqlite").exists());
    ok(&qorbits(
        &[
            "build", "--height", "1e6", "--shard", "4/4", "--out", "s4", "--quiet",
        ],
        &d.0,
    ));
    ok(&qorbits(
        &[
            "merge", "s1", "s2", "s3", "s4", "--out", "x.sqlite", "--quiet",
        ],
        &d.0,
    ));
    verify_against(&d.join("x.sqlite"), "1e6", &d.0);
}

#[test]
fn plan_predicts_and_the_shard_option_is_checked() {
    let d = TestDir::new("plan");
    let s = ok(&qorbits(&["plan", "--height", "1e7", "--quiet"], &d.0));
    for key in [
        "chunks",
        "candidates",
        "classes",
        "time",
        "table",
        "disk",
        "memory",
    ] {
        assert!(s.lines().any(|l| l.starts_with(key)), "{key}: {s}");
    }
    // The expected classes are within 15 % of the published count (143848 at 10⁷).
    let line = s.lines().find(|l| l.starts_with("classes")).unwrap();
    let n: f64 = line.split_whitespace().nth(2).unwrap().parse().unwrap();
    assert!((n / 143_848.0 - 1.0).abs() < 0.15, "{line}");
    for bad in ["0/4", "5/4", "x", "3"] {
        let o = qorbits(&["build", "--height", "1e4", "--shard", bad], &d.0);
        assert_eq!(o.status.code(), Some(2), "{bad}");
    }
}
