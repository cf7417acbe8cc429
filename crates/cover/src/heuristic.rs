//! The heuristic minimiser ([`crate::Effort::Fast`]): an expand / irredundant / reduce
//! loop of our own on covers, with no prime generation, respecting the hazard
//! constraints (legal products only; required cubes each inside one product; in static
//! mode adjacent on-on pairs inside one product, added after the loop and kept by a
//! constrained irredundant pass). Heuristic: no optimality claim; a lower bound from
//! pairwise incompatible points is reported so the gap is known.

use crate::algebra::{
    complement, covers_cube, intersect_within, scc, sharp_within, split, tautology,
};
use crate::budget::Clock;
use crate::cube::Cube;
use crate::hazard::OutputSpec;
use crate::{Config, CoverError, OutputCover, Solution, Stats};

/// The heuristic covers of every output. The loop stops when `clock` runs out; what
/// validity still needs (static mode's pair terms) and the bound get until `grace`.
pub(crate) fn solve(
    specs: &[OutputSpec],
    cfg: &Config,
    clock: &Clock,
    grace: &Clock,
) -> Result<Solution, CoverError> {
    // Each output's cover is independent of the others': built in parallel, each task
    // with its own clocks of the same deadlines.
    use rayon::prelude::*;
    let (until, grace_until) = (clock.deadline(), grace.deadline());
    let built: Vec<(Option<Vec<Cube>>, bool)> = specs
        .par_iter()
        .map(|s| {
            let c = Clock::until_opt(until);
            let g = Clock::until_opt(grace_until);
            (cover_one(s, &c, &g), c.expired())
        })
        .collect();
    let mut covers: Vec<Vec<Cube>> = Vec::with_capacity(specs.len());
    for (s, (b, stopped)) in specs.iter().zip(built) {
        if stopped {
            clock.mark_expired();
        }
        match b {
            Some(c) => covers.push(c),
            None => return Err(crate::fallback::exhausted(&s.name)),
        }
    }
    if cfg.sharing() && specs.len() > 1 && !clock.now() {
        share(specs, &mut covers, clock);
    }
    let bounds: Vec<usize> = specs
        .par_iter()
        .zip(covers.par_iter_mut())
        .map(|(s, cubes)| {
            crate::cube::sort_cubes(cubes);
            lower_bound(s, cubes, &Clock::until_opt(grace_until))
        })
        .collect();
    let mut outs = Vec::with_capacity(specs.len());
    let mut lb_all = 0;
    for ((s, cubes), lb) in specs.iter().zip(covers).zip(bounds) {
        lb_all = lb_all.max(lb);
        outs.push(OutputCover {
            name: s.name.clone(),
            optimal: cubes.len() <= lb,
            lower_bound: lb,
            cubes,
        });
    }
    let stats = Stats {
        heuristic: true,
        stopped: clock.expired(),
        ..Stats::default()
    };
    let mut sol = Solution::assemble(outs, false, lb_all, stats);
    sol.optimal = sol.cube_count <= sol.lower_bound;
    Ok(sol)
}

/// Heuristic cover of one output; `None` when even the grace period ran out before a
/// valid cover was built.
pub(crate) fn cover_one(s: &OutputSpec, clock: &Clock, grace: &Clock) -> Option<Vec<Cube>> {
    if let Some(t) = &s.table {
        if let Some(c) = crate::dense::cover(s, t, clock) {
            // A function given as few cubes: the cube-list engine is cheap too and
            // sometimes better (large cubes); keep the cheaper cover.
            if s.on.len() <= FEW_CUBES && !clock.now() {
                if let Some(o) = cover_cubes(s, clock, grace) {
                    if cost(&o) < cost(&c) {
                        return Some(o);
                    }
                }
            }
            return Some(c);
        }
    }
    cover_cubes(s, clock, grace)
}

/// Up to this many on-set cubes the point-table heuristic's cover is compared with the
/// cube-list engine's.
const FEW_CUBES: usize = 256;

