//! Full disks and failing writes: on a small tmpfs mounted by the test (skipped with a
//! notice where mounting is not permitted) and under a file-size limit set for the child
//! (RLIMIT_FSIZE, which the binary must meet as EFBIG, not as a fatal SIGXFSZ), every
//! command fails with exactly one line on stderr naming the file, the free space and the
//! estimated need, leaves no file that looks finished and no temporary file; a build keeps
//! its completed runs for `--resume` and says so, and the resumed build ends with the
//! content hash of the committed manifest. Outside sources: the committed manifest
//! `manifests/qorbits-h1e5.manifest.json` (hash, table size) and the published tier file.

mod common;

use common::fixture::TestDir;
use common::run::{command, committed_hash, ok, one_line_error, qorbits, two_shards_1e5};
use common::tmpfs::{entries, Tmpfs};
use std::os::unix::process::CommandExt;
use std::path::Path;
use std::process::{Command, Output};

const TABLE: &str = "qorbits-h1e5.sqlite";
const MANIFEST: &str = "qorbits-h1e5.manifest.json";
const WORK: &str = ".qorbits-h1e5.sqlite.work";

/// Bytes of the published table H < 10⁵ (its committed manifest).
fn table_bytes() -> u64 {
    let text = std::fs::read_to_string(common::run::committed("1e5")).unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    v["file"]["bytes"].as_u64().unwrap()
}

/// The command with a file-size limit of `bytes` for the child.
fn limited(mut c: Command, bytes: u64) -> Output {
    // SAFETY: only async-signal-safe calls between fork and exec.
    unsafe {
        c.pre_exec(move || {
            let r = libc::rlimit {
                rlim_cur: bytes as libc::rlim_t,
                rlim_max: bytes as libc::rlim_t,
            };
            if libc::setrlimit(libc::RLIMIT_FSIZE, &r) != 0 {
                return Err(std::io::Error::last_os_error());
            }
            Ok(())
        });
    }
    c.output().unwrap()
}

/// A number in the message before `unit_after` (`"… needs about 581.4 kB"`), in bytes.
fn bytes_after(msg: &str, key: &str) -> f64 {
    let rest = &msg[msg.find(key).unwrap_or_else(|| panic!("{key}: {msg}")) + key.len()..];
    let mut words = rest.split_whitespace();
    let n: f64 = words.next().unwrap().parse().unwrap();
    let unit = words.next().unwrap().trim_end_matches([',', ')', ';']);
    n * match unit {
        "B" => 1.0,
        "kB" => 1e3,
        "MB" => 1e6,
        "GB" => 1e9,
        u => panic!("unit {u} in {msg}"),
    }
}

/// No temporary file, journal or finished-looking output anywhere under `dir`.
fn nothing_partial(dir: &Path) {
    for (p, _) in common::run::files_under(dir, 3) {
        let n = p.file_name().unwrap().to_string_lossy().into_owned();
        for bad in [".tmp-", "-journal", "-wal", "rebuild.sqlite"] {
            assert!(!n.contains(bad), "{} left behind", p.display());
        }
    }
    assert!(!dir.join(TABLE).exists() && !dir.join(MANIFEST).exists());
}

/// The kept runs of a failed build: whole runs, the plan and the marker, nothing else.
fn kept_runs(work: &Path) -> usize {
    let names = entries(work);
    let runs = names
        .iter()
        .filter(|n| n.starts_with("chunk-") && n.ends_with(".run"))
        .count();
    assert_eq!(names.len(), runs + 2, "{names:?}");
    assert!(
        runs > 0 && names.contains(&"plan.json".to_string()),
        "{names:?}"
    );
    runs
}

fn resume_to_the_committed_hash(dir: &Path) {
    let s = ok(&qorbits(
        &["build", "--height", "1e5", "--quiet", "--resume"],
        dir,
    ));
    assert!(s.contains("resumed:"), "the runs were reused: {s}");
    assert!(
        s.contains(&format!("content sha256 {}", committed_hash("1e5"))),
        "{s}"
    );
    assert_eq!(entries(dir), [MANIFEST, TABLE]);
}

