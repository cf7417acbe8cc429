//! Exact unate covering by branch and bound over `u64` bitsets.
//!
//! Reductions to a fixpoint at every node (essential columns, row dominance, column
//! dominance); lower bounds from a maximal independent set of rows (rows pairwise
//! sharing no column each need their own column; summed minimum costs) and from a
//! Lagrangian relaxation improved by subgradient steps (J. E. Beasley, "A Lagrangian
//! heuristic for set-covering problems", Naval Research Logistics 37 (1990) 151-164),
//! computed exactly with integer multipliers, warm-started from the parent node, with a
//! second phase bounding literals when the product count is already tight; reduced-cost
//! fixing; the Lagrangian heuristic for upper bounds; independent blocks solved apart;
//! branching on the columns of the shortest row, least reduced cost first. Exact when it
//! finishes; when the time or node budget stops it, the best solution found is returned
//! with `optimal = false` and a proven lower bound.
//!
//! References: the reductions and the independent-set bound are textbook (McCluskey
//! 1956; Brayton et al. 1984; the Utah lecture skeleton cited in our methods brief
//! §9.2) — from memory; the Lagrangian method as cited above.

use crate::budget::Clock;
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
    /// Wall time of the first phase (products only) when costs are lexicographic,
    /// else of the whole search.
    pub count_time: std::time::Duration,
}

/// When to stop.
#[derive(Debug, Clone, Copy)]
pub struct Limits {
    /// Stop at this instant.
    pub deadline: Instant,
    /// Stop after this many nodes.
    pub node_limit: u64,
    /// With lexicographic costs (products, then literals): the most time the second
    /// phase (literals among covers of the proven product count) may take, within
    /// `deadline`; `None` for all the time left.
    pub literal_time: Option<std::time::Duration>,
    /// With lexicographic costs: the most work the second phase may do, in matrix
    /// entries visited (each subgradient step and each Lagrangian cover counts the
    /// entries of its node, each reduction pass the words of its rows), so that where
    /// it stops depends on the problem only, not on the machine; `None` for no such
    /// limit.
    pub literal_work: Option<u64>,
    /// When `literal_work` is `None`: an allowance of this many units per entry of the
    /// covering matrix (so it grows with the problem), at least [`LITERAL_WORK_FLOOR`];
    /// `None` for no limit.
    pub literal_work_per_entry: Option<u64>,
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
    /// Lagrangian multiplier of each row (parallel to `rows`), warm start for the
    /// subgradient at this node.
    mult: Vec<[i64; 2]>,
    /// The multiplier of the product-count constraint of the literal phase.
    mu: i64,
    mask: Bits,
    chosen: Vec<usize>,
    cost: u64,
    /// Subgradient iterations to spend at this node.
    iters: usize,
}

impl Node {
    /// Keeps the rows (and their multipliers) for which `keep` holds, in order.
    fn retain_rows(&mut self, mut keep: impl FnMut(usize, &Bits) -> bool) {
        let mut k = 0;
        for i in 0..self.rows.len() {
            if keep(i, &self.rows[i]) {
                self.rows.swap(k, i);
                self.mult.swap(k, i);
                k += 1;
            }
        }
        self.rows.truncate(k);
        self.mult.truncate(k);
    }
}

struct Search<'a> {
    cost: &'a [u64],
    words: usize,
    nodes: u64,
    stopped: bool,
    limits: Limits,
    clock: Clock,
    /// Cover costs are `unit * h + l` with `0 <= l <= slack` (see [`Search::round`]).
    unit: u64,
    slack: u64,
    /// Whether costs are small enough for exact `i64` Lagrangian arithmetic.
    lagrangian: bool,
    /// A cover of the whole problem and a lower bound on every cover's cost, for the
    /// root when it is one block (taken by the first [`Search::exact`] call).
    seed: Option<((u64, Vec<usize>), u64)>,
    /// Work done so far, in matrix entries visited (see [`Limits::literal_work`]).
    work: std::cell::Cell<u64>,
    /// Stop once `work` passes this.
    work_limit: u64,
}

/// The column index of a node: its columns, each row's columns and each column's rows
/// (as positions in `cols` and in the node's rows).
struct Mat {
    cols: Vec<usize>,
    rowcols: Vec<Vec<u32>>,
    colrows: Vec<Vec<u32>>,
}

/// The least allowance of [`Limits::literal_work_per_entry`]: small problems (a few
/// hundred entries) spend most of their literal search in the root's subgradient steps,
/// whatever their size.
pub const LITERAL_WORK_FLOOR: u64 = 1 << 20;

/// Fixed-point scale of the literal phase (its costs are small integers).
const LIT_SCALE: i64 = 1 << 16;

/// The cost of one product in the first phase (products only).
const COUNT_UNIT: u64 = 1 << 16;

/// Subgradient iterations at the root, in an independent block, and at other nodes.
const ROOT_ITERS: usize = 1500;
const BLOCK_ITERS: usize = 300;
const NODE_ITERS: usize = 60;

/// A solved (sub)problem.
struct Sub {
    cost: u64,
    cols: Vec<usize>,
    lb: u64,
}

/// Solves `p` exactly within `limits`. `Err(row)` when row `row` has no column.
pub fn solve(p: &Problem, limits: Limits) -> Result<Outcome, usize> {
    solve_from(p, limits, None)
}