/// The cube-list engine: heuristic cover of one output without a point table.
fn cover_cubes(s: &OutputSpec, clock: &Clock, grace: &Clock) -> Option<Vec<Cube>> {
    // Start: required cubes (closed under the privileged rule) and the on-set outside
    // every privileged cube (its points inside one are held by required cubes).
    let mut f: Vec<Cube> = s.required.iter().map(|r| s.closure(&r.cube)).collect();
    let privs: Vec<Cube> = s.privileged.iter().map(|p| p.cube).collect();
    if privs.is_empty() {
        f.extend_from_slice(&s.on);
    } else {
        f.extend(sharp_within(&s.on, &privs, grace)?);
    }
    scc(&mut f);
    let mut f = expand_all(s, f, clock);
    irredundant(s, &mut f, None, clock);
    let mut best = f.clone();
    let mut stale = 0;
    while stale < 2 && !clock.now() {
        reduce(s, &mut f, clock);
        f = expand_all(s, f, clock);
        irredundant(s, &mut f, None, clock);
        if cost(&f) < cost(&best) {
            best = f.clone();
            stale = 0;
        } else {
            stale += 1;
        }
    }
    let mut f = best;
    if s.adjacent_pairs {
        let edges = edges_within(s, grace)?;
        add_pair_terms(s, &mut f, &edges, clock, grace)?;
        irredundant(s, &mut f, Some(&edges), clock);
    }
    Some(f)
}

/// For each variable `v`, the adjacent on-on pairs along `v` as cubes with `v` free.
pub(crate) fn edges(s: &OutputSpec) -> Vec<Vec<Cube>> {
    edges_within(s, &Clock::unbounded()).unwrap_or_default()
}

fn edges_within(s: &OutputSpec, clock: &Clock) -> Option<Vec<Vec<Cube>>> {
    (0..s.nvars)
        .map(|v| {
            let (lo, hi) = split(&s.on, v);
            intersect_within(&lo, &hi, clock)
        })
        .collect()
}

fn cost(f: &[Cube]) -> (usize, usize) {
    (f.len(), f.iter().map(|c| c.literal_count()).sum())
}

/// Expands every cube to a maximal legal cube, largest first, dropping cubes it covers.
fn expand_all(s: &OutputSpec, mut f: Vec<Cube>, clock: &Clock) -> Vec<Cube> {
    f.sort_by_key(|c| (c.literal_count(), *c));
    let mut done: Vec<Cube> = Vec::with_capacity(f.len());
    for i in 0..f.len() {
        let c = f[i];
        if done.iter().any(|d| d.contains(&c)) {
            continue;
        }
        if clock.tick() {
            // Out of time: the rest stays as it is.
            done.push(c);
            continue;
        }
        let e = expand(s, c, &f[i + 1..]);
        done.retain(|d| !e.contains(d));
        done.push(e);
    }
    done
}

/// Raises literals of `c` one at a time while the cube stays legal, trying first the
/// variables that stand between `c` and most of the `others`.
fn expand(s: &OutputSpec, c: Cube, others: &[Cube]) -> Cube {
    let mut vars: Vec<(usize, usize)> = Vec::new();
    let mut bits = c.care_bits();
    while bits != 0 {
        let v = bits.trailing_zeros() as usize;
        bits &= bits - 1;
        let lit = c.literal(v);
        let score = others.iter().filter(|d| d.literal(v) != lit).count();
        vars.push((v, score));
    }
    vars.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    let mut cur = c;
    for (v, _) in vars {
        let up = cur.with_literal(v, None);
        if s.legal(&up) {
            cur = up;
        }
    }
    cur
}

/// Removes products not needed for the on-set, the required cubes and (when `pairs`)
/// the adjacent on-on pairs; most-literal products are tried first.
fn irredundant(s: &OutputSpec, f: &mut Vec<Cube>, pairs: Option<&[Vec<Cube>]>, clock: &Clock) {
    f.sort_by_key(|c| (std::cmp::Reverse(c.literal_count()), *c));
    let mut i = 0;
    while i < f.len() {
        if clock.tick() {
            return;
        }
        let c = f[i];
        let mut removable = if on_side(s) {
            // c lies in on + dc, so it is redundant when its on-set points are held
            let mut holders = Vec::new();
            on_in(s, &c).iter().all(|p| {
                others_meeting(f, i, p, &mut holders);
                covers_cube(&holders, p)
            })
        } else {
            tautology(&rest_cofactor(f, i, &s.dc, &c))
        };
        let others = || -> Vec<Cube> {
            f.iter()
                .enumerate()
                .filter(|&(k, _)| k != i)
                .map(|(_, d)| *d)
                .collect()
        };
        if removable {
            removable = s.required.iter().all(|r| {
                !c.contains(&r.cube)
                    || f.iter()
                        .enumerate()
                        .any(|(k, d)| k != i && d.contains(&r.cube))
            });
        }
        if let (true, Some(edges)) = (removable, pairs) {
            removable = pairs_held_without(&c, &others(), edges);
        }
        if removable {
            f.remove(i);
        } else {
            i += 1;
        }
    }
}

