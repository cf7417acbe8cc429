//! The flow-table model: [`FlowTable`], validated once at construction, and its
//! [`FlowTableBuilder`].

use crate::error::{NameKind, TableError};
use crate::ids::{ColumnId, OutputId, StateId};
use crate::limits;
use std::collections::BTreeMap;

/// One output bit of an entry: `0`, `1` or `-` (unspecified).
#[derive(Copy, Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub enum OutBit {
    /// `0`.
    Zero,
    /// `1`.
    One,
    /// `-`: not specified.
    Free,
}

impl OutBit {
    /// The character of the text form.
    pub fn to_char(self) -> char {
        match self {
            OutBit::Zero => '0',
            OutBit::One => '1',
            OutBit::Free => '-',
        }
    }

    /// Reads `0`, `1` or `-`.
    pub fn from_char(c: char) -> Option<OutBit> {
        match c {
            '0' => Some(OutBit::Zero),
            '1' => Some(OutBit::One),
            '-' => Some(OutBit::Free),
            _ => None,
        }
    }

    /// Whether two bits conflict (one `0`, the other `1`).
    pub fn conflicts(self, other: OutBit) -> bool {
        matches!(
            (self, other),
            (OutBit::Zero, OutBit::One) | (OutBit::One, OutBit::Zero)
        )
    }

    /// The specified one of two compatible bits (`self` when both are specified).
    pub fn merge(self, other: OutBit) -> OutBit {
        if self == OutBit::Free {
            other
        } else {
            self
        }
    }
}

/// Whether `s` is `[A-Za-z_][A-Za-z0-9_]*`.
pub fn is_valid_name(s: &str) -> bool {
    let mut chars = s.chars();
    match chars.next() {
        Some(c) if c.is_ascii_alphabetic() || c == '_' => {}
        _ => return false,
    }
    chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

/// An output string as bits, `""` meaning all unspecified.
pub(crate) fn out_bits(s: &str, width: usize) -> Result<Vec<OutBit>, (usize, bool)> {
    if s.is_empty() {
        return Ok(vec![OutBit::Free; width]);
    }
    let len = s.chars().count();
    if len != width {
        return Err((len, false));
    }
    s.chars()
        .map(|c| OutBit::from_char(c).ok_or((len, true)))
        .collect()
}

/// A fundamental-mode flow table: rows (internal states) by listed input columns, each
/// entry a next state (or unspecified) and one bit per output (each possibly unspecified).
///
/// Built only by [`FlowTableBuilder`], [`crate::parse_text`] or [`crate::parse_json`], which
/// check it once; its fields are private, so every later stage can rely on the invariants:
/// at least one input and one state, valid and unique names, distinct column labels of the
/// right length, every next state a row, the limits of [`crate::limits`].
///
/// Equality is structural: two tables are equal when they have the same name, inputs,
/// outputs, rows, listed columns (in the same order), entries and reset state. A listed
/// column whose entries are all unspecified means the same, behaviourally, as an unlisted
/// one; [`FlowTable::same_behaviour`] compares in that sense. Both printers keep every
/// listed column, so parsing a printed table gives back an equal table.
///
/// # Example
/// ```
/// use stillpoint_table::parse_text;
/// let t = parse_text(
///     "inputs go\noutputs busy\n      0        1\n\
///      idle  (idle)/0  run/-\n\
///      run   idle/-    (run)/1\n",
/// )?;
/// let run = t.state_by_name("run").unwrap();
/// let one = t.column_by_value(1).unwrap();
/// assert!(t.is_stable(run, one));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FlowTable {
    name: Option<String>,
    inputs: Vec<String>,
    outputs: Vec<String>,
    states: Vec<String>,
    columns: Vec<u32>,
    labels: Vec<String>,
    col_lookup: Vec<(u32, ColumnId)>,
    state_lookup: BTreeMap<String, StateId>,
    next: Vec<Option<StateId>>,
    out: Vec<OutBit>,
    reset: Option<StateId>,
}

/// The column label of value `v` over `n` inputs (first input = most significant bit).
pub fn label_of(v: u32, n: usize) -> String {
    (0..n)
        .map(|i| if v >> (n - 1 - i) & 1 == 1 { '1' } else { '0' })
        .collect()
}

