//! A walk over the b-trees of a table file, page by page from the bytes, that names the
//! page where damage lies — also where SQLite's own check stops at the first record it
//! cannot read. Every tree of the schema (and `sqlite_schema` on page 1) is followed from
//! its root: page types, cell pointers, child and overflow page numbers, the depth, rowids
//! in order, and each record's header against its length and against the declared types of
//! its columns (INTEGER or TEXT, NULL only where allowed; every index of schema version 4
//! is on integers). Every page must be reached exactly once. The layout is SQLite's
//! documented file format ("Database File Format", sections 1.6 and 2.1, sqlite.org).
//!
//! ```
//! use qorbits::table::pages::varint;
//! assert_eq!(varint(&[0x81, 0x00]), Some((128, 2)));
//! assert_eq!(varint(&[0x05]), Some((5, 1)));
//! ```

use crate::table::schema::PAGE_SIZE;

/// What one value of a record may be.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Slot {
    /// An integer (NULL too when `nullable`).
    Int {
        /// NULL allowed.
        nullable: bool,
    },
    /// Text (NULL too when `nullable`).
    Text {
        /// NULL allowed.
        nullable: bool,
    },
    /// The `INTEGER PRIMARY KEY` of a rowid table, stored as NULL (the value is the rowid).
    RowidAlias,
}

/// One b-tree of the file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Tree {
    /// The table or index it stores.
    pub name: String,
    /// Its root page.
    pub root: u32,
    /// A table b-tree (rowid keys, records on leaves) rather than an index b-tree.
    pub rowid: bool,
    /// The values of each record, with their names.
    pub slots: Vec<(String, Slot)>,
    /// For an index b-tree: how many leading values form the key, which increases strictly
    /// in tree order.
    pub key_len: usize,
}

/// A key value, in SQLite's order for the types a table holds: NULL, integers, text
/// (compared as bytes, the BINARY collation).
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum Key {
    Null,
    Int(i64),
    Text(Vec<u8>),
}

/// The value of serial type `t` in `b` (its bytes), for the key types.
fn key_value(t: u64, b: &[u8]) -> Key {
    match t {
        0 => Key::Null,
        8 => Key::Int(0),
        9 => Key::Int(1),
        1..=6 => {
            // Big-endian two's complement of 1, 2, 3, 4, 6 or 8 bytes.
            let mut v: i64 = if b[0] & 0x80 != 0 { -1 } else { 0 };
            for &x in b {
                v = (v << 8) | i64::from(x);
            }
            Key::Int(v)
        }
        _ => Key::Text(b.to_vec()),
    }
}

/// SQLite's variable-length integer: the value and its length in bytes.
pub fn varint(b: &[u8]) -> Option<(u64, usize)> {
    let mut v: u64 = 0;
    for (k, &x) in b.iter().enumerate().take(9) {
        if k == 8 {
            return Some(((v << 8) | u64::from(x), 9));
        }
        v = (v << 7) | u64::from(x & 0x7f);
        if x & 0x80 == 0 {
            return Some((v, k + 1));
        }
    }
    None
}

/// The length of a value of serial type `t`, or `None` for the reserved types 10 and 11.
fn serial_len(t: u64) -> Option<u64> {
    Some(match t {
        0 | 8 | 9 => 0,
        1..=4 => t,
        5 => 6,
        6 | 7 => 8,
        10 | 11 => return None,
        t => (t - 12) / 2,
    })
}

fn serial_kind(t: u64) -> &'static str {
    match t {
        0 => "NULL",
        1..=6 | 8 | 9 => "INTEGER",
        7 => "REAL",
        t if t % 2 == 0 => "BLOB",
        _ => "TEXT",
    }
}

fn admits(s: Slot, t: u64) -> bool {
    let kind = serial_kind(t);
    match s {
        Slot::RowidAlias => kind == "NULL",
        Slot::Int { nullable } => kind == "INTEGER" || (nullable && kind == "NULL"),
        Slot::Text { nullable } => kind == "TEXT" || (nullable && kind == "NULL"),
    }
}

