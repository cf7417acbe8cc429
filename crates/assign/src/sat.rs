//! A SAT decision procedure for one width of Tracey's problem: is there a code of `k`
//! variables covering every required dichotomy (race-free and distinct)?
//!
//! Translating state assignment into propositional satisfiability is a standard
//! technique; this encoding works on the dichotomies (common practice, no source):
//!
//! - `b[s][i]`: bit `i` of state `s`'s code;
//! - `e[s][t][i] <-> (b[s][i] == b[t][i])`, one shared auxiliary per two states that
//!   some dichotomy needs on one side (equal) or across (different);
//! - `x[j][i]`: variable `i` covers dichotomy `j = (P; Q)` in either orientation, i.e.
//!   `x[j][i] -> e[p0][p][i]` for `p` in `P`, `x[j][i] -> e[q0][q][i]` for `q` in `Q`,
//!   and `x[j][i] -> !e[p0][q0][i]` (`p0`, `q0` the lowest states of the sides; a
//!   dichotomy of two single states uses `!e[p0][q0][i]` itself);
//! - one clause `OR_i x[j][i]` per dichotomy (the distinctness dichotomies
//!   `({s}; {t})` of [`required`](crate::dichotomy::required) are dichotomies too).
//!
//! **Symmetry breaking** (every step keeps at least one solution of every satisfiable
//! instance, so an UNSAT answer is a proof for the unrestricted problem):
//! 1. Complementing one variable in every code keeps every dichotomy covered, so for any
//!    solution the variables on which a chosen state `r` (the one in the most
//!    dichotomies) is 1 may be complemented: `b[r][i] = 0` for all `i`.
//! 2. Variables are interchangeable, which one of two encodings ([`Sym`]) breaks:
//!    - [`Sym::Clique`]: the members `c_0, ..., c_{m-1}` of a clique of pairwise
//!      incompatible dichotomies (in every orientation) are covered by `m` different
//!      variables in any solution (two of them can never share one), so after permuting
//!      the variables, which keeps step 1, `c_t` is covered by variable `t`: its clause
//!      becomes `x[c_t][t]`. Only `m` of the `k` variables are pinned.
//!    - [`Sym::Lex`]: the bit columns (rows: the other states, busiest first) are in
//!      strictly decreasing lexicographic order, which breaks every permutation (sorting
//!      the columns of a solution keeps it one; two equal columns can be made different
//!      when `2^(n-1) >= k`).
//!
//! **Solver**: CaDiCaL (the `cadical` crate, a general-purpose CDCL solver), in two
//! option sets ([`Tuning`]): its defaults, which refute fastest here, and its set for
//! satisfiable instances, which finds codes fastest (24-state tables of 16 columns: the
//! hardest refutation measured took 16 s with the defaults and 19 s with the other set;
//! the hardest code, 126 s with the defaults and 2 s with the other). [`decide_pair`]
//! runs both on the lexicographic encoding at once, one thread each, while a width is
//! decided quickly; a width still open after [`SPLIT_FROM`] conflicts each goes to
//! [`decide_split`], which cuts the formula into cubes on the first two rows' codes
//! ([`lex_cubes`]) and shares them between two solvers.
//!
//! **Budget**: work is counted in learned clauses (one per conflict), through the
//! solver's learned-clause callback; each solve gets a conflict limit of the work left.
//! The solver is deterministic, so where a solve stops, and with it every answer, is the
//! same on every run: the allowance ([`Work`]) is the deterministic limit. A wall-clock
//! deadline, polled by the solver's termination callback, is only a safety net, and when
//! it fires [`Work::clock_fired`] records it (the result may then differ between runs).

use crate::dichotomy::{ones, Dichotomy};
use crate::tracey::Classes;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Instant;

/// The deterministic work allowance of the SAT solves of one search, in learned clauses
/// (conflicts), with a wall-clock deadline as the outer safety net.
#[derive(Debug, Clone)]
pub(crate) struct Work {
    /// Units still allowed.
    pub(crate) left: u64,
    /// Units spent so far (all solves).
    pub(crate) used: u64,
    /// The safety net.
    pub(crate) deadline: Option<Instant>,
    /// Whether the deadline, not the allowance, stopped a solve.
    pub(crate) clock_fired: bool,
}

impl Work {
    /// An allowance of `units` with a deadline.
    pub(crate) fn new(units: u64, deadline: Option<Instant>) -> Work {
        Work {
            left: units,
            used: 0,
            deadline,
            clock_fired: false,
        }
    }

    /// No limit at all (tests that run the engines to the end).
    #[cfg(test)]
    pub(crate) fn unlimited() -> Work {
        Work::new(u64::MAX, None)
    }

    /// A part of the allowance, at most `units`, to be given back with [`Work::absorb`].
    pub(crate) fn part(&self, units: u64) -> Work {
        Work {
            left: self.left.min(units),
            used: 0,
            deadline: self.deadline,
            clock_fired: false,
        }
    }

    /// Takes back what a [`Work::part`] spent.
    pub(crate) fn absorb(&mut self, part: &Work) {
        self.left = self.left.saturating_sub(part.used);
        self.used += part.used;
        self.clock_fired |= part.clock_fired;
    }

    /// Charges `units`.
    fn charge(&mut self, units: u64) {
        self.used = self.used.saturating_add(units);
        self.left = self.left.saturating_sub(units);
    }

    /// Whether nothing is left (allowance spent or the deadline fired).
    pub(crate) fn spent(&self) -> bool {
        self.left == 0 || self.clock_fired
    }
}

/// The answer for one width.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Answer {
    /// Codes of this width exist; the classes of each found (distinct as sets).
    Found(Vec<Classes>),
    /// No code of this width exists (proof).
    Infeasible,
    /// The allowance or the deadline came first.
    Stopped,
}

/// How many dichotomies each of the `n` states is in.
fn counts(n: usize, ds: &[Dichotomy]) -> Vec<usize> {
    let mut count = vec![0usize; n];
    for d in ds {
        for s in ones(d.left | d.right) {
            count[s] += 1;
        }
    }
    count
}

/// The state in the most dichotomies (lowest index on a tie).
fn pivot(n: usize, ds: &[Dichotomy]) -> usize {
    let count = counts(n, ds);
    (0..n)
        .max_by_key(|&s| (count[s], std::cmp::Reverse(s)))
        .unwrap_or(0)
}

