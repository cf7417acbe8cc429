//! Race-free state assignment for normal fundamental-mode flow tables: the third stage of
//! Stillpoint.
//!
//! The primary types are [`Codes`] (one distinct bit string per state) and
//! [`Assignment`] (codes with their proof status), produced by [`assign`] from a
//! [`FlowTable`] with an [`AssignConfig`]. Independent checkers, simpler than the
//! searches, recheck every result: [`separation::check`] (Tracey's condition: no critical
//! race for single-transition-time codes), [`races::analyze`] (which races a code has,
//! and an order of bit changes for each critical one) and [`one_hot::check`] (the
//! two-step paths of one-hot codes).
//!
//! Methods ([`Method`]), one module each:
//! - [`tracey`]: Tracey's partition method, exact minimum width within a budget
//!   (`tracey`), and a heuristic (`tracey-fast`: first-fit packing, then walks from
//!   random codes to narrower widths);
//! - [`universal`]: Liu's universal code, and in the `tan` slot a pruned linear universal
//!   code of our own (Tan's 1971 construction could not be read; see that module);
//! - [`adjacent`]: unit-distance codes (every transition changes one bit);
//! - [`one_hot`]: one-hot codes with two-hot intermediate codes.
//!
//! # Example
//! ```
//! use stillpoint_assign::{assign, separation, AssignConfig, Method};
//! use stillpoint_table::parse_text;
//! // Three rows; in column 1 `a` goes to `c` while `b` stays.
//! let t = parse_text("inputs x\n  0 1\na (a) c\nb (b) (b)\nc a (c)\n")?;
//! let a = assign(&t, &AssignConfig::default().method(Method::Tracey))?;
//! assert_eq!(a.codes.width(), 2);
//! assert_eq!(a.optimal, Some(true));
//! assert!(separation::check(&t, &a.codes).is_ok());
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Features
//! - `serde` (default): `Serialize` for the result types.
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod adjacent;
mod codes;
pub mod dichotomy;
mod local;
pub mod one_hot;
mod problem;
pub mod races;
mod sat;
pub mod separation;
pub mod tracey;
pub mod universal;

pub use codes::{bits_string, Codes, MAX_WIDTH};

use problem::Problem;
use std::fmt;
use std::time::{Duration, Instant};
use stillpoint_table::{ColumnId, FlowTable, StateId};

/// Everything that can go wrong in this crate.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum AssignError {
    /// A malformed codes file; `Display` gives `LINE:COL: message`.
    #[error("{line}:{col}: {message}")]
    Parse {
        /// 1-based line.
        line: usize,
        /// 1-based column (characters).
        col: usize,
        /// What was expected.
        message: String,
    },
    /// Codes that are not one distinct code per state.
    #[error("invalid codes: {message}")]
    InvalidCodes {
        /// What is wrong.
        message: String,
    },
    /// A chain is left in the table.
    #[error(
        "state `{state}` in column `{column}` leads to `{next}`, which is not stable there: \
         collapse chains first"
    )]
    NotNormal {
        /// The state.
        state: String,
        /// The column label.
        column: String,
        /// The next state.
        next: String,
    },
    /// A column oscillates, so the table has no normal form.
    #[error(transparent)]
    Oscillation(#[from] stillpoint_table::CollapseError),
    /// The method accepts fewer states.
    #[error("{states} states is more than this method accepts ({max})")]
    TooManyStates {
        /// The number of states.
        states: usize,
        /// The limit.
        max: usize,
    },
    /// The code would need more than 64 variables.
    #[error("the code would need {width} state variables, more than the limit of {max}")]
    TooWide {
        /// The width needed.
        width: usize,
        /// The limit.
        max: usize,
    },
    /// A budget ran out before any answer.
    #[error("the budget ran out while computing {what}")]
    Budget {
        /// What was being computed.
        what: &'static str,
    },
    /// No unit-distance code in the widths tried.
    #[error("no unit-distance code found: {message}")]
    NoUnitDistance {
        /// Why, per width tried.
        message: String,
        /// The widths tried and the reason for each.
        tried: Vec<(usize, adjacent::NoEmbedding)>,
    },
}