/// Checks one record against the slots of its tree; returns its first `key_len` values.
fn check_record(rec: &[u8], slots: &[(String, Slot)], key_len: usize) -> Result<Vec<Key>, String> {
    let (hs, n) = varint(rec).ok_or("its record header is cut short")?;
    if hs as usize > rec.len() || (hs as usize) < n {
        return Err("its record header is longer than the record".into());
    }
    let (mut at, mut body, mut k) = (n, 0u64, 0usize);
    let mut types = Vec::new();
    while at < hs as usize {
        let (t, m) = varint(&rec[at..hs as usize]).ok_or("its record header is cut short")?;
        at += m;
        body +=
            serial_len(t).ok_or_else(|| format!("value {} has the reserved type {t}", k + 1))?;
        types.push(t);
        match slots.get(k) {
            Some((name, s)) if !admits(*s, t) => {
                return Err(format!(
                    "column {name} holds {} where the schema has {}",
                    serial_kind(t),
                    match s {
                        Slot::Int { .. } => "INTEGER",
                        Slot::Text { .. } => "TEXT",
                        Slot::RowidAlias => "the rowid",
                    }
                ))
            }
            _ => {}
        }
        k += 1;
    }
    if k != slots.len() {
        return Err(format!(
            "its record has {k} values, the schema {}",
            slots.len()
        ));
    }
    if hs + body != rec.len() as u64 {
        return Err("its record's values do not add up to its length".into());
    }
    let mut at = hs as usize;
    let mut key = Vec::with_capacity(key_len);
    for (k, &t) in types.iter().enumerate() {
        let len = serial_len(t).expect("checked above") as usize;
        let value = &rec[at..at + len];
        if serial_kind(t) == "TEXT" && std::str::from_utf8(value).is_err() {
            return Err(format!(
                "column {} holds text that is not UTF-8",
                slots[k].0
            ));
        }
        if k < key_len {
            key.push(key_value(t, value));
        }
        at += len;
    }
    Ok(key)
}

/// Reads page `n` (from 1) of the file.
pub type ReadPage<'a> = dyn FnMut(u32) -> std::io::Result<Vec<u8>> + 'a;

fn be16(b: &[u8], at: usize) -> usize {
    usize::from(u16::from_be_bytes([b[at], b[at + 1]]))
}

fn be32(b: &[u8], at: usize) -> u32 {
    u32::from_be_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]])
}

/// SQLite's deepest b-tree (its cursor's depth limit).
const MAX_DEPTH: usize = 20;

struct Walk<'r, 'a> {
    pages: u32,
    read: &'r mut ReadPage<'a>,
    seen: Vec<bool>,
}

impl Walk<'_, '_> {
    fn claim(&mut self, p: u32) -> Result<(), String> {
        if p < 1 || p > self.pages {
            return Err(format!(
                "a reference to page {p}, outside the file's {} pages",
                self.pages
            ));
        }
        if std::mem::replace(&mut self.seen[p as usize], true) {
            return Err(format!("a second reference to page {p}"));
        }
        Ok(())
    }

    fn overflow(&mut self, first: u32, mut left: u64) -> Result<(), String> {
        let mut p = first;
        while left > 0 {
            self.claim(p)?;
            let b = (self.read)(p).map_err(|e| format!("page {p} cannot be read ({e})"))?;
            left = left.saturating_sub(u64::from(PAGE_SIZE) - 4);
            p = be32(&b, 0);
            if left == 0 && p != 0 {
                return Err(format!("its overflow chain does not end at page {p}"));
            }
        }
        Ok(())
    }

