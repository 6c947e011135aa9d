//! A small table shared by the storage tests (H < 3000 with reducible classes, built once),
//! scratch directories, and assertions on messages.

use qorbits::progress::Silent;
use qorbits::table::group::group_rows;
use qorbits::table::pipeline::enumerate_classes;
use qorbits::table::row::{ClassRow, Params, Table};
use std::path::PathBuf;
use std::sync::OnceLock;

pub const PARAMS: Params = Params {
    height: 3000,
    include_reducible: true,
};

/// The table at H < 3000 with reducible classes, computed once.
pub fn table() -> &'static Table {
    static T: OnceLock<Table> = OnceLock::new();
    T.get_or_init(|| enumerate_classes(&PARAMS, &Silent).expect("enumeration"))
}

/// Its rows in table order.
pub fn rows() -> Vec<ClassRow> {
    table().rows().cloned().collect()
}

/// A table with the given parameters made from rows (re-grouped into pairs).
pub fn table_of(params: Params, rows: Vec<ClassRow>) -> Table {
    Table {
        params,
        pairs: group_rows(rows).unwrap(),
        candidates: 0,
    }
}

/// A fresh directory removed at the end of the test.
pub struct TestDir(pub PathBuf);

impl TestDir {
    pub fn new(name: &str) -> TestDir {
        let d = std::env::temp_dir().join(format!("qorbits-t-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).unwrap();
        TestDir(d)
    }
    pub fn join(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }
    /// Names of the files in the directory, sorted.
    pub fn entries(&self) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(&self.0)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }
}

impl Drop for TestDir {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

pub fn assert_one_line(msg: &str) {
    assert!(!msg.contains('\n'), "error message spans lines: {msg}");
}
