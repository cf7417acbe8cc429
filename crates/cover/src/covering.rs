//! Exact unate covering by branch and bound over `u64` bitsets.
//!
//! Reductions to a fixpoint at every node (essential columns, row dominance, column
//! dominance), a lower bound from a maximal independent set of rows (rows pairwise
//! sharing no column each need their own column; summed minimum costs), branching on
//! the columns of the shortest row, and a greedy first solution as the initial upper
//! bound. Exact when it finishes; when the time or node budget stops it, the best
//! solution found is returned with `optimal = false` and the proven root lower bound.
//!
//! References: the reductions and the independent-set bound are textbook (McCluskey
//! 1956; Brayton et al. 1984; the Utah lecture skeleton cited in our methods brief
//! §9.2) — from memory.

use std::time::Instant;

/// A covering problem: choose columns of least total cost so that every row holds a
/// chosen column.
#[derive(Debug, Clone)]
pub struct Problem {
    /// The number of columns.
    pub ncols: usize,
    /// The cost of each column.
    pub cost: Vec<u64>,
    /// Each row: the columns that cover it.
    pub rows: Vec<Vec<usize>>,
}

/// The result of [`solve`].
#[derive(Debug, Clone)]
pub struct Outcome {
    /// The chosen columns, ascending.
    pub cols: Vec<usize>,
    /// Their total cost.
    pub cost: u64,
    /// Whether the search finished (the cost is minimum).
    pub optimal: bool,
    /// A proven lower bound on the minimum cost.
    pub lower_bound: u64,
    /// Search nodes visited.
    pub nodes: u64,
    /// Rows and columns left after the root reductions (the cyclic core).
    pub core: (usize, usize),
}

/// When to stop.
#[derive(Debug, Clone, Copy)]
pub struct Limits {
    /// Stop at this instant.
    pub deadline: Instant,
    /// Stop after this many nodes.
    pub node_limit: u64,
}

type Bits = Vec<u64>;

fn has(b: &[u64], i: usize) -> bool {
    (b[i / 64] >> (i % 64)) & 1 == 1
}
fn clear(b: &mut [u64], i: usize) {
    b[i / 64] &= !(1u64 << (i % 64));
}
fn set(b: &mut [u64], i: usize) {
    b[i / 64] |= 1u64 << (i % 64);
}
fn count(b: &[u64]) -> u32 {
    b.iter().map(|w| w.count_ones()).sum()
}
fn subset(a: &[u64], b: &[u64]) -> bool {
    a.iter().zip(b).all(|(x, y)| x & !y == 0)
}
fn disjoint(a: &[u64], b: &[u64]) -> bool {
    a.iter().zip(b).all(|(x, y)| x & y == 0)
}
fn ones(b: &[u64]) -> impl Iterator<Item = usize> + '_ {
    b.iter().enumerate().flat_map(|(w, &word)| {
        let mut x = word;
        std::iter::from_fn(move || {
            if x == 0 {
                None
            } else {
                let t = x.trailing_zeros() as usize;
                x &= x - 1;
                Some(w * 64 + t)
            }
        })
    })
}

#[derive(Clone)]
struct Node {
    rows: Vec<Bits>,
    mask: Bits,
    chosen: Vec<usize>,
    cost: u64,
}

struct Search<'a> {
    cost: &'a [u64],
    words: usize,
    best: Option<(u64, Vec<usize>)>,
    nodes: u64,
    stopped: bool,
    limits: Limits,
}

/// Solves `p` exactly within `limits`. `Err(row)` when row `row` has no column.
pub fn solve(p: &Problem, limits: Limits) -> Result<Outcome, usize> {
    let words = p.ncols.div_ceil(64).max(1);
    let mut rows = Vec::with_capacity(p.rows.len());
    for (i, r) in p.rows.iter().enumerate() {
        if r.is_empty() {
            return Err(i);
        }
        let mut b = vec![0u64; words];
        for &c in r {
            set(&mut b, c);
        }
        rows.push(b);
    }
    let mut mask = vec![0u64; words];
    for c in 0..p.ncols {
        set(&mut mask, c);
    }
    let mut s = Search {
        cost: &p.cost,
        words,
        best: None,
        nodes: 0,
        stopped: false,
        limits,
    };
    let mut root = Node {
        rows,
        mask,
        chosen: Vec::new(),
        cost: 0,
    };
    let feasible = s.reduce(&mut root);
    debug_assert!(feasible);
    let core = (root.rows.len(), count(&root.mask) as usize);
    let root_lb = root.cost + s.mis_bound(&root.rows);
    let greedy = s.greedy(&root);
    s.best = Some(greedy);
    s.branch(root);
    let (cost, mut cols) = s.best.take().unwrap_or((0, Vec::new()));
    cols.sort_unstable();
    let optimal = !s.stopped;
    Ok(Outcome {
        cols,
        cost,
        optimal,
        lower_bound: if optimal { cost } else { root_lb.min(cost) },
        nodes: s.nodes,
        core,
    })
}

