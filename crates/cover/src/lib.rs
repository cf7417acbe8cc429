//! Hazard-free two-level (sum-of-products) minimisation, usable on its own.
//!
//! The primary types are [`Cube`] (a product term over up to 64 variables, packed in two
//! `u64` words), [`Function`] (an incompletely specified function with listed input
//! [`Transition`]s), [`MultiFunction`] (several outputs over the same variables) and
//! [`Solution`] (the cover of every output and the distinct shared products). The entry
//! point is [`minimize`], configured by [`Config`].
//!
//! Hazard modes ([`HazardMode`]):
//! - `None`: a plain minimum cover.
//! - `Static`: for every single-variable change between two **on-set** points (on-on
//!   pairs only; pairs with a don't-care end are not constrained), one product holds
//!   both points, so no static-1 logic hazard (methods brief §7.2).
//! - `Full` (Nowick & Dill): every listed transition is free of static and dynamic logic
//!   hazards: required cubes must each lie in one product and every product must be a
//!   dhf-implicant (no illegal intersection with a privileged cube). Only listed
//!   transitions count; single-variable on-on adjacency is not implied. Don't-cares
//!   inside a 1→1 transition cube become 1, inside a 0→0 cube 0.
//!
//! Engines: primes by recursive splitting ([`primes`]), exact unate covering by branch
//! and bound ([`covering`]), and a heuristic expand / irredundant / reduce loop
//! ([`Effort::Fast`]). Results are checked by the independent [`verify`] module and
//! the Kleene evaluator in [`ternary`]. The crate knows nothing of flow tables.
//!
//! ```
//! use stillpoint_cover::{minimize, Config, Function, HazardMode, MultiFunction};
//! // ab + a'c over (a, b, c): the hazard-free cover adds the consensus term bc.
//! let f = Function::from_minterms(3, &[1, 3, 6, 7], &[], vec![])?;
//! let mf = MultiFunction::single(vec!["a".into(), "b".into(), "c".into()], "f", f);
//! let plain = minimize(&mf, &Config::default().hazards(HazardMode::None))?;
//! assert_eq!(plain.cube_count, 2);
//! let safe = minimize(&mf, &Config::default().hazards(HazardMode::Static))?;
//! assert_eq!(safe.cube_count, 3);
//! assert!(safe.optimal);
//! stillpoint_cover::verify::check(&mf, &safe, HazardMode::Static).map_err(|v| format!("{v:?}"))?;
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod algebra;
mod budget;
pub mod covering;
mod cube;
mod dense;
mod exact;
mod fallback;
pub mod file;
mod function;
pub mod hazard;
mod heuristic;
mod points;
pub mod primes;
pub mod rows;
pub mod ternary;
pub mod verify;

pub use cube::{expression, Cube, MAX_VARS};
pub use function::{Function, MultiFunction, Transition};

use std::time::{Duration, Instant};

