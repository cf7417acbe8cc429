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
    nodes: u64,
    stopped: bool,
    limits: Limits,
}

/// A solved (sub)problem.
struct Sub {
    cost: u64,
    cols: Vec<usize>,
    lb: u64,
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
    let core = (
        root.rows.len(),
        if root.rows.is_empty() {
            0
        } else {
            count(&root.mask) as usize
        },
    );
    let sub = s.exact(root);
    let mut cols = sub.cols;
    cols.sort_unstable();
    let optimal = !s.stopped;
    Ok(Outcome {
        cols,
        cost: sub.cost,
        optimal,
        lower_bound: if optimal {
            sub.cost
        } else {
            sub.lb.min(sub.cost)
        },
        nodes: s.nodes,
        core,
    })
}

impl Search<'_> {
    /// Exact solution of a subproblem (its own upper bound, split into independent
    /// blocks when it falls apart). When the budget has run out, the greedy answer.
    fn exact(&mut self, mut n: Node) -> Sub {
        if !self.reduce(&mut n) {
            return Sub {
                cost: u64::MAX,
                cols: Vec::new(),
                lb: u64::MAX,
            };
        }
        if n.rows.is_empty() {
            return Sub {
                cost: n.cost,
                cols: n.chosen,
                lb: n.cost,
            };
        }
        let comps = self.components(&n);
        if comps.len() > 1 {
            let mut total = Sub {
                cost: n.cost,
                cols: n.chosen.clone(),
                lb: n.cost,
            };
            for c in comps {
                let s = self.exact(c);
                total.cost = total.cost.saturating_add(s.cost);
                total.lb = total.lb.saturating_add(s.lb);
                total.cols.extend(s.cols);
            }
            return total;
        }
        let lb = n.cost + self.mis_bound(&n.rows);
        let mut best = self.greedy(&n);
        let mut bound = lb;
        if !self.stopped && best.0 > lb {
            bound = self.branch(n, &mut best, lb).max(lb);
        }
        let lb = if self.stopped {
            bound.min(best.0)
        } else {
            best.0
        };
        Sub {
            cost: best.0,
            cols: best.1,
            lb,
        }
    }

    /// Splits a reduced node into blocks of rows that share no column.
    fn components(&self, n: &Node) -> Vec<Node> {
        let ncol = self.words * 64;
        let mut parent: Vec<usize> = (0..ncol).collect();
        fn find(p: &mut [usize], mut x: usize) -> usize {
            while p[x] != x {
                p[x] = p[p[x]];
                x = p[x];
            }
            x
        }
        for r in &n.rows {
            let mut it = ones(r);
            if let Some(first) = it.next() {
                let a = find(&mut parent, first);
                for c in it {
                    let b = find(&mut parent, c);
                    if a != b {
                        parent[b] = a;
                    }
                }
            }
        }
        let mut roots: Vec<usize> = Vec::new();
        let mut groups: Vec<Vec<Bits>> = Vec::new();
        for r in &n.rows {
            let first = ones(r).next().unwrap_or(0);
            let root = find(&mut parent, first);
            match roots.iter().position(|&x| x == root) {
                Some(k) => groups[k].push(r.clone()),
                None => {
                    roots.push(root);
                    groups.push(vec![r.clone()]);
                }
            }
        }
        if groups.len() == 1 {
            return vec![n.clone()];
        }
        groups
            .into_iter()
            .map(|rows| {
                let mut mask = vec![0u64; self.words];
                for r in &rows {
                    for (m, w) in mask.iter_mut().zip(r) {
                        *m |= *w;
                    }
                }
                Node {
                    rows,
                    mask,
                    chosen: Vec::new(),
                    cost: 0,
                }
            })
            .collect()
    }

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
            if n.rows.is_empty() {
                return true;
            }
            // Column -> rows index over the current rows.
            let nr = n.rows.len();
            let rw = nr.div_ceil(64).max(1);
            let mut colrows: Vec<Bits> = vec![Vec::new(); self.words * 64];
            for (ri, r) in n.rows.iter().enumerate() {
                for c in ones(r) {
                    if colrows[c].is_empty() {
                        colrows[c] = vec![0u64; rw];
                    }
                    set(&mut colrows[c], ri);
                }
            }
            // Row dominance: a row holding all columns of another row is implied.
            // Candidates containing row a must hold a's first column.
            let mut dead = vec![false; nr];
            let mut order: Vec<usize> = (0..nr).collect();
            order.sort_by_key(|&i| (count(&n.rows[i]), i));
            for (pos, &a) in order.iter().enumerate() {
                if dead[a] {
                    continue;
                }
                let first = ones(&n.rows[a]).next().unwrap_or(0);
                for b in ones(&colrows[first]) {
                    if b == a || dead[b] {
                        continue;
                    }
                    // Ties (equal rows): the later one in `order` dies.
                    if subset(&n.rows[a], &n.rows[b]) {
                        let a_first =
                            order.iter().position(|&x| x == b).unwrap_or(usize::MAX) > pos;
                        if n.rows[a] != n.rows[b] || a_first {
                            dead[b] = true;
                            changed = true;
                        }
                    }
                }
            }
            if changed {
                let mut k = 0;
                n.rows.retain(|_| {
                    k += 1;
                    !dead[k - 1]
                });
                continue;
            }
            // Column dominance: c1 is dropped if some c2 covers all its rows at no more
            // cost; c2 must hold the first row of c1.
            let active: Vec<usize> = ones(&n.mask).collect();
            let mut alive = vec![true; self.words * 64];
            for &c in &active {
                if colrows[c].is_empty() {
                    alive[c] = false;
                    clear(&mut n.mask, c);
                    changed = true;
                }
            }
            for &c1 in &active {
                if !alive[c1] {
                    continue;
                }
                let r0 = ones(&colrows[c1]).next().unwrap_or(0);
                for c2 in ones(&n.rows[r0]) {
                    if c1 == c2 || !alive[c2] || self.cost[c1] < self.cost[c2] {
                        continue;
                    }
                    if !subset(&colrows[c1], &colrows[c2]) {
                        continue;
                    }
                    // Equal sets and equal costs: keep the lower index.
                    if self.cost[c1] == self.cost[c2] && colrows[c1] == colrows[c2] && c1 < c2 {
                        continue;
                    }
                    alive[c1] = false;
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

    /// The independent-set lower bound on the cost still to pay: the better of two
    /// greedy independent sets of rows (shortest rows first; rows meeting fewest other
    /// rows first), each row counting its cheapest column.
    fn mis_bound(&self, rows: &[Bits]) -> u64 {
        let by_len = {
            let mut order: Vec<usize> = (0..rows.len()).collect();
            order.sort_by_key(|&i| count(&rows[i]));
            self.independent(rows, &order)
        };
        if rows.len() < 4 {
            return by_len;
        }
        // Degree of each row: how many rows share a column with it.
        let mut colrows: Vec<Vec<usize>> = vec![Vec::new(); self.words * 64];
        for (i, r) in rows.iter().enumerate() {
            for c in ones(r) {
                colrows[c].push(i);
            }
        }
        let rw = rows.len().div_ceil(64);
        let mut seen = vec![0u64; rw];
        let mut degree = vec![0u32; rows.len()];
        for (i, r) in rows.iter().enumerate() {
            seen.iter_mut().for_each(|w| *w = 0);
            for c in ones(r) {
                for &j in &colrows[c] {
                    set(&mut seen, j);
                }
            }
            degree[i] = count(&seen);
        }
        let mut order: Vec<usize> = (0..rows.len()).collect();
        order.sort_by_key(|&i| (degree[i], count(&rows[i]), i));
        by_len.max(self.independent(rows, &order))
    }

    fn independent(&self, rows: &[Bits], order: &[usize]) -> u64 {
        let mut used = vec![0u64; self.words];
        let mut lb = 0u64;
        for &i in order {
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
        let mut counts = vec![0u32; self.words * 64];
        while !rows.is_empty() {
            counts.iter_mut().for_each(|c| *c = 0);
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
            let needed = n
                .rows
                .iter()
                .any(|r| has(r, c) && !extra.iter().any(|&o| o != c && has(r, o)));
            if !needed {
                extra.remove(k);
            }
        }
        chosen.extend(extra);
        let cost = chosen.iter().map(|&c| self.cost[c]).sum();
        (cost, chosen)
    }

    /// Searches the subtree of `n`, improving `best`; returns a proven lower bound on
    /// every cover in the subtree (`floor` is one known from above, used for the parts
    /// left unexplored when the budget stops the search).
    fn branch(&mut self, mut n: Node, best: &mut (u64, Vec<usize>), floor: u64) -> u64 {
        if self.stopped {
            return floor;
        }
        self.nodes += 1;
        if self.nodes > self.limits.node_limit || Instant::now() >= self.limits.deadline {
            self.stopped = true;
            return floor;
        }
        if !self.reduce(&mut n) {
            return u64::MAX;
        }
        if n.rows.is_empty() {
            if n.cost < best.0 {
                *best = (n.cost, n.chosen.clone());
            }
            return n.cost;
        }
        let lb = (n.cost + self.mis_bound(&n.rows)).max(floor);
        if lb >= best.0 {
            return lb;
        }
        let comps = self.components(&n);
        if comps.len() > 1 {
            let mut cost = n.cost;
            let mut bound = n.cost;
            let mut cols = n.chosen.clone();
            for c in comps {
                let s = self.exact(c);
                cost = cost.saturating_add(s.cost);
                bound = bound.saturating_add(s.lb);
                cols.extend(s.cols);
            }
            if cost < best.0 {
                *best = (cost, cols);
            }
            return bound.max(lb);
        }
        // Branch on the columns of the shortest row, most covering first.
        let ri = (0..n.rows.len())
            .min_by_key(|&i| count(&n.rows[i]))
            .unwrap_or(0);
        let cover_count = |c: usize| n.rows.iter().filter(|r| has(r, c)).count();
        let mut keyed: Vec<(usize, usize)> =
            ones(&n.rows[ri]).map(|c| (c, cover_count(c))).collect();
        keyed.sort_by(|a, b| {
            b.1.cmp(&a.1)
                .then(self.cost[a.0].cmp(&self.cost[b.0]))
                .then(a.0.cmp(&b.0))
        });
        let cols: Vec<usize> = keyed.into_iter().map(|(c, _)| c).collect();
        let mut sub_min = u64::MAX;
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
            let b = self.branch(child, best, lb);
            sub_min = sub_min.min(b);
            if self.stopped {
                // Siblings not yet searched are bounded by this node's bound.
                if k + 1 < cols.len() {
                    sub_min = sub_min.min(lb);
                }
                return sub_min.max(lb);
            }
        }
        sub_min.max(lb)
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