    /// Walks one tree in key order; `Err((page, what))`.
    fn tree(&mut self, t: &Tree) -> Result<(), (u32, String)> {
        let mut last_rowid: Option<i64> = None;
        let mut last_key: Option<Vec<Key>> = None;
        let mut stack = vec![Item::Page(t.root, 0)];
        self.claim(t.root)
            .map_err(|w| (t.root, format!("the root of {}: {w}", t.name)))?;
        while let Some(item) = stack.pop() {
            let (p, depth) = match item {
                Item::Page(p, depth) => (p, depth),
                Item::Key(p, k, key) => {
                    // An interior cell of an index b-tree, in order between its children.
                    if last_key.as_ref().is_some_and(|l| *l >= key) {
                        return Err((p, format!("cell {k} of {}: its key out of order", t.name)));
                    }
                    last_key = Some(key);
                    continue;
                }
            };
            if depth > MAX_DEPTH {
                return Err((p, format!("{} deeper than {MAX_DEPTH} levels", t.name)));
            }
            let b = (self.read)(p).map_err(|e| (p, format!("unreadable ({e})")))?;
            let page = self.page(t, p, &b).map_err(|w| (p, w))?;
            for (k, cell) in page.cells.into_iter().enumerate() {
                let what = |w: String| (p, format!("cell {} of {}: {w}", k + 1, t.name));
                match cell {
                    Cell::Rowid(rowid) => {
                        if last_rowid.is_some_and(|r| r >= rowid) {
                            return Err(what(format!("rowid {rowid} out of order")));
                        }
                        last_rowid = Some(rowid);
                    }
                    Cell::Key(key) if page.leaf => {
                        if last_key.as_ref().is_some_and(|l| *l >= key) {
                            return Err(what("its key out of order".into()));
                        }
                        last_key = Some(key);
                    }
                    Cell::Key(_) | Cell::Child => {}
                }
            }
            if !page.leaf {
                // Pushed in reverse, so they come off the stack in key order: child 1, cell
                // 1, child 2, … the right-most child.
                let n = page.children.len();
                for (k, (&c, key)) in page.children.iter().zip(page.keys).enumerate().rev() {
                    if k + 1 < n {
                        if let Some(key) = key {
                            stack.push(Item::Key(p, k + 1, key));
                        }
                    }
                    self.claim(c)
                        .map_err(|w| (p, format!("{w} (in {})", t.name)))?;
                    stack.push(Item::Page(c, depth + 1));
                }
            }
        }
        Ok(())
    }

    /// Parses one page of tree `t`: its cells, children and interior keys.
    fn page(&mut self, t: &Tree, p: u32, b: &[u8]) -> Result<Page, String> {
        let usable = PAGE_SIZE as usize;
        let h = if p == 1 { 100 } else { 0 };
        let kind = b[h];
        let (leaf, table) = match kind {
            13 => (true, true),
            5 => (false, true),
            10 => (true, false),
            2 => (false, false),
            _ => return Err(format!("page type {kind}, not a b-tree page")),
        };
        if table != t.rowid {
            let what = if table { "a table" } else { "an index" };
            return Err(format!("{what} page in the tree of {}", t.name));
        }
        let hdr = h + if leaf { 8 } else { 12 };
        let n = be16(b, h + 3);
        let start = match be16(b, h + 5) {
            0 => 65_536,
            s => s,
        };
        if hdr + 2 * n > start || start > usable {
            return Err(format!("{n} cells, more than fit"));
        }
        let mut out = Page {
            leaf,
            cells: Vec::with_capacity(n),
            children: Vec::new(),
            keys: Vec::new(),
        };
        for k in 0..n {
            let at = be16(b, hdr + 2 * k);
            if at < start || at + 4 > usable {
                return Err(format!("cell {} outside its cell area", k + 1));
            }
            let cell = &b[at..usable];
            let what = |w: &str| format!("cell {} of {}: {w}", k + 1, t.name);
            let mut off = 0;
            if !leaf {
                out.children.push(be32(cell, 0));
                off = 4;
            }
            if table && !leaf {
                varint(&cell[off..]).ok_or_else(|| what("its key cut short"))?;
                out.keys.push(None);
                out.cells.push(Cell::Child);
                continue;
            }
            let (len, m) = varint(&cell[off..]).ok_or_else(|| what("its length cut short"))?;
            off += m;
            if table {
                let (rowid, m) = varint(&cell[off..]).ok_or_else(|| what("its rowid cut short"))?;
                off += m;
                out.cells.push(Cell::Rowid(rowid as i64));
            }
            let max_local = if table {
                usable - 35
            } else {
                (usable - 12) * 64 / 255 - 23
            };
            let key = if len <= max_local as u64 {
                let rec = cell
                    .get(off..off + len as usize)
                    .ok_or_else(|| what("it runs past the end of the page"))?;
                let key_len = if table { 0 } else { t.key_len };
                Some(check_record(rec, &t.slots, key_len).map_err(|w| what(&w))?)
            } else {
                // Spilled to overflow pages (no qorbits row does): follow the chain only.
                let min_local = (usable - 12) * 32 / 255 - 23;
                let k = min_local as u64 + (len - min_local as u64) % (usable as u64 - 4);
                let local = if k <= max_local as u64 {
                    k
                } else {
                    min_local as u64
                };
                let at = off + local as usize;
                let next = cell
                    .get(at..at + 4)
                    .ok_or_else(|| what("it runs past the end of the page"))?;
                let first = u32::from_be_bytes([next[0], next[1], next[2], next[3]]);
                self.overflow(first, len - local).map_err(|w| what(&w))?;
                None
            };
            if !table {
                if leaf {
                    // A spilled key is not compared.
                    out.cells.push(key.map_or(Cell::Child, Cell::Key));
                } else {
                    out.keys.push(key);
                    out.cells.push(Cell::Child);
                }
            }
        }
        if !leaf {
            out.children.push(be32(b, h + 8));
            out.keys.push(None);
        }
        Ok(out)
    }
}

