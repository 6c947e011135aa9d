//! A vector of fixed capacity on the stack: the storage of polynomials over F_p (degree
//! at most 8; the project's are quartics and products of two remainders modulo a quartic)
//! and of the factorisation of a machine integer (at most 15 distinct primes below 2⁶⁴),
//! so that the fast paths do not allocate.
//!
//! ```
//! use qorbits::arith::small::Small;
//! let mut v: Small<u64, 4> = Small::new();
//! v.push(3);
//! v.push(1);
//! v.sort();
//! assert_eq!(&v[..], &[1, 3]);
//! assert_eq!(Small::<u64, 4>::from_slice(&[5, 6])[1], 6);
//! ```

use std::fmt;
use std::ops::{Deref, DerefMut};

/// Up to `N` values of `E`, with the length kept beside them; the unused slots hold
/// `E::default()`.
#[derive(Clone)]
pub struct Small<E, const N: usize> {
    items: [E; N],
    len: usize,
}

impl<E: Clone + Default, const N: usize> Small<E, N> {
    /// The empty vector.
    pub fn new() -> Self {
        Small {
            items: std::array::from_fn(|_| E::default()),
            len: 0,
        }
    }

    /// A copy of `s`; panics if `s` is longer than the capacity.
    pub fn from_slice(s: &[E]) -> Self {
        let mut v = Self::new();
        for x in s {
            v.push(x.clone());
        }
        v
    }

    /// Appends `x`; panics when full (a bound of the caller's, stated in its doc).
    pub fn push(&mut self, x: E) {
        assert!(self.len < N, "fixed capacity {N} exceeded");
        self.items[self.len] = x;
        self.len += 1;
    }

    /// Removes and returns the last value.
    pub fn pop(&mut self) -> Option<E> {
        if self.len == 0 {
            return None;
        }
        self.len -= 1;
        Some(std::mem::take(&mut self.items[self.len]))
    }
}

impl<E: Clone + Default, const N: usize> Default for Small<E, N> {
    fn default() -> Self {
        Self::new()
    }
}

impl<E, const N: usize> Deref for Small<E, N> {
    type Target = [E];
    fn deref(&self) -> &[E] {
        &self.items[..self.len]
    }
}

impl<E, const N: usize> DerefMut for Small<E, N> {
    fn deref_mut(&mut self) -> &mut [E] {
        &mut self.items[..self.len]
    }
}

impl<E: fmt::Debug, const N: usize> fmt::Debug for Small<E, N> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_list().entries(self.iter()).finish()
    }
}

impl<E: Clone + Default, const N: usize> FromIterator<E> for Small<E, N> {
    fn from_iter<I: IntoIterator<Item = E>>(it: I) -> Self {
        let mut v = Self::new();
        for x in it {
            v.push(x);
        }
        v
    }
}

impl<'a, E, const N: usize> IntoIterator for &'a Small<E, N> {
    type Item = &'a E;
    type IntoIter = std::slice::Iter<'a, E>;
    fn into_iter(self) -> Self::IntoIter {
        self.iter()
    }
}

impl<E: PartialEq, const N: usize> PartialEq for Small<E, N> {
    fn eq(&self, o: &Self) -> bool {
        **self == **o
    }
}

impl<E: Eq, const N: usize> Eq for Small<E, N> {}

impl<E: Clone + Default, const N: usize> IntoIterator for Small<E, N> {
    type Item = E;
    type IntoIter = std::iter::Take<std::array::IntoIter<E, N>>;
    fn into_iter(self) -> Self::IntoIter {
        let n = self.len;
        self.items.into_iter().take(n)
    }
}

impl<E: PartialEq, const N: usize> PartialEq<[E]> for Small<E, N> {
    fn eq(&self, o: &[E]) -> bool {
        **self == *o
    }
}

impl<E: PartialEq, const N: usize, const M: usize> PartialEq<[E; M]> for Small<E, N> {
    fn eq(&self, o: &[E; M]) -> bool {
        **self == o[..]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn push_pop_and_views() {
        let mut v: Small<u64, 3> = [4, 5].into_iter().collect();
        assert_eq!(v.pop(), Some(5));
        v.push(7);
        v.push(8);
        assert_eq!(v, [4, 7, 8]);
        assert_eq!(format!("{v:?}"), "[4, 7, 8]");
        assert!(std::panic::catch_unwind(move || v.push(9)).is_err());
    }
}
