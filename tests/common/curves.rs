//! Shared by the curve dataset tests (`tests/curve_dataset.rs`,
//! `tests/curve_dataset_damage.rs`): the binary run in a directory, the dataset of
//! `selmer-stats --out` written there, its manifest read back and `verify` on it.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

pub fn qorbits(args: &[&str], dir: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap()
}

pub fn ok(o: &Output) -> String {
    assert!(
        o.status.success(),
        "qorbits failed: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    String::from_utf8(o.stdout.clone()).unwrap()
}

/// Writes the dataset below `y` as `dir/curves.sqlite` with `--jobs jobs`.
pub fn write(dir: &Path, y: &str, jobs: &str) -> PathBuf {
    let args = [
        "selmer-stats",
        "--height",
        y,
        "--out",
        "curves.sqlite",
        "--quiet",
        "--jobs",
        jobs,
    ];
    ok(&qorbits(&args, dir));
    dir.join("curves.sqlite")
}

pub fn manifest(dir: &Path) -> serde_json::Value {
    let text = std::fs::read_to_string(dir.join("curves.manifest.json")).unwrap();
    serde_json::from_str(&text).unwrap()
}

/// `verify MANIFEST`: (exit code, stdout, stderr).
pub fn verify(dir: &Path) -> (i32, String, String) {
    let o = qorbits(&["verify", "curves.manifest.json"], dir);
    let s = |b: &[u8]| String::from_utf8_lossy(b).into_owned();
    (o.status.code().unwrap_or(-1), s(&o.stdout), s(&o.stderr))
}