/// What the walk has still to visit: a page, or the key of an interior cell.
enum Item {
    Page(u32, usize),
    Key(u32, usize, Vec<Key>),
}

/// One cell as the walk needs it.
enum Cell {
    /// A table leaf cell's rowid.
    Rowid(i64),
    /// An index leaf cell's key.
    Key(Vec<Key>),
    /// A cell checked on its own (interior cells).
    Child,
}

/// One parsed page.
struct Page {
    leaf: bool,
    cells: Vec<Cell>,
    children: Vec<u32>,
    /// The key of each child's following interior cell (index trees).
    keys: Vec<Option<Vec<Key>>>,
}

/// Walks every tree of a file of `pages` pages; `Some` names the first damaged page. With
/// `no_freelist`, every page must belong to a tree.
pub fn locate_damage(
    pages: u32,
    read: &mut ReadPage<'_>,
    trees: &[Tree],
    no_freelist: bool,
) -> Option<String> {
    let mut w = Walk {
        pages,
        read,
        seen: vec![false; pages as usize + 1],
    };
    for t in trees {
        if let Err((p, what)) = w.tree(t) {
            return Some(format!("page {p} damaged: {what}"));
        }
    }
    if no_freelist {
        if let Some(p) = (1..=pages).find(|&p| !w.seen[p as usize]) {
            return Some(format!("page {p} damaged: no table or index reaches it"));
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn varints_and_serial_types() {
        assert_eq!(varint(&[0xff; 9]), Some((u64::MAX, 9)));
        assert_eq!(varint(&[0x80]), None);
        assert_eq!(serial_len(13), Some(0));
        assert_eq!(serial_len(19), Some(3));
        assert_eq!(serial_len(10), None);
        let int = ("x".to_string(), Slot::Int { nullable: false });
        // header 2 bytes: [2, 1], body one byte.
        assert_eq!(
            check_record(&[2, 1, 0xfb], std::slice::from_ref(&int), 1),
            Ok(vec![Key::Int(-5)])
        );
        let e = check_record(
            &[2, 7, 0, 0, 0, 0, 0, 0, 0, 0],
            std::slice::from_ref(&int),
            0,
        )
        .unwrap_err();
        assert!(e.contains("column x holds REAL"), "{e}");
        let e = check_record(&[2, 1], std::slice::from_ref(&int), 0).unwrap_err();
        assert!(e.contains("add up"), "{e}");
        assert!(check_record(&[3, 1], &[int], 0)
            .unwrap_err()
            .contains("longer"));
        assert!(Key::Null < Key::Int(-1) && Key::Int(7) < Key::Text(b"0".to_vec()));
    }
}
