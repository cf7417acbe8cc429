//! Covering rows without minterm tables: the distinct sets of columns that contain a
//! point of a target cover, found by splitting the space until every column meeting a
//! region contains all of it (then every target point of that region is contained in
//! exactly those columns). Exact; the number of regions visited is bounded by the
//! arrangement of the column cubes, not by `2^n`.

use crate::algebra::most_frequent;
use crate::budget::Clock;
use crate::cube::Cube;

/// For each point `x` of `targets` inside `region`, the set of `columns` (indices into
/// `cols`, restricted to `candidates`) containing `x`; distinct sets only, each sorted.
pub fn point_rows(
    region: Cube,
    targets: &[Cube],
    cols: &[Cube],
    candidates: &[usize],
) -> Vec<Vec<usize>> {
    point_rows_within(region, targets, cols, candidates, &Clock::unbounded()).unwrap_or_default()
}

/// [`point_rows`] under a deadline: `None` when it passed first.
pub(crate) fn point_rows_within(
    region: Cube,
    targets: &[Cube],
    cols: &[Cube],
    candidates: &[usize],
    clock: &Clock,
) -> Option<Vec<Vec<usize>>> {
    let mut out = Vec::new();
    let t: Vec<Cube> = targets
        .iter()
        .filter_map(|c| c.intersection(&region))
        .collect();
    let c: Vec<usize> = candidates
        .iter()
        .copied()
        .filter(|&i| cols[i].intersects(&region))
        .collect();
    rec(region, t, cols, c, &mut out, clock);
    if clock.expired() {
        return None;
    }
    out.sort();
    out.dedup();
    Some(out)
}

fn rec(
    region: Cube,
    targets: Vec<Cube>,
    cols: &[Cube],
    cand: Vec<usize>,
    out: &mut Vec<Vec<usize>>,
    clock: &Clock,
) {
    if targets.is_empty() || clock.tick() {
        return;
    }
    // Variables free in the region on which some meeting column has a literal.
    let mut split_bits = 0u64;
    let mut partial: Vec<Cube> = Vec::new();
    for &i in &cand {
        let c = cols[i];
        if !c.contains(&region) {
            split_bits |= c.care_bits() & !region.care_bits();
            partial.push(c);
        }
    }
    if split_bits == 0 {
        out.push(cand);
        return;
    }
    // If some target cube contains the whole region, no need to look at targets when
    // splitting; otherwise split on target literals too (they may empty a half).
    let v = most_frequent(&partial, split_bits);
    for b in [false, true] {
        let r = region.with_literal(v, Some(b));
        let t: Vec<Cube> = targets.iter().filter_map(|c| c.intersection(&r)).collect();
        if t.is_empty() {
            continue;
        }
        let c: Vec<usize> = cand
            .iter()
            .copied()
            .filter(|&i| cols[i].intersects(&r))
            .collect();
        rec(r, t, cols, c, out, clock);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_match_minterm_table() {
        // Columns: the primes of ab + a'c; targets: its on-set.
        let cols: Vec<Cube> = ["11-", "0-1", "-11"]
            .iter()
            .map(|s| Cube::parse(s).unwrap())
            .collect();
        let on: Vec<Cube> = [1u64, 3, 6, 7]
            .iter()
            .map(|&m| Cube::minterm(3, m))
            .collect();
        let rows = point_rows(Cube::full(), &on, &cols, &[0, 1, 2]);
        // 001 -> {0-1}; 011 -> {0-1, -11}; 110 -> {11-}; 111 -> {11-, -11}
        assert_eq!(rows, vec![vec![0], vec![0, 2], vec![1], vec![1, 2]]);
    }
}
