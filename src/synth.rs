//! The whole pipeline: flow table to verified gate network.
//!
//! [`synthesize`] collapses chains, reduces the rows (unless disabled), codes the states
//! (exact Tracey by default; with several alternative codes of the minimum width, the
//! one whose minimised logic is cheapest), encodes the next-state and output functions
//! ([`crate::encode`]), minimises them with full hazard constraints on the listed
//! transitions (Nowick & Dill, in the cover crate), builds the AND-OR network, and
//! verifies it twice, independently: the cover crate's checker on the covers, and
//! Eichelberger ternary simulation ([`crate::sim`]) of every total-state transition of the
//! change mode on the gate network with its feedback.

use crate::encode::{encode, encode_with, CodedTransition, EncodeError, Encoding};
use crate::network::{Literal, Network, NetworkError, Product};
use crate::sim::{check_transition, DelayModel, Problem, ProblemKind, TransitionCheck};
use serde::Serialize;
use std::time::{Duration, Instant};
use stillpoint_assign::{assign, races, AssignConfig, AssignError, Assignment, Method};
use stillpoint_cover::{minimize, verify, Config, CoverError, Cube, Effort, HazardMode, Solution};
use stillpoint_table::{
    collapse_chains, essential_hazards, reduce, ChangeMode, CollapseError, EssentialHazard,
    FlowTable, ReduceConfig, Reduction, StateId, TableError,
};

/// Settings of [`synthesize`], built with chained setters.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SynthConfig {
    reduce: bool,
    method: Method,
    changes: ChangeMode,
    model: DelayModel,
    budget: Duration,
    alternatives: usize,
    effort: Effort,
    node_limit: Option<u64>,
}

impl Default for SynthConfig {
    fn default() -> Self {
        SynthConfig {
            reduce: true,
            method: Method::Tracey,
            changes: ChangeMode::Single,
            model: DelayModel::FeedbackDelay,
            budget: Duration::from_secs(60),
            alternatives: 4,
            effort: Effort::Exact,
            node_limit: None,
        }
    }
}

impl SynthConfig {
    /// Whether to reduce the rows first. [default: true]
    pub fn reduce(mut self, on: bool) -> Self {
        self.reduce = on;
        self
    }
    /// The state-assignment method. [default: `Tracey`]
    pub fn method(mut self, m: Method) -> Self {
        self.method = m;
        self
    }
    /// Which input changes the environment makes. [default: `Single`]
    pub fn changes(mut self, c: ChangeMode) -> Self {
        self.changes = c;
        self
    }
    /// The delay model of the verification. [default: `FeedbackDelay`]
    pub fn delay_model(mut self, d: DelayModel) -> Self {
        self.model = d;
        self
    }
    /// Time budget of the whole run, shared by its exact searches: the state reduction
    /// may use a tenth of it and the assignment two fifths (fixed shares of the budget,
    /// so that the assignment's deterministic work allowance does not depend on how
    /// long the reduction took), and the covering nine tenths of what is left (the rest
    /// is kept for building and verifying the network), split evenly over the codes
    /// still to be minimised (time a code leaves over goes to the next). Encoding and
    /// verification are polynomial and not budgeted. Each search that its share stops
    /// returns its best answer with a proven bound (see [`Design::warnings`]); when the
    /// covering's share ends before any valid cover, the heuristic cover runs once more
    /// with a grace of a quarter of the budget (at least 1 s), and a warning says so.
    /// [default: 60 s] [range: any]
    pub fn budget(mut self, b: Duration) -> Self {
        self.budget = b;
        self
    }
    /// How many codes of the minimum width to minimise and rank by cost (Tracey only;
    /// tables of more than 24 rows use 1). [default: 4] [range: >= 1]
    pub fn alternatives(mut self, n: usize) -> Self {
        self.alternatives = n.max(1);
        self
    }
    /// Also bound every exact search by nodes (per phase of the reduction, per width of
    /// the assignment, per covering problem): with a budget far above what the nodes
    /// take, the result no longer depends on the machine's speed or load (the quality
    /// baseline uses this). [default: none] [range: >= 1]
    pub fn node_limit(mut self, nodes: u64) -> Self {
        self.node_limit = Some(nodes.max(1));
        self
    }
    /// Exact or heuristic covering. [default: `Exact`]
    pub fn effort(mut self, e: Effort) -> Self {
        self.effort = e;
        self
    }
    /// The change mode.
    pub fn change_mode(&self) -> ChangeMode {
        self.changes
    }
    /// The delay model.
    pub fn model(&self) -> DelayModel {
        self.model
    }
}

