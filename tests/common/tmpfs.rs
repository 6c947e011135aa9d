//! A small tmpfs mounted by a test (`mount -t tmpfs -o OPTIONS`), unmounted when the guard
//! is dropped — at the end of the test, also when it fails.

use std::path::{Path, PathBuf};
use std::process::Command;

pub struct Tmpfs(pub PathBuf);

impl Tmpfs {
    /// Mounts a tmpfs with `options` (e.g. `size=256k`) on a fresh directory; `None`, with
    /// a printed notice, where mounting is not permitted.
    pub fn mount(name: &str, options: &str) -> Option<Tmpfs> {
        let dir = std::env::temp_dir().join(format!("qorbits-t-fs-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        let o = Command::new("mount")
            .args(["-t", "tmpfs", "-o", options, "tmpfs"])
            .arg(&dir)
            .output();
        match o {
            Ok(o) if o.status.success() => Some(Tmpfs(dir)),
            other => {
                let why = match other {
                    Ok(o) => String::from_utf8_lossy(&o.stderr).trim().to_string(),
                    Err(e) => e.to_string(),
                };
                println!("NOTICE: skipped, cannot mount a tmpfs here ({why})");
                let _ = std::fs::remove_dir(&dir);
                None
            }
        }
    }

    /// Changes the options of the mounted file system (tmpfs grows and shrinks in place).
    pub fn remount(&self, options: &str) {
        let o = Command::new("mount")
            .args(["-o", &format!("remount,{options}")])
            .arg(&self.0)
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }

    pub fn join(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }

    pub fn path(&self) -> &Path {
        &self.0
    }

    /// Names in its top directory, sorted.
    pub fn entries(&self) -> Vec<String> {
        entries(&self.0)
    }
}

/// Names in `dir`, sorted.
pub fn entries(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .map(|r| {
            r.flatten()
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

impl Drop for Tmpfs {
    fn drop(&mut self) {
        let done = Command::new("umount")
            .arg(&self.0)
            .status()
            .is_ok_and(|s| s.success());
        if !done {
            let _ = Command::new("umount").arg("-l").arg(&self.0).status();
        }
        let _ = std::fs::remove_dir(&self.0);
    }
}
