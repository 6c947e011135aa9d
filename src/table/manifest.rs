//! Manifests (JSON) of built tables, and the rebuild from a manifest (DESIGN §5);
//! verification of a table against its manifest is `table::verify`.
//!
//! A manifest records the parameters, the versions (builder, schema, SQLite), row counts
//! by signature and by Galois group, the file's SHA-256 and the content SHA-256 — the hash
//! of a text rendering of every table that anyone can recompute with the sqlite3 shell and
//! sha256sum (`content_recipe`). The content hash is what a paper cites.
//!
//! ```
//! use qorbits::table::manifest::default_manifest_path;
//! use std::path::Path;
//! assert_eq!(
//!     default_manifest_path(Path::new("out/qorbits-h1e6.sqlite")),
//!     Path::new("out/qorbits-h1e6.manifest.json")
//! );
//! ```

use crate::error::{Error, Result};
use crate::form::galois::GaloisGroup;
use crate::form::Signature;
use crate::progress::Progress;
use crate::table::atomic::{fresh_temp_dir, write_atomic};
use crate::table::hash::{content_sha256, file_sha256};
use crate::table::pieces;
use crate::table::reader::{open_table, read_error, table_params};
use crate::table::row::Params;
use crate::table::schema::{CONTENT_SQL, PAGE_SIZE, SCHEMA_VERSION};
pub use crate::table::verify::{diagnosis, verify, Check};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The format tag of manifests written by this builder.
pub const FORMAT: &str = "qorbits-manifest/1";

/// Versions of what made the file.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Versions {
    /// qorbits version.
    pub builder: String,
    /// Schema version of the tables.
    pub schema: u32,
    /// The bundled SQLite library.
    pub sqlite: String,
}

/// Row counts.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Counts {
    /// Rows of `classes`.
    pub classes: u64,
    /// Rows of `pairs`.
    pub pairs: u64,
    /// Classes by signature name (`4real`, `2real`, `posdef`, `negdef`).
    pub by_signature: BTreeMap<String, u64>,
    /// Classes by Galois group (`S4` … `V4`) and `reducible`.
    pub by_galois: BTreeMap<String, u64>,
    /// Everywhere locally soluble classes.
    pub els: u64,
    /// Classes over Q of the everywhere locally soluble classes without a rational root,
    /// summed over the pairs.
    pub rational_els: u64,
}

/// The file itself.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileInfo {
    /// File name (no directory).
    pub name: String,
    /// Size in bytes.
    pub bytes: u64,
    /// SHA-256 of the bytes, lowercase hex.
    pub sha256: String,
}

/// A manifest (field order is the JSON order).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Manifest {
    /// [`FORMAT`].
    pub format: String,
    /// Build parameters.
    pub parameters: Params,
    /// Versions.
    pub versions: Versions,
    /// Row counts.
    pub counts: Counts,
    /// The file.
    pub file: FileInfo,
    /// SHA-256 of the content rendering (see `content_recipe`).
    pub content_sha256: String,
    /// Shell command that recomputes `content_sha256` from the file.
    pub content_recipe: String,
}

/// `x.sqlite` → `x.manifest.json` (any other name gets `.manifest.json` appended).
pub fn default_manifest_path(db: &Path) -> PathBuf {
    let name = db
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let stem = name.strip_suffix(".sqlite").unwrap_or(&name);
    db.with_file_name(format!("{stem}.manifest.json"))
}

/// The shell recipe for the content hash of `file_name`.
pub fn content_recipe(file_name: &str) -> String {
    content_recipe_of(file_name, CONTENT_SQL)
}

/// The shell recipe for the hash of what the sqlite3 shell prints for `sql` on `file_name`
/// (the content hash of a file whose format has that content SQL).
pub fn content_recipe_of(file_name: &str, sql: &str) -> String {
    format!(
        "sqlite3 -batch -init /dev/null -noheader -list -separator '|' {file_name} \"{sql}\" | sha256sum"
    )
}

