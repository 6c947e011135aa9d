//! `qorbits cite`: a BibTeX entry and a CITATION.cff file for a table or a curve dataset,
//! naming its content hash.

use crate::out::emit;
use qorbits::error::Error;
use qorbits::selmer::dataset::{read_dataset_manifest, DatasetManifest, CURVES, FORMAT};
use qorbits::table::hash::{content_sha256, content_sha256_in};
use qorbits::table::manifest::manifest_format;
use qorbits::table::reader::{open_table, table_params};
use qorbits::table::row::Params;
use qorbits::table::schema::SCHEMA_VERSION;
use qorbits::table::validate::open_checked_as;
use std::path::{Path, PathBuf};

/// Print a BibTeX entry and a CITATION.cff file for a table or a curve dataset.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits cite --db qorbits-h1e6.sqlite --url https://example.org/qorbits-h1e6 --format bibtex\n  qorbits cite curves.manifest.json"
)]
pub struct Args {
    /// A manifest: cite the file it names, in the manifest's directory, after checking that
    /// its content hash is the manifest's.
    #[arg(value_name = "MANIFEST", conflicts_with = "db")]
    manifest: Option<PathBuf>,
    /// The table (SQLite file).
    #[arg(long, value_name = "TABLE", required_unless_present = "manifest")]
    db: Option<PathBuf>,
    /// Where the dataset is published: a URL, or a DOI (10.xxxx/…).
    #[arg(long, value_name = "URL_OR_DOI")]
    url: Option<String>,
    /// Which citation to print.
    #[arg(long, value_enum, default_value = "both")]
    format: CiteFormat,
    /// The year of the citation (default: the current year).
    #[arg(long, allow_hyphen_values = true)]
    year: Option<String>,
}

/// The citation formats.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum CiteFormat {
    /// A BibTeX entry.
    Bibtex,
    /// A CITATION.cff file (Citation File Format 1.2.0).
    Cff,
    /// Both, BibTeX first.
    Both,
}

/// The parameters in words.
pub fn describe_params(p: &Params, classes: u64) -> String {
    let kind = if p.include_reducible {
        "integral binary quartic forms with non-zero discriminant (reducible ones included)"
    } else {
        "irreducible integral binary quartic forms"
    };
    format!(
        "every GL2(Z)-class of {kind} a x^4 + b x^3 y + c x^2 y^2 + d x y^3 + e y^4 with height \
         H = max(|I|^3, J^2/4) below {}, one canonical representative each, with invariants, \
         discriminant, factorisation, Galois group, stabiliser and local data ({classes} classes)",
        p.height
    )
}

/// The year of `--year`, or the current year.
pub fn citation_year(year: Option<&str>) -> Result<i64, Error> {
    match year {
        Some(y) => y
            .trim()
            .parse::<i64>()
            .ok()
            .filter(|y| (1900..=9999).contains(y))
            .ok_or_else(|| Error::Input(format!("--year '{y}' is not a year; write e.g. 2026"))),
        None => Ok(this_year()),
    }
}

fn this_year() -> i64 {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs() as i64);
    // Days since 1970-01-01 to a civil year (proleptic Gregorian; common practice).
    let days = secs.div_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    yoe + era * 400 + i64::from(month <= 2)
}

pub fn run(a: Args) -> Result<(), Error> {
    let year = citation_year(a.year.as_deref())?;
    let c = match (&a.manifest, &a.db) {
        (Some(m), _) if manifest_format(m).as_deref() == Some(FORMAT) => {
            let man = read_dataset_manifest(m)?;
            let file = m.with_file_name(&man.file.name);
            let conn = open_checked_as(&CURVES, &file).map_err(|(_, e)| e)?;
            same_content(
                &file,
                m,
                &man.content_sha256,
                &content_sha256_in(&CURVES, &conn)?,
            )?;
            Citation::of_curves(&man, year, a.url.clone(), file)
        }
        (Some(m), _) => {
            let file = crate::cmd::verify::beside(m)?;
            let man = qorbits::table::manifest::read_manifest(m)?;
            let c = table_citation(&file, year, a.url.clone())?;
            same_content(&file, m, &man.content_sha256, &c.hash)?;
            c
        }
        (None, Some(db)) => table_citation(db, year, a.url.clone())?,
        (None, None) => unreachable!("clap requires a manifest or --db"),
    };
    let mut out = String::new();
    if a.format != CiteFormat::Cff {
        out += &c.bibtex();
    }
    if a.format == CiteFormat::Both {
        out += "\n";
    }
    if a.format != CiteFormat::Bibtex {
        out += &c.cff();
    }
    emit(&out);
    Ok(())
}

/// A file cited through its manifest must hold the manifest's content.
fn same_content(file: &Path, m: &Path, want: &str, got: &str) -> Result<(), Error> {
    if want != got {
        return Err(Error::Database(format!(
            "{} does not hold the content of its manifest {} (content sha256 differs); run \
             qorbits verify {} to see what changed",
            file.display(),
            m.display(),
            m.display()
        )));
    }
    Ok(())
}

fn table_citation(db: &Path, year: i64, url: Option<String>) -> Result<Citation, Error> {
    let conn = open_table(db)?;
    let params = table_params(&conn)?;
    let hash = content_sha256(&conn)?;
    let classes: i64 = conn
        .query_row("SELECT count(*) FROM classes", [], |r| r.get(0))
        .map_err(Error::from)?;
    Ok(Citation::of_table(
        params,
        hash,
        classes as u64,
        year,
        url,
        db.to_path_buf(),
    ))
}

