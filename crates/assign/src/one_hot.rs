//! One-hot codes with two-hot intermediate codes.
//!
//! Reference: L. A. Hollaar, "Direct implementation of asynchronous control units", IEEE
//! Trans. Computers C-31(12), 1982 (attribution from memory, methods.md §5.3). State `i`
//! has only `y_(i+1)` high. A transition `s -> t` first raises `t`'s variable (the two-hot
//! code `c_s | c_t`, which the logic sends on to `c_t`), then lowers `s`'s: two single-bit
//! steps, so it is not single-transition-time (`multi_step`), but no race can be critical
//! when [`check`] passes. `n` variables, `n <= 64`.

use crate::codes::MAX_WIDTH;
use crate::problem::Problem;
use crate::{AssignError, Codes};
use stillpoint_table::{ColumnId, FlowTable, StateId};

/// The one-hot codes of `n` states: state `i` is `1 << (n - 1 - i)` (`y_(i+1)` high).
///
/// # Errors
/// [`AssignError::TooWide`] beyond 64 states.
pub fn codes(n: usize) -> Result<Codes, AssignError> {
    if n > MAX_WIDTH {
        return Err(AssignError::TooWide {
            width: n,
            max: MAX_WIDTH,
        });
    }
    Codes::new(n, (0..n).map(|i| 1u64 << (n - 1 - i)).collect())
}

/// The codes passed by the two-step transition `c_s -> c_s|c_t -> c_t`.
pub fn path(codes: &Codes, s: StateId, t: StateId) -> Vec<u64> {
    if s == t {
        return vec![codes.code(s)];
    }
    vec![codes.code(s), codes.code(s) | codes.code(t), codes.code(t)]
}

/// A problem the two-step check found.
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub enum OneHotViolation {
    /// A code is not one-hot.
    NotOneHot {
        /// The state.
        state: StateId,
    },
    /// Two transitions of one column with different endpoints share an intermediate code.
    SharedIntermediate {
        /// The column.
        column: ColumnId,
        /// One transition `(source, destination)`.
        first: (StateId, StateId),
        /// The other.
        second: (StateId, StateId),
    },
    /// A transition's intermediate code is the code of a state.
    IntermediateIsState {
        /// The column.
        column: ColumnId,
        /// The transition.
        transition: (StateId, StateId),
        /// The state whose code it is.
        state: StateId,
    },
}

/// Checks the two-step paths of every transition of a normal table: every code is
/// one-hot, no two transitions of a column with different endpoints share an intermediate
/// code, and no intermediate code is a state's code.
///
/// # Errors
/// Every violation found.
///
/// # Panics
/// When `codes` has fewer codes than the table has states.
pub fn check(table: &FlowTable, codes: &Codes) -> Result<(), Vec<OneHotViolation>> {
    let mut bad = Vec::new();
    for s in table.states() {
        if codes.code(s).count_ones() != 1 {
            bad.push(OneHotViolation::NotOneHot { state: s });
        }
    }
    for c in table.columns() {
        let moves: Vec<(StateId, StateId, u64)> = table
            .states()
            .filter_map(|s| table.next(s, c).filter(|&t| t != s).map(|t| (s, t)))
            .map(|(s, t)| (s, t, codes.code(s) | codes.code(t)))
            .collect();
        for (i, &(s, t, m)) in moves.iter().enumerate() {
            if let Some(w) = codes.state_of(m) {
                bad.push(OneHotViolation::IntermediateIsState {
                    column: c,
                    transition: (s, t),
                    state: w,
                });
            }
            for &(u, v, m2) in &moves[i + 1..] {
                if m == m2 && (s, t) != (u, v) {
                    bad.push(OneHotViolation::SharedIntermediate {
                        column: c,
                        first: (s, t),
                        second: (u, v),
                    });
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

/// [`check`] on a problem (for the library's own use).
pub(crate) fn check_problem(p: &Problem, codes: &[u64]) -> bool {
    if codes.iter().any(|c| c.count_ones() != 1) {
        return false;
    }
    for col in &p.columns {
        let mut inter: Vec<u64> = col
            .pairs
            .iter()
            .filter(|(s, t)| s != t)
            .map(|&(s, t)| codes[s as usize] | codes[t as usize])
            .collect();
        let len = inter.len();
        inter.sort_unstable();
        inter.dedup();
        if inter.len() != len {
            return false;
        }
    }
    true
}
