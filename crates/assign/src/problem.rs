//! The assignment problem as plain data: for every column, its transition pairs.
//!
//! Every algorithm of this crate works on a [`Problem`], so it can be driven without a
//! flow table (tests, universal constructions). [`Problem::from_table`] builds one from a
//! normal table.

use crate::AssignError;
use stillpoint_table::{ColumnId, FlowTable, StateId};

/// The states are `0..num_states`; `columns[c]` lists the transition pairs
/// `(source, destination)` of one column, `(t, t)` for a stable entry.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Problem {
    pub(crate) num_states: usize,
    pub(crate) columns: Vec<Column>,
}

/// One column's pairs, with the table column it came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Column {
    pub(crate) id: usize,
    pub(crate) pairs: Vec<(u32, u32)>,
}

impl Problem {
    /// A problem from explicit pairs (column ids are the positions).
    #[cfg(test)]
    pub(crate) fn new(num_states: usize, columns: Vec<Vec<(u32, u32)>>) -> Problem {
        Problem {
            num_states,
            columns: columns
                .into_iter()
                .enumerate()
                .map(|(id, pairs)| Column { id, pairs })
                .collect(),
        }
    }

    /// The transition pairs of a table, which must be normal (every unstable entry leads
    /// to a state stable in that column). Pairs are listed in row order.
    pub(crate) fn from_table(table: &FlowTable) -> Result<Problem, AssignError> {
        let mut columns = Vec::with_capacity(table.num_columns());
        for c in table.columns() {
            let mut pairs = Vec::new();
            for s in table.states() {
                if let Some(t) = table.next(s, c) {
                    if t != s && !table.is_stable(t, c) {
                        return Err(AssignError::NotNormal {
                            state: table.state_name(s).to_string(),
                            column: table.column_label(c).to_string(),
                            next: table.state_name(t).to_string(),
                        });
                    }
                    pairs.push((s.index() as u32, t.index() as u32));
                }
            }
            columns.push(Column {
                id: c.index(),
                pairs,
            });
        }
        Ok(Problem {
            num_states: table.num_states(),
            columns,
        })
    }

    /// Adds, for every column, the separations that keep the outputs of the table free of
    /// hazards while the state moves. Tracey's rule lets the sub-cubes of two entries
    /// `s -> t` and `u -> t` of a column overlap (they share the destination), but the code
    /// of `u` must lie outside `[c_s, c_t]` when the point of `u` in that column would
    /// spoil the output the move `s -> t` shows:
    ///
    /// - the move shows a steady value on an output (its start, the unstable entry of `s`,
    ///   and the destination agree, or one of them is free) and the entry of `u` specifies
    ///   the other value there (a function hazard otherwise);
    /// - the move changes an output (the entry of `s` specifies the old value, the
    ///   destination the new one): every product that meets the sub-cube must then hold
    ///   its 1-end (Nowick & Dill), and the product that carries `u`'s own input change
    ///   through its point would have to reach over the other column onto the 1-end, in
    ///   general onto points where the output is 0. So any `u` whose point carries a value
    ///   (an entry to `t`, or a specified output) is kept out of the sub-cube.
    ///
    /// Rows whose entry in the column is unspecified count when they specify an output
    /// there. Each need is added as a pseudo column `[(s, t), (u, u)]`, which Tracey's rule
    /// turns into the dichotomy `{s, t} | {u}`.
    pub(crate) fn add_output_separations(&mut self, table: &FlowTable) {
        use stillpoint_table::OutBit;
        let spec = |b: OutBit| match b {
            OutBit::Zero => Some(false),
            OutBit::One => Some(true),
            OutBit::Free => None,
        };
        let mut extra = Vec::new();
        for c in table.columns() {
            for s in table.states() {
                let Some(t) = table.next(s, c).filter(|&t| t != s) else {
                    continue;
                };
                let (os, ot) = (table.outputs(s, c), table.outputs(t, c));
                for u in table.states() {
                    if u == s || u == t {
                        continue;
                    }
                    let un = table.next(u, c);
                    if un.is_some() && un != Some(t) {
                        continue; // a different destination: Tracey's rule separates them
                    }
                    let ou = table.outputs(u, c);
                    let clash = (0..os.len()).any(|j| {
                        let (vs, vt) = (spec(os[j]), spec(ot[j]));
                        let vu = spec(ou[j]);
                        match (vs, vt) {
                            (Some(a), Some(b)) if a != b => vu.is_some() || un.is_some(),
                            _ => match (vt.or(vs), vu) {
                                (Some(shown), Some(v)) => shown != v,
                                _ => false,
                            },
                        }
                    });
                    if clash {
                        let (s, t, u) = (s.index() as u32, t.index() as u32, u.index() as u32);
                        extra.push(Column {
                            id: c.index(),
                            pairs: vec![(s, t), (u, u)],
                        });
                    }
                }
            }
        }
        self.columns.extend(extra);
    }

    /// The undirected edges `{s, t}` (`s != t`) of every transition, sorted, once each.
    pub(crate) fn transition_edges(&self) -> Vec<(u32, u32)> {
        let mut e: Vec<(u32, u32)> = self
            .columns
            .iter()
            .flat_map(|c| c.pairs.iter())
            .filter(|(s, t)| s != t)
            .map(|&(s, t)| (s.min(t), s.max(t)))
            .collect();
        e.sort_unstable();
        e.dedup();
        e
    }
}

/// The table's state with this index.
pub(crate) fn sid(i: u32) -> StateId {
    StateId::from_index(i as usize)
}

/// The table's column with this index.
pub(crate) fn cid(i: usize) -> ColumnId {
    ColumnId::from_index(i)
}
