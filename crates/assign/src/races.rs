//! Race analysis of a given code on a normal table (the `races` command).
//!
//! A transition `s -> t` of column `x` whose codes differ in several bits is a race: the
//! bits may change in any order, so the machine may pass any point of the sub-cube
//! `[c_s, c_t]`. A point that is an unused code, or the code of a state whose entry in `x`
//! is unspecified, is free: the encoding may send it anywhere, in particular on to `c_t`.
//! The race is **critical** when the sub-cube meets, beyond `c_s` and `c_t` (whose own
//! entries are fixed), the sub-cube of another entry of the column with a different destination (a stable entry `w` counts as
//! the point `c_w`): some order of bit changes then reaches a point that must lead
//! elsewhere. Otherwise it is non-critical. This is Tracey's separation condition read per
//! transition (methods.md §3.2); the analysis works on cubes, `O(T^2)` per column of `T`
//! entries, never on the `k!` orders.
//!
//! The reported order starts at `c_s`, flips one bit at a time (lowest variable first)
//! toward `c_t`, and ends at the point of the other sub-cube nearest to `c_s`, preferring
//! the code of a state whose entry leads elsewhere. `ends_in` is the other entry's
//! destination: where the machine settles from that point when the encoding honours that
//! entry's sub-cube.

use crate::problem::{cid, sid, Problem};
use crate::separation::subcubes_meet;
use crate::{AssignError, Codes};
use stillpoint_table::{ColumnId, FlowTable, StateId};

/// A transition whose race is critical.
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct CriticalRace {
    /// The source state.
    pub state: StateId,
    /// The column (input combination) of the transition.
    pub column: ColumnId,
    /// The destination the table asks for.
    pub to: StateId,
    /// The codes passed, from `c_state` to the point that leads elsewhere, one bit
    /// change per step.
    pub order: Vec<u64>,
    /// Where the machine settles from the last point of `order`.
    pub ends_in: StateId,
}

/// A transition with a race (several bits change).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct RaceTransition {
    /// The source state.
    pub state: StateId,
    /// The column.
    pub column: ColumnId,
    /// The destination.
    pub to: StateId,
}

/// The races of a code on a table.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct RaceReport {
    /// Transitions some order of bit changes takes elsewhere, in column then row order.
    pub critical: Vec<CriticalRace>,
    /// Transitions where several bits change and every order ends right.
    pub noncritical: Vec<RaceTransition>,
}

impl RaceReport {
    /// True exactly when no race is critical.
    pub fn race_free(&self) -> bool {
        self.critical.is_empty()
    }
}

/// Analyses the races of `codes` on a normal `table`.
///
/// # Errors
/// [`AssignError::NotNormal`] when a chain is left (collapse chains first), and
/// [`AssignError::InvalidCodes`] when the codes are not one per state.
///
/// # Example
/// ```
/// # use stillpoint_table::parse_text;
/// use stillpoint_assign::{races, Codes};
/// // a=00, c=11, and a -> c may pass through b=01, stable in column 1.
/// let t = parse_text("inputs x\n  0 1\na (a) c\nb - (b)\nc a (c)\n")?;
/// let codes = Codes::new(2, vec![0b00, 0b01, 0b11])?;
/// let r = races::analyze(&t, &codes)?;
/// assert!(!r.race_free());
/// assert_eq!(r.critical[0].order, vec![0b00, 0b01]);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn analyze(table: &FlowTable, codes: &Codes) -> Result<RaceReport, AssignError> {
    if codes.len() != table.num_states() {
        return Err(AssignError::InvalidCodes {
            message: format!(
                "{} codes for a table of {} states",
                codes.len(),
                table.num_states()
            ),
        });
    }
    let p = Problem::from_table(table)?;
    Ok(analyze_problem(&p, codes.as_slice(), codes.width()))
}

