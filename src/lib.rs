//! Stillpoint: synthesis of asynchronous sequential circuits (under construction).
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub use stillpoint_assign as assign;
pub use stillpoint_cover as cover;
pub use stillpoint_table as table;

pub mod encode;
pub mod network;
pub mod report;
pub mod pictures;
pub mod sim;
pub mod synth;
pub mod verilog;
