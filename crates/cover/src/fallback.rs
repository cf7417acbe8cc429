//! Valid covers without search, for when the budget runs out before a search could give
//! one, with a cheap proven lower bound.
//!
//! - Up to 20 variables (a point table): the point-table heuristic's cover
//!   (`dense.rs`, computed before the exact search under the main budget), with its
//!   bound.
//! - Plain mode: the on-set cubes as given (containment-free).
//! - Static mode: the on-set cubes plus, for every variable `v`, the cubes of adjacent
//!   on-on pairs along `v` (`on|v=0 ∩ on|v=1` with `v` free): each lies in the on-set and
//!   holds its pairs, so every adjacent pair lies in one product.
//! - Full mode: the closure of every required cube (a dhf-implicant: the existence test
//!   proved it holds no off-set point) and the on-set outside every privileged cube (its
//!   points inside one are held by required cubes).
//!
//! These steps get a short grace period past the deadline (a twentieth of the budget);
//! a static or full cover that cannot be built within it is a
//! [`CoverError::BudgetExhausted`]. The bound is a greedy set of on-set points no two
//! of which lie in one implicant, cut off when the grace period ends (every prefix of
//! such a set is one).

use crate::algebra::{covers_cube, intersect_within, scc_within, sharp_within, split};
use crate::budget::Clock;
use crate::cube::{mask, Cube};
use crate::function::MultiFunction;
use crate::hazard::OutputSpec;
use crate::{CoverError, HazardMode, OutputCover, Solution, Stats};

/// Adds to `cover` the adjacent-pair cubes of `on` along every variable; `false` when
/// the clock ran out first.
fn add_pair_cubes(cover: &mut Vec<Cube>, on: &[Cube], nvars: usize, clock: &Clock) -> bool {
    for v in 0..nvars {
        let (lo, hi) = split(on, v);
        let Some(edges) = intersect_within(&lo, &hi, clock) else {
            return false;
        };
        cover.extend(edges);
    }
    scc_within(cover, clock);
    true
}

/// A valid cover of one prepared output, or `None` when the clock ran out.
pub(crate) fn start_cover(s: &OutputSpec, clock: &Clock) -> Option<Vec<Cube>> {
    let mut f: Vec<Cube> = s.required.iter().map(|r| s.closure(&r.cube)).collect();
    if s.privileged.is_empty() {
        f.extend_from_slice(&s.on);
    } else {
        let privs: Vec<Cube> = s.privileged.iter().map(|p| p.cube).collect();
        f.extend(sharp_within(&s.on, &privs, clock)?);
    }
    scc_within(&mut f, clock);
    if s.adjacent_pairs && !add_pair_cubes(&mut f, &s.on, s.nvars, clock) {
        return None;
    }
    Some(f)
}

/// A greedy set of on-set points (one from each of `cover`'s cubes) pairwise not
/// inside one implicant of `on ∪ dc`: a lower bound on the products of any cover.
pub(crate) fn point_bound(
    cover: &[Cube],
    on: &[Cube],
    dc: &[Cube],
    n: usize,
    clock: &Clock,
) -> usize {
    let ondc: Vec<Cube> = on.iter().chain(dc).copied().collect();
    let mut chosen: Vec<Cube> = Vec::new();
    for c in cover {
        if clock.now() {
            break;
        }
        // A point of `c` in the on-set (every product of a valid cover meets it).
        let Some(p) = on
            .iter()
            .find_map(|o| o.intersection(c))
            .map(|x| Cube::from_words(mask(n), x.value_bits()))
        else {
            continue;
        };
        if chosen.iter().all(|q| !covers_cube(&ondc, &q.supercube(&p))) {
            chosen.push(p);
        }
    }
    usize::from(!on.is_empty()).max(chosen.len())
}

/// The fallback solution of prepared outputs (each output its own products).
pub(crate) fn solution(
    specs: &[OutputSpec],
    clock: &Clock,
    stats: Stats,
    starts: &[Option<Vec<Cube>>],
) -> Result<Solution, CoverError> {
    let mut outs = Vec::with_capacity(specs.len());
    let mut lb = 0;
    for (k, s) in specs.iter().enumerate() {
        // With a point table, the heuristic cover computed before the search (or now,
        // expanded as far as the grace period allows) replaces the on-set cubes.
        let dense = s.table.as_ref().and_then(|t| {
            starts
                .get(k)
                .cloned()
                .flatten()
                .or_else(|| crate::dense::cover(s, t, clock))
                .map(|c| (c, t))
        });
        let (mut cubes, table) = match dense {
            Some((c, t)) => (c, Some(t)),
            None => match start_cover(s, clock) {
                Some(c) => (c, None),
                None => return Err(exhausted(&s.name)),
            },
        };
        cubes.sort();
        let bound = match table {
            Some(t) => crate::dense::lower_bound(s, t, &cubes, clock),
            None => point_bound(&cubes, &s.on, &s.dc, s.nvars, clock),
        };
        lb = lb.max(bound);
        outs.push(OutputCover {
            name: s.name.clone(),
            optimal: cubes.len() <= bound,
            lower_bound: bound,
            cubes,
        });
    }
    Ok(finish(outs, lb, stats))
}

/// The fallback solution straight from the functions, when the budget ran out while the
/// hazard constraints were being prepared (plain and static modes only).
pub(crate) fn unprepared(
    f: &MultiFunction,
    mode: HazardMode,
    clock: &Clock,
    stats: Stats,
) -> Result<Solution, CoverError> {
    let n = f.vars.len();
    let mut outs = Vec::with_capacity(f.outputs.len());
    let mut lb = 0;
    for (name, func) in &f.outputs {
        let mut cubes = func.on_cubes().to_vec();
        match mode {
            HazardMode::None => {}
            HazardMode::Static => {
                if !add_pair_cubes(&mut cubes, func.on_cubes(), n, clock) {
                    return Err(exhausted(name));
                }
            }
            HazardMode::Full => return Err(exhausted(name)),
        }
        cubes.sort();
        let bound = point_bound(&cubes, func.on_cubes(), func.dc_cubes(), n, clock);
        lb = lb.max(bound);
        outs.push(OutputCover {
            name: name.clone(),
            optimal: cubes.len() <= bound,
            lower_bound: bound,
            cubes,
        });
    }
    Ok(finish(outs, lb, stats))
}

fn finish(outs: Vec<OutputCover>, lb: usize, stats: Stats) -> Solution {
    let single = outs.len() == 1;
    let mut sol = Solution::assemble(outs, false, lb, stats);
    sol.optimal = single && sol.cube_count <= sol.lower_bound;
    sol.stats.stopped = true;
    sol
}

/// The error when not even a fallback cover of output `name` could be built in time.
pub(crate) fn exhausted(name: &str) -> CoverError {
    CoverError::BudgetExhausted {
        output: name.to_string(),
        reason: "the budget ran out before a valid cover could be built; give a larger --budget"
            .into(),
    }
}