/// Which symmetry breaking an encoding uses. Both fix the pivot state's code to 0 and
/// keep a solution of every satisfiable instance, so either one's UNSAT is a proof.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Sym {
    /// The clique members on fixed variables (step 2 of the module doc).
    Clique,
    /// The bit columns in strictly decreasing lexicographic order (rows: the busiest
    /// states first): breaks every permutation of the variables.
    Lex,
}

/// Which option set of the solver a solve uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Tuning {
    /// The solver's defaults (refutes fastest on these formulas).
    Refute,
    /// The solver's set for satisfiable instances (finds codes fastest).
    Find,
}

/// Clauses in DIMACS numbering, each ended by 0, and the number of variables.
#[derive(Debug, Clone, Default)]
pub(crate) struct Cnf {
    /// Highest variable.
    pub(crate) vars: i32,
    /// Literals, clauses ended by 0.
    pub(crate) lits: Vec<i32>,
}

impl Cnf {
    fn var(&mut self) -> i32 {
        self.vars += 1;
        self.vars
    }
    fn clause(&mut self, c: &[i32]) {
        self.lits.extend_from_slice(c);
        self.lits.push(0);
    }
    /// The clauses, one slice each.
    pub(crate) fn clauses(&self) -> impl Iterator<Item = &[i32]> {
        self.lits.split(|&l| l == 0).filter(|c| !c.is_empty())
    }
    /// The formula in DIMACS text (for experiments with other solvers).
    #[cfg(test)]
    pub(crate) fn dimacs(&self) -> String {
        let mut out = format!("p cnf {} {}\n", self.vars, self.clauses().count());
        for c in self.clauses() {
            for l in c {
                out += &format!("{l} ");
            }
            out += "0\n";
        }
        out
    }
}

/// The clauses of width `k` (see the module doc) and the variables `b[s][i]`.
pub(crate) fn formula(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    sym: Sym,
) -> (Cnf, Vec<Vec<i32>>) {
    let mut f = Cnf::default();
    let bits: Vec<Vec<i32>> = (0..n).map(|_| (0..k).map(|_| f.var()).collect()).collect();
    let r = pivot(n, ds);
    for &l in &bits[r] {
        f.clause(&[-l]);
    }
    let mut fixed_at = vec![usize::MAX; ds.len()];
    if sym == Sym::Clique {
        for (t, &c) in clique.iter().enumerate().take(k) {
            fixed_at[c] = t;
        }
    }
    // e[s][t][i] <-> (b[s][i] == b[t][i]), created on first use, shared by every
    // dichotomy that needs the two states equal (same side) or different (across).
    let mut agree_at: Vec<u32> = vec![u32::MAX; n * n];
    let mut agree: Vec<Vec<i32>> = Vec::new();
    let mut agree_of = |f: &mut Cnf, agree: &mut Vec<Vec<i32>>, s: usize, t: usize| {
        let (s, t) = (s.min(t), s.max(t));
        if agree_at[s * n + t] == u32::MAX {
            let e: Vec<i32> = (0..k)
                .map(|i| {
                    let e = f.var();
                    let (a, b) = (bits[s][i], bits[t][i]);
                    f.clause(&[-e, -a, b]);
                    f.clause(&[-e, a, -b]);
                    f.clause(&[e, a, b]);
                    f.clause(&[e, -a, -b]);
                    e
                })
                .collect();
            agree_at[s * n + t] = agree.len() as u32;
            agree.push(e);
        }
        agree_at[s * n + t] as usize
    };
    let mut any: Vec<i32> = Vec::with_capacity(k);
    let mut same: Vec<usize> = Vec::new();
    for (j, d) in ds.iter().enumerate() {
        any.clear();
        same.clear();
        let (Some(p0), Some(q0)) = (ones(d.left).next(), ones(d.right).next()) else {
            continue;
        };
        for p in ones(d.left).skip(1) {
            same.push(agree_of(&mut f, &mut agree, p0, p));
        }
        for q in ones(d.right).skip(1) {
            same.push(agree_of(&mut f, &mut agree, q0, q));
        }
        let across = agree_of(&mut f, &mut agree, p0, q0);
        let vars = if fixed_at[j] != usize::MAX {
            fixed_at[j]..fixed_at[j] + 1
        } else {
            0..k
        };
        for i in vars {
            let apart = -agree[across][i];
            if same.is_empty() {
                any.push(apart);
                continue;
            }
            // x[j][i]: variable i covers dichotomy j (in either orientation).
            let x = f.var();
            f.clause(&[-x, apart]);
            for &e in &same {
                f.clause(&[-x, agree[e][i]]);
            }
            any.push(x);
        }
        f.clause(&any);
    }
    if sym == Sym::Lex {
        lex_order(&mut f, &bits, ds, r);
    }
    (f, bits)
}

/// Column `i` lexicographically greater than column `i + 1`, rows in the order of
/// [`pivot`]'s counts (the pivot, constant 0, left out). Sound: a solution with the
/// pivot at 0 keeps covering every dichotomy after its columns are sorted, and two equal
/// columns can be made different (a replaced duplicate covers nothing the other does
/// not) as long as there are enough distinct columns, `2^(n-1) >= k`; otherwise the
/// order is not strict.
fn lex_order(f: &mut Cnf, bits: &[Vec<i32>], ds: &[Dichotomy], r: usize) {
    let n = bits.len();
    let k = bits.first().map_or(0, Vec::len);
    if k < 2 {
        return;
    }
    let rows = lex_rows(n, ds, r);
    let strict = n > 64 || (1u64 << (n - 1)) >= k as u64;
    for i in 0..k - 1 {
        // eq: the rows before the current one are equal in both columns.
        let mut eq: Option<i32> = None;
        for &s in &rows {
            let (a, b) = (bits[s][i], bits[s][i + 1]);
            match eq {
                None => f.clause(&[a, -b]),
                Some(q) => f.clause(&[-q, a, -b]),
            }
            let next = f.var();
            f.clause(&[-next, -a, b]);
            f.clause(&[-next, a, -b]);
            match eq {
                None => {
                    f.clause(&[next, -a, -b]);
                    f.clause(&[next, a, b]);
                }
                Some(q) => {
                    f.clause(&[-next, q]);
                    f.clause(&[next, -q, -a, -b]);
                    f.clause(&[next, -q, a, b]);
                }
            }
            eq = Some(next);
        }
        if strict {
            if let Some(q) = eq {
                f.clause(&[-q]);
            }
        }
    }
}