/// Everything that can go wrong in this crate.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum CoverError {
    /// A cube string could not be read.
    #[error("bad cube {text:?}: {reason}")]
    BadCube {
        /// The text given.
        text: String,
        /// What is wrong.
        reason: String,
    },
    /// More variables than a cube can hold.
    #[error("{nvars} variables: at most 64 are supported")]
    TooManyVariables {
        /// The number asked for.
        nvars: usize,
    },
    /// A minterm number does not fit the number of variables.
    #[error("minterm {minterm} does not exist with {nvars} variables (largest is 2^{nvars} - 1)")]
    MintermOutOfRange {
        /// The minterm.
        minterm: u64,
        /// The number of variables.
        nvars: usize,
    },
    /// A cube has a literal beyond the last variable.
    #[error("a cube has a literal beyond the last of {nvars} variables")]
    CubeOutOfRange {
        /// The number of variables.
        nvars: usize,
    },
    /// A point is both in the on-set and the don't-care set.
    #[error("point {point} is in both the on-set and the don't-care set")]
    OnDcOverlap {
        /// The point as a cube string.
        point: String,
        /// Its minterm number, if it is one.
        minterm: Option<u64>,
    },
    /// A listed transition is malformed (same end points, or a don't-care end point).
    #[error("transition {reason}")]
    BadTransition {
        /// The transition.
        transition: Transition,
        /// What is wrong, naming the transition.
        reason: String,
    },
    /// The function itself is not monotone along a listed transition, so no circuit can
    /// make it glitch-free.
    #[error("output {output}: function hazard on transition {reason}")]
    FunctionHazard {
        /// The output.
        output: String,
        /// The transition.
        transition: Transition,
        /// Why, naming the transition as minterms and cube strings.
        reason: String,
    },
    /// No sum of products is free of logic hazards on a listed transition.
    #[error("output {output}: no hazard-free cover exists for transition {reason}")]
    NoHazardFreeCover {
        /// The output.
        output: String,
        /// The transition that prevents it.
        transition: Transition,
        /// Why, naming the transition as minterms and cube strings.
        reason: String,
    },
    /// The budget ran out before any valid cover of the mode could be built (only in
    /// static and full mode on very large inputs: a plain cover always exists, the
    /// on-set itself).
    #[error("output {output}: {reason}")]
    BudgetExhausted {
        /// The output.
        output: String,
        /// What ran out and what to do.
        reason: String,
    },
    /// The function description is inconsistent (outputs, variable count).
    #[error("invalid function: {reason}")]
    Invalid {
        /// What is wrong.
        reason: String,
    },
}

/// Which logic hazards the cover must avoid.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub enum HazardMode {
    /// A plain minimum cover.
    None,
    /// No static-1 logic hazard for any single-variable change between on-set points.
    Static,
    /// Every listed transition free of static and dynamic logic hazards (Nowick & Dill).
    Full,
}

impl HazardMode {
    /// `none`, `static` or `full`.
    pub fn name(self) -> &'static str {
        match self {
            HazardMode::None => "none",
            HazardMode::Static => "static",
            HazardMode::Full => "full",
        }
    }
}

/// Exact search or the heuristic.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
pub enum Effort {
    /// Exact minimum within the budget (proves optimality or gives a lower bound).
    Exact,
    /// The expand / irredundant / reduce heuristic (no prime generation); reports a
    /// lower bound so the gap is known.
    Fast,
}

/// Settings of [`minimize`], built with chained setters.
///
/// ```
/// use stillpoint_cover::{Config, Effort, HazardMode};
/// use std::time::Duration;
/// let cfg = Config::default().hazards(HazardMode::Static).effort(Effort::Fast).budget(Duration::from_secs(5));
/// assert_eq!(cfg.hazard_mode(), HazardMode::Static);
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Config {
    hazards: HazardMode,
    effort: Effort,
    budget: Duration,
    node_limit: u64,
    share_products: bool,
    literal_budget: Option<Duration>,
    literal_work: Option<u64>,
}

/// The default allowance of the literal search (see [`Config::literal_work`]): this
/// many units of work per entry of the covering matrix. Measured: the covering
/// problems of the project's quality corpus finish their literal search within 78
/// units per entry; on dense 12-variable functions (30 % on) the search would need
/// more than 600 to prove anything and tens of thousands to gain a few literals, so it
/// stops there, about 6 ms into its root.
pub const LITERAL_WORK_PER_ENTRY: u64 = 128;

impl Default for Config {
    fn default() -> Self {
        Config {
            hazards: HazardMode::Full,
            effort: Effort::Exact,
            budget: Duration::from_secs(60),
            node_limit: u64::MAX,
            share_products: true,
            literal_budget: None,
            literal_work: None,
        }
    }
}

