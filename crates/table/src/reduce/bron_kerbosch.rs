//! Maximal cliques by Bron–Kerbosch with Tomita's pivot (a vertex of `P ∪ X` with the
//! most neighbours in `P`), on bitsets. Exact; worst case O(3^(n/3)) (Moon–Moser), so it
//! counts nodes against a limit. Also a maximum clique search (branch and bound with a
//! greedy-colouring bound) used for the reducer's lower bound.

use super::bitset::BitSet;

/// All maximal cliques of the graph `adj` (no self loops), each sorted, in a
/// deterministic order; `None` when more than `limit` recursion nodes were needed.
pub(crate) fn maximal_cliques(adj: &[BitSet], limit: &mut u64) -> Option<Vec<BitSet>> {
    let n = adj.len();
    let mut out = Vec::new();
    let r = BitSet::new(n);
    let p = BitSet::full(n);
    let x = BitSet::new(n);
    if bk(adj, r, p, x, &mut out, limit) {
        out.sort();
        Some(out)
    } else {
        None
    }
}

fn bk(
    adj: &[BitSet],
    r: BitSet,
    mut p: BitSet,
    mut x: BitSet,
    out: &mut Vec<BitSet>,
    limit: &mut u64,
) -> bool {
    if *limit == 0 {
        return false;
    }
    *limit -= 1;
    if p.is_empty() {
        if x.is_empty() {
            out.push(r);
        }
        return true;
    }
    let mut pivot = 0;
    let mut best = usize::MAX;
    for u in p.iter().chain(x.iter()) {
        let k = p.and_count(&adj[u]);
        if best == usize::MAX || k > best {
            best = k;
            pivot = u;
        }
    }
    let cand = p.and_not(&adj[pivot]);
    for v in cand.iter() {
        let mut r2 = r.clone();
        r2.insert(v);
        if !bk(adj, r2, p.and(&adj[v]), x.and(&adj[v]), out, limit) {
            return false;
        }
        p.remove(v);
        x.insert(v);
    }
    true
}

/// A maximum clique (the largest found when the node limit stops the search; any clique
/// is a valid lower bound where it is used), and whether it is proven maximum.
pub(crate) fn maximum_clique(adj: &[BitSet], limit: u64) -> (BitSet, bool) {
    let n = adj.len();
    let mut best = BitSet::new(n);
    // greedy start: repeatedly take the candidate with most candidate neighbours
    let mut cand = BitSet::full(n);
    while let Some(v) = cand
        .iter()
        .max_by_key(|&v| (cand.and_count(&adj[v]), std::cmp::Reverse(v)))
    {
        best.insert(v);
        cand = cand.and(&adj[v]);
    }
    let mut nodes = limit;
    let done = mc(adj, &BitSet::new(n), BitSet::full(n), &mut best, &mut nodes);
    (best, done)
}

fn mc(adj: &[BitSet], r: &BitSet, p: BitSet, best: &mut BitSet, nodes: &mut u64) -> bool {
    if *nodes == 0 {
        return false;
    }
    *nodes -= 1;
    // greedy colouring of p: order vertices by colour class
    let mut order: Vec<(usize, usize)> = Vec::new(); // (vertex, colour)
    let mut left = p.clone();
    let mut colour = 0;
    while !left.is_empty() {
        colour += 1;
        let mut q = left.clone();
        while let Some(v) = q.first() {
            q.remove(v);
            q = q.and_not(&adj[v]);
            left.remove(v);
            order.push((v, colour));
        }
    }
    let mut p = p;
    let rl = r.len();
    for &(v, col) in order.iter().rev() {
        if rl + col <= best.len() {
            return true;
        }
        let mut r2 = r.clone();
        r2.insert(v);
        let p2 = p.and(&adj[v]);
        if p2.is_empty() {
            if r2.len() > best.len() {
                *best = r2;
            }
        } else if !mc(adj, &r2, p2, best, nodes) {
            return false;
        }
        p.remove(v);
    }
    true
}