/// The value of a label of `0`/`1` characters, or `None` for other characters or more than
/// 32 of them.
pub fn value_of(label: &str) -> Option<u32> {
    if label.is_empty() || label.len() > 32 {
        return None;
    }
    let mut v = 0u32;
    for c in label.chars() {
        v = (v << 1)
            | match c {
                '0' => 0,
                '1' => 1,
                _ => return None,
            };
    }
    Some(v)
}

pub(crate) struct Parts {
    pub name: Option<String>,
    pub inputs: Vec<String>,
    pub outputs: Vec<String>,
    pub states: Vec<String>,
    pub columns: Vec<u32>,
    pub next: Vec<Option<StateId>>,
    pub out: Vec<OutBit>,
    pub reset: Option<StateId>,
}

fn check_names(kind: NameKind, names: &[String]) -> Result<(), TableError> {
    let mut seen = std::collections::BTreeSet::new();
    for n in names {
        if !is_valid_name(n) {
            return Err(TableError::BadName {
                kind,
                name: n.clone(),
            });
        }
        if !seen.insert(n.as_str()) {
            return Err(TableError::DuplicateName {
                kind,
                name: n.clone(),
            });
        }
    }
    Ok(())
}

/// Checks the sizes that every constructor refuses beyond the limits.
pub(crate) fn check_sizes(
    inputs: usize,
    outputs: usize,
    states: usize,
    columns: usize,
) -> Result<(), TableError> {
    if inputs == 0 {
        return Err(TableError::NoInputs);
    }
    if inputs > limits::MAX_INPUTS {
        return Err(TableError::TooManyInputs {
            count: inputs,
            max: limits::MAX_INPUTS,
        });
    }
    if outputs > limits::MAX_OUTPUTS {
        return Err(TableError::TooManyOutputs {
            count: outputs,
            max: limits::MAX_OUTPUTS,
        });
    }
    if states == 0 {
        return Err(TableError::NoStates);
    }
    if columns == 0 {
        return Err(TableError::NoColumns);
    }
    if states > limits::MAX_STATES {
        return Err(TableError::TooManyStates {
            count: states,
            max: limits::MAX_STATES,
        });
    }
    if states.saturating_mul(columns) > limits::MAX_ENTRIES {
        return Err(TableError::TooManyEntries {
            states,
            columns,
            max: limits::MAX_ENTRIES,
        });
    }
    Ok(())
}

impl FlowTable {
    /// Builds from raw parts, checking every invariant.
    pub(crate) fn from_parts(p: Parts) -> Result<FlowTable, TableError> {
        let n_in = p.inputs.len();
        check_sizes(n_in, p.outputs.len(), p.states.len(), p.columns.len())?;
        if let Some(name) = &p.name {
            if !is_valid_name(name) {
                return Err(TableError::BadName {
                    kind: NameKind::Table,
                    name: name.clone(),
                });
            }
        }
        check_names(NameKind::Input, &p.inputs)?;
        check_names(NameKind::Output, &p.outputs)?;
        check_names(NameKind::State, &p.states)?;
        let mut col_lookup = Vec::with_capacity(p.columns.len());
        for (i, &v) in p.columns.iter().enumerate() {
            if (v as u64) >> n_in != 0 {
                return Err(TableError::LabelLength {
                    label: format!("{v:b}"),
                    len: format!("{v:b}").len(),
                    expected: n_in,
                });
            }
            col_lookup.push((v, ColumnId::from_index(i)));
        }
        col_lookup.sort();
        for w in col_lookup.windows(2) {
            if w[0].0 == w[1].0 {
                return Err(TableError::DuplicateColumn {
                    label: label_of(w[0].0, n_in),
                });
            }
        }
        let ns = p.states.len();
        let nc = p.columns.len();
        assert_eq!(
            p.next.len(),
            ns * nc,
            "next has one entry per state and column"
        );
        assert_eq!(
            p.out.len(),
            ns * nc * p.outputs.len(),
            "out has one bit per entry and output"
        );
        if let Some(bad) = p.next.iter().flatten().find(|s| s.index() >= ns) {
            return Err(TableError::UnknownState {
                name: format!("#{}", bad.index()),
            });
        }
        if let Some(r) = p.reset {
            if r.index() >= ns {
                return Err(TableError::UnknownState {
                    name: format!("#{}", r.index()),
                });
            }
        }
        let labels = p.columns.iter().map(|&v| label_of(v, n_in)).collect();
        let state_lookup = p
            .states
            .iter()
            .enumerate()
            .map(|(i, s)| (s.clone(), StateId::from_index(i)))
            .collect();
        Ok(FlowTable {
            name: p.name,
            inputs: p.inputs,
            outputs: p.outputs,
            states: p.states,
            columns: p.columns,
            labels,
            col_lookup,
            state_lookup,
            next: p.next,
            out: p.out,
            reset: p.reset,
        })
    }

