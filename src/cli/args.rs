//! What the user typed: the command line as plain data (clap derive), no side effects.

use clap::{Args, Parser, Subcommand, ValueEnum};

/// The `stillpoint` command line.
#[derive(Debug, Parser)]
#[command(
    name = "stillpoint",
    version,
    about = "Synthesis of race-free, hazard-free asynchronous (fundamental-mode) circuits from flow tables"
)]
pub struct Cli {
    /// The command to run.
    #[command(subcommand)]
    pub command: Command,
}

/// One command per pipeline step.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Validate a flow table for fundamental-mode operation.
    Check(CheckArgs),
    /// Reduce the number of rows (compatibles and a minimum closed cover).
    Reduce(ReduceArgs),
    /// Find race-free state codes.
    Assign(AssignArgs),
    /// Analyse the races of a state code you chose.
    Races(RacesArgs),
    /// Two-level minimisation with hazard constraints.
    Minimize(MinimizeArgs),
    /// The whole job: reduce, code, encode, minimise, verify, export.
    Synth(SynthArgs),
    /// Run `synth` on the bundled demonstration table and print the report.
    Demo(DemoArgs),
}

/// Options shared by every command.
#[derive(Debug, Args, Clone)]
pub struct Common {
    /// Print one JSON object on stdout instead of the human report.
    #[arg(long)]
    pub json: bool,
    /// Time budget in seconds for exact searches.
    #[arg(long, default_value_t = 60.0, value_name = "SECONDS")]
    pub budget: f64,
}

/// `stillpoint check TABLE`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The flow table (`.json` for JSON, anything else text, `-` for stdin).
    pub table: String,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// `stillpoint reduce TABLE [-o OUT]`.
#[derive(Debug, Args)]
pub struct ReduceArgs {
    /// The flow table.
    pub table: String,
    /// Write the reduced table here (text form unless OUT ends `.json`).
    #[arg(short = 'o', long = "output", value_name = "OUT")]
    pub output: Option<String>,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// State-assignment methods.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Method {
    /// Exact minimum width by Tracey's partition method.
    Tracey,
    /// Heuristic Tracey for large tables.
    TraceyFast,
    /// Liu's universal assignment.
    Liu,
    /// The `tan` slot: a pruned linear universal code (see `docs/assign.md`).
    Tan,
    /// Unit-distance codes.
    Adjacent,
    /// One-hot codes with two-hot intermediate codes.
    OneHot,
}

impl From<Method> for stillpoint_assign::Method {
    fn from(m: Method) -> Self {
        use stillpoint_assign::Method as M;
        match m {
            Method::Tracey => M::Tracey,
            Method::TraceyFast => M::TraceyFast,
            Method::Liu => M::Liu,
            Method::Tan => M::Tan,
            Method::Adjacent => M::Adjacent,
            Method::OneHot => M::OneHot,
        }
    }
}

/// `stillpoint assign TABLE [--method M]`.
#[derive(Debug, Args)]
pub struct AssignArgs {
    /// The flow table.
    pub table: String,
    /// The assignment method.
    #[arg(long, value_enum, default_value_t = Method::Tracey)]
    pub method: Method,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// `stillpoint races TABLE --codes CODES`.
#[derive(Debug, Args)]
pub struct RacesArgs {
    /// The flow table.
    pub table: String,
    /// The state codes (JSON object or `state bits` lines).
    #[arg(long, value_name = "CODES")]
    pub codes: String,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// Hazard constraints for `minimize`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Hazards {
    /// Plain minimum cover.
    None,
    /// No static-1 logic hazard for any single-variable change.
    Static,
    /// Every listed transition free of static and dynamic logic hazards.
    Full,
}

/// Search effort for `minimize`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Effort {
    /// Exact minimum within the budget.
    Exact,
    /// Heuristic.
    Fast,
}

/// `stillpoint minimize FUNCTION`.
#[derive(Debug, Args)]
pub struct MinimizeArgs {
    /// The function file (`.json`, or the `.fn` text form).
    pub function: String,
    /// Hazard constraints (default: `full` when the file lists transitions, else `static`).
    #[arg(long, value_enum)]
    pub hazards: Option<Hazards>,
    /// Search effort.
    #[arg(long, value_enum, default_value_t = Effort::Exact)]
    pub effort: Effort,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// Which input changes the environment may make.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Changes {
    /// One input changes at a time.
    Single,
    /// Any change between specified columns.
    Multiple,
}

/// `stillpoint synth TABLE ...`.
#[derive(Debug, Args)]
pub struct SynthArgs {
    /// The flow table.
    pub table: String,
    /// The assignment method.
    #[arg(long, value_enum, default_value_t = Method::Tracey)]
    pub method: Method,
    /// Keep every row under its own name.
    #[arg(long)]
    pub no_reduce: bool,
    /// Which input changes the environment may make.
    #[arg(long, value_enum, default_value_t = Changes::Single)]
    pub changes: Changes,
    /// Verify with the changing inputs held at X while the state moves.
    #[arg(long)]
    pub strict: bool,
    /// Write the structural Verilog netlist here.
    #[arg(long, value_name = "OUT.v")]
    pub verilog: Option<String>,
    /// Write the self-checking Verilog test bench here.
    #[arg(long, value_name = "FILE")]
    pub testbench: Option<String>,
    /// Write SVG pictures and the DOT flow graph into this directory.
    #[arg(long, value_name = "DIR")]
    pub pictures: Option<String>,
    /// Write the human report (markdown) here.
    #[arg(long, value_name = "OUT.md")]
    pub report: Option<String>,
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}

/// `stillpoint demo`.
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// Shared options.
    #[command(flatten)]
    pub common: Common,
}
