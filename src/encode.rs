//! Encoding a coded flow table into next-state and output functions.
//!
//! Given a normal flow table and a race-free [`Assignment`], [`encode`] builds one
//! incompletely specified function per state variable `Y_i` and per output over the
//! **support** `inputs (in order), y1..yk`; a point is minterm
//! `(column value << k) | code` (the first input is the most significant bit, as the
//! cover crate numbers minterms).
//!
//! The functions are built from **cubes**, never by enumerating points: a transition
//! sub-cube is one cube, a stable point one full-length cube, and the don't-care set is
//! the complement of what is specified (by the cover crate's unate recursion), so the
//! support may have as many variables as a cube holds ([`MAX_SUPPORT`]).
//!
//! **Next state** (Tracey filling, methods.md §4.4): a stable entry maps its code to
//! itself; for an unstable entry `s -> t` in column `x` every code of the transition
//! sub-cube `[c_s, c_t]` maps to `c_t` (one-hot codes: `c_s` maps to the two-hot code
//! `c_s | c_t`, which maps to `c_t`, per [`Assignment::path`]). Unused codes, unspecified
//! entries and unlisted columns are don't-cares. Two regions of one column that meet
//! and send their points to different codes mean the code is not race-free, an error
//! naming the state and column.
//!
//! **Outputs.** A specified output bit of an entry holds at its own point (`(x, c_s)`),
//! always: every specified entry of the table is honoured. An unstable entry that
//! leaves a bit unspecified takes the destination's value there (the output changes
//! with the input change and stays put while the state moves; when the start and the
//! destination agree this is Unger's rule of no transient pulse). The other points of a
//! transition's path (the sub-cube without `c_s`, or the one-hot intermediate code) are
//! left to the hazard-free minimiser: a don't-care inside a listed transition whose ends
//! agree becomes that value, inside one whose ends differ it stays free but every
//! product meeting the transition must hold its 1-end, so the output changes at most
//! once along every path the state can take (Nowick & Dill, in the cover crate).
//!
//! **Listed transitions** (for the hazard-free minimiser): each total-state transition
//! of the change mode from the stable `(x, c_s)` to input `x'` gives `(x, c_s) -> (x', c_s)`
//! (the input change, state held) and then the state moves: `(x', c_s) -> (x', c_t)`
//! (one-hot: its two steps, and the whole move from `c_s` to `c_t` as one transition, since
//! the gates may see the two steps overlap). A transition is listed for a function when
//! both its end points are specified for that function.

use crate::sim::TransitionCheck;
use rayon::prelude::*;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};
use stillpoint_assign::{Assignment, Codes};
use stillpoint_cover::algebra::{complement, cube_minus};
use stillpoint_cover::{Cube, Function, MultiFunction, Transition};
use stillpoint_table::{total_transitions, ChangeMode, ColumnId, FlowTable, OutBit, StateId};

/// Largest support (inputs plus state variables) [`encode`] accepts: the number of
/// variables a cube of the cover crate holds.
pub const MAX_SUPPORT: usize = stillpoint_cover::MAX_VARS;

/// Why a coded table cannot be encoded.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum EncodeError {
    /// Two transitions of one column fill one code with different next states.
    #[error(
        "state {state}, column {column}: its transition meets code {code} that column {column} \
         sends elsewhere (the codes have a critical race)"
    )]
    Race {
        /// The state whose transition was being filled.
        state: String,
        /// The column label.
        column: String,
        /// The code met, as a bit string.
        code: String,
    },
    /// Too many variables for a cube.
    #[error(
        "{inputs} inputs and {vars} state variables: at most {MAX_SUPPORT} in all are supported"
    )]
    TooWide {
        /// Inputs.
        inputs: usize,
        /// State variables.
        vars: usize,
    },
    /// The codes are not one per row of the table.
    #[error("the codes give {codes} states but the table has {states} rows")]
    CodeCount {
        /// Codes given.
        codes: usize,
        /// Rows.
        states: usize,
    },
    /// The cover crate refused the functions (should not happen).
    #[error("internal: {0}")]
    Cover(String),
}

/// One total-state transition with its points (for verification and test benches).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct CodedTransition {
    /// The stable row before.
    pub state: StateId,
    /// The column before.
    pub from: ColumnId,
    /// The column after.
    pub to: ColumnId,
    /// The stable row after.
    pub dest: StateId,
}

/// A cube of the support whose points all have the same encoded next code.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Region {
    cube: Cube,
    next: u64,
}

