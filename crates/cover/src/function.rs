//! Incompletely specified Boolean functions with listed input transitions.

use crate::algebra::{complement, scc};
use crate::cube::{mask, Cube, MAX_VARS};
use crate::CoverError;

/// An input change from minterm `start` to minterm `end`: every variable that differs
/// changes once, in any order and at any speed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub struct Transition {
    /// The minterm number before the change.
    pub start: u64,
    /// The minterm number after the change.
    pub end: u64,
}

impl Transition {
    /// The transition cube `[start, end]` over `nvars` variables.
    pub fn cube(&self, nvars: usize) -> Cube {
        Cube::minterm(nvars, self.start).supercube(&Cube::minterm(nvars, self.end))
    }

    /// `START -> END (cube -> cube)`, for messages.
    pub fn describe(&self, nvars: usize) -> String {
        format!(
            "{} -> {} ({} -> {})",
            self.start,
            self.end,
            Cube::minterm(nvars, self.start).to_string(nvars),
            Cube::minterm(nvars, self.end).to_string(nvars)
        )
    }
}

/// One incompletely specified single-output function: an on-set and a don't-care set
/// (each a cover), the off-set being the rest, plus the transitions that must be free
/// of logic hazards.
///
/// Built only through [`Function::from_minterms`], [`Function::from_cubes`] or
/// [`Function::from_partition`], which check that the sets are disjoint, everything is in range, and every transition joins
/// two specified points.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Function {
    nvars: usize,
    on: Vec<Cube>,
    dc: Vec<Cube>,
    /// The off-set when the caller gave it ([`Function::from_partition`]); else it is
    /// computed by complementation when asked for.
    off: Option<Vec<Cube>>,
    transitions: Vec<Transition>,
}

impl Function {
    /// A function from minterm lists (`vars[0]` is the most significant bit).
    ///
    /// ```
    /// use stillpoint_cover::{Function, Transition};
    /// let f = Function::from_minterms(3, &[1, 3, 6, 7], &[], vec![Transition { start: 3, end: 7 }])?;
    /// assert_eq!(f.value(7), Some(true));
    /// assert_eq!(f.value(0), Some(false));
    /// # Ok::<(), Box<dyn std::error::Error>>(())
    /// ```
    pub fn from_minterms(
        nvars: usize,
        on: &[u64],
        dc: &[u64],
        transitions: Vec<Transition>,
    ) -> Result<Function, CoverError> {
        check_nvars(nvars)?;
        for &m in on.iter().chain(dc) {
            check_minterm(nvars, m)?;
        }
        let mut on_sorted = on.to_vec();
        on_sorted.sort_unstable();
        on_sorted.dedup();
        let mut dc_sorted = dc.to_vec();
        dc_sorted.sort_unstable();
        dc_sorted.dedup();
        for m in &dc_sorted {
            if on_sorted.binary_search(m).is_ok() {
                return Err(CoverError::OnDcOverlap {
                    point: Cube::minterm(nvars, *m).to_string(nvars),
                    minterm: Some(*m),
                });
            }
        }
        let on_c = on_sorted.iter().map(|&m| Cube::minterm(nvars, m)).collect();
        let dc_c = dc_sorted.iter().map(|&m| Cube::minterm(nvars, m)).collect();
        Function::build(nvars, on_c, dc_c, None, transitions)
    }

    /// A function from covers of its on-set and don't-care set (they may overlap
    /// internally but not with each other). Needs no minterm enumeration, so it works
    /// for as many as 64 variables.
    pub fn from_cubes(
        nvars: usize,
        on: Vec<Cube>,
        dc: Vec<Cube>,
        transitions: Vec<Transition>,
    ) -> Result<Function, CoverError> {
        check_nvars(nvars)?;
        check_cubes(nvars, on.iter().chain(&dc))?;
        for a in &on {
            for b in &dc {
                if let Some(w) = crate::algebra::witness(a, b, nvars) {
                    return Err(CoverError::OnDcOverlap {
                        point: w.to_string(nvars),
                        minterm: w.as_minterm(nvars),
                    });
                }
            }
        }
        let mut on = on;
        let mut dc = dc;
        scc(&mut on);
        scc(&mut dc);
        Function::build(nvars, on, dc, None, transitions)
    }

