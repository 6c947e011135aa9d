//! Sorted runs: the classified rows of one chunk of the enumeration, sorted by the row key
//! `(H4, I, J, a, b, c, d, e)` and written to a file of their own (DESIGN §7). A build
//! writes one run per chunk as it goes, so memory does not grow with the table, and merges
//! them into the table ([`crate::table::merge`]); a shard of a cluster build is a set of
//! runs.
//!
//! The format (ours; little-endian): the magic `QORBRUN1`; a header (the chunk index, the
//! height bound as 16 bytes, `include_reducible`, the builder version); the rows; a trailer
//! (the row count and the SHA-256 of everything before it). A row is its form, I and J as
//! zigzag varints (Disc and H4 follow from I and J), one byte each for the signature, the
//! factorisation pattern, the Galois group and the stabiliser order, and its local places:
//! the prime (0 for the real place) as a varint, v_p(Disc) (255 for none), the solubility
//! and the pattern text. Files are written under a temporary name and renamed, so a run that
//! exists is complete; [`read_run`] checks the trailer before anything is used.
//!
//! ```
//! use qorbits::progress::Silent;
//! use qorbits::table::pipeline::enumerate_classes;
//! use qorbits::table::row::Params;
//! use qorbits::table::runs::{read_run, write_run};
//! let p = Params { height: 3000, include_reducible: true };
//! let rows: Vec<_> = enumerate_classes(&p, &Silent).unwrap().rows().cloned().collect();
//! let dir = std::env::temp_dir().join(format!("qorbits-runs-doc-{}", std::process::id()));
//! std::fs::create_dir_all(&dir).unwrap();
//! let f = dir.join("r.run");
//! let mut sorted = rows.clone();
//! for r in &mut sorted { r.label.clear(); r.rational = None; }
//! write_run(&f, 7, &p, &mut sorted).unwrap();
//! let back = read_run(&f, 7, &p).unwrap();
//! assert_eq!(back, sorted);
//! # std::fs::remove_dir_all(&dir).unwrap();
//! ```

use crate::error::{Error, Result};
use crate::form::galois::{FactorPattern, GaloisGroup};
use crate::form::invariants_from_ij;
use crate::form::local::LocalPlace;
use crate::form::Signature;
use crate::table::atomic::TempFile;
use crate::table::row::{ClassRow, Key, Params};
use crate::table::schema::{place_from_column, place_to_column};
use crate::table::space::write_error;
use sha2::{Digest, Sha256};
use std::fs::{File, OpenOptions};
use std::io::{BufReader, BufWriter, Read, Write};
use std::path::{Path, PathBuf};

const MAGIC: &[u8; 8] = b"QORBRUN1";

fn put_varint(out: &mut Vec<u8>, mut v: u64) {
    while v >= 0x80 {
        out.push((v as u8) | 0x80);
        v >>= 7;
    }
    out.push(v as u8);
}

fn put_int(out: &mut Vec<u8>, v: i64) {
    put_varint(out, ((v << 1) ^ (v >> 63)) as u64);
}

/// The position of `x` in the list of every value of its type.
fn index<T: PartialEq>(all: &[T], x: T) -> u8 {
    all.iter().position(|y| *y == x).expect("listed") as u8
}

/// The bytes of one row (label and class over Q are not stored: the merge makes them).
fn encode(out: &mut Vec<u8>, r: &ClassRow) {
    for c in r.form {
        put_int(out, c);
    }
    put_int(out, r.i);
    put_int(out, r.j);
    out.push(index(&Signature::ALL, r.signature));
    out.push(index(&FactorPattern::ALL, r.pattern));
    out.push(r.galois.map_or(0, |g| 1 + index(&GaloisGroup::ALL, g)));
    out.push(r.stabiliser);
    out.push(u8::try_from(r.local.len()).expect("fewer than 256 places"));
    for l in &r.local {
        put_varint(out, place_to_column(&l.place) as u64);
        out.push(
            l.v_disc
                .map_or(255, |v| u8::try_from(v).expect("v_p(Disc) < 255")),
        );
        out.push(u8::from(l.soluble));
        out.push(u8::try_from(l.pattern.len()).expect("short pattern"));
        out.extend_from_slice(l.pattern.as_bytes());
    }
}