/// The functions of a coded table. See the [module doc](self).
#[derive(Debug, Clone)]
pub struct Encoding {
    /// Input names then `y1..yk`.
    pub support: Vec<String>,
    /// Number of state variables.
    pub width: usize,
    /// The functions, `Y1..Yk` then the outputs, with their listed transitions.
    pub functions: MultiFunction,
    /// The total-state transitions of the change mode.
    pub transitions: Vec<CodedTransition>,
    /// Unstable entries no total-state transition of the change mode reaches (encoded all
    /// the same).
    pub unreached: Vec<(StateId, ColumnId)>,
    regions: Vec<Region>,
    out: Vec<BTreeMap<u64, bool>>,
}

impl Encoding {
    /// The minterm of input column value `x` and code `y`.
    pub fn point(&self, x: u32, y: u64) -> u64 {
        ((x as u64) << self.width) | y
    }

    /// The encoded next code at a point (`None`: don't-care).
    pub fn next_code(&self, point: u64) -> Option<u64> {
        let n = self.support.len();
        self.regions
            .iter()
            .find(|r| r.cube.contains_minterm(n, point))
            .map(|r| r.next)
    }

    /// The encoded value of output `j` at a point (`None`: don't-care, left to the
    /// minimiser).
    pub fn output_value(&self, j: usize, point: u64) -> Option<bool> {
        self.out[j].get(&point).copied()
    }

    /// The ternary-simulation check of one total-state transition, with the outputs the
    /// encoding fixed at the two stable points.
    pub fn check_of(
        &self,
        table: &FlowTable,
        codes: &Codes,
        t: &CodedTransition,
    ) -> TransitionCheck {
        let p = table.num_inputs();
        let k = self.width;
        let ibits = |c: ColumnId| -> Vec<bool> {
            let v = table.column_value(c);
            (0..p).map(|i| (v >> (p - 1 - i)) & 1 == 1).collect()
        };
        let cbits = |s: StateId| -> Vec<bool> {
            (0..k)
                .map(|i| (codes.code(s) >> (k - 1 - i)) & 1 == 1)
                .collect()
        };
        let outs = |c: ColumnId, s: StateId| -> Vec<Option<bool>> {
            let pt = self.point(table.column_value(c), codes.code(s));
            (0..self.out.len())
                .map(|j| self.output_value(j, pt))
                .collect()
        };
        TransitionCheck {
            from_inputs: ibits(t.from),
            to_inputs: ibits(t.to),
            start: cbits(t.state),
            dest: cbits(t.dest),
            outputs_before: outs(t.from, t.state),
            outputs_after: outs(t.to, t.dest),
            outputs_mid: outs(t.to, t.state),
        }
    }
}

/// Cubes over the support `p` inputs then `k` state variables.
#[derive(Debug, Clone, Copy)]
struct Space {
    p: usize,
    k: usize,
}

impl Space {
    fn nvars(self) -> usize {
        self.p + self.k
    }

    fn minterm(self, x: u32, y: u64) -> u64 {
        ((x as u64) << self.k) | y
    }

    /// The point `(x, y)` as a full-length cube.
    fn point(self, x: u32, y: u64) -> Cube {
        Cube::minterm(self.nvars(), self.minterm(x, y))
    }

    /// Column `x` times the sub-cube of the codes between `a` and `b`.
    fn span(self, x: u32, a: u64, b: u64) -> Cube {
        let mut c = self.point(x, a);
        let mut diff = a ^ b;
        while diff != 0 {
            let bit = diff.trailing_zeros() as usize;
            // code bit `bit` is y_{k - bit}, variable p + k - 1 - bit
            c = c.with_literal(self.p + self.k - 1 - bit, None);
            diff &= diff - 1;
        }
        c
    }

    /// The code part of a cube of column `x`, free variables read as 0.
    fn code_of(self, c: &Cube) -> u64 {
        let mut y = 0u64;
        for i in 0..self.k {
            if c.literal(self.p + i) == Some(true) {
                y |= 1 << (self.k - 1 - i);
            }
        }
        y
    }
}

/// Encodes a normal, coded table. See the [module doc](self).
///
/// # Errors
/// [`EncodeError::Race`] when the codes have a critical race; [`EncodeError::TooWide`]
/// beyond [`MAX_SUPPORT`] variables.
///
/// # Example
/// ```
/// use stillpoint::encode::encode;
/// use stillpoint_assign::{assign, AssignConfig};
/// use stillpoint_table::{parse_text, ChangeMode};
/// // A toggle-free latch: `set` high sends `off` to `on`, `clr` high sends `on` to `off`.
/// let t = parse_text("inputs set clr\noutputs q\n  00 10 01\noff (off)/0 on/- (off)/0\non (on)/1 (on)/1 off/-\n")?;
/// let a = assign(&t, &AssignConfig::default())?;
/// let e = encode(&t, &a, ChangeMode::Single)?;
/// assert_eq!(e.support, ["set", "clr", "y1"]);
/// assert_eq!(e.functions.outputs.len(), 2); // Y1 and q
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn encode(
    table: &FlowTable,
    assignment: &Assignment,
    mode: ChangeMode,
) -> Result<Encoding, EncodeError> {
    encode_with(table, assignment, mode, true)
}

