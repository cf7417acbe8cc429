//! The independent checker: simpler than the minimisers, written for clarity.
//!
//! For up to [`POINT_LIMIT`] variables it walks every point of the space; above that
//! it falls back on cover algebra for the value and adjacency checks (less independent
//! of the minimiser). Checked, per output:
//! - every on-set point is covered and no off-set point is (don't-cares are free);
//! - every product of an output is among the solution's distinct products;
//! - `Static`: every pair of on-set points one variable apart lies in one product;
//! - `Full`, for every listed transition `A -> B` with cube `T`: 1→1: one product holds
//!   `T` (and ternary evaluation gives 1); 0→0: no product meets `T`; 1→0 / 0→1 with
//!   1-end `P`: every product meeting `T` holds `P`, and for every on-set point `C` of
//!   `T` one product holds the cube `[P, C]` (Nowick & Dill's cover conditions).

use crate::algebra::{covers_cube, intersect, meets, split};
use crate::cube::Cube;
use crate::function::{Function, MultiFunction, Transition};
use crate::ternary::transition_is_clean;
use crate::{HazardMode, Solution};

/// Up to this many variables the checker enumerates points.
pub const POINT_LIMIT: usize = 20;

/// One thing wrong with a solution.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Violation {
    /// The output concerned.
    pub output: String,
    /// The transition concerned, if any.
    pub transition: Option<Transition>,
    /// What is wrong.
    pub message: String,
}

/// Checks `sol` against `f` under `mode`; every violation found is returned.
pub fn check(f: &MultiFunction, sol: &Solution, mode: HazardMode) -> Result<(), Vec<Violation>> {
    let mut bad = Vec::new();
    let n = f.vars.len();
    for (name, func) in &f.outputs {
        let mut say = |t: Option<Transition>, message: String| {
            bad.push(Violation {
                output: name.clone(),
                transition: t,
                message,
            })
        };
        let Some(oc) = sol.output(name) else {
            say(None, "no cover for this output".into());
            continue;
        };
        let cubes = &oc.cubes;
        for c in cubes {
            if !sol.products.contains(c) {
                say(
                    None,
                    format!(
                        "product {} missing from the shared products",
                        c.to_string(n)
                    ),
                );
            }
        }
        let covered = |m: u64| cubes.iter().any(|c| c.contains_minterm(n, m));
        if n <= POINT_LIMIT {
            for m in 0..(1u64 << n) {
                match func.value(m) {
                    Some(true) if !covered(m) => {
                        say(None, format!("on-set point {m} is not covered"))
                    }
                    Some(false) if covered(m) => say(None, format!("off-set point {m} is covered")),
                    _ => {}
                }
            }
        } else {
            let off = func.off_cubes();
            for c in cubes {
                if meets(&off, c) {
                    say(
                        None,
                        format!("product {} holds an off-set point", c.to_string(n)),
                    );
                }
            }
            for c in func.on_cubes() {
                if !covers_cube(cubes, c) {
                    say(
                        None,
                        format!("on-set cube {} is not covered", c.to_string(n)),
                    );
                }
            }
        }
        match mode {
            HazardMode::None => {}
            HazardMode::Static => static_pairs(func, cubes, n, &mut say),
            HazardMode::Full => {
                for t in func.transitions() {
                    transition(func, cubes, n, t, &mut say);
                }
            }
        }
    }
    if bad.is_empty() {
        Ok(())
    } else {
        Err(bad)
    }
}

fn static_pairs(
    func: &Function,
    cubes: &[Cube],
    n: usize,
    say: &mut impl FnMut(Option<Transition>, String),
) {
    if n <= POINT_LIMIT {
        for m in 0..(1u64 << n) {
            if func.value(m) != Some(true) {
                continue;
            }
            for bit in 0..n {
                let m2 = m ^ (1u64 << bit);
                if m2 < m || func.value(m2) != Some(true) {
                    continue;
                }
                let pair = Cube::minterm(n, m).supercube(&Cube::minterm(n, m2));
                if !cubes.iter().any(|c| c.contains(&pair)) {
                    say(
                        Some(Transition { start: m, end: m2 }),
                        format!("on-set points {m} and {m2} are in no common product"),
                    );
                }
            }
        }
    } else {
        for v in 0..n {
            let (lo, hi) = split(func.on_cubes(), v);
            let holders: Vec<Cube> = cubes
                .iter()
                .copied()
                .filter(|c| c.literal(v).is_none())
                .collect();
            for e in intersect(&lo, &hi) {
                if !covers_cube(&holders, &e) {
                    say(
                        None,
                        format!(
                            "some adjacent on-set pair in {} is in no common product",
                            e.to_string(n)
                        ),
                    );
                }
            }
        }
    }
}

fn transition(
    func: &Function,
    cubes: &[Cube],
    n: usize,
    t: &Transition,
    say: &mut impl FnMut(Option<Transition>, String),
) {
    let tc = t.cube(n);
    let d = t.describe(n);
    match (func.value(t.start), func.value(t.end)) {
        (Some(true), Some(true)) => {
            if !cubes.iter().any(|c| c.contains(&tc)) {
                say(
                    Some(*t),
                    format!("static 1 -> 1 transition {d}: no product holds the transition cube"),
                );
            }
            if !transition_is_clean(cubes, n, t) {
                say(
                    Some(*t),
                    format!("static 1 -> 1 transition {d}: ternary evaluation gives X"),
                );
            }
        }
        (Some(false), Some(false)) => {
            if cubes.iter().any(|c| c.intersects(&tc)) {
                say(
                    Some(*t),
                    format!("static 0 -> 0 transition {d}: a product meets the transition cube"),
                );
            }
        }
        (Some(a), Some(_)) => {
            let one = if a { t.start } else { t.end };
            let p = Cube::minterm(n, one);
            for c in cubes {
                if c.intersects(&tc) && !c.contains(&p) {
                    say(
                        Some(*t),
                        format!(
                            "dynamic transition {d}: product {} meets it without holding {}",
                            c.to_string(n),
                            p.to_string(n)
                        ),
                    );
                }
            }
            if tc.literal_count() + POINT_LIMIT >= n {
                for m in tc.minterms(n) {
                    if func.value(m) == Some(true) {
                        let need = p.supercube(&Cube::minterm(n, m));
                        if !cubes.iter().any(|c| c.contains(&need)) {
                            say(
                                Some(*t),
                                format!(
                                    "dynamic transition {d}: no product holds {}",
                                    need.to_string(n)
                                ),
                            );
                        }
                    }
                }
            } else {
                say(
                    Some(*t),
                    format!("dynamic transition {d}: too many points to check"),
                );
            }
        }
        _ => say(Some(*t), format!("transition {d} has a don't-care end")),
    }
}
