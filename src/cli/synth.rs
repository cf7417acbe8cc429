//! `stillpoint synth` and `stillpoint demo`.

use super::args::{DemoArgs, SynthArgs};
use super::{CliError, CliResult};

/// Runs `synth`.
pub fn run_synth(args: &SynthArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("synth: not implemented yet"))
}

/// Runs `demo`.
pub fn run_demo(args: &DemoArgs) -> CliResult {
    let _ = args;
    Err(CliError::new("demo: not implemented yet"))
}