impl Config {
    /// The hazard mode (default `Full`).
    pub fn hazards(mut self, mode: HazardMode) -> Self {
        self.hazards = mode;
        self
    }
    /// The effort (default `Exact`).
    pub fn effort(mut self, effort: Effort) -> Self {
        self.effort = effort;
        self
    }
    /// The time budget of the exact search (default 60 s).
    pub fn budget(mut self, budget: Duration) -> Self {
        self.budget = budget;
        self
    }
    /// The most branch-and-bound nodes per covering problem (default unlimited).
    pub fn node_limit(mut self, nodes: u64) -> Self {
        self.node_limit = nodes;
        self
    }
    /// The most time the exact search may spend, once the product count is proven,
    /// on minimising literals among covers of that count (default: a two-hundredth of
    /// the budget, 0.3 s of the default 60 s; never more than the rest of the budget).
    /// Setting it also lifts the default work allowance (see [`Config::literal_work`]),
    /// so the time alone stops the search. When it runs out the cover keeps `optimal`
    /// (the count) and has `literals_optimal: false`.
    pub fn literal_budget(mut self, budget: Duration) -> Self {
        self.literal_budget = Some(budget);
        self
    }
    /// The most work the literal search may do (after the count is proven and the
    /// cover's columns have been exchanged for cheaper ones one at a time), in units of
    /// matrix entries visited (each subgradient step and each Lagrangian cover counts
    /// the entries of its node, each reduction pass the words of its rows), so that
    /// where it stops depends on the problem, not on the machine. Default, when neither
    /// this nor [`Config::literal_budget`] is set: [`LITERAL_WORK_PER_ENTRY`] units per
    /// entry of the covering matrix, at least [`covering::LITERAL_WORK_FLOOR`]. The time limit of the literal budget applies too.
    /// When the allowance is spent the cover keeps `optimal` (the count) and has
    /// `literals_optimal: false`.
    pub fn literal_work(mut self, units: u64) -> Self {
        self.literal_work = Some(units);
        self
    }
    /// The literal budget in force: the one set, else a two-hundredth of the budget.
    pub fn literal_budget_time(&self) -> Option<Duration> {
        Some(self.literal_budget.unwrap_or(self.budget / 200))
    }
    /// Whether outputs may share products (default `true`).
    pub fn share_products(mut self, share: bool) -> Self {
        self.share_products = share;
        self
    }
    /// The configured hazard mode.
    pub fn hazard_mode(&self) -> HazardMode {
        self.hazards
    }
    /// The configured effort.
    pub fn effort_level(&self) -> Effort {
        self.effort
    }
    /// The configured budget.
    pub fn time_budget(&self) -> Duration {
        self.budget
    }
    /// The configured node limit.
    pub fn nodes(&self) -> u64 {
        self.node_limit
    }
    /// Whether sharing is on.
    pub fn sharing(&self) -> bool {
        self.share_products
    }
}

/// The cover of one output.
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct OutputCover {
    /// The output's name.
    pub name: String,
    /// Its products, sorted.
    pub cubes: Vec<Cube>,
    /// Whether its cube count is proven minimum for this output (single output: the
    /// search finished; several shared outputs: the count meets the output's own lower
    /// bound).
    pub optimal: bool,
    /// A proven lower bound on the number of products this output needs.
    pub lower_bound: usize,
}

impl OutputCover {
    /// The literals of this output's products.
    pub fn literal_count(&self) -> usize {
        self.cubes.iter().map(|c| c.literal_count()).sum()
    }
}

/// Search statistics.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Stats {
    /// Primes generated (all outputs and output groups).
    pub primes: usize,
    /// Candidate products after the dhf reduction and deduplication (covering columns).
    pub columns: usize,
    /// Covering rows (distinct point signatures, required cubes, adjacent pairs).
    pub rows: usize,
    /// Rows and columns left after the root reductions, summed over problems.
    pub core: (usize, usize),
    /// Branch-and-bound nodes.
    pub nodes: u64,
    /// Whether the heuristic produced the covers.
    pub heuristic: bool,
    /// Whether the budget (time or nodes) stopped a phase before it finished; the
    /// covers are then the best found (or, when no search had started, a valid cover
    /// built without search) and `optimal` holds only if the count meets the bound.
    pub stopped: bool,
    /// Wall time of the exact covering searches' first phase (the product count),
    /// summed over problems.
    pub count_search: Duration,
    /// Wall time.
    pub elapsed: Duration,
}

