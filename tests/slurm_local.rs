//! `scripts/slurm-local` gives the test suite a one-node Slurm cluster that runs what a
//! sharded build needs (DESIGN §7): a job array whose tasks are the shards, a job that
//! depends on the whole array (the merge), and the rerun of one task that was killed. The
//! first test's jobs are shell commands; the others run the scripts `qorbits plan --slurm`
//! writes for a sharded build and require the single-machine bytes. The cluster is real
//! (slurmctld, slurmd, munged).
//!
//! The test fails when the cluster cannot be brought up: CI installs the packages through
//! the script. A guard runs `down` however the test ends.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::time::{Duration, Instant};

/// Longest wait for any one state change of the cluster (jobs here take well under a second;
/// the scheduler acts within a few seconds). A safety net, not a measurement.
const PATIENCE: Duration = Duration::from_secs(120);

/// The cluster of one test run; `Drop` takes it down and removes its directories.
struct Cluster {
    base: PathBuf,
    dir: PathBuf,
    conf: PathBuf,
}

impl Cluster {
    fn new() -> Cluster {
        Cluster::named("shell")
    }

    fn named(name: &str) -> Cluster {
        let base =
            std::env::temp_dir().join(format!("qorbits-slurm-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&base);
        std::fs::create_dir_all(&base).unwrap();
        let dir = base.join("cluster");
        let conf = dir.join("slurm.conf");
        Cluster { base, dir, conf }
    }

    fn script(&self, sub: &str) -> Output {
        let script = Path::new(env!("CARGO_MANIFEST_DIR")).join("scripts/slurm-local");
        Command::new("bash")
            .arg(script)
            .arg(sub)
            .env("QORBITS_SLURM_DIR", &self.dir)
            .env("QORBITS_SLURM_TIMEOUT", "120")
            .env_remove("QORBITS_SLURM_PORT")
            .env_remove("SLURM_CONF")
            .output()
            .unwrap()
    }

    /// A Slurm client command against this cluster; panics unless it succeeds.
    fn slurm(&self, cwd: &Path, cmd: &str, args: &[&str]) -> String {
        let o = Command::new(cmd)
            .args(args)
            .current_dir(cwd)
            .env("SLURM_CONF", &self.conf)
            .output()
            .unwrap_or_else(|e| panic!("{cmd}: {e}"));
        let (out, err) = text(&o);
        assert!(o.status.success(), "{cmd} {args:?} failed: {err}");
        out
    }

    fn sbatch(&self, cwd: &Path, args: &[&str]) -> String {
        let mut all = vec!["--parsable"];
        all.extend_from_slice(args);
        let out = self.slurm(cwd, "sbatch", &all);
        let id = out.trim().to_string();
        assert!(
            id.chars().all(|c| c.is_ascii_digit()) && !id.is_empty(),
            "sbatch printed {out:?}"
        );
        id
    }

    /// Array task (or "-" for a plain job) → JobState, from `scontrol -o show job`.
    fn states(&self, id: &str) -> BTreeMap<String, String> {
        let out = self.slurm(&self.base, "scontrol", &["-o", "show", "job", id]);
        out.lines()
            .map(|l| {
                (
                    field(l, "ArrayTaskId").unwrap_or("-").to_string(),
                    field(l, "JobState").unwrap().to_string(),
                )
            })
            .collect()
    }

    fn state(&self, id: &str) -> String {
        let s = self.states(id);
        assert_eq!(s.len(), 1, "{id}: {s:?}");
        s.into_values().next().unwrap()
    }
}

impl Drop for Cluster {
    fn drop(&mut self) {
        if std::thread::panicking() {
            for log in ["log/slurmctld.log", "log/slurmd.log", "munge/munged.log"] {
                if let Ok(t) = std::fs::read_to_string(self.dir.join(log)) {
                    let tail: Vec<&str> = t.lines().rev().take(15).collect();
                    eprintln!("--- {log} (last lines)");
                    tail.iter().rev().for_each(|l| eprintln!("{l}"));
                }
            }
        }
        let o = self.script("down");
        if !o.status.success() {
            eprintln!("slurm-local down failed: {}", text(&o).1);
        }
        let _ = std::fs::remove_dir_all(&self.base);
    }
}

fn text(o: &Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

fn field<'a>(line: &'a str, key: &str) -> Option<&'a str> {
    line.split_whitespace()
        .find_map(|w| w.strip_prefix(key)?.strip_prefix('='))
}

fn wait_until(what: &str, mut done: impl FnMut() -> bool) {
    let start = Instant::now();
    while !done() {
        assert!(
            start.elapsed() < PATIENCE,
            "gave up waiting for {what} after {PATIENCE:?}"
        );
        std::thread::sleep(Duration::from_millis(200));
    }
}

/// The daemons `status` reports as running: name → pid.
fn running(o: &Output) -> BTreeMap<String, u32> {
    text(o)
        .0
        .lines()
        .filter_map(|l| {
            let w: Vec<&str> = l.split_whitespace().collect();
            match w[..] {
                [name, "running", "pid", pid] => Some((name.to_string(), pid.parse().unwrap())),
                _ => None,
            }
        })
        .collect()
}

/// Processes whose working directory lies under `dir` (job steps left behind).
fn processes_in(dir: &Path) -> Vec<u32> {
    let mut found = Vec::new();
    for e in std::fs::read_dir("/proc").unwrap().flatten() {
        let Ok(pid) = e.file_name().to_string_lossy().parse::<u32>() else {
            continue;
        };
        if std::fs::read_link(e.path().join("cwd")).is_ok_and(|c| c.starts_with(dir)) {
            found.push(pid);
        }
    }
    found
}

/// One array task: waits while `block_<task>` exists, then writes `t_<task>`.
const TASK: &str = "#!/bin/sh\n\
    while [ -e block_$SLURM_ARRAY_TASK_ID ]; do sleep 0.2; done\n\
    echo \"task $SLURM_ARRAY_TASK_ID\" > t_$SLURM_ARRAY_TASK_ID\n";

/// The merge: the four task outputs in task order.
const MERGE: &str = "cat t_0 t_1 t_2 t_3 > merged";
const MERGED: &str = "task 0\ntask 1\ntask 2\ntask 3\n";

fn workdir(c: &Cluster, name: &str) -> PathBuf {
    let w = c.base.join(name);
    std::fs::create_dir_all(&w).unwrap();
    std::fs::write(w.join("task.sh"), TASK).unwrap();
    w
}

#[test]
fn array_dependent_merge_and_rerun_of_a_killed_task() {
    let c = Cluster::new();

    // up: a running cluster with an idle node, and the line a user needs.
    let up = c.script("up");
    let (out, err) = text(&up);
    assert!(up.status.success(), "scripts/slurm-local up failed: {err}");
    assert_eq!(
        out.trim(),
        format!("export SLURM_CONF={}", c.conf.display())
    );
    let status = c.script("status");
    assert!(
        status.status.success(),
        "status after up: {}",
        text(&status).0
    );
    let pids = running(&status);
    assert_eq!(
        pids.keys().collect::<Vec<_>>(),
        ["munged", "slurmctld", "slurmd"]
    );
    let host =
        String::from_utf8(Command::new("hostname").arg("-s").output().unwrap().stdout).unwrap();
    let node = c.slurm(&c.base, "sinfo", &["-h", "-N", "-o", "%N %T"]);
    assert_eq!(node.trim(), format!("{} idle", host.trim()));

    // up again: nothing restarted.
    let again = c.script("up");
    assert!(again.status.success(), "second up: {}", text(&again).1);
    assert_eq!(
        running(&c.script("status")),
        pids,
        "a second up must reuse the daemons"
    );

    // An array of four tasks and a merge that waits for all of them.
    let w = workdir(&c, "plain");
    let array = c.sbatch(&w, &["--array=0-3", "-o", "a_%A_%a.out", "task.sh"]);
    let dep = format!("--dependency=afterok:{array}");
    let merge = c.sbatch(&w, &[&dep, "-o", "merge.out", "--wrap", MERGE]);
    wait_until("the merge job", || c.state(&merge) == "COMPLETED");
    let tasks = c.states(&array);
    let want: BTreeMap<String, String> = (0..4)
        .map(|k| (k.to_string(), "COMPLETED".to_string()))
        .collect();
    assert_eq!(tasks, want);
    assert_eq!(std::fs::read_to_string(w.join("merged")).unwrap(), MERGED);

    // Task 2 blocks; it is killed while running. The merge can then never start, and
    // resubmitting only index 2 completes the set.
    let w = workdir(&c, "rerun");
    std::fs::write(w.join("block_2"), "").unwrap();
    let array = c.sbatch(&w, &["--array=0-3", "-o", "a_%A_%a.out", "task.sh"]);
    let dep = format!("--dependency=afterok:{array}");
    let merge = c.sbatch(&w, &[&dep, "-o", "merge.out", "--wrap", MERGE]);
    wait_until("tasks 0, 1, 3 done and task 2 running", || {
        let s = c.states(&array);
        ["0", "1", "3"]
            .iter()
            .all(|k| s.get(*k).is_some_and(|v| v == "COMPLETED"))
            && s.get("2").is_some_and(|v| v == "RUNNING")
    });
    c.slurm(&w, "scancel", &[&format!("{array}_2")]);
    wait_until("task 2 cancelled", || {
        c.states(&array).get("2").is_some_and(|v| v == "CANCELLED")
    });
    wait_until("the merge to be marked never satisfied", || {
        c.slurm(&w, "squeue", &["-h", "-j", &merge, "-o", "%r"])
            .trim()
            == "DependencyNeverSatisfied"
    });
    assert!(!w.join("t_2").exists() && !w.join("merged").exists());
    std::fs::remove_file(w.join("block_2")).unwrap();
    let rerun = c.sbatch(&w, &["--array=2", "-o", "a_%A_%a.out", "task.sh"]);
    let dep = format!("--dependency=afterok:{rerun}");
    let merge2 = c.sbatch(&w, &[&dep, "-o", "merge.out", "--wrap", MERGE]);
    wait_until("the second merge job", || c.state(&merge2) == "COMPLETED");
    assert_eq!(
        c.states(&rerun).into_values().collect::<Vec<_>>(),
        ["COMPLETED"]
    );
    assert_eq!(std::fs::read_to_string(w.join("merged")).unwrap(), MERGED);
    assert_eq!(c.state(&merge), "PENDING", "the first merge stays blocked");

    // down with a job still running: the job is cancelled, the three daemons stop, the
    // directory goes; a second down is harmless.
    let w = workdir(&c, "busy");
    let busy = c.sbatch(&w, &["-o", "busy.out", "--wrap", "sleep 600"]);
    wait_until("the busy job running", || c.state(&busy) == "RUNNING");
    // RUNNING can come before slurmstepd has started the script in its directory.
    wait_until("the busy job's processes", || !processes_in(&w).is_empty());
    let down = c.script("down");
    assert!(down.status.success(), "down: {}", text(&down).1);
    assert!(!c.dir.exists(), "down must remove {}", c.dir.display());
    for (name, pid) in &pids {
        assert!(
            !Path::new(&format!("/proc/{pid}")).exists(),
            "{name} (pid {pid}) survived down"
        );
    }
    assert_eq!(
        processes_in(&w),
        Vec::<u32>::new(),
        "job processes survived down"
    );
    let twice = c.script("down");
    assert!(twice.status.success(), "second down: {}", text(&twice).1);
    let after = c.script("status");
    assert!(!after.status.success());
    assert!(running(&after).is_empty());
}

/// The qorbits binary and a committed manifest.
fn qorbits(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .current_dir(cwd)
        .output()
        .unwrap()
}

fn committed(x: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join(format!("manifests/qorbits-h{x}.manifest.json"))
        .display()
        .to_string()
}

fn up(c: &Cluster) {
    let up = c.script("up");
    assert!(
        up.status.success(),
        "scripts/slurm-local up failed: {}",
        text(&up).1
    );
}

/// `plan --slurm` for H < X in `n` shards into `dir`; returns the directory.
fn planned(c: &Cluster, x: &str, n: usize, name: &str) -> PathBuf {
    let dir = c.base.join(name);
    let o = qorbits(
        &[
            "plan",
            "--height",
            x,
            "--shards",
            &n.to_string(),
            "--slurm",
            dir.to_str().unwrap(),
            "--cpus",
            "1",
            "--quiet",
        ],
        &c.base,
    );
    assert!(o.status.success(), "plan --slurm: {}", text(&o).1);
    for f in ["shards.sbatch", "merge.sbatch", "submit.sh"] {
        assert!(dir.join(f).is_file(), "{f}");
    }
    let merge = std::fs::read_to_string(dir.join("merge.sbatch")).unwrap();
    assert!(
        merge.contains(" merge ") && merge.contains("verify --db"),
        "{merge}"
    );
    let submit = std::fs::read_to_string(dir.join("submit.sh")).unwrap();
    assert!(submit.contains("--dependency=afterok:"), "{submit}");
    dir
}

fn verify_table(table: &Path, x: &str) {
    let o = qorbits(
        &[
            "verify",
            "--db",
            table.to_str().unwrap(),
            "--manifest",
            &committed(x),
        ],
        Path::new("/"),
    );
    let (out, err) = text(&o);
    assert!(
        o.status.success() && out.contains("verified: all"),
        "{out}{err}"
    );
}

#[test]
fn a_sharded_build_through_the_job_array_gives_the_single_machine_hash() {
    let c = Cluster::named("build");
    up(&c);
    let dir = planned(&c, "1000000", 4, "run-1e6");
    let o = Command::new("bash")
        .arg(dir.join("submit.sh"))
        .env("SLURM_CONF", &c.conf)
        .output()
        .unwrap();
    let (out, err) = text(&o);
    assert!(o.status.success(), "submit.sh: {err}");
    // "shards: job A; merge: job M"
    let merge_id = out.trim().rsplit(' ').next().unwrap().to_string();
    wait_until("the merge job", || {
        c.state(&merge_id) == "COMPLETED" || c.state(&merge_id) == "FAILED"
    });
    assert_eq!(
        c.state(&merge_id),
        "COMPLETED",
        "{}",
        std::fs::read_to_string(dir.join("logs/merge.log")).unwrap_or_default()
    );
    verify_table(&dir.join("qorbits-h1e6.sqlite"), "1e6");
}

#[test]
fn a_killed_array_task_resubmitted_completes_the_build() {
    let c = Cluster::named("rerun");
    up(&c);
    // H < 10⁷: shards take seconds, so task 2 can be caught running and killed.
    let dir = planned(&c, "10000000", 4, "run-1e7");
    std::fs::create_dir_all(dir.join("logs")).unwrap();
    std::fs::create_dir_all(dir.join("shards")).unwrap();
    let array = c.sbatch(&dir, &[dir.join("shards.sbatch").to_str().unwrap()]);
    let merge = c.sbatch(
        &dir,
        &[
            &format!("--dependency=afterok:{array}"),
            dir.join("merge.sbatch").to_str().unwrap(),
        ],
    );
    let task2 = format!("{array}_2");
    wait_until("task 2 to run", || {
        let s = c.states(&array);
        s.get("2").is_some_and(|st| st == "RUNNING")
            || s.get("2").is_some_and(|st| st == "COMPLETED")
    });
    let was = c.states(&array)["2"].clone();
    eprintln!("task 2 was {was} when it was killed");
    c.slurm(&c.base, "scancel", &["--signal=KILL", &task2]);
    wait_until("the other tasks and the kill", || {
        let s = c.states(&array);
        ["1", "3", "4"]
            .iter()
            .all(|k| s.get(*k).is_some_and(|st| st == "COMPLETED"))
            && s.get("2")
                .is_some_and(|st| st != "RUNNING" && st != "PENDING")
    });
    if was == "RUNNING" {
        // The merge waits for a dependency that can no longer be met.
        wait_until("the merge to stay pending", || c.state(&merge) == "PENDING");
        assert!(!dir.join("qorbits-h1e7.sqlite").exists());
        c.slurm(&c.base, "scancel", &[&merge]);
    }
    // Resubmit only the failed index, and a merge after it.
    let rerun = c.sbatch(
        &dir,
        &["--array=2", dir.join("shards.sbatch").to_str().unwrap()],
    );
    let merge2 = c.sbatch(
        &dir,
        &[
            &format!("--dependency=afterok:{rerun}"),
            dir.join("merge.sbatch").to_str().unwrap(),
        ],
    );
    wait_until("the second merge", || {
        matches!(c.state(&merge2).as_str(), "COMPLETED" | "FAILED")
    });
    assert_eq!(
        c.state(&merge2),
        "COMPLETED",
        "{}",
        std::fs::read_to_string(dir.join("logs/merge.log")).unwrap_or_default()
    );
    verify_table(&dir.join("qorbits-h1e7.sqlite"), "1e7");
}
