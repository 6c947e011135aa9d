//! The 100-byte database header of a table file, read from the bytes before SQLite sees
//! them and checked against what the writer fixes (`table::writer`: page size, rollback
//! journal format, UTF-8, no auto-vacuum, the application id and schema version) and
//! against the file itself (the page count the header records times the page size is the
//! file's length). A file that fails here is never handed to SQLite: a header that claims
//! more pages than the file has, a write-ahead-log file, another page size or text encoding
//! are refused with the field that is wrong. The field layout is SQLite's documented file
//! format ("Database File Format", section 1.3, sqlite.org).
//!
//! ```
//! use qorbits::table::header::{check_header, Header};
//! let mut h = [0u8; 100];
//! h[..16].copy_from_slice(b"SQLite format 3\0");
//! assert!(Header::parse(&h).is_some());
//! let e = check_header(&h, 4096).unwrap_err();
//! assert!(e.contains("application_id"), "{e}");
//! ```

use crate::table::format::{Format, TABLE};
use crate::table::schema::PAGE_SIZE;

/// The length of the header.
pub const HEADER_LEN: usize = 100;

/// The first 16 bytes of every SQLite 3 database file.
const MAGIC: &[u8; 16] = b"SQLite format 3\0";

/// The fields of the header qorbits reads (offsets from the file format document).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Header {
    /// Page size in bytes (offset 16; the stored value 1 means 65536).
    pub page_size: u32,
    /// File format write and read versions (18, 19): 1 legacy, 2 write-ahead log.
    pub versions: (u8, u8),
    /// Reserved bytes at the end of each page (20).
    pub reserved: u8,
    /// Maximum, minimum and leaf payload fractions (21–23): always 64, 32, 32.
    pub fractions: (u8, u8, u8),
    /// File change counter (24).
    pub change_counter: u32,
    /// Database size in pages (28).
    pub pages: u32,
    /// First freelist trunk page (32) and number of freelist pages (36).
    pub freelist: (u32, u32),
    /// Schema format number (44).
    pub schema_format: u32,
    /// Suggested page cache size (48).
    pub cache_size: u32,
    /// Largest root page for auto-vacuum (52) and the incremental-vacuum flag (64).
    pub vacuum: (u32, u32),
    /// Text encoding (56): 1 UTF-8.
    pub encoding: u32,
    /// `PRAGMA user_version` (60): the qorbits schema version.
    pub user_version: u32,
    /// `PRAGMA application_id` (68).
    pub application_id: u32,
    /// Bytes 72–91, reserved for expansion: zero.
    pub expansion_zero: bool,
    /// The change counter value the page count is valid for (92).
    pub valid_for: u32,
}

fn be32(b: &[u8], at: usize) -> u32 {
    u32::from_be_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]])
}

impl Header {
    /// The header fields, or `None` when the bytes do not start with the SQLite magic.
    pub fn parse(b: &[u8; HEADER_LEN]) -> Option<Header> {
        if &b[..16] != MAGIC {
            return None;
        }
        let ps = u32::from(u16::from_be_bytes([b[16], b[17]]));
        Some(Header {
            page_size: if ps == 1 { 65_536 } else { ps },
            versions: (b[18], b[19]),
            reserved: b[20],
            fractions: (b[21], b[22], b[23]),
            change_counter: be32(b, 24),
            pages: be32(b, 28),
            freelist: (be32(b, 32), be32(b, 36)),
            schema_format: be32(b, 44),
            cache_size: be32(b, 48),
            vacuum: (be32(b, 52), be32(b, 64)),
            encoding: be32(b, 56),
            user_version: be32(b, 60),
            application_id: be32(b, 68),
            expansion_zero: b[72..92].iter().all(|&x| x == 0),
            valid_for: be32(b, 92),
        })
    }
}

/// Checks the header of a file of `file_len` bytes: `Err` names the first field that is not
/// what a qorbits table has, in words that fit in a sentence after the file name.
pub fn check_header(b: &[u8; HEADER_LEN], file_len: u64) -> Result<Header, String> {
    check_header_for(&TABLE, b, file_len)
}

