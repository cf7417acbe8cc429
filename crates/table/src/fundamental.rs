//! Fundamental-mode analysis: where each entry settles, chains of unstable entries and
//! their collapse, oscillations, unreachable rows, and the transition lists that state
//! assignment needs.
//!
//! Settling follows `s, N(s,x), N(N(s,x),x), ...` in one column until a stable entry
//! (the entry settles there), an unspecified entry (it dangles) or a repeated row (the
//! column oscillates). Each column is resolved once with a three-colour walk of the
//! functional graph `s -> N(s,x)`, memoised, so the whole table costs O(rows x columns)
//! (Huffman's fundamental mode; the collapse is common practice).

use crate::error::CollapseError;
use crate::ids::{ColumnId, InputId, StateId};
use crate::table::{FlowTable, OutBit};

/// Where an entry settles when its column is held.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum Settle {
    /// The entry is unspecified (no next state).
    Unspecified,
    /// The chain ends in this state, stable in the column.
    Stable(StateId),
    /// The chain reaches an unspecified entry.
    Dangling,
    /// The chain runs into the cycle with this index (see [`Settling::cycles`]).
    Oscillates(usize),
}

/// Every entry's [`Settle`], computed once for a table.
#[derive(Clone, Debug)]
pub struct Settling {
    nc: usize,
    ends: Vec<Settle>,
    /// The cycles found: (column, states of the cycle starting at its first row in row
    /// order).
    pub cycles: Vec<(ColumnId, Vec<StateId>)>,
}

impl Settling {
    /// Resolves every entry of `t`.
    pub fn of(t: &FlowTable) -> Settling {
        let ns = t.num_states();
        let nc = t.num_columns();
        let mut ends = vec![Settle::Unspecified; ns * nc];
        let mut cycles = Vec::new();
        let mut colour = vec![0u8; ns]; // 0 new, 1 on the current walk, 2 done
        let mut walk: Vec<StateId> = Vec::new();
        for c in t.columns() {
            colour.iter_mut().for_each(|x| *x = 0);
            for s0 in t.states() {
                if colour[s0.index()] != 0 {
                    continue;
                }
                walk.clear();
                let mut s = s0;
                let result = loop {
                    match colour[s.index()] {
                        2 => break ends[s.index() * nc + c.index()],
                        1 => {
                            let from = walk.iter().position(|&w| w == s).unwrap_or(0);
                            let mut cyc: Vec<StateId> = walk[from..].to_vec();
                            let m = cyc
                                .iter()
                                .enumerate()
                                .min_by_key(|(_, x)| **x)
                                .map_or(0, |(i, _)| i);
                            cyc.rotate_left(m);
                            cycles.push((c, cyc));
                            break Settle::Oscillates(cycles.len() - 1);
                        }
                        _ => {}
                    }
                    colour[s.index()] = 1;
                    walk.push(s);
                    match t.next(s, c) {
                        None => break Settle::Unspecified,
                        Some(n) if n == s => break Settle::Stable(s),
                        Some(n) => s = n,
                    }
                };
                for &w in &walk {
                    colour[w.index()] = 2;
                    ends[w.index() * nc + c.index()] = match result {
                        _ if t.next(w, c).is_none() => Settle::Unspecified,
                        Settle::Unspecified | Settle::Dangling => Settle::Dangling,
                        r => r,
                    };
                }
            }
        }
        Settling { nc, ends, cycles }
    }

    /// Where entry `(s, c)` settles.
    pub fn get(&self, s: StateId, c: ColumnId) -> Settle {
        self.ends[s.index() * self.nc + c.index()]
    }

    /// The stable state the entry settles in, if it does.
    pub fn stable(&self, s: StateId, c: ColumnId) -> Option<StateId> {
        match self.get(s, c) {
            Settle::Stable(t) => Some(t),
            _ => None,
        }
    }
}

/// A multi-step transition: from `state` in `column` through `path` (which starts with
/// `state` and ends with the stable state reached; at least three rows).
#[derive(Clone, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Chain {
    /// The row where the chain starts.
    pub state: StateId,
    /// The column held.
    pub column: ColumnId,
    /// The rows passed, from `state` to the stable row.
    pub path: Vec<StateId>,
}

