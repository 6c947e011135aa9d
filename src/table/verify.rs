//! Verification of a table against its manifest (DESIGN §5), and a diagnosis that names
//! what is wrong when a check fails.
//!
//! The checks, in order: the file's size and SHA-256 (the hash is computed only when the
//! file is not larger than the manifest says, so a huge file is never read for nothing),
//! the manifest's format, the schema version in the file's header, the table as every
//! command opens it (`table::validate`: header, hardened connection, schema, `meta`),
//! SQLite's page-by-page integrity check (pages, index entries, NOT NULL columns), the
//! content hash (every value of the declared type), the parameters and the counts.
//! [`diagnosis`] turns the failed checks into one sentence: which page is damaged, that
//! the file is truncated, that a row count or the content differs, that the manifest was
//! edited or belongs to another table.
//!
//! ```
//! use qorbits::table::verify::{diagnosis, Check};
//! let c = |name: &str, ok| Check { name: name.into(), ok, detail: "manifest 2, file 3".into() };
//! let d = diagnosis(&[c("file sha256", false), c("content sha256", false), c("classes", false)]);
//! assert!(d.unwrap().starts_with("row count differs"));
//! assert_eq!(diagnosis(&[c("classes", true)]), None);
//! ```

use crate::error::{Error, Result};
use crate::table::format::{Format, TABLE};
use crate::table::hash::{content_sha256, file_sha256};
use crate::table::header::{Header, HEADER_LEN};
use crate::table::manifest::{counts, FileInfo, Manifest, FORMAT};
use crate::table::pages::locate_damage;
use crate::table::reader::{read_error, table_params};
use crate::table::schema::PAGE_SIZE;
use crate::table::schema_check::trees_in;
use crate::table::validate::{integrity, open_checked_as};
use rusqlite::Connection;
use std::io::Read;
use std::path::Path;

/// One verification check.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Check {
    /// What is checked.
    pub name: String,
    /// Whether it matched.
    pub ok: bool,
    /// Expected and found values, or why it could not be checked.
    pub detail: String,
}

/// A check that `got` (from the file) equals `want` (from the manifest).
pub fn check(name: &str, want: impl std::fmt::Display, got: impl std::fmt::Display) -> Check {
    let (w, g) = (want.to_string(), got.to_string());
    Check {
        name: name.into(),
        ok: w == g,
        detail: if w == g {
            w
        } else {
            format!("manifest {w}, file {g}")
        },
    }
}

/// A check with its outcome given.
pub fn outcome(name: &str, ok: bool, detail: String) -> Check {
    Check {
        name: name.into(),
        ok,
        detail,
    }
}

/// The names of the checks of counts.
fn is_count(name: &str) -> bool {
    ROW_COUNTS.contains(&name)
        || ["els classes", "els classes over Q"].contains(&name)
        || name.starts_with("signature ")
        || name.starts_with("galois ")
        || name.starts_with("selmer rank ")
        || name == "two-torsion ranks"
}

/// The names of the checks of row counts (tables' and the curve dataset's).
const ROW_COUNTS: [&str; 4] = ["classes", "pairs", "curves", "elements"];