/// [`check_header`] for a file of format `f`: its application id and schema version.
pub fn check_header_for(f: &Format, b: &[u8; HEADER_LEN], file_len: u64) -> Result<Header, String> {
    let h = Header::parse(b).ok_or_else(|| {
        "does not start with the SQLite header, so it is not an SQLite file".to_string()
    })?;
    let noun = f.noun;
    if h.application_id != f.application_id as u32 {
        return Err(format!(
            "is an SQLite database but not a qorbits {noun} (application_id {:#010x}, expected {:#010x})",
            h.application_id, f.application_id
        ));
    }
    if h.user_version != f.schema_version {
        return Err(format!(
            "is a qorbits {noun} with schema version {}, but this qorbits reads version {}",
            h.user_version, f.schema_version
        ));
    }
    let field = |what: &str, got: String, want: String| {
        Err(format!(
            "has a damaged database header: {what} is {got}, a qorbits {noun} has {want}"
        ))
    };
    if h.page_size != PAGE_SIZE {
        return field(
            "the page size",
            h.page_size.to_string(),
            PAGE_SIZE.to_string(),
        );
    }
    if h.versions != (1, 1) {
        let got = if h.versions == (2, 2) {
            "2/2 (write-ahead log)".to_string()
        } else {
            format!("{}/{}", h.versions.0, h.versions.1)
        };
        return field(
            "the file format version",
            got,
            "1/1 (rollback journal)".into(),
        );
    }
    if h.reserved != 0 {
        return field(
            "the reserved bytes per page",
            h.reserved.to_string(),
            "0".into(),
        );
    }
    if h.fractions != (64, 32, 32) {
        let (a, b, c) = h.fractions;
        return field(
            "the payload fractions",
            format!("{a}/{b}/{c}"),
            "64/32/32".into(),
        );
    }
    if h.schema_format != 4 {
        return field("the schema format", h.schema_format.to_string(), "4".into());
    }
    if h.encoding != 1 {
        return field(
            "the text encoding",
            h.encoding.to_string(),
            "1 (UTF-8)".into(),
        );
    }
    if h.cache_size != 0 || h.vacuum != (0, 0) {
        return field(
            "the cache size or vacuum setting",
            format!("{}/{}/{}", h.cache_size, h.vacuum.0, h.vacuum.1),
            "0/0/0".into(),
        );
    }
    if !h.expansion_zero {
        return field(
            "the reserved bytes 72-91",
            "not zero".into(),
            "zeros".into(),
        );
    }
    if h.valid_for != h.change_counter {
        return field(
            "the page count's version",
            h.valid_for.to_string(),
            format!("the change counter {}", h.change_counter),
        );
    }
    let page = u64::from(PAGE_SIZE);
    let recorded = u64::from(h.pages) * page;
    if h.pages == 0 || recorded != file_len {
        let how = if file_len < recorded {
            "it is truncated"
        } else {
            "it has bytes beyond its last page"
        };
        return Err(format!(
            "does not have the length its header records: {} pages of {page} bytes is {recorded} \
             bytes, the file has {file_len}; {how}",
            h.pages
        ));
    }
    let (trunk, free) = h.freelist;
    if trunk > h.pages || free >= h.pages || (trunk == 0) != (free == 0) {
        return field(
            "the freelist",
            format!("trunk page {trunk}, {free} pages"),
            format!("pages within the file's {}", h.pages),
        );
    }
    Ok(h)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn good() -> [u8; HEADER_LEN] {
        let mut h = [0u8; HEADER_LEN];
        h[..16].copy_from_slice(MAGIC);
        h[16..18].copy_from_slice(&4096u16.to_be_bytes());
        h[18] = 1;
        h[19] = 1;
        h[21..24].copy_from_slice(&[64, 32, 32]);
        h[24..28].copy_from_slice(&1u32.to_be_bytes());
        h[28..32].copy_from_slice(&3u32.to_be_bytes());
        h[44..48].copy_from_slice(&4u32.to_be_bytes());
        h[56..60].copy_from_slice(&1u32.to_be_bytes());
        h[60..64].copy_from_slice(&TABLE.schema_version.to_be_bytes());
        h[68..72].copy_from_slice(&(TABLE.application_id as u32).to_be_bytes());
        h[92..96].copy_from_slice(&1u32.to_be_bytes());
        h
    }

    #[test]
    fn each_field_is_named_when_it_is_wrong() {
        assert!(check_header(&good(), 3 * 4096).is_ok());
        let cases: [(usize, u8, &str); 9] = [
            (0, b's', "not an SQLite file"),
            (16, 0x20, "page size"),
            (18, 2, "file format version"),
            (20, 8, "reserved bytes per page"),
            (22, 33, "payload fractions"),
            (47, 3, "schema format"),
            (59, 2, "text encoding"),
            (80, 1, "reserved bytes 72-91"),
            (95, 7, "page count's version"),
        ];
        for (at, v, want) in cases {
            let mut h = good();
            h[at] = v;
            let e = check_header(&h, 3 * 4096).unwrap_err();
            assert!(e.contains(want), "byte {at}: {e}");
        }
        let e = check_header(&good(), 2 * 4096).unwrap_err();
        assert!(e.contains("truncated"), "{e}");
        let e = check_header(&good(), 4 * 4096).unwrap_err();
        assert!(e.contains("beyond its last page"), "{e}");
        let mut h = good();
        h[28..32].copy_from_slice(&u32::MAX.to_be_bytes());
        assert!(check_header(&h, 3 * 4096)
            .unwrap_err()
            .contains("truncated"));
        let mut h = good();
        h[39] = 3;
        assert!(check_header(&h, 3 * 4096).unwrap_err().contains("freelist"));
    }
}
