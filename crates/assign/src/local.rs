//! A local search for codes of one width covering every required dichotomy (a
//! heuristic: it finds codes or gives up, it never proves a width infeasible).
//!
//! Codes are bit strings per state. A variable `i` covers a dichotomy `(P; Q)` when bit `i`
//! is equal on `P`, equal on `Q`, and different between them; so the bits covering it are
//! the mask `AND_p !(c_p0 ^ c_p) & AND_q !(c_q0 ^ c_q) & (c_p0 ^ c_q0)`, and the mask
//! after flipping bit `i` of one state is the mask with that state's code complemented,
//! taken at bit `i`. Each step picks an uncovered dichotomy (deterministic generator),
//! scores every flip of a bit of one of its states by the weights of the dichotomies it
//! covers and uncovers, and takes the best; when no flip gains, the weights of the
//! uncovered dichotomies grow (clause weighting, common practice in local search for
//! satisfiability, no source) and a random flip among the candidates may be taken. The
//! number of steps or of mask evaluations is the limit, so the result is the same on every
//! run.

use crate::dichotomy::{ones, Dichotomy};
use crate::tracey::SplitMix;
use std::time::Instant;

/// Dichotomies flattened: `states[start[j]..start[j + 1]]` are `P` then `Q`, `split[j]`
/// is the size of `P`.
struct Flat {
    start: Vec<u32>,
    states: Vec<u32>,
    split: Vec<u32>,
    by_state: Vec<Vec<u32>>,
}

impl Flat {
    fn new(n: usize, ds: &[Dichotomy]) -> Flat {
        let mut f = Flat {
            start: vec![0],
            states: Vec::new(),
            split: Vec::new(),
            by_state: vec![Vec::new(); n],
        };
        for (j, d) in ds.iter().enumerate() {
            for s in ones(d.left).chain(ones(d.right)) {
                f.states.push(s as u32);
                f.by_state[s].push(j as u32);
            }
            f.split.push(d.left.count_ones());
            f.start.push(f.states.len() as u32);
        }
        f
    }

    /// The covering mask of dichotomy `j`, state `flip` (if any) complemented.
    fn mask(&self, j: usize, codes: &[u64], flip: u32, full: u64) -> u64 {
        let st = &self.states[self.start[j] as usize..self.start[j + 1] as usize];
        let sp = self.split[j] as usize;
        let c = |s: u32| {
            let v = codes[s as usize];
            if s == flip {
                !v
            } else {
                v
            }
        };
        if sp == 0 || sp == st.len() {
            return 0;
        }
        let p0 = c(st[0]);
        let q0 = c(st[sp]);
        let mut m = (p0 ^ q0) & full;
        for &p in &st[1..sp] {
            m &= !(p0 ^ c(p));
        }
        for &q in &st[sp + 1..] {
            m &= !(q0 ^ c(q));
        }
        m
    }
}

/// Codes of width `k` (one `u64` per state, bit `i` = variable `i`) covering every
/// dichotomy of `ds`, searched for within the limits of `limit` from `start` (codes of any
/// width: the columns beyond `k` that uncover the fewest dichotomies are dropped first;
/// empty: a random start). `seed` varies the walk. `None` when the steps run out or
/// the deadline (a safety net, checked every 1024 steps) has passed.
pub(crate) fn search(
    n: usize,
    ds: &[Dichotomy],
    k: usize,
    start: &[u64],
    limit: Steps,
    seed: u64,
) -> Outcome {
    let mut out = Outcome {
        codes: None,
        steps: 0,
        evals: 0,
        clock_fired: false,
    };
    if k == 0 || k > 64 || n == 0 {
        return out;
    }
    let full = if k == 64 { u64::MAX } else { (1u64 << k) - 1 };
    let f = Flat::new(n, ds);
    let mut rng = SplitMix(0x10ca_15ea_7c4e ^ seed.wrapping_mul(0x2545_f491_4f6c_dd1d));
    let mut codes: Vec<u64> = if start.len() == n {
        narrow(&f, ds.len(), start, k)
    } else {
        (0..n).map(|_| rng.next() & full).collect()
    };
    let m = ds.len();
    let mut mask: Vec<u64> = (0..m).map(|j| f.mask(j, &codes, u32::MAX, full)).collect();
    let mut weight = vec![1u32; m];
    // The uncovered dichotomies, with their positions for O(1) removal.
    let mut open: Vec<u32> = Vec::new();
    let mut pos = vec![u32::MAX; m];
    for j in 0..m {
        if mask[j] == 0 {
            pos[j] = open.len() as u32;
            open.push(j as u32);
        }
    }
    let mut score = vec![0i64; k];
    let mut cands: Vec<(u32, u32)> = Vec::with_capacity(4 * k);
    while out.steps < limit.steps && out.evals < limit.evals {
        if open.is_empty() {
            break;
        }
        out.steps += 1;
        if out.steps % 1024 == 0 && limit.deadline.is_some_and(|d| Instant::now() >= d) {
            out.clock_fired = true;
            return out;
        }
        let j = open[rng.below(open.len())] as usize;
        let st = &f.states[f.start[j] as usize..f.start[j + 1] as usize];
        let mut best: Option<(i64, u32, u32)> = None;
        cands.clear();
        for &s in st {
            out.evals += f.by_state[s as usize].len() as u64;
            score.iter_mut().for_each(|x| *x = 0);
            for &j2 in &f.by_state[s as usize] {
                let j2 = j2 as usize;
                let old = mask[j2];
                let flipped = f.mask(j2, &codes, s, full);
                let w = i64::from(weight[j2]);
                if old == 0 {
                    for i in ones(u128::from(flipped)) {
                        score[i] += w;
                    }
                } else if old.count_ones() == 1 && flipped & old == 0 {
                    score[old.trailing_zeros() as usize] -= w;
                }
            }
            for (i, &sc) in score.iter().enumerate() {
                cands.push((s, i as u32));
                if best.map_or(true, |b| sc > b.0) {
                    best = Some((sc, s, i as u32));
                }
            }
        }
        let Some((sc, mut s, mut i)) = best else {
            return out;
        };
        if sc <= 0 {
            for &o in &open {
                weight[o as usize] += 1;
            }
            if rng.below(2) == 0 {
                (s, i) = cands[rng.below(cands.len())];
            }
        }
        codes[s as usize] ^= 1u64 << i;
        out.evals += f.by_state[s as usize].len() as u64;
        for &j2 in &f.by_state[s as usize] {
            let j2 = j2 as usize;
            let was = mask[j2] != 0;
            mask[j2] = f.mask(j2, &codes, u32::MAX, full);
            let now = mask[j2] != 0;
            if was && !now {
                pos[j2] = open.len() as u32;
                open.push(j2 as u32);
            } else if !was && now {
                let p = pos[j2] as usize;
                let last = open.pop().expect("listed");
                if p < open.len() {
                    open[p] = last;
                    pos[last as usize] = p as u32;
                }
                pos[j2] = u32::MAX;
            }
        }
    }
    if open.is_empty() {
        out.codes = Some(codes);
    }
    out
}