pub(crate) fn analyze_problem(p: &Problem, codes: &[u64], width: usize) -> RaceReport {
    let mut report = RaceReport::default();
    for col in &p.columns {
        for &(s, t) in &col.pairs {
            if s == t {
                continue;
            }
            let (cs, ct) = (codes[s as usize], codes[t as usize]);
            match critical_point(&col.pairs, codes, width, s, t) {
                Some((point, v)) => {
                    let mut order = vec![cs];
                    let mut cur = cs;
                    for var in 0..width {
                        let m = 1u64 << (width - 1 - var);
                        if (cur ^ point) & m != 0 {
                            cur ^= m;
                            order.push(cur);
                        }
                    }
                    report.critical.push(CriticalRace {
                        state: sid(s),
                        column: cid(col.id),
                        to: sid(t),
                        order,
                        ends_in: sid(v),
                    });
                }
                None => {
                    if (cs ^ ct).count_ones() >= 2 {
                        report.noncritical.push(RaceTransition {
                            state: sid(s),
                            column: cid(col.id),
                            to: sid(t),
                        });
                    }
                }
            }
        }
    }
    report
}

/// The point of `[c_s, c_t]` other than `c_s` and `c_t` that lies in the sub-cube of an entry with
/// another destination, and that destination.
fn critical_point(
    pairs: &[(u32, u32)],
    codes: &[u64],
    width: usize,
    s: u32,
    t: u32,
) -> Option<(u64, u32)> {
    let (cs, ct) = (codes[s as usize], codes[t as usize]);
    let free = cs ^ ct; // the variables that change
    let inside = |p: u64| (p ^ cs) & !free == 0;
    // First choice: the code of a state that the column sends elsewhere.
    for &(u, v) in pairs {
        if v == t || u == s {
            continue;
        }
        for w in [u, v] {
            let cw = codes[w as usize];
            if cw != cs && inside(cw) {
                return Some((cw, v));
            }
        }
    }
    // Otherwise any shared point but c_s and c_t (their own entries are fixed), nearest
    // to c_s.
    let all = if width >= 64 {
        u64::MAX
    } else {
        (1u64 << width) - 1
    };
    for &(u, v) in pairs {
        if v == t || u == s || u == t || v == s {
            continue;
        }
        let (cu, cv) = (codes[u as usize], codes[v as usize]);
        if !subcubes_meet(cs, ct, cu, cv) {
            continue;
        }
        let fixed_i = (!free | !(cu ^ cv)) & all; // fixed in the intersection
        let val_i = (cs & !free) | (cu & !(cu ^ cv));
        let p0 = (cs & !fixed_i) | (val_i & fixed_i);
        let ok = |p: u64| p != cs && p != ct;
        if ok(p0) {
            return Some((p0, v));
        }
        // Flip one open variable of the intersection, lowest-numbered first.
        let open = !fixed_i & all;
        for var in 0..width {
            let m = 1u64 << (width - 1 - var);
            if open & m != 0 && ok(p0 ^ m) {
                return Some((p0 ^ m, v));
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    /// CHECK RACE-1 (methods.md §3.2): three rows a, b, c with a = 00, c = 11; `a -> c`
    /// may pass through b's code, so it is critical; `c -> a` with no other state's code
    /// on its path is not. Source: the "race-free state assignment, three-row flow-table
    /// example" textbook page cited there. The table itself is our own shape of that
    /// situation: b stable where a goes to c; in the other column c goes back to a and b
    /// is unspecified.
    #[test]
    fn race1() {
        let p = Problem::new(3, vec![vec![(0, 2), (1, 1), (2, 2)], vec![(0, 0), (2, 0)]]);
        let r = analyze_problem(&p, &[0b00, 0b01, 0b11], 2);
        assert_eq!(r.critical.len(), 1);
        let c = &r.critical[0];
        assert_eq!(
            (c.state.index(), c.to.index(), c.ends_in.index()),
            (0, 2, 1)
        );
        assert_eq!(c.order, vec![0b00, 0b01]);
        assert_eq!(r.noncritical.len(), 1);
        assert_eq!(
            (r.noncritical[0].state.index(), r.noncritical[0].to.index()),
            (2, 0)
        );
    }
}