/// Whether every adjacent on-on pair inside `c` is held by some cube of `others`.
fn pairs_held_without(c: &Cube, others: &[Cube], all_edges: &[Vec<Cube>]) -> bool {
    for (v, ev) in all_edges.iter().enumerate() {
        if c.literal(v).is_some() {
            continue;
        }
        let edges: Vec<Cube> = ev.iter().filter_map(|e| e.intersection(c)).collect();
        let holders: Vec<Cube> = others
            .iter()
            .copied()
            .filter(|d| d.literal(v).is_none())
            .collect();
        for e in &edges {
            if !covers_cube(&holders, e) {
                return false;
            }
        }
    }
    true
}

/// Adds, for every adjacent on-on pair held by no single product, a maximal legal cube
/// holding it (consensus terms).
/// When `clock` runs out the open pairs are added as they are (each lies in the
/// on-set); `None` when `grace` runs out too.
fn add_pair_terms(
    s: &OutputSpec,
    f: &mut Vec<Cube>,
    all_edges: &[Vec<Cube>],
    clock: &Clock,
    grace: &Clock,
) -> Option<()> {
    for (v, edges) in all_edges.iter().enumerate() {
        if edges.is_empty() {
            continue;
        }
        let holders: Vec<Cube> = f
            .iter()
            .copied()
            .filter(|d| d.literal(v).is_none())
            .collect();
        let mut open = sharp_within(edges, &holders, grace)?;
        while let Some(&u) = open.first() {
            if clock.tick() {
                f.extend_from_slice(&open);
                break;
            }
            let e = expand(s, u, &open[1..]);
            f.push(e);
            open = sharp_within(&open, &[e], grace)?;
        }
    }
    scc(f);
    Some(())
}

/// The cofactor by `c` of every cube of `f` but `f[skip]`, plus the don't-cares.
fn rest_cofactor(f: &[Cube], skip: usize, dc: &[Cube], c: &Cube) -> Vec<Cube> {
    let drop = !c.care_bits();
    f.iter()
        .enumerate()
        .filter(|&(k, d)| k != skip && d.intersects(c))
        .map(|(_, d)| d)
        .chain(dc.iter().filter(|d| d.intersects(c)))
        .map(|d| Cube::from_words(d.care_bits() & drop, d.value_bits()))
        .collect()
}

/// Whether the on-set is the smaller side: then questions about "the rest plus the
/// don't-cares" are asked of the on-set points instead (the sets partition the space
/// and every product lies in on + dc, so a product's points outside the don't-cares
/// are its on-set points). A function with a fragmented don't-care set, as an encoded
/// flow table's next-state functions have, is handled at the cost of its on-set.
fn on_side(s: &OutputSpec) -> bool {
    s.dc.len() > 2 * s.on.len() + 64
}

/// The on-set points of `c`, as cubes.
fn on_in(s: &OutputSpec, c: &Cube) -> Vec<Cube> {
    s.on.iter().filter_map(|o| o.intersection(c)).collect()
}

/// Sets `out` to the cubes of `f` but `f[skip]` that meet `p`.
fn others_meeting(f: &[Cube], skip: usize, p: &Cube, out: &mut Vec<Cube>) {
    out.clear();
    out.extend(
        f.iter()
            .enumerate()
            .filter(|&(k, d)| k != skip && d.intersects(p))
            .map(|(_, d)| *d),
    );
}

/// The points of `c` held by no other cube of `f` and no don't-care, as cubes, from the
/// on-set side (see [`on_side`]): each on-set piece of `c` minus the other products that
/// meet it (most pieces lie inside one of them and cost a scan).
fn only_in_on(s: &OutputSpec, f: &[Cube], skip: usize, c: &Cube) -> Vec<Cube> {
    let mut out = Vec::new();
    let mut near: Vec<Cube> = Vec::new();
    for p in s.on.iter().filter_map(|o| o.intersection(c)) {
        others_meeting(f, skip, &p, &mut near);
        if near.iter().any(|d| d.contains(&p)) {
            continue;
        }
        out.extend(sharp_within(&[p], &near, &Clock::unbounded()).unwrap_or_default());
    }
    out
}

/// The points of `c` held by no other cube of `f` and no don't-care, as cubes.
fn only_in(f: &[Cube], skip: usize, dc: &[Cube], c: &Cube, nvars: usize) -> Vec<Cube> {
    let cof = rest_cofactor(f, skip, dc, c);
    complement(&cof, nvars)
        .iter()
        .filter_map(|p| p.intersection(c))
        .collect()
}

