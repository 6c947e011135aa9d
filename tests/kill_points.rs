//! Killed at any point (DESIGN §5: an interrupted build never leaves a file that looks
//! finished): SIGKILL at 20 or more points of each of `build --height 1e5` (rerun with
//! `--resume`), `merge` of the shards of that build (rerun), and `verify --rebuild` of the
//! committed 10⁵ manifest — moments spread over one run, and moments found by polling for
//! the work, temporary and final files, so that the final write and the renames are hit.
//!
//! After each kill: a table at its name verifies against the manifest beside it with the
//! committed content hash; a manifest standing alone (a kill between the manifest and the
//! rename of the table) is byte for byte the committed manifest; the rerun ends with the
//! committed content hash and leaves only the table and its manifest; `verify --rebuild`
//! leaves nothing outside its private temporary directory. Outside source: the committed
//! manifest `manifests/qorbits-h1e5.manifest.json`. Run with `--nocapture` for the figures.

mod common;

use common::fixture::TestDir;
use common::run::{
    command, committed, committed_hash, file_like, files_under, kill_at, ok, qorbits,
    two_shards_1e5, Point,
};
use common::tmpfs::entries;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

/// A condition polled while a run goes on, and named points of them.
type Cond = Box<dyn Fn() -> bool>;
type Polled = Vec<(&'static str, Cond)>;

const TABLE: &str = "qorbits-h1e5.sqlite";
const MANIFEST: &str = "qorbits-h1e5.manifest.json";

/// Kills tried, finished-looking files that were not right, lone manifests seen.
#[derive(Default)]
struct Tally {
    kills: usize,
    corrupt: usize,
    lone: usize,
    missed: Vec<String>,
}

impl Tally {
    fn report(&self, what: &str) {
        println!(
            "{what}: kills tried {}, corrupt finished files {} (lone manifests {}; points the run \
             outpaced: {})",
            self.kills,
            self.corrupt,
            self.lone,
            if self.missed.is_empty() {
                "none".to_string()
            } else {
                self.missed.join(", ")
            }
        );
        assert!(self.kills >= 20, "{what}: only {} kills", self.kills);
        assert_eq!(
            self.corrupt, 0,
            "{what}: finished-looking files that are wrong"
        );
    }
}

/// The final names in `dir` after a kill: a table must verify with the committed content
/// hash, a manifest without its table must be the committed one.
fn check_outputs(dir: &Path, t: &mut Tally, label: &str) {
    let (table, manifest) = (dir.join(TABLE), dir.join(MANIFEST));
    if table.exists() {
        let o = qorbits(&["verify", "--db", TABLE], dir);
        let s = String::from_utf8_lossy(&o.stdout);
        if !(o.status.success()
            && s.contains("verified: all")
            && s.contains(&committed_hash("1e5")))
        {
            println!("{label}: the table at its name does not verify: {s}");
            t.corrupt += 1;
        }
    } else if manifest.exists() {
        t.lone += 1;
        if std::fs::read(&manifest).unwrap() != std::fs::read(committed("1e5")).unwrap() {
            println!("{label}: a manifest stands alone and is not the committed one");
            t.corrupt += 1;
        }
    }
}

/// Removes everything in `dir`.
fn clear(dir: &Path) {
    for e in std::fs::read_dir(dir).unwrap().flatten() {
        let p = e.path();
        let _ = std::fs::remove_dir_all(&p).or_else(|_| std::fs::remove_file(&p));
    }
}

/// Moments spread over a run of length `run`, then the polled points.
fn points(run: Duration, polled: Polled) -> Vec<Point> {
    let n = 14u32;
    let mut v: Vec<Point> = (0..n).map(|k| Point::At(run * k / n)).collect();
    v.extend(polled.into_iter().map(|(name, f)| Point::When(name, f)));
    v
}

/// Extra moments (early in the run) for when the points above gave fewer than 20 kills.
fn extra(run: Duration, k: u32) -> Point {
    Point::At(run * (1 + (k * 7) % 10) / 20)
}

fn exists(p: PathBuf) -> Cond {
    Box::new(move || p.exists())
}

/// A condition: some file under `dir` ends with `suffix` (a whole run, not its temporary).
fn file_ending(dir: &Path, depth: usize, prefix: &'static str, suffix: &'static str) -> Cond {
    let dir = dir.to_path_buf();
    Box::new(move || {
        files_under(&dir, depth).iter().any(|(p, _)| {
            let n = p.file_name().unwrap().to_string_lossy();
            n.starts_with(prefix) && n.ends_with(suffix)
        })
    })
}

/// The polled points of writing the table `name` into `dir` and its manifest beside it.
fn commit_points(dir: &Path, name: &'static str, temp: &'static [&'static str]) -> Polled {
    let bytes = {
        let text = std::fs::read_to_string(committed("1e5")).unwrap();
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        v["file"]["bytes"].as_u64().unwrap()
    };
    let manifest = dir.join(name.replace(".sqlite", ".manifest.json"));
    vec![
        (
            "the table's temporary file appears",
            file_like(dir, 0, temp, 0),
        ),
        (
            "the table's pages are being written",
            file_like(dir, 0, temp, 4096),
        ),
        (
            "the table is whole under its temporary name",
            file_like(dir, 0, temp, bytes),
        ),
        ("the manifest stands at its name", exists(manifest)),
        ("the table stands at its name", exists(dir.join(name))),
    ]
}

fn run_time(cmd: &mut Command) -> Duration {
    let t = Instant::now();
    ok(&cmd.output().unwrap());
    t.elapsed()
}

/// Kills `cmd()` at each point, from a clean `dir` (`reset`), checks the outputs, then
/// `after` (the rerun and its checks).
fn kill_loop(
    what: &str,
    cmd: &dyn Fn() -> Command,
    run: Duration,
    pts: Vec<Point>,
    reset: &dyn Fn(),
    after: &mut dyn FnMut(&mut Tally, &str),
) -> Tally {
    let mut t = Tally::default();
    let mut k = 0;
    let mut pts: std::collections::VecDeque<Point> = pts.into();
    while let Some(p) = pts.pop_front() {
        reset();
        let label = format!("{what} {}", p.name());
        match kill_at(&mut cmd(), &p) {
            Some(_) => t.kills += 1,
            None => t.missed.push(p.name()),
        }
        after(&mut t, &label);
        if pts.is_empty() && t.kills < 20 && k < 40 {
            pts.push_back(extra(run, k));
            k += 1;
        }
    }
    t
}

#[test]
fn build_killed_anywhere_resumes_to_the_committed_hash() {
    let d = TestDir::new("kill-build");
    let args = ["build", "--height", "1e5", "--quiet", "--resume"];
    let run = run_time(&mut command(&args, &d.0));
    clear(&d.0);
    let work = d.join(".qorbits-h1e5.sqlite.work");
    let mut polled: Polled = vec![
        ("the work directory appears", exists(work.clone())),
        ("the plan is written", exists(work.join("plan.json"))),
        (
            "a run is being written",
            file_like(&work, 0, &[".chunk-", ".tmp-"], 0),
        ),
        ("a run is whole", file_ending(&work, 0, "chunk-", ".run")),
    ];
    polled.extend(commit_points(&d.0, TABLE, &[".qorbits-h1e5.sqlite.tmp-"]));
    polled.push((
        "the manifest's temporary file appears",
        file_like(&d.0, 0, &[".qorbits-h1e5.manifest.json.tmp-"], 0),
    ));
    let hash = committed_hash("1e5");
    let t = kill_loop(
        "build",
        &|| command(&args, &d.0),
        run,
        points(run, polled),
        &|| clear(&d.0),
        &mut |t, label| {
            check_outputs(&d.0, t, label);
            let s = ok(&qorbits(&args, &d.0));
            assert!(
                s.contains(&format!("content sha256 {hash}")),
                "{label}: {s}"
            );
            assert_eq!(d.entries(), [MANIFEST, TABLE], "{label}: leftovers");
        },
    );
    t.report("build --height 1e5");
}

#[test]
fn merge_killed_anywhere_reruns_to_the_committed_hash() {
    let d = TestDir::new("kill-merge");
    two_shards_1e5(&d.0);
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    let args = ["merge", "../s1", "../s2", "--out", TABLE, "--quiet"];
    let run = run_time(&mut command(&args, &out));
    clear(&out);
    let mut polled: Polled = vec![(
        "the merge directory appears",
        exists(out.join(".qorbits-h1e5.sqlite.merge")),
    )];
    polled.extend(commit_points(&out, TABLE, &[".qorbits-h1e5.sqlite.tmp-"]));
    polled.push((
        "the manifest's temporary file appears",
        file_like(&out, 0, &[".qorbits-h1e5.manifest.json.tmp-"], 0),
    ));
    let hash = committed_hash("1e5");
    let t = kill_loop(
        "merge",
        &|| command(&args, &out),
        run,
        points(run, polled),
        &|| clear(&out),
        &mut |t, label| {
            check_outputs(&out, t, label);
            if !out.join(TABLE).exists() {
                let s = ok(&qorbits(&args, &out));
                assert!(
                    s.contains(&format!("content sha256 {hash}")),
                    "{label}: {s}"
                );
            }
            assert_eq!(entries(&out), [MANIFEST, TABLE], "{label}: leftovers");
        },
    );
    t.report("merge of 2 shards of 1e5");
}

#[test]
fn verify_rebuild_killed_anywhere_leaves_nothing_outside_its_directory() {
    let d = TestDir::new("kill-rebuild");
    let (tmp, cwd) = (d.join("tmp"), d.join("cwd"));
    std::fs::create_dir(&tmp).unwrap();
    std::fs::create_dir(&cwd).unwrap();
    let m = committed("1e5");
    let args = ["verify", "--rebuild", m.to_str().unwrap(), "--quiet"];
    let cmd = || {
        let mut c = command(&args, &cwd);
        c.env("TMPDIR", &tmp);
        c
    };
    let run = run_time(&mut cmd());
    let polled: Polled = vec![
        ("the private directory appears", {
            let tmp = tmp.clone();
            Box::new(move || !entries(&tmp).is_empty())
        }),
        (
            "the work directory is marked",
            file_like(&tmp, 2, &["qorbits-work"], 0),
        ),
        (
            "a run is being written",
            file_like(&tmp, 2, &[".chunk-", ".tmp-"], 0),
        ),
        (
            "the table's temporary file appears",
            file_like(&tmp, 1, &[".rebuild.sqlite.tmp-"], 0),
        ),
        (
            "the table's pages are being written",
            file_like(&tmp, 1, &[".rebuild.sqlite.tmp-"], 4096),
        ),
        (
            "the manifest is written",
            file_ending(&tmp, 1, "rebuild.manifest", ".json"),
        ),
        (
            "the table stands at its name",
            file_ending(&tmp, 1, "rebuild", ".sqlite"),
        ),
    ];
    let t = kill_loop(
        "verify --rebuild",
        &cmd,
        run,
        points(run, polled),
        &|| {
            clear(&tmp);
            clear(&cwd);
        },
        &mut |t, label| {
            assert!(entries(&cwd).is_empty(), "{label}: {:?}", entries(&cwd));
            for e in entries(&tmp) {
                let private = e.starts_with("qorbits-rebuild-") && tmp.join(&e).is_dir();
                if !private {
                    println!("{label}: a stray file {e} outside the private directory");
                    t.corrupt += 1;
                }
            }
        },
    );
    // The rerun, with the leftovers of the last kill in place: removes them, passes.
    let o = cmd().output().unwrap();
    let s = ok(&o);
    assert!(s.contains("verified: all"), "{s}");
    let hash = committed_hash("1e5");
    assert!(
        s.lines()
            .any(|l| l.starts_with("ok") && l.contains("content sha256") && l.contains(&hash)),
        "{s}"
    );
    assert!(entries(&tmp).is_empty(), "{:?}", entries(&tmp));
    t.report("verify --rebuild manifests/qorbits-h1e5.manifest.json");
}

/// The id of a process that has ended (and been reaped).
fn dead_pid() -> u32 {
    let mut c = Command::new("true").spawn().unwrap();
    let pid = c.id();
    c.wait().unwrap();
    pid
}

#[test]
fn a_kill_between_the_manifest_and_the_rename_is_completed_by_the_rerun() {
    // The state such a kill leaves, made by hand: the manifest at its name, the whole table
    // under the temporary name of a process that no longer runs.
    let d = TestDir::new("kill-window");
    let hash = committed_hash("1e5");
    let build = ["build", "--height", "1e5", "--quiet", "--resume"];
    ok(&qorbits(&build, &d.0));
    let stale = format!(".{TABLE}.tmp-{}", dead_pid());
    std::fs::rename(d.join(TABLE), d.join(&stale)).unwrap();
    let s = ok(&qorbits(&build, &d.0));
    assert!(s.contains("is complete") && s.contains(&hash), "{s}");
    assert_eq!(d.entries(), [MANIFEST, TABLE]);
    // The same for a merge; a temporary file whose hash is not the manifest's is not used.
    two_shards_1e5(&d.0);
    let merge = ["merge", "s1", "s2", "--out", TABLE, "--quiet"];
    let foreign = format!(".{TABLE}.tmp-{}", dead_pid());
    std::fs::write(d.join(&foreign), b"not the table").unwrap();
    std::fs::rename(d.join(TABLE), d.join(&stale)).unwrap();
    let s = ok(&qorbits(&merge, &d.0));
    assert!(
        s.contains("the interrupted merge is finished") && s.contains(&hash),
        "{s}"
    );
    assert_eq!(d.entries(), [MANIFEST, TABLE, "s1", "s2"]);
}
