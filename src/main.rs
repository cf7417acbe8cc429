//! The `stillpoint` binary: parse the command line, run one command, map the outcome to
//! an exit status (0 done, 1 cannot be done as asked, 2 usage or input error).

#![allow(unreachable_pub)] // a binary: `pub` inside `cli` marks the command API, not an export

mod cli;

use clap::Parser;
use cli::args::{Cli, Command};
use std::process::ExitCode;

fn main() -> ExitCode {
    let parsed = match Cli::try_parse() {
        Ok(p) => p,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let result = match &parsed.command {
        Command::Check(a) => cli::check::run_check(a),
        Command::Reduce(a) => cli::check::run_reduce(a),
        Command::Assign(a) => cli::races::run_assign(a),
        Command::Races(a) => cli::races::run_races(a),
        Command::Minimize(a) => cli::minimize::run_minimize(a),
        Command::Synth(a) => cli::synth::run_synth(a),
        Command::Demo(a) => cli::synth::run_demo(a),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            eprintln!("{e}");
            ExitCode::from(2)
        }
    }
}