/// The rows of [`lex_order`], most significant first: the states other than the pivot
/// `r`, busiest first.
fn lex_rows(n: usize, ds: &[Dichotomy], r: usize) -> Vec<usize> {
    let count = counts(n, ds);
    let mut rows: Vec<usize> = (0..n).filter(|&s| s != r).collect();
    rows.sort_by_key(|&s| (std::cmp::Reverse(count[s]), s));
    rows
}

/// The cubes that split the lexicographic encoding of width `k` (rows `rows`, from
/// [`lex_rows`]; bit variables `bits`) into parts, as
/// assumption literals. In the order of [`lex_order`] the first row's bits do not
/// increase from column to column, so its code is `1^w 0^(k-w)` for some `w` in
/// `0..=k`; within each of the two blocks of columns where that row is constant the
/// second row's bits do not increase either, so its code is `1^a 0^(w-a) 1^b 0^(k-w-b)`.
/// Every solution of the encoding lies in exactly one cube `(w, a, b)`, so the formula
/// is unsatisfiable exactly when every cube is (with fewer than two rows, the cubes of
/// the rows there are).
fn lex_cubes(rows: &[usize], bits: &[Vec<i32>]) -> Vec<Vec<i32>> {
    let k = bits.first().map_or(0, Vec::len);
    let lit = |s: usize, i: usize, one: bool| if one { bits[s][i] } else { -bits[s][i] };
    let Some(&first) = rows.first() else {
        return vec![Vec::new()];
    };
    let mut cubes = Vec::new();
    for w in 0..=k {
        let head: Vec<i32> = (0..k).map(|i| lit(first, i, i < w)).collect();
        let Some(&second) = rows.get(1) else {
            cubes.push(head);
            continue;
        };
        for a in 0..=w {
            for b in 0..=k - w {
                let mut cube = head.clone();
                cube.extend((0..k).map(|i| lit(second, i, i < a || (i >= w && i < w + b))));
                cubes.push(cube);
            }
        }
    }
    cubes
}

/// The solver's callbacks: counts learned clauses (the work), stops on a cancel flag
/// (another solve of the same question decided it) or the deadline.
struct Meter {
    learned: u64,
    deadline: Option<Instant>,
    cancel: Arc<AtomicBool>,
    polls: u32,
    clock_fired: bool,
}

impl cadical::Callbacks for Meter {
    fn max_length(&self) -> i32 {
        i32::MAX
    }
    fn learn(&mut self, _clause: &[i32]) {
        self.learned += 1;
    }
    fn terminate(&mut self) -> bool {
        if self.cancel.load(Ordering::Relaxed) {
            return true;
        }
        self.polls = self.polls.wrapping_add(1);
        if self.polls % 64 == 0 && self.deadline.is_some_and(|d| Instant::now() >= d) {
            self.clock_fired = true;
            return true;
        }
        false
    }
}

/// One solver on one encoding of one width.
struct Engine {
    solver: cadical::Solver<Meter>,
    bits: Vec<Vec<i32>>,
}

/// What one bounded solve ended with.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Run {
    Sat,
    Unsat,
    /// The conflict limit (deterministic).
    Limit,
    /// The deadline or the cancel flag.
    Interrupted,
}

impl Engine {
    fn new(
        (f, bits): (Cnf, Vec<Vec<i32>>),
        tuning: Tuning,
        deadline: Option<Instant>,
        cancel: Arc<AtomicBool>,
    ) -> Engine {
        let config = match tuning {
            Tuning::Refute => "default",
            Tuning::Find => "sat",
        };
        let mut solver: cadical::Solver<Meter> =
            cadical::Solver::with_config(config).unwrap_or_default();
        solver.set_callbacks(Some(Meter {
            learned: 0,
            deadline,
            cancel,
            polls: 0,
            clock_fired: false,
        }));
        for c in f.clauses() {
            solver.add_clause(c.iter().copied());
        }
        Engine { solver, bits }
    }

    fn learned(&mut self) -> u64 {
        self.solver.get_callbacks().map_or(0, |m| m.learned)
    }

    fn clock_fired(&mut self) -> bool {
        self.solver.get_callbacks().is_some_and(|m| m.clock_fired)
    }

    /// Solves with at most `limit` more conflicts (continuing from earlier solves).
    fn run(&mut self, limit: u64) -> Run {
        self.run_under(limit, &[])
    }

    /// [`Engine::run`] under the assumption literals `cube`.
    fn run_under(&mut self, limit: u64, cube: &[i32]) -> Run {
        let lim = i32::try_from(limit).unwrap_or(i32::MAX);
        if self.solver.set_limit("conflicts", lim).is_err() {
            return Run::Interrupted;
        }
        match self.solver.solve_with(cube.iter().copied()) {
            Some(true) => Run::Sat,
            Some(false) => Run::Unsat,
            None => {
                let interrupted = self
                    .solver
                    .get_callbacks()
                    .is_some_and(|m| m.clock_fired || m.cancel.load(Ordering::Relaxed));
                if interrupted {
                    Run::Interrupted
                } else {
                    Run::Limit
                }
            }
        }
    }

    /// The literals of `cube` that the last unsatisfiable [`Engine::run_under`] used
    /// (empty: the formula itself is unsatisfiable).
    fn core(&self, cube: &[i32]) -> Vec<i32> {
        cube.iter()
            .copied()
            .filter(|&l| self.solver.failed(l))
            .collect()
    }

    /// [`Engine::run`] with all the work left, charged to `work`; a conflict limit spends
    /// it all, a deadline is recorded.
    fn solve_charged(&mut self, work: &mut Work) -> Run {
        let before = self.learned();
        let r = self.run(work.left);
        work.charge(self.learned() - before);
        match r {
            Run::Limit => work.left = 0,
            Run::Interrupted => work.clock_fired |= self.clock_fired(),
            Run::Sat | Run::Unsat => {}
        }
        r
    }

    /// The bit matrix of the last model.
    fn code(&self) -> Vec<Vec<bool>> {
        self.bits
            .iter()
            .map(|row| {
                row.iter()
                    .map(|&l| self.solver.value(l).unwrap_or(false))
                    .collect()
            })
            .collect()
    }

    /// Excludes the bit matrix `code`.
    fn block(&mut self, code: &[Vec<bool>]) {
        let clause: Vec<i32> = self
            .bits
            .iter()
            .zip(code)
            .flat_map(|(row, c)| row.iter().zip(c).map(|(&l, &v)| if v { -l } else { l }))
            .collect();
        self.solver.add_clause(clause);
    }
}