/// A citation of a table or curve dataset (BibTeX and CITATION.cff), shared with
/// `qorbits release`.
pub struct Citation {
    /// The title.
    pub title: String,
    /// What it holds, in words.
    pub contents: String,
    /// The BibTeX key before the hash: `qorbits-h1000000`, `qorbits-curves-y10000`.
    pub key: String,
    /// The schema in words: `schema version 4`.
    pub schema: String,
    /// `table` or `dataset` (the CFF message).
    pub noun: &'static str,
    pub hash: String,
    pub year: i64,
    pub url: Option<String>,
    pub file: PathBuf,
}

impl Citation {
    /// The citation of a table.
    pub fn of_table(
        params: Params,
        hash: String,
        classes: u64,
        year: i64,
        url: Option<String>,
        file: PathBuf,
    ) -> Citation {
        let kind = if params.include_reducible {
            "integral binary quartic forms"
        } else {
            "irreducible integral binary quartic forms"
        };
        Citation {
            title: format!(
                "GL2(Z)-classes of {kind} with height below {}",
                params.height
            ),
            contents: describe_params(&params, classes),
            key: format!("qorbits-h{}", params.height),
            schema: format!("schema version {SCHEMA_VERSION}"),
            noun: "table",
            hash,
            year,
            url,
            file,
        }
    }

    /// The citation of a curve dataset.
    pub fn of_curves(
        m: &DatasetManifest,
        year: i64,
        url: Option<String>,
        file: PathBuf,
    ) -> Citation {
        let y = m.parameters.height;
        Citation {
            title: format!(
                "2-Selmer groups of the curves y^2 = x^3 + Ax + B with max(4|A|^3, 27B^2) below {y}"
            ),
            contents: format!(
                "{}: {} curves with their 2-torsion and 2-Selmer ranks, and {} non-trivial \
                 2-Selmer elements, each an integral binary quartic form (the canonical \
                 representative of the first GL2(Z)-class of its class over Q, with its label)",
                m.parameters.family, m.counts.curves, m.counts.elements
            ),
            key: format!("qorbits-curves-y{y}"),
            schema: format!("curve schema version {}", m.versions.schema),
            noun: "dataset",
            hash: m.content_sha256.clone(),
            year,
            url,
            file,
        }
    }

    fn title(&self) -> String {
        self.title.clone()
    }

    fn doi(&self) -> Option<&str> {
        self.url
            .as_deref()
            .map(|u| u.trim_start_matches("https://doi.org/"))
            .filter(|u| u.starts_with("10.") && u.contains('/'))
    }

    pub fn bibtex(&self) -> String {
        let name = self
            .file
            .file_name()
            .map(|n| n.to_string_lossy().into_owned());
        let key = format!("{}-{}", self.key, &self.hash[..12]);
        let mut fields = vec![
            (
                "title",
                format!("{{{}}}", self.title().replace("GL2(Z)", "{GL2(Z)}")),
            ),
            ("author", "{{qorbits developers}}".to_string()),
            ("year", format!("{{{}}}", self.year)),
            (
                "howpublished",
                format!(
                    "{{SQLite file {}, built by qorbits {} ({})}}",
                    name.unwrap_or_default().replace('_', "\\_"),
                    env!("CARGO_PKG_VERSION"),
                    self.schema
                ),
            ),
        ];
        match (self.doi(), &self.url) {
            (Some(doi), _) => fields.push(("doi", format!("{{{doi}}}"))),
            (None, Some(url)) => fields.push(("url", format!("{{{url}}}"))),
            (None, None) => {}
        }
        fields.push((
            "note",
            format!(
                "{{Contents: {}. Content SHA-256 {}}}",
                self.contents.replace('^', "\\^{}"),
                self.hash
            ),
        ));
        let body: Vec<String> = fields
            .iter()
            .map(|(k, v)| format!("  {k:<12} = {v}"))
            .collect();
        format!("@misc{{{key},\n{}\n}}\n", body.join(",\n"))
    }

    pub fn cff(&self) -> String {
        let q = |s: &str| format!("\"{}\"", s.replace('\\', "\\\\").replace('"', "\\\""));
        let mut ids = vec![format!(
            "  - type: other\n    value: {}\n    description: \"content SHA-256 of the {} (the recipe is in its manifest)\"",
            q(&format!("sha256:{}", self.hash)),
            self.noun
        )];
        match (self.doi(), &self.url) {
            (Some(doi), _) => ids.push(format!("  - type: doi\n    value: {}", q(doi))),
            (None, Some(url)) => ids.push(format!("  - type: url\n    value: {}", q(url))),
            (None, None) => {}
        }
        format!(
            "cff-version: 1.2.0\nmessage: \"If you use this {}, cite it by its content hash.\"\n\
             type: dataset\ntitle: {}\nauthors:\n  - name: \"qorbits developers\"\n\
             version: {}\nabstract: {}\nidentifiers:\n{}\nkeywords:\n  - \"binary quartic forms\"\n  - \"arithmetic statistics\"\n\
             preferred-citation:\n  type: data\n  title: {}\n  authors:\n    - name: \"qorbits developers\"\n  year: {}\n",
            self.noun,
            q(&self.title()),
            q(&format!("qorbits {}, {}", env!("CARGO_PKG_VERSION"), self.schema.replace(" version", ""))),
            q(&self.contents),
            ids.join("\n"),
            q(&self.title()),
            self.year
        )
    }
}
