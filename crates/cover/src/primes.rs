//! Prime implicants of a function given as a cover, by recursive splitting (the
//! unate-recursive paradigm): `P(f) = max(x'·P(f_x'), x·P(f_x), P(f_x') ⊓ P(f_x))`,
//! where `⊓` is the pairwise intersection, with single-cube containment at each level.
//! A unate cover's primes are its containment-maximal cubes. Exact; no minterm table.
//!
//! Reference: Brayton, Hachtel, McMullen & Sangiovanni-Vincentelli, *Logic
//! Minimization Algorithms for VLSI Synthesis*, Kluwer 1984 (from memory). Weakness:
//! the number of primes can grow like `3^n / n`; the pairwise step is quadratic in the
//! primes of the two halves.

use crate::algebra::{binate_var, scc_within, split};
use crate::budget::Clock;
use crate::cube::Cube;

/// All prime implicants of the union of `cover` (the on-set plus don't-cares), sorted.
///
/// ```
/// use stillpoint_cover::{primes::primes, Cube};
/// // ab + a'c: primes ab, a'c and the consensus bc.
/// let f = [Cube::parse("11-")?, Cube::parse("0-1")?];
/// let p: Vec<String> = primes(&f).iter().map(|c| c.to_string(3)).collect();
/// assert_eq!(p, ["-11", "0-1", "11-"]);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn primes(cover: &[Cube]) -> Vec<Cube> {
    primes_within(cover, &Clock::unbounded()).unwrap_or_default()
}

/// [`primes`] under a deadline: `None` when it passed first.
pub(crate) fn primes_within(cover: &[Cube], clock: &Clock) -> Option<Vec<Cube>> {
    let mut start = cover.to_vec();
    scc_within(&mut start, clock);
    let mut p = primes_rec(start, clock);
    if clock.expired() {
        return None;
    }
    p.sort();
    Some(p)
}

fn primes_rec(cover: Vec<Cube>, clock: &Clock) -> Vec<Cube> {
    if clock.tick() {
        return Vec::new();
    }
    if cover.is_empty() {
        return Vec::new();
    }
    if cover.iter().any(|d| d.care_bits() == 0) {
        return vec![Cube::full()];
    }
    if cover.len() == 1 {
        return cover;
    }
    let v = match binate_var(&cover) {
        None => {
            let mut c = cover;
            scc_within(&mut c, clock);
            return c;
        }
        Some(v) => v,
    };
    let (lo, hi) = split(&cover, v);
    drop(cover);
    let mut lo = lo;
    let mut hi = hi;
    scc_within(&mut lo, clock);
    scc_within(&mut hi, clock);
    let p0 = primes_rec(lo, clock);
    let p1 = primes_rec(hi, clock);
    if clock.expired() {
        return Vec::new();
    }
    let mut out = Vec::with_capacity(p0.len() + p1.len());
    for p in &p0 {
        if clock.tick() {
            return Vec::new();
        }
        if !p1.iter().any(|q| q.contains(p)) {
            out.push(p.with_literal(v, Some(false)));
        }
    }
    for q in &p1 {
        if clock.tick() {
            return Vec::new();
        }
        if !p0.iter().any(|p| p.contains(q)) {
            out.push(q.with_literal(v, Some(true)));
        }
    }
    let mut mid = Vec::new();
    for p in &p0 {
        if clock.tick() {
            return Vec::new();
        }
        for q in &p1 {
            if let Some(z) = p.intersection(q) {
                mid.push(z);
            }
        }
    }
    scc_within(&mut mid, clock);
    out.extend(mid);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn strs(v: &[Cube], n: usize) -> Vec<String> {
        v.iter().map(|c| c.to_string(n)).collect()
    }

    #[test]
    fn primes_of_minterm_list() {
        // methods.md §9.3 row 1 [computed]: Σm(0,1,2,5,6,7,8,9,10,14) over abcd has the
        // 6 primes --10 -0-0 -00- 0-01 01-1 011-.
        let on: Vec<Cube> = [0, 1, 2, 5, 6, 7, 8, 9, 10, 14]
            .iter()
            .map(|&m| Cube::minterm(4, m))
            .collect();
        let mut p = strs(&primes(&on), 4);
        p.sort();
        assert_eq!(p, ["--10", "-0-0", "-00-", "0-01", "01-1", "011-"]);
    }
}