    /// A function from covers of all three sets, which must partition the space: pairwise
    /// disjoint, and together every point. A caller that knows its off-set (an encoder of
    /// a coded flow table knows every specified point's value, and the don't-cares are
    /// the rest) saves the complementation of a large don't-care cover, and the sets are
    /// taken as given (no single-cube containment pass).
    ///
    /// ```
    /// use stillpoint_cover::{Cube, Function};
    /// let c = |s: &str| Cube::parse(s).unwrap();
    /// // on a.b, off a'.b, the rest (b') free
    /// let f = Function::from_partition(2, vec![c("11")], vec![c("-0")], vec![c("01")], vec![])?;
    /// assert_eq!(f.value(0b11), Some(true));
    /// assert_eq!(f.value(0b01), Some(false));
    /// assert_eq!(f.value(0b10), None);
    /// assert!(Function::from_partition(2, vec![c("11")], vec![], vec![c("01")], vec![]).is_err());
    /// # Ok::<(), Box<dyn std::error::Error>>(())
    /// ```
    ///
    /// # Errors
    /// Too many variables, a cube out of range, two sets that meet (the point is named),
    /// points in none of the sets, or a bad transition.
    pub fn from_partition(
        nvars: usize,
        on: Vec<Cube>,
        dc: Vec<Cube>,
        off: Vec<Cube>,
        transitions: Vec<Transition>,
    ) -> Result<Function, CoverError> {
        check_nvars(nvars)?;
        check_cubes(nvars, on.iter().chain(&dc).chain(&off))?;
        let meet = |xs: &[Cube], ys: &[Cube]| {
            xs.iter().find_map(|a| {
                ys.iter()
                    .find(|b| a.intersects(b))
                    .and_then(|b| crate::algebra::witness(a, b, nvars))
            })
        };
        if let Some(w) = meet(&on, &dc) {
            return Err(CoverError::OnDcOverlap {
                point: w.to_string(nvars),
                minterm: w.as_minterm(nvars),
            });
        }
        for (set, other) in [("on-set", &on), ("don't-care set", &dc)] {
            if let Some(w) = meet(&off, other) {
                return Err(CoverError::BadCube {
                    text: w.to_string(nvars),
                    reason: format!("the point is in both the off-set and the {set}"),
                });
            }
        }
        let mut all: Vec<Cube> = Vec::with_capacity(on.len() + dc.len() + off.len());
        all.extend_from_slice(&on);
        all.extend_from_slice(&dc);
        all.extend_from_slice(&off);
        if !crate::algebra::tautology(&all) {
            // a point of the gap, for the message
            let gap = complement(&all, nvars);
            let w = gap.first().copied().unwrap_or_else(Cube::full);
            let w = crate::algebra::witness(&w, &w, nvars).unwrap_or(w);
            return Err(CoverError::BadCube {
                text: w.to_string(nvars),
                reason: "the point is in none of the on-set, the don't-care set and the off-set"
                    .to_string(),
            });
        }
        Function::build(nvars, on, dc, Some(off), transitions)
    }

    fn build(
        nvars: usize,
        on: Vec<Cube>,
        dc: Vec<Cube>,
        off: Option<Vec<Cube>>,
        transitions: Vec<Transition>,
    ) -> Result<Function, CoverError> {
        let f = Function {
            nvars,
            on,
            dc,
            off,
            transitions: Vec::new(),
        };
        for t in &transitions {
            check_minterm(nvars, t.start)?;
            check_minterm(nvars, t.end)?;
            if t.start == t.end {
                return Err(CoverError::BadTransition {
                    transition: *t,
                    reason: format!("{}: start and end are the same point", t.describe(nvars)),
                });
            }
            for (which, m) in [("start", t.start), ("end", t.end)] {
                if f.value(m).is_none() {
                    return Err(CoverError::BadTransition {
                        transition: *t,
                        reason: format!(
                            "{}: its {which} point is a don't-care; a listed transition needs specified end points",
                            t.describe(nvars)
                        ),
                    });
                }
            }
        }
        Ok(Function { transitions, ..f })
    }