    /// The table's name (`table NAME`), if given.
    pub fn name(&self) -> Option<&str> {
        self.name.as_deref()
    }

    /// The input variables, in column-label order.
    pub fn input_names(&self) -> &[String] {
        &self.inputs
    }

    /// The output variables, in entry order.
    pub fn output_names(&self) -> &[String] {
        &self.outputs
    }

    /// Number of input variables.
    pub fn num_inputs(&self) -> usize {
        self.inputs.len()
    }

    /// Number of output variables.
    pub fn num_outputs(&self) -> usize {
        self.outputs.len()
    }

    /// Number of rows.
    pub fn num_states(&self) -> usize {
        self.states.len()
    }

    /// Number of listed columns.
    pub fn num_columns(&self) -> usize {
        self.columns.len()
    }

    /// The rows in row order.
    pub fn states(&self) -> impl Iterator<Item = StateId> + '_ {
        (0..self.states.len()).map(StateId::from_index)
    }

    /// The listed columns in listed order.
    pub fn columns(&self) -> impl Iterator<Item = ColumnId> + '_ {
        (0..self.columns.len()).map(ColumnId::from_index)
    }

    /// The outputs in order.
    pub fn output_ids(&self) -> impl Iterator<Item = OutputId> + '_ {
        (0..self.outputs.len()).map(OutputId::from_index)
    }

    /// The names of all rows, in row order.
    pub fn state_names(&self) -> &[String] {
        &self.states
    }

    /// A row's name.
    pub fn state_name(&self, s: StateId) -> &str {
        &self.states[s.index()]
    }

    /// The row of this name.
    pub fn state_by_name(&self, name: &str) -> Option<StateId> {
        self.state_lookup.get(name).copied()
    }

    /// A column's label: one `0`/`1` per input, `input_names()[0]` first.
    pub fn column_label(&self, c: ColumnId) -> &str {
        &self.labels[c.index()]
    }

    /// A column's label read as a binary number, the first input the most significant bit.
    pub fn column_value(&self, c: ColumnId) -> u32 {
        self.columns[c.index()]
    }

    /// The listed column of this value, if listed.
    pub fn column_by_value(&self, v: u32) -> Option<ColumnId> {
        self.col_lookup
            .binary_search_by_key(&v, |&(x, _)| x)
            .ok()
            .map(|i| self.col_lookup[i].1)
    }

    /// The listed column of this label, if listed.
    pub fn column_by_label(&self, label: &str) -> Option<ColumnId> {
        if label.len() != self.inputs.len() {
            return None;
        }
        value_of(label).and_then(|v| self.column_by_value(v))
    }

    #[inline]
    fn at(&self, s: StateId, c: ColumnId) -> usize {
        s.index() * self.columns.len() + c.index()
    }

    /// The next state of an entry, `None` when unspecified.
    pub fn next(&self, s: StateId, c: ColumnId) -> Option<StateId> {
        self.next[self.at(s, c)]
    }

    /// The output bits of an entry, one per output.
    pub fn outputs(&self, s: StateId, c: ColumnId) -> &[OutBit] {
        let k = self.outputs.len();
        let i = self.at(s, c) * k;
        &self.out[i..i + k]
    }

    /// The output bits of an entry as a string of `0`, `1`, `-`.
    pub fn output_string(&self, s: StateId, c: ColumnId) -> String {
        self.outputs(s, c).iter().map(|b| b.to_char()).collect()
    }

    /// Whether the entry names its own row.
    pub fn is_stable(&self, s: StateId, c: ColumnId) -> bool {
        self.next(s, c) == Some(s)
    }

    /// Whether the entry says nothing: no next state and every output unspecified.
    pub fn is_unspecified(&self, s: StateId, c: ColumnId) -> bool {
        self.next(s, c).is_none() && self.outputs(s, c).iter().all(|&b| b == OutBit::Free)
    }

    /// The reset state, if given.
    pub fn reset(&self) -> Option<StateId> {
        self.reset
    }

    /// Whether every unstable entry leads to a row that is stable in the same column.
    pub fn is_normal(&self) -> bool {
        self.states().all(|s| {
            self.columns().all(|c| match self.next(s, c) {
                Some(t) => self.is_stable(t, c),
                None => true,
            })
        })
    }

    /// Whether two tables specify the same behaviour: same inputs, outputs, rows and reset,
    /// and the same entries in every input combination, where an unlisted combination counts
    /// as wholly unspecified. Names of the tables and the order of listed columns are
    /// ignored.
    pub fn same_behaviour(&self, other: &FlowTable) -> bool {
        if self.inputs != other.inputs
            || self.outputs != other.outputs
            || self.states != other.states
            || self.reset != other.reset
        {
            return false;
        }
        let side = |a: &FlowTable, b: &FlowTable| {
            a.columns()
                .all(|c| match b.column_by_value(a.column_value(c)) {
                    Some(d) => a.states().all(|s| {
                        a.next(s, c) == b.next(s, d) && a.outputs(s, c) == b.outputs(s, d)
                    }),
                    None => a.states().all(|s| a.is_unspecified(s, c)),
                })
        };
        side(self, other) && side(other, self)
    }

    /// A copy with other next states (same shape), used by chain collapsing.
    pub(crate) fn with_next(&self, next: Vec<Option<StateId>>) -> FlowTable {
        assert_eq!(next.len(), self.next.len(), "same shape");
        FlowTable {
            next,
            ..self.clone()
        }
    }

    /// The canonical text form (see [`crate::text`]).
    pub fn to_text(&self) -> String {
        crate::text::print_text(self)
    }

    /// The JSON form of the formats contract (see [`crate::json`]).
    pub fn to_json(&self) -> String {
        crate::json::print_json(self)
    }
}