/// A reader of the bytes of a run, with one-line errors naming the file.
struct Bytes<'a> {
    buf: &'a [u8],
    at: usize,
    file: &'a Path,
}

impl Bytes<'_> {
    fn bad(&self, what: &str) -> Error {
        Error::Database(format!(
            "the run {} is damaged ({what} at byte {}); rebuild it",
            self.file.display(),
            self.at
        ))
    }

    fn byte(&mut self) -> Result<u8> {
        let b = *self.buf.get(self.at).ok_or_else(|| self.bad("truncated"))?;
        self.at += 1;
        Ok(b)
    }

    fn take(&mut self, n: usize) -> Result<&[u8]> {
        let end = self.at.checked_add(n).filter(|e| *e <= self.buf.len());
        let end = end.ok_or_else(|| self.bad("truncated"))?;
        let s = &self.buf[self.at..end];
        self.at = end;
        Ok(s)
    }

    fn varint(&mut self) -> Result<u64> {
        let mut v = 0u64;
        for shift in (0..64).step_by(7) {
            let b = self.byte()?;
            v |= u64::from(b & 0x7f) << shift;
            if b < 0x80 {
                return Ok(v);
            }
        }
        Err(self.bad("an overlong number"))
    }

    fn int(&mut self) -> Result<i64> {
        let v = self.varint()?;
        Ok(((v >> 1) as i64) ^ -((v & 1) as i64))
    }

    fn pick<T: Copy>(&mut self, all: &[T], what: &str) -> Result<T> {
        let k = self.byte()? as usize;
        all.get(k).copied().ok_or_else(|| self.bad(what))
    }

    fn row(&mut self) -> Result<ClassRow> {
        let mut form = [0i64; 5];
        for c in &mut form {
            *c = self.int()?;
        }
        let (i, j) = (self.int()?, self.int()?);
        let inv = invariants_from_ij(i128::from(i), i128::from(j))
            .ok_or_else(|| self.bad("invariants of no form"))?;
        let small = |v: i128| i64::try_from(v).ok();
        let (disc, h4) = match (small(inv.disc), small(inv.h4)) {
            (Some(d), Some(h)) => (d, h),
            _ => return Err(self.bad("invariants beyond 64 bits")),
        };
        let signature = self.pick(&Signature::ALL, "an unknown signature")?;
        let pattern = self.pick(&FactorPattern::ALL, "an unknown factorisation")?;
        let galois = match self.byte()? {
            0 => None,
            g => Some(
                *GaloisGroup::ALL
                    .get(g as usize - 1)
                    .ok_or_else(|| self.bad("an unknown Galois group"))?,
            ),
        };
        let stabiliser = self.byte()?;
        let places = self.byte()?;
        let mut local = Vec::with_capacity(places as usize);
        for _ in 0..places {
            let p = i64::try_from(self.varint()?).map_err(|_| self.bad("a huge prime"))?;
            let place = place_from_column(p).ok_or_else(|| self.bad("an invalid place"))?;
            let v = self.byte()?;
            let soluble = self.byte()? == 1;
            let n = self.byte()? as usize;
            let text = self.take(n)?.to_vec();
            let pattern =
                String::from_utf8(text).map_err(|_| self.bad("a pattern that is not text"))?;
            local.push(LocalPlace {
                place,
                v_disc: (v != 255).then_some(u32::from(v)),
                pattern,
                soluble,
            });
        }
        Ok(ClassRow {
            form,
            i,
            j,
            disc,
            h4,
            signature,
            pattern,
            galois,
            stabiliser,
            label: String::new(),
            rational: None,
            local,
        })
    }
}

