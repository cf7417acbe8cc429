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
//! **Budget**: the solver has no interrupt; its proof output is written into a sink that
//! fails once the deadline has passed, which makes the solver stop with an error (the
//! solver is then dropped and the width reported as not decided).

use crate::dichotomy::{ones, Dichotomy};
use crate::tracey::Classes;
use std::io;
use std::time::Instant;
use varisat::{ExtendFormula, Lit, ProofFormat, Solver};

/// A proof sink that refuses writes once the deadline has passed (how a solve is stopped).
struct DeadlineSink {
    at: Instant,
}

impl io::Write for DeadlineSink {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        if Instant::now() >= self.at {
            Err(io::Error::other("deadline"))
        } else {
            Ok(buf.len())
        }
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

fn encode(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    deadline: Option<Instant>,
) -> Encoding {
    let mut solver = Solver::new();
    if let Some(at) = deadline {
        solver.write_proof(DeadlineSink { at }, ProofFormat::BinaryDrat);
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
    Encoding { solver, bits }
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
/// blocking each found bit matrix, at most `4 * want` solves).
pub(crate) fn decide(
    n: usize,
    ds: &[Dichotomy],
    clique: &[usize],
    k: usize,
    deadline: Option<Instant>,
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
        let mut e = encode(n, ds, clique, k, deadline);
        for code in &blocked {
            let block: Vec<Lit> = e
                .bits
                .iter()
                .zip(code)
                .flat_map(|(row, c)| row.iter().zip(c).map(|(&l, &v)| if v { !l } else { l }))
                .collect();
            e.solver.add_clause(&block);
        }
        match e.solver.solve() {
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
        assert_eq!(decide(5, &ds, &clique, 2, None, 1), Answer::Infeasible);
        assert_eq!(decide(5, &ds, &[], 2, None, 1), Answer::Infeasible);
        let Answer::Found(f) = decide(5, &ds, &clique, 3, None, 4) else {
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
        let a = decide(5, &ds, &[], 4, Some(later), 4);
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
        let a = decide(5, &ds, &[], 3, Some(past), 1);
        assert!(matches!(a, Answer::Found(_) | Answer::Stopped));
    }
}
