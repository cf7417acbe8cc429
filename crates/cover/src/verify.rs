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

use crate::algebra::{covers_cube, intersect, split};
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
        let products: std::collections::BTreeSet<&Cube> = sol.products.iter().collect();
        for c in cubes {
            if !products.contains(c) {
                say(
                    None,
                    format!(
                        "product {} missing from the shared products",
                        c.to_string(n)
                    ),
                );
            }
        }
        let table = (n <= POINT_LIMIT).then(|| Points::new(func, cubes, n));
        if let Some(t) = &table {
            for m in 0..(1u64 << n) {
                let covered = t.free[m as usize] != NONE;
                match t.value(m) {
                    Some(true) if !covered => say(None, format!("on-set point {m} is not covered")),
                    Some(false) if covered => say(None, format!("off-set point {m} is covered")),
                    _ => {}
                }
            }
        } else {
            if let Some(off) = func.given_off_cubes() {
                // The off-set was given: no product may meet it.
                for c in cubes {
                    if let Some(o) = off.iter().find(|o| o.intersects(c)) {
                        say(
                            None,
                            format!(
                                "product {} meets the off-set cube {}",
                                c.to_string(n),
                                o.to_string(n)
                            ),
                        );
                    }
                }
            } else {
                // No off-set point in a product: the product lies inside on ∪ dc.
                let ondc: Vec<Cube> = func
                    .on_cubes()
                    .iter()
                    .chain(func.dc_cubes())
                    .copied()
                    .collect();
                for c in cubes {
                    if !covers_cube(&ondc, c) {
                        say(
                            None,
                            format!("product {} holds an off-set point", c.to_string(n)),
                        );
                    }
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
            HazardMode::Static => static_pairs(func, cubes, n, table.as_ref(), &mut say),
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

/// Every point's value and, per point, which variables some product holding it leaves
/// free (as minterm bits; [`NONE`] when no product holds it), painted cube by cube.
struct Points {
    /// 0 off, 1 on, 2 don't care.
    value: Vec<u8>,
    free: Vec<u64>,
}

/// The `free` entry of a point that no product holds.
const NONE: u64 = u64::MAX;

impl Points {
    fn new(func: &Function, cubes: &[Cube], n: usize) -> Points {
        let size = 1usize << n;
        let mut value = vec![0u8; size];
        for c in func.dc_cubes() {
            for m in c.minterms(n) {
                value[m as usize] = 2;
            }
        }
        for c in func.on_cubes() {
            for m in c.minterms(n) {
                value[m as usize] = 1;
            }
        }
        let mut free = vec![NONE; size];
        for c in cubes {
            let mut f = 0u64;
            for i in 0..n {
                if c.literal(i).is_none() {
                    f |= 1 << (n - 1 - i);
                }
            }
            for m in c.minterms(n) {
                let e = &mut free[m as usize];
                *e = if *e == NONE { f } else { *e | f };
            }
        }
        Points { value, free }
    }

    fn value(&self, m: u64) -> Option<bool> {
        match self.value[m as usize] {
            0 => Some(false),
            1 => Some(true),
            _ => None,
        }
    }
}

fn static_pairs(
    func: &Function,
    cubes: &[Cube],
    n: usize,
    table: Option<&Points>,
    say: &mut impl FnMut(Option<Transition>, String),
) {
    if let Some(t) = table {
        for m in 0..(1u64 << n) {
            if t.value(m) != Some(true) {
                continue;
            }
            for bit in 0..n {
                let m2 = m ^ (1u64 << bit);
                if m2 < m || t.value(m2) != Some(true) {
                    continue;
                }
                // One product holds both points iff one holds `m` with this variable free.
                let f = t.free[m as usize];
                if f == NONE || f >> bit & 1 == 0 {
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
