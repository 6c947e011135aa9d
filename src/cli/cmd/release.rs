//! `qorbits release`: a folder to publish a table from: the gzipped table, its manifest, a
//! SHA256SUMS file that `sha256sum -c` accepts, CITATION.cff, the counts picture and an
//! index.html that summarises it all and reads offline.

use crate::cmd::cite::{citation_year, describe_params, Citation};
use crate::plot::table_counts_svg;
use flate2::{Compression, GzBuilder};
use qorbits::error::Error;
use qorbits::table::atomic::{write_atomic, TempFile};
use qorbits::table::hash::file_sha256;
use qorbits::table::manifest::{manifest_for, manifest_json, Manifest};
use qorbits::table::plan::release_bytes;
use qorbits::table::reader::open_table;
use qorbits::table::space::{with_need, write_error};
use qorbits::table::stats::stats_counts;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Write a release folder for a table: table.sqlite.gz, manifest, SHA256SUMS, CITATION.cff,
/// counts.svg and index.html.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Example:\n  qorbits release --db qorbits-h1e6.sqlite --out release-h1e6 --url https://example.org/qorbits-h1e6\n  cd release-h1e6 && sha256sum -c SHA256SUMS"
)]
pub struct Args {
    /// The table (SQLite file).
    #[arg(long, value_name = "TABLE")]
    db: PathBuf,
    /// The folder to write (created; an existing one must be empty unless --force).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,
    /// Where the release will be published: a URL, or a DOI (10.xxxx/…).
    #[arg(long, value_name = "URL_OR_DOI")]
    url: Option<String>,
    /// The year of the citation (default: the current year).
    #[arg(long, allow_hyphen_values = true)]
    year: Option<String>,
    /// Write into a folder that already holds files, replacing them.
    #[arg(long)]
    force: bool,
}

/// Text for HTML.
fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

fn gzip_file(db: &Path, target: &Path, force: bool) -> Result<(), Error> {
    let io = |e: std::io::Error| write_error(target, e);
    let tmp = TempFile::create(target, force)?;
    let mut input = std::fs::File::open(db)
        .map_err(|e| Error::Io(format!("cannot read {}: {e}", db.display())))?;
    let file = std::fs::OpenOptions::new()
        .write(true)
        .open(tmp.path())
        .map_err(io)?;
    // No name and no time in the header: the same table gives the same bytes.
    let mut gz = GzBuilder::new()
        .mtime(0)
        .write(std::io::BufWriter::new(file), Compression::best());
    // Read errors are the table's, write errors the target's.
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = std::io::Read::read(&mut input, &mut buf)
            .map_err(|e| Error::Io(format!("cannot read {}: {e}", db.display())))?;
        if n == 0 {
            break;
        }
        gz.write_all(&buf[..n]).map_err(io)?;
    }
    gz.finish().and_then(|mut w| w.flush()).map_err(io)?;
    tmp.commit(target, force)
}

fn rows_html(rows: &[(String, String)]) -> String {
    rows.iter()
        .map(|(k, v)| format!("<tr><th>{}</th><td>{}</td></tr>\n", esc(k), esc(v)))
        .collect()
}

struct Page<'a> {
    m: &'a Manifest,
    ratios: [(u8, u64, f64); 3],
    bibtex: String,
    files: &'a [(String, String)],
    gz: String,
    manifest_name: String,
}

