//! Point tables: the value of every point of a small space (up to [`TABLE_VARS`]
//! variables) in one byte, so that "does this cube hold an off-set point" costs one
//! lookup per point of the cube instead of a scan of the off-set cubes.
//!
//! A point is indexed by the `value` word of its full-length cube (bit `i` = variable
//! `i`), not by its textbook minterm number.

use crate::cube::{mask, Cube};

/// The most variables a point table is built for (2^20 bytes).
pub(crate) const TABLE_VARS: usize = 20;

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

    /// Sets every point of `c` to `s`.
    pub(crate) fn paint(&mut self, c: &Cube, s: u8) {
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

    /// The off-set as disjoint cubes: aligned blocks of up to 64 points (variables 0 to
    /// 5 free) merged where the whole block is off.
    pub(crate) fn off_cubes(&self) -> Vec<Cube> {
        let n = self.n;
        let full = mask(n);
        let mut out = Vec::new();
        let low = n.min(6);
        let block = 1usize << low;
        for start in (0..self.state.len()).step_by(block) {
            let mut word = 0u64;
            for j in 0..block {
                if self.state[start + j] == OFF {
                    word |= 1 << j;
                }
            }
            emit(word, 0, low, start as u64, full, &mut out);
        }
        out
    }
}

/// Emits the off points of the sub-block of `1 << width` points at bit `lo` of `word`
/// (block start `start`), whole aligned sub-blocks as one cube.
fn emit(word: u64, lo: usize, width: usize, start: u64, full: u64, out: &mut Vec<Cube>) {
    let span = 1usize << width;
    let bits = if span >= 64 {
        word
    } else {
        (word >> lo) & ((1u64 << span) - 1)
    };
    if bits == 0 {
        return;
    }
    if span >= 64 && bits == u64::MAX || span < 64 && bits == (1u64 << span) - 1 {
        let care = full & !mask(width);
        out.push(Cube::from_words(care, start | lo as u64));
        return;
    }
    let half = width - 1;
    emit(word, lo, half, start, full, out);
    emit(word, lo + (1 << half), half, start, full, out);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn off_cubes_are_the_complement() {
        // Brute force over a 7-variable space (common practice, no source).
        let n = 7;
        let on: Vec<Cube> = (0..128u64)
            .filter(|m| m % 3 == 0)
            .map(|m| Cube::from_words(mask(n), m))
            .collect();
        let dc = vec![Cube::parse("11-----").unwrap()];
        let t = Table::build(n, &on, &dc).unwrap();
        let off = t.off_cubes();
        for p in 0..128u64 {
            let is_off = p % 3 != 0 && p & 3 != 3;
            let held = off
                .iter()
                .filter(|c| c.contains(&Cube::from_words(mask(n), p)))
                .count();
            assert_eq!(held, usize::from(is_off), "point {p}");
        }
        assert!(t.off_witness(&Cube::full()).is_some());
        assert!(t.off_witness(&Cube::parse("11-----").unwrap()).is_none());
        assert_eq!(
            t.off_witness(&Cube::parse("10000--").unwrap()),
            Some(Cube::from_words(mask(n), 1))
        );
    }
}
