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
//!      becomes `x[c_t][t]`. Only `m` of the `k` variables are pinned, but the solver
//!      finds codes fast.
//!    - [`Sym::Lex`]: the bit columns (rows: the other states, busiest first) are in
//!      strictly decreasing lexicographic order, which breaks every permutation (sorting
//!      the columns of a solution keeps it one; two equal columns can be made different
//!      when `2^(n-1) >= k`). It refutes a width much faster (24-state tables: seconds
//!      instead of minutes) but finds codes more slowly.
//!
//! [`decide_alternating`] runs the two encodings in turn with doubling allowances.
//!
//! **Budget**: the solver has no interrupt and no conflict limit; its proof output (binary
//! DRAT, mostly one record per learned or deleted clause) is written into a sink that
//! counts the bytes and fails once a work allowance is spent, which makes the solver stop
//! with an error (the solver is then dropped and the width reported as not decided). The
//! solver is deterministic, so the byte count at which it stops, and with it every
//! answer, is the same on every run: the allowance ([`Work`]) is the deterministic limit.
//! The sink also fails once a wall-clock deadline has passed; that is only a safety net,
//! and when it fires [`Work::clock_fired`] records it (the result may then differ between
//! runs).

use crate::dichotomy::{ones, Dichotomy};
use crate::tracey::Classes;
use std::cell::Cell;
use std::io;
use std::rc::Rc;
use std::time::Instant;
use varisat::{ExtendFormula, Lit, ProofFormat, Solver};

/// The deterministic work allowance of the SAT solves of one search, in bytes of proof
/// output, with a wall-clock deadline as the outer safety net.
#[derive(Debug, Clone)]
pub(crate) struct Work {
    /// Bytes still allowed.
    pub(crate) left: u64,
    /// Bytes written so far (all solves).
    pub(crate) used: u64,
    /// The safety net.
    pub(crate) deadline: Option<Instant>,
    /// Whether the deadline, not the allowance, stopped a solve.
    pub(crate) clock_fired: bool,
}