/// The result of [`minimize`].
#[derive(Debug, Clone, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Solution {
    /// One cover per output, in the order of the outputs.
    pub outputs: Vec<OutputCover>,
    /// The distinct products over all outputs, sorted.
    pub products: Vec<Cube>,
    /// `products.len()`.
    pub cube_count: usize,
    /// Literals summed over the distinct products.
    pub literal_count: usize,
    /// Whether the product count is proven minimum for the mode (`cube_count` equals
    /// `lower_bound`). Exact covers prove it in a first search on products alone; the
    /// heuristic and the fallback covers claim it only when their count meets their
    /// bound.
    pub optimal: bool,
    /// Whether, in addition, the literal count is proven minimum among all covers with
    /// `cube_count` products (exact covers whose second search, on literals, finished;
    /// `false` when the budget stopped it, and always for the heuristic).
    pub literals_optimal: bool,
    /// A proven lower bound on the number of distinct products.
    pub lower_bound: usize,
    /// How the search went.
    pub stats: Stats,
}

impl Solution {
    /// The cover of output `name`.
    pub fn output(&self, name: &str) -> Option<&OutputCover> {
        self.outputs.iter().find(|o| o.name == name)
    }

    pub(crate) fn assemble(
        outputs: Vec<OutputCover>,
        optimal: bool,
        lower_bound: usize,
        stats: Stats,
    ) -> Solution {
        let mut products: Vec<Cube> = outputs
            .iter()
            .flat_map(|o| o.cubes.iter().copied())
            .collect();
        products.sort();
        products.dedup();
        let literal_count = products.iter().map(|c| c.literal_count()).sum();
        let cube_count = products.len();
        Solution {
            outputs,
            cube_count,
            literal_count,
            products,
            optimal,
            literals_optimal: false,
            lower_bound: lower_bound.min(cube_count),
            stats,
        }
    }
}

/// Minimises every output of `f` under `cfg`.
///
/// Errors: [`CoverError::FunctionHazard`] or [`CoverError::NoHazardFreeCover`] (full
/// mode), naming the transition; [`CoverError::Invalid`] for inconsistent input.
///
/// ```
/// use stillpoint_cover::{minimize, Config, Function, MultiFunction, Transition};
/// // methods.md §7.3 CHECK HF-1b [computed]: the single product c' is hazard-free.
/// let f = Function::from_minterms(3, &[0, 2, 6, 4], &[5, 7],
///     vec![Transition { start: 0, end: 3 }, Transition { start: 2, end: 6 }])?;
/// let mf = MultiFunction::single(vec!["a".into(), "b".into(), "c".into()], "f", f);
/// let sol = minimize(&mf, &Config::default())?;
/// assert_eq!(sol.products[0].to_string(3), "--0");
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn minimize(f: &MultiFunction, cfg: &Config) -> Result<Solution, CoverError> {
    let started = Instant::now();
    f.validate()?;
    let deadline = started.checked_add(cfg.budget);
    let clock = match deadline {
        Some(d) => budget::Clock::until(d),
        None => budget::Clock::unbounded(),
    };
    // A short grace period for building a valid cover once the budget is spent.
    let grace_span = (cfg.budget / 20).max(Duration::from_millis(5));
    let grace = match deadline.and_then(|d| d.checked_add(grace_span)) {
        Some(d) => budget::Clock::until(d),
        None => budget::Clock::unbounded(),
    };
    // The outputs are prepared in parallel (each task reads its own clock of the same
    // deadline); the first error in output order is the one reported, as in a
    // sequential run.
    use rayon::prelude::*;
    let prepared: Vec<Result<Option<hazard::OutputSpec>, CoverError>> = f
        .outputs
        .par_iter()
        .map(|(name, func)| {
            let clock = budget::Clock::until_opt(deadline);
            hazard::prepare_within(name, func, cfg.hazards, &clock)
        })
        .collect();
    let mut specs = Vec::with_capacity(f.outputs.len());
    for p in prepared {
        match p? {
            Some(s) => specs.push(s),
            None => {
                let mut sol = fallback::unprepared(f, cfg.hazards, &grace, Stats::default())?;
                sol.stats.elapsed = started.elapsed();
                return Ok(sol);
            }
        }
    }
    let mut sol = match cfg.effort {
        Effort::Exact => exact::solve(&specs, cfg, &clock, &grace)?,
        Effort::Fast => heuristic::solve(&specs, cfg, &clock, &grace)?,
    };
    sol.stats.elapsed = started.elapsed();
    Ok(sol)
}
