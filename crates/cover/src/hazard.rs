//! Hazard constraints of one output: the effective on/don't-care/off sets, required
//! cubes and privileged cubes (Nowick & Dill), function-hazard checks, the existence
//! test, and the reduction of primes to dhf-primes.
//!
//! Reference: S. M. Nowick and D. L. Dill, "Exact two-level minimization of hazard-free
//! logic with multiple-input changes", IEEE Trans. CAD 14(8), 1995 (conditions from
//! memory, as restated in our methods brief §7.3).
//!
//! Don't-cares inside transition cubes: inside a static 1→1 cube they become 1 (the
//! whole cube must lie in one product); inside a static 0→0 cube they become 0 (no
//! product may meet the cube, or the output could pulse); inside a dynamic cube they
//! stay free: every product meeting the cube must hold its 1-end point, so whatever
//! value the cover gives them is monotone along the transition.

use crate::algebra::{complement_within, scc, scc_within, sharp_within, witness};
use crate::budget::Clock;
use crate::cube::Cube;
use crate::function::{Function, Transition};
use crate::points::Table;
use crate::{CoverError, HazardMode};
use std::sync::Arc;

/// A privileged cube: any product meeting `cube` must contain `start`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Privileged {
    /// The transition cube.
    pub cube: Cube,
    /// Its 1-end point (a full-length cube).
    pub start: Cube,
    /// The transition it comes from.
    pub transition: Transition,
}

/// A cube that must lie inside one product.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Required {
    /// The cube.
    pub cube: Cube,
    /// The transition it comes from.
    pub transition: Transition,
}

/// Everything the minimisers need to know about one output.
#[derive(Debug, Clone)]
pub struct OutputSpec {
    /// The output's name.
    pub name: String,
    /// The number of variables.
    pub nvars: usize,
    /// Effective on-set (with don't-cares of 1→1 cubes set to 1).
    pub on: Vec<Cube>,
    /// Effective don't-care set.
    pub dc: Vec<Cube>,
    /// Effective off-set, as cubes; empty when the point table holds the sets (up to
    /// 20 variables): ask [`OutputSpec::off_witness`] instead.
    pub off: Vec<Cube>,
    /// Required cubes (full mode).
    pub required: Vec<Required>,
    /// Privileged cubes (full mode).
    pub privileged: Vec<Privileged>,
    /// Whether every adjacent on-on pair needs one product (static mode).
    pub adjacent_pairs: bool,
    /// The effective sets as a point table, for up to 20 variables.
    pub(crate) table: Option<Arc<Table>>,
}

impl OutputSpec {
    /// Whether `c` may be a product of this output: no off-set point and no illegal
    /// intersection with a privileged cube.
    pub fn legal(&self, c: &Cube) -> bool {
        self.off_witness(c).is_none()
            && self
                .privileged
                .iter()
                .all(|p| !p.cube.intersects(c) || c.contains(&p.start))
    }

    /// An off-set point of `c` (a full-length cube), if any: from the point table when
    /// there is one, else from the off-set cubes.
    pub fn off_witness(&self, c: &Cube) -> Option<Cube> {
        match &self.table {
            Some(t) => t.off_witness(c),
            None => self.off.iter().find_map(|o| witness(o, c, self.nvars)),
        }
    }

    /// The smallest cube containing `c` that intersects no privileged cube illegally.
    pub fn closure(&self, c: &Cube) -> Cube {
        let mut cur = *c;
        loop {
            let mut changed = false;
            for p in &self.privileged {
                if p.cube.intersects(&cur) && !cur.contains(&p.start) {
                    cur = cur.supercube(&p.start);
                    changed = true;
                }
            }
            if !changed {
                return cur;
            }
        }
    }
}

/// Builds the constraints of output `name` for `mode`.
///
/// Errors: [`CoverError::FunctionHazard`] when a listed transition is not
/// function-hazard-free, [`CoverError::NoHazardFreeCover`] when some required cube lies
/// in no dhf-implicant.
pub fn prepare(name: &str, f: &Function, mode: HazardMode) -> Result<OutputSpec, CoverError> {
    prepare_within(name, f, mode, &Clock::unbounded()).map(|s| s.expect("no deadline"))
}

