//! `stillpoint assign` and `stillpoint races`.

use super::args::{AssignArgs, RacesArgs};
use super::{CliError, CliResult};

/// Runs `assign`.
pub fn run_assign(args: &AssignArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("assign: not implemented yet"))
}

/// Runs `races`.
pub fn run_races(args: &RacesArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("races: not implemented yet"))
}
