//! `qorbits export`: every class of a table with every column and its local data, as CSV
//! or JSON Lines, optionally gzipped, streamed in table order.

use crate::progress::Bar;
use flate2::{Compression, GzBuilder};
use qorbits::error::Error;
use qorbits::table::atomic::TempFile;
use qorbits::table::export::{export, export_error, export_need, ExportFormat};
use qorbits::table::reader::open_table;
use qorbits::table::space::{retarget, with_need};
use std::io::Write;
use std::path::PathBuf;

/// Export every class of a table (every column, local data included) as CSV or JSON Lines.
#[derive(clap::Args, Debug)]
#[command(
    after_help = "Examples:\n  qorbits export --db qorbits-h1e6.sqlite --format csv --out classes.csv\n  qorbits export --db qorbits-h1e6.sqlite --format jsonl --gzip --out classes.jsonl.gz\n  qorbits export --db qorbits-h1e6.sqlite --format csv --where \"galois = 'C4' AND els = 1\""
)]
pub struct Args {
    /// The table (SQLite file).
    #[arg(long, value_name = "TABLE")]
    db: PathBuf,
    /// csv: one row per class, the local data in the column `local`; jsonl: one JSON
    /// object per class, the local data nested (docs/output.md).
    #[arg(long, value_enum)]
    format: Format,
    /// Compress with gzip.
    #[arg(long)]
    gzip: bool,
    /// Only the classes where this SQL condition on the columns of `classes` holds
    /// (schema/README.md), e.g. "galois = 'S4' AND h4 < 4000000".
    #[arg(long = "where", value_name = "CONDITION")]
    filter: Option<String>,
    /// Write to this file (atomically) instead of standard output.
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    /// Replace an existing --out file.
    #[arg(long)]
    force: bool,
    /// No progress bar on stderr.
    #[arg(long)]
    quiet: bool,
}

/// The formats.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// CSV (RFC 4180) with a header line.
    Csv,
    /// JSON Lines.
    Jsonl,
}

/// Standard output that ends the program quietly when the reader has gone away.
struct Stdout(std::io::Stdout);

impl Write for Stdout {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        self.0.write(b).inspect_err(quiet_on_closed_pipe)
    }
    fn flush(&mut self) -> std::io::Result<()> {
        self.0.flush().inspect_err(quiet_on_closed_pipe)
    }
}

fn quiet_on_closed_pipe(e: &std::io::Error) {
    if e.kind() == std::io::ErrorKind::BrokenPipe {
        std::process::exit(0);
    }
}

pub fn run(a: Args) -> Result<(), Error> {
    let conn = open_table(&a.db)?;
    let format = match a.format {
        Format::Csv => ExportFormat::Csv,
        Format::Jsonl => ExportFormat::Jsonl,
    };
    let tmp = a
        .out
        .as_ref()
        .map(|p| TempFile::create(p, a.force))
        .transpose()?;
    let written = write(&a, &conn, format, tmp.as_ref().map(TempFile::path));
    let written = match (written, &a.out) {
        // A full disk: name the file asked for and what the export needs; the temporary
        // file goes when `tmp` is dropped.
        (Err(e @ Error::NoSpace(_)), Some(out)) => {
            let need = export_need(&conn, format, a.gzip)?;
            Err(with_need(retarget(e, out), "the export", need))
        }
        (r, _) => r,
    };
    written?;
    if let (Some(t), Some(out)) = (tmp, &a.out) {
        t.commit(out, a.force)?;
    }
    Ok(())
}

/// Writes the export to the file `file` (the temporary file of --out) or standard output.
fn write(
    a: &Args,
    conn: &rusqlite::Connection,
    format: ExportFormat,
    file: Option<&std::path::Path>,
) -> Result<(), Error> {
    let sink: Box<dyn Write> = match file {
        Some(t) => Box::new(std::io::BufWriter::new(
            std::fs::OpenOptions::new()
                .write(true)
                .open(t)
                .map_err(|e| Error::Io(format!("cannot write {}: {e}", t.display())))?,
        )),
        None => Box::new(Stdout(std::io::stdout())),
    };
    let bar = Bar::new(a.quiet);
    if a.gzip {
        // No name and no time in the header: the same table gives the same bytes.
        let mut gz = GzBuilder::new()
            .mtime(0)
            .write(sink, Compression::default());
        export(conn, format, a.filter.as_deref(), &mut gz, &bar)?;
        gz.finish()
            .and_then(|mut w| w.flush())
            .map_err(export_error)?;
    } else {
        let mut sink = sink;
        export(conn, format, a.filter.as_deref(), &mut sink, &bar)?;
        sink.flush().map_err(export_error)?;
    }
    bar.finish();
    Ok(())
}