/// [`encode`], choosing whether a multi-step move (one-hot) is also listed whole. Listing
/// it whole protects against the gates seeing the steps overlap, but can ask an unused
/// code to be 1 for one transition and 0 for another, leaving no hazard-free cover; the
/// pipeline then falls back to listing the steps only (and says so).
///
/// # Errors
/// As [`encode`].
pub fn encode_with(
    table: &FlowTable,
    assignment: &Assignment,
    mode: ChangeMode,
    whole_moves: bool,
) -> Result<Encoding, EncodeError> {
    let codes = &assignment.codes;
    if codes.len() != table.num_states() {
        return Err(EncodeError::CodeCount {
            codes: codes.len(),
            states: table.num_states(),
        });
    }
    let p = table.num_inputs();
    let k = codes.width();
    if p + k > MAX_SUPPORT {
        return Err(EncodeError::TooWide { inputs: p, vars: k });
    }
    let sp = Space { p, k };
    let nvars = sp.nvars();
    let m = table.num_outputs();
    let bits = |c: u64| stillpoint_assign::bits_string(c, k);

    // Next-state regions, column by column, checked for overlaps with other codes.
    let mut regions: Vec<Region> = Vec::new();
    for c in table.columns() {
        let xv = table.column_value(c);
        let first = regions.len();
        for s in table.states() {
            let Some(t) = table.next(s, c) else { continue };
            let cs = codes.code(s);
            let mut mine: Vec<Region> = Vec::new();
            if t == s {
                mine.push(Region {
                    cube: sp.point(xv, cs),
                    next: cs,
                });
            } else {
                let path = assignment.path(table, s, c);
                let last = path.len() - 1;
                for w in 0..last {
                    let (a, b) = (path[w], path[w + 1]);
                    let cube = sp.span(xv, a, b);
                    if w + 1 < last {
                        // an intermediate code maps onward (the next step's region)
                        for piece in cube_minus(&cube, &sp.point(xv, b)) {
                            mine.push(Region {
                                cube: piece,
                                next: b,
                            });
                        }
                    } else {
                        mine.push(Region { cube, next: b });
                    }
                }
            }
            for r in &mine {
                if let Some(o) = regions[first..]
                    .iter()
                    .find(|o| o.next != r.next && o.cube.intersects(&r.cube))
                {
                    let meet = o.cube.intersection(&r.cube).unwrap_or(r.cube);
                    return Err(EncodeError::Race {
                        state: table.state_name(s).to_string(),
                        column: table.column_label(c).to_string(),
                        code: bits(sp.code_of(&meet)),
                    });
                }
            }
            regions.extend(mine);
        }
    }

    // Outputs: the specified points (entries, and unstable entries filled from the
    // destination); everything else is left to the minimiser.
    let mut out: Vec<BTreeMap<u64, bool>> = vec![BTreeMap::new(); m];
    for c in table.columns() {
        let xv = table.column_value(c);
        for s in table.states() {
            let q = sp.minterm(xv, codes.code(s));
            let o = table.outputs(s, c);
            let dest = table.next(s, c).filter(|&t| t != s);
            for j in 0..m {
                let v = outbit(o[j]).or_else(|| dest.and_then(|t| outbit(table.outputs(t, c)[j])));
                if let Some(v) = v {
                    out[j].insert(q, v);
                }
            }
        }
    }

    // Total-state transitions and the listed transitions.
    let tts = total_transitions(table, mode);
    let mut reached = BTreeSet::new();
    let mut listed: BTreeSet<(u64, u64)> = BTreeSet::new();
    let mut transitions = Vec::with_capacity(tts.len());
    for tt in &tts {
        let cs = codes.code(tt.state);
        let a = sp.minterm(table.column_value(tt.from), cs);
        let b = sp.minterm(table.column_value(tt.to), cs);
        listed.insert((a, b));
        if tt.dest != tt.state {
            reached.insert((tt.state, tt.to));
            let path = assignment.path(table, tt.state, tt.to);
            let xv = table.column_value(tt.to);
            for w in path.windows(2) {
                listed.insert((sp.minterm(xv, w[0]), sp.minterm(xv, w[1])));
            }
            // A multi-step move (one-hot) is also listed whole: each bit changes once
            // along it, and the gates may see the steps overlap.
            if whole_moves && path.len() > 2 {
                listed.insert((
                    sp.minterm(xv, path[0]),
                    sp.minterm(xv, path[path.len() - 1]),
                ));
            }
        }
        transitions.push(CodedTransition {
            state: tt.state,
            from: tt.from,
            to: tt.to,
            dest: tt.dest,
        });
    }
    let mut unreached = Vec::new();
    for s in table.states() {
        for c in table.columns() {
            if matches!(table.next(s, c), Some(t) if t != s) && !reached.contains(&(s, c)) {
                unreached.push((s, c));
            }
        }
    }

    // Build the functions.
    let mut support: Vec<String> = table.input_names().to_vec();
    support.extend((1..=k).map(|i| format!("y{i}")));
    let next_at = |q: u64| -> Option<u64> {
        regions
            .iter()
            .find(|r| r.cube.contains_minterm(nvars, q))
            .map(|r| r.next)
    };
    let listed_ns: Vec<Transition> = listed
        .iter()
        .filter(|&&(a, b)| next_at(a).is_some() && next_at(b).is_some())
        .map(|&(start, end)| Transition { start, end })
        .collect();
    let ns_care: Vec<Cube> = regions.iter().map(|r| r.cube).collect();
    let ns_dc = complement(&ns_care, nvars);
    // The functions are independent: built in parallel (the order of the list is fixed).
    let next_state: Vec<Result<(String, Function), EncodeError>> = (0..k)
        .into_par_iter()
        .map(|i| {
            let bit = 1u64 << (k - 1 - i);
            let on: Vec<Cube> = regions
                .iter()
                .filter(|r| r.next & bit != 0)
                .map(|r| r.cube)
                .collect();
            let off: Vec<Cube> = regions
                .iter()
                .filter(|r| r.next & bit == 0)
                .map(|r| r.cube)
                .collect();
            let f = Function::from_partition(nvars, on, ns_dc.clone(), off, listed_ns.clone())
                .map_err(|e| EncodeError::Cover(e.to_string()))?;
            Ok((format!("Y{}", i + 1), f))
        })
        .collect();
    let output_fns: Vec<Result<(String, Function), EncodeError>> = out
        .par_iter()
        .enumerate()
        .map(|(j, vals)| {
            let on: Vec<Cube> = vals
                .iter()
                .filter(|(_, v)| **v)
                .map(|(q, _)| Cube::minterm(nvars, *q))
                .collect();
            let off: Vec<Cube> = vals
                .iter()
                .filter(|(_, v)| !**v)
                .map(|(q, _)| Cube::minterm(nvars, *q))
                .collect();
            let care: Vec<Cube> = vals.keys().map(|q| Cube::minterm(nvars, *q)).collect();
            let dc = complement(&care, nvars);
            let trs: Vec<Transition> = listed
                .iter()
                .filter(|(a, b)| vals.contains_key(a) && vals.contains_key(b))
                .map(|&(start, end)| Transition { start, end })
                .collect();
            let f = Function::from_partition(nvars, on, dc, off, trs)
                .map_err(|e| EncodeError::Cover(e.to_string()))?;
            Ok((table.output_names()[j].clone(), f))
        })
        .collect();
    let outputs = next_state
        .into_iter()
        .chain(output_fns)
        .collect::<Result<Vec<_>, _>>()?;
    Ok(Encoding {
        functions: MultiFunction {
            vars: support.clone(),
            outputs,
        },
        support,
        width: k,
        transitions,
        unreached,
        regions,
        out,
    })
}

fn outbit(b: OutBit) -> Option<bool> {
    match b {
        OutBit::Zero => Some(false),
        OutBit::One => Some(true),
        OutBit::Free => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn span_frees_the_differing_code_bits() {
        let sp = Space { p: 1, k: 4 };
        let c = sp.span(1, 0b0010, 0b1011);
        assert_eq!(c.to_string(5), "1-01-");
        let pts: Vec<u64> = c.minterms(5).collect();
        let mut want = vec![0b10010, 0b10011, 0b11010, 0b11011];
        want.sort();
        let mut got = pts;
        got.sort();
        assert_eq!(got, want);
        assert_eq!(sp.code_of(&c), 0b0010);
        assert_eq!(sp.span(0, 5, 5), sp.point(0, 5));
    }
}
