//! The pair (implication) chart of Paull & Unger ("Minimizing the number of states in
//! incompletely specified sequential switching functions", IRE Trans. Electronic
//! Computers EC-8, 1959), with worklist propagation. Exact.
//!
//! Two rows are output-compatible when no column gives `0` and `1` for the same output;
//! compatible when, besides, every pair of distinct next states they imply (in columns
//! where both are specified) is compatible: the greatest fixpoint, found by marking the
//! output conflicts and propagating incompatibility backwards along "is implied by".
//!
//! # Complexity
//! O(n^2 c) time and memory for `n` rows and `c` columns.

use super::bitset::BitSet;
use crate::table::FlowTable;

/// Which pairs of rows are compatible: `adj[s]` holds every `t != s` compatible with `s`.
pub(crate) struct PairChart {
    pub(crate) adj: Vec<BitSet>,
    pub(crate) compatible_pairs: usize,
}

fn output_conflict(t: &FlowTable, s: usize, u: usize) -> bool {
    use crate::ids::StateId;
    let (a, b) = (StateId::from_index(s), StateId::from_index(u));
    t.columns().any(|c| {
        t.outputs(a, c)
            .iter()
            .zip(t.outputs(b, c))
            .any(|(x, y)| x.conflicts(*y))
    })
}

#[allow(clippy::needless_range_loop)]
pub(crate) fn pair_chart(t: &FlowTable) -> PairChart {
    let n = t.num_states();
    let idx = |a: usize, b: usize| if a < b { a * n + b } else { b * n + a };
    let mut bad = vec![false; n * n];
    let mut work: Vec<usize> = Vec::new();
    // edges (implied pair, implying pair)
    let mut edges: Vec<(u32, u32)> = Vec::new();
    let nexts: Vec<Vec<Option<usize>>> = t
        .states()
        .map(|s| {
            t.columns()
                .map(|c| t.next(s, c).map(|x| x.index()))
                .collect()
        })
        .collect();
    for s in 0..n {
        for u in s + 1..n {
            let p = idx(s, u);
            if output_conflict(t, s, u) {
                bad[p] = true;
                work.push(p);
                continue;
            }
            for c in 0..t.num_columns() {
                if let (Some(a), Some(b)) = (nexts[s][c], nexts[u][c]) {
                    if a != b && idx(a, b) != p {
                        edges.push((idx(a, b) as u32, p as u32));
                    }
                }
            }
        }
    }
    edges.sort_unstable();
    edges.dedup();
    // CSR by implied pair
    let mut start = vec![0u32; n * n + 1];
    for &(a, _) in &edges {
        start[a as usize + 1] += 1;
    }
    for i in 0..n * n {
        start[i + 1] += start[i];
    }
    while let Some(p) = work.pop() {
        for e in &edges[start[p] as usize..start[p + 1] as usize] {
            let q = e.1 as usize;
            if !bad[q] {
                bad[q] = true;
                work.push(q);
            }
        }
    }
    let mut adj = vec![BitSet::new(n); n];
    let mut compatible_pairs = 0;
    for s in 0..n {
        for u in s + 1..n {
            if !bad[idx(s, u)] {
                adj[s].insert(u);
                adj[u].insert(s);
                compatible_pairs += 1;
            }
        }
    }
    PairChart {
        adj,
        compatible_pairs,
    }
}