/// A state-assignment method.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub enum Method {
    /// Exact minimum width by Tracey's partition method (within the budget).
    Tracey,
    /// Tracey's dichotomies packed by a first-fit heuristic, then narrowed by a local
    /// search (walks from random codes, a bounded amount of work), for large tables; on
    /// tables of up to 1 000 dichotomies a short SAT run raises its lower bound.
    TraceyFast,
    /// Liu's universal code, `2^ceil(log2 n) - 1` variables.
    Liu,
    /// The `tan` slot: a pruned linear universal code of our own (see [`universal`]);
    /// not verified to be Tan's published construction.
    Tan,
    /// Unit-distance codes.
    Adjacent,
    /// One-hot codes with two-hot intermediate codes (two steps per transition).
    OneHot,
}

impl Method {
    /// The name used on the command line and in reports: `tracey`, `tracey-fast`, `liu`,
    /// `tan`, `adjacent`, `one-hot`.
    pub fn name(self) -> &'static str {
        match self {
            Method::Tracey => "tracey",
            Method::TraceyFast => "tracey-fast",
            Method::Liu => "liu",
            Method::Tan => "tan",
            Method::Adjacent => "adjacent",
            Method::OneHot => "one-hot",
        }
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// How [`assign`] works.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AssignConfig {
    method: Method,
    budget: Duration,
    node_limit: u64,
    alternatives: usize,
    max_extra_vars: usize,
    output_separation: bool,
}

impl Default for AssignConfig {
    fn default() -> Self {
        AssignConfig {
            method: Method::Tracey,
            budget: Duration::from_secs(60),
            node_limit: 200_000_000,
            alternatives: 1,
            max_extra_vars: 2,
            output_separation: false,
        }
    }
}

impl AssignConfig {
    /// The method. [default: `Tracey`]
    pub fn method(mut self, method: Method) -> Self {
        self.method = method;
        self
    }

    /// Budget of the exact searches. It is turned into deterministic work limits (SAT
    /// work of [`SAT_WORK_PER_SECOND`] units per second of budget; the branch and bound
    /// is bounded by [`AssignConfig::node_limit`]), so the same input gives the same
    /// result on every run and machine; the wall clock stops a search only as a safety
    /// net at the end of the budget, which [`AssignStats::clock_stopped`] reports.
    /// [default: 60 s] [range: any]
    pub fn budget(mut self, budget: Duration) -> Self {
        self.budget = budget;
        self
    }

    /// Node budget of the exact searches (Tracey's branch and bound, the unit-distance
    /// search). [default: 200 000 000] [range: >= 1]
    pub fn node_limit(mut self, nodes: u64) -> Self {
        self.node_limit = nodes.max(1);
        self
    }

    /// How many distinct codes of the returned width to give, for ranking by logic cost
    /// (the first is [`Assignment::codes`], the others [`Assignment::alternatives`]).
    /// Only the `tracey` method finds several: other minimum covers first, then other
    /// fillings of the free bits (all 0, all 1). [default: 1] [range: >= 1]
    pub fn alternatives(mut self, count: usize) -> Self {
        self.alternatives = count.max(1);
        self
    }

    /// How many variables beyond the first width tried the unit-distance search may add.
    /// [default: 2] [range: 0..=60]
    pub fn max_extra_vars(mut self, extra: usize) -> Self {
        self.max_extra_vars = extra.min(60);
        self
    }

    /// Whether codes must also keep the table's outputs free of hazards while the state
    /// moves: a row whose entry in a column leads to the same destination as a move
    /// `s -> t` (or is unspecified but gives an output) is kept out of `[c_s, c_t]` when
    /// its output value clashes with the one the move shows, or when the move changes an
    /// output (see the synthesis glue, which asks for this, and docs/synthesis.md). Applies to the dichotomy methods (`tracey`,
    /// `tracey-fast`); the universal codes separate every pair from every state anyway.
    /// [default: false]
    pub fn output_separation(mut self, on: bool) -> Self {
        self.output_separation = on;
        self
    }

    /// The chosen method.
    pub fn get_method(&self) -> Method {
        self.method
    }
}