/// Check a table against a manifest (see the module doc). A file that is damaged or not a
/// table yields failed checks; a missing file, a directory or another kind of non-regular
/// file is an error.
pub fn verify(db: &Path, m: &Manifest) -> Result<Vec<Check>> {
    let format = (m.format != FORMAT).then_some(m.format.as_str());
    let (mut out, conn) = verify_file(db, &TABLE, &m.file, m.versions.schema, format)?;
    let Some(conn) = conn else {
        return Ok(out);
    };
    let got = (|| -> Result<_> {
        Ok((
            (table_params(&conn)?, counts(&conn)?),
            content_sha256(&conn)?,
        ))
    })();
    let Some((params, counts)) = content_check(&mut out, &m.content_sha256, got) else {
        return Ok(out);
    };
    out.push(check("height", m.parameters.height, params.height));
    out.push(check(
        "include_reducible",
        m.parameters.include_reducible,
        params.include_reducible,
    ));
    out.push(check("classes", m.counts.classes, counts.classes));
    out.push(check("pairs", m.counts.pairs, counts.pairs));
    out.push(check("els classes", m.counts.els, counts.els));
    out.push(check(
        "els classes over Q",
        m.counts.rational_els,
        counts.rational_els,
    ));
    for (k, v) in &m.counts.by_signature {
        let got = counts.by_signature.get(k).copied().unwrap_or(0);
        out.push(check(&format!("signature {k}"), v, got));
    }
    for (k, v) in &m.counts.by_galois {
        let got = counts.by_galois.get(k).copied().unwrap_or(0);
        out.push(check(&format!("galois {k}"), v, got));
    }
    Ok(out)
}

/// Pushes the check of the content hash of an opened file: `got` is what the format reads
/// (parameters, counts) with the hash it computed, or why it could not read them. Returns
/// what was read, `None` when reading failed.
pub fn content_check<T>(out: &mut Vec<Check>, want: &str, got: Result<(T, String)>) -> Option<T> {
    match got {
        Ok((t, hash)) => {
            out.push(check("content sha256", want, hash));
            Some(t)
        }
        Err(e) => {
            out.push(outcome("content sha256", false, e.to_string()));
            None
        }
    }
}

/// The checks every format shares, in order: the file's size and SHA-256 against `file`,
/// files beside it, the manifest's format (`unknown_format` names one this build does not
/// write), the schema version in the header against `schema`, the file opened as `f`
/// (`table::validate`) and the integrity check with the page walk. Returns the checks and
/// the connection when the file could be opened, for the format's own checks of content and
/// counts.
pub fn verify_file(
    db: &Path,
    f: &'static Format,
    file: &FileInfo,
    schema: u32,
    unknown_format: Option<&str>,
) -> Result<(Vec<Check>, Option<Connection>)> {
    let shown = db.display();
    let meta = match std::fs::metadata(db) {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            return Err(Error::Io(format!(
                "no {} at {shown}: the file does not exist; check the path",
                f.noun
            )))
        }
        Err(e) => return Err(Error::Io(format!("cannot read {shown}: {e}"))),
        Ok(meta) => meta,
    };
    if !meta.is_file() {
        return Err(Error::Io(format!(
            "{shown} is not a regular file (a directory, device, socket or pipe), so not a {}",
            f.noun
        )));
    }
    let size = meta.len();
    let larger = size > file.bytes;
    let skipped = |what: &str| {
        format!(
            "{what}: the file has {size} bytes, more than the manifest's {}",
            file.bytes
        )
    };
    let mut out = vec![check("file size", file.bytes, size)];
    out.push(match (larger, file_sha256(db)) {
        (true, _) => outcome("file sha256", false, skipped("not computed")),
        (false, Ok(h)) => check("file sha256", &file.sha256, h),
        (false, Err(e)) => outcome("file sha256", false, e.to_string()),
    });
    if let Some(c) = side_files(db) {
        out.push(c);
    }
    if let Some(name) = unknown_format {
        out.push(outcome(
            "manifest format",
            false,
            format!("unknown format {name}"),
        ));
    }
    out.push(match header_version(db) {
        Some(v) => check("schema version", schema, v),
        None => outcome(
            "schema version",
            false,
            "the file has no SQLite header".into(),
        ),
    });
    let conn = match open_checked_as(f, db) {
        Ok(conn) => conn,
        Err((_, e)) => {
            out.push(outcome(f.noun, false, e.to_string()));
            return Ok((out, None));
        }
    };
    out.push(outcome(
        f.noun,
        true,
        "header, schema and meta rows as this qorbits writes them".into(),
    ));
    out.push(if larger {
        outcome("integrity", false, skipped("not run"))
    } else {
        // Our walk names the page where SQLite's check may stop at an unreadable record;
        // SQLite's check also compares every index with its table.
        let walked = walk(f, db, &conn);
        match (walked, integrity(&conn)) {
            (Some(w), _) => outcome("integrity", false, w),
            (None, Ok(msgs)) if msgs.is_empty() => outcome(
                "integrity",
                true,
                "every page, record, index entry and NOT NULL column sound".into(),
            ),
            (None, Ok(msgs)) => outcome("integrity", false, damage(&msgs)),
            (None, Err(e)) => outcome("integrity", false, read_error(&conn, e).to_string()),
        }
    });
    Ok((out, Some(conn)))
}