/// [`solve`] starting from a known cover `start` (column indices; ignored unless it
/// covers every row): the first upper bound, and the answer when the budget stops the
/// search before anything better is found.
pub fn solve_from(p: &Problem, limits: Limits, start: Option<&[usize]>) -> Result<Outcome, usize> {
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
    // Costs with a primary part in units of 2^32 (products) and a small secondary part
    // (literals) whose sum over all columns stays below one unit: every cover then costs
    // a whole number of units plus at most `slack`, which lets bounds round up.
    let unit = 1u64 << 32;
    let slack: u64 = p.cost.iter().map(|&c| c % unit).sum();
    let (unit, slack) = if slack < unit && p.cost.iter().all(|&c| c >= unit) {
        (unit, slack)
    } else {
        (1, 0)
    };
    let started = Instant::now();
    let start: Option<Vec<usize>> = start
        .filter(|cols| {
            cols.iter().all(|&c| c < p.ncols)
                && rows.iter().all(|r| cols.iter().any(|&c| has(r, c)))
        })
        .map(|cols| {
            let mut v = cols.to_vec();
            v.sort_unstable();
            v.dedup();
            v
        });
    let seed_with = |cost: &[u64]| {
        start.as_ref().map(|cols| {
            (
                (cols.iter().map(|&c| cost[c]).sum::<u64>(), cols.clone()),
                0,
            )
        })
    };
    if unit == 1 {
        let seed = seed_with(&p.cost);
        let r = run(&p.cost, rows, p.ncols, limits, (1, 0), seed, u64::MAX);
        return Ok(r.outcome(started.elapsed()));
    }
    // Phase 1: the product count alone (every column costs `COUNT_UNIT`, so the
    // integer Lagrangian multipliers can take fractional values of a product): far
    // more columns dominate each other and the bounds have no literal part to close.
    let ones = vec![COUNT_UNIT; p.ncols];
    let seed = seed_with(&ones);
    let mut first = run(
        &ones,
        rows.clone(),
        p.ncols,
        limits,
        (COUNT_UNIT, 0),
        seed,
        u64::MAX,
    );
    // Cheaper columns for the same count before the literal search starts from it.
    polish(&rows, &p.cost, p.ncols, &mut first.cols);
    let lex: u64 = first.cols.iter().map(|&c| p.cost[c]).sum();
    let count_lb = (first.lb.min(first.cost) / COUNT_UNIT).saturating_mul(unit);
    let count_time = started.elapsed();
    if first.stopped {
        let mut cols = first.cols;
        cols.sort_unstable();
        return Ok(Outcome {
            cols,
            cost: lex,
            optimal: false,
            lower_bound: count_lb.min(lex),
            nodes: first.nodes,
            core: first.core,
            count_time,
        });
    }
    // Phase 2: literals among covers of the minimum count, starting from phase 1's
    // cover and knowing that no cover has fewer products.
    let second_deadline = match limits.literal_time {
        Some(t) => Instant::now()
            .checked_add(t)
            .map_or(limits.deadline, |d| d.min(limits.deadline)),
        None => limits.deadline,
    };
    let second_limits = Limits {
        deadline: second_deadline,
        node_limit: limits.node_limit.saturating_sub(first.nodes),
        ..limits
    };
    let second = run(
        &p.cost,
        rows,
        p.ncols,
        second_limits,
        (unit, slack),
        Some(((lex, first.cols.clone()), count_lb)),
        limits
            .literal_work
            .or(limits.literal_work_per_entry.map(|k| {
                let entries: u64 = p.rows.iter().map(|r| r.len() as u64).sum();
                k.saturating_mul(entries).max(LITERAL_WORK_FLOOR)
            }))
            .unwrap_or(u64::MAX),
    );
    let (cost, mut cols) = if second.cost <= lex {
        (second.cost, second.cols)
    } else {
        (lex, first.cols)
    };
    cols.sort_unstable();
    let optimal = !second.stopped;
    Ok(Outcome {
        cols,
        cost,
        optimal,
        lower_bound: if optimal {
            cost
        } else {
            second.lb.max(count_lb).min(cost)
        },
        nodes: first.nodes + second.nodes,
        core: first.core,
        count_time,
    })
}

/// Cheaper columns for a cover, one at a time: each chosen column (dearest first) is
/// replaced by the cheapest column that holds every row only it holds, when that one
/// costs less; passes repeat while some replacement happens. The number of columns
/// never grows (a column holding no row alone is dropped), so a cover of proven
/// minimum count keeps its count and loses literals.
fn polish(rows: &[Bits], cost: &[u64], ncols: usize, cols: &mut Vec<usize>) {
    let words = ncols.div_ceil(64).max(1);
    let mut colrows: Vec<Vec<u32>> = vec![Vec::new(); ncols];
    for (i, r) in rows.iter().enumerate() {
        for c in ones(r) {
            colrows[c].push(i as u32);
        }
    }
    let mut held = vec![0u32; rows.len()];
    let mut chosen = vec![0u64; words];
    for &c in cols.iter() {
        set(&mut chosen, c);
        for &i in &colrows[c] {
            held[i as usize] += 1;
        }
    }
    let mut cand = vec![0u64; words];
    for _ in 0..8 {
        let mut changed = false;
        cols.sort_by_key(|&c| (std::cmp::Reverse(cost[c]), c));
        for slot in cols.iter_mut() {
            let c = *slot;
            cand.iter_mut().for_each(|w| *w = u64::MAX);
            let mut alone = false;
            for &i in &colrows[c] {
                if held[i as usize] == 1 {
                    alone = true;
                    for (w, r) in cand.iter_mut().zip(&rows[i as usize]) {
                        *w &= *r;
                    }
                }
            }
            let pick = if alone {
                ones(&cand)
                    .filter(|&d| d < ncols && !has(&chosen, d))
                    .min_by_key(|&d| (cost[d], d))
                    .filter(|&d| cost[d] < cost[c])
            } else {
                None
            };
            if alone && pick.is_none() {
                continue;
            }
            for &i in &colrows[c] {
                held[i as usize] -= 1;
            }
            clear(&mut chosen, c);
            if let Some(d) = pick {
                for &i in &colrows[d] {
                    held[i as usize] += 1;
                }
                set(&mut chosen, d);
            }
            *slot = pick.unwrap_or(usize::MAX);
            changed = true;
        }
        cols.retain(|&c| c != usize::MAX);
        if !changed {
            break;
        }
    }
    cols.sort_unstable();
}

/// One branch-and-bound run.
struct Run {
    cols: Vec<usize>,
    cost: u64,
    lb: u64,
    stopped: bool,
    nodes: u64,
    core: (usize, usize),
}

impl Run {
    fn outcome(self, count_time: std::time::Duration) -> Outcome {
        let mut cols = self.cols;
        cols.sort_unstable();
        let optimal = !self.stopped;
        Outcome {
            cols,
            cost: self.cost,
            optimal,
            lower_bound: if optimal {
                self.cost
            } else {
                self.lb.min(self.cost)
            },
            nodes: self.nodes,
            core: self.core,
            count_time,
        }
    }
}