#[test]
fn build_on_a_small_file_system_keeps_its_runs_and_resumes() {
    let Some(fs) = Tmpfs::mount("build", "size=256k") else {
        return;
    };
    let build = ["build", "--height", "1e5", "--quiet"];
    // The check before any work: refused, nothing written.
    let e = one_line_error(&qorbits(&build, fs.path()));
    assert!(
        e.contains("not enough free disk") && e.contains("needs about"),
        "{e}"
    );
    assert!(fs.entries().is_empty(), "{:?}", fs.entries());
    // Past the check, the table does not fit.
    let o = qorbits(
        &["build", "--height", "1e5", "--quiet", "--ignore-disk"],
        fs.path(),
    );
    let e = one_line_error(&o);
    says_needing(
        &e,
        &[
            "cannot write qorbits-h1e5.sqlite",
            "the file system is full",
            "free on it",
            "the build (table and runs) needs about",
            "completed runs",
            "kept in ./.qorbits-h1e5.sqlite.work",
            "--resume",
            "rm -r ./.qorbits-h1e5.sqlite.work",
        ],
        table_bytes() as f64,
    );
    assert!(bytes_after(&e, "full (") <= 256.0 * 1024.0, "{e}");
    assert_eq!(fs.entries(), [WORK]);
    let runs = kept_runs(&fs.join(WORK));
    assert!(e.contains(&format!("{runs} completed run")), "{e}");
    nothing_partial(fs.path());
    // Room made: the resumed build reuses the runs and ends with the published bytes.
    fs.remount("size=4m");
    resume_to_the_committed_hash(fs.path());
}

#[test]
fn build_under_a_file_size_limit_fails_in_one_line_and_resumes() {
    let d = TestDir::new("fsize-build");
    let o = limited(
        command(&["build", "--height", "1e5", "--quiet"], &d.0),
        200_000,
    );
    let e = one_line_error(&o);
    says(
        &e,
        &[
            "cannot write qorbits-h1e5.sqlite",
            "file-size limit of 200.0 kB",
            "ulimit -f",
            "needs about",
            "--resume",
        ],
    );
    assert_eq!(d.entries(), [WORK]);
    kept_runs(&d.join(WORK));
    nothing_partial(&d.0);
    resume_to_the_committed_hash(&d.0);
}

#[test]
fn a_manifest_that_cannot_be_written_leaves_no_table() {
    // Inodes for the work directory, its files and the table, none for the manifest: the
    // table is whole when its manifest fails. Decided: the table is removed (the runs stay,
    // so `--resume` only merges again).
    let mut found = false;
    for n in 4..=12 {
        let Some(fs) = Tmpfs::mount("manifest", &format!("size=4m,nr_inodes={n}")) else {
            return;
        };
        let o = qorbits(&["build", "--height", "1e5", "--quiet"], fs.path());
        if o.status.success() {
            break;
        }
        let e = one_line_error(&o);
        if !e.contains("cannot write qorbits-h1e5.manifest.json") {
            continue;
        }
        found = true;
        assert!(
            e.contains("no free inodes") && e.contains("--resume"),
            "{e}"
        );
        assert_eq!(fs.entries(), [WORK], "no table without its manifest");
        kept_runs(&fs.join(WORK));
        nothing_partial(fs.path());
        fs.remount("nr_inodes=64");
        resume_to_the_committed_hash(fs.path());
        break;
    }
    assert!(found, "no inode count made the manifest fail alone");
}

#[test]
fn merge_onto_a_full_file_system_leaves_nothing() {
    let d = TestDir::new("full-merge");
    two_shards_1e5(&d.0);
    let Some(fs) = Tmpfs::mount("merge", "size=128k") else {
        return;
    };
    let out = fs.join(TABLE);
    let (s1, s2) = (d.join("s1"), d.join("s2"));
    let args = [
        "merge",
        s1.to_str().unwrap(),
        s2.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ];
    let e = one_line_error(&qorbits(&args, &d.0));
    says_needing(
        &e,
        &[
            format!("cannot write {}", out.display()).as_str(),
            "the file system is full",
            "the merge needs about",
            "no partial file is left",
        ],
        0.9 * table_bytes() as f64,
    );
    assert!(fs.entries().is_empty(), "{:?}", fs.entries());
    // The shards are untouched: the same merge with room gives the published bytes.
    fs.remount("size=4m");
    let s = ok(&qorbits(&args, &d.0));
    assert!(s.contains(&committed_hash("1e5")), "{s}");
}

