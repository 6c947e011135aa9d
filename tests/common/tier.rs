//! The published H < 10⁵ tier (releases/qorbits-h1e5.sqlite.gz), unpacked once per test
//! process into a scratch directory, checked against its committed manifest's file hash.

use std::io::Read;
use std::path::PathBuf;
use std::sync::OnceLock;

/// The path of the unpacked tier (removed when the process ends is not needed: the name
/// carries the process id, under the system's temporary directory).
pub fn tier_1e5() -> PathBuf {
    static P: OnceLock<PathBuf> = OnceLock::new();
    P.get_or_init(|| {
        let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
        let dir = std::env::temp_dir().join(format!("qorbits-t-tier-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let db = dir.join("qorbits-h1e5.sqlite");
        let gz = std::fs::File::open(root.join("releases/qorbits-h1e5.sqlite.gz")).unwrap();
        let mut bytes = Vec::new();
        flate2::read::GzDecoder::new(gz)
            .read_to_end(&mut bytes)
            .unwrap();
        std::fs::write(&db, &bytes).unwrap();
        let m = qorbits::table::manifest::read_manifest(
            &root.join("manifests/qorbits-h1e5.manifest.json"),
        )
        .unwrap();
        assert_eq!(
            qorbits::table::hash::file_sha256(&db).unwrap(),
            m.file.sha256,
            "the release file is the published tier"
        );
        db
    })
    .clone()
}
