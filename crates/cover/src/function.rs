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
/// Built only through [`Function::from_minterms`] or [`Function::from_cubes`], which
/// check that the sets are disjoint, everything is in range, and every transition joins
/// two specified points.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Function {
    nvars: usize,
    on: Vec<Cube>,
    dc: Vec<Cube>,
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
        Function::build(nvars, on_c, dc_c, transitions)
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
        for c in on.iter().chain(&dc) {
            if c.care_bits() & !mask(nvars) != 0 {
                return Err(CoverError::CubeOutOfRange { nvars });
            }
        }
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
        Function::build(nvars, on, dc, transitions)
    }

    fn build(
        nvars: usize,
        on: Vec<Cube>,
        dc: Vec<Cube>,
        transitions: Vec<Transition>,
    ) -> Result<Function, CoverError> {
        let f = Function {
            nvars,
            on,
            dc,
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

    /// The off-set as a cover (computed by complementation).
    pub fn off_cubes(&self) -> Vec<Cube> {
        let mut all = self.on.clone();
        all.extend_from_slice(&self.dc);
        complement(&all, self.nvars)
    }

    /// The value at minterm `m`: `Some(true)` on, `Some(false)` off, `None` don't care.
    pub fn value(&self, m: u64) -> Option<bool> {
        let p = Cube::minterm(self.nvars, m);
        if self.on.iter().any(|c| c.contains(&p)) {
            Some(true)
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
