//! Exact minimisation: candidate products (dhf-primes of every output group), covering
//! rows (point signatures, required cubes, adjacent on-on pairs), then exact unate
//! covering with cost (products, then literals).

use crate::algebra::{intersect, meets, split};
use crate::covering::{self, Limits, Problem};
use crate::cube::Cube;
use crate::hazard::{dhf_split, OutputSpec};
use crate::primes::primes;
use crate::rows::point_rows;
use crate::{Config, CoverError, OutputCover, Solution, Stats};
use std::time::Instant;

/// Column cost: one product weighs more than any sum of literals.
pub(crate) fn column_cost(c: &Cube) -> u64 {
    (1u64 << 32) + c.literal_count() as u64
}

/// The most output groups enumerated for shared candidates; beyond it the search is
/// not exact (reported as not optimal).
const MAX_GROUPS: usize = 512;

pub(crate) fn solve(
    specs: &[OutputSpec],
    cfg: &Config,
    deadline: Instant,
) -> Result<Solution, CoverError> {
    let mut stats = Stats::default();
    let limits = Limits {
        deadline,
        node_limit: cfg.nodes(),
    };
    if !cfg.sharing() || specs.len() == 1 || specs.len() > 64 {
        let mut outs = Vec::with_capacity(specs.len());
        let mut all_opt = true;
        let mut lb = 0;
        for (j, s) in specs.iter().enumerate() {
            let (cands, nprimes) = group_candidates(specs, 1u64 << j.min(63), &[j]);
            stats.primes += nprimes;
            let valid = vec![1u64; cands.len()];
            let groups = vec![j];
            let (oc, opt, bound) = cover_problem(
                std::slice::from_ref(s),
                &cands,
                &valid,
                &groups,
                limits,
                &mut stats,
            )?;
            let oc = oc.into_iter().next().expect("one output");
            all_opt &= opt;
            lb = lb.max(bound);
            outs.push(oc);
        }
        return Ok(Solution::assemble(outs, all_opt, lb, stats));
    }
    // Shared candidates: for each group of outputs whose on-sets can share a product,
    // the dhf-primes of the intersection of their on+dc sets.
    let m = specs.len();
    let ondc: Vec<Vec<Cube>> = specs
        .iter()
        .map(|s| s.on.iter().chain(&s.dc).copied().collect())
        .collect();
    let mut cands: Vec<Cube> = Vec::new();
    let mut complete = true;
    let mut groups = 0usize;
    // Depth-first over groups in increasing index order.
    let mut stack: Vec<(u64, usize, Vec<Cube>)> = Vec::new();
    for (j, g) in ondc.iter().enumerate() {
        stack.push((1u64 << j, j, g.clone()));
    }
    stack.reverse();
    while let Some((mask, last, g)) = stack.pop() {
        groups += 1;
        if groups > MAX_GROUPS {
            complete = false;
            break;
        }
        let members: Vec<usize> = (0..m).filter(|&j| mask >> j & 1 == 1).collect();
        let mut p = primes(&g);
        stats.primes += p.len();
        let privs: Vec<_> = members
            .iter()
            .flat_map(|&j| specs[j].privileged.iter().copied())
            .collect();
        p = dhf_split(p, &privs);
        // Keep only cubes legal for every member (the split handles privileged cubes).
        cands.extend(p);
        for k in (last + 1..m).rev() {
            let h = intersect(&g, &ondc[k]);
            // Useful only if every member still has an on-set point in it.
            let useful = members
                .iter()
                .chain(std::iter::once(&k))
                .all(|&j| h.iter().any(|c| meets(&specs[j].on, c)));
            if useful {
                stack.push((mask | 1u64 << k, k, h));
            }
        }
    }
    cands.sort();
    cands.dedup();
    let mut valid: Vec<u64> = cands
        .iter()
        .map(|c| {
            (0..m)
                .filter(|&j| specs[j].legal(c))
                .fold(0u64, |acc, j| acc | 1u64 << j)
        })
        .collect();
    // Drop candidates dominated by a larger candidate valid for at least the same outputs.
    let mut keep = vec![true; cands.len()];
    for i in 0..cands.len() {
        if valid[i] == 0 {
            keep[i] = false;
            continue;
        }
        for k in 0..cands.len() {
            if i != k
                && keep[k]
                && cands[k] != cands[i]
                && cands[k].contains(&cands[i])
                && valid[k] & valid[i] == valid[i]
            {
                keep[i] = false;
                break;
            }
        }
    }
    let mut c2 = Vec::new();
    let mut v2 = Vec::new();
    for i in 0..cands.len() {
        if keep[i] {
            c2.push(cands[i]);
            v2.push(valid[i]);
        }
    }
    let cands = c2;
    valid = v2;
    let idx: Vec<usize> = (0..m).collect();
    let (mut outs, mut opt, mut lb) =
        cover_problem(specs, &cands, &valid, &idx, limits, &mut stats)?;
    if !complete {
        opt = false;
        lb = outs.iter().map(|o| o.lower_bound).max().unwrap_or(0);
        for o in &mut outs {
            o.optimal = o.cubes.len() == o.lower_bound;
        }
    }
    Ok(Solution::assemble(outs, opt, lb, stats))
}

