//! Encoding a coded flow table into next-state and output functions.
//!
//! Given a normal flow table and a race-free [`Assignment`], [`encode`] builds one
//! incompletely specified function per state variable `Y_i` and per output over the
//! **support** `inputs (in order), y1..yk`; a point is minterm
//! `(column value << k) | code` (the first input is the most significant bit, as the
//! cover crate numbers minterms).
//!
//! **Next state** (Tracey filling, methods.md §4.4): a stable entry maps its code to
//! itself; for an unstable entry `s -> t` in column `x` every code of the transition
//! sub-cube `[c_s, c_t]` maps to `c_t` (one-hot codes: `c_s` maps to the two-hot code
//! `c_s | c_t`, which maps to `c_t`, per [`Assignment::path`]). Unused codes, unspecified
//! entries and unlisted columns are don't-cares. Two fills of one point with different
//! codes mean the code is not race-free, an error naming the state and column.
//!
//! **Outputs.** A specified output bit of an entry holds at its own point (`(x, c_s)`),
//! always: every specified entry of the table is honoured. The other points of a
//! transition's path (the sub-cube without `c_s`, or the one-hot intermediate code) take
//! the destination's value, so an output changes at most once: with the input change
//! when the unstable entry leaves it unspecified, or when the state moves when the entry
//! specifies the old value. When the destination leaves the bit unspecified the path
//! takes the entry's own value. Where two such fills disagree the point stays a
//! don't-care; a specified value always wins over a fill.
//!
//! **Listed transitions** (for the hazard-free minimiser): each total-state transition
//! of the change mode from the stable `(x, c_s)` to input `x'` gives `(x, c_s) -> (x', c_s)`
//! (the input change, state held) and then the state moves: `(x', c_s) -> (x', c_t)`
//! (one-hot: its two steps, and the whole move from `c_s` to `c_t` as one transition, since
//! the gates may see the two steps overlap). A transition is listed for a function when
//! both its end points are specified for that function.

use crate::sim::TransitionCheck;
use serde::Serialize;
use std::collections::BTreeSet;
use stillpoint_assign::{Assignment, Codes};
use stillpoint_cover::{Cube, Function, MultiFunction, Transition};
use stillpoint_table::{total_transitions, ChangeMode, ColumnId, FlowTable, OutBit, StateId};

/// Largest support (inputs plus state variables) [`encode`] enumerates: it works point by
/// point, so beyond this it refuses rather than exhaust memory.
pub const MAX_SUPPORT: usize = 20;

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
    /// Too many variables to enumerate.
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

/// The value of an output at a point while encoding.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Val {
    Unset,
    Hard(bool),
    Soft(bool),
    Conflict,
}

impl Val {
    fn get(self) -> Option<bool> {
        match self {
            Val::Hard(b) | Val::Soft(b) => Some(b),
            _ => None,
        }
    }
    fn merge(self, new: Val) -> Val {
        match (self, new) {
            (Val::Unset, n) => n,
            (Val::Hard(a), _) => Val::Hard(a),
            (_, Val::Hard(b)) => Val::Hard(b),
            (Val::Soft(a), Val::Soft(b)) if a == b => Val::Soft(a),
            _ => Val::Conflict,
        }
    }
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
    /// Output points where two fills disagreed and that were left unspecified.
    pub output_conflicts: usize,
    ns: Vec<Option<u64>>,
    out: Vec<Vec<Val>>,
}

impl Encoding {
    /// The minterm of input column value `x` and code `y`.
    pub fn point(&self, x: u32, y: u64) -> u64 {
        ((x as u64) << self.width) | y
    }

    /// The encoded next code at a point (`None`: don't-care).
    pub fn next_code(&self, point: u64) -> Option<u64> {
        self.ns[point as usize]
    }

