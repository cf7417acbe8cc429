//! A SAT decision procedure for one width of Tracey's problem: is there a code of `k`
//! variables covering every required dichotomy (race-free and distinct)?
//!
//! Translating state assignment into propositional satisfiability is a standard
//! technique; this encoding works on the dichotomies (common practice, no source):
//!
//! - `b[s][i]`: bit `i` of state `s`'s code;
//! - `x[j][i][o]`: variable `i` covers dichotomy `j = (P; Q)` with orientation `o`, i.e.
//!   `x[j][i][o] -> b[p][i] = o` for `p` in `P` and `x[j][i][o] -> b[q][i] = !o` for `q`
//!   in `Q`;
//! - one clause `OR_{i,o} x[j][i][o]` per dichotomy (the distinctness dichotomies
//!   `({s}; {t})` of [`required`](crate::dichotomy::required) are dichotomies too).
//!
//! **Symmetry breaking** (both steps keep at least one solution of every satisfiable
//! instance, so an UNSAT answer is a proof for the unrestricted problem):
//! 1. Complementing one variable in every code keeps every dichotomy covered (the
//!    orientation flips), so for any solution the variables on which a chosen state `r`
//!    is 1 may be complemented: `b[r][i] = 0` for all `i`. Then a dichotomy holding `r`
//!    has a single possible orientation per variable, and only that `x` is created.
//! 2. The members `c_0, ..., c_{m-1}` of a clique of pairwise incompatible dichotomies
//!    (in every orientation) are covered by `m` different variables in any solution (two
//!    of them can never share one), so after permuting the variables, which keeps the
//!    code valid and step 1's `b[r][*] = 0`, `c_t` is covered by variable `t`: its clause
//!    becomes `x[c_t][t][0] OR x[c_t][t][1]`.
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

fn encode(n: usize, ds: &[Dichotomy], clique: &[usize], k: usize, work: &Work) -> Encoding {
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
    let rbit = 1u128 << r;
    for &l in &bits[r] {
        solver.add_clause(&[!l]);
    }
    let mut fixed_at = vec![usize::MAX; ds.len()];
    for (t, &c) in clique.iter().enumerate().take(k) {
        fixed_at[c] = t;
    }
    let mut any: Vec<Lit> = Vec::with_capacity(2 * k);
    for (j, d) in ds.iter().enumerate() {
        any.clear();
        // Orientation o: left gets o, right gets !o. With b[r] = 0, r's side must be 0.
        let orients: &[bool] = if d.left & rbit != 0 {
            &[false]
        } else if d.right & rbit != 0 {
            &[true]
        } else {
            &[false, true]
        };
        let vars = if fixed_at[j] != usize::MAX {
            fixed_at[j]..fixed_at[j] + 1
        } else {
            0..k
        };
        for i in vars {
            for &o in orients {
                let x = solver.new_lit();
                for p in ones(d.left) {
                    let l = bits[p][i];
                    solver.add_clause(&[!x, if o { l } else { !l }]);
                }
                for q in ones(d.right) {
                    let l = bits[q][i];
                    solver.add_clause(&[!x, if o { !l } else { l }]);
                }
                any.push(x);
            }
        }
        solver.add_clause(&any);
    }
    Encoding {
        solver,
        bits,
        written,
        clock,
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
        let mut e = encode(n, ds, clique, k, work);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dichotomy::required_for;

    #[test]
    fn tracey1_width_three() {
        // CHECK TRACEY-1 (methods.md §4.3): minimum 3 variables. Source: S. H. Unger,
        // Columbia CS E6831 homework 6 solutions, problem 3.11.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let clique = crate::tracey::incompatible_clique(&ds, 8);
        assert_eq!(
            decide(5, &ds, &clique, 2, &mut Work::unlimited(), 1),
            Answer::Infeasible
        );
        assert_eq!(
            decide(5, &ds, &[], 2, &mut Work::unlimited(), 1),
            Answer::Infeasible
        );
        let Answer::Found(f) = decide(5, &ds, &clique, 3, &mut Work::unlimited(), 4) else {
            panic!("3 variables suffice")
        };
        assert_eq!(f.len(), 1, "the optimum is unique");
        for d in &ds {
            assert!(f[0].iter().any(|c| c.covers(*d)));
        }
    }

    #[test]
    fn several_solutions_with_a_deadline_do_not_panic() {
        // Regression: blocking clauses added after a solve made the proof writer panic.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let later = Instant::now() + std::time::Duration::from_secs(30);
        let a = decide(5, &ds, &[], 4, &mut Work::new(1 << 30, Some(later)), 4);
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
        let a = decide(5, &ds, &[], 3, &mut Work::new(u64::MAX - 1, Some(past)), 1);
        assert!(matches!(a, Answer::Found(_) | Answer::Stopped));
    }

    #[test]
    fn a_spent_allowance_stops_the_same_way_every_time() {
        // A zero allowance stops before any proof byte; a small one stops at the same
        // point on every run (the solver is deterministic), whatever the clock says.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let mut w = Work::new(0, None);
        assert_eq!(decide(5, &ds, &[], 3, &mut w, 1), Answer::Stopped);
        assert!(!w.clock_fired);
        let t = stillpoint_table::testing::random_normal_table(3, 16, 4);
        let p = crate::problem::Problem::from_table(&t).unwrap();
        let ds = required_for(&p).unwrap();
        let runs: Vec<(Answer, u64)> = (0..2)
            .map(|_| {
                let mut w = Work::new(20_000, None);
                let a = decide(16, &ds, &[], 5, &mut w, 1);
                (a, w.used)
            })
            .collect();
        assert_eq!(runs[0], runs[1]);
    }
}