/// A cycle of unstable entries in one column.
#[derive(Clone, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Oscillation {
    /// The first row of the cycle in row order.
    pub state: StateId,
    /// The column holding it.
    pub column: ColumnId,
    /// The cycle's rows, from `state`, each leading to the next and the last to `state`.
    pub cycle: Vec<StateId>,
}

/// The result of [`analyze`].
#[derive(Clone, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Analysis {
    /// Multi-step transitions (chains), in column order then row order.
    pub chains: Vec<Chain>,
    /// Cycles of unstable entries; any makes the table unrealizable.
    pub oscillations: Vec<Oscillation>,
    /// Unreachable rows: with a reset state, rows no sequence of entries reaches from it;
    /// without, rows that have no stable entry and that no entry leads to.
    pub unreachable: Vec<StateId>,
    /// Listed columns in which no row is stable.
    pub columns_without_stable: Vec<ColumnId>,
    /// Rows that are stable in no listed column.
    pub rows_without_stable: Vec<StateId>,
    /// Human-readable warnings (lost output pulses, dangling chains, the lists above).
    pub warnings: Vec<String>,
    /// The number of stable entries.
    pub stable_entries: usize,
    /// True when no column holds an oscillation.
    pub realizable: bool,
}

fn path_of(t: &FlowTable, s: StateId, c: ColumnId) -> Vec<StateId> {
    let mut p = vec![s];
    let mut x = s;
    while let Some(n) = t.next(x, c) {
        if n == x || p.len() > t.num_states() {
            break;
        }
        p.push(n);
        x = n;
    }
    p
}

fn names(t: &FlowTable, v: &[StateId]) -> String {
    v.iter()
        .map(|&s| t.state_name(s))
        .collect::<Vec<_>>()
        .join(" -> ")
}

/// Checks a table for fundamental-mode operation.
///
/// # Complexity
/// O(rows x columns x outputs) plus the length of the reported chains.
///
/// # Example
/// ```
/// use stillpoint_table::{analyze, parse_text};
/// // column 1: a -> b -> c, c stable: one chain a, b, c
/// let t = parse_text("inputs x\n   0    1\na  (a)  b\nb  a    c\nc  a    (c)\n")?;
/// let r = analyze(&t);
/// assert!(r.realizable);
/// assert_eq!(r.chains.len(), 1);
/// assert_eq!(r.chains[0].path.len(), 3);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn analyze(t: &FlowTable) -> Analysis {
    let st = Settling::of(t);
    let mut warnings = Vec::new();
    let mut stable_entries = 0;
    let mut chains = Vec::new();
    for c in t.columns() {
        for s in t.states() {
            if t.is_stable(s, c) {
                stable_entries += 1;
                continue;
            }
            let Some(n) = t.next(s, c) else { continue };
            match st.get(s, c) {
                Settle::Stable(end) if end != n => {
                    let path = path_of(t, s, c);
                    // outputs specified along the way that neither end keeps
                    let first = t.outputs(s, c);
                    let last = t.outputs(end, c);
                    let lost = path[1..path.len() - 1].iter().any(|&m| {
                        t.outputs(m, c)
                            .iter()
                            .enumerate()
                            .any(|(j, &b)| b != OutBit::Free && b != first[j] && b != last[j])
                    });
                    if lost {
                        warnings.push(format!(
                            "chain {} in column {} passes through an output value that neither its first nor its last row gives; collapsing it drops that output pulse",
                            names(t, &path),
                            t.column_label(c)
                        ));
                    }
                    chains.push(Chain {
                        state: s,
                        column: c,
                        path,
                    });
                }
                Settle::Dangling => {
                    let path = path_of(t, s, c);
                    warnings.push(format!(
                        "entry of {} in column {} leads through {} to an unspecified entry; collapsing leaves its next state unspecified",
                        t.state_name(s),
                        t.column_label(c),
                        names(t, &path)
                    ));
                }
                _ => {}
            }
        }
    }
    let oscillations: Vec<Oscillation> = st
        .cycles
        .iter()
        .map(|(c, cyc)| Oscillation {
            state: cyc[0],
            column: *c,
            cycle: cyc.clone(),
        })
        .collect();
    let columns_without_stable: Vec<ColumnId> = t
        .columns()
        .filter(|&c| !t.states().any(|s| t.is_stable(s, c)))
        .collect();
    let rows_without_stable: Vec<StateId> = t
        .states()
        .filter(|&s| !t.columns().any(|c| t.is_stable(s, c)))
        .collect();
    let unreachable = unreachable_rows(t);
    for c in &columns_without_stable {
        warnings.push(format!("column {} has no stable entry", t.column_label(*c)));
    }
    for s in &rows_without_stable {
        warnings.push(format!("row {} is stable in no column", t.state_name(*s)));
    }
    if !unreachable.is_empty() {
        let how = if let Some(r) = t.reset() {
            format!("cannot be reached from the reset state {}", t.state_name(r))
        } else {
            "have no stable entry and no entry leads to them".to_string()
        };
        let list: Vec<&str> = unreachable.iter().map(|&s| t.state_name(s)).collect();
        warnings.push(format!("rows {} {how}", list.join(", ")));
    }
    let realizable = oscillations.is_empty();
    Analysis {
        chains,
        oscillations,
        unreachable,
        columns_without_stable,
        rows_without_stable,
        warnings,
        stable_entries,
        realizable,
    }
}