/// The classes of a model: for each variable, the merged sides (oriented by the bits) of
/// every dichotomy it covers.
fn classes_of(ds: &[Dichotomy], code: &[Vec<bool>], k: usize) -> Classes {
    let mut cls = vec![Dichotomy { left: 0, right: 0 }; k];
    for d in ds {
        for (i, c) in cls.iter_mut().enumerate() {
            let side = |set: u128| -> Option<bool> {
                let mut v = None;
                for s in ones(set) {
                    match v {
                        None => v = Some(code[s][i]),
                        Some(b) if b != code[s][i] => return None,
                        _ => {}
                    }
                }
                v
            };
            if let (Some(a), Some(b)) = (side(d.left), side(d.right)) {
                if a != b {
                    let o = if a { d.swapped() } else { *d };
                    c.left |= o.left;
                    c.right |= o.right;
                }
            }
        }
    }
    cls
}

/// Trivial answers: a clique wider than `k`, more states than codes, width 0.
fn trivial(n: usize, ds: &[Dichotomy], clique: &[usize], k: usize) -> Option<Answer> {
    if clique.len() > k || (k < 64 && n > 1usize << k) {
        return Some(Answer::Infeasible);
    }
    if k == 0 {
        return Some(if n <= 1 && ds.is_empty() {
            Answer::Found(vec![Vec::new()])
        } else {
            Answer::Infeasible
        });
    }
    None
}

/// A class set in a form that does not depend on orientations or variable order.
fn class_key(cls: &[Dichotomy]) -> Classes {
    let mut key: Classes = cls.iter().map(|c| c.normalized()).collect();
    key.sort_unstable();
    key
}

/// The codes of `e` after a satisfiable solve: this model's classes, then further models
/// (each bit matrix seen blocked, incremental solves) until `want` distinct class sets,
/// the work runs out, no model is left, or `4 * want` solves in all.
fn harvest(e: &mut Engine, ds: &[Dichotomy], k: usize, work: &mut Work, want: usize) -> Answer {
    let mut found: Vec<Classes> = Vec::new();
    let mut seen: Vec<Classes> = Vec::new();
    for solve in 0..want.max(1) * 4 {
        if solve > 0
            && (found.len() >= want.max(1) || work.spent() || e.solve_charged(work) != Run::Sat)
        {
            break;
        }
        let code = e.code();
        e.block(&code);
        let cls = classes_of(ds, &code, k);
        let key = class_key(&cls);
        if !seen.contains(&key) {
            seen.push(key);
            found.push(cls);
        }
    }
    Answer::Found(found)
}

/// Decides width `k` for `n` states and the required dichotomies `ds` with one solver
/// (encoding `sym`, option set `tuning`); `clique` is a clique of pairwise incompatible
/// dichotomies (indices into `ds`). When feasible, up to `want` solutions with distinct
/// class sets are returned (further solves with clauses blocking each found bit matrix,
/// at most `4 * want` solves). The solves spend `work`.
#[allow(clippy::too_many_arguments)]
pub(crate) fn decide(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &mut Work,
    want: usize,
    sym: Sym,
    tuning: Tuning,
) -> Answer {
    if let Some(a) = trivial(n, ds, clique, k) {
        return a;
    }
    if work.spent() {
        return Answer::Stopped;
    }
    let cancel = Arc::new(AtomicBool::new(false));
    let mut e = Engine::new(
        formula(n, ds, clique, k, sym),
        tuning,
        work.deadline,
        cancel,
    );
    match e.solve_charged(work) {
        Run::Sat => harvest(&mut e, ds, k, work, want),
        Run::Unsat => Answer::Infeasible,
        Run::Limit | Run::Interrupted => Answer::Stopped,
    }
}

/// The conflict limit of each cube in the first pass of [`decide_split`].
pub(crate) const FIRST_CUBE_LIMIT: u64 = 250;

/// What one thread of [`decide_split`] did in one pass.
#[derive(Default)]
struct Lane {
    /// Conflicts spent in this pass.
    spent: u64,
    /// The first cube found satisfiable (the engine holds its model).
    sat: bool,
    /// The cores of the cubes found unsatisfiable in this pass.
    cores: Vec<Vec<i32>>,
    /// Whether the deadline or the cancel flag stopped it.
    interrupted: bool,
}

/// Whether `cube` contains every literal of some core in `cores`.
fn refuted(cube: &[i32], cores: &[Vec<i32>]) -> bool {
    cores.iter().any(|c| c.iter().all(|l| cube.contains(l)))
}

/// One pass of one thread: every open cube of `mine` that no core refutes, under at
/// most `limit` conflicts each and `share` in all, in order; stops at the first
/// satisfiable cube.
fn lane_pass(
    e: &mut Engine,
    cubes: &[Vec<i32>],
    mine: &[usize],
    known: &[Vec<i32>],
    limit: u64,
    share: u64,
) -> Lane {
    let mut lane = Lane::default();
    for &c in mine {
        let cube = &cubes[c];
        if refuted(cube, known) || refuted(cube, &lane.cores) {
            continue;
        }
        let room = limit.min(share.saturating_sub(lane.spent));
        if room == 0 {
            break;
        }
        let before = e.learned();
        let r = e.run_under(room, cube);
        lane.spent += e.learned() - before;
        match r {
            Run::Sat => {
                lane.sat = true;
                break;
            }
            Run::Unsat => lane.cores.push(e.core(cube)),
            Run::Limit => {}
            Run::Interrupted => {
                lane.interrupted = true;
                break;
            }
        }
    }
    lane
}

