//! Helpers shared by the integration tests, including the Petrick test oracle.

use stillpoint_cover::{primes::primes, Cube, Function, MultiFunction};

pub(crate) fn vars(n: usize) -> Vec<String> {
    (0..n)
        .map(|i| ((b'a' + i as u8) as char).to_string())
        .collect()
}

pub(crate) fn single(
    n: usize,
    on: &[u64],
    dc: &[u64],
    t: Vec<stillpoint_cover::Transition>,
) -> MultiFunction {
    let f = Function::from_minterms(n, on, dc, t).expect("valid function");
    MultiFunction::single(vars(n), "f", f)
}

pub(crate) fn strs(cubes: &[Cube], n: usize) -> Vec<String> {
    let mut v: Vec<String> = cubes.iter().map(|c| c.to_string(n)).collect();
    v.sort();
    v
}

/// Petrick's method as an oracle: the minimum number of primes covering the on-set
/// (product of sums multiplied out, absorbing as it goes). Only for tiny functions.
pub(crate) fn petrick_min(n: usize, on: &[u64], dc: &[u64]) -> usize {
    let mut all: Vec<Cube> = on.iter().chain(dc).map(|&m| Cube::minterm(n, m)).collect();
    if all.is_empty() {
        return 0;
    }
    all.sort();
    let p = primes(&all);
    assert!(p.len() <= 128, "oracle limited to 128 primes");
    // Each product term is a set of primes (u128 bit mask).
    let mut terms: Vec<u128> = vec![0];
    for &m in on {
        let pt = Cube::minterm(n, m);
        let sum: Vec<usize> = (0..p.len()).filter(|&i| p[i].contains(&pt)).collect();
        let mut next: Vec<u128> = Vec::new();
        for t in &terms {
            if sum.iter().any(|&i| t >> i & 1 == 1) {
                next.push(*t);
                continue;
            }
            for &i in &sum {
                next.push(t | 1u128 << i);
            }
        }
        next.sort_by_key(|t| t.count_ones());
        next.dedup();
        let mut kept: Vec<u128> = Vec::new();
        for t in next {
            if !kept.iter().any(|k| k & t == *k) {
                kept.push(t);
            }
        }
        terms = kept;
    }
    terms
        .iter()
        .map(|t| t.count_ones() as usize)
        .min()
        .unwrap_or(0)
}
