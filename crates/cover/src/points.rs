//! Point tables: the value of every point of a small space (up to [`TABLE_VARS`]
//! variables) in one byte, so that "does this cube hold an off-set point" costs one
//! lookup per point of the cube instead of a scan of the off-set cubes.
//!
//! A point is indexed by the `value` word of its full-length cube (bit `i` = variable
//! `i`), not by its textbook minterm number.

use crate::cube::{mask, Cube};

/// The most variables a point table is built for (2^20 bytes).
pub(crate) const TABLE_VARS: usize = 20;

/// The most variables [`Table::primes`] works for (`3^14` bytes, 4.8 MB).
pub(crate) const TERNARY_VARS: usize = 14;

/// Point states.
pub(crate) const OFF: u8 = 0;
/// An on-set point.
pub(crate) const ON: u8 = 1;
/// A don't-care point.
pub(crate) const DC: u8 = 2;

/// The state of every point of an `n`-variable space.
#[derive(Debug, Clone)]
pub(crate) struct Table {
    n: usize,
    state: Vec<u8>,
    /// For each point outside the off-set, the variables whose flip is not an off-set
    /// point (zero for off-set points), computed on first use.
    nb: std::sync::OnceLock<Vec<u32>>,
}

/// Calls `f` on every point of cube `c` (over `n` variables) until it returns `false`;
/// `false` when it stopped early.
#[inline]
pub(crate) fn each_point(c: &Cube, n: usize, mut f: impl FnMut(usize) -> bool) -> bool {
    let free = mask(n) & !c.care_bits();
    let base = c.value_bits() & mask(n);
    let mut s = 0u64;
    loop {
        if !f((base | s) as usize) {
            return false;
        }
        s = s.wrapping_sub(free) & free;
        if s == 0 {
            return true;
        }
    }
}

impl Table {
    /// The table of `on` and `dc` (the rest off), or `None` when `n` is above
    /// [`TABLE_VARS`] or the cubes hold too many points to paint cheaply.
    pub(crate) fn build(n: usize, on: &[Cube], dc: &[Cube]) -> Option<Table> {
        if n > TABLE_VARS {
            return None;
        }
        let work: u128 = on.iter().chain(dc).map(|c| c.size(n)).sum();
        if work > 8u128 << n {
            return None;
        }
        let mut t = Table {
            n,
            state: vec![OFF; 1usize << n],
            nb: std::sync::OnceLock::new(),
        };
        for c in on {
            t.paint(c, ON);
        }
        for c in dc {
            t.paint(c, DC);
        }
        Some(t)
    }

    /// The number of variables.
    pub(crate) fn nvars(&self) -> usize {
        self.n
    }

    /// The neighbour masks: for each point outside the off-set, bit `v` set when the
    /// point with variable `v` flipped is not an off-set point. A literal `v` of a
    /// cube can be raised without meeting the off-set exactly when `v` is in the mask
    /// of every point of the cube.
    pub(crate) fn neighbours(&self) -> &[u32] {
        self.nb.get_or_init(|| {
            use rayon::prelude::*;
            let (st, n) = (&self.state, self.n);
            let mut nb = vec![0u32; st.len()];
            // In chunks on the thread pool (each point's mask depends on the table only,
            // so the result does not depend on the threads).
            nb.par_chunks_mut(1 << 14)
                .enumerate()
                .for_each(|(k, chunk)| {
                    for (i, m) in chunk.iter_mut().enumerate() {
                        let p = (k << 14) + i;
                        if st[p] == OFF {
                            continue;
                        }
                        let mut f = 0u32;
                        for v in 0..n {
                            if st[p ^ 1 << v] != OFF {
                                f |= 1 << v;
                            }
                        }
                        *m = f;
                    }
                });
            nb
        })
    }

    /// Sets every point of `c` to `s` (and forgets the neighbour masks).
    pub(crate) fn paint(&mut self, c: &Cube, s: u8) {
        self.nb = std::sync::OnceLock::new();
        let st = &mut self.state;
        each_point(c, self.n, |p| {
            st[p] = s;
            true
        });
    }

    /// The states, indexed by point.
    pub(crate) fn states(&self) -> &[u8] {
        &self.state
    }