/// Decides width `k` by splitting the lexicographic encoding into the cubes of
/// [`lex_cubes`] and solving them on two threads, each with one incremental solver
/// (option set [`Tuning::Find`], which on these formulas both finds codes and refutes
/// about as fast as the defaults or faster). A first pass gives every cube
/// [`FIRST_CUBE_LIMIT`] conflicts, which settles most of them; the cubes left are dealt
/// to the two threads alternately, and each thread works through its own in order in
/// epochs of [`EPOCH`] conflicts. Between epochs the open cubes are shared again: when
/// one thread holds more than one cube more than the other, the tail of its list moves
/// over, and when one holds none and the other a single cube, that cube is cut in two
/// on its first free bit (rows in the lexicographic order). Before each epoch two walks
/// from random codes ([`random_walks`], [`WALK`] units, a new seed each epoch) look for a
/// code the cubes may hold for long. Codes found by the solvers come with up to `want`
/// distinct class sets, by blocking clauses (a code from a walk comes alone).
///
/// A cube proven unsatisfiable leaves a core (the assumption literals the proof used);
/// a later cube containing a core is skipped, and when a core is empty the formula is
/// unsatisfiable. On the hardest tables measured (24 states, 16 columns) the cubes'
/// work sums to about that of the whole formula on one solver, so two threads refute in
/// little more than half the time of one, where two option sets on the whole formula
/// ([`decide_pair`]) gain only when one set is much faster than the other.
///
/// The answer is the same on every run whatever the threads' speeds: each thread works
/// through its own cubes in order with its own solver, the sharing between epochs
/// depends only on what the epochs settled, the first thread's code wins
/// over the second's, the first thread stops the second only when it finds a code, and
/// what is charged is twice the first thread's conflicts in that case (both threads'
/// conflicts otherwise).
pub(crate) fn decide_split(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &mut Work,
    want: usize,
) -> Answer {
    if let Some(a) = trivial(n, ds, clique, k) {
        return a;
    }
    let f = formula(n, ds, clique, k, Sym::Lex);
    let rows = lex_rows(n, ds, pivot(n, ds));
    let mut cubes = lex_cubes(&rows, &f.1);
    // The bit variables in the rows' order, to split a cube further.
    let order: Vec<i32> = rows.iter().flat_map(|&s| f.1[s].iter().copied()).collect();
    let stop_second = Arc::new(AtomicBool::new(false));
    let never = Arc::new(AtomicBool::new(false));
    let mut first = Engine::new(f.clone(), Tuning::Find, work.deadline, never);
    let mut second = Engine::new(f, Tuning::Find, work.deadline, stop_second.clone());
    let mut cores: Vec<Vec<i32>> = Vec::new();
    // The first pass deals the cubes alternately, every one with a small limit; later
    // passes (epochs of at most EPOCH conflicts per thread) continue each thread's open
    // cubes in order, and when one thread has fewer open cubes than the other, the tail
    // of the longer list moves over.
    let deal = |open: &[usize]| -> [Vec<usize>; 2] {
        [
            open.iter().step_by(2).copied().collect(),
            open.iter().skip(1).step_by(2).copied().collect(),
        ]
    };
    let mut lanes = deal(&(0..cubes.len()).collect::<Vec<_>>());
    for pass in 0u64.. {
        if work.spent() {
            return Answer::Stopped;
        }
        if pass > 0 {
            if let Some(cls) = random_walks(n, ds, k, work, WALK, 8 + pass) {
                return Answer::Found(vec![cls]);
            }
            if work.spent() {
                return Answer::Stopped;
            }
        }
        let share = (work.left / 2).clamp(1, if pass == 0 { u64::MAX } else { EPOCH });
        let limit = if pass == 0 { FIRST_CUBE_LIMIT } else { share };
        let [mine0, mine1] = &lanes;
        let (a, b) = std::thread::scope(|sc| {
            let h = sc.spawn(|| lane_pass(&mut second, &cubes, mine1, &cores, limit, share));
            let a = lane_pass(&mut first, &cubes, mine0, &cores, limit, share);
            if a.sat {
                stop_second.store(true, Ordering::Relaxed);
            }
            let b = h.join().unwrap_or(Lane {
                interrupted: true,
                ..Lane::default()
            });
            (a, b)
        });
        if first.clock_fired() || second.clock_fired() {
            work.clock_fired = true;
        }
        if a.sat {
            work.charge(2 * a.spent);
            return harvest(&mut first, ds, k, work, want);
        }
        work.charge(a.spent + b.spent);
        if b.sat {
            return harvest(&mut second, ds, k, work, want);
        }
        if a.interrupted || b.interrupted {
            // Only the deadline can interrupt here (no code was found).
            work.clock_fired = true;
            return Answer::Stopped;
        }
        let progress = a.spent + b.spent > 0 || !a.cores.is_empty() || !b.cores.is_empty();
        cores.extend(a.cores);
        cores.extend(b.cores);
        if cores.iter().any(Vec::is_empty) {
            return Answer::Infeasible;
        }
        for lane in &mut lanes {
            lane.retain(|&c| !refuted(&cubes[c], &cores));
        }
        if pass == 0 {
            // Deal the survivors of the first pass alternately again.
            let mut open = lanes.concat();
            open.sort_unstable();
            lanes = deal(&open);
        }
        let [l0, l1] = &mut lanes;
        // A lone open cube is cut in two on its first free bit, so both threads work.
        let (long, short) = if l0.is_empty() {
            (&mut *l1, &mut *l0)
        } else {
            (&mut *l0, &mut *l1)
        };
        if short.is_empty() && long.len() == 1 {
            let c = long[0];
            if let Some(&x) = order
                .iter()
                .find(|&&x| !cubes[c].iter().any(|l| l.abs() == x))
            {
                let mut other = cubes[c].clone();
                cubes[c].push(x);
                other.push(-x);
                cubes.push(other);
                short.push(cubes.len() - 1);
            }
        }
        while l0.len() > l1.len() + 1 {
            l1.push(l0.pop().unwrap_or_default());
        }
        while l1.len() > l0.len() + 1 {
            l0.push(l1.pop().unwrap_or_default());
        }
        if l0.is_empty() && l1.is_empty() {
            return Answer::Infeasible;
        }
        if !progress {
            return Answer::Stopped;
        }
    }
    Answer::Stopped
}

/// The conflicts each thread of [`decide_split`] spends between two looks at how the
/// open cubes are shared.
const EPOCH: u64 = 20_000;

/// The allowance of the two walks from random codes ([`random_walks`]) before each epoch
/// of [`decide_split`] after the first pass: an eighth of an epoch's conflicts on one
/// thread, a sixteenth of the epoch's charge.
const WALK: u64 = EPOCH / 8;

/// The round allowance (per solver) from which [`decide_pair`] hands the rest of a
/// width's decision to [`decide_split`].
pub(crate) const SPLIT_FROM: u64 = 8_000;

/// The conflict limit of the first round of [`decide_pair`] (per solver).
pub(crate) const FIRST_ALLOWANCE: u64 = 2_000;

