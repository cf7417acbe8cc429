//! `stillpoint minimize`.

use super::args::MinimizeArgs;
use super::{CliError, CliResult};

/// Runs `minimize`.
pub fn run_minimize(args: &MinimizeArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("minimize: not implemented yet"))
}