/// Unreachable rows as [`Analysis::unreachable`] defines them.
pub fn unreachable_rows(t: &FlowTable) -> Vec<StateId> {
    let ns = t.num_states();
    let mut hit = vec![false; ns];
    match t.reset() {
        Some(r) => {
            let mut stack = vec![r];
            hit[r.index()] = true;
            while let Some(s) = stack.pop() {
                for c in t.columns() {
                    if let Some(n) = t.next(s, c) {
                        if !hit[n.index()] {
                            hit[n.index()] = true;
                            stack.push(n);
                        }
                    }
                }
            }
        }
        None => {
            for s in t.states() {
                for c in t.columns() {
                    if let Some(n) = t.next(s, c) {
                        hit[n.index()] = true;
                    }
                }
            }
            for s in t.states() {
                if t.columns().any(|c| t.is_stable(s, c)) {
                    hit[s.index()] = true;
                }
            }
        }
    }
    t.states().filter(|s| !hit[s.index()]).collect()
}

fn collapse_error(t: &FlowTable, c: ColumnId, cyc: &[StateId]) -> CollapseError {
    let mut shown = cyc.to_vec();
    shown.push(cyc[0]);
    CollapseError {
        state: cyc[0],
        column: c,
        cycle: cyc.to_vec(),
        state_name: t.state_name(cyc[0]).to_string(),
        column_label: t.column_label(c).to_string(),
        cycle_text: names(t, &shown),
    }
}

/// The normal table: every unstable entry replaced by the stable row its chain ends in;
/// entries whose chain reaches an unspecified entry get an unspecified next state.
/// Outputs are kept as given (the first row's output of each chain).
///
/// # Errors
/// A [`CollapseError`] naming the first oscillation (by column, then row).
///
/// # Example
/// ```
/// use stillpoint_table::{collapse_chains, parse_text};
/// let t = parse_text("inputs x\n   0    1\na  (a)  b\nb  a    c\nc  a    (c)\n")?;
/// let n = collapse_chains(&t)?;
/// assert!(n.is_normal());
/// let (a, one) = (n.state_by_name("a").unwrap(), n.column_by_value(1).unwrap());
/// assert_eq!(n.next(a, one), n.state_by_name("c"));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn collapse_chains(t: &FlowTable) -> Result<FlowTable, CollapseError> {
    let st = Settling::of(t);
    if let Some((c, cyc)) = st.cycles.iter().min_by_key(|(c, cyc)| (*c, cyc[0])) {
        return Err(collapse_error(t, *c, cyc));
    }
    let mut next = Vec::with_capacity(t.num_states() * t.num_columns());
    for s in t.states() {
        for c in t.columns() {
            next.push(st.stable(s, c));
        }
    }
    Ok(t.with_next(next))
}