/// Branch and bound over `rows` with column costs `cost` (`(unit, slack)` as in
/// [`Search`]); `seed` is a known cover of the whole problem and a lower bound on every
/// cover's cost, used when the reduced root is one block.
fn run(
    cost: &[u64],
    rows: Vec<Bits>,
    ncols: usize,
    limits: Limits,
    (unit, slack): (u64, u64),
    seed: Option<((u64, Vec<usize>), u64)>,
    work_limit: u64,
) -> Run {
    let words = ncols.div_ceil(64).max(1);
    let mut mask = vec![0u64; words];
    for c in 0..ncols {
        set(&mut mask, c);
    }
    let lagrangian = cost.iter().all(|&c| c <= 1u64 << 40);
    let mut s = Search {
        cost,
        words,
        nodes: 0,
        stopped: false,
        limits,
        clock: Clock::until(limits.deadline),
        unit,
        slack,
        lagrangian,
        seed,
        work: std::cell::Cell::new(0),
        work_limit,
    };
    let nrows = rows.len();
    let mut root = Node {
        rows,
        mult: vec![[0; 2]; nrows],
        mu: 0,
        mask,
        chosen: Vec::new(),
        cost: 0,
        iters: ROOT_ITERS,
    };
    let feasible = s.reduce(&mut root);
    debug_assert!(feasible);
    s.init_multipliers(&mut root);
    let core = (
        root.rows.len(),
        if root.rows.is_empty() {
            0
        } else {
            count(&root.mask) as usize
        },
    );
    let sub = s.exact(root);
    Run {
        cols: sub.cols,
        cost: sub.cost,
        lb: sub.lb,
        stopped: s.stopped,
        nodes: s.nodes,
        core,
    }
}