fn index_html(p: &Page) -> String {
    let m = p.m;
    let title = format!(
        "qorbits table: classes of binary quartic forms with height below {}",
        m.parameters.height
    );
    let params = rows_html(&[
        (
            "height bound X (classes with H < X)".into(),
            m.parameters.height.to_string(),
        ),
        (
            "reducible classes included".into(),
            if m.parameters.include_reducible {
                "yes"
            } else {
                "no"
            }
            .into(),
        ),
        ("builder".into(), format!("qorbits {}", m.versions.builder)),
        ("schema version".into(), m.versions.schema.to_string()),
        ("SQLite".into(), m.versions.sqlite.clone()),
    ]);
    let mut counts = vec![
        ("classes".to_string(), m.counts.classes.to_string()),
        ("pairs (I, J)".to_string(), m.counts.pairs.to_string()),
        (
            "everywhere locally soluble".to_string(),
            m.counts.els.to_string(),
        ),
        (
            "classes over Q of those (2-Selmer elements)".to_string(),
            m.counts.rational_els.to_string(),
        ),
    ];
    counts.extend(
        m.counts
            .by_signature
            .iter()
            .map(|(k, v)| (format!("signature {k}"), v.to_string())),
    );
    counts.extend(
        m.counts
            .by_galois
            .iter()
            .map(|(k, v)| (format!("Galois group {k}"), v.to_string())),
    );
    let ratios: String = p
        .ratios
        .iter()
        .map(|(real, n, main)| {
            format!(
                "<tr><td>{real}</td><td>{n}</td><td>{main:.1}</td><td>{:.3}</td></tr>\n",
                *n as f64 / main
            )
        })
        .collect();
    let hashes = rows_html(&[
        (
            "content SHA-256 (cite this)".into(),
            m.content_sha256.clone(),
        ),
        (format!("SHA-256 of {}", m.file.name), m.file.sha256.clone()),
        (
            format!("size of {}", m.file.name),
            format!("{} bytes", m.file.bytes),
        ),
    ]);
    let files: String = p
        .files
        .iter()
        .map(|(name, h)| {
            format!(
                "<tr><td><a href=\"{0}\">{0}</a></td><td><code>{1}</code></td></tr>\n",
                esc(name),
                h
            )
        })
        .collect();
    let db = esc(&m.file.name);
    format!(
        r#"<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>{title}</title>
<style>
body {{ font-family: sans-serif; max-width: 60em; margin: 2em auto; color: #111; background: #fff; line-height: 1.4; }}
h1 {{ font-size: 1.6em; }} h2 {{ border-bottom: 1px solid #999; margin-top: 1.6em; }}
table {{ border-collapse: collapse; margin: 0.5em 0; }} th, td {{ border: 1px solid #bbb; padding: 0.2em 0.6em; text-align: left; }}
th {{ background: #eef; }} code, pre {{ background: #f4f4f4; }} pre {{ padding: 0.6em; overflow-x: auto; }}
img {{ max-width: 100%; border: 1px solid #ccc; }}
</style></head>
<body>
<h1>{title}</h1>
<p>{what}.</p>
<h2>Parameters</h2>
<table>{params}</table>
<h2>Counts</h2>
<table>{counts}</table>
<h2>Against the asymptotic count</h2>
<p>Irreducible classes by number of real roots against the main terms (4, 32, 8)/135 &middot; &zeta;(2) &middot; X<sup>5/6</sup> of the published asymptotic count (recalled from memory; convergence is slow, read the ratios as a trend).</p>
<table><tr><th>real roots</th><th>classes</th><th>main term</th><th>ratio</th></tr>
{ratios}</table>
<p><img src="counts.svg" alt="Counts of classes by signature against X, with the main terms and their ratios"></p>
<h2>Hashes</h2>
<table>{hashes}</table>
<h2>Files</h2>
<table><tr><th>file</th><th>SHA-256</th></tr>
{files}</table>
<h2>How to verify</h2>
<pre>sha256sum -c SHA256SUMS
gunzip -k {gz}
qorbits verify --db {db} --manifest {manifest}
# the content hash without qorbits (the manifest's content_recipe):
{recipe} </pre>
<h2>How to cite</h2>
<p>Cite the table by its content hash; <a href="CITATION.cff">CITATION.cff</a> holds the same for software that reads it.</p>
<pre>{bibtex}</pre>
</body></html>
"#,
        title = esc(&title),
        what = esc(&describe_params(&m.parameters, m.counts.classes)),
        counts = rows_html(&counts),
        gz = esc(&p.gz),
        manifest = esc(&p.manifest_name),
        recipe = esc(&m.content_recipe),
        bibtex = esc(&p.bibtex),
    )
}

pub fn run(a: Args) -> Result<(), Error> {
    let conn = open_table(&a.db)?;
    let m = manifest_for(&a.db)?;
    let year = citation_year(a.year.as_deref())?;
    if let Ok(mut entries) = std::fs::read_dir(&a.out) {
        if entries.next().is_some() && !a.force {
            return Err(Error::Exists(a.out.clone()));
        }
    }
    let created = std::fs::symlink_metadata(&a.out).is_err();
    std::fs::create_dir_all(&a.out)
        .map_err(|e| Error::Io(format!("cannot create {}: {e}", a.out.display())))?;
    let stem = m.file.name.trim_end_matches(".sqlite").to_string();
    let gz = format!("{}.gz", m.file.name);
    let manifest_name = format!("{stem}.manifest.json");
    let names = [
        gz.as_str(),
        manifest_name.as_str(),
        "CITATION.cff",
        "counts.svg",
        "index.html",
        "SHA256SUMS",
    ];
    let written = write_folder(&a, &conn, &m, year, &names);
    if let Err(e) = written {
        // No half release: the files of this release go, and the folder if it was new.
        for n in names {
            let _ = std::fs::remove_file(a.out.join(n));
        }
        if created {
            let _ = std::fs::remove_dir(&a.out);
        }
        return Err(with_need(e, "the release", release_bytes(m.file.bytes)));
    }
    Ok(())
}

/// Writes the files `names` (gzipped table, manifest, citation, picture, page, sums) into
/// the folder, SHA256SUMS last.
fn write_folder(
    a: &Args,
    conn: &rusqlite::Connection,
    m: &Manifest,
    year: i64,
    names: &[&str; 6],
) -> Result<(), Error> {
    let [gz, manifest_name, ..] = *names;
    let ratios = stats_counts(conn)?;
    gzip_file(&a.db, &a.out.join(gz), true)?;
    write_atomic(
        &a.out.join(manifest_name),
        manifest_json(m).as_bytes(),
        true,
    )?;
    let citation = Citation::of_table(
        m.parameters,
        m.content_sha256.clone(),
        m.counts.classes,
        year,
        a.url.clone(),
        PathBuf::from(&m.file.name),
    );
    write_atomic(&a.out.join("CITATION.cff"), citation.cff().as_bytes(), true)?;
    write_atomic(
        &a.out.join("counts.svg"),
        table_counts_svg(conn)?.as_bytes(),
        true,
    )?;
    let mut files = Vec::new();
    for name in &names[..4] {
        files.push((name.to_string(), file_sha256(&a.out.join(name))?));
    }
    let page = index_html(&Page {
        m,
        ratios,
        bibtex: citation.bibtex(),
        files: &files,
        gz: gz.to_string(),
        manifest_name: manifest_name.to_string(),
    });
    write_atomic(&a.out.join("index.html"), page.as_bytes(), true)?;
    files.push((
        "index.html".to_string(),
        file_sha256(&a.out.join("index.html"))?,
    ));
    let sums: String = files.iter().map(|(n, h)| format!("{h}  {n}\n")).collect();
    write_atomic(&a.out.join("SHA256SUMS"), sums.as_bytes(), true)
}