fn header(out: &mut Vec<u8>, chunk: u32, params: &Params) {
    out.extend_from_slice(MAGIC);
    out.extend_from_slice(&chunk.to_le_bytes());
    out.extend_from_slice(&params.height.to_le_bytes());
    out.push(u8::from(params.include_reducible));
    let v = env!("CARGO_PKG_VERSION").as_bytes();
    out.push(v.len() as u8);
    out.extend_from_slice(v);
}

/// Writes a run row by row, in bounded memory, into a temporary file renamed into place by
/// [`RunWriter::finish`] (so a run that exists is complete). Rows must come in key order.
pub struct RunWriter {
    tmp: TempFile,
    target: PathBuf,
    out: BufWriter<File>,
    hasher: Sha256,
    rows: u64,
    last: Option<Key>,
    row: Vec<u8>,
}

impl RunWriter {
    /// Starts the run of `chunk` at `path` (an existing file is replaced).
    pub fn create(path: &Path, chunk: u32, params: &Params) -> Result<RunWriter> {
        let tmp = TempFile::create(path, true)?;
        let f = OpenOptions::new()
            .write(true)
            .open(tmp.path())
            .map_err(|e| write_error(path, e))?;
        let mut w = RunWriter {
            tmp,
            target: path.to_path_buf(),
            out: BufWriter::with_capacity(1 << 16, f),
            hasher: Sha256::new(),
            rows: 0,
            last: None,
            row: Vec::with_capacity(128),
        };
        let mut h = Vec::new();
        header(&mut h, chunk, params);
        w.write(&h)?;
        Ok(w)
    }

    fn write(&mut self, bytes: &[u8]) -> Result<()> {
        self.hasher.update(bytes);
        self.out
            .write_all(bytes)
            .map_err(|e| write_error(&self.target, e))
    }

    /// Appends a row (after the previous one in key order).
    pub fn push(&mut self, r: &ClassRow) -> Result<()> {
        if self.last.is_some_and(|k| k >= r.key()) {
            return Err(Error::Input(format!(
                "cannot write the run {}: rows out of key order",
                self.target.display()
            )));
        }
        self.last = Some(r.key());
        let mut row = std::mem::take(&mut self.row);
        row.clear();
        encode(&mut row, r);
        let mut len = Vec::with_capacity(3);
        put_varint(&mut len, row.len() as u64);
        self.write(&len)?;
        self.write(&row)?;
        self.row = row;
        self.rows += 1;
        Ok(())
    }

    /// Writes the trailer, flushes and renames the run into place; returns its row count.
    pub fn finish(mut self) -> Result<u64> {
        let count = self.rows.to_le_bytes();
        self.write(&count)?;
        let digest = std::mem::take(&mut self.hasher).finalize();
        self.out
            .write_all(&digest)
            .and_then(|()| self.out.flush())
            .map_err(|e| write_error(&self.target, e))?;
        drop(self.out);
        self.tmp.commit(&self.target, true)?;
        Ok(self.rows)
    }
}

/// Sorts `rows` by the row key and writes them as the run of `chunk` at `path`; returns
/// the number of rows.
pub fn write_run(path: &Path, chunk: u32, params: &Params, rows: &mut [ClassRow]) -> Result<u64> {
    rows.sort_by_key(ClassRow::key);
    let mut w = RunWriter::create(path, chunk, params)?;
    for r in rows.iter() {
        w.push(r)?;
    }
    w.finish()
}

/// Reads a run row by row, in key order, in bounded memory: the header is checked when it
/// is opened, the count and the checksum when the last row has been read (so a damaged run
/// fails the merge that reads it, never silently).
pub struct RunReader {
    file: PathBuf,
    input: BufReader<File>,
    hasher: Sha256,
    left: u64,
    rows: u64,
    last: Option<Key>,
    buf: Vec<u8>,
}