/// The first damaged page the walk of `table::pages` finds in the file behind `conn`.
fn walk(f: &'static Format, db: &Path, conn: &Connection) -> Option<String> {
    use std::os::unix::fs::FileExt;
    let file = match std::fs::File::open(db) {
        Ok(f) => f,
        Err(e) => return Some(format!("cannot read {}: {e}", db.display())),
    };
    let mut b = [0u8; HEADER_LEN];
    if file.read_exact_at(&mut b, 0).is_err() {
        return Some("the file has no SQLite header".into());
    }
    let h = Header::parse(&b)?;
    let trees = match trees_in(f, conn) {
        Ok(t) => t,
        Err(e) => return Some(read_error(conn, e).to_string()),
    };
    let size = u64::from(PAGE_SIZE);
    let mut read = |p: u32| {
        let mut page = vec![0u8; PAGE_SIZE as usize];
        file.read_exact_at(&mut page, (u64::from(p) - 1) * size)
            .map(|()| page)
    };
    locate_damage(h.pages, &mut read, &trees, h.freelist.1 == 0)
}

/// A failed check when a rollback journal or a write-ahead log lies beside the table:
/// qorbits never writes one and never reads one (its connections are immutable), but the
/// sqlite3 shell of the content recipe would apply it and read other rows.
fn side_files(db: &Path) -> Option<Check> {
    let found: Vec<String> = ["-journal", "-wal"]
        .iter()
        .map(|s| {
            let mut p = db.as_os_str().to_owned();
            p.push(s);
            std::path::PathBuf::from(p)
        })
        .filter(|p| std::fs::symlink_metadata(p).is_ok())
        .map(|p| p.display().to_string())
        .collect();
    (!found.is_empty()).then(|| {
        outcome(
            "side files",
            false,
            format!(
                "{} lies beside the table: a rollback journal or log qorbits never writes, which \
                 the sqlite3 shell of the content recipe would apply and so read other rows; \
                 remove it",
                found.join(" and ")
            ),
        )
    })
}

/// The schema version in the file's header (`PRAGMA user_version`), read from the bytes.
fn header_version(db: &Path) -> Option<u32> {
    let mut b = [0u8; HEADER_LEN];
    std::fs::File::open(db).ok()?.read_exact(&mut b).ok()?;
    Header::parse(&b).map(|h| h.user_version)
}

/// The first message of the integrity check, as a sentence naming the damaged page or
/// index, with the number of further messages.
fn damage(msgs: &[String]) -> String {
    let first = &msgs[0];
    let lower = first.to_ascii_lowercase();
    let page = lower.find("page ").and_then(|at| {
        let digits: String = lower[at + 5..]
            .chars()
            .take_while(char::is_ascii_digit)
            .collect();
        digits.parse::<u64>().ok()
    });
    let what = match (page, lower.find("index ")) {
        (Some(p), _) => format!("page {p} damaged ({first})"),
        (None, Some(_)) => format!("an index does not match its table ({first})"),
        (None, None) => format!("damaged ({first})"),
    };
    match msgs.len() {
        1 => what,
        n => format!("{what}, and {} more problems", n - 1),
    }
}