/// Builds a [`FlowTable`] from names, for library users and tests.
///
/// Rows and columns appear in the order they are first mentioned (by [`state`](Self::state),
/// [`column`](Self::column) or an entry naming them). Entries not given are unspecified.
/// Errors are collected and reported by [`build`](Self::build) (the first one).
///
/// # Example
/// ```
/// use stillpoint_table::FlowTableBuilder;
/// // inputs a; outputs z
/// //        0        1
/// // lo   (lo)/0    hi/-
/// // hi    lo/-    (hi)/1
/// let t = FlowTableBuilder::new(["a"], ["z"])
///     .name("toggle")
///     .entry("lo", "0", Some("lo"), "0")
///     .entry("lo", "1", Some("hi"), "")
///     .entry("hi", "0", Some("lo"), "-")
///     .entry("hi", "1", Some("hi"), "1")
///     .reset("lo")
///     .build()?;
/// assert_eq!(t.num_states(), 2);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Clone, Debug)]
pub struct FlowTableBuilder {
    name: Option<String>,
    inputs: Vec<String>,
    outputs: Vec<String>,
    states: Vec<String>,
    columns: Vec<String>,
    entries: Vec<(String, String, Option<String>, String)>,
    reset: Option<String>,
}

impl FlowTableBuilder {
    /// A builder for a table over these inputs and outputs.
    pub fn new<I, O>(inputs: I, outputs: O) -> Self
    where
        I: IntoIterator,
        I::Item: Into<String>,
        O: IntoIterator,
        O::Item: Into<String>,
    {
        FlowTableBuilder {
            name: None,
            inputs: inputs.into_iter().map(Into::into).collect(),
            outputs: outputs.into_iter().map(Into::into).collect(),
            states: Vec::new(),
            columns: Vec::new(),
            entries: Vec::new(),
            reset: None,
        }
    }

    /// Sets the table's name.
    pub fn name(&mut self, name: &str) -> &mut Self {
        self.name = Some(name.to_string());
        self
    }

