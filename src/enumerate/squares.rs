//! The square filter of the search by invariants, as a sieve over c: for a cubic
//! `v(c) = k3·c³ + k2·c² + k1·c + k0` and a window of c, a bit set of the c for which
//! `v(c) = 27·R²` is not ruled out by residues, so that v is evaluated exactly and an
//! integer square root taken only for the few c that survive.
//!
//! If `v = 27·R²` then `3v = (9R)²`, so for every modulus m the residue `3v mod m` is a
//! square mod m, and `v ≡ 0 (mod 27)`. For a modulus `m ≤ 64`, `v(c) mod m` depends only on
//! `c mod m`: one period of the pass/fail pattern is computed by forward differences mod m
//! (three additions and three conditional subtractions per step, all below 2m), repeated
//! into a 64-bit word, and ANDed into the bit set 64 bits at a time (each next word comes
//! from the previous one by two shifts, since 64 ≡ r (mod m)). The moduli are 64, 27 and the
//! primes 5 … 61, taken in that order while another pays; each has a bit table of the
//! residues r that pass, built at compile time from the squares mod m (derived here; the
//! unit tests check every table against brute force, and the sieve against a direct
//! evaluation).
//!
//! ```
//! use qorbits::enumerate::squares::sieve;
//! // v(c) = 27·c²: every c passes; v(c) = 27·(c² + 1): only c = 0 is a square.
//! let mut bits = vec![!0u64; 2];
//! sieve(&[0, 0, 27, 0], -64, &mut bits);
//! assert_eq!(bits, vec![!0u64; 2]);
//! let mut bits = vec![!0u64; 2];
//! sieve(&[27, 0, 27, 0], -64, &mut bits);
//! assert!(bits[1] & 1 == 1, "c = 0 survives");
//! assert!(bits.iter().map(|w| w.count_ones()).sum::<u32>() < 20);
//! ```

/// For `m ≤ 64` coprime to 3: bit r set iff `3r` is a square mod m.
const fn square_mask(m: u64) -> u64 {
    let mut t = 0u64;
    let mut x = 0u64;
    while x < m {
        let q = (x * x) % m;
        // r with 3r ≡ q (mod m): search (m is small and 3 is invertible).
        let mut r = 0u64;
        while (3 * r) % m != q {
            r += 1;
        }
        t |= 1 << r;
        x += 1;
    }
    t
}

/// The product of the primes 5 … 53 (below 2⁶³), and of the other moduli: one reduction of
/// each coefficient by each, then every residue by a constant modulus.
const G1: u64 = 5 * 7 * 11 * 13 * 17 * 19 * 23 * 29 * 31 * 37 * 41 * 43 * 47 * 53;
const G2: u64 = 27 * 59 * 61;
const _: () = assert!(G1 < 1 << 63 && G2 < 1 << 63);

/// `k mod g` in `0..g` (g < 2⁶³).
fn residue(k: i128, g: u64) -> u64 {
    match i64::try_from(k) {
        Ok(k) => k.rem_euclid(g as i64) as u64,
        Err(_) => k.rem_euclid(i128::from(g)) as u64,
    }
}

/// ANDs the pattern of one modulus M (pass mask `MASK`) into `bits`; `k` and `c0` are the
/// coefficients and the first c, reduced modulo a multiple of M.
#[inline(always)]
fn sieve_one<const M: u64, const MASK: u64>(k: [u64; 4], c0: u64, bits: &mut [u64]) {
    let k = k.map(|x| x % M);
    let at = |c: u64| (((k[3] * c + k[2]) % M * c + k[1]) % M * c + k[0]) % M;
    let c = c0 % M;
    let (v0, v1, v2) = (at(c), at((c + 1) % M), at((c + 2) % M));
    // v, Δv, Δ²v at c0 and Δ³v = 6·k3, all mod M.
    let (mut v, mut d1, mut d2) = (v0, (v1 + M - v0) % M, (v2 + v0 + 2 * M - 2 * v1) % M);
    let d3 = (6 * k[3]) % M;
    let mut pattern = 0u64;
    for t in 0..M {
        pattern |= ((MASK >> v) & 1) << t;
        v += d1;
        if v >= M {
            v -= M;
        }
        d1 += d2;
        if d1 >= M {
            d1 -= M;
        }
        d2 += d3;
        if d2 >= M {
            d2 -= M;
        }
    }
    // The word of the bits from position 64(i+1) on, from that of 64i: with r = 64 mod M,
    // bit t is bit t + r of the previous word when t + r < 64, else (periodicity) its bit
    // t + r − M, which lies in 0 … 63 since r < M ≤ 64.
    let r = 64 % M;
    let mut word = pattern;
    let mut filled = M;
    while filled < 64 {
        word |= pattern << filled;
        filled += M;
    }
    for w in bits.iter_mut() {
        *w &= word;
        if r != 0 {
            word = (word >> r) | ((word << (M - r)) & (!0u64 << (64 - r)));
        }
    }
}