/// One sentence naming what is wrong, from the checks of [`verify`]; `None` when every
/// check passed. The file's own damage comes first, then what the manifest and the file
/// disagree on.
pub fn diagnosis(checks: &[Check]) -> Option<String> {
    let failed: Vec<&Check> = checks.iter().filter(|c| !c.ok).collect();
    let get = |name: &str| failed.iter().copied().find(|c| c.name == name);
    let first = failed.first()?;
    if let Some(c) = get("manifest format") {
        return Some(format!(
            "the manifest is not one this qorbits reads ({})",
            c.detail
        ));
    }
    if let Some(c) = failed
        .iter()
        .find(|c| c.name == TABLE.noun || c.name.ends_with("dataset"))
    {
        return Some(format!("the file is refused: {}", c.detail));
    }
    if let Some(c) = get("side files") {
        return Some(c.detail.clone());
    }
    if let Some(c) = get("integrity").filter(|c| !c.detail.starts_with("not run")) {
        return Some(c.detail.clone());
    }
    if let Some(c) = get("content sha256").filter(|c| !c.detail.starts_with("manifest ")) {
        return Some(format!("the rows cannot be read: {}", c.detail));
    }
    let said = |c: &Check| format!("{}: {}", c.name, c.detail);
    let params: Vec<&Check> = ["height", "include_reducible", "family"]
        .into_iter()
        .filter_map(get)
        .collect();
    let counts: Vec<&Check> = failed
        .iter()
        .copied()
        .filter(|c| is_count(&c.name))
        .collect();
    let (file, size, content) = (get("file sha256"), get("file size"), get("content sha256"));
    if file.is_none() && size.is_none() && content.is_none() {
        let what = params.first().or(counts.first()).copied().unwrap_or(first);
        return Some(format!(
            "the manifest was edited: its file and content hashes match this table, but not its \
             {}",
            said(what)
        ));
    }
    if let Some(p) = params.first() {
        return Some(if !counts.is_empty() || size.is_some() {
            format!(
                "a manifest for another table: parameters differ ({})",
                said(p)
            )
        } else {
            format!(
                "the table's meta rows record other parameters than the manifest ({}) although \
                 its rows match the manifest's counts: the meta rows were changed",
                said(p)
            )
        });
    }
    if let Some(c) = counts
        .iter()
        .find(|c| ROW_COUNTS.contains(&c.name.as_str()))
    {
        return Some(format!(
            "row count differs ({}); the content differs too",
            said(c)
        ));
    }
    if let Some(c) = counts.first() {
        return Some(format!(
            "the counts differ ({}): values of the rows were changed",
            said(c)
        ));
    }
    if content.is_some() {
        return Some(if file.is_none() && size.is_none() {
            "content sha256 differs although the file sha256 matches: the rows were changed and \
             the manifest's file hash updated to match (or its content hash was edited)"
                .into()
        } else {
            "content sha256 differs: some values of the rows are not the ones the manifest \
             records (the counts agree)"
                .into()
        });
    }
    if let Some(c) = get("schema version") {
        return Some(format!("the schema version differs ({})", c.detail));
    }
    if let Some(c) = size {
        return Some(format!(
            "the file size differs ({}) although the file holds the manifest's rows",
            c.detail
        ));
    }
    if file.is_some() {
        return Some(
            "file sha256 differs, but the header, the schema, every page and all rows match the \
             manifest: the damage is in bytes no row uses"
                .into(),
        );
    }
    Some(said(first))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integrity_messages_name_the_page() {
        let m = |s: &str| vec![s.to_string()];
        assert_eq!(
            damage(&m("Tree 3 page 7 cell 0: Rowid 9 out of order")),
            "page 7 damaged (Tree 3 page 7 cell 0: Rowid 9 out of order)"
        );
        assert!(damage(&m("row 5 missing from index pairs_h4")).starts_with("an index"));
        let two = vec!["Page 4: never used".to_string(), "x".to_string()];
        assert!(damage(&two).ends_with("and 1 more problems"));
    }
}