/// Mask evaluations of the local search ([`crate::local`]) charged as one work unit:
/// about the time of one conflict of the solver on the machine it was measured on
/// (24-state tables of 16 columns: about 350 evaluations and 10 us per step; 70 us per
/// conflict, load 2).
pub(crate) const LOCAL_EVALS_PER_UNIT: u64 = 2_000;

/// The local search ([`crate::local::search`]) for codes of width `k`, spending at most
/// `allowance` of `work` (one unit per [`LOCAL_EVALS_PER_UNIT`] mask evaluations).
pub(crate) fn local_search(
    n: usize,
    ds: &[Dichotomy],
    k: usize,
    start: &[u64],
    work: &mut Work,
    allowance: u64,
    seed: u64,
) -> Option<Classes> {
    let evals = work
        .left
        .min(allowance)
        .saturating_mul(LOCAL_EVALS_PER_UNIT);
    let out = crate::local::search(
        n,
        ds,
        k,
        start,
        crate::local::Steps {
            steps: u64::MAX,
            evals,
            deadline: work.deadline,
        },
        seed,
    );
    work.charge(out.evals.div_ceil(LOCAL_EVALS_PER_UNIT));
    work.clock_fired |= out.clock_fired;
    let codes = out.codes?;
    let bits: Vec<Vec<bool>> = codes
        .iter()
        .map(|&c| (0..k).map(|i| c >> i & 1 == 1).collect())
        .collect();
    Some(classes_of(ds, &bits, k))
}

/// Two local searches ([`local_search`]) for codes of width `k` from random codes at
/// once, one thread each (walk seeds `2 * seed + 1` and `2 * seed + 2`), each with half
/// of `allowance` (or of what is left of `work`, when that is less). A walk from random
/// codes finds codes that walks from a narrowed wider code miss (on a 24-state table of
/// 16 columns, width 7: random starts found a code with each of ten seeds in 1 444 to
/// 119 717 steps, the narrowed width-8 code in none), so the decisions below mix both. The first walk's code wins over the second's and both
/// walks are charged in full, so the answer is the same on every run.
pub(crate) fn random_walks(
    n: usize,
    ds: &[Dichotomy],
    k: usize,
    work: &mut Work,
    allowance: u64,
    seed: u64,
) -> Option<Classes> {
    let half = (allowance.min(work.left) / 2).max(1);
    let mut w0 = work.part(half);
    let mut w1 = work.part(half);
    let (a, b) = std::thread::scope(|sc| {
        let h = sc.spawn(|| local_search(n, ds, k, &[], &mut w1, half, 2 * seed + 2));
        let a = local_search(n, ds, k, &[], &mut w0, half, 2 * seed + 1);
        (a, h.join().ok().flatten())
    });
    work.absorb(&w0);
    work.absorb(&w1);
    a.or(b)
}