    /// Adds a row (if not already there).
    pub fn state(&mut self, name: &str) -> &mut Self {
        if !self.states.iter().any(|s| s == name) {
            self.states.push(name.to_string());
        }
        self
    }

    /// Lists a column by its label (if not already listed).
    pub fn column(&mut self, label: &str) -> &mut Self {
        if !self.columns.iter().any(|s| s == label) {
            self.columns.push(label.to_string());
        }
        self
    }

    /// Sets the entry of `state` in column `column`: its next state (`None` unspecified)
    /// and its outputs (one `0`/`1`/`-` per output; `""` for all unspecified). The state
    /// and column are added if new; a next state must be a row by the time of `build`.
    pub fn entry(&mut self, state: &str, column: &str, next: Option<&str>, out: &str) -> &mut Self {
        self.state(state);
        self.column(column);
        self.entries.push((
            state.to_string(),
            column.to_string(),
            next.map(str::to_string),
            out.to_string(),
        ));
        self
    }

    /// Sets the reset state.
    pub fn reset(&mut self, state: &str) -> &mut Self {
        self.reset = Some(state.to_string());
        self
    }

    /// Checks everything and builds the table.
    ///
    /// # Errors
    /// The first problem found, as a [`TableError`].
    pub fn build(&self) -> Result<FlowTable, TableError> {
        let n_in = self.inputs.len();
        check_sizes(
            n_in,
            self.outputs.len(),
            self.states.len(),
            self.columns.len(),
        )?;
        let mut columns = Vec::with_capacity(self.columns.len());
        for l in &self.columns {
            let v = value_of(l).filter(|_| l.chars().all(|c| c == '0' || c == '1'));
            match v {
                None => return Err(TableError::BadLabel { label: l.clone() }),
                Some(v) => {
                    if l.len() != n_in {
                        return Err(TableError::LabelLength {
                            label: l.clone(),
                            len: l.len(),
                            expected: n_in,
                        });
                    }
                    columns.push(v);
                }
            }
        }
        let ns = self.states.len();
        let nc = columns.len();
        let k = self.outputs.len();
        check_names(NameKind::State, &self.states)?;
        let idx: BTreeMap<&str, usize> = self
            .states
            .iter()
            .enumerate()
            .map(|(i, s)| (s.as_str(), i))
            .collect();
        let cidx: BTreeMap<&str, usize> = self
            .columns
            .iter()
            .enumerate()
            .map(|(i, s)| (s.as_str(), i))
            .collect();
        let mut next = vec![None; ns * nc];
        let mut out = vec![OutBit::Free; ns * nc * k];
        let mut given = vec![false; ns * nc];
        for (s, c, n, o) in &self.entries {
            let si = idx[s.as_str()];
            let ci = cidx[c.as_str()];
            let at = si * nc + ci;
            if given[at] {
                return Err(TableError::DuplicateEntry {
                    state: s.clone(),
                    column: c.clone(),
                });
            }
            given[at] = true;
            if let Some(n) = n {
                match idx.get(n.as_str()) {
                    Some(&t) => next[at] = Some(StateId::from_index(t)),
                    None => return Err(TableError::UnknownState { name: n.clone() }),
                }
            }
            match out_bits(o, k) {
                Ok(bits) => out[at * k..at * k + k].copy_from_slice(&bits),
                Err((len, false)) => {
                    return Err(TableError::OutputWidth {
                        state: s.clone(),
                        column: c.clone(),
                        out: o.clone(),
                        len,
                        expected: k,
                    })
                }
                Err((_, true)) => {
                    return Err(TableError::BadOutput {
                        state: s.clone(),
                        column: c.clone(),
                        out: o.clone(),
                    })
                }
            }
        }
        let reset = match &self.reset {
            None => None,
            Some(r) => match idx.get(r.as_str()) {
                Some(&t) => Some(StateId::from_index(t)),
                None => return Err(TableError::UnknownState { name: r.clone() }),
            },
        };
        FlowTable::from_parts(Parts {
            name: self.name.clone(),
            inputs: self.inputs.clone(),
            outputs: self.outputs.clone(),
            states: self.states.clone(),
            columns,
            next,
            out,
            reset,
        })
    }
}