/// The dhf-primes of output `j` alone; returns them and the number of primes.
fn group_candidates(specs: &[OutputSpec], _mask: u64, members: &[usize]) -> (Vec<Cube>, usize) {
    let j = members[0];
    let s = &specs[j];
    let ondc: Vec<Cube> = s.on.iter().chain(&s.dc).copied().collect();
    let p = primes(&ondc);
    let n = p.len();
    (dhf_split(p, &s.privileged), n)
}

/// Builds and solves the covering problem of `specs` over candidate columns `cands`
/// (`valid[c]` bit `k` = legal for `specs[k]`). Returns the covers, whether optimal,
/// and the lower bound on distinct products.
fn cover_problem(
    specs: &[OutputSpec],
    cands: &[Cube],
    valid: &[u64],
    _ids: &[usize],
    limits: Limits,
    stats: &mut Stats,
) -> Result<(Vec<OutputCover>, bool, usize), CoverError> {
    let mut rows: Vec<Vec<usize>> = Vec::new();
    let mut row_owner: Vec<usize> = Vec::new();
    for (k, s) in specs.iter().enumerate() {
        let cols_k: Vec<usize> = (0..cands.len())
            .filter(|&c| valid[c] >> k & 1 == 1)
            .collect();
        for r in &s.required {
            let cols: Vec<usize> = cols_k
                .iter()
                .copied()
                .filter(|&c| cands[c].contains(&r.cube))
                .collect();
            if cols.is_empty() {
                return Err(CoverError::NoHazardFreeCover {
                    output: s.name.clone(),
                    transition: r.transition,
                    reason: format!(
                        "{}: no dhf-implicant holds its required cube {}",
                        r.transition.describe(s.nvars),
                        r.cube.to_string(s.nvars)
                    ),
                });
            }
            rows.push(cols);
            row_owner.push(k);
        }
        let pr = point_rows(Cube::full(), &s.on, cands, &cols_k);
        for r in pr {
            if r.is_empty() {
                return Err(no_cover_for_point(s));
            }
            rows.push(r);
            row_owner.push(k);
        }
        if s.adjacent_pairs {
            for v in 0..s.nvars {
                let (lo, hi) = split(&s.on, v);
                let edges = intersect(&lo, &hi);
                if edges.is_empty() {
                    continue;
                }
                let cols_v: Vec<usize> = cols_k
                    .iter()
                    .copied()
                    .filter(|&c| cands[c].literal(v).is_none())
                    .collect();
                for r in point_rows(Cube::full(), &edges, cands, &cols_v) {
                    if r.is_empty() {
                        return Err(no_cover_for_point(s));
                    }
                    rows.push(r);
                    row_owner.push(k);
                }
            }
        }
    }
    let cost: Vec<u64> = cands.iter().map(column_cost).collect();
    stats.columns += cands.len();
    stats.rows += rows.len();
    let problem = Problem {
        ncols: cands.len(),
        cost,
        rows,
    };
    let out = match covering::solve(&problem, limits) {
        Ok(o) => o,
        Err(_) => return Err(no_cover_for_point(&specs[0])),
    };
    stats.nodes += out.nodes;
    stats.core.0 += out.core.0;
    stats.core.1 += out.core.1;
    let chosen = out.cols.clone();
    let mut outs = Vec::with_capacity(specs.len());
    for (k, s) in specs.iter().enumerate() {
        let my_rows: Vec<&Vec<usize>> = problem
            .rows
            .iter()
            .zip(&row_owner)
            .filter(|(_, &o)| o == k)
            .map(|(r, _)| r)
            .collect();
        let mut mine: Vec<usize> = chosen
            .iter()
            .copied()
            .filter(|&c| valid[c] >> k & 1 == 1 && my_rows.iter().any(|r| r.contains(&c)))
            .collect();
        // Irredundant for this output: drop a product whose rows others also cover.
        mine.sort_by_key(|&c| std::cmp::Reverse(cands[c].literal_count()));
        let mut i = 0;
        while i < mine.len() {
            let c = mine[i];
            let needed = my_rows
                .iter()
                .any(|r| r.contains(&c) && !mine.iter().any(|&o| o != c && r.contains(&o)));
            if needed {
                i += 1;
            } else {
                mine.remove(i);
            }
        }
        let mut cubes: Vec<Cube> = mine.iter().map(|&c| cands[c]).collect();
        cubes.sort();
        let own_lb = independent_rows(&my_rows);
        let (optimal, lower_bound) = if specs.len() == 1 {
            (out.optimal, (out.lower_bound >> 32) as usize)
        } else {
            (cubes.len() <= own_lb, own_lb)
        };
        outs.push(OutputCover {
            name: s.name.clone(),
            cubes,
            optimal,
            lower_bound,
        });
    }
    Ok((outs, out.optimal, (out.lower_bound >> 32) as usize))
}

fn no_cover_for_point(s: &OutputSpec) -> CoverError {
    CoverError::Invalid {
        reason: format!(
            "output {}: an on-set point lies in no legal product",
            s.name
        ),
    }
}

/// The size of a greedy set of rows pairwise sharing no column: a lower bound on the
/// number of columns any cover needs.
pub(crate) fn independent_rows(rows: &[&Vec<usize>]) -> usize {
    let mut order: Vec<&Vec<usize>> = rows.to_vec();
    order.sort_by_key(|r| r.len());
    let mut used: std::collections::BTreeSet<usize> = std::collections::BTreeSet::new();
    let mut n = 0;
    for r in order {
        if r.iter().all(|c| !used.contains(c)) {
            n += 1;
            used.extend(r.iter().copied());
        }
    }
    n
}
