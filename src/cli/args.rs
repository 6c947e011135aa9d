//! The command-line arguments (clap): every subcommand and option of `qorbits`.

use clap::{Parser, Subcommand};
use std::path::PathBuf;

#[derive(Parser)]
#[command(
    name = "qorbits",
    version,
    about = "Classes of integral binary quartic forms"
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Subcommand)]
pub enum Command {
    /// Canonical representative and data of the class of a x^4 + b x^3y + c x^2y^2 + d xy^3 + e y^4.
    Reduce {
        /// The five coefficients a b c d e (negative numbers as plain arguments).
        #[arg(allow_negative_numbers = true, num_args = 0.., value_name = "A B C D E")]
        coefficients: Vec<String>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Build the table of every class with H < X (SQLite file and manifest).
    Build {
        /// The height bound X: the table holds the classes with H < X (e.g. 1e6).
        #[arg(long)]
        height: String,
        /// Output file (default qorbits-h<X>.sqlite, the manifest beside it).
        #[arg(long)]
        out: Option<PathBuf>,
        /// Worker threads (default: all cores). The output does not depend on it.
        #[arg(long)]
        jobs: Option<usize>,
        /// Also include the classes with a rational factor (Disc ≠ 0).
        #[arg(long)]
        include_reducible: bool,
        /// Overwrite existing output files.
        #[arg(long)]
        force: bool,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
    /// Check a table against its manifest, or rebuild from a manifest and compare.
    Verify {
        /// The table (SQLite file).
        file: Option<PathBuf>,
        /// The manifest (default: beside the file).
        #[arg(long)]
        manifest: Option<PathBuf>,
        /// Rebuild the table described by this manifest and compare the hashes.
        #[arg(long, value_name = "MANIFEST", conflicts_with_all = ["file", "manifest"])]
        rebuild: Option<PathBuf>,
        /// Worker threads for --rebuild.
        #[arg(long)]
        jobs: Option<usize>,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
    /// List the classes with given invariants I and J.
    Classes {
        /// Invariant I (negative values as plain arguments).
        #[arg(long = "I", allow_negative_numbers = true)]
        i: String,
        /// Invariant J (negative values as plain arguments).
        #[arg(long = "J", allow_negative_numbers = true)]
        j: String,
        /// A table to answer from; without one (or when its height bound is below H(I, J))
        /// the classes are computed directly from the invariants.
        #[arg(long)]
        db: Option<PathBuf>,
        /// Also the classes with a rational factor (Disc ≠ 0).
        #[arg(long)]
        include_reducible: bool,
        /// Print only the number of classes.
        #[arg(long)]
        count: bool,
        /// JSON output (one array of objects).
        #[arg(long, conflicts_with = "csv")]
        json: bool,
        /// CSV output with a header line.
        #[arg(long)]
        csv: bool,
        /// Only the everywhere locally soluble classes.
        #[arg(long)]
        els: bool,
        /// Only the first class of each class over Q among the everywhere locally soluble
        /// classes without a rational root (one quartic per non-trivial 2-Selmer element of
        /// y^2 = x^3 - 27I x - 27J that these invariants carry).
        #[arg(long)]
        over_q: bool,
        /// No progress spinner while the classes are computed.
        #[arg(long)]
        quiet: bool,
    },
    /// Print a BibTeX entry and a CITATION.cff fragment for a table.
    Cite {
        /// The table (SQLite file).
        file: PathBuf,
    },
    /// Counts by number of real roots against the asymptotic main terms.
    Stats {
        /// The table (SQLite file).
        file: PathBuf,
    },
    /// The 2-Selmer group of an elliptic curve without rational 2-torsion, from the
    /// quartic forms with invariants (c4, 2·c6): its rank and one quartic per element.
    Selmer {
        /// Weierstrass coefficients a1 a2 a3 a4 a6 (negative values as plain arguments).
        #[arg(long, num_args = 5, allow_negative_numbers = true, value_names = ["A1", "A2", "A3", "A4", "A6"], conflicts_with = "short", required_unless_present = "short")]
        ainvs: Option<Vec<String>>,
        /// The curve y^2 = x^3 + A x + B.
        #[arg(long, num_args = 2, allow_negative_numbers = true, value_names = ["A", "B"])]
        short: Option<Vec<String>>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
        /// No progress spinner.
        #[arg(long)]
        quiet: bool,
    },
    /// Average size of the 2-Selmer group over the curves y^2 = x^3 + A x + B of height
    /// max(4|A|^3, 27B^2) below Y without rational 2-torsion.
    SelmerStats {
        /// The height bound Y (e.g. 1e4).
        #[arg(long)]
        height: String,
        /// Worker threads (default: all cores). The output does not depend on it.
        #[arg(long)]
        jobs: Option<usize>,
        /// Print one JSON object instead of text.
        #[arg(long)]
        json: bool,
        /// Also list every curve with its 2-Selmer rank (text: after the table).
        #[arg(long)]
        curves: bool,
        /// No progress bar.
        #[arg(long)]
        quiet: bool,
    },
}
