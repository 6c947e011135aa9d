//! Roots of polynomials over F_p for primes below 2³², on machine integers (the table's
//! primes): Cantor–Zassenhaus splitting of `gcd(g, x^p − x)`, products below 2⁶⁴.
//!
//! ```
//! use qorbits::fp::roots;
//! // x² − 2 over F_7: 3² = 9 ≡ 2 and 4² ≡ 2.
//! assert_eq!(roots(&[5, 0, 1], 7), vec![3, 4]);
//! ```

type P = Vec<u64>;

fn norm(mut a: P) -> P {
    while a.last() == Some(&0) {
        a.pop();
    }
    a
}

fn mul(a: &[u64], b: &[u64], p: u64) -> P {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![0u64; a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j] = (out[i + j] + x * y % p) % p;
        }
    }
    norm(out)
}

fn pow_u(mut b: u64, mut e: u64, p: u64) -> u64 {
    let mut r = 1 % p;
    b %= p;
    while e > 0 {
        if e & 1 == 1 {
            r = r * b % p;
        }
        b = b * b % p;
        e >>= 1;
    }
    r
}

fn inv(a: u64, p: u64) -> u64 {
    pow_u(a, p - 2, p)
}

/// `a mod b`, and the quotient.
fn divrem(a: &[u64], b: &[u64], p: u64) -> (P, P) {
    let mut r = a.to_vec();
    let lb = inv(*b.last().expect("non-zero divisor"), p);
    let mut q = vec![0u64; a.len().saturating_sub(b.len()) + 1];
    while r.len() >= b.len() && !r.is_empty() {
        let shift = r.len() - b.len();
        let c = r.last().unwrap() * lb % p;
        for (i, x) in b.iter().enumerate() {
            r[i + shift] = (r[i + shift] + p - c * x % p) % p;
        }
        q[shift] = c;
        r = norm(r);
    }
    (norm(q), r)
}

fn gcd(a: &[u64], b: &[u64], p: u64) -> P {
    let (mut x, mut y) = (norm(a.to_vec()), norm(b.to_vec()));
    while !y.is_empty() {
        let r = divrem(&x, &y, p).1;
        x = y;
        y = r;
    }
    if let Some(&l) = x.last() {
        let li = inv(l, p);
        x = x.iter().map(|c| c * li % p).collect();
    }
    x
}

fn powmod(base: &[u64], mut e: u64, m: &[u64], p: u64) -> P {
    let mut r = vec![1u64];
    let mut b = divrem(base, m, p).1;
    while e > 0 {
        if e & 1 == 1 {
            r = divrem(&mul(&r, &b, p), m, p).1;
        }
        b = divrem(&mul(&b, &b, p), m, p).1;
        e >>= 1;
    }
    r
}

fn sub(a: &[u64], b: &[u64], p: u64) -> P {
    let n = a.len().max(b.len());
    norm(
        (0..n)
            .map(|i| (a.get(i).copied().unwrap_or(0) + p - b.get(i).copied().unwrap_or(0) % p) % p)
            .collect(),
    )
}

/// Distinct roots in F_p (p prime, `p < 2³²`) of `g` (ascending coefficients in `0..p`),
/// sorted; none for constants and the zero polynomial.
pub fn roots(g: &[u64], p: u64) -> Vec<u64> {
    assert!(p < 1 << 32, "fp::roots needs p < 2^32");
    let g = norm(g.iter().map(|c| c % p).collect());
    if g.len() <= 1 {
        return Vec::new();
    }
    if p < 64 {
        return (0..p)
            .filter(|r| g.iter().rev().fold(0, |acc, c| (acc * r + c) % p) == 0)
            .collect();
    }
    let x = vec![0u64, 1];
    let lin = gcd(&g, &sub(&powmod(&x, p, &g, p), &x, p), p);
    let mut out = Vec::new();
    let mut stack = vec![lin];
    while let Some(h) = stack.pop() {
        match h.len() {
            0 | 1 => {}
            2 => out.push((p - h[0] * inv(h[1], p) % p) % p),
            _ => {
                // Split with gcd(h, (x + d)^{(p−1)/2} − 1) for d = 0, 1, 2, …: each d
                // separates two given roots with probability about ½.
                let mut d = 0;
                loop {
                    let s = sub(&powmod(&[d, 1], (p - 1) / 2, &h, p), &[1], p);
                    let f = gcd(&h, &s, p);
                    if f.len() > 1 && f.len() < h.len() {
                        let q = divrem(&h, &f, p).0;
                        stack.push(f);
                        stack.push(q);
                        break;
                    }
                    d += 1;
                    assert!(d < p, "distinct linear factors always split");
                }
            }
        }
    }
    out.sort();
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn roots_of_products_of_linear_factors() {
        let p = 1_000_003u64;
        // (x − 5)(x − 77)(x − 999_999)(x² + 1); −1 is a non-square mod p ≡ 3 (mod 4).
        let mut g = vec![1u64];
        for r in [5u64, 77, 999_999] {
            g = mul(&g, &[p - r, 1], p);
        }
        g = mul(&g, &[1, 0, 1], p);
        assert_eq!(roots(&g, p), vec![5, 77, 999_999]);
        assert_eq!(roots(&[3, 0, 1], 7), vec![2, 5]); // x² + 3: −3 ≡ 4 = 2² mod 7
    }
}