/// The transition pairs of one column.
#[derive(Clone, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ColumnTransitions {
    /// The column.
    pub column: ColumnId,
    /// `(source, destination)` pairs, sorted; `(t, t)` for each stable entry.
    pub pairs: Vec<(StateId, StateId)>,
}

/// For every listed column (in listed order), the pairs `(s, t)` where the entry of `s`
/// settles in the stable row `t` (chains collapsed; for a normal table `t = N(s, x)`),
/// including `(t, t)` for stable entries. Entries that are unspecified, dangle or
/// oscillate are absent.
pub fn column_transitions(t: &FlowTable) -> Vec<ColumnTransitions> {
    let st = Settling::of(t);
    t.columns()
        .map(|c| {
            let mut pairs: Vec<(StateId, StateId)> = t
                .states()
                .filter_map(|s| st.stable(s, c).map(|d| (s, d)))
                .collect();
            pairs.sort();
            ColumnTransitions { column: c, pairs }
        })
        .collect()
}

/// Which input changes the environment may make between stable total states.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum ChangeMode {
    /// One input at a time (to a column at Hamming distance 1).
    Single,
    /// Any change to another listed column.
    Multiple,
}

/// One input change from a stable total state.
#[derive(Copy, Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct TotalTransition {
    /// The row, stable in `from`.
    pub state: StateId,
    /// The column before the change.
    pub from: ColumnId,
    /// The column after the change.
    pub to: ColumnId,
    /// The stable row the entry `(state, to)` settles in.
    pub dest: StateId,
}

/// Every input change the mode allows from a stable total state `(state, from)` to a
/// listed column `to` whose entry for `state` settles in a stable row `dest` (chains
/// collapsed). Sorted by state, then `from`, then `to`. Entries that are unspecified,
/// dangle or oscillate give no transition.
pub fn total_transitions(t: &FlowTable, mode: ChangeMode) -> Vec<TotalTransition> {
    let st = Settling::of(t);
    let mut out = Vec::new();
    for s in t.states() {
        for from in t.columns() {
            if !t.is_stable(s, from) {
                continue;
            }
            for to in t.columns() {
                if to == from {
                    continue;
                }
                let d = (t.column_value(from) ^ t.column_value(to)).count_ones();
                if mode == ChangeMode::Single && d != 1 {
                    continue;
                }
                if let Some(dest) = st.stable(s, to) {
                    out.push(TotalTransition {
                        state: s,
                        from,
                        to,
                        dest,
                    });
                }
            }
        }
    }
    out.sort();
    out
}

