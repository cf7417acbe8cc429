//! Exact minimisation: candidate products (dhf-primes of every output group), covering
//! rows (point signatures, required cubes, adjacent on-on pairs), then exact unate
//! covering with cost (products, then literals).

use crate::algebra::{intersect_within, meets, split};
use crate::budget::Clock;
use crate::covering::{self, Limits, Problem};
use crate::cube::Cube;
use crate::hazard::{dhf_split_within, OutputSpec};
use crate::primes::primes_within;
use crate::rows::point_rows_within;
use crate::{fallback, Config, CoverError, OutputCover, Solution, Stats};

/// Column cost: one product weighs more than any sum of literals.
pub(crate) fn column_cost(c: &Cube) -> u64 {
    (1u64 << 32) + c.literal_count() as u64
}

/// The most output groups enumerated for shared candidates; beyond it the search is
/// not exact (reported as not optimal).
const MAX_GROUPS: usize = 512;

/// The exact minimum of every output within the budget; when the budget runs out
/// before the covering search starts, a valid cover without search (see
/// [`fallback`]).
pub(crate) fn solve(
    specs: &[OutputSpec],
    cfg: &Config,
    clock: &Clock,
    grace: &Clock,
) -> Result<Solution, CoverError> {
    let mut stats = Stats::default();
    // The point-table heuristic first (milliseconds up to 16 variables, a few hundred
    // at 20): the first upper bound of the search, and the answer if the budget runs
    // out before the search starts.
    let starts: Vec<Option<Vec<Cube>>> = specs
        .iter()
        .map(|s| {
            s.table
                .as_ref()
                .and_then(|t| crate::dense::cover(s, t, clock))
        })
        .collect();
    match solve_inner(specs, cfg, clock, &mut stats, &starts)? {
        Some(sol) => Ok(sol),
        None => fallback::solution(specs, grace, stats, &starts),
    }
}

