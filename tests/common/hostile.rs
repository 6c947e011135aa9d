//! Shared by the hostile-input tests (`tests/hostile.rs`, `tests/hostile_paths.rs`): the
//! committed H < 10⁴ release in a directory of its own, snapshots of a directory (every
//! file's bytes, every link's target), and the binary run with a time limit.

use std::collections::BTreeMap;
use std::io::Read;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::time::{Duration, Instant};

use super::fixture::TestDir;

pub const DB: &str = "qorbits-h1e4.sqlite";
pub const MANIFEST: &str = "qorbits-h1e4.manifest.json";

pub fn repo(p: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(p)
}

/// The committed H < 10⁴ release, uncompressed.
pub fn release() -> Vec<u8> {
    let gz = std::fs::read(repo("releases/qorbits-h1e4.sqlite.gz")).unwrap();
    let mut out = Vec::new();
    flate2::read::GzDecoder::new(&gz[..])
        .read_to_end(&mut out)
        .unwrap();
    out
}

/// Every entry under `dir`: files by their bytes, links by their target, directories.
pub fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Vec<u8>> {
    let mut out = BTreeMap::new();
    let mut todo = vec![dir.to_path_buf()];
    while let Some(d) = todo.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            let m = std::fs::symlink_metadata(&p).unwrap();
            let v = if m.file_type().is_symlink() {
                let mut v = b"link:".to_vec();
                v.extend(std::fs::read_link(&p).unwrap().to_string_lossy().bytes());
                v
            } else if m.is_dir() {
                todo.push(p.clone());
                b"dir".to_vec()
            } else if m.is_file() {
                std::fs::read(&p).unwrap()
            } else {
                b"special".to_vec()
            };
            out.insert(p, v);
        }
    }
    out
}

/// Runs the binary with a time limit (a command that blocks on a pipe fails the test).
pub fn qorbits(args: &[&str]) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let start = Instant::now();
    while child.try_wait().unwrap().is_none() {
        if start.elapsed() > Duration::from_secs(30) {
            child.kill().unwrap();
            panic!("qorbits {args:?} did not finish within 30 s");
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    child.wait_with_output().unwrap()
}

pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// A directory holding the release and its manifest, with `edit` run on the table.
pub fn case(d: &TestDir, name: &str, edit: impl FnOnce(&rusqlite::Connection)) -> PathBuf {
    let dir = d.join(name);
    std::fs::create_dir_all(&dir).unwrap();
    let db = dir.join(DB);
    std::fs::write(&db, release()).unwrap();
    std::fs::copy(repo(&format!("manifests/{MANIFEST}")), dir.join(MANIFEST)).unwrap();
    {
        let c = rusqlite::Connection::open(&db).unwrap();
        edit(&c);
    }
    for side in ["-journal", "-wal", "-shm"] {
        assert!(!dir.join(format!("{DB}{side}")).exists());
    }
    dir
}
