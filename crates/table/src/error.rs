//! The crate's error types: [`TableError`] (construction and reduction),
//! [`ParseError`] (located in the input text) and [`CollapseError`] (an oscillation).

use crate::ids::{ColumnId, StateId};
use std::fmt;

/// Which kind of name a [`TableError`] is about.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum NameKind {
    /// The table's own name.
    Table,
    /// An input variable.
    Input,
    /// An output variable.
    Output,
    /// A state (row).
    State,
}

impl fmt::Display for NameKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            NameKind::Table => "table",
            NameKind::Input => "input",
            NameKind::Output => "output",
            NameKind::State => "state",
        })
    }
}

/// Why a flow table could not be built (or reduced).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum TableError {
    /// No input variable was given.
    #[error("a flow table needs at least one input")]
    NoInputs,
    /// More inputs than [`crate::limits::MAX_INPUTS`].
    #[error("too many inputs: {count} (at most {max})")]
    TooManyInputs {
        /// How many were given.
        count: usize,
        /// The limit.
        max: usize,
    },
    /// More outputs than [`crate::limits::MAX_OUTPUTS`].
    #[error("too many outputs: {count} (at most {max})")]
    TooManyOutputs {
        /// How many were given.
        count: usize,
        /// The limit.
        max: usize,
    },
    /// No state was given.
    #[error("a flow table needs at least one state")]
    NoStates,
    /// No column was listed.
    #[error("a flow table needs at least one listed column")]
    NoColumns,
    /// More states than [`crate::limits::MAX_STATES`].
    #[error("too many states: {count} (at most {max})")]
    TooManyStates {
        /// How many were given.
        count: usize,
        /// The limit.
        max: usize,
    },
    /// More entries (states times listed columns) than [`crate::limits::MAX_ENTRIES`].
    #[error("too many entries: {states} states times {columns} columns (at most {max} entries)")]
    TooManyEntries {
        /// Number of states.
        states: usize,
        /// Number of listed columns.
        columns: usize,
        /// The limit on their product.
        max: usize,
    },
    /// A name that is not `[A-Za-z_][A-Za-z0-9_]*`.
    #[error(
        "invalid {kind} name `{}`: expected a letter or `_` followed by letters, digits or `_`",
        show(.name)
    )]
    BadName {
        /// What the name is for.
        kind: NameKind,
        /// The name as given.
        name: String,
    },
    /// A name given twice for the same kind.
    #[error("duplicate {kind} name `{name}`")]
    DuplicateName {
        /// What the name is for.
        kind: NameKind,
        /// The repeated name.
        name: String,
    },
    /// A column label with characters other than `0` and `1`.
    #[error("column label `{label}` is not a string of `0` and `1`")]
    BadLabel {
        /// The label as given.
        label: String,
    },
    /// A column label whose length is not the number of inputs.
    #[error("column label `{label}` has {len} characters, expected {expected} (one per input)")]
    LabelLength {
        /// The label as given.
        label: String,
        /// Its length.
        len: usize,
        /// The number of inputs.
        expected: usize,
    },
    /// A column listed twice.
    #[error("duplicate column `{label}`")]
    DuplicateColumn {
        /// The repeated label.
        label: String,
    },
    /// A state name that is not a row of the table.
    #[error("unknown state `{name}`")]
    UnknownState {
        /// The name as given.
        name: String,
    },
    /// A column label that is not listed.
    #[error("unknown column `{label}`")]
    UnknownColumn {
        /// The label as given.
        label: String,
    },
    /// An output string of the wrong length.
    #[error("output `{out}` of state `{state}` in column `{column}` has {len} characters, expected {expected} (one per output)")]
    OutputWidth {
        /// The state's name.
        state: String,
        /// The column's label.
        column: String,
        /// The output string.
        out: String,
        /// Its length.
        len: usize,
        /// The number of outputs.
        expected: usize,
    },
    /// An output character other than `0`, `1`, `-`.
    #[error(
        "output `{out}` of state `{state}` in column `{column}`: expected only `0`, `1` or `-`"
    )]
    BadOutput {
        /// The state's name.
        state: String,
        /// The column's label.
        column: String,
        /// The output string.
        out: String,
    },
    /// The same entry given twice to the builder.
    #[error("entry of state `{state}` in column `{column}` given twice")]
    DuplicateEntry {
        /// The state's name.
        state: String,
        /// The column's label.
        column: String,
    },
    /// Reduction needs a table without oscillations.
    #[error(transparent)]
    Oscillation(#[from] CollapseError),
}

/// A chain of unstable entries that never reaches a stable entry: the column oscillates.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("state `{state_name}` oscillates in column `{column_label}`: {cycle_text}")]
pub struct CollapseError {
    /// The first state of the cycle (in row order).
    pub state: StateId,
    /// The column holding the cycle.
    pub column: ColumnId,
    /// The cycle's states, starting at `state`, each leading to the next and the last back
    /// to the first.
    pub cycle: Vec<StateId>,
    /// The state's name (for the message).
    pub state_name: String,
    /// The column's label (for the message).
    pub column_label: String,
    /// The cycle as text, `a -> b -> a`.
    pub cycle_text: String,
}

/// A malformed input file: where, and what was expected.
///
/// `Display` gives `LINE:COL: message`; the caller prefixes the file name.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParseError {
    line: usize,
    column: usize,
    message: String,
}

impl ParseError {
    /// An error at a 1-based line and column.
    pub fn new(line: usize, column: usize, message: impl Into<String>) -> Self {
        ParseError {
            line,
            column,
            message: message.into(),
        }
    }

    /// The 1-based line.
    pub fn line(&self) -> usize {
        self.line
    }

    /// The 1-based column (in characters).
    pub fn column(&self) -> usize {
        self.column
    }

    /// The message, without the location.
    pub fn message(&self) -> &str {
        &self.message
    }
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}: {}", self.line, self.column, self.message)
    }
}

impl std::error::Error for ParseError {}

/// Shows a token of the user's input in a message: shortened if long, and with control
/// characters escaped so that the message stays on one line.
pub(crate) fn show(s: &str) -> String {
    let head: String = if s.chars().count() > 40 {
        s.chars().take(37).chain("...".chars()).collect()
    } else {
        s.to_string()
    };
    head.chars()
        .map(|c| {
            if c.is_control() {
                c.escape_debug().to_string()
            } else {
                c.to_string()
            }
        })
        .collect()
}