fn solve_inner(
    specs: &[OutputSpec],
    cfg: &Config,
    clock: &Clock,
    stats: &mut Stats,
    starts: &[Option<Vec<Cube>>],
) -> Result<Option<Solution>, CoverError> {
    let limits = Limits {
        deadline: clock.deadline().unwrap_or_else(|| {
            std::time::Instant::now() + std::time::Duration::from_secs(u32::MAX as u64)
        }),
        node_limit: cfg.nodes(),
        literal_time: cfg.literal_budget_time(),
        literal_work: cfg.literal_work,
        literal_work_per_entry: match (cfg.literal_work, cfg.literal_budget) {
            (None, None) => Some(crate::LITERAL_WORK_PER_ENTRY),
            _ => None,
        },
    };
    if !cfg.sharing() || specs.len() == 1 || specs.len() > 64 {
        let mut outs = Vec::with_capacity(specs.len());
        let mut all_opt = true;
        let mut all_counts = true;
        let mut lb = 0;
        for (j, s) in specs.iter().enumerate() {
            let Some((cands, nprimes)) = group_candidates(specs, &[j], clock) else {
                return Ok(None);
            };
            stats.primes += nprimes;
            let valid = vec![1u64; cands.len()];
            let groups = vec![j];
            let Some((oc, opt, bound)) = cover_problem(
                std::slice::from_ref(s),
                &cands,
                &valid,
                &groups,
                limits,
                clock,
                stats,
                starts[j].as_deref(),
            )?
            else {
                return Ok(None);
            };
            let oc = oc.into_iter().next().expect("one output");
            all_opt &= opt;
            all_counts &= oc.optimal;
            lb = lb.max(bound);
            outs.push(oc);
        }
        let mut sol = Solution::assemble(outs, all_counts, lb, std::mem::take(stats));
        sol.literals_optimal = all_counts && all_opt;
        return Ok(Some(sol));
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
        if clock.now() {
            return Ok(None);
        }
        groups += 1;
        if groups > MAX_GROUPS {
            complete = false;
            break;
        }
        let members: Vec<usize> = (0..m).filter(|&j| mask >> j & 1 == 1).collect();
        let Some(p) = primes_within(&g, clock) else {
            return Ok(None);
        };
        stats.primes += p.len();
        let privs: Vec<_> = members
            .iter()
            .flat_map(|&j| specs[j].privileged.iter().copied())
            .collect();
        let Some(p) = dhf_split_within(p, &privs, clock) else {
            return Ok(None);
        };
        // Keep only cubes legal for every member (the split handles privileged cubes).
        cands.extend(p);
        for k in (last + 1..m).rev() {
            let Some(h) = intersect_within(&g, &ondc[k], clock) else {
                return Ok(None);
            };
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
        if clock.tick() {
            return Ok(None);
        }
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
    let Some((mut outs, mut opt, mut lb)) =
        cover_problem(specs, &cands, &valid, &idx, limits, clock, stats, None)?
    else {
        return Ok(None);
    };
    if !complete {
        opt = false;
        lb = outs.iter().map(|o| o.lower_bound).max().unwrap_or(0);
        for o in &mut outs {
            o.optimal = o.cubes.len() == o.lower_bound;
        }
    }
    let mut sol = Solution::assemble(outs, false, lb, std::mem::take(stats));
    sol.optimal = sol.cube_count <= sol.lower_bound;
    sol.literals_optimal = sol.optimal && opt;
    Ok(Some(sol))
}

/// The dhf-primes of output `j` alone and the number of primes; `None` when the
/// budget ran out.
fn group_candidates(
    specs: &[OutputSpec],
    members: &[usize],
    clock: &Clock,
) -> Option<(Vec<Cube>, usize)> {
    let j = members[0];
    let s = &specs[j];
    // From the point table (up to 14 variables) when the sets are given as many cubes,
    // else by recursive splitting of the covers: the table's time, `n 3^n`, does not
    // depend on how the sets are given, the recursion's grows with the cubes (measured:
    // a cube-given 12-variable function of 24 on-cubes, 3.07 ms through the table
    // against 0.49 ms by the recursion; dense 12-variable minterm lists 14–20 ms by the
    // recursion against 4–5 ms through the table).
    let many = s.on.len() + s.dc.len() >= 1 << s.nvars.saturating_sub(4);
    let p = match s.table.as_ref().filter(|_| many).and_then(|t| t.primes()) {
        Some(p) => p,
        None => {
            let ondc: Vec<Cube> = s.on.iter().chain(&s.dc).copied().collect();
            primes_within(&ondc, clock)?
        }
    };
    let n = p.len();
    Some((dhf_split_within(p, &s.privileged, clock)?, n))
}

/// Builds and solves the covering problem of `specs` over candidate columns `cands`
/// (`valid[c]` bit `k` = legal for `specs[k]`). Returns the covers, whether optimal,
/// and the lower bound on distinct products; `None` when the budget ran out before the
/// covering search.
type Covered = (Vec<OutputCover>, bool, usize);
#[allow(clippy::too_many_arguments)]
fn cover_problem(
    specs: &[OutputSpec],
    cands: &[Cube],
    valid: &[u64],
    _ids: &[usize],
    limits: Limits,
    clock: &Clock,
    stats: &mut Stats,
    start: Option<&[Cube]>,
) -> Result<Option<Covered>, CoverError> {
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
        let Some(pr) = point_rows_within(Cube::full(), &s.on, cands, &cols_k, clock) else {
            return Ok(None);
        };
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
                let Some(edges) = intersect_within(&lo, &hi, clock) else {
                    return Ok(None);
                };
                if edges.is_empty() {
                    continue;
                }
                let cols_v: Vec<usize> = cols_k
                    .iter()
                    .copied()
                    .filter(|&c| cands[c].literal(v).is_none())
                    .collect();
                let Some(pr) = point_rows_within(Cube::full(), &edges, cands, &cols_v, clock)
                else {
                    return Ok(None);
                };
                for r in pr {
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
    let start = match start {
        Some(cover) if specs.len() == 1 && !clock.now() => heuristic_start(cover, cands, clock),
        _ => None,
    };
    let out = match covering::solve_from(&problem, limits, start.as_deref()) {
        Ok(o) => o,
        Err(_) => return Err(no_cover_for_point(&specs[0])),
    };
    stats.nodes += out.nodes;
    stats.count_search += out.count_time;
    stats.stopped |= !out.optimal;
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
        // This output's rows of each chosen column, and how many chosen columns
        // hold each row.
        let mut pos = vec![usize::MAX; cands.len()];
        for (i, &c) in chosen.iter().enumerate() {
            if valid[c] >> k & 1 == 1 {
                pos[c] = i;
            }
        }
        let mut rows_of: Vec<Vec<u32>> = vec![Vec::new(); chosen.len()];
        let mut held = vec![0u32; my_rows.len()];
        for (ri, r) in my_rows.iter().enumerate() {
            for &c in r.iter() {
                if pos[c] != usize::MAX {
                    rows_of[pos[c]].push(ri as u32);
                    held[ri] += 1;
                }
            }
        }
        let mut mine: Vec<usize> = chosen
            .iter()
            .copied()
            .filter(|&c| pos[c] != usize::MAX && !rows_of[pos[c]].is_empty())
            .collect();
        // Irredundant for this output: drop a product whose rows others also cover.
        mine.sort_by_key(|&c| std::cmp::Reverse(cands[c].literal_count()));
        mine.retain(|&c| {
            let rs = &rows_of[pos[c]];
            if rs.iter().all(|&ri| held[ri as usize] >= 2) {
                for &ri in rs {
                    held[ri as usize] -= 1;
                }
                false
            } else {
                true
            }
        });
        let mut cubes: Vec<Cube> = mine.iter().map(|&c| cands[c]).collect();
        cubes.sort();
        let own_lb = independent_rows(&my_rows);
        let (optimal, lower_bound) = if specs.len() == 1 {
            let lb = (out.lower_bound >> 32) as usize;
            (cubes.len() <= lb, lb)
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
    Ok(Some((outs, out.optimal, (out.lower_bound >> 32) as usize)))
}

/// A heuristic cover as columns (each product mapped to a candidate holding it), the
/// first upper bound of the search; `None` when some product maps to no candidate
/// quickly.
fn heuristic_start(cover: &[Cube], cands: &[Cube], clock: &Clock) -> Option<Vec<usize>> {
    let index: std::collections::HashMap<Cube, usize> =
        cands.iter().enumerate().map(|(i, &c)| (c, i)).collect();
    let mut misses = 0usize;
    let mut cols = Vec::with_capacity(cover.len());
    for d in cover {
        if let Some(&i) = index.get(d) {
            cols.push(i);
            continue;
        }
        misses += 1;
        if misses > 64 || clock.now() {
            return None;
        }
        cols.push(cands.iter().position(|c| c.contains(d))?);
    }
    Some(cols)
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