    /// All prime implicants of the points outside the off-set (the on-set and the
    /// don't-cares), sorted; `None` above [`TERNARY_VARS`] variables. Every cube of
    /// the space is a ternary number (digit `i`: variable `i` is 0, 1 or free), and a
    /// cube with variable `i` free is an implicant exactly when both its halves on `i`
    /// are: one pass per variable over the `3^n` cubes marks them all (a pass writes
    /// the cubes whose highest free variable is `i` from halves already final). A
    /// prime is an implicant none of whose literals can be raised. The same set as [`crate::primes::primes`] of the
    /// on-set and don't-care covers, in time `n 3^n` independent of how the sets are
    /// given (at 12 variables about a millisecond).
    pub(crate) fn primes(&self) -> Option<Vec<Cube>> {
        let n = self.n;
        if n > TERNARY_VARS {
            return None;
        }
        let pow: Vec<usize> = (0..=n).map(|i| 3usize.pow(i as u32)).collect();
        let size = pow[n];
        // imp[t]: cube t holds no off-set point. First the cubes without free
        // variables (the points), then one pass per variable `i` over the cubes with
        // `i` free, from their halves on `i` (cubes whose free variables are all below
        // `i` are final by then, and the others are written again later).
        let mut imp = vec![false; size];
        for (p, &st) in self.state.iter().enumerate() {
            let t: usize = (0..n).filter(|&i| p >> i & 1 == 1).map(|i| pow[i]).sum();
            imp[t] = st != OFF;
        }
        for &w in &pow[..n] {
            for base in (0..size).step_by(3 * w) {
                let (lo, rest) = imp[base..base + 3 * w].split_at_mut(w);
                let (hi, free) = rest.split_at_mut(w);
                for ((f, &a), &b) in free.iter_mut().zip(&*lo).zip(&*hi) {
                    *f = a && b;
                }
            }
        }
        // prime[t]: an implicant none of whose literals can be raised.
        let mut prime = imp.clone();
        for &w in &pow[..n] {
            for base in (0..size).step_by(3 * w) {
                let up = &imp[base + 2 * w..base + 3 * w];
                let (lo, hi) = prime[base..base + 2 * w].split_at_mut(w);
                for ((a, b), &u) in lo.iter_mut().zip(hi.iter_mut()).zip(up) {
                    *a &= !u;
                    *b &= !u;
                }
            }
        }
        let mut out = Vec::new();
        for (t, _) in prime.iter().enumerate().filter(|(_, &p)| p) {
            let (mut care, mut value, mut x) = (0u64, 0u64, t);
            for i in 0..n {
                match x % 3 {
                    0 => care |= 1 << i,
                    1 => {
                        care |= 1 << i;
                        value |= 1 << i;
                    }
                    _ => {}
                }
                x /= 3;
            }
            out.push(Cube::from_words(care, value));
        }
        out.sort();
        Some(out)
    }

    /// An off-set point of `c` as a full-length cube, if any.
    pub(crate) fn off_witness(&self, c: &Cube) -> Option<Cube> {
        let mut found = None;
        each_point(c, self.n, |p| {
            if self.state[p] == OFF {
                found = Some(p as u64);
                false
            } else {
                true
            }
        });
        found.map(|p| Cube::from_words(mask(self.n), p))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn off_points_are_the_complement() {
        // Brute force over a 7-variable space (common practice, no source).
        let n = 7;
        let on: Vec<Cube> = (0..128u64)
            .filter(|m| m % 3 == 0)
            .map(|m| Cube::from_words(mask(n), m))
            .collect();
        let dc = vec![Cube::parse("11-----").unwrap()];
        let t = Table::build(n, &on, &dc).unwrap();
        for p in 0..128u64 {
            let is_off = p % 3 != 0 && p & 3 != 3;
            let pt = Cube::from_words(mask(n), p);
            assert_eq!(t.off_witness(&pt).is_some(), is_off, "point {p}");
        }
        assert!(t.off_witness(&Cube::full()).is_some());
        assert!(t.off_witness(&Cube::parse("11-----").unwrap()).is_none());
        assert_eq!(
            t.off_witness(&Cube::parse("10000--").unwrap()),
            Some(Cube::from_words(mask(n), 1))
        );
    }

    #[test]
    fn table_primes_equal_the_recursive_ones() {
        // Reference: the cube-list prime generator, and the definition checked by brute
        // force (an implicant none of whose literals can be raised; common practice,
        // no source), on random functions of 1 to 9 variables.
        let mut x = 0x2545_F491_4F6C_DD1Du64;
        let mut next = move || {
            x ^= x >> 12;
            x ^= x << 25;
            x ^= x >> 27;
            x.wrapping_mul(0x2545_F491_4F6C_DD1D)
        };
        for n in 1..=9usize {
            for round in 0..6 {
                let p_on = [10, 30, 50, 70, 90, 100][round];
                let (mut on, mut dc) = (Vec::new(), Vec::new());
                for p in 0..1u64 << n {
                    let r = next() % 100;
                    let c = Cube::from_words(mask(n), p);
                    if r < p_on {
                        on.push(c);
                    } else if r < p_on + 5 {
                        dc.push(c);
                    }
                }
                let t = Table::build(n, &on, &dc).unwrap();
                let got = t.primes().unwrap();
                let ondc: Vec<Cube> = on.iter().chain(&dc).copied().collect();
                assert_eq!(got, crate::primes::primes(&ondc), "n={n} p_on={p_on}");
                for c in &got {
                    assert!(t.off_witness(c).is_none());
                    for v in 0..n {
                        if c.literal(v).is_some() {
                            assert!(t.off_witness(&c.with_literal(v, None)).is_some());
                        }
                    }
                }
            }
        }
    }
}