/// The input that differs between two columns at Hamming distance 1.
pub fn changed_input(t: &FlowTable, a: ColumnId, b: ColumnId) -> Option<InputId> {
    let x = t.column_value(a) ^ t.column_value(b);
    if x.count_ones() != 1 {
        return None;
    }
    let n = t.num_inputs();
    Some(InputId::from_index(n - 1 - x.trailing_zeros() as usize))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::parse_text;

    #[test]
    fn chain_collapse_check_value() {
        // methods.md §1.2 check value [computed, trivial]: 1->2, 2->3, 3 stable collapse to
        // 1->3, 2->3; 1->2, 2->1 is an oscillation.
        let t =
            parse_text("inputs x\n    0    1\ns1  (s1) s2\ns2  s1   s3\ns3  s1   (s3)\n").unwrap();
        let a = analyze(&t);
        assert!(a.realizable);
        assert_eq!(a.chains.len(), 1);
        let n = collapse_chains(&t).unwrap();
        let one = n.column_by_value(1).unwrap();
        let s3 = n.state_by_name("s3");
        assert_eq!(n.next(n.state_by_name("s1").unwrap(), one), s3);
        assert_eq!(n.next(n.state_by_name("s2").unwrap(), one), s3);
        assert!(n.is_normal());
        let o = parse_text("inputs x\n    0    1\ns1  (s1) s2\ns2  (s2) s1\n").unwrap();
        let a = analyze(&o);
        assert!(!a.realizable);
        assert_eq!(a.oscillations.len(), 1);
        assert_eq!(a.oscillations[0].cycle.len(), 2);
        let e = collapse_chains(&o).unwrap_err();
        assert_eq!(e.state_name, "s1");
        assert!(e.to_string().contains("s1 -> s2 -> s1"), "{e}");
    }

    #[test]
    fn dangling_unreachable_and_warnings() {
        let t = parse_text("inputs x\noutputs z\n   0      1\na  (a)/0  b/-\nb  -      c/1\nc  -      -/0\nd  a/-    -\n")
            .unwrap();
        let a = analyze(&t);
        assert!(a.realizable);
        assert_eq!(a.unreachable, vec![t.state_by_name("d").unwrap()]);
        assert!(
            a.warnings.iter().any(|w| w.contains("unspecified entry")),
            "{:?}",
            a.warnings
        );
        assert_eq!(a.rows_without_stable.len(), 3);
        assert_eq!(
            a.columns_without_stable,
            vec![t.column_by_value(1).unwrap()]
        );
        let n = collapse_chains(&t).unwrap();
        let one = n.column_by_value(1).unwrap();
        assert_eq!(n.next(n.state_by_name("a").unwrap(), one), None);
        let r = parse_text("inputs x\nreset a\n   0    1\na  (a)  b\nb  a    (b)\nc  (c)  b\n")
            .unwrap();
        assert_eq!(analyze(&r).unreachable, vec![r.state_by_name("c").unwrap()]);
    }

    #[test]
    fn lost_output_pulse_is_flagged() {
        let t = parse_text(
            "inputs x\noutputs z\n   0      1\na  (a)/0  b/0\nb  a/-    c/1\nc  a/-    (c)/0\n",
        )
        .unwrap();
        assert!(analyze(&t).warnings.iter().any(|w| w.contains("pulse")));
    }

    #[test]
    fn transitions() {
        let t = parse_text(
            "inputs x y\n   00   01   11   10\na  (a)  b    -    a\nb  a    (b)  (b)  -\n",
        )
        .unwrap();
        let ct = column_transitions(&t);
        assert_eq!(ct.len(), 4);
        let (a, b) = (t.state_by_name("a").unwrap(), t.state_by_name("b").unwrap());
        assert_eq!(ct[0].pairs, vec![(a, a), (b, a)]);
        let single = total_transitions(&t, ChangeMode::Single);
        let multi = total_transitions(&t, ChangeMode::Multiple);
        assert!(single.len() < multi.len());
        assert!(single
            .iter()
            .all(|x| changed_input(&t, x.from, x.to).is_some()));
    }
}

#[cfg(test)]
mod settle_tests {
    use super::*;
    use crate::parse_text;

    /// Settling by plain step-by-step walking, as an independent check.
    fn naive(t: &FlowTable, s: StateId, c: ColumnId) -> Settle {
        let Some(mut x) = t.next(s, c) else {
            return Settle::Unspecified;
        };
        let mut x_prev = s;
        for _ in 0..=t.num_states() {
            if x == x_prev {
                return Settle::Stable(x);
            }
            match t.next(x, c) {
                None => return Settle::Dangling,
                Some(n) => {
                    x_prev = x;
                    x = n;
                }
            }
        }
        Settle::Oscillates(0)
    }

    #[test]
    fn memoised_walk_agrees_with_naive_walk() {
        let t =
            parse_text("inputs x\n   0   1\na  b   b\nb  c   (b)\nc  -   a\nd  a   e\ne  d   d\n")
                .unwrap();
        let st = Settling::of(&t);
        for s in t.states() {
            for c in t.columns() {
                let (x, y) = (st.get(s, c), naive(&t, s, c));
                match (x, y) {
                    (Settle::Oscillates(_), Settle::Oscillates(_)) => {}
                    _ => assert_eq!(x, y, "{s:?} {c:?}"),
                }
            }
        }
    }
}