/// Shrinks each product to the smallest cube holding what only it covers.
fn reduce(s: &OutputSpec, f: &mut [Cube], clock: &Clock) {
    for i in 0..f.len() {
        if clock.tick() {
            return;
        }
        let c = f[i];
        let mut pieces = if on_side(s) {
            only_in_on(s, f, i, &c)
        } else {
            only_in(f, i, &s.dc, &c, s.nvars)
        };
        for r in &s.required {
            if c.contains(&r.cube)
                && !f
                    .iter()
                    .enumerate()
                    .any(|(k, d)| k != i && d.contains(&r.cube))
            {
                pieces.push(r.cube);
            }
        }
        if pieces.is_empty() {
            continue;
        }
        let mut sc = pieces[0];
        for p in &pieces[1..] {
            sc = sc.supercube(p);
        }
        f[i] = s.closure(&sc);
    }
}

/// Lets outputs use each other's products where legal and larger, then drops what is
/// redundant, so common products are shared.
fn share(specs: &[OutputSpec], covers: &mut [Vec<Cube>], clock: &Clock) {
    let pool: Vec<Cube> = {
        let mut p: Vec<Cube> = covers.iter().flatten().copied().collect();
        p.sort();
        p.dedup();
        p
    };
    let set: std::collections::HashSet<Cube> = pool.iter().copied().collect();
    for (k, s) in specs.iter().enumerate() {
        if let Some(t) = &s.table {
            // Point-table outputs: a product may grow into a pool product one literal
            // larger (a scan of the whole pool per product is too slow here).
            let mut f = covers[k].clone();
            for d in f.iter_mut() {
                let mut bits = d.care_bits();
                while bits != 0 {
                    let v = bits.trailing_zeros() as usize;
                    bits &= bits - 1;
                    let up = d.with_literal(v, None);
                    if set.contains(&up) && s.legal(&up) {
                        *d = up;
                        break;
                    }
                }
            }
            scc(&mut f);
            covers[k] = crate::dense::irredundant(s, t, &f, clock);
            continue;
        }
        let mut f = covers[k].clone();
        for d in f.iter_mut() {
            if let Some(big) = pool.iter().find(|p| *p != d && p.contains(d) && s.legal(p)) {
                *d = *big;
            }
        }
        scc(&mut f);
        let e = if s.adjacent_pairs {
            edges(s)
        } else {
            Vec::new()
        };
        irredundant(
            s,
            &mut f,
            if s.adjacent_pairs { Some(&e) } else { None },
            clock,
        );
        covers[k] = f;
    }
}

/// A lower bound on the products of one output: a greedy set of points and required
/// cubes no two of which fit in one legal product.
pub(crate) fn lower_bound(s: &OutputSpec, cover: &[Cube], clock: &Clock) -> usize {
    if let Some(t) = &s.table {
        return crate::dense::lower_bound(s, t, cover, clock);
    }
    let pair_edges = if s.adjacent_pairs {
        edges_within(s, clock)
    } else {
        None
    };
    let mut items: Vec<Cube> = s.required.iter().map(|r| r.cube).collect();
    for (i, c) in cover.iter().enumerate() {
        if clock.tick() {
            break;
        }
        let only = if on_side(s) {
            only_in_on(s, cover, i, c)
        } else {
            only_in(cover, i, &s.dc, c, s.nvars)
        };
        if let Some(p) = only.first() {
            items.push(Cube::from_words(crate::cube::mask(s.nvars), p.value_bits()));
            continue;
        }
        // Static mode: an adjacent pair that only this product holds.
        if let Some(all_edges) = &pair_edges {
            for (v, ev) in all_edges.iter().enumerate() {
                if c.literal(v).is_some() {
                    continue;
                }
                let holders: Vec<Cube> = cover
                    .iter()
                    .enumerate()
                    .filter(|&(k, d)| k != i && d.literal(v).is_none())
                    .map(|(_, d)| *d)
                    .collect();
                let mine: Vec<Cube> = ev.iter().filter_map(|e| e.intersection(c)).collect();
                let open = sharp_within(&mine, &holders, clock).unwrap_or_default();
                if let Some(p) = open.first() {
                    let m = crate::cube::mask(s.nvars) & !(1u64 << v);
                    items.push(Cube::from_words(m, p.value_bits()));
                    break;
                }
            }
        }
    }
    items.sort_by_key(|c| std::cmp::Reverse(c.literal_count()));
    items.dedup();
    let mut chosen: Vec<Cube> = Vec::new();
    for it in items {
        if clock.tick() {
            break;
        }
        // Every item must be needed: an on-set point or an adjacent on-on pair.
        if !s.on.iter().any(|o| o.contains(&it)) {
            continue;
        }
        if chosen
            .iter()
            .all(|c| !s.legal(&s.closure(&c.supercube(&it))))
        {
            chosen.push(it);
        }
    }
    chosen.len()
}
