//! The separation checker: Tracey's condition, checked directly on the table and codes.
//!
//! For every column and every two entries `s -> t`, `u -> v` of it (stable entries are
//! `t -> t`) with different destinations, the transition sub-cubes `[c_s, c_t]` and
//! `[c_u, c_v]` must be disjoint. This is the condition for a single-transition-time
//! (STT) code to be free of critical races (methods.md §3.2, §4.1). Deliberately simple
//! and independent of the searches: every test and the CLI's `race_free` use it.

use crate::Codes;
use stillpoint_table::{ColumnId, FlowTable, StateId};

/// Two transitions of one column whose sub-cubes meet although their destinations differ.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct SeparationViolation {
    /// The column.
    pub column: ColumnId,
    /// The first entry as `(source, destination)` (`(t, t)` for a stable entry).
    pub first: (StateId, StateId),
    /// The second entry, in the same form; it comes later in row order.
    pub second: (StateId, StateId),
}

/// Whether the sub-cubes `[a, b]` and `[c, d]` of `width`-bit codes meet: they do unless
/// some variable is constant on both, with different values.
pub fn subcubes_meet(a: u64, b: u64, c: u64, d: u64) -> bool {
    // Variables fixed in both cubes: a == b there and c == d there.
    let fixed_both = !(a ^ b) & !(c ^ d);
    (a ^ c) & fixed_both == 0
}

/// Checks Tracey's separation condition for every column of `table`.
///
/// The table should be normal (collapse chains first); each entry is taken as written.
///
/// # Errors
/// Every violating pair of entries, in column then row order.
///
/// # Panics
/// When `codes` has fewer codes than the table has states.
///
/// # Example
/// ```
/// # use stillpoint_table::parse_text;
/// use stillpoint_assign::{separation, Codes};
/// // In column 1, `a` goes to `c` while `b` is stable: with a=00, b=01, c=11 the cube
/// // [00, 11] contains b's code.
/// let t = parse_text("inputs x\n  0 1\na (a) c\nb (b) (b)\nc a (c)\n")?;
/// let bad = Codes::new(2, vec![0b00, 0b01, 0b11])?;
/// assert!(separation::check(&t, &bad).is_err());
/// let good = Codes::new(2, vec![0b00, 0b11, 0b01])?;
/// assert!(separation::check(&t, &good).is_ok());
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn check(table: &FlowTable, codes: &Codes) -> Result<(), Vec<SeparationViolation>> {
    let mut bad = Vec::new();
    for c in table.columns() {
        let entries: Vec<(StateId, StateId)> = table
            .states()
            .filter_map(|s| table.next(s, c).map(|t| (s, t)))
            .collect();
        for (i, &(s, t)) in entries.iter().enumerate() {
            for &(u, v) in &entries[i + 1..] {
                if t == v || s == v || t == u {
                    continue;
                }
                if subcubes_meet(codes.code(s), codes.code(t), codes.code(u), codes.code(v)) {
                    bad.push(SeparationViolation {
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

/// Whether `codes` separate every two disjoint pairs of states (and a pair from a single
/// state, and two single states): the condition for a code to be race-free for every
/// normal table on these states (a universal STT code, methods.md §5.2). `O(n^4 k)`.
pub fn is_universal(codes: &[u64]) -> bool {
    let n = codes.len();
    for a in 0..n {
        for b in a..n {
            for c in 0..n {
                if c == a || c == b {
                    continue;
                }
                for d in c..n {
                    if d == a || d == b {
                        continue;
                    }
                    if subcubes_meet(codes[a], codes[b], codes[c], codes[d]) {
                        return false;
                    }
                }
            }
        }
    }
    true
}