/// Clears in `bits` (bit t of word t/64 stands for `c = c_lo + t`) every c for which
/// `v(c) = k[0] + k[1]·c + k[2]·c² + k[3]·c³` is certainly not `27·R²`. The moduli are
/// taken in increasing order while another one pays (see [`worth_another`]); the c left
/// are tested exactly by the caller.
pub fn sieve(k: &[i128; 4], c_lo: i64, bits: &mut [u64]) {
    sieve_with(k, c_lo, bits, true)
}

/// An exact test of a survivor (i128 Horner, division, square root) is taken to cost about
/// as much as 16 steps of a period or 32 word operations (an estimate, a rule of thumb with
/// no source; it moves only work between the sieve and the exact test): a modulus m, which
/// keeps about half of the c, is worth its `m` steps and `words/2` when the survivors it is
/// expected to remove cost more.
fn worth_another(bits: &[u64], m: u64) -> bool {
    let survivors: u64 = bits.iter().map(|w| u64::from(w.count_ones())).sum();
    8 * survivors > m + bits.len() as u64 / 2
}

fn sieve_with(k: &[i128; 4], c_lo: i64, bits: &mut [u64], adaptive: bool) {
    // Mod 64: the low bits of the two's complement are the residue mod 2⁶⁴.
    let k64 = k.map(|x| (x as u64) & 63);
    sieve_one::<64, { square_mask(64) }>(k64, (c_lo as u64) & 63, bits);
    let k2 = k.map(|x| residue(x, G2));
    let c2 = residue(i128::from(c_lo), G2);
    sieve_one::<27, 1>(k2, c2, bits);
    let k1 = k.map(|x| residue(x, G1));
    let c1 = residue(i128::from(c_lo), G1);
    macro_rules! primes {
        ($kk:expr, $cc:expr, $($p:literal)*) => {
            $(
                if adaptive && !worth_another(bits, $p) {
                    return;
                }
                sieve_one::<$p, { square_mask($p) }>($kk, $cc, bits);
            )*
        };
    }
    primes!(k1, c1, 5 7 11 13 17 19 23 29 31 37 41 43 47 53);
    primes!(k2, c2, 59 61);
}

#[cfg(test)]
mod tests {
    use super::*;

    fn is_square_mod(q: u64, m: u64) -> bool {
        (0..m).any(|x| (x * x) % m == q % m)
    }

    #[test]
    fn tables_agree_with_brute_force() {
        for m in [
            64u64, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61,
        ] {
            let mask = square_mask(m);
            for r in 0..m {
                assert_eq!((mask >> r) & 1 == 1, is_square_mod(3 * r, m), "{r} mod {m}");
            }
        }
    }

    /// The sieve against a direct test of every c: it must keep every c with
    /// `v(c) = 27R²`, and keep exactly the c whose residues all pass.
    #[test]
    fn sieve_matches_the_residues_of_each_c() {
        let passes = |v: i128| {
            let ok = |m: u64| is_square_mod((3 * v).rem_euclid(m as i128) as u64, m);
            v.rem_euclid(27) == 0
                && [
                    64u64, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61,
                ]
                .into_iter()
                .all(ok)
        };
        let (mut kept, mut kept_adaptive) = (0, 0);
        for (k, c_lo) in [
            ([0i128, 0, 27, 0], -100i64),
            ([27, 0, 27, 0], 3),
            ([-1856, 480 * 8, 0, -512], -700),
            ([5 << 70, -(3 << 66), 1 << 60, -(1 << 40)], -1_000_007),
            ([1_000_003, -77, 12, 9], 1 << 40),
        ] {
            let len = 1000usize;
            let mut bits = vec![!0u64; len.div_ceil(64)];
            sieve_with(&k, c_lo, &mut bits, false);
            let mut some = vec![!0u64; len.div_ceil(64)];
            sieve(&k, c_lo, &mut some);
            for t in 0..len {
                let c = i128::from(c_lo) + t as i128;
                let v = ((k[3] * c + k[2]) * c + k[1]) * c + k[0];
                let got = (bits[t / 64] >> (t % 64)) & 1 == 1;
                assert_eq!(got, passes(v), "all moduli: k = {k:?}, c = {c}");
                // Stopping early may keep more, never less.
                let early = (some[t / 64] >> (t % 64)) & 1 == 1;
                assert!(early || !got, "k = {k:?}, c = {c}");
                kept += usize::from(got);
                kept_adaptive += usize::from(early);
            }
        }
        assert!(kept > 1000, "27·c² keeps every c");
        assert!(
            kept_adaptive < kept + 200,
            "{kept_adaptive} kept against {kept}"
        );
    }
}