    /// The number of variables.
    pub fn nvars(&self) -> usize {
        self.nvars
    }

    /// The listed transitions, in the order given.
    pub fn transitions(&self) -> &[Transition] {
        &self.transitions
    }

    /// The on-set as a cover.
    pub fn on_cubes(&self) -> &[Cube] {
        &self.on
    }

    /// The don't-care set as a cover.
    pub fn dc_cubes(&self) -> &[Cube] {
        &self.dc
    }

    /// The off-set as a cover (as given to [`Function::from_partition`], else computed
    /// by complementation).
    pub fn off_cubes(&self) -> Vec<Cube> {
        if let Some(off) = &self.off {
            return off.clone();
        }
        let mut all = self.on.clone();
        all.extend_from_slice(&self.dc);
        complement(&all, self.nvars)
    }

    /// The off-set when it was given ([`Function::from_partition`]).
    pub fn given_off_cubes(&self) -> Option<&[Cube]> {
        self.off.as_deref()
    }

    /// The value at minterm `m`: `Some(true)` on, `Some(false)` off, `None` don't care.
    pub fn value(&self, m: u64) -> Option<bool> {
        let p = Cube::minterm(self.nvars, m);
        if self.on.iter().any(|c| c.contains(&p)) {
            Some(true)
        } else if let Some(off) = &self.off {
            if off.iter().any(|c| c.contains(&p)) {
                Some(false)
            } else {
                None
            }
        } else if self.dc.iter().any(|c| c.contains(&p)) {
            None
        } else {
            Some(false)
        }
    }
}

fn check_nvars(nvars: usize) -> Result<(), CoverError> {
    if nvars > MAX_VARS {
        return Err(CoverError::TooManyVariables { nvars });
    }
    Ok(())
}

/// Every cube has its literals among the first `nvars` variables.
fn check_cubes<'a>(nvars: usize, cubes: impl Iterator<Item = &'a Cube>) -> Result<(), CoverError> {
    for c in cubes {
        if c.care_bits() & !mask(nvars) != 0 {
            return Err(CoverError::CubeOutOfRange { nvars });
        }
    }
    Ok(())
}

fn check_minterm(nvars: usize, m: u64) -> Result<(), CoverError> {
    if nvars < 64 && m >> nvars != 0 {
        return Err(CoverError::MintermOutOfRange { minterm: m, nvars });
    }
    Ok(())
}

/// Several functions over the same variables (for multi-output minimisation, where
/// outputs may share products).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MultiFunction {
    /// The variable names; `vars[0]` is the most significant minterm bit.
    pub vars: Vec<String>,
    /// The outputs, each a name and its function (with `vars.len()` variables).
    pub outputs: Vec<(String, Function)>,
}

impl MultiFunction {
    /// One output named `name`.
    pub fn single(vars: Vec<String>, name: impl Into<String>, f: Function) -> MultiFunction {
        MultiFunction {
            vars,
            outputs: vec![(name.into(), f)],
        }
    }

    /// Checks that every output has `vars.len()` variables and that names are distinct.
    pub fn validate(&self) -> Result<(), CoverError> {
        if self.outputs.is_empty() {
            return Err(CoverError::Invalid {
                reason: "no outputs".into(),
            });
        }
        for (i, (name, f)) in self.outputs.iter().enumerate() {
            if f.nvars() != self.vars.len() {
                return Err(CoverError::Invalid {
                    reason: format!(
                        "output {name} has {} variables, but {} are named",
                        f.nvars(),
                        self.vars.len()
                    ),
                });
            }
            if self.outputs[..i].iter().any(|(n, _)| n == name) {
                return Err(CoverError::Invalid {
                    reason: format!("output {name} is named twice"),
                });
            }
        }
        Ok(())
    }
}
