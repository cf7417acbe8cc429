//! `stillpoint check` and `stillpoint reduce`.

use super::args::{CheckArgs, ReduceArgs};
use super::{CliError, CliResult};

/// Runs `check`.
pub fn run_check(args: &CheckArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("check: not implemented yet"))
}

/// Runs `reduce`.
pub fn run_reduce(args: &ReduceArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("reduce: not implemented yet"))
}