/// SAT work units (conflicts of the solver, counted as learned clauses, summed over the
/// two solvers that run at once, see `docs/assign.md`) the exact Tracey method may spend
/// per second of [`AssignConfig::budget`]. On the 2-core machine this was measured on,
/// two solvers did 21 000-26 000 units per second on the easier widths of random
/// 24-state tables but only 13 000-16 500 on the hardest ones (idle machine), so on those
/// the wall-clock safety net, not this allowance, ends a search that runs out of budget
/// (and [`AssignStats::clock_stopped`] says so).
pub const SAT_WORK_PER_SECOND: u64 = 20_000;

/// Counts and times of one [`assign`] run.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct AssignStats {
    /// Rows of the table.
    pub states: usize,
    /// Listed columns.
    pub columns: usize,
    /// Required dichotomies after reduction (0 when not computed).
    pub dichotomies: usize,
    /// Size of the clique of pairwise incompatible dichotomies found (a lower bound).
    pub incompatible_clique: usize,
    /// Search nodes (Tracey's branch and bound or the unit-distance search).
    pub nodes: u64,
    /// Whether a budget stopped a search.
    pub budget_exhausted: bool,
    /// Work units spent by the SAT engine of the exact Tracey method (solver conflicts,
    /// and local-search steps converted to them; 0 when it did not run).
    pub sat_work: u64,
    /// Whether the wall-clock safety net, rather than a deterministic work limit, stopped
    /// a search; only then may the result differ between runs.
    pub clock_stopped: bool,
    /// Wall-clock time.
    pub elapsed: Duration,
}

impl fmt::Display for AssignStats {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "states {}, columns {}, dichotomies {}, incompatible clique {}, nodes {}, {}{:.3} s",
            self.states,
            self.columns,
            self.dichotomies,
            self.incompatible_clique,
            self.nodes,
            if self.budget_exhausted {
                "budget exhausted, "
            } else {
                ""
            },
            self.elapsed.as_secs_f64()
        )
    }
}

/// A state assignment with its proof status.
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Assignment {
    /// The method that made it.
    pub method: Method,
    /// The codes.
    pub codes: Codes,
    /// Other distinct codes of the same width, for ranking by logic cost (may be empty).
    pub alternatives: Vec<Codes>,
    /// A proven lower bound on the width of any race-free single-transition-time unicode
    /// code for this table, whatever the method.
    pub lower_bound: usize,
    /// `Some(true)` when the width is proven minimum for such codes, `Some(false)` when
    /// it is not proven; `None` for one-hot, whose transitions take two steps.
    pub optimal: Option<bool>,
    /// True when transitions take several steps (one-hot), see [`Assignment::path`].
    pub multi_step: bool,
    /// Counts and times.
    pub stats: AssignStats,
}

impl Assignment {
    /// The codes passed by the transition of `s` in column `c`: `[c_s]` for a stable or
    /// unspecified entry; for single-transition-time codes `[c_s, c_t]`, meaning the
    /// whole sub-cube between them; for one-hot `[c_s, c_s | c_t, c_t]` (the two-hot
    /// intermediate code).
    pub fn path(&self, table: &FlowTable, s: StateId, c: ColumnId) -> Vec<u64> {
        match table.next(s, c) {
            Some(t) if t != s => {
                if self.multi_step {
                    one_hot::path(&self.codes, s, t)
                } else {
                    vec![self.codes.code(s), self.codes.code(t)]
                }
            }
            _ => vec![self.codes.code(s)],
        }
    }
}

/// The proven lower bound of a problem: `ceil(log2 n)` and a clique of pairwise
/// incompatible dichotomies. Returns `(bound, clique size, dichotomies)`.
fn cheap_bound(p: &Problem) -> (usize, usize, Option<Vec<dichotomy::Dichotomy>>) {
    let log = tracey::log2_bound(p.num_states);
    match dichotomy::required_for(p) {
        Ok(ds) => {
            let c = tracey::incompatible_clique(&ds, 4).len();
            (log.max(c), c, Some(ds))
        }
        Err(_) => (log, 0, None),
    }
}