/// Why synthesis stopped. Every variant is "well-formed input, cannot be done as asked"
/// (exit status 1 in the CLI).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SynthError {
    /// A column oscillates.
    #[error(transparent)]
    Collapse(#[from] CollapseError),
    /// State reduction failed.
    #[error(transparent)]
    Reduce(#[from] TableError),
    /// State assignment failed.
    #[error(transparent)]
    Assign(#[from] AssignError),
    /// The codes could not be encoded.
    #[error(transparent)]
    Encode(#[from] EncodeError),
    /// The minimiser refused (a function hazard, or no hazard-free cover).
    #[error(transparent)]
    Cover(#[from] CoverError),
    /// The network could not be built (should not happen).
    #[error("internal: {0}")]
    Network(#[from] NetworkError),
}

/// One total-state transition that failed verification.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Failure {
    /// The stable row before.
    pub state: String,
    /// The column before.
    pub from: String,
    /// The column after.
    pub to: String,
    /// The row it must end in.
    pub dest: String,
    /// What went wrong.
    pub problems: Vec<Problem>,
}

/// What the verification found.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Verification {
    /// Total-state transitions simulated.
    pub transitions: usize,
    /// Critical races: from the race analysis of the codes, plus simulated transitions
    /// whose state variables did not settle in the destination code.
    pub races: usize,
    /// Hazards: simulated transitions with a static hazard or glitch on an excitation or
    /// output, plus the cover checker's violations.
    pub hazards: usize,
    /// No race and no hazard.
    pub ok: bool,
    /// The delay model simulated.
    pub model: DelayModel,
    /// Every failing transition, with its problems.
    pub failures: Vec<Failure>,
    /// The cover checker's messages.
    pub cover_violations: Vec<String>,
}

/// Counts and times per stage.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize)]
pub struct SynthStats {
    /// Collapsing chains and reducing rows.
    pub reduce_time: Duration,
    /// State assignment.
    pub assign_time: Duration,
    /// Encoding and minimisation (all alternatives).
    pub cover_time: Duration,
    /// Verification.
    pub verify_time: Duration,
    /// Codes minimised to pick the cheapest.
    pub codes_tried: usize,
}

/// Everything [`synthesize`] produced.
#[derive(Debug, Clone)]
pub struct Design {
    /// The table as given.
    pub original: FlowTable,
    /// The table that was coded (chains collapsed, rows reduced).
    pub table: FlowTable,
    /// For each original row (in order), the name of the coded row representing it.
    pub state_map: Vec<(String, String)>,
    /// The reduction, when done.
    pub reduction: Option<Reduction>,
    /// The state assignment (its `codes` are the ones used).
    pub assignment: Assignment,
    /// The encoded functions.
    pub encoding: Encoding,
    /// The minimised covers, `Y1..Yk` then the outputs.
    pub solution: Solution,
    /// The gate network.
    pub network: Network,
    /// The verification.
    pub verification: Verification,
    /// Unger's essential hazards of the coded table.
    pub essential_hazards: Vec<EssentialHazard>,
    /// Warnings for the report.
    pub warnings: Vec<String>,
    /// The settings used.
    pub config: SynthConfig,
    /// Times per stage.
    pub stats: SynthStats,
}

impl Design {
    /// The module name: the table's name, else `fallback`.
    pub fn module_name<'a>(&'a self, fallback: &'a str) -> &'a str {
        self.original.name().unwrap_or(fallback)
    }

    /// The ternary-simulation checks of every total-state transition, with labels
    /// (`state column -> column`), for test benches.
    pub fn checks(&self) -> Vec<(String, TransitionCheck)> {
        self.encoding
            .transitions
            .iter()
            .map(|t| {
                (
                    self.label(t),
                    self.encoding
                        .check_of(&self.table, &self.assignment.codes, t),
                )
            })
            .collect()
    }

    fn label(&self, t: &CodedTransition) -> String {
        format!(
            "{} {} -> {} (to {})",
            self.table.state_name(t.state),
            self.table.column_label(t.from),
            self.table.column_label(t.to),
            self.table.state_name(t.dest)
        )
    }
}

/// Converts a cube over `nvars` support variables into a product for the network.
pub fn product_of(cube: &Cube, nvars: usize) -> Product {
    (0..nvars)
        .filter_map(|v| cube.literal(v).map(|positive| Literal { var: v, positive }))
        .collect()
}

/// The AND-OR network of a solution over the encoding's support.
///
/// # Errors
/// Only on inconsistent input (names clashing).
pub fn network_of(
    enc: &Encoding,
    sol: &Solution,
    inputs: &[String],
) -> Result<Network, NetworkError> {
    let n = enc.support.len();
    let k = enc.width;
    let covers: Vec<Vec<Product>> = sol
        .outputs
        .iter()
        .map(|o| o.cubes.iter().map(|c| product_of(c, n)).collect())
        .collect();
    let outs: Vec<(String, Vec<Product>)> = sol.outputs[k..]
        .iter()
        .zip(&covers[k..])
        .map(|(o, c)| (o.name.clone(), c.clone()))
        .collect();
    Network::from_sop(inputs, &covers[..k], &outs)
}

/// Verifies a network against an encoding: the cover checker, the race analysis of the
/// codes, and ternary simulation of every total-state transition.
pub fn verify_design(
    table: &FlowTable,
    assignment: &Assignment,
    enc: &Encoding,
    sol: &Solution,
    net: &Network,
    model: DelayModel,
) -> Verification {
    use rayon::prelude::*;
    // The three checks are independent, and so is each simulated transition: they run in
    // parallel, and the results are gathered in the transitions' order.
    let ((cover_violations, critical), simulated) = rayon::join(
        || {
            rayon::join(
                || match verify::check(&enc.functions, sol, HazardMode::Full) {
                    Ok(()) => Vec::new(),
                    Err(v) => v
                        .into_iter()
                        .map(|v| format!("{}: {}", v.output, v.message))
                        .collect::<Vec<String>>(),
                },
                || {
                    if assignment.multi_step {
                        0
                    } else {
                        races::analyze(table, &assignment.codes)
                            .map(|r| r.critical.len())
                            .unwrap_or(0)
                    }
                },
            )
        },
        || {
            enc.transitions
                .par_iter()
                .map(|t| {
                    let check = enc.check_of(table, &assignment.codes, t);
                    (t, check_transition(net, &check, model))
                })
                .collect::<Vec<_>>()
        },
    );
    let mut races = critical;
    let mut hazards = cover_violations.len();
    let mut failures = Vec::new();
    for (t, problems) in simulated {
        if problems.is_empty() {
            continue;
        }
        let state_wrong = problems.iter().any(|p| {
            p.phase == crate::sim::Phase::End
                && net.states().iter().any(|s| net.net_name(s.net) == p.signal)
        });
        if state_wrong {
            races += 1;
        }
        if problems.iter().any(|p| {
            matches!(
                p.kind,
                ProblemKind::StaticHazard | ProblemKind::Glitch | ProblemKind::NotStable
            ) || (p.phase == crate::sim::Phase::End && !state_wrong)
        }) {
            hazards += 1;
        }
        failures.push(Failure {
            state: table.state_name(t.state).to_string(),
            from: table.column_label(t.from).to_string(),
            to: table.column_label(t.to).to_string(),
            dest: table.state_name(t.dest).to_string(),
            problems,
        });
    }
    Verification {
        transitions: enc.transitions.len(),
        races,
        hazards,
        ok: races == 0 && hazards == 0,
        model,
        failures,
        cover_violations,
    }
}

/// The budget of a whole run: each stage asks for a share of what is left.
struct Deadline {
    start: Instant,
    budget: Duration,
}

impl Deadline {
    fn new(start: Instant, budget: Duration) -> Deadline {
        Deadline { start, budget }
    }

    /// What is left of the budget.
    fn left(&self) -> Duration {
        self.budget.saturating_sub(self.start.elapsed())
    }

    /// `num / den` of the whole budget.
    fn part(&self, num: u32, den: u32) -> Duration {
        self.budget * num / den.max(1)
    }

    /// `num / den` of what is left (all of it when `den <= num`).
    fn share(&self, num: u32, den: u32) -> Duration {
        let left = self.left();
        if den <= num {
            left
        } else {
            left * num / den
        }
    }
}

/// Synthesises a verified circuit from a flow table. See the [module doc](self).
///
/// # Errors
/// An oscillation, a failed stage (budget with no answer, no race-free code of the
/// method), a function hazard or a transition with no hazard-free cover. A circuit that
/// fails verification is not an error: see [`Design::verification`].
///
/// # Example
/// ```
/// use stillpoint::synth::{synthesize, SynthConfig};
/// use stillpoint_table::parse_text;
/// // A pulse catcher: `hit` sets `seen`, `clr` clears it; hit and clr never together.
/// let t = parse_text(
///     "table catch\ninputs hit clr\noutputs seen\n\
///        00 10 01\n\
///      idle (idle)/0 got/- (idle)/0\n\
///      got  (got)/1 (got)/1 idle/-\n",
/// )?;
/// let d = synthesize(&t, &SynthConfig::default())?;
/// assert!(d.verification.ok);
/// assert_eq!(d.assignment.codes.width(), 1);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn synthesize(table: &FlowTable, cfg: &SynthConfig) -> Result<Design, SynthError> {
    let mut stats = SynthStats::default();
    let mut warnings = Vec::new();
    let t0 = Instant::now();
    let deadline = Deadline::new(t0, cfg.budget);
    let normal = collapse_chains(table)?;
    let (coded, reduction) = if cfg.reduce {
        let mut rcfg = ReduceConfig::default().budget(deadline.part(1, 10));
        if let Some(n) = cfg.node_limit {
            rcfg = rcfg.node_limit(n);
        }
        let r = reduce(&normal, &rcfg)?;
        if !r.optimal {
            warnings.push(format!(
                "state reduction stopped by its budget: {} rows, at least {} needed",
                r.table.num_states(),
                r.lower_bound
            ));
        }
        (r.table.clone(), Some(r))
    } else {
        (normal, None)
    };
    let state_map: Vec<(String, String)> = table
        .states()
        .map(|s| {
            let new = match &reduction {
                Some(r) => r.table.state_name(r.class_of[s.index()]).to_string(),
                None => table.state_name(s).to_string(),
            };
            (table.state_name(s).to_string(), new)
        })
        .collect();
    stats.reduce_time = t0.elapsed();

    let t1 = Instant::now();
    let alts = if cfg.method == Method::Tracey && coded.num_states() <= 24 {
        cfg.alternatives
    } else {
        1
    };
    let mut acfg = AssignConfig::default()
        .method(cfg.method)
        .budget(deadline.part(2, 5))
        .alternatives(alts)
        .output_separation(true);
    if let Some(n) = cfg.node_limit {
        acfg = acfg.node_limit(n);
    }
    let assignment = assign(&coded, &acfg)?;
    if assignment.optimal == Some(false) {
        warnings.push(format!(
            "state assignment not proven minimum: {} variables, at least {} needed",
            assignment.codes.width(),
            assignment.lower_bound
        ));
    }
    stats.assign_time = t1.elapsed();

    let t2 = Instant::now();
    let mut candidates = vec![assignment.codes.clone()];
    candidates.extend(assignment.alternatives.iter().cloned());
    let ncand = candidates.len();
    let mut best: Option<(Assignment, Encoding, Solution)> = None;
    let mut first_err = None;
    for (i, codes) in candidates.into_iter().enumerate() {
        if i > 0 && best.is_some() && deadline.left().is_zero() {
            warnings.push(format!(
                "{} of {ncand} alternative codes not minimised: the budget ran out",
                ncand - i
            ));
            break;
        }
        let mut ccfg = Config::default()
            .hazards(HazardMode::Full)
            .effort(cfg.effort)
            .budget(deadline.share(9, 10 * (ncand - i) as u32));
        if let Some(n) = cfg.node_limit {
            ccfg = ccfg.node_limit(n);
        }
        stats.codes_tried += 1;
        let mut a = assignment.clone();
        a.codes = codes;
        let enc = match encode(&coded, &a, cfg.changes) {
            Ok(e) => e,
            Err(e) => {
                first_err.get_or_insert(SynthError::from(e));
                continue;
            }
        };
        let first = match minimize(&enc.functions, &ccfg) {
            // The share ran out before any valid cover of some function: a design slightly
            // late beats none, so the heuristic gets one more go with a grace period, and
            // the report says so.
            Err(CoverError::BudgetExhausted { .. }) if best.is_none() => {
                let grace = (cfg.budget / 4).max(Duration::from_secs(1));
                let fast = ccfg.clone().effort(Effort::Fast).budget(grace);
                let r = minimize(&enc.functions, &fast);
                if r.is_ok() {
                    warnings.push(format!(
                        "the covering's share of the budget ran out before a valid cover was \
                         built; the heuristic cover was run with a grace of {:.1} s",
                        grace.as_secs_f64()
                    ));
                }
                r
            }
            r => r,
        };
        let (enc, sol) = match first {
            Ok(s) => (enc, s),
            Err(e) if a.multi_step => {
                // retry with the steps of each move listed separately
                let retry = encode_with(&coded, &a, cfg.changes, false)
                    .map_err(SynthError::from)
                    .and_then(|enc| Ok((minimize(&enc.functions, &ccfg)?, enc)));
                match retry {
                    Ok((s, enc)) => {
                        warnings.push(format!(
                            "multi-step moves listed step by step only ({e}); the simulation \
                             checks whether the steps may overlap"
                        ));
                        (enc, s)
                    }
                    Err(e2) => {
                        first_err.get_or_insert(e2);
                        continue;
                    }
                }
            }
            Err(e) => {
                first_err.get_or_insert(SynthError::from(e));
                continue;
            }
        };
        let cost = (sol.cube_count, sol.literal_count);
        let better = match &best {
            None => true,
            Some((_, _, b)) => cost < (b.cube_count, b.literal_count),
        };
        if better {
            best = Some((a, enc, sol));
        }
    }
    let Some((mut assignment, encoding, solution)) = best else {
        return Err(first_err.expect("at least one code was tried"));
    };
    assignment.alternatives.clear();
    if !solution.optimal {
        warnings.push(format!(
            "logic not proven minimum: {} products, at least {} needed",
            solution.cube_count, solution.lower_bound
        ));
    }
    stats.cover_time = t2.elapsed();

    let t3 = Instant::now();
    let network = network_of(&encoding, &solution, coded.input_names())?;
    let verification = verify_design(
        &coded,
        &assignment,
        &encoding,
        &solution,
        &network,
        cfg.model,
    );
    stats.verify_time = t3.elapsed();

    // One line per row: the entries no input change of the change mode reaches.
    let mut by_state: Vec<(StateId, Vec<&str>)> = Vec::new();
    for &(s, c) in &encoding.unreached {
        match by_state.last_mut() {
            Some((last, cols)) if *last == s => cols.push(coded.column_label(c)),
            _ => by_state.push((s, vec![coded.column_label(c)])),
        }
    }
    for (s, cols) in by_state {
        warnings.push(format!(
            "state {}: {} {} {} not reached by any {} input change from a stable state; \
             encoded all the same",
            coded.state_name(s),
            if cols.len() == 1 {
                "the entry in column"
            } else {
                "the entries in columns"
            },
            cols.join(", "),
            if cols.len() == 1 { "is" } else { "are" },
            if cfg.changes == ChangeMode::Single {
                "single"
            } else {
                "allowed"
            }
        ));
    }
    let essential = essential_hazards(&coded);
    if !essential.is_empty() && cfg.model == DelayModel::FeedbackDelay {
        warnings.push(format!(
            "{} essential hazard(s): the design relies on the feedback delay being longer than \
             the input-to-logic skew (run with --strict to see them fail)",
            essential.len()
        ));
    }
    Ok(Design {
        original: table.clone(),
        table: coded,
        state_map,
        reduction,
        assignment,
        encoding,
        solution,
        network,
        verification,
        essential_hazards: essential,
        warnings,
        config: cfg.clone(),
        stats,
    })
}