    /// The encoded value of output `j` at a point (`None`: don't-care).
    pub fn output_value(&self, j: usize, point: u64) -> Option<bool> {
        self.out[j][point as usize].get()
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

fn subcube(a: u64, b: u64) -> impl Iterator<Item = u64> {
    // every code that agrees with a and b where they agree
    let diff = a ^ b;
    let base = a & !diff;
    let mut sub = 0u64;
    let mut done = false;
    std::iter::from_fn(move || {
        if done {
            return None;
        }
        let v = base | sub;
        sub = sub.wrapping_sub(diff) & diff;
        if sub == 0 {
            done = true;
        }
        Some(v)
    })
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
    let m = table.num_outputs();
    let npts = 1usize << (p + k);
    let mut ns: Vec<Option<u64>> = vec![None; npts];
    let mut out: Vec<Vec<Val>> = vec![vec![Val::Unset; npts]; m];
    let pt = |x: u32, y: u64| ((x as u64) << k | y) as usize;
    let bits = |c: u64| stillpoint_assign::bits_string(c, k);
    for c in table.columns() {
        let xv = table.column_value(c);
        for s in table.states() {
            let cs = codes.code(s);
            let o = table.outputs(s, c);
            for (j, b) in o.iter().enumerate() {
                if let Some(v) = outbit(*b) {
                    out[j][pt(xv, cs)] = out[j][pt(xv, cs)].merge(Val::Hard(v));
                }
            }
            let Some(t) = table.next(s, c) else { continue };
            let path = assignment.path(table, s, c);
            let mut set = |code: u64, to: u64| -> Result<(), EncodeError> {
                let slot = &mut ns[pt(xv, code)];
                match slot {
                    Some(v) if *v != to => Err(EncodeError::Race {
                        state: table.state_name(s).to_string(),
                        column: table.column_label(c).to_string(),
                        code: bits(code),
                    }),
                    _ => {
                        *slot = Some(to);
                        Ok(())
                    }
                }
            };
            if t == s {
                set(cs, cs)?;
                continue;
            }
            let ot = table.outputs(t, c);
            let last = path.len() - 1;
            for w in 0..last {
                let (a, b) = (path[w], path[w + 1]);
                for y in subcube(a, b) {
                    if y == b && w + 1 < last {
                        continue; // an intermediate code maps onward
                    }
                    set(y, b)?;
                }
            }
            // Output fills on every path point except the source.
            for (j, (&bs, &bt)) in o.iter().zip(ot).enumerate() {
                let fill = outbit(bt).or(outbit(bs));
                let Some(v) = fill else { continue };
                if outbit(bs).is_none() {
                    out[j][pt(xv, cs)] = out[j][pt(xv, cs)].merge(Val::Soft(v));
                }
                for w in 0..last {
                    for y in subcube(path[w], path[w + 1]) {
                        if y != cs {
                            out[j][pt(xv, y)] = out[j][pt(xv, y)].merge(Val::Soft(v));
                        }
                    }
                }
            }
        }
    }
    // Total-state transitions and the listed transitions per function.
    let tts = total_transitions(table, mode);
    let mut reached = BTreeSet::new();
    let mut listed: BTreeSet<(u64, u64)> = BTreeSet::new();
    let mut transitions = Vec::with_capacity(tts.len());
    for tt in &tts {
        let cs = codes.code(tt.state);
        let a = pt(table.column_value(tt.from), cs) as u64;
        let b = pt(table.column_value(tt.to), cs) as u64;
        listed.insert((a, b));
        if tt.dest != tt.state {
            reached.insert((tt.state, tt.to));
            let path = assignment.path(table, tt.state, tt.to);
            let xv = table.column_value(tt.to);
            for w in path.windows(2) {
                listed.insert((pt(xv, w[0]) as u64, pt(xv, w[1]) as u64));
            }
            // A multi-step move (one-hot) is also listed whole: each bit changes once
            // along it, and the gates may see the steps overlap.
            if whole_moves && path.len() > 2 {
                listed.insert((pt(xv, path[0]) as u64, pt(xv, path[path.len() - 1]) as u64));
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
    let nvars = p + k;
    let mut support: Vec<String> = table.input_names().to_vec();
    support.extend((1..=k).map(|i| format!("y{i}")));
    let col_listed: Vec<bool> = {
        let mut v = vec![false; 1 << p];
        for c in table.columns() {
            v[table.column_value(c) as usize] = true;
        }
        v
    };
    let build = |value: &dyn Fn(usize) -> Option<bool>| -> Result<Function, EncodeError> {
        let mut on = Vec::new();
        let mut dc = Vec::new();
        for (x, &listed_col) in col_listed.iter().enumerate() {
            if !listed_col {
                // the whole column: inputs fixed, state variables free
                let mut cube = Cube::full();
                for i in 0..p {
                    cube = cube.with_literal(i, Some((x >> (p - 1 - i)) & 1 == 1));
                }
                dc.push(cube);
                continue;
            }
            for y in 0..(1u64 << k) {
                let q = pt(x as u32, y);
                match value(q) {
                    Some(true) => on.push(Cube::minterm(nvars, q as u64)),
                    Some(false) => {}
                    None => dc.push(Cube::minterm(nvars, q as u64)),
                }
            }
        }
        let trs: Vec<Transition> = listed
            .iter()
            .filter(|(a, b)| value(*a as usize).is_some() && value(*b as usize).is_some())
            .map(|&(start, end)| Transition { start, end })
            .collect();
        Function::from_cubes(nvars, on, dc, trs).map_err(|e| EncodeError::Cover(e.to_string()))
    };
    let mut outputs = Vec::with_capacity(k + m);
    for i in 0..k {
        let f = build(&|q| ns[q].map(|c| (c >> (k - 1 - i)) & 1 == 1))?;
        outputs.push((format!("Y{}", i + 1), f));
    }
    let mut output_conflicts = 0;
    for (j, vals) in out.iter().enumerate() {
        output_conflicts += vals.iter().filter(|v| **v == Val::Conflict).count();
        let f = build(&|q| vals[q].get())?;
        outputs.push((table.output_names()[j].clone(), f));
    }
    Ok(Encoding {
        functions: MultiFunction {
            vars: support.clone(),
            outputs,
        },
        support,
        width: k,
        transitions,
        unreached,
        output_conflicts,
        ns,
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
    fn subcube_enumerates_every_code_between() {
        let mut v: Vec<u64> = subcube(0b0010, 0b1011).collect();
        v.sort();
        assert_eq!(v, vec![0b0010, 0b0011, 0b1010, 0b1011]);
        assert_eq!(subcube(5, 5).collect::<Vec<_>>(), vec![5]);
    }
}