/// Race-free state codes for a flow table.
///
/// The table should be normal (the pipeline collapses chains first); if it is not,
/// chains are collapsed here (rows keep their ids), and an oscillation is an error. Every
/// result passes [`separation::check`] (one-hot: [`one_hot::check`]) on the normal table;
/// debug builds assert it.
///
/// # Errors
/// [`AssignError::Oscillation`] when a column oscillates; [`AssignError::TooManyStates`]
/// or [`AssignError::TooWide`] beyond a method's limits; [`AssignError::NoUnitDistance`]
/// for `adjacent` when no width tried works.
///
/// # Example
/// ```
/// use stillpoint_assign::{assign, AssignConfig, Method};
/// use stillpoint_table::parse_text;
/// let t = parse_text("inputs x\n  0 1\na (a) c\nb (b) (b)\nc a (c)\n")?;
/// let a = assign(&t, &AssignConfig::default().method(Method::OneHot))?;
/// assert_eq!(a.codes.width(), 3);
/// assert!(a.multi_step && a.optimal.is_none());
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn assign(table: &FlowTable, cfg: &AssignConfig) -> Result<Assignment, AssignError> {
    let start = Instant::now();
    let collapsed;
    let table = if table.is_normal() {
        table
    } else {
        collapsed = normal_form(table)?;
        &collapsed
    };
    let mut p = Problem::from_table(table)?;
    if cfg.output_separation {
        p.add_output_separations(table);
    }
    let mut a = assign_problem(&p, cfg, start)?;
    a.stats.elapsed = start.elapsed();
    debug_assert!(if a.multi_step {
        one_hot::check(table, &a.codes).is_ok()
    } else {
        separation::check(table, &a.codes).is_ok()
    });
    Ok(a)
}

/// The table with its chains collapsed (same rows and columns).
fn normal_form(table: &FlowTable) -> Result<FlowTable, AssignError> {
    Ok(stillpoint_table::collapse_chains(table)?)
}

/// The SAT work allowance of a budget.
fn sat_work(budget: Duration) -> u64 {
    let micros = budget.as_micros().min(u128::from(u64::MAX));
    (micros as u64)
        .saturating_mul(SAT_WORK_PER_SECOND / 1000)
        .saturating_div(1000)
}

fn widen(width: usize) -> usize {
    width.max(1)
}