/// Decides width `k` in rounds of doubling allowances (codes found by the solvers come
/// with up to `want` distinct class sets, by blocking clauses). First the local search
/// runs from `start` (codes of a wider incumbent, or empty) with a quarter of the first
/// round's allowance; each round then runs two walks from random codes
/// ([`random_walks`], a new seed each round) with a quarter of the round's allowance,
/// then two solvers on the lexicographic encoding at once, one thread each, one with
/// the option set that finds codes ([`Tuning::Find`]) and one with the set that refutes
/// ([`Tuning::Refute`]), with the round's allowance as conflict limit (each round continues the solvers' earlier work). From the round whose
/// allowance reaches [`SPLIT_FROM`], the rest of the decision goes to [`decide_split`].
///
/// The answer is the same on every run whatever the threads' speeds: the finder's code
/// wins over the refuter's, the finder stops the refuter only when it finds a code, the
/// refuter stops the finder only when it proves the width infeasible (then no code
/// exists), and what is charged is twice the conflicts of the solver that decided (or
/// both solvers' conflicts when neither was stopped).
pub(crate) fn decide_pair(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &mut Work,
    want: usize,
    start: &[u64],
) -> Answer {
    if let Some(a) = trivial(n, ds, clique, k) {
        return a;
    }
    // A code from the local search comes alone: the caller asks for alternatives with a
    // bounded part of the work.
    if let Some(cls) = local_search(n, ds, k, start, work, FIRST_ALLOWANCE / 4, 0) {
        return Answer::Found(vec![cls]);
    }
    let stop_finder = Arc::new(AtomicBool::new(false));
    let stop_refuter = Arc::new(AtomicBool::new(false));
    let f = formula(n, ds, clique, k, Sym::Lex);
    let mut refuter = Engine::new(
        f.clone(),
        Tuning::Refute,
        work.deadline,
        stop_refuter.clone(),
    );
    let mut finder = Engine::new(f, Tuning::Find, work.deadline, stop_finder.clone());
    let finder = &mut finder;
    let mut allowance = FIRST_ALLOWANCE;
    for round in 1u64.. {
        if work.spent() {
            return Answer::Stopped;
        }
        if let Some(cls) = random_walks(n, ds, k, work, allowance / 4, round) {
            return Answer::Found(vec![cls]);
        }
        if work.spent() {
            return Answer::Stopped;
        }
        if allowance >= SPLIT_FROM {
            return decide_split(n, ds, clique, k, work, want);
        }
        let each = allowance.min(work.left / 2).max(1);
        let ((rf, cf), (rr, cr)) = std::thread::scope(|sc| {
            let h = sc.spawn(|| {
                let b = finder.learned();
                let r = finder.run(each);
                if r == Run::Sat {
                    stop_refuter.store(true, Ordering::Relaxed);
                }
                (r, finder.learned() - b)
            });
            let b = refuter.learned();
            let r = refuter.run(each);
            if r == Run::Unsat {
                stop_finder.store(true, Ordering::Relaxed);
            }
            let own = (r, refuter.learned() - b);
            (h.join().unwrap_or((Run::Interrupted, 0)), own)
        });
        if finder.clock_fired() || refuter.clock_fired() {
            work.clock_fired = true;
        }
        if rf == Run::Sat {
            work.charge(2 * cf);
            return harvest(finder, ds, k, work, want);
        }
        if rr == Run::Unsat {
            work.charge(2 * cr);
            return Answer::Infeasible;
        }
        if rf == Run::Interrupted || rr == Run::Interrupted {
            // Only the deadline can interrupt here (neither solver decided).
            work.charge(cf + cr);
            work.clock_fired = true;
            return Answer::Stopped;
        }
        work.charge(cf + cr);
        if rf == Run::Unsat {
            return Answer::Infeasible;
        }
        if rr == Run::Sat {
            return harvest(&mut refuter, ds, k, work, want);
        }
        if each < allowance {
            // The last of the work went to this round.
            work.left = 0;
            return Answer::Stopped;
        }
        allowance = allowance.saturating_mul(2);
    }
    Answer::Stopped
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dichotomy::required_for;

    #[test]
    #[ignore]
    fn probe() {
        // Manual measurement: SP_PROBE="rows inputs seed k mode units [walk]" (mode 0
        // clique, 1 lexicographic, 2 local search from random codes, `units` its steps,
        // `walk` its seed, default 0); SP_FIND: the finder's option set; SP_PAIR: both
        // solvers at once; SP_DUMP=path: the formula in DIMACS.
        let v: Vec<u64> = std::env::var("SP_PROBE")
            .unwrap()
            .split_whitespace()
            .map(|x| x.parse().unwrap())
            .collect();
        let t = stillpoint_table::testing::random_normal_table(v[2], v[0] as usize, v[1] as usize);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let clique = crate::tracey::incompatible_clique(&ds, ds.len().min(512));
        let t0 = Instant::now();
        if v[4] == 2 {
            let lim = crate::local::Steps {
                steps: v[5],
                evals: u64::MAX,
                deadline: None,
            };
            let walk = v.get(6).copied().unwrap_or(0);
            let c = crate::local::search(p.num_states, &ds, v[3] as usize, &[], lim, walk);
            println!(
                "PROBE local {:?}: {} dichotomies, {:.3} s, {} steps, {}",
                v,
                ds.len(),
                t0.elapsed().as_secs_f64(),
                c.steps,
                c.codes.is_some()
            );
            return;
        }
        let sym = [Sym::Clique, Sym::Lex][v[4] as usize];
        let tuning = if std::env::var("SP_FIND").is_ok() {
            Tuning::Find
        } else {
            Tuning::Refute
        };
        if let Ok(path) = std::env::var("SP_DUMP") {
            let (f, _) = formula(p.num_states, &ds, &clique, v[3] as usize, sym);
            std::fs::write(path, f.dimacs()).unwrap();
        }
        if std::env::var("SP_PAIR").is_ok() {
            let mut w = Work::new(v[5], None);
            let a = decide_pair(p.num_states, &ds, &clique, v[3] as usize, &mut w, 1, &[]);
            println!(
                "PROBE pair {:?}: used {}, {:.3} s, {}",
                v,
                w.used,
                t0.elapsed().as_secs_f64(),
                match a {
                    Answer::Found(_) => "found",
                    Answer::Infeasible => "infeasible",
                    Answer::Stopped => "stopped",
                }
            );
            return;
        }
        let mut w = Work::new(v[5], None);
        let a = decide(
            p.num_states,
            &ds,
            &clique,
            v[3] as usize,
            &mut w,
            1,
            sym,
            tuning,
        );
        println!(
            "PROBE {:?} k {} {:?}: {} dichotomies, clique {}, used {}, {:.3} s",
            v,
            v[3],
            sym,
            ds.len(),
            clique.len(),
            w.used,
            t0.elapsed().as_secs_f64()
        );
        println!(
            "PROBE answer {}",
            match a {
                Answer::Found(_) => "found",
                Answer::Infeasible => "infeasible",
                Answer::Stopped => "stopped",
            }
        );
    }

    #[test]
    fn tracey1_width_three() {
        // CHECK TRACEY-1 (methods.md §4.3): minimum 3 variables. Source: S. H. Unger,
        // Columbia CS E6831 homework 6 solutions, problem 3.11.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let clique = crate::tracey::incompatible_clique(&ds, 8);
        assert_eq!(
            decide(
                5,
                &ds,
                &clique,
                2,
                &mut Work::unlimited(),
                1,
                Sym::Clique,
                Tuning::Find
            ),
            Answer::Infeasible
        );
        assert_eq!(
            decide(
                5,
                &ds,
                &[],
                2,
                &mut Work::unlimited(),
                1,
                Sym::Clique,
                Tuning::Find
            ),
            Answer::Infeasible
        );
        let Answer::Found(f) = decide(
            5,
            &ds,
            &clique,
            3,
            &mut Work::unlimited(),
            4,
            Sym::Clique,
            Tuning::Find,
        ) else {
            panic!("3 variables suffice")
        };
        assert_eq!(f.len(), 1, "the optimum is unique");
        for d in &ds {
            assert!(f[0].iter().any(|c| c.covers(*d)));
        }
        // The lexicographic encoding gives the same answers.
        assert_eq!(
            decide(
                5,
                &ds,
                &[],
                2,
                &mut Work::unlimited(),
                1,
                Sym::Lex,
                Tuning::Refute
            ),
            Answer::Infeasible
        );
        let Answer::Found(g) = decide(
            5,
            &ds,
            &[],
            3,
            &mut Work::unlimited(),
            4,
            Sym::Lex,
            Tuning::Refute,
        ) else {
            panic!("3 variables suffice")
        };
        assert_eq!(g.len(), 1, "the optimum is unique");
        for d in &ds {
            assert!(g[0].iter().any(|c| c.covers(*d)));
        }
    }

    #[test]
    fn every_encoding_matches_branch_and_bound() {
        // Each symmetry breaking alone must keep the minimum width: feasible at the
        // branch and bound's proven width, infeasible one below; every code covers
        // every dichotomy.
        for seed in 0..30u64 {
            let rows = 5 + (seed % 8) as usize; // 5..=12
            let t = stillpoint_table::testing::random_normal_table(seed + 900, rows, 3);
            let p = crate::problem::Problem::from_table(&t).unwrap();
            let ds = required_for(&p).unwrap();
            let bb = crate::tracey::exact_bb(&p, &ds, crate::tracey::Limits::unlimited(), 1);
            assert!(bb.optimal, "seed {seed}");
            let w = bb.classes[0].len().max(1);
            let clique = crate::tracey::incompatible_clique(&ds, 8);
            let n = p.num_states;
            for sym in [Sym::Clique, Sym::Lex] {
                for tuning in [Tuning::Find, Tuning::Refute] {
                    let mut w0 = Work::unlimited();
                    let below = decide(n, &ds, &clique, w - 1, &mut w0, 1, sym, tuning);
                    assert_eq!(below, Answer::Infeasible, "seed {seed} {sym:?}");
                    let mut w1 = Work::unlimited();
                    let Answer::Found(f) = decide(n, &ds, &clique, w, &mut w1, 2, sym, tuning)
                    else {
                        panic!("seed {seed} {sym:?}: width {w} is feasible")
                    };
                    for cls in &f {
                        assert!(ds.iter().all(|d| cls.iter().any(|c| c.covers(*d))));
                    }
                }
            }
            // The two solvers at once give the same answers.
            let below = decide_pair(n, &ds, &clique, w - 1, &mut Work::unlimited(), 1, &[]);
            assert_eq!(below, Answer::Infeasible, "seed {seed} pair");
            let Answer::Found(f) = decide_pair(n, &ds, &clique, w, &mut Work::unlimited(), 1, &[])
            else {
                panic!("seed {seed} pair: width {w} is feasible")
            };
            assert!(ds.iter().all(|d| f[0].iter().any(|c| c.covers(*d))));
            // So do the cubes.
            let below = decide_split(n, &ds, &clique, w - 1, &mut Work::unlimited(), 1);
            assert_eq!(below, Answer::Infeasible, "seed {seed} split");
            let Answer::Found(f) = decide_split(n, &ds, &clique, w, &mut Work::unlimited(), 2)
            else {
                panic!("seed {seed} split: width {w} is feasible")
            };
            for cls in &f {
                assert!(ds.iter().all(|d| cls.iter().any(|c| c.covers(*d))));
            }
        }
    }

    #[test]
    fn the_cubes_partition_the_lexicographic_solutions() {
        // Every solution of the lexicographic encoding lies in exactly one cube: list
        // models of a small instance (blocking each, up to 2000) and place each.
        let t = stillpoint_table::testing::random_normal_table(5, 6, 2);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let n = p.num_states;
        for k in 3..=5 {
            let f = formula(n, &ds, &[], k, Sym::Lex);
            let cubes = lex_cubes(&lex_rows(n, &ds, pivot(n, &ds)), &f.1);
            let mut e = Engine::new(f, Tuning::Find, None, Arc::new(AtomicBool::new(false)));
            let mut models = 0;
            while e.run(u64::MAX) == Run::Sat && models < 2000 {
                let code = e.code();
                let holds = |l: i32| {
                    let (s, i) = e
                        .bits
                        .iter()
                        .enumerate()
                        .find_map(|(s, row)| row.iter().position(|&v| v == l.abs()).map(|i| (s, i)))
                        .expect("cube literals are bit variables");
                    code[s][i] == (l > 0)
                };
                let inside = cubes.iter().filter(|c| c.iter().all(|&l| holds(l))).count();
                assert_eq!(inside, 1, "k {k}: a model in {inside} cubes");
                e.block(&code);
                models += 1;
            }
            assert!(models > 0, "k {k}: no model");
        }
    }

    #[test]
    fn the_split_decision_is_the_same_every_time() {
        // Work charged and answer do not depend on the threads' speeds.
        let t = stillpoint_table::testing::random_normal_table(3, 16, 4);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let clique = crate::tracey::incompatible_clique(&ds, 64);
        let runs: Vec<(Answer, u64)> = (0..3)
            .map(|_| {
                let mut w = Work::new(30_000, None);
                let a = decide_split(16, &ds, &clique, 5, &mut w, 1);
                (a, w.used)
            })
            .collect();
        assert_eq!(runs[0], runs[1]);
        assert_eq!(runs[0], runs[2]);
    }

    #[test]
    fn several_solutions_with_a_deadline() {
        // Further solutions come from incremental solves with blocking clauses.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let later = Instant::now() + std::time::Duration::from_secs(30);
        let a = decide(
            5,
            &ds,
            &[],
            4,
            &mut Work::new(1 << 30, Some(later)),
            4,
            Sym::Clique,
            Tuning::Find,
        );
        let Answer::Found(f) = a else {
            panic!("4 variables suffice")
        };
        assert!(f.len() >= 2, "several 4-variable codes exist");
    }

    #[test]
    fn deadline_in_the_past_stops() {
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        // A tiny instance may finish before the deadline is polled, so accept both;
        // what must not happen is a wrong infeasibility.
        let past = Instant::now();
        let a = decide(
            5,
            &ds,
            &[],
            3,
            &mut Work::new(u64::MAX - 1, Some(past)),
            1,
            Sym::Clique,
            Tuning::Find,
        );
        assert!(matches!(a, Answer::Found(_) | Answer::Stopped));
    }

    #[test]
    fn walks_from_random_codes_find_the_same_code_every_time() {
        // At the heuristic's width a pair of walks finds a code; two runs return the same
        // classes and charge the same work, and the classes cover every required
        // dichotomy (the checker is `Dichotomy::covers`, not the walk's own masks).
        let t = stillpoint_table::testing::random_normal_table(3, 16, 4);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let k = crate::tracey::fast(&ds, 16).len();
        let runs: Vec<(Option<Classes>, u64)> = (0..2)
            .map(|_| {
                let mut w = Work::new(1_000_000, None);
                let c = random_walks(16, &ds, k, &mut w, 100_000, 3);
                (c, w.used)
            })
            .collect();
        assert_eq!(runs[0], runs[1]);
        let cls = runs[0].0.clone().expect("a code at the heuristic's width");
        assert_eq!(cls.len(), k);
        assert!(ds.iter().all(|&d| cls.iter().any(|c| c.covers(d))));
        // No allowance, no walk.
        let mut w = Work::new(0, None);
        assert_eq!(random_walks(16, &ds, k, &mut w, 0, 3), None);
    }

    #[test]
    fn a_spent_allowance_stops_the_same_way_every_time() {
        // A zero allowance stops before any conflict; a small one stops at the same
        // point on every run (the solver is deterministic), whatever the clock says.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let mut w = Work::new(0, None);
        assert_eq!(
            decide(5, &ds, &[], 3, &mut w, 1, Sym::Clique, Tuning::Find),
            Answer::Stopped
        );
        assert!(!w.clock_fired);
        let t = stillpoint_table::testing::random_normal_table(3, 16, 4);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let runs: Vec<(Answer, u64)> = (0..2)
            .map(|_| {
                let mut w = Work::new(20_000, None);
                let a = decide(16, &ds, &[], 5, &mut w, 1, Sym::Clique, Tuning::Find);
                (a, w.used)
            })
            .collect();
        assert_eq!(runs[0], runs[1]);
    }
}