impl RunReader {
    /// Opens the run of `chunk` for these parameters.
    pub fn open(path: &Path, chunk: u32, params: &Params) -> Result<RunReader> {
        let io =
            |e: std::io::Error| Error::Io(format!("cannot read the run {}: {e}", path.display()));
        let f = File::open(path).map_err(io)?;
        let len = f.metadata().map_err(io)?.len();
        let mut want = Vec::new();
        header(&mut want, chunk, params);
        let mut r = RunReader {
            file: path.to_path_buf(),
            input: BufReader::with_capacity(1 << 16, f),
            hasher: Sha256::new(),
            left: len.saturating_sub(want.len() as u64 + 40),
            rows: 0,
            last: None,
            buf: Vec::new(),
        };
        if len < want.len() as u64 + 40 {
            return Err(r.bad("truncated"));
        }
        let mut got = vec![0u8; want.len()];
        r.read_exact(&mut got)?;
        if got != want {
            return Err(Error::Database(format!(
                "the run {} belongs to another build (chunk, parameters or builder version differ)",
                path.display()
            )));
        }
        Ok(r)
    }

    fn bad(&self, what: &str) -> Error {
        Error::Database(format!(
            "the run {} is damaged ({what}); rebuild it",
            self.file.display()
        ))
    }

    fn read_exact(&mut self, buf: &mut [u8]) -> Result<()> {
        self.input
            .read_exact(buf)
            .map_err(|_| self.bad("truncated"))?;
        self.hasher.update(&*buf);
        Ok(())
    }

    fn byte(&mut self) -> Result<u8> {
        let mut b = [0u8];
        self.read_exact(&mut b)?;
        Ok(b[0])
    }

    /// The next row, or `None` after the last one (whose count and checksum then match).
    pub fn next_row(&mut self) -> Result<Option<ClassRow>> {
        if self.left == 0 {
            let mut tail = [0u8; 8];
            self.read_exact(&mut tail)?;
            let mut sum = [0u8; 32];
            self.input
                .read_exact(&mut sum)
                .map_err(|_| self.bad("truncated"))?;
            let digest = std::mem::take(&mut self.hasher).finalize();
            if u64::from_le_bytes(tail) != self.rows || digest.as_slice() != sum {
                return Err(self.bad("its count or checksum does not match"));
            }
            self.left = u64::MAX; // finished
            return Ok(None);
        }
        if self.left == u64::MAX {
            return Ok(None);
        }
        let mut n = 0u64;
        let mut used = 0u64;
        for shift in (0..64).step_by(7) {
            let b = self.byte()?;
            used += 1;
            n |= u64::from(b & 0x7f) << shift;
            if b < 0x80 {
                break;
            }
        }
        if n > 4096 || used + n > self.left {
            return Err(self.bad("a row of impossible length"));
        }
        self.left -= used + n;
        let mut buf = std::mem::take(&mut self.buf);
        buf.resize(n as usize, 0);
        self.read_exact(&mut buf)?;
        let row = Bytes {
            buf: &buf,
            at: 0,
            file: &self.file,
        }
        .row();
        self.buf = buf;
        let row = row?;
        if self.last.is_some_and(|k| k >= row.key()) {
            return Err(self.bad("rows out of order"));
        }
        self.last = Some(row.key());
        self.rows += 1;
        Ok(Some(row))
    }
}

/// Every row of the run of `chunk` at `path`, in key order, checked.
pub fn read_run(path: &Path, chunk: u32, params: &Params) -> Result<Vec<ClassRow>> {
    let mut r = RunReader::open(path, chunk, params)?;
    let mut rows = Vec::new();
    while let Some(row) = r.next_row()? {
        rows.push(row);
    }
    Ok(rows)
}

/// Reads the run through and returns its number of rows: whether it is whole and belongs
/// to this build.
pub fn check_run(path: &Path, chunk: u32, params: &Params) -> Result<u64> {
    let mut r = RunReader::open(path, chunk, params)?;
    while r.next_row()?.is_some() {}
    Ok(r.rows)
}