pub(crate) fn assign_problem(
    p: &Problem,
    cfg: &AssignConfig,
    start: Instant,
) -> Result<Assignment, AssignError> {
    let n = p.num_states;
    let mut stats = AssignStats {
        states: n,
        columns: p.columns.len(),
        ..Default::default()
    };
    let deadline = start.checked_add(cfg.budget);
    let make = |method, codes: Codes, lb: usize, optimal, multi_step, stats| Assignment {
        method,
        codes,
        alternatives: Vec::new(),
        lower_bound: lb,
        optimal,
        multi_step,
        stats,
    };
    match cfg.method {
        Method::Tracey | Method::TraceyFast => {
            let ds = dichotomy::required_for(p)?;
            stats.dichotomies = ds.len();
            let (classes, lb, optimal) = if cfg.method == Method::Tracey {
                let limits = tracey::Limits {
                    nodes: cfg.node_limit,
                    sat_work: sat_work(cfg.budget),
                    deadline,
                };
                let r = tracey::exact(p, &ds, limits, cfg.alternatives);
                stats.nodes = r.nodes;
                stats.incompatible_clique = r.clique;
                stats.budget_exhausted = !r.optimal;
                stats.sat_work = r.sat_work;
                stats.clock_stopped = r.clock_fired;
                (r.classes, r.lower_bound, r.optimal)
            } else {
                let cls = tracey::fast(&ds, 12);
                let clique = tracey::incompatible_clique(&ds, 4).len();
                stats.incompatible_clique = clique;
                let lb = tracey::log2_bound(n).max(clique);
                let cls = tracey::descend(n, &ds, cls, lb, deadline);
                let (cls, lb) = tracey::raise_bound(n, &ds, cls, lb, deadline);
                let opt = widen(cls.len()) == lb;
                (vec![cls], lb, opt)
            };
            let width = widen(classes[0].len());
            if width > MAX_WIDTH {
                return Err(AssignError::TooWide {
                    width,
                    max: MAX_WIDTH,
                });
            }
            let mut all: Vec<Codes> = Vec::new();
            for cls in &classes {
                let mut cls = cls.clone();
                while cls.len() < width {
                    cls.push(dichotomy::Dichotomy { left: 0, right: 0 });
                }
                let c = Codes::new(width, tracey::fill(p, &cls))?;
                if !all.contains(&c) {
                    all.push(c);
                }
            }
            // More alternatives from other fillings of the free bits.
            for cls in &classes {
                for rule in [tracey::Fill::Zero, tracey::Fill::One] {
                    if all.len() >= cfg.alternatives {
                        break;
                    }
                    let mut cls = cls.clone();
                    cls.resize(width, dichotomy::Dichotomy { left: 0, right: 0 });
                    let c = Codes::new(width, tracey::fill_with(p, &cls, rule))?;
                    if !all.contains(&c) {
                        all.push(c);
                    }
                }
            }
            all.truncate(cfg.alternatives.max(1));
            let codes = all.remove(0);
            let mut a = make(
                cfg.method,
                codes,
                lb.min(width),
                Some(optimal),
                false,
                stats,
            );
            a.alternatives = all;
            Ok(a)
        }
        Method::Liu | Method::Tan => {
            let (lb, clique, ds) = cheap_bound(p);
            stats.incompatible_clique = clique;
            stats.dichotomies = ds.map_or(0, |d| d.len());
            let (w, codes) = if cfg.method == Method::Liu {
                universal::liu(n)?
            } else {
                universal::pruned_linear(n)?
            };
            let codes = Codes::new(w, codes)?;
            Ok(make(
                cfg.method,
                codes,
                lb.min(w),
                Some(w == lb),
                false,
                stats,
            ))
        }
        Method::OneHot => {
            let (lb, clique, ds) = cheap_bound(p);
            stats.incompatible_clique = clique;
            stats.dichotomies = ds.map_or(0, |d| d.len());
            let codes = one_hot::codes(n)?;
            debug_assert!(one_hot::check_problem(p, codes.as_slice()));
            Ok(make(cfg.method, codes, lb, None, true, stats))
        }
        Method::Adjacent => {
            let (lb, clique, ds) = cheap_bound(p);
            stats.incompatible_clique = clique;
            stats.dichotomies = ds.map_or(0, |d| d.len());
            let adj = adjacent::graph(p);
            let maxdeg = adj.iter().map(Vec::len).max().unwrap_or(0);
            let first = tracey::log2_bound(n).max(maxdeg).max(1);
            let mut tried = Vec::new();
            let mut nodes_left = cfg.node_limit;
            for m in first..=(first + cfg.max_extra_vars).min(60) {
                match adjacent::embed(p, m, nodes_left) {
                    Ok(codes) => {
                        let codes = Codes::new(m, codes)?;
                        return Ok(make(
                            cfg.method,
                            codes,
                            lb.min(m),
                            Some(m == lb),
                            false,
                            stats,
                        ));
                    }
                    Err(adjacent::NoEmbedding::OddCycle(c)) => {
                        tried.push((m, adjacent::NoEmbedding::OddCycle(c)));
                        break;
                    }
                    Err(r) => {
                        let stop = r == adjacent::NoEmbedding::Budget;
                        tried.push((m, r));
                        if stop {
                            break;
                        }
                    }
                }
                nodes_left = nodes_left.saturating_sub(1).max(1);
            }
            Err(AssignError::NoUnitDistance {
                message: describe_refusals(&tried),
                tried,
            })
        }
    }
}

fn describe_refusals(tried: &[(usize, adjacent::NoEmbedding)]) -> String {
    use adjacent::NoEmbedding as N;
    tried
        .iter()
        .map(|(m, r)| match r {
            N::OddCycle(c) => format!(
                "the transition graph has an odd cycle of {} states (state #{} ...), so no width works",
                c.len(),
                c.first().copied().unwrap_or(0)
            ),
            N::DegreeTooHigh { state, degree } => {
                format!("{m} variables: state #{state} has {degree} transition partners")
            }
            N::TooFewCodes => format!("{m} variables: fewer codes than states"),
            N::Exhausted => format!("{m} variables: none exists (exhaustive search)"),
            N::Budget => format!("{m} variables: the node budget ran out"),
        })
        .collect::<Vec<_>>()
        .join("; ")
}
