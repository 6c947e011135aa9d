//! Running the binary from the tests: a command and its output, the committed manifests,
//! verification against them, one-line errors, and runs killed (SIGKILL) at a moment or as
//! soon as some file appears.

use std::os::unix::process::ExitStatusExt;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::time::{Duration, Instant};

/// The binary, to be given arguments.
pub fn command(args: &[&str], dir: &Path) -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_qorbits"));
    c.args(args).current_dir(dir);
    c
}

/// Runs the binary with `args` in `dir`.
pub fn qorbits(args: &[&str], dir: &Path) -> Output {
    command(args, dir).output().unwrap()
}

/// Its standard output, failing the test unless it succeeded.
pub fn ok(o: &Output) -> String {
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// The committed manifest of the tier `x` (`1e5` …).
pub fn committed(x: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(format!("manifests/qorbits-h{x}.manifest.json"))
}

/// The content hash the committed manifest of tier `x` records.
pub fn committed_hash(x: &str) -> String {
    let text = std::fs::read_to_string(committed(x)).unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    v["content_sha256"].as_str().unwrap().to_string()
}

/// Fails the test unless `table` verifies against the committed manifest of tier `x`.
pub fn verify_against(table: &Path, x: &str, dir: &Path) {
    let o = qorbits(
        &[
            "verify",
            "--db",
            table.to_str().unwrap(),
            "--manifest",
            committed(x).to_str().unwrap(),
        ],
        dir,
    );
    let s = ok(&o);
    assert!(s.contains("verified: all"), "{s}");
}

/// The error line of a command that must fail for the user: exit status 2 and exactly one
/// line on stderr, no panic, no backtrace, nothing on stdout.
pub fn one_line_error(o: &Output) -> String {
    let e = String::from_utf8_lossy(&o.stderr).into_owned();
    assert_eq!(
        o.status.code(),
        Some(2),
        "exit status {:?} (signal {:?}): {e}",
        o.status.code(),
        o.status.signal()
    );
    assert_eq!(e.lines().count(), 1, "not one line: {e}");
    assert!(e.ends_with('\n') && e.starts_with("qorbits: "), "{e:?}");
    for bad in ["panicked", "backtrace", "RUST_BACKTRACE"] {
        assert!(!e.contains(bad), "{e}");
    }
    assert!(
        o.stdout.is_empty(),
        "{}",
        String::from_utf8_lossy(&o.stdout)
    );
    e.trim_end().to_string()
}

/// When to kill a run: a moment after its start, or as soon as a condition holds (a file
/// appears, grows …), polled as fast as the machine allows.
pub enum Point {
    /// This long after the start.
    At(Duration),
    /// As soon as the condition holds (named for the report).
    When(&'static str, Box<dyn Fn() -> bool>),
}

impl Point {
    pub fn name(&self) -> String {
        match self {
            Point::At(d) => format!("at {} ms", d.as_millis()),
            Point::When(n, _) => format!("when {n}"),
        }
    }
}

/// Starts `cmd` and kills it (SIGKILL) at `point`; returns the process id when the kill
/// ended it while it was running, `None` when it finished first.
pub fn kill_at(cmd: &mut Command, point: &Point) -> Option<u32> {
    let mut child = cmd
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let pid = child.id();
    let t = Instant::now();
    loop {
        if child.try_wait().unwrap().is_some() {
            return None;
        }
        let now = match point {
            Point::At(d) => t.elapsed() >= *d,
            Point::When(_, f) => f() || t.elapsed() > Duration::from_secs(60),
        };
        if now {
            break;
        }
        match point {
            Point::At(_) => std::thread::sleep(Duration::from_micros(200)),
            Point::When(..) => std::thread::yield_now(),
        }
    }
    let _ = child.kill();
    let status = child.wait().unwrap();
    (status.signal() == Some(libc::SIGKILL)).then_some(pid)
}

/// The files under `dir` (down to `depth` levels), with their sizes.
pub fn files_under(dir: &Path, depth: usize) -> Vec<(PathBuf, u64)> {
    let mut out = Vec::new();
    for e in std::fs::read_dir(dir).into_iter().flatten().flatten() {
        let p = e.path();
        match e.metadata() {
            Ok(m) if m.is_dir() && depth > 0 => out.extend(files_under(&p, depth - 1)),
            Ok(m) => out.push((p, m.len())),
            Err(_) => {}
        }
    }
    out
}

/// A condition: some file under `dir` has a name containing every one of `parts` and at
/// least `min` bytes.
pub fn file_like(
    dir: &Path,
    depth: usize,
    parts: &'static [&'static str],
    min: u64,
) -> Box<dyn Fn() -> bool> {
    let dir = dir.to_path_buf();
    Box::new(move || {
        files_under(&dir, depth).iter().any(|(p, n)| {
            let name = p.file_name().unwrap().to_string_lossy();
            *n >= min && parts.iter().all(|s| name.contains(s))
        })
    })
}

/// Builds the two shards of H < 10^5 into `dir/s1` and `dir/s2`.
#[allow(dead_code)]
pub fn two_shards_1e5(dir: &Path) {
    for k in 1..=2 {
        let shard = format!("{k}/2");
        let out = format!("s{k}");
        let args = [
            "build", "--height", "1e5", "--shard", &shard, "--out", &out, "--quiet",
        ];
        ok(&qorbits(&args, dir));
    }
}