impl Work {
    /// An allowance of `bytes` with a deadline.
    pub(crate) fn new(bytes: u64, deadline: Option<Instant>) -> Work {
        Work {
            left: bytes,
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

    /// A part of the allowance, at most `bytes`, to be given back with [`Work::absorb`].
    pub(crate) fn part(&self, bytes: u64) -> Work {
        Work {
            left: self.left.min(bytes),
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

    /// Whether nothing is left (allowance spent or the deadline fired).
    pub(crate) fn spent(&self) -> bool {
        self.left == 0 || self.clock_fired
    }
}

/// A proof sink that counts bytes and refuses writes beyond the allowance or after the
/// deadline (how a solve is stopped).
struct CountingSink {
    written: Rc<Cell<u64>>,
    limit: u64,
    deadline: Option<Instant>,
    clock: Rc<Cell<bool>>,
}

impl io::Write for CountingSink {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        let w = self.written.get().saturating_add(buf.len() as u64);
        if w > self.limit {
            return Err(io::Error::other("work allowance spent"));
        }
        if self.deadline.is_some_and(|d| Instant::now() >= d) {
            self.clock.set(true);
            return Err(io::Error::other("deadline"));
        }
        self.written.set(w);
        Ok(buf.len())
    }
    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}

/// The answer for one width.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Answer {
    /// Codes of this width exist; the classes of each found (distinct as sets).
    Found(Vec<Classes>),
    /// No code of this width exists (proof).
    Infeasible,
    /// The deadline came first.
    Stopped,
}

/// The encoding of one width.
struct Encoding {
    solver: Solver<'static>,
    /// `b[s][i]`.
    bits: Vec<Vec<Lit>>,
    /// Proof bytes written by this solver.
    written: Rc<Cell<u64>>,
    /// Whether the deadline stopped it.
    clock: Rc<Cell<bool>>,
}

/// The state in the most dichotomies (lowest index on a tie).
fn pivot(n: usize, ds: &[Dichotomy]) -> usize {
    let mut count = vec![0usize; n];
    for d in ds {
        for s in ones(d.left | d.right) {
            count[s] += 1;
        }
    }
    (0..n)
        .max_by_key(|&s| (count[s], std::cmp::Reverse(s)))
        .unwrap_or(0)
}

/// Which symmetry breaking an encoding uses. Both fix the pivot state's code to 0 and
/// keep a solution of every satisfiable instance, so either one's UNSAT is a proof.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Sym {
    /// The clique members on fixed variables (step 2 of the module doc): finds codes fast.
    Clique,
    /// The bit columns in strictly decreasing lexicographic order (rows: the busiest
    /// states first): breaks every permutation of the variables, refutes faster, but
    /// slows the search for a code.
    Lex,
}

fn encode(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &Work,
    sym: Sym,
) -> Encoding {
    let mut solver = Solver::new();
    let written = Rc::new(Cell::new(0));
    let clock = Rc::new(Cell::new(false));
    if work.left != u64::MAX || work.deadline.is_some() {
        let sink = CountingSink {
            written: written.clone(),
            limit: work.left,
            deadline: work.deadline,
            clock: clock.clone(),
        };
        solver.write_proof(sink, ProofFormat::BinaryDrat);
    }
    let bits: Vec<Vec<Lit>> = (0..n)
        .map(|_| (0..k).map(|_| solver.new_lit()).collect())
        .collect();
    let r = pivot(n, ds);
    for &l in &bits[r] {
        solver.add_clause(&[!l]);
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
    let mut agree: Vec<Vec<Lit>> = Vec::new();
    let mut agree_of =
        |solver: &mut Solver<'static>, agree: &mut Vec<Vec<Lit>>, s: usize, t: usize| {
            let (s, t) = (s.min(t), s.max(t));
            if agree_at[s * n + t] == u32::MAX {
                let e: Vec<Lit> = (0..k)
                    .map(|i| {
                        let e = solver.new_lit();
                        let (a, b) = (bits[s][i], bits[t][i]);
                        solver.add_clause(&[!e, !a, b]);
                        solver.add_clause(&[!e, a, !b]);
                        solver.add_clause(&[e, a, b]);
                        solver.add_clause(&[e, !a, !b]);
                        e
                    })
                    .collect();
                agree_at[s * n + t] = agree.len() as u32;
                agree.push(e);
            }
            agree_at[s * n + t] as usize
        };
    let mut any: Vec<Lit> = Vec::with_capacity(k);
    let mut same: Vec<usize> = Vec::new();
    for (j, d) in ds.iter().enumerate() {
        any.clear();
        same.clear();
        let (Some(p0), Some(q0)) = (ones(d.left).next(), ones(d.right).next()) else {
            continue;
        };
        for p in ones(d.left).skip(1) {
            same.push(agree_of(&mut solver, &mut agree, p0, p));
        }
        for q in ones(d.right).skip(1) {
            same.push(agree_of(&mut solver, &mut agree, q0, q));
        }
        let across = agree_of(&mut solver, &mut agree, p0, q0);
        let vars = if fixed_at[j] != usize::MAX {
            fixed_at[j]..fixed_at[j] + 1
        } else {
            0..k
        };
        for i in vars {
            let apart = !agree[across][i];
            if same.is_empty() {
                any.push(apart);
                continue;
            }
            // x[j][i]: variable i covers dichotomy j (in either orientation).
            let x = solver.new_lit();
            solver.add_clause(&[!x, apart]);
            for &e in &same {
                solver.add_clause(&[!x, agree[e][i]]);
            }
            any.push(x);
        }
        solver.add_clause(&any);
    }
    if sym == Sym::Lex {
        lex_order(&mut solver, &bits, ds, r);
    }
    Encoding {
        solver,
        bits,
        written,
        clock,
    }
}

/// Column `i` lexicographically greater than column `i + 1`, rows in the order of
/// [`pivot`]'s counts (the pivot, constant 0, left out). Sound: a solution with the
/// pivot at 0 keeps covering every dichotomy after its columns are sorted, and two equal
/// columns can be made different (a replaced duplicate covers nothing the other does
/// not) as long as there are enough distinct columns, `2^(n-1) >= k`; otherwise the
/// order is not strict.
fn lex_order(solver: &mut Solver<'static>, bits: &[Vec<Lit>], ds: &[Dichotomy], r: usize) {
    let n = bits.len();
    let k = bits.first().map_or(0, Vec::len);
    if k < 2 {
        return;
    }
    let mut count = vec![0usize; n];
    for d in ds {
        for s in ones(d.left | d.right) {
            count[s] += 1;
        }
    }
    let mut rows: Vec<usize> = (0..n).filter(|&s| s != r).collect();
    rows.sort_by_key(|&s| (std::cmp::Reverse(count[s]), s));
    let strict = n > 64 || (1u64 << (n - 1)) >= k as u64;
    for i in 0..k - 1 {
        // eq: the rows before the current one are equal in both columns.
        let mut eq: Option<Lit> = None;
        for &s in &rows {
            let (a, b) = (bits[s][i], bits[s][i + 1]);
            match eq {
                None => solver.add_clause(&[a, !b]),
                Some(q) => solver.add_clause(&[!q, a, !b]),
            }
            let next = solver.new_lit();
            solver.add_clause(&[!next, !a, b]);
            solver.add_clause(&[!next, a, !b]);
            match eq {
                None => {
                    solver.add_clause(&[next, !a, !b]);
                    solver.add_clause(&[next, a, b]);
                }
                Some(q) => {
                    solver.add_clause(&[!next, q]);
                    solver.add_clause(&[next, !q, !a, !b]);
                    solver.add_clause(&[next, !q, a, b]);
                }
            }
            eq = Some(next);
        }
        if strict {
            if let Some(q) = eq {
                solver.add_clause(&[!q]);
            }
        }
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

/// Decides width `k` for `n` states and the required dichotomies `ds`; `clique` is a
/// clique of pairwise incompatible dichotomies (indices into `ds`). When feasible, up to
/// `want` solutions with distinct class sets are returned (further solves with clauses
/// blocking each found bit matrix, at most `4 * want` solves). The solves spend `work`.
pub(crate) fn decide(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &mut Work,
    want: usize,
    sym: Sym,
) -> Answer {
    if clique.len() > k || (k < 64 && n > 1usize << k) {
        return Answer::Infeasible;
    }
    if k == 0 {
        return if n <= 1 && ds.is_empty() {
            Answer::Found(vec![Vec::new()])
        } else {
            Answer::Infeasible
        };
    }
    let mut found: Vec<Classes> = Vec::new();
    let mut seen: Vec<Classes> = Vec::new();
    // Bit matrices already returned or seen. The solver writes a proof (that is how the
    // deadline stops it), and proofs do not allow clauses added after a solve, so each
    // further solve starts from a fresh encoding with one blocking clause per matrix.
    let mut blocked: Vec<Vec<Vec<bool>>> = Vec::new();
    for _ in 0..want.max(1) * 4 {
        if work.spent() {
            return if found.is_empty() {
                Answer::Stopped
            } else {
                Answer::Found(found)
            };
        }
        let mut e = encode(n, ds, clique, k, work, sym);
        for code in &blocked {
            let block: Vec<Lit> = e
                .bits
                .iter()
                .zip(code)
                .flat_map(|(row, c)| row.iter().zip(c).map(|(&l, &v)| if v { !l } else { l }))
                .collect();
            e.solver.add_clause(&block);
        }
        let res = e.solver.solve();
        let spent = e.written.get();
        work.used += spent;
        work.left = if work.left == u64::MAX {
            u64::MAX
        } else {
            work.left.saturating_sub(spent)
        };
        if res.is_err() {
            work.clock_fired |= e.clock.get();
            if !e.clock.get() {
                work.left = 0;
            }
        }
        match res {
            Ok(true) => {}
            Ok(false) => break,
            Err(_) => {
                return if found.is_empty() {
                    Answer::Stopped
                } else {
                    Answer::Found(found)
                };
            }
        }
        let model = e.solver.model().unwrap_or_default();
        let mut val = vec![false; model.len() + 1];
        for l in &model {
            if l.is_positive() {
                val[l.index()] = true;
            }
        }
        let code: Vec<Vec<bool>> = e
            .bits
            .iter()
            .map(|row| row.iter().map(|l| val[l.index()]).collect())
            .collect();
        let cls = classes_of(ds, &code, k);
        let mut key: Classes = cls.iter().map(|c| c.normalized()).collect();
        key.sort_unstable();
        if !seen.contains(&key) {
            seen.push(key);
            found.push(cls);
            if found.len() >= want.max(1) {
                break;
            }
        }
        blocked.push(code);
    }
    if found.is_empty() {
        Answer::Infeasible
    } else {
        Answer::Found(found)
    }
}

/// The first allowance of [`decide_alternating`], in proof bytes.
pub(crate) const FIRST_ALLOWANCE: u64 = 100_000;

/// Mask evaluations of the local search ([`crate::local`]) charged as one work unit:
/// about the time of one proof byte of the solver on the machine it was measured on
/// (24-state tables of 16 columns: about 350 evaluations and 10 us per step, 1.2 us per
/// proof byte, load 4).
pub(crate) const LOCAL_EVALS_PER_UNIT: u64 = 40;

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
    let spent = out.evals.div_ceil(LOCAL_EVALS_PER_UNIT);
    work.used = work.used.saturating_add(spent);
    work.left = work.left.saturating_sub(spent);
    work.clock_fired |= out.clock_fired;
    let codes = out.codes?;
    let bits: Vec<Vec<bool>> = codes
        .iter()
        .map(|&c| (0..k).map(|i| c >> i & 1 == 1).collect())
        .collect();
    Some(classes_of(ds, &bits, k))
}

/// Decides width `k` by three searches in turn, each from scratch, until one decides or
/// `work` is spent: the local search from `start` (codes of a wider incumbent, or empty)
/// finds codes fast; [`Sym::Lex`] refutes; [`Sym::Clique`] does either on some tables.
/// Round `t` gives the lexicographic encoding `2^t` times [`FIRST_ALLOWANCE`] and the
/// two others a quarter of that each (measured on 24-state tables: the local search
/// decides a feasible width at once or not at all, the lexicographic encoding decides
/// most infeasible ones). The rotation costs about three and a half times the work of
/// the lexicographic solve alone, and, like every solve, stops on counted work only.
pub(crate) fn decide_alternating(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    work: &mut Work,
    want: usize,
    start: &[u64],
) -> Answer {
    if clique.len() > k || (k < 64 && n > 1usize << k) {
        return Answer::Infeasible;
    }
    let mut allowance = FIRST_ALLOWANCE;
    for round in 0u64.. {
        if work.spent() {
            return Answer::Stopped;
        }
        if let Some(cls) = local_search(n, ds, k, start, work, allowance / 4, round) {
            return Answer::Found(vec![cls]);
        }
        for (sym, share) in [(Sym::Lex, allowance), (Sym::Clique, allowance / 4)] {
            if work.spent() {
                return Answer::Stopped;
            }
            let whole = share >= work.left;
            let mut part = work.part(share);
            let a = decide(n, ds, clique, k, &mut part, want, sym);
            work.absorb(&part);
            if a != Answer::Stopped {
                return a;
            }
            if whole {
                // The sink refuses a whole buffer of proof beyond the limit, so a stop
                // can leave a remainder too small for any solve: all is spent.
                work.left = 0;
                return a;
            }
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
        // Manual measurement: SP_PROBE="rows inputs seed k mode bytes".
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
            let c = crate::local::search(p.num_states, &ds, v[3] as usize, &[], lim, 0);
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
        let mut w = Work::new(v[5], None);
        let a = decide(p.num_states, &ds, &clique, v[3] as usize, &mut w, 1, sym);
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
            decide(5, &ds, &clique, 2, &mut Work::unlimited(), 1, Sym::Clique),
            Answer::Infeasible
        );
        assert_eq!(
            decide(5, &ds, &[], 2, &mut Work::unlimited(), 1, Sym::Clique),
            Answer::Infeasible
        );
        let Answer::Found(f) = decide(5, &ds, &clique, 3, &mut Work::unlimited(), 4, Sym::Clique)
        else {
            panic!("3 variables suffice")
        };
        assert_eq!(f.len(), 1, "the optimum is unique");
        for d in &ds {
            assert!(f[0].iter().any(|c| c.covers(*d)));
        }
        // The lexicographic encoding gives the same answers.
        assert_eq!(
            decide(5, &ds, &[], 2, &mut Work::unlimited(), 1, Sym::Lex),
            Answer::Infeasible
        );
        let Answer::Found(g) = decide(5, &ds, &[], 3, &mut Work::unlimited(), 4, Sym::Lex) else {
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
            for sym in [Sym::Clique, Sym::Lex] {
                let n = p.num_states;
                let below = decide(n, &ds, &clique, w - 1, &mut Work::unlimited(), 1, sym);
                assert_eq!(below, Answer::Infeasible, "seed {seed} {sym:?}");
                let Answer::Found(f) = decide(n, &ds, &clique, w, &mut Work::unlimited(), 2, sym)
                else {
                    panic!("seed {seed} {sym:?}: width {w} is feasible")
                };
                for cls in &f {
                    assert!(ds.iter().all(|d| cls.iter().any(|c| c.covers(*d))));
                }
            }
        }
    }

    #[test]
    fn several_solutions_with_a_deadline_do_not_panic() {
        // Regression: blocking clauses added after a solve made the proof writer panic.
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
        // A tiny instance may finish before the proof buffer is written, so accept both;
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
        );
        assert!(matches!(a, Answer::Found(_) | Answer::Stopped));
    }

    #[test]
    fn a_spent_allowance_stops_the_same_way_every_time() {
        // A zero allowance stops before any proof byte; a small one stops at the same
        // point on every run (the solver is deterministic), whatever the clock says.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let mut w = Work::new(0, None);
        assert_eq!(
            decide(5, &ds, &[], 3, &mut w, 1, Sym::Clique),
            Answer::Stopped
        );
        assert!(!w.clock_fired);
        let t = stillpoint_table::testing::random_normal_table(3, 16, 4);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let runs: Vec<(Answer, u64)> = (0..2)
            .map(|_| {
                let mut w = Work::new(20_000, None);
                let a = decide(16, &ds, &[], 5, &mut w, 1, Sym::Clique);
                (a, w.used)
            })
            .collect();
        assert_eq!(runs[0], runs[1]);
    }
}
