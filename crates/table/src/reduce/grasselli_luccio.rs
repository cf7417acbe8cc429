//! Class sets and prime compatibles after Grasselli & Luccio ("A method for minimizing
//! the number of internal states in incompletely specified sequential networks", IEEE
//! Trans. Electronic Computers EC-14(3), 1965). Exact.
//!
//! The class set `Γ(C)` of a compatible `C` holds its implied sets `N(C,x)` over all
//! columns, dropping those with fewer than two rows, those inside `C`, and those inside
//! another member. `C` is prime unless some compatible `Q ⊋ C` has `Γ(Q) ⊑ Γ(C)` (every
//! member of `Γ(Q)` inside some member of `Γ(C)`); some minimum closed cover consists of
//! primes only. Following the erratum of our methods brief (§2.2 step 3), each compatible
//! is tested against *every* compatible superset, not only against known primes.
//!
//! Known weakness: all compatibles are enumerated (every subset of every maximal
//! compatible), which is exponential in the size of the largest maximal compatible; the
//! caller bounds it by a count and a node limit.

use super::bitset::BitSet;
use std::collections::HashMap;

/// The class set of `c`.
#[allow(clippy::needless_range_loop)]
pub(crate) fn class_set(next: &[Vec<Option<usize>>], ncols: usize, c: &BitSet) -> Vec<BitSet> {
    let n = next.len();
    let mut out: Vec<BitSet> = Vec::new();
    for col in 0..ncols {
        let mut d = BitSet::new(n);
        for s in c.iter() {
            if let Some(x) = next[s][col] {
                d.insert(x);
            }
        }
        if d.len() >= 2 && !d.is_subset(c) {
            out.push(d);
        }
    }
    out.sort();
    out.dedup();
    let keep: Vec<bool> = (0..out.len())
        .map(|i| !(0..out.len()).any(|j| j != i && out[i] != out[j] && out[i].is_subset(&out[j])))
        .collect();
    out.into_iter()
        .zip(keep)
        .filter(|(_, k)| *k)
        .map(|(d, _)| d)
        .collect()
}

/// Whether every member of `gq` lies inside some member of `gs`.
pub(crate) fn implied_within(gq: &[BitSet], gs: &[BitSet]) -> bool {
    gq.iter().all(|d| gs.iter().any(|e| d.is_subset(e)))
}

/// Every compatible (every non-empty subset of a maximal compatible), largest first;
/// `None` beyond `max` of them.
pub(crate) fn all_compatibles(maximal: &[BitSet], max: usize) -> Option<Vec<BitSet>> {
    let mut seen: HashMap<BitSet, ()> = HashMap::new();
    let mut level: Vec<BitSet> = Vec::new();
    let mut all: Vec<BitSet> = Vec::new();
    let top = maximal.iter().map(|m| m.len()).max().unwrap_or(0);
    for size in (1..=top).rev() {
        let mut next_level: Vec<BitSet> = Vec::new();
        for m in maximal.iter().filter(|m| m.len() == size) {
            if seen.insert(m.clone(), ()).is_none() {
                next_level.push(m.clone());
            }
        }
        for c in &level {
            for s in c.iter() {
                let mut d = c.clone();
                d.remove(s);
                if !d.is_empty() && seen.insert(d.clone(), ()).is_none() {
                    next_level.push(d);
                }
            }
        }
        if seen.len() > max {
            return None;
        }
        next_level.sort();
        all.extend(next_level.iter().cloned());
        level = next_level;
    }
    Some(all)
}

/// The prime compatibles among `compatibles` (which must be all of them), with their class
/// sets; `None` when the node limit runs out.
pub(crate) fn primes(
    adj: &[BitSet],
    next: &[Vec<Option<usize>>],
    ncols: usize,
    compatibles: &[BitSet],
    limit: &mut u64,
) -> Option<Vec<(BitSet, Vec<BitSet>)>> {
    let gamma: HashMap<&BitSet, Vec<BitSet>> = compatibles
        .iter()
        .map(|c| (c, class_set(next, ncols, c)))
        .collect();
    let n = adj.len();
    let mut out = Vec::new();
    for s in compatibles {
        let gs = &gamma[s];
        // common neighbours: the rows that can join `s`
        let mut cand = BitSet::full(n);
        for v in s.iter() {
            cand = cand.and(&adj[v]);
        }
        let mut dominated = false;
        if !cand.is_empty() {
            let mut found = false;
            let ok = supersets(
                adj,
                s,
                cand,
                &mut |q| {
                    let within = match gamma.get(q) {
                        Some(g) => implied_within(g, gs),
                        None => implied_within(&class_set(next, ncols, q), gs),
                    };
                    if within {
                        found = true;
                    }
                    found
                },
                limit,
            );
            if !ok {
                return None;
            }
            dominated = found;
        }
        if !dominated {
            out.push((s.clone(), gs.clone()));
        }
    }
    Some(out)
}

/// Calls `f` on every clique `q ⊋ r` with `q \ r ⊆ cand`, stopping when `f` returns true.
/// Returns false when the node limit ran out.
fn supersets(
    adj: &[BitSet],
    r: &BitSet,
    cand: BitSet,
    f: &mut dyn FnMut(&BitSet) -> bool,
    limit: &mut u64,
) -> bool {
    let mut stop = false;
    rec(adj, r, cand, f, limit, &mut stop)
}

fn rec(
    adj: &[BitSet],
    r: &BitSet,
    mut cand: BitSet,
    f: &mut dyn FnMut(&BitSet) -> bool,
    limit: &mut u64,
    stop: &mut bool,
) -> bool {
    while let Some(v) = cand.first() {
        if *limit == 0 {
            return false;
        }
        *limit -= 1;
        cand.remove(v);
        let mut q = r.clone();
        q.insert(v);
        if f(&q) {
            *stop = true;
            return true;
        }
        let c2 = cand.and(&adj[v]);
        if !c2.is_empty() {
            if !rec(adj, &q, c2, f, limit, stop) {
                return false;
            }
            if *stop {
                return true;
            }
        }
    }
    true
}