impl Search<'_> {
    /// Counts `w` units of work.
    fn spend(&self, w: u64) {
        self.work.set(self.work.get().saturating_add(w));
    }

    /// Whether the work allowance is spent.
    fn over(&self) -> bool {
        self.work.get() > self.work_limit
    }

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
        let seed = self.seed.take();
        // Out of time: no split (the greedy cover of the whole node is the answer).
        let comps = if self.clock.now() {
            Vec::new()
        } else {
            self.components(&n)
        };
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
        let mut lb = self.round(n.cost + self.mis_bound(&n.rows));
        let mut best = self.greedy(&n);
        if let Some((cover, floor)) = seed {
            lb = lb.max(floor);
            if cover.0 < best.0 {
                best = cover;
            }
        }
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

    /// Splits a reduced node into blocks of rows that share no column; empty when it
    /// is one block.
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
        let mut group_of: Vec<usize> = vec![usize::MAX; ncol];
        let mut row_group: Vec<usize> = Vec::with_capacity(n.rows.len());
        let mut ngroups = 0;
        for r in &n.rows {
            let first = ones(r).next().unwrap_or(0);
            let root = find(&mut parent, first);
            if group_of[root] == usize::MAX {
                group_of[root] = ngroups;
                ngroups += 1;
            }
            row_group.push(group_of[root]);
        }
        if ngroups <= 1 {
            // One block: no copy (callers read an empty list as "not split").
            return Vec::new();
        }
        let mut groups: Vec<(Vec<Bits>, Vec<[i64; 2]>)> = vec![(Vec::new(), Vec::new()); ngroups];
        for ((r, &u), &k) in n.rows.iter().zip(&n.mult).zip(&row_group) {
            groups[k].0.push(r.clone());
            groups[k].1.push(u);
        }
        groups
            .into_iter()
            .map(|(rows, mult)| {
                let mut mask = vec![0u64; self.words];
                for r in &rows {
                    for (m, w) in mask.iter_mut().zip(r) {
                        *m |= *w;
                    }
                }
                Node {
                    rows,
                    mult,
                    mu: n.mu,
                    mask,
                    chosen: Vec::new(),
                    cost: 0,
                    iters: BLOCK_ITERS,
                }
            })
            .collect()
    }

    /// Applies essential columns, row dominance and column dominance until none
    /// applies. `false` if some row lost all its columns.
    ///
    /// The rows keep their positions until the end (dead ones marked), so the
    /// column-to-rows index is built once and kept up to date as rows and columns go;
    /// the passes and their order are those of a rebuild per pass (same result).
    fn reduce(&self, n: &mut Node) -> bool {
        for r in n.rows.iter_mut() {
            for (w, m) in r.iter_mut().zip(&n.mask) {
                *w &= *m;
            }
        }
        let nr = n.rows.len();
        let rw = nr.div_ceil(64).max(1);
        let ncol = self.words * 64;
        // colrows[c * rw..][..rw]: the live rows holding live column c.
        let mut colrows = vec![0u64; ncol * rw];
        for (ri, r) in n.rows.iter().enumerate() {
            for c in ones(r) {
                set(&mut colrows[c * rw..(c + 1) * rw], ri);
            }
        }
        let mut live = vec![true; nr];
        let mut left = nr;
        // Takes row `ri` out (and out of the index).
        fn kill_row(rows: &[Bits], colrows: &mut [u64], rw: usize, ri: usize) {
            for c in ones(&rows[ri]) {
                clear(&mut colrows[c * rw..(c + 1) * rw], ri);
            }
        }
        // Takes column `c` out of the live rows and the index.
        fn kill_col(rows: &mut [Bits], colrows: &mut [u64], rw: usize, c: usize) {
            let slot = &mut colrows[c * rw..(c + 1) * rw];
            for ri in ones(slot) {
                clear(&mut rows[ri], c);
            }
            slot.iter_mut().for_each(|w| *w = 0);
        }
        let result = loop {
            self.spend((left * self.words) as u64);
            let mut changed = false;
            // Essential columns (all rows of one column at once: a row left with one
            // column keeps it while other essential columns are taken).
            let mut essential = vec![0u64; self.words];
            let mut any = false;
            let mut empty = false;
            for (r, _) in n.rows.iter().zip(&live).filter(|(_, &l)| l) {
                let c = count(r);
                if c == 0 {
                    empty = true;
                    break;
                }
                if c == 1 {
                    for (e, w) in essential.iter_mut().zip(r) {
                        *e |= *w;
                    }
                    any = true;
                }
            }
            if empty {
                break false;
            }
            if any {
                for col in ones(&essential) {
                    n.chosen.push(col);
                    n.cost += self.cost[col];
                }
                for (m, e) in n.mask.iter_mut().zip(&essential) {
                    *m &= !*e;
                }
                for col in ones(&essential) {
                    let slot = colrows[col * rw..(col + 1) * rw].to_vec();
                    for ri in ones(&slot) {
                        if live[ri] {
                            live[ri] = false;
                            left -= 1;
                            kill_row(&n.rows, &mut colrows, rw, ri);
                        }
                    }
                    kill_col(&mut n.rows, &mut colrows, rw, col);
                }
                continue;
            }
            if left == 0 {
                break true;
            }
            if self.clock.now() {
                // Out of time: the dominance reductions are optional.
                break true;
            }
            // Row dominance: a row holding all columns of another row is implied.
            // Candidates containing row a must hold a's first column.
            let mut order: Vec<usize> = (0..nr).filter(|&i| live[i]).collect();
            let sizes: Vec<u32> = n.rows.iter().map(|r| count(r)).collect();
            order.sort_by_key(|&i| (sizes[i], i));
            let mut rank = vec![0usize; nr];
            for (pos, &a) in order.iter().enumerate() {
                rank[a] = pos;
            }
            let mut dead = vec![false; nr];
            for (pos, &a) in order.iter().enumerate() {
                if self.clock.tick() {
                    break;
                }
                if dead[a] {
                    continue;
                }
                let first = ones(&n.rows[a]).next().unwrap_or(0);
                for b in ones(&colrows[first * rw..(first + 1) * rw]) {
                    if b == a || dead[b] {
                        continue;
                    }
                    // Ties (equal rows): the later one in `order` dies.
                    if subset(&n.rows[a], &n.rows[b]) {
                        let a_first = rank[b] > pos;
                        if n.rows[a] != n.rows[b] || a_first {
                            dead[b] = true;
                            changed = true;
                        }
                    }
                }
            }
            if changed {
                for ri in 0..nr {
                    if dead[ri] {
                        live[ri] = false;
                        left -= 1;
                        kill_row(&n.rows, &mut colrows, rw, ri);
                    }
                }
                continue;
            }
            // Column dominance: c1 is dropped if some c2 covers all its rows at no more
            // cost; c2 must hold the first row of c1.
            let active: Vec<usize> = ones(&n.mask).collect();
            let mut alive = vec![true; ncol];
            let slot = |c: usize| c * rw..(c + 1) * rw;
            for &c in &active {
                if colrows[slot(c)].iter().all(|&w| w == 0) {
                    alive[c] = false;
                    clear(&mut n.mask, c);
                    changed = true;
                }
            }
            let mut dropped = Vec::new();
            for &c1 in &active {
                if self.clock.tick() {
                    break;
                }
                if !alive[c1] {
                    continue;
                }
                let r0 = ones(&colrows[slot(c1)]).next().unwrap_or(0);
                for c2 in ones(&n.rows[r0]) {
                    if c1 == c2 || !alive[c2] || self.cost[c1] < self.cost[c2] {
                        continue;
                    }
                    if !subset(&colrows[slot(c1)], &colrows[slot(c2)]) {
                        continue;
                    }
                    // Equal sets and equal costs: keep the lower index.
                    if self.cost[c1] == self.cost[c2]
                        && colrows[slot(c1)] == colrows[slot(c2)]
                        && c1 < c2
                    {
                        continue;
                    }
                    alive[c1] = false;
                    clear(&mut n.mask, c1);
                    dropped.push(c1);
                    changed = true;
                    break;
                }
            }
            for c in dropped {
                kill_col(&mut n.rows, &mut colrows, rw, c);
            }
            if !changed {
                break true;
            }
        };
        if left < nr {
            n.retain_rows(|i, _| live[i]);
        }
        result
    }

    /// The reductions as first written (the column-to-rows index rebuilt every pass):
    /// the reference [`Search::reduce`] is tested against.
    #[cfg(test)]
    fn reduce_reference(&self, n: &mut Node) -> bool {
        loop {
            self.spend((n.rows.len() * self.words) as u64);
            let mut changed = false;
            for r in n.rows.iter_mut() {
                for (w, m) in r.iter_mut().zip(&n.mask) {
                    *w &= *m;
                }
            }
            // Essential columns (all rows of one column at once: a row left with one
            // column keeps it while other essential columns are taken).
            let mut essential = vec![0u64; self.words];
            let mut any = false;
            for r in &n.rows {
                let c = count(r);
                if c == 0 {
                    return false;
                }
                if c == 1 {
                    for (e, w) in essential.iter_mut().zip(r) {
                        *e |= *w;
                    }
                    any = true;
                }
            }
            if any {
                for col in ones(&essential) {
                    n.chosen.push(col);
                    n.cost += self.cost[col];
                }
                for (m, e) in n.mask.iter_mut().zip(&essential) {
                    *m &= !*e;
                }
                n.retain_rows(|_, r| disjoint(r, &essential));
                continue;
            }
            if n.rows.is_empty() {
                return true;
            }
            if self.clock.now() {
                // Out of time: the dominance reductions are optional.
                return true;
            }
            // Column -> rows index over the current rows.
            let nr = n.rows.len();
            let rw = nr.div_ceil(64).max(1);
            let mut colrows: Vec<Bits> = vec![Vec::new(); self.words * 64];
            for (ri, r) in n.rows.iter().enumerate() {
                if self.clock.tick() {
                    return true;
                }
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
            let sizes: Vec<u32> = n.rows.iter().map(|r| count(r)).collect();
            order.sort_by_key(|&i| (sizes[i], i));
            let mut rank = vec![0usize; nr];
            for (pos, &a) in order.iter().enumerate() {
                rank[a] = pos;
            }
            for (pos, &a) in order.iter().enumerate() {
                if self.clock.tick() {
                    break;
                }
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
                        let a_first = rank[b] > pos;
                        if n.rows[a] != n.rows[b] || a_first {
                            dead[b] = true;
                            changed = true;
                        }
                    }
                }
            }
            if changed {
                n.retain_rows(|i, _| !dead[i]);
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
                if self.clock.tick() {
                    break;
                }
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
        let sizes: Vec<u32> = rows.iter().map(|r| count(r)).collect();
        let by_len = {
            let mut order: Vec<usize> = (0..rows.len()).collect();
            order.sort_by_key(|&i| sizes[i]);
            self.independent(rows, &order)
        };
        if rows.len() < 4 || self.clock.expired() {
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
        order.sort_by_key(|&i| (degree[i], sizes[i], i));
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

    /// A greedy solution from node `n` (most rows per column, then cheaper, then the
    /// lower index), made irredundant (last chosen first). Linear in the matrix size
    /// plus one scan of the columns per pick, so it finishes even when the budget has
    /// run out.
    fn greedy(&self, n: &Node) -> (u64, Vec<usize>) {
        let ncol = self.words * 64;
        let mut colrows: Vec<Vec<u32>> = vec![Vec::new(); ncol];
        for (i, r) in n.rows.iter().enumerate() {
            for c in ones(r) {
                colrows[c].push(i as u32);
            }
        }
        let mut counts: Vec<u32> = colrows.iter().map(|v| v.len() as u32).collect();
        let mut alive = vec![true; n.rows.len()];
        let mut left = n.rows.len();
        // Lazy max-heap on (rows held, cheaper, lower index): counts only fall, so an
        // entry whose count is stale is pushed back with the current one.
        let mut heap: std::collections::BinaryHeap<(u32, std::cmp::Reverse<(u64, usize)>)> =
            ones(&n.mask)
                .filter(|&c| counts[c] > 0)
                .map(|c| (counts[c], std::cmp::Reverse((self.cost[c], c))))
                .collect();
        let mut extra: Vec<usize> = Vec::new();
        while left > 0 {
            let Some((k, std::cmp::Reverse((_, best)))) = heap.pop() else {
                break;
            };
            if counts[best] == 0 {
                continue;
            }
            if counts[best] != k {
                heap.push((counts[best], std::cmp::Reverse((self.cost[best], best))));
                continue;
            }
            extra.push(best);
            for &i in &colrows[best] {
                let i = i as usize;
                if alive[i] {
                    alive[i] = false;
                    left -= 1;
                    for c in ones(&n.rows[i]) {
                        counts[c] -= 1;
                    }
                }
            }
        }
        // Irredundant: drop a chosen column whose rows are all covered by the others.
        let mut held = vec![0u32; n.rows.len()];
        for &c in &extra {
            for &i in &colrows[c] {
                held[i as usize] += 1;
            }
        }
        let mut k = extra.len();
        while k > 0 {
            k -= 1;
            let c = extra[k];
            if colrows[c].iter().all(|&i| held[i as usize] >= 2) {
                for &i in &colrows[c] {
                    held[i as usize] -= 1;
                }
                extra.remove(k);
            }
        }
        let mut chosen = n.chosen.clone();
        chosen.extend(extra);
        let cost = chosen.iter().map(|&c| self.cost[c]).sum();
        (cost, chosen)
    }

    /// Rounds a lower bound `v` on the cost of a cover up to the least cost a cover can
    /// have: covers cost `unit * h + l` with `l <= slack`, so `cost >= v` forces
    /// `h >= ceil((v - slack) / unit)`.
    fn round(&self, v: u64) -> u64 {
        if v <= self.slack {
            return v;
        }
        let h = (v - self.slack).div_ceil(self.unit);
        v.max(h.saturating_mul(self.unit))
    }

    /// The usual starting multipliers: each row gets the least over its columns of the
    /// column's cost shared among the rows it covers.
    fn init_multipliers(&self, n: &mut Node) {
        if !self.lagrangian {
            return;
        }
        let mut per = vec![0i64; self.words * 64];
        for r in &n.rows {
            for c in ones(r) {
                per[c] += 1;
            }
        }
        for (r, u) in n.rows.iter().zip(n.mult.iter_mut()) {
            u[0] = ones(r)
                .map(|c| self.cost[c] as i64 / per[c].max(1))
                .min()
                .unwrap_or(0);
            u[1] = ones(r)
                .map(|c| (self.cost[c] % self.unit) as i64 * LIT_SCALE / per[c].max(1))
                .min()
                .unwrap_or(0);
        }
    }

    /// Lagrangian relaxation of the covering constraints of a reduced node, improved by
    /// subgradient optimisation from the node's multipliers (J. E. Beasley, "A
    /// Lagrangian heuristic for set-covering problems", Naval Research Logistics 37
    /// (1990) 151-164). For multipliers `u >= 0` the value
    /// `L(u) = sum_i u_i + sum_j min(0, c_j - sum_{i in j} u_i)` is a lower bound on
    /// the cost still to pay; the multipliers are integers, so it is computed exactly.
    /// With `card = Some(k)` the covers are further restricted to exactly `k` columns,
    /// relaxed with a free multiplier `mu`: `L(u, mu) = L_{c + mu}(u) - mu k`.
    /// At the root, every few steps the reduced costs drive a greedy cover, made
    /// irredundant, which may improve `best`; once at the end everywhere. Leaves the
    /// best multipliers in the node (slot `phase`); returns the best `L` and the reduced
    /// costs there (indexed like `m.cols`). Stops early once `done(L)` holds.
    #[allow(clippy::too_many_arguments)]
    fn subgradient(
        &mut self,
        n: &mut Node,
        m: &Mat,
        phase: usize,
        cost: &[i64],
        card: Option<i64>,
        root: bool,
        target: i64,
        done: &dyn Fn(i64) -> bool,
        best: &mut (u64, Vec<usize>),
    ) -> (i64, Vec<i64>) {
        let (iters, mut f, patience, heur) = if root {
            (n.iters, 2.0f64, 30usize, 5usize)
        } else {
            (n.iters, 0.5, 8, 0)
        };
        let mut u: Vec<i64> = n.mult.iter().map(|x| x[phase]).collect();
        let k = card.unwrap_or(0);
        let mut mu = if card.is_some() { n.mu } else { 0 };
        let mut best_u = u.clone();
        let mut best_mu = mu;
        let mut best_l = i64::MIN;
        let mut red = vec![0i64; m.cols.len()];
        let mut g = vec![0i64; u.len()];
        let mut stall = 0;
        let entries: u64 = m.rowcols.iter().map(|r| r.len() as u64).sum();
        let eval = |u: &[i64], mu: i64, red: &mut [i64]| -> i64 {
            for (r, &c) in red.iter_mut().zip(cost) {
                *r = c + mu;
            }
            for (rc, &ui) in m.rowcols.iter().zip(u) {
                if ui != 0 {
                    for &k in rc {
                        red[k as usize] -= ui;
                    }
                }
            }
            let l: i64 = u.iter().sum::<i64>() - mu * k;
            l + red.iter().filter(|&&r| r < 0).sum::<i64>()
        };
        for it in 0..iters {
            let l = eval(&u, mu, &mut red);
            if l > best_l {
                best_l = l;
                best_u.copy_from_slice(&u);
                best_mu = mu;
                stall = 0;
            } else {
                stall += 1;
                if stall >= patience {
                    f /= 2.0;
                    stall = 0;
                }
            }
            if heur > 0 && it % heur == 0 {
                self.lag_cover(n, m, &red, best);
            }
            if done(best_l) || f < 0.005 {
                break;
            }
            self.spend(entries);
            if it % 8 == 7 && (self.clock.now() || self.over()) {
                self.stopped = true;
                break;
            }
            let mut norm = 0f64;
            for (i, rc) in m.rowcols.iter().enumerate() {
                let mut gi = 1 - rc.iter().filter(|&&k| red[k as usize] < 0).count() as i64;
                if u[i] == 0 && gi < 0 {
                    gi = 0;
                }
                g[i] = gi;
                norm += (gi * gi) as f64;
            }
            let gmu = if card.is_some() {
                red.iter().filter(|&&r| r < 0).count() as i64 - k
            } else {
                0
            };
            norm += (gmu * gmu) as f64;
            if norm == 0.0 {
                break;
            }
            let gap = (target as f64 - l as f64).max(1.0);
            let t = f * gap / norm;
            for (ui, &gi) in u.iter_mut().zip(&g) {
                if gi != 0 {
                    *ui = (*ui + (t * gi as f64).round() as i64).max(0);
                }
            }
            mu += (t * gmu as f64).round() as i64;
        }
        let l = eval(&best_u, best_mu, &mut red);
        debug_assert_eq!(l, best_l);
        self.lag_cover(n, m, &red, best);
        for (x, &v) in n.mult.iter_mut().zip(&best_u) {
            x[phase] = v;
        }
        if card.is_some() {
            n.mu = best_mu;
        }
        (l, red)
    }

    /// The column index of a reduced node for the subgradient steps.
    fn matrix(&self, n: &Node) -> Mat {
        let cols: Vec<usize> = ones(&n.mask).collect();
        let mut idx = vec![u32::MAX; self.words * 64];
        for (k, &c) in cols.iter().enumerate() {
            idx[c] = k as u32;
        }
        let rowcols: Vec<Vec<u32>> = n
            .rows
            .iter()
            .map(|r| ones(r).map(|c| idx[c]).collect())
            .collect();
        let mut colrows: Vec<Vec<u32>> = vec![Vec::new(); cols.len()];
        for (i, rc) in rowcols.iter().enumerate() {
            for &k in rc {
                colrows[k as usize].push(i as u32);
            }
        }
        Mat {
            cols,
            rowcols,
            colrows,
        }
    }

    /// The Lagrangian heuristic: the columns of negative reduced cost, then for each
    /// row left uncovered its column of least reduced cost; redundant columns dropped,
    /// dearest first. Improves `best` when cheaper.
    fn lag_cover(&self, n: &Node, m: &Mat, red: &[i64], best: &mut (u64, Vec<usize>)) {
        let (cols, rowcols, colrows) = (&m.cols, &m.rowcols, &m.colrows);
        self.spend(rowcols.iter().map(|r| r.len() as u64).sum());
        let mut covered = vec![0u32; rowcols.len()];
        let mut pick: Vec<usize> = Vec::new();
        let add = |k: usize, covered: &mut [u32], pick: &mut Vec<usize>| {
            pick.push(k);
            for &i in &colrows[k] {
                covered[i as usize] += 1;
            }
        };
        for (k, &r) in red.iter().enumerate() {
            if r < 0 {
                add(k, &mut covered, &mut pick);
            }
        }
        for i in 0..rowcols.len() {
            if covered[i] == 0 {
                let k = rowcols[i]
                    .iter()
                    .map(|&k| k as usize)
                    .min_by_key(|&k| (red[k], self.cost[cols[k]], k))
                    .unwrap_or(0);
                add(k, &mut covered, &mut pick);
            }
        }
        pick.sort_by_key(|&k| {
            (
                std::cmp::Reverse(self.cost[cols[k]]),
                std::cmp::Reverse(red[k]),
                k,
            )
        });
        let mut keep = Vec::with_capacity(pick.len());
        for &k in &pick {
            if colrows[k].iter().all(|&i| covered[i as usize] >= 2) {
                for &i in &colrows[k] {
                    covered[i as usize] -= 1;
                }
            } else {
                keep.push(k);
            }
        }
        let total = keep
            .iter()
            .fold(n.cost, |a, &k| a.saturating_add(self.cost[cols[k]]));
        if total < best.0 {
            let mut chosen = n.chosen.clone();
            chosen.extend(keep.iter().map(|&k| cols[k]));
            *best = (total, chosen);
        }
    }

    /// Searches the subtree of `n`, improving `best`; returns a proven lower bound on
    /// every cover in the subtree (`floor` is one known from above, used for the parts
    /// left unexplored when the budget stops the search). Covers of the subtree that
    /// cost at least `best` may be cut off (reduced-cost fixing); the bound is then one
    /// on the rest, and the caller takes the least of it and `best`.
    fn branch(&mut self, mut n: Node, best: &mut (u64, Vec<usize>), floor: u64) -> u64 {
        if self.stopped {
            return floor;
        }
        self.nodes += 1;
        if self.nodes > self.limits.node_limit || self.clock.now() || self.over() {
            self.stopped = true;
            return floor;
        }
        let root = n.iters >= BLOCK_ITERS;
        let mut lb = floor;
        let mut red = Vec::new();
        for round in 0..4 {
            if !self.reduce(&mut n) {
                return u64::MAX;
            }
            if n.rows.is_empty() {
                if n.cost < best.0 {
                    *best = (n.cost, n.chosen.clone());
                }
                return n.cost.max(lb);
            }
            lb = lb.max(self.round(n.cost + self.mis_bound(&n.rows)));
            if lb >= best.0 || !self.lagrangian {
                break;
            }
            let m = self.matrix(&n);
            let c1: Vec<i64> = m.cols.iter().map(|&c| self.cost[c] as i64).collect();
            let (base, top) = (n.cost, best.0);
            let (unit, slack) = (self.unit, self.slack);
            let round_up = move |v: u64| {
                if v <= slack {
                    v
                } else {
                    v.max((v - slack).div_ceil(unit).saturating_mul(unit))
                }
            };
            let done = move |l: i64| round_up(base.saturating_add(l.max(0) as u64)) >= top;
            let target = top.saturating_sub(base).min(i64::MAX as u64) as i64;
            let first = root && round == 0;
            let (l, r) = self.subgradient(&mut n, &m, 0, &c1, None, first, target, &done, best);
            red = vec![0i64; self.words * 64];
            for (k, &c) in m.cols.iter().enumerate() {
                red[c] = r[k];
            }
            let l = l.max(0) as u64;
            lb = lb.max(self.round(n.cost.saturating_add(l)));
            if lb >= best.0 || self.stopped {
                return lb;
            }
            // Reduced-cost fixing: a column whose inclusion (exclusion) lifts the
            // bound to `best` is out of (in) every cheaper cover of this subtree.
            let mut drop = Vec::new();
            let mut fix = Vec::new();
            for c in ones(&n.mask) {
                let rc = red[c];
                let with = self.round(n.cost.saturating_add(l.saturating_add_signed(rc.max(0))));
                let without =
                    self.round(n.cost.saturating_add(l.saturating_add_signed((-rc).max(0))));
                if rc >= 0 && with >= best.0 {
                    drop.push(c);
                } else if rc < 0 && without >= best.0 {
                    fix.push(c);
                }
            }
            // The literal phase: when the bound already asks for as many products as
            // `best` has, a cheaper cover has exactly that many products here, and
            // fewer literals in all; bound its literals with the product count fixed.
            let hb = best.0 / self.unit;
            if self.slack > 0 && lb >= hb * self.unit {
                let k = (hb - n.cost / self.unit) as i64;
                let lits_best = (best.0 % self.unit) as i64;
                let lits_here = (n.cost % self.unit) as i64;
                let c2: Vec<i64> = m
                    .cols
                    .iter()
                    .map(|&c| (self.cost[c] % self.unit) as i64 * LIT_SCALE)
                    .collect();
                let need = (lits_best - lits_here) * LIT_SCALE;
                let ceil =
                    |v: i64| v.div_euclid(LIT_SCALE) + i64::from(v.rem_euclid(LIT_SCALE) != 0);
                let done = move |l: i64| lits_here + ceil(l) >= lits_best;
                let (l2, r2) =
                    self.subgradient(&mut n, &m, 1, &c2, Some(k), first, need, &done, best);
                let lits = lits_here + ceil(l2).max(0);
                lb = lb.max(hb * self.unit + lits as u64);
                if lb >= best.0 || self.stopped {
                    return lb;
                }
                for (j, &c) in m.cols.iter().enumerate() {
                    let rc = r2[j];
                    if rc >= 0 && lits_here + ceil(l2 + rc) >= lits_best {
                        drop.push(c);
                    } else if rc < 0 && lits_here + ceil(l2 - rc) >= lits_best {
                        fix.push(c);
                    }
                    red[c] = rc;
                }
            }
            if drop.is_empty() && fix.is_empty() {
                break;
            }
            for c in drop {
                clear(&mut n.mask, c);
            }
            for c in fix {
                if has(&n.mask, c) {
                    n.chosen.push(c);
                    n.cost += self.cost[c];
                    clear(&mut n.mask, c);
                    n.retain_rows(|_, r| !has(r, c));
                }
            }
            n.iters = NODE_ITERS;
        }
        if !self.reduce(&mut n) {
            return u64::MAX;
        }
        if n.rows.is_empty() {
            if n.cost < best.0 {
                *best = (n.cost, n.chosen.clone());
            }
            return n.cost.max(lb);
        }
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
            return self.round(bound).max(lb);
        }
        // Branch on the columns of the shortest row, least reduced cost first (most
        // covering first without multipliers).
        let ri = (0..n.rows.len())
            .min_by_key(|&i| count(&n.rows[i]))
            .unwrap_or(0);
        let cover_count = |c: usize| n.rows.iter().filter(|r| has(r, c)).count();
        let mut keyed: Vec<(usize, i64, usize)> = ones(&n.rows[ri])
            .map(|c| (c, red.get(c).copied().unwrap_or(0), cover_count(c)))
            .collect();
        keyed.sort_by(|a, b| {
            a.1.cmp(&b.1)
                .then(b.2.cmp(&a.2))
                .then(self.cost[a.0].cmp(&self.cost[b.0]))
                .then(a.0.cmp(&b.0))
        });
        let cols: Vec<usize> = keyed.into_iter().map(|(c, _, _)| c).collect();
        let mut sub_min = u64::MAX;
        for (k, &c) in cols.iter().enumerate() {
            let mut mask = n.mask.clone();
            for &prev in &cols[..k] {
                clear(&mut mask, prev);
            }
            clear(&mut mask, c);
            let mut rows = Vec::with_capacity(n.rows.len());
            let mut mult = Vec::with_capacity(n.rows.len());
            for (r, &u) in n.rows.iter().zip(&n.mult) {
                if !has(r, c) {
                    rows.push(r.clone());
                    mult.push(u);
                }
            }
            let mut chosen = n.chosen.clone();
            chosen.push(c);
            let child = Node {
                rows,
                mult,
                mu: n.mu,
                mask,
                chosen,
                cost: n.cost + self.cost[c],
                iters: NODE_ITERS,
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
            if lb >= best.0 {
                break;
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
            literal_time: None,
            literal_work: None,
            literal_work_per_entry: None,
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

    /// Minimum cost by trying every subset of columns (the independent checker).
    fn brute(p: &Problem) -> u64 {
        let mut best = u64::MAX;
        for set in 0u32..1 << p.ncols {
            if p.rows.iter().all(|r| r.iter().any(|&c| set >> c & 1 == 1)) {
                let c = (0..p.ncols)
                    .filter(|&c| set >> c & 1 == 1)
                    .map(|c| p.cost[c])
                    .sum();
                best = best.min(c);
            }
        }
        best
    }

    fn problem(ncols: usize, raw: &[(u16, u8)], lexi: bool) -> Problem {
        // Each row: a nonempty set of columns from the low bits; costs either small
        // integers or "one unit of 2^32 plus a few literals" as the minimiser uses.
        let rows: Vec<Vec<usize>> = raw
            .iter()
            .map(|&(bits, _)| {
                let b = (bits as usize) % ((1usize << ncols) - 1) + 1;
                (0..ncols).filter(|&c| b >> c & 1 == 1).collect()
            })
            .collect();
        let cost = (0..ncols)
            .map(|c| {
                let k = raw.get(c).map_or(1, |&(_, w)| w as u64 % 5 + 1);
                if lexi {
                    (1u64 << 32) + k
                } else {
                    k
                }
            })
            .collect();
        Problem { ncols, cost, rows }
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig::with_cases(300))]
        #[test]
        fn reduce_equals_the_rebuilding_reference(
            ncols in 2usize..140,
            raw in proptest::collection::vec((proptest::prelude::any::<u64>(), proptest::prelude::any::<u64>(), proptest::prelude::any::<u8>()), 1..150),
            drop in proptest::prelude::any::<u64>(),
        ) {
            // Random rows of 1 to 5 columns over up to 140 columns (three words), some
            // columns masked out, costs 1..5 (equal costs exercise the ties).
            let words = ncols.div_ceil(64);
            let rows: Vec<Bits> = raw
                .iter()
                .map(|&(a, b, _)| {
                    let mut r = vec![0u64; words];
                    let k = 1 + (a % 5) as usize;
                    for j in 0..k {
                        let c = (((b >> (j * 8)) & 0xff) as usize * 31 + j) % ncols;
                        set(&mut r, c);
                    }
                    r
                })
                .collect();
            let cost: Vec<u64> = (0..ncols)
                .map(|c| raw.get(c).map_or(1, |&(_, _, w)| w as u64 % 5 + 1))
                .collect();
            let mut mask = vec![0u64; words];
            for c in 0..ncols {
                if drop >> (c % 64) & 1 == 0 || c % 3 != 0 {
                    set(&mut mask, c);
                }
            }
            let limits = limits();
            let s = Search {
                cost: &cost,
                words,
                nodes: 0,
                stopped: false,
                limits,
                clock: Clock::until(limits.deadline),
                unit: 1,
                slack: 0,
                lagrangian: true,
                seed: None,
                work: std::cell::Cell::new(0),
                work_limit: u64::MAX,
            };
            let node = Node {
                mult: vec![[0; 2]; rows.len()],
                rows,
                mu: 0,
                mask,
                chosen: Vec::new(),
                cost: 0,
                iters: 0,
            };
            let (mut a, mut b) = (node.clone(), node);
            let ra = s.reduce(&mut a);
            let rb = s.reduce_reference(&mut b);
            proptest::prop_assert_eq!(ra, rb);
            if ra {
                proptest::prop_assert_eq!(&a.rows, &b.rows);
                proptest::prop_assert_eq!(&a.mask, &b.mask);
                proptest::prop_assert_eq!(&a.chosen, &b.chosen);
                proptest::prop_assert_eq!(a.cost, b.cost);
            }
        }
        #[test]
        fn bound_never_exceeds_brute_force_optimum(
            ncols in 2usize..12,
            raw in proptest::collection::vec((proptest::prelude::any::<u16>(), proptest::prelude::any::<u8>()), 1..24),
            lexi in proptest::prelude::any::<bool>(),
            node_limit in 0u64..6,
        ) {
            let p = problem(ncols, &raw, lexi);
            let opt = brute(&p);
            let stopped = solve(&p, Limits { node_limit, ..limits() }).unwrap();
            proptest::prop_assert!(stopped.lower_bound <= opt);
            proptest::prop_assert!(stopped.cost >= opt);
            let sol_ok = p.rows.iter().all(|r| r.iter().any(|c| stopped.cols.contains(c)));
            proptest::prop_assert!(sol_ok);
            let full = solve(&p, limits()).unwrap();
            proptest::prop_assert!(full.optimal);
            proptest::prop_assert_eq!(full.cost, opt);
            proptest::prop_assert_eq!(full.lower_bound, opt);
            // A literal search cut by its work allowance: the count is still the
            // minimum (lexicographic costs), the cover valid, the bound true.
            let cut = solve(&p, Limits { literal_work: Some(node_limit * 50), ..limits() }).unwrap();
            proptest::prop_assert!(cut.lower_bound <= opt && opt <= cut.cost);
            proptest::prop_assert!(p.rows.iter().all(|r| r.iter().any(|c| cut.cols.contains(c))));
            if lexi {
                proptest::prop_assert_eq!(cut.cost >> 32, opt >> 32);
                proptest::prop_assert_eq!(cut.lower_bound >> 32, opt >> 32);
            }
        }

        #[test]
        fn exchange_keeps_a_cover_and_never_costs_more(
            ncols in 2usize..12,
            raw in proptest::collection::vec((proptest::prelude::any::<u16>(), proptest::prelude::any::<u8>()), 1..24),
        ) {
            // Start from every column (a cover): the exchange must leave a cover of no
            // more columns and no more cost (checked directly; common practice, no
            // source).
            let p = problem(ncols, &raw, true);
            let words = ncols.div_ceil(64);
            let rows: Vec<Bits> = p
                .rows
                .iter()
                .map(|r| {
                    let mut b = vec![0u64; words];
                    for &c in r {
                        set(&mut b, c);
                    }
                    b
                })
                .collect();
            let mut cols: Vec<usize> = (0..ncols).collect();
            let before: u64 = cols.iter().map(|&c| p.cost[c]).sum();
            polish(&rows, &p.cost, ncols, &mut cols);
            let after: u64 = cols.iter().map(|&c| p.cost[c]).sum();
            proptest::prop_assert!(cols.len() <= ncols && after <= before);
            proptest::prop_assert!(p.rows.iter().all(|r| r.iter().any(|c| cols.contains(c))));
            proptest::prop_assert!(after >= brute(&p));
        }
    }
}
