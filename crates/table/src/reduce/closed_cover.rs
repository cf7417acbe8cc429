//! A minimum closed cover by branch and bound on the binate covering problem of
//! Grasselli & Luccio: one variable per prime compatible; every row covered; for each
//! chosen prime `C` and each `D` in its class set, some chosen prime contains `D`.
//! Exact (it proves optimality) unless the node limit or the time budget stops it, in
//! which case the best cover found is returned as not optimal.
//!
//! Each node picks the unsatisfied requirement (an uncovered row, or an implied set of a
//! chosen prime that no chosen prime contains) with the fewest remaining candidates and
//! branches on which candidate satisfies it first (branch `j` takes candidate `j` and
//! excludes candidates `1..j`), so the branches partition the solutions. The bound adds
//! to the primes chosen a greedy set of unsatisfied requirements whose candidate sets are
//! pairwise disjoint (each needs its own prime).

use super::bitset::BitSet;
use std::time::Instant;

pub(crate) struct Problem<'a> {
    pub(crate) n: usize,
    pub(crate) primes: &'a [BitSet],
    pub(crate) gammas: &'a [Vec<BitSet>],
}

pub(crate) struct Outcome {
    /// The best cover found, as indices into `primes`, or `None` when it is no better than
    /// the incumbent size given.
    pub(crate) best: Option<Vec<usize>>,
    pub(crate) complete: bool,
    pub(crate) nodes: u64,
    pub(crate) root_bound: usize,
}

struct Search<'a> {
    p: &'a Problem<'a>,
    row_cands: Vec<Vec<usize>>,
    impl_cands: Vec<Vec<Vec<usize>>>,
    chosen: Vec<bool>,
    excluded: Vec<bool>,
    list: Vec<usize>,
    best_len: usize,
    best: Option<Vec<usize>>,
    target: usize,
    nodes: u64,
    node_limit: u64,
    deadline: Instant,
    stopped: bool,
    root_bound: Option<usize>,
}

/// Searches for a closed cover smaller than `incumbent`; stops early at `target` (a
/// proven lower bound).
pub(crate) fn minimum_closed_cover(
    p: &Problem<'_>,
    incumbent: usize,
    target: usize,
    node_limit: u64,
    deadline: Instant,
) -> Outcome {
    let row_cands: Vec<Vec<usize>> = (0..p.n)
        .map(|s| {
            (0..p.primes.len())
                .filter(|&i| p.primes[i].contains(s))
                .collect()
        })
        .collect();
    let impl_cands: Vec<Vec<Vec<usize>>> = p
        .gammas
        .iter()
        .map(|g| {
            g.iter()
                .map(|d| {
                    (0..p.primes.len())
                        .filter(|&j| d.is_subset(&p.primes[j]))
                        .collect()
                })
                .collect()
        })
        .collect();
    let m = p.primes.len();
    let mut s = Search {
        p,
        row_cands,
        impl_cands,
        chosen: vec![false; m],
        excluded: vec![false; m],
        list: Vec::new(),
        best_len: incumbent,
        best: None,
        target,
        nodes: 0,
        node_limit,
        deadline,
        stopped: false,
        root_bound: None,
    };
    if incumbent > target {
        s.go();
    }
    Outcome {
        best: s.best,
        complete: !s.stopped,
        nodes: s.nodes,
        root_bound: s.root_bound.unwrap_or(0),
    }
}

impl Search<'_> {
    fn open(&self) -> Vec<Vec<usize>> {
        let mut reqs = Vec::new();
        for s in 0..self.p.n {
            if !self.row_cands[s].iter().any(|&i| self.chosen[i]) {
                reqs.push(
                    self.row_cands[s]
                        .iter()
                        .copied()
                        .filter(|&i| !self.excluded[i])
                        .collect(),
                );
            }
        }
        for &i in &self.list {
            for c in &self.impl_cands[i] {
                if !c.iter().any(|&j| self.chosen[j]) {
                    reqs.push(c.iter().copied().filter(|&j| !self.excluded[j]).collect());
                }
            }
        }
        reqs
    }

    fn go(&mut self) {
        if self.stopped {
            return;
        }
        self.nodes += 1;
        if self.nodes > self.node_limit
            || (self.nodes % 256 == 0 && Instant::now() >= self.deadline)
        {
            self.stopped = true;
            return;
        }
        let reqs = self.open();
        if reqs.is_empty() {
            if self.list.len() < self.best_len {
                self.best_len = self.list.len();
                self.best = Some(self.list.clone());
            }
            return;
        }
        if reqs.iter().any(|r| r.is_empty()) {
            return;
        }
        // bound: requirements with pairwise disjoint candidate sets
        let mut order: Vec<usize> = (0..reqs.len()).collect();
        order.sort_by_key(|&i| (reqs[i].len(), i));
        let mut used = BitSet::new(self.chosen.len());
        let mut lb = 0;
        for &i in &order {
            if reqs[i].iter().all(|&j| !used.contains(j)) {
                lb += 1;
                for &j in &reqs[i] {
                    used.insert(j);
                }
            }
        }
        if self.root_bound.is_none() {
            self.root_bound = Some(lb);
        }
        if self.list.len() + lb >= self.best_len {
            return;
        }
        let pick = order[0];
        let mut cands = reqs[pick].clone();
        // try first the candidates that cover most uncovered rows
        let uncovered: Vec<usize> = (0..self.p.n)
            .filter(|&s| !self.row_cands[s].iter().any(|&i| self.chosen[i]))
            .collect();
        cands.sort_by_key(|&j| {
            (
                std::cmp::Reverse(
                    uncovered
                        .iter()
                        .filter(|&&s| self.p.primes[j].contains(s))
                        .count(),
                ),
                j,
            )
        });
        let mut undo = Vec::new();
        for &j in &cands {
            self.chosen[j] = true;
            self.list.push(j);
            self.go();
            self.list.pop();
            self.chosen[j] = false;
            if self.stopped || self.best_len <= self.target {
                break;
            }
            self.excluded[j] = true;
            undo.push(j);
        }
        for j in undo {
            self.excluded[j] = false;
        }
    }
}