/// The limits of one [`search`].
#[derive(Debug, Clone, Copy)]
pub(crate) struct Steps {
    /// Steps allowed (a deterministic limit).
    pub(crate) steps: u64,
    /// Evaluations of a dichotomy's covering mask allowed (a deterministic limit that
    /// follows the time better than steps: a step costs more on larger tables).
    pub(crate) evals: u64,
    /// The wall-clock safety net.
    pub(crate) deadline: Option<Instant>,
}

/// What one [`search`] gave.
#[derive(Debug, Clone)]
pub(crate) struct Outcome {
    /// Codes covering every dichotomy, if found.
    pub(crate) codes: Option<Vec<u64>>,
    /// Steps taken.
    pub(crate) steps: u64,
    /// Mask evaluations done.
    pub(crate) evals: u64,
    /// Whether the deadline stopped it.
    pub(crate) clock_fired: bool,
}

/// `start` cut down to `k` columns: repeatedly drop the column whose removal leaves the
/// fewest dichotomies uncovered; the kept columns are renumbered `0..k`.
fn narrow(f: &Flat, m: usize, start: &[u64], k: usize) -> Vec<u64> {
    let width = start.iter().fold(0u64, |a, &c| a | c);
    let width = (64 - width.leading_zeros() as usize).max(k);
    let all = if width >= 64 {
        u64::MAX
    } else {
        (1u64 << width) - 1
    };
    let mut keep = all;
    while keep.count_ones() as usize > k {
        let mut best: Option<(usize, usize)> = None;
        for i in ones(u128::from(keep)) {
            let trial = keep & !(1u64 << i);
            let lost = (0..m)
                .filter(|&j| f.mask(j, start, u32::MAX, trial) == 0)
                .count();
            if best.map_or(true, |b| lost < b.0) {
                best = Some((lost, i));
            }
        }
        let Some((_, i)) = best else { break };
        keep &= !(1u64 << i);
    }
    start
        .iter()
        .map(|&c| {
            let mut out = 0u64;
            for (t, i) in ones(u128::from(keep)).enumerate() {
                out |= (c >> i & 1) << t;
            }
            out
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dichotomy::required_for;

    #[test]
    fn finds_the_tracey1_width_and_every_dichotomy_is_covered() {
        // CHECK TRACEY-1 (methods.md §4.3): minimum 3 variables. Source: S. H. Unger,
        // Columbia CS E6831 homework 6 solutions, problem 3.11.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let lim = |steps| Steps {
            steps,
            evals: u64::MAX,
            deadline: None,
        };
        let codes = search(5, &ds, 3, &[], lim(100_000), 1)
            .codes
            .expect("3 variables suffice");
        for d in &ds {
            let f = Flat::new(5, std::slice::from_ref(d));
            assert_ne!(f.mask(0, &codes, u32::MAX, 0b111), 0);
        }
        let none = search(5, &ds, 2, &[], lim(10_000), 1);
        assert!(none.codes.is_none());
        assert_eq!(none.steps, 10_000);
    }
}
