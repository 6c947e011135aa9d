//! `qorbits verify`: a table or curve dataset against its manifest, or a rebuild from a
//! manifest compared with it. The manifest's `format` says which kind of file it describes.

use crate::cmd::Jobs;
use crate::out::emit;
use crate::progress::Bar;
use qorbits::error::Error;
use qorbits::selmer::dataset::{
    read_dataset_manifest, rebuild_dataset, verify_dataset, FORMAT as CURVES_FORMAT,
};
use qorbits::table::json;
use qorbits::table::manifest::{
    check_file_name, default_manifest_path, diagnosis, manifest_format, read_manifest,
    rebuild_and_compare, verify, Check,
};
use serde_json::Value;
use std::fmt::Write;
use std::path::Path;
use std::path::PathBuf;
use std::process::ExitCode;

/// Check a table or curve dataset against its manifest, or rebuild from a manifest and
/// compare.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits verify --db qorbits-h1e6.sqlite\n  qorbits verify curves.manifest.json\n  qorbits verify --rebuild manifests/qorbits-h1e5.manifest.json\n\nExit status: 0 when every check passes, 1 when one fails, 2 for a usage error."
)]
pub struct Args {
    /// A manifest: check the file it names, in the manifest's directory.
    #[arg(value_name = "MANIFEST", conflicts_with_all = ["db", "manifest", "rebuild"])]
    beside: Option<PathBuf>,
    /// The table or curve dataset (SQLite file) to check.
    #[arg(long, value_name = "TABLE", required_unless_present_any = ["rebuild", "beside"])]
    db: Option<PathBuf>,
    /// The manifest (default: beside the table).
    #[arg(long, value_name = "MANIFEST")]
    manifest: Option<PathBuf>,
    /// Rebuild the table or curve dataset described by this manifest and compare.
    #[arg(long, value_name = "MANIFEST", conflicts_with_all = ["db", "manifest"])]
    rebuild: Option<PathBuf>,
    #[command(flatten)]
    jobs: Jobs,
    /// Print one JSON object instead of text (keys in docs/output.md).
    #[arg(long)]
    json: bool,
    /// No progress bar.
    #[arg(long)]
    quiet: bool,
}

/// Whether the manifest at `m` describes a curve dataset (its `format`).
fn is_curves(m: &Path) -> bool {
    manifest_format(m).as_deref() == Some(CURVES_FORMAT)
}

/// The file a manifest names, in the manifest's directory (the name checked to be a plain
/// file name, so it cannot point elsewhere).
pub fn beside(manifest: &Path) -> Result<PathBuf, Error> {
    let name = if is_curves(manifest) {
        read_dataset_manifest(manifest)?.file.name
    } else {
        read_manifest(manifest)?.file.name
    };
    check_file_name(&name).map_err(|why| {
        Error::Input(format!(
            "{}: its file name {why}; a manifest names a plain file",
            manifest.display()
        ))
    })?;
    Ok(manifest.with_file_name(name))
}

/// The checks of `db` against the manifest `m`, as the manifest's format says.
fn checks_of(db: &Path, m: &Path) -> Result<Vec<Check>, Error> {
    if is_curves(m) {
        verify_dataset(db, &read_dataset_manifest(m)?)
    } else {
        verify(db, &read_manifest(m)?)
    }
}

pub fn run(a: Args) -> Result<ExitCode, Error> {
    let from_manifest = match &a.beside {
        Some(m) => Some(beside(m)?),
        None => None,
    };
    let db = from_manifest.as_ref().or(a.db.as_ref());
    let (manifest, checks) = match (db, &a.rebuild) {
        (_, Some(m)) => {
            let bar = Bar::new(a.quiet);
            let c = if is_curves(m) {
                a.jobs.run(|| rebuild_dataset(m, &bar))?
            } else {
                a.jobs.run(|| rebuild_and_compare(m, &bar))?
            };
            bar.finish();
            (m.clone(), c)
        }
        (Some(db), None) if a.beside.is_some() => {
            let m = a.beside.clone().expect("given");
            let c = checks_of(db, &m)?;
            (m, c)
        }
        (Some(db), None) => {
            if std::fs::symlink_metadata(db).is_err() {
                return Err(Error::Io(format!(
                    "no table at {}: the file does not exist; check the path",
                    db.display()
                )));
            }
            let m = a
                .manifest
                .clone()
                .unwrap_or_else(|| default_manifest_path(db));
            let c = checks_of(db, &m)?;
            (m, c)
        }
        (None, None) => unreachable!("clap requires --db or --rebuild"),
    };
    let failed = checks.iter().filter(|c| !c.ok).count();
    let what = diagnosis(&checks);
    if a.json {
        let v = json::object(vec![
            ("ok", Value::from(failed == 0)),
            ("table", db.map(|p| p.display().to_string()).into()),
            ("manifest", Value::from(manifest.display().to_string())),
            ("rebuilt", Value::from(a.rebuild.is_some())),
            ("passed", Value::from(checks.len() - failed)),
            ("failed", Value::from(failed)),
            ("diagnosis", what.clone().into()),
            (
                "checks",
                Value::Array(
                    checks
                        .iter()
                        .map(|c| {
                            json::object(vec![
                                ("name", Value::from(c.name.clone())),
                                ("ok", Value::from(c.ok)),
                                ("detail", Value::from(c.detail.clone())),
                            ])
                        })
                        .collect(),
                ),
            ),
        ]);
        emit(&format!("{v}\n"));
    } else {
        let mut out = String::new();
        for c in &checks {
            let mark = if c.ok { "ok  " } else { "FAIL" };
            writeln!(out, "{mark} {:<22} {}", c.name, c.detail).expect("string");
        }
        if failed == 0 {
            writeln!(out, "verified: all {} checks passed", checks.len()).expect("string");
        } else {
            writeln!(
                out,
                "verification FAILED: {failed} of {} checks: {}",
                checks.len(),
                what.unwrap_or_default()
            )
            .expect("string");
        }
        emit(&out);
    }
    Ok(if failed == 0 {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    })
}
