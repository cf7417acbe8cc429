//! Flow tables for fundamental-mode asynchronous sequential circuits: the first stage of
//! Stillpoint.
//!
//! The primary type is [`FlowTable`], validated once at construction by
//! [`FlowTableBuilder`], [`parse_text`] or [`parse_json`]. Over a borrowed table this
//! crate computes:
//!
//! - the fundamental-mode check ([`analyze`]): stable entries, chains of unstable entries
//!   and their collapse ([`collapse_chains`]), oscillations, unreachable rows;
//! - transition lists for state assignment ([`column_transitions`],
//!   [`total_transitions`]);
//! - exact state reduction ([`reduce()`]): pair chart, maximal and prime compatibles
//!   (Bron–Kerbosch, Grasselli–Luccio) and a minimum closed cover by branch and bound;
//! - essential hazards by Unger's test ([`essential_hazards`]).
//!
//! # Example
//! ```
//! use stillpoint_table::parse_text;
//! let t = parse_text(
//!     "inputs a\noutputs z\n\
//!      \x20   0      1\n\
//!      p  (p)/0  q/-\n\
//!      q  p/-    (q)/1\n",
//! )?;
//! assert_eq!(t.num_states(), 2);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Features
//! - `serde` (default): `Serialize`/`Deserialize` for the id types and [`OutBit`].
//! - `testing`: the `testing` module with random-table generators and `proptest`
//!   strategies, for this and downstream crates' tests.
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod error;
pub mod fundamental;
pub mod ids;
pub mod json;
pub mod reduce;
pub mod table;
#[cfg(feature = "testing")]
pub mod testing;
pub mod text;
pub mod unger;
pub mod verify;

pub use error::{CollapseError, NameKind, ParseError, TableError};
pub use fundamental::{
    analyze, collapse_chains, column_transitions, total_transitions, Analysis, Chain, ChangeMode,
    ColumnTransitions, Oscillation, TotalTransition,
};
pub use ids::{ColumnId, InputId, OutputId, StateId};
pub use json::parse_json;
pub use reduce::{minimum_closed_cover, reduce, ClosedCover, ReduceConfig, ReduceStats, Reduction};
pub use table::{FlowTable, FlowTableBuilder, OutBit};
pub use text::parse_text;
pub use unger::{essential_hazards, EssentialHazard};

/// Size limits every constructor and parser enforces (larger inputs are refused with a
/// clear, located error).
pub mod limits {
    /// At most this many input variables (so at most 65 536 columns).
    pub const MAX_INPUTS: usize = 16;
    /// At most this many output variables.
    pub const MAX_OUTPUTS: usize = 256;
    /// At most this many rows.
    pub const MAX_STATES: usize = 4096;
    /// At most this many entries (rows times listed columns).
    pub const MAX_ENTRIES: usize = 1 << 22;
}
