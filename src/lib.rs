//! Stillpoint: synthesis of race-free, hazard-free asynchronous sequential circuits.
//!
//! A flow table goes in; verified next-state and output equations, a gate network and its
//! exports come out. The stages are separate crates, re-exported here:
//!
//! - [`table`] (`stillpoint-table`): the [`FlowTable`](table::FlowTable) model, its text and
//!   JSON forms, fundamental-mode analysis (chains, oscillations, reachability), state
//!   reduction and Unger's essential hazards;
//! - [`assign`] (`stillpoint-assign`): state codes, race analysis, the separation checker,
//!   Tracey's method and the universal, unit-distance and one-hot codes;
//! - [`cover`] (`stillpoint-cover`): hazard-free two-level minimisation.
//!
//! This crate is the glue: [`encode`] turns a coded table into functions with listed
//! transitions, [`synth::synthesize`] runs the whole chain, [`network`] builds the gate
//! network from the covers, [`sim`] verifies it by Eichelberger's ternary simulation and lets
//! a test bench drive it, and [`verilog`], [`report`] and [`pictures`] export it.
//!
//! # Example
//!
//! ```
//! use stillpoint::synth::{synthesize, SynthConfig};
//!
//! // A latch of our own: `set` raises `q`, `clear` drops it (both at once: unspecified).
//! let table = stillpoint::table::parse_text(
//!     "inputs set clear\noutputs q\n\
//!      \x20      00       10       01      11\n\
//!      off    (off)/0  on/-     (off)/0  -\n\
//!      on     (on)/1   (on)/1   off/-    -\n",
//! )?;
//! let design = synthesize(&table, &SynthConfig::default())?;
//! assert!(design.verification.ok);
//! assert_eq!(design.assignment.codes.width(), 1);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Caution
//!
//! The equations assume fundamental-mode operation and the delay model stated in each
//! report; see [`report::CAUTION`]. Run timing analysis on the real netlist and follow the
//! applicable safety standards where the circuit sits in safety-relevant equipment.
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub use stillpoint_assign as assign;
pub use stillpoint_cover as cover;
pub use stillpoint_table as table;

pub mod encode;
pub mod network;
pub mod pictures;
pub mod report;
pub mod sim;
pub mod synth;
pub mod verilog;