/// The row counts of a table, by SQL.
pub(crate) fn counts(conn: &rusqlite::Connection) -> Result<Counts> {
    let err = |e| read_error(conn, e);
    let one = |sql: &str| -> Result<u64> {
        Ok(conn
            .query_row(sql, [], |r| r.get::<_, i64>(0))
            .map_err(err)? as u64)
    };
    // One pass over `classes`: the rows, and a sum for each value counted.
    let signatures = Signature::ALL.map(Signature::name);
    let groups = GaloisGroup::ALL.map(GaloisGroup::name);
    let mut sums: Vec<String> = Vec::new();
    for (column, names) in [("signature", &signatures[..]), ("galois", &groups[..])] {
        sums.extend(names.iter().map(|n| format!("{column} = '{n}'")));
    }
    sums.extend(["irreducible = 0".into(), "els = 1".into()]);
    let sql = format!(
        "SELECT count(*), {} FROM classes",
        sums.iter()
            .map(|s| format!("coalesce(sum({s}), 0)"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let values: Vec<u64> = conn
        .query_row(&sql, [], |r| {
            (0..=sums.len())
                .map(|k| Ok(r.get::<_, i64>(k)? as u64))
                .collect()
        })
        .map_err(err)?;
    let (classes, rest) = (values[0], &values[1..]);
    let (by_signature, rest) = rest.split_at(signatures.len());
    let (by_galois, rest) = rest.split_at(groups.len());
    let zip = |names: &[&str], n: &[u64]| -> BTreeMap<String, u64> {
        names
            .iter()
            .map(|s| s.to_string())
            .zip(n.iter().copied())
            .collect()
    };
    let by_signature = zip(&signatures, by_signature);
    let mut by_galois = zip(&groups, by_galois);
    let (reducible, els) = (rest[0], rest[1]);
    by_galois.insert("reducible".into(), reducible);
    Ok(Counts {
        classes,
        pairs: one("SELECT count(*) FROM pairs")?,
        by_signature,
        by_galois,
        els,
        rational_els: one("SELECT coalesce(sum(rational_els), 0) FROM pairs")?,
    })
}

/// The manifest of a table file, computed from the file (counts by SQL).
pub fn manifest_for(path: &Path) -> Result<Manifest> {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    manifest_named(path, &name)
}

/// The manifest of the table file at `path` as if it were named `name` (a table still under
/// its temporary name).
pub fn manifest_named(path: &Path, name: &str) -> Result<Manifest> {
    let conn = open_table(path)?;
    let params = table_params(&conn)?;
    let name = name.to_string();
    let bytes = std::fs::metadata(path)
        .map_err(|e| Error::Io(format!("{}: {e}", path.display())))?
        .len();
    // The file hash and the counts (on a connection of their own) run on a thread of
    // their own while the content hash reads the tables on the workers.
    let (sha256_counts, content) = std::thread::scope(|scope| {
        let other = scope.spawn(|| -> Result<(String, Counts)> {
            let sha256 = file_sha256(path)?;
            let own = pieces::open(path)?;
            Ok((sha256, counts(&own)?))
        });
        let content = content_sha256(&conn);
        (other.join().expect("hashing does not panic"), content)
    });
    let (sha256, counts) = sha256_counts?;
    let content_sha256 = content?;
    Ok(Manifest {
        format: FORMAT.into(),
        parameters: params,
        versions: Versions {
            builder: env!("CARGO_PKG_VERSION").into(),
            schema: SCHEMA_VERSION,
            sqlite: rusqlite::version().into(),
        },
        counts,
        file: FileInfo {
            name: name.clone(),
            bytes,
            sha256,
        },
        content_sha256,
        content_recipe: content_recipe(&name),
    })
}

/// The manifest as pretty JSON with a final newline (deterministic).
pub fn manifest_json(m: &Manifest) -> String {
    let mut s = serde_json::to_string_pretty(m).expect("manifests serialise");
    s.push('\n');
    s
}

/// Write a manifest atomically; an existing file is refused unless `replace`.
pub fn write_manifest(path: &Path, m: &Manifest, replace: bool) -> Result<()> {
    write_atomic(path, manifest_json(m).as_bytes(), replace)
}

/// Whether `name` is a plain file name: not empty, not `.` or `..`, no path separator, no
/// control character, at most 255 bytes. A manifest is untrusted input, and its file name
/// must never be able to name a place outside the directory it is used in.
pub fn check_file_name(name: &str) -> std::result::Result<(), String> {
    if name.is_empty() {
        return Err("is empty".into());
    }
    if name == "." || name == ".." {
        return Err(format!("'{name}' names a directory"));
    }
    if name.contains('/') || name.contains('\\') {
        return Err("contains a path separator".into());
    }
    if name.chars().any(char::is_control) {
        return Err("contains a control character".into());
    }
    if name.len() > 255 {
        return Err("is longer than 255 bytes".into());
    }
    Ok(())
}

/// The checks [`read_manifest`] makes on a parsed manifest before anything uses it.
fn check_manifest(m: &Manifest) -> std::result::Result<(), String> {
    check_file_info(&m.file, &m.content_sha256)?;
    if !(1..=crate::enumerate::bounds::MAX_HEIGHT).contains(&m.parameters.height) {
        return Err(format!(
            "its height {} is outside the heights a table can have (1 to {})",
            m.parameters.height,
            crate::enumerate::bounds::MAX_HEIGHT
        ));
    }
    Ok(())
}

/// The checks of the `file` part and the content hash of any manifest (untrusted input):
/// a plain file name ([`check_file_name`]), hashes of 64 hexadecimal digits, and a size that
/// is whole pages below SQLite's limit. `Err` follows "… is not a valid qorbits manifest: ".
pub fn check_file_info(file: &FileInfo, content_sha256: &str) -> std::result::Result<(), String> {
    check_file_name(&file.name).map_err(|why| {
        format!(
            "its file name {:?} {why}; a manifest names a plain file, never a path",
            file.name
        )
    })?;
    let hex64 = |h: &str| h.len() == 64 && h.bytes().all(|b| b.is_ascii_hexdigit());
    if !hex64(&file.sha256) || !hex64(content_sha256) {
        return Err("its hashes are not 64 hexadecimal digits".into());
    }
    // SQLite's own limit on a database file is below 2^48 bytes; a table is whole pages.
    if file.bytes == 0 || file.bytes > 1 << 48 || file.bytes % u64::from(PAGE_SIZE) != 0 {
        return Err(format!(
            "its file size {} bytes is impossible (a table is whole pages of {PAGE_SIZE} bytes, below 2^48 bytes)",
            file.bytes
        ));
    }
    Ok(())
}

/// The `format` field of a manifest file, or `None` when the file cannot be read, is not a
/// JSON object or has no text `format`: the tag that says which kind of file a manifest
/// describes ([`FORMAT`] for a table), read before the manifest is parsed as that kind.
pub fn manifest_format(path: &Path) -> Option<String> {
    let text = std::fs::read_to_string(path).ok()?;
    let v: serde_json::Value = serde_json::from_str(&text).ok()?;
    v.get("format")?.as_str().map(str::to_string)
}

/// Read a manifest, with a clear error for a missing, malformed or implausible file (see
/// [`check_file_name`]: the file name must be a plain name, never a path).
pub fn read_manifest(path: &Path) -> Result<Manifest> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::Io(format!("cannot read the manifest {}: {e}", path.display())))?;
    let m: Manifest = serde_json::from_str(&text)
        .map_err(|e| Error::Input(format!("{} is not a qorbits manifest: {e}", path.display())))?;
    check_manifest(&m).map_err(|why| {
        Error::Input(format!(
            "{} is not a valid qorbits manifest: {why}",
            path.display()
        ))
    })?;
    Ok(m)
}

/// Rebuilds the table a manifest describes and checks the result against it, on the
/// current rayon pool. The manifest is untrusted: it is validated by [`read_manifest`], and
/// the rebuild happens in a fresh private directory under a fixed name, removed afterwards,
/// so nothing from the manifest becomes part of a path. A write that finds no room there
/// fails with [`Error::NoSpace`] and leaves nothing behind.
pub fn rebuild_and_compare(manifest: &Path, progress: &dyn Progress) -> Result<Vec<Check>> {
    let m = read_manifest(manifest)?;
    let dir = fresh_temp_dir("rebuild")?;
    let out = dir.join("rebuild.sqlite");
    let opts = crate::table::build::BuildOptions::default();
    let result = crate::table::build::build_table(&m.parameters, &out, &opts, progress)
        .and_then(|_| verify(&out, &m));
    let _ = std::fs::remove_dir_all(&dir);
    result.map_err(|e| match e {
        // The private directory is gone, runs and all: nothing is kept for resuming.
        Error::NoSpace(mut n) => {
            n.kept = None;
            if let Some((_, bytes)) = n.need.take() {
                n.need = Some((
                    "the rebuild in the temporary directory (TMPDIR)".into(),
                    bytes,
                ));
            }
            Error::NoSpace(n)
        }
        e => e,
    })
}