#[test]
fn verify_rebuild_with_a_full_temporary_directory_leaves_nothing() {
    let m = common::run::committed("1e5");
    let args = ["verify", "--rebuild", m.to_str().unwrap(), "--quiet"];
    let cwd = TestDir::new("full-rebuild");
    // Under a file-size limit (any machine): the write fails, the private directory goes.
    let tmp = TestDir::new("full-rebuild-tmp");
    let mut c = command(&args, &cwd.0);
    c.env("TMPDIR", &tmp.0);
    let e = one_line_error(&limited(c, 200_000));
    says(
        &e,
        &[
            "cannot write",
            "rebuild.sqlite",
            "file-size limit",
            "the rebuild in the temporary directory (TMPDIR) needs about",
            "no partial file is left",
        ],
    );
    assert!(
        tmp.entries().is_empty() && cwd.entries().is_empty(),
        "{:?}",
        tmp.entries()
    );
    // TMPDIR on a full tmpfs: refused in one line, nothing left beside the filler.
    let Some(fs) = Tmpfs::mount("rebuild", "size=256k") else {
        return;
    };
    let filler = fs.join("filler");
    let mut f = std::fs::File::create(&filler).unwrap();
    let block = vec![7u8; 4096];
    while std::io::Write::write_all(&mut f, &block).is_ok() {}
    drop(f);
    let mut c = command(&args, &cwd.0);
    c.env("TMPDIR", fs.path());
    let e = one_line_error(&c.output().unwrap());
    assert!(
        e.contains("needs about") && e.contains(&fs.path().display().to_string()),
        "{e}"
    );
    assert_eq!(fs.entries(), ["filler"]);
    assert!(cwd.entries().is_empty());
    // TMPDIR with no inode left: the private directory itself cannot be made.
    std::fs::remove_file(&filler).unwrap();
    let Some(full) = Tmpfs::mount("rebuild-inodes", "size=4m,nr_inodes=1") else {
        return;
    };
    let mut c = command(&args, &cwd.0);
    c.env("TMPDIR", full.path());
    let e = one_line_error(&c.output().unwrap());
    assert!(
        e.contains("no free inodes") && e.contains("qorbits-rebuild-"),
        "{e}"
    );
    assert!(full.entries().is_empty());
}

#[test]
fn export_and_release_onto_a_full_file_system_leave_nothing() {
    let db = common::tier::tier_1e5();
    let db = db.to_str().unwrap();
    let Some(fs) = Tmpfs::mount("export", "size=16k") else {
        return;
    };
    let here = fs.path().to_path_buf();
    for (format, gzip, file) in [
        ("csv", false, "classes.csv"),
        ("jsonl", true, "classes.jsonl.gz"),
    ] {
        let out = fs.join(file);
        let mut args = vec![
            "export",
            "--db",
            db,
            "--format",
            format,
            "--quiet",
            "--out",
            out.to_str().unwrap(),
        ];
        if gzip {
            args.push("--gzip");
        }
        let e = one_line_error(&qorbits(&args, &here));
        says(
            &e,
            &[
                format!("cannot write {}", out.display()).as_str(),
                "the file system is full",
                "the export needs about",
            ],
        );
        assert!(fs.entries().is_empty(), "{:?}", fs.entries());
    }
    // A release folder: made for the release, removed with its files.
    let rel = fs.join("release");
    let e = one_line_error(&qorbits(
        &["release", "--db", db, "--out", rel.to_str().unwrap()],
        &here,
    ));
    says_needing(
        &e,
        &[
            "cannot write",
            "the file system is full",
            "the release needs about",
        ],
        0.5 * table_bytes() as f64,
    );
    assert!(fs.entries().is_empty(), "{:?}", fs.entries());
    // Into a folder that was there: it stays, empty.
    std::fs::create_dir(&rel).unwrap();
    one_line_error(&qorbits(
        &["release", "--db", db, "--out", rel.to_str().unwrap()],
        &here,
    ));
    assert_eq!(fs.entries(), ["release"]);
    assert!(entries(&rel).is_empty(), "{:?}", entries(&rel));
}

/// Asserts that the error line `e` contains every phrase of `wants`.
fn says(e: &str, wants: &[&str]) {
    for want in wants {
        assert!(e.contains(want), "{want}: {e}");
    }
}

/// [`says`], and the need the line estimates (`needs about …`) is at least `bytes`.
fn says_needing(e: &str, wants: &[&str], bytes: f64) {
    says(e, wants);
    assert!(bytes_after(e, "needs about") >= bytes, "{e}");
}