impl Search<'_> {
    /// Applies essential columns, row dominance and column dominance until none
    /// applies. `false` if some row lost all its columns.
    fn reduce(&self, n: &mut Node) -> bool {
        loop {
            let mut changed = false;
            for r in n.rows.iter_mut() {
                for (w, m) in r.iter_mut().zip(&n.mask) {
                    *w &= *m;
                }
            }
            // Essential columns.
            let mut i = 0;
            while i < n.rows.len() {
                let c = count(&n.rows[i]);
                if c == 0 {
                    return false;
                }
                if c == 1 {
                    let col = ones(&n.rows[i]).next().unwrap_or(0);
                    n.chosen.push(col);
                    n.cost += self.cost[col];
                    clear(&mut n.mask, col);
                    n.rows.retain(|r| !has(r, col));
                    changed = true;
                    i = 0;
                    continue;
                }
                i += 1;
            }
            // Row dominance: a row holding all columns of another row is implied.
            n.rows.sort_by_key(|r| count(r));
            let mut kept: Vec<Bits> = Vec::with_capacity(n.rows.len());
            for r in n.rows.drain(..) {
                if kept.iter().any(|k| subset(k, &r)) {
                    changed = true;
                } else {
                    kept.push(r);
                }
            }
            n.rows = kept;
            // Column dominance.
            let nr = n.rows.len();
            let rw = nr.div_ceil(64).max(1);
            let active: Vec<usize> = ones(&n.mask).collect();
            let mut colrows: Vec<Bits> = vec![vec![0u64; rw]; active.len()];
            let mut idx = vec![usize::MAX; self.words * 64];
            for (k, &c) in active.iter().enumerate() {
                idx[c] = k;
            }
            for (ri, r) in n.rows.iter().enumerate() {
                for c in ones(r) {
                    set(&mut colrows[idx[c]], ri);
                }
            }
            let mut alive = vec![true; active.len()];
            for (k, &c) in active.iter().enumerate() {
                if count(&colrows[k]) == 0 {
                    alive[k] = false;
                    clear(&mut n.mask, c);
                    changed = true;
                }
            }
            for k1 in 0..active.len() {
                if !alive[k1] {
                    continue;
                }
                let c1 = active[k1];
                for k2 in 0..active.len() {
                    if k1 == k2 || !alive[k2] {
                        continue;
                    }
                    let c2 = active[k2];
                    if self.cost[c1] < self.cost[c2] || !subset(&colrows[k1], &colrows[k2]) {
                        continue;
                    }
                    // Equal sets and equal costs: keep the lower index.
                    if self.cost[c1] == self.cost[c2] && colrows[k1] == colrows[k2] && c1 < c2 {
                        continue;
                    }
                    alive[k1] = false;
                    clear(&mut n.mask, c1);
                    changed = true;
                    break;
                }
            }
            if !changed {
                return true;
            }
        }
    }

    /// The independent-set lower bound on the cost still to pay.
    fn mis_bound(&self, rows: &[Bits]) -> u64 {
        let mut order: Vec<usize> = (0..rows.len()).collect();
        order.sort_by_key(|&i| count(&rows[i]));
        let mut used = vec![0u64; self.words];
        let mut lb = 0u64;
        for i in order {
            if disjoint(&rows[i], &used) {
                lb += ones(&rows[i]).map(|c| self.cost[c]).min().unwrap_or(0);
                for (u, w) in used.iter_mut().zip(&rows[i]) {
                    *u |= *w;
                }
            }
        }
        lb
    }

    /// A greedy solution from node `n` (most rows per column, then cheaper), made
    /// irredundant.
    fn greedy(&self, n: &Node) -> (u64, Vec<usize>) {
        let mut rows: Vec<&Bits> = n.rows.iter().collect();
        let mut chosen = n.chosen.clone();
        let mut extra: Vec<usize> = Vec::new();
        while !rows.is_empty() {
            let mut counts = vec![0u32; self.words * 64];
            for r in &rows {
                for c in ones(r) {
                    counts[c] += 1;
                }
            }
            let mut best = usize::MAX;
            for c in ones(&n.mask) {
                if counts[c] == 0 {
                    continue;
                }
                if best == usize::MAX
                    || counts[c] > counts[best]
                    || (counts[c] == counts[best] && self.cost[c] < self.cost[best])
                {
                    best = c;
                }
            }
            if best == usize::MAX {
                break;
            }
            extra.push(best);
            rows.retain(|r| !has(r, best));
        }
        // Irredundant: drop a chosen column whose rows are all covered by the others.
        let mut k = extra.len();
        while k > 0 {
            k -= 1;
            let c = extra[k];
            let others: Vec<usize> = extra.iter().copied().filter(|&x| x != c).collect();
            let needed = n
                .rows
                .iter()
                .any(|r| has(r, c) && !others.iter().any(|&o| has(r, o)));
            if !needed {
                extra.remove(k);
            }
        }
        chosen.extend(extra);
        let cost = chosen.iter().map(|&c| self.cost[c]).sum();
        (cost, chosen)
    }

    fn branch(&mut self, mut n: Node) {
        if self.stopped {
            return;
        }
        self.nodes += 1;
        if self.nodes > self.limits.node_limit
            || (self.nodes % 32 == 0 && Instant::now() >= self.limits.deadline)
        {
            self.stopped = true;
            return;
        }
        if !self.reduce(&mut n) {
            return;
        }
        let best_cost = self.best.as_ref().map(|b| b.0).unwrap_or(u64::MAX);
        if n.rows.is_empty() {
            if n.cost < best_cost {
                self.best = Some((n.cost, n.chosen.clone()));
            }
            return;
        }
        if n.cost + self.mis_bound(&n.rows) >= best_cost {
            return;
        }
        // Branch on the columns of the shortest row, most covering first.
        let (ri, _) = n
            .rows
            .iter()
            .enumerate()
            .min_by_key(|(_, r)| count(r))
            .unwrap_or((0, &n.rows[0]));
        let mut cols: Vec<usize> = ones(&n.rows[ri]).collect();
        let cover_count = |c: usize| n.rows.iter().filter(|r| has(r, c)).count();
        let mut keyed: Vec<(usize, usize)> = cols.iter().map(|&c| (c, cover_count(c))).collect();
        keyed.sort_by(|a, b| {
            b.1.cmp(&a.1)
                .then(self.cost[a.0].cmp(&self.cost[b.0]))
                .then(a.0.cmp(&b.0))
        });
        cols = keyed.into_iter().map(|(c, _)| c).collect();
        for (k, &c) in cols.iter().enumerate() {
            let mut mask = n.mask.clone();
            for &prev in &cols[..k] {
                clear(&mut mask, prev);
            }
            clear(&mut mask, c);
            let rows: Vec<Bits> = n.rows.iter().filter(|r| !has(r, c)).cloned().collect();
            let mut chosen = n.chosen.clone();
            chosen.push(c);
            let child = Node {
                rows,
                mask,
                chosen,
                cost: n.cost + self.cost[c],
            };
            self.branch(child);
            if self.stopped {
                return;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::time::Duration;

    fn limits() -> Limits {
        Limits {
            deadline: Instant::now() + Duration::from_secs(10),
            node_limit: u64::MAX,
        }
    }

    #[test]
    fn cyclic_core_is_solved() {
        // The 3-variable cyclic function Σm(0,1,2,5,6,7): six primes, each covering two
        // of six minterms in a ring; minimum 3 (methods.md §9.3 row 2 [computed]).
        let rows = vec![
            vec![0, 1],
            vec![1, 2],
            vec![2, 3],
            vec![3, 4],
            vec![4, 5],
            vec![5, 0],
        ];
        let p = Problem {
            ncols: 6,
            cost: vec![1; 6],
            rows,
        };
        let o = solve(&p, limits()).unwrap();
        assert_eq!(o.cols.len(), 3);
        assert!(o.optimal);
        assert_eq!(o.lower_bound, 3);
    }

    #[test]
    fn empty_row_is_reported() {
        let p = Problem {
            ncols: 2,
            cost: vec![1, 1],
            rows: vec![vec![0], vec![]],
        };
        assert_eq!(solve(&p, limits()).unwrap_err(), 1);
    }
}
