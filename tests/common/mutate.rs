//! Random and mutated inputs for the parser properties (`tests/properties.rs`) and the long
//! fuzz run (`benches/fuzz.rs`): a deterministic byte mutator over seed inputs. Mutations are
//! the usual ones of coverage-free fuzzing (common practice, no source): flip a bit, replace
//! or insert a byte, insert a token that parsers treat specially, delete or duplicate a
//! range, splice two inputs, swap case.

/// splitmix64 (common practice, no source needed).
pub struct Mutator(pub u64);

/// Bytes and tokens that parsers of numbers, forms and JSON treat specially.
pub const TOKENS: &[&str] = &[
    "-",
    "+",
    "e",
    "E",
    ".",
    " ",
    "\n",
    "\t",
    "\r",
    "0",
    "9",
    "_",
    "\0",
    "é",
    "١",
    "∞",
    "\u{feff}",
    "1e60",
    "1e61",
    "1e-5",
    "-0",
    "0.",
    ".5",
    "1e",
    "e1",
    "\"",
    "\\",
    "{",
    "}",
    "[",
    "]",
    ",",
    ":",
    "null",
    "true",
    "false",
    "1.5",
    "NaN",
    "inf",
    "170141183460469231731687303715884105728",
    "-170141183460469231731687303715884105729",
    "18446744073709551616",
    "4294967296",
    "65536",
    "1e38",
    "2.5e5",
    "../",
    "/",
    "\\u0000",
    "\\n",
    "\"\"",
];

impl Mutator {
    pub fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in `0..n` (n > 0).
    pub fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }

    /// Random bytes, mostly printable ASCII, of length below `max_len`.
    pub fn random_bytes(&mut self, max_len: usize) -> Vec<u8> {
        let n = self.below(max_len.max(1));
        (0..n)
            .map(|_| match self.below(4) {
                0 => self.next() as u8,
                _ => b" +-.0123456789eE_x\n"[self.below(19)],
            })
            .collect()
    }

    /// `seed` with one to four random mutations; `other` is used for splicing.
    pub fn mutate(&mut self, seed: &[u8], other: &[u8]) -> Vec<u8> {
        let mut v = seed.to_vec();
        for _ in 0..1 + self.below(4) {
            let n = v.len();
            match self.below(9) {
                0 if n > 0 => {
                    let i = self.below(n);
                    v[i] ^= 1 << self.below(8);
                }
                1 if n > 0 => {
                    let i = self.below(n);
                    v[i] = self.next() as u8;
                }
                2 => {
                    let i = self.below(n + 1);
                    v.insert(i, self.next() as u8);
                }
                3 | 4 => {
                    let i = self.below(n + 1);
                    let t = TOKENS[self.below(TOKENS.len())].as_bytes();
                    v.splice(i..i, t.iter().copied());
                }
                5 if n > 0 => {
                    let i = self.below(n);
                    let j = (i + 1 + self.below(8)).min(n);
                    v.drain(i..j);
                }
                6 if n > 0 => {
                    let i = self.below(n);
                    let j = (i + 1 + self.below(16)).min(n);
                    let part: Vec<u8> = v[i..j].to_vec();
                    v.splice(j..j, part);
                }
                7 if !other.is_empty() => {
                    let i = self.below(n + 1);
                    let a = self.below(other.len());
                    let b = (a + 1 + self.below(16)).min(other.len());
                    v.splice(i..i, other[a..b].iter().copied());
                }
                8 if n > 0 => {
                    let i = self.below(n);
                    v[i] = v[i].to_ascii_uppercase();
                }
                _ => {}
            }
        }
        v
    }

    /// A mutated or random text input over the seeds (as a String, lossy for bad UTF-8).
    pub fn text(&mut self, seeds: &[&str]) -> String {
        let bytes = if self.below(5) == 0 {
            self.random_bytes(40)
        } else {
            let s = seeds[self.below(seeds.len())].as_bytes();
            let o = seeds[self.below(seeds.len())].as_bytes();
            self.mutate(s, o)
        };
        String::from_utf8_lossy(&bytes).into_owned()
    }
}

/// Seeds for the height parser: what users type.
pub const HEIGHT_SEEDS: &[&str] = &[
    "1e6", "2.5e5", "1000000", "1E8", "10", "3.25e2", " 7e3 ", "1e38", "1.000e3", "0.5e1",
];

/// Seeds for the integer parser.
pub const INTEGER_SEEDS: &[&str] = &[
    "0",
    "-12",
    "+7",
    "145",
    "-8048",
    " 42 ",
    "123456789012345678901234567890",
    "-99999999999999999999999999999999999999999",
];

/// Seeds for `reduce` and curves: argument lists, split on spaces.
pub const FORM_SEEDS: &[&str] = &[
    "1 -2 -3 -1 5",
    "2 -7 4 13 -6",
    "1 0 0 0 1",
    "-34 0 0 0 2",
    "0 1 0 1 0",
    "3 0 9 0 6",
    "1 2 1 0 0",
];

/// Seeds for curves: `[a1, a2, a3, a4, a6]`.
pub const CURVE_SEEDS: &[&str] = &[
    "0 0 1 -1 0",
    "0 0 0 -7 10",
    "0 0 0 -1 0",
    "1 0 -1 -11 -17",
    "0 0 0 -3 2",
];