/// [`prepare`] under a deadline: `Ok(None)` when it passed first.
pub(crate) fn prepare_within(
    name: &str,
    f: &Function,
    mode: HazardMode,
    clock: &Clock,
) -> Result<Option<OutputSpec>, CoverError> {
    let n = f.nvars();
    let on: Vec<Cube> = f.on_cubes().to_vec();
    let dc: Vec<Cube> = f.dc_cubes().to_vec();
    // Up to 20 variables the sets go into a point table and the off-set is read from
    // it; wider functions take the off-set as given (Function::from_partition), else
    // the complement by unate recursion.
    let mut table = Table::build(n, &on, &dc);
    let off = match (&table, f.given_off_cubes()) {
        // The table answers every off-set question; no list is kept.
        (Some(_), _) => Vec::new(),
        (None, Some(off)) => off.to_vec(),
        (None, None) => {
            let mut all = on.clone();
            all.extend_from_slice(&dc);
            let Some(off) = complement_within(&all, n, clock) else {
                return Ok(None);
            };
            off
        }
    };
    let mut spec = OutputSpec {
        name: name.to_string(),
        nvars: n,
        on,
        dc,
        off,
        required: Vec::new(),
        privileged: Vec::new(),
        adjacent_pairs: mode == HazardMode::Static,
        table: None,
    };
    if mode != HazardMode::Full {
        spec.table = table.map(Arc::new);
        return Ok(Some(spec));
    }
    spec.table = table.clone().map(Arc::new);
    let hazard = |t: &Transition, reason: String| CoverError::FunctionHazard {
        output: name.to_string(),
        transition: *t,
        reason: format!("{}: {reason}", t.describe(n)),
    };
    // The value of every transition's end points, read once (from the point table
    // when there is one: `Function::value` scans the cube lists).
    let value = |m: u64| -> Option<bool> {
        match &table {
            Some(t) => match t.states()[Cube::minterm(n, m).value_bits() as usize] {
                crate::points::ON => Some(true),
                crate::points::OFF => Some(false),
                _ => None,
            },
            None => f.value(m),
        }
    };
    let ends: Vec<(Option<bool>, Option<bool>)> = f
        .transitions()
        .iter()
        .map(|t| (value(t.start), value(t.end)))
        .collect();
    // Whether cube `c` holds a point of state `s` in the table (`None` without one).
    let table_holds = |c: &Cube, s: u8| -> Option<bool> {
        table
            .as_ref()
            .map(|t| !crate::points::each_point(c, n, |p| t.states()[p] != s))
    };
    // Static transitions first: they fix don't-cares.
    let mut ones: Vec<(Cube, Transition)> = Vec::new();
    let mut zeros: Vec<(Cube, Transition)> = Vec::new();
    for (t, &ends) in f.transitions().iter().zip(&ends) {
        let cube = t.cube(n);
        match ends {
            (Some(true), Some(true)) => {
                if let Some(w) = spec.off_witness(&cube) {
                    return Err(hazard(
                        t,
                        format!(
                            "both ends are 1 but the transition cube {} holds the off-set point {}",
                            cube.to_string(n),
                            w.to_string(n)
                        ),
                    ));
                }
                ones.push((cube, *t));
            }
            (Some(false), Some(false)) => {
                // (The table rules the on-set out quickly; the scan names the witness.)
                let on_free = table_holds(&cube, crate::points::ON) == Some(false);
                if let Some(w) = (!on_free)
                    .then(|| spec.on.iter().find_map(|o| witness(o, &cube, n)))
                    .flatten()
                {
                    return Err(hazard(
                        t,
                        format!(
                            "both ends are 0 but the transition cube {} holds the on-set point {}",
                            cube.to_string(n),
                            w.to_string(n)
                        ),
                    ));
                }
                zeros.push((cube, *t));
            }
            _ => {}
        }
    }
    for (c1, t1) in &ones {
        for (c0, t0) in &zeros {
            if let Some(w) = witness(c1, c0, n) {
                return Err(CoverError::NoHazardFreeCover {
                    output: name.to_string(),
                    transition: *t1,
                    reason: format!(
                        "{}: its transition cube shares the don't-care point {} with the 0 -> 0 transition {}, so it would have to be both 1 and 0",
                        t1.describe(n),
                        w.to_string(n),
                        t0.describe(n)
                    ),
                });
            }
        }
    }
    // A transition cube inside one cube of the on- or off-set meets no don't-care (the
    // sets are disjoint): only the others are taken out of the don't-care cover, which
    // saves a scan of a large one per transition.
    let forced: Vec<Cube> = ones
        .iter()
        .chain(&zeros)
        .map(|(c, _)| *c)
        .filter(|c| match table_holds(c, crate::points::DC) {
            // With a table: a cube holding no don't-care point changes nothing.
            Some(dc) => dc,
            None => !spec.on.iter().chain(&spec.off).any(|d| d.contains(c)),
        })
        .collect();
    // Only the don't-care cubes that meet a transition cube change.
    let (hit, mut dc): (Vec<Cube>, Vec<Cube>) = spec
        .dc
        .iter()
        .partition(|d| forced.iter().any(|f| f.intersects(d)));
    if !hit.is_empty() {
        let Some(rest) = sharp_within(&hit, &forced, clock) else {
            return Ok(None);
        };
        dc.extend(rest);
    }
    spec.dc = dc;
    spec.on.extend(ones.iter().map(|(c, _)| *c));
    if table.is_none() || spec.on.len() <= 4096 {
        // (With a point table, on-set cubes inside a 1 -> 1 cube may stay: the on-set
        // is a cover, not necessarily containment-free.)
        scc_within(&mut spec.on, clock);
    }
    if table.is_none() {
        spec.off.extend(zeros.iter().map(|(c, _)| *c));
        scc_within(&mut spec.off, clock);
    }
    if let Some(t) = &mut table {
        for (c, _) in &ones {
            t.paint(c, crate::points::ON);
        }
        for (c, _) in &zeros {
            t.paint(c, crate::points::OFF);
        }
    }
    spec.table = table.map(Arc::new);
    for (c, t) in &ones {
        spec.required.push(Required {
            cube: *c,
            transition: *t,
        });
    }
    // Dynamic transitions.
    for (t, &ends) in f.transitions().iter().zip(&ends) {
        let one_end = match ends {
            (Some(true), Some(false)) => t.start,
            (Some(false), Some(true)) => t.end,
            _ => continue,
        };
        let cube = t.cube(n);
        let p = Cube::minterm(n, one_end);
        let mut req = Vec::new();
        // Whether the table already gave `req` (and found no hazard).
        let mut scanned = false;
        // With a table and a small transition cube: `[P, C]` for every on-set point
        // `C` of the cube (the same containment-maximal set as the per-cube
        // supercubes below, which also hold `[P, C]` for their farthest point); when
        // one holds an off-set point, the scan below names the hazard.
        if let Some(tb) = spec.table.as_ref().filter(|_| cube.size(n) <= 4096) {
            let st = tb.states();
            let clean = crate::points::each_point(&cube, n, |c| {
                if st[c] != crate::points::ON {
                    return true;
                }
                let r = p.supercube(&Cube::from_words(crate::cube::mask(n), c as u64));
                req.push(r);
                tb.off_witness(&r).is_none()
            });
            scanned = clean;
            if !clean {
                req.clear();
            }
        }
        for q in spec.on.iter().filter(|_| !scanned) {
            let Some(part) = q.intersection(&cube) else {
                continue;
            };
            let r = p.supercube(&part);
            if let Some(d) = spec.off_witness(&r) {
                // The point of `part` farthest from p.
                let far = far_point(&p, &part, n);
                return Err(hazard(
                    t,
                    format!(
                        "the value is not monotone along the transition: the path {} -> {} -> {} has values 1, 0, 1",
                        p.to_string(n),
                        d.to_string(n),
                        far.to_string(n)
                    ),
                ));
            }
            req.push(r);
        }
        scc(&mut req);
        for r in req {
            spec.required.push(Required {
                cube: r,
                transition: *t,
            });
        }
        spec.privileged.push(Privileged {
            cube,
            start: p,
            transition: *t,
        });
    }
    // Existence: every required cube inside some dhf-implicant.
    for r in &spec.required {
        let c = spec.closure(&r.cube);
        if let Some(d) = spec.off_witness(&c) {
            let culprit = spec
                .privileged
                .iter()
                .find(|p| p.cube.intersects(&r.cube) && !r.cube.contains(&p.start));
            let why = match culprit {
                Some(p) => format!(
                    "its required cube {} meets the privileged cube {} of transition {} without holding its start point {}; every product holding both also holds the off-set point {}",
                    r.cube.to_string(n),
                    p.cube.to_string(n),
                    p.transition.describe(n),
                    p.start.to_string(n),
                    d.to_string(n)
                ),
                None => format!("its required cube {} holds the off-set point {}", r.cube.to_string(n), d.to_string(n)),
            };
            return Err(CoverError::NoHazardFreeCover {
                output: name.to_string(),
                transition: r.transition,
                reason: format!("{}: {why}", r.transition.describe(n)),
            });
        }
    }
    Ok(Some(spec))
}

/// The point of `part` farthest from point `p` (free variables take `p`'s opposite).
fn far_point(p: &Cube, part: &Cube, n: usize) -> Cube {
    let mut c = *part;
    for v in 0..n {
        if c.literal(v).is_none() {
            c = c.with_literal(v, p.literal(v).map(|b| !b).or(Some(false)));
        }
    }
    c
}

/// Reduces primes to dhf-primes: a prime meeting a privileged cube without holding its
/// start point is replaced by its maximal subcubes disjoint from that cube; repeated
/// against every privileged cube, then containment-reduced (methods brief §7.3 step 2).
pub fn dhf_split(primes: Vec<Cube>, privileged: &[Privileged]) -> Vec<Cube> {
    dhf_split_within(primes, privileged, &Clock::unbounded()).unwrap_or_default()
}

/// [`dhf_split`] under a deadline: `None` when it passed first.
pub(crate) fn dhf_split_within(
    primes: Vec<Cube>,
    privileged: &[Privileged],
    clock: &Clock,
) -> Option<Vec<Cube>> {
    let mut work = primes;
    if privileged.is_empty() {
        work.sort();
        return Some(work);
    }
    // The cubes are containment-free (primes, then the result of the previous pass),
    // so only the new pieces need the containment test: a piece lies inside the cube it
    // came from, so it holds no other cube of the pass.
    scc_within(&mut work, clock);
    for p in privileged {
        if clock.now() {
            return None;
        }
        let mut next = Vec::with_capacity(work.len());
        let mut pieces = Vec::new();
        for c in work {
            if !p.cube.intersects(&c) || c.contains(&p.start) {
                next.push(c);
                continue;
            }
            let mut bits = p.cube.care_bits() & !c.care_bits();
            while bits != 0 {
                let v = bits.trailing_zeros() as usize;
                pieces.push(c.with_literal(v, p.cube.literal(v).map(|b| !b)));
                bits &= bits - 1;
            }
        }
        if !pieces.is_empty() {
            scc_within(&mut pieces, clock);
            pieces.retain(|q| !next.iter().any(|c| c.contains(q)));
            next.extend(pieces);
        }
        work = next;
    }
    // A piece split off for one privileged cube may meet an earlier one illegally only
    // if it met it before; pieces are subcubes, so one more pass settles it.
    let mut changed = true;
    while changed {
        if clock.now() {
            return None;
        }
        changed = false;
        let mut next = Vec::with_capacity(work.len());
        let mut pieces = Vec::new();
        for c in work {
            if let Some(p) = privileged
                .iter()
                .find(|p| p.cube.intersects(&c) && !c.contains(&p.start))
            {
                changed = true;
                let mut bits = p.cube.care_bits() & !c.care_bits();
                while bits != 0 {
                    let v = bits.trailing_zeros() as usize;
                    pieces.push(c.with_literal(v, p.cube.literal(v).map(|b| !b)));
                    bits &= bits - 1;
                }
            } else {
                next.push(c);
            }
        }
        // (Containment as in the first passes: only the pieces are tested.)
        scc_within(&mut pieces, clock);
        pieces.retain(|q| !next.iter().any(|c| c.contains(q)));
        next.extend(pieces);
        work = next;
    }
    if clock.expired() {
        return None;
    }
    work.sort();
    Some(work)
}
