//! The reducer against independent checks: the closed-cover checker, the reduction
//! checker, and an exact SAT formulation of "k classes suffice" on raw state-to-class
//! variables, solved by the `varisat` crate (no compatibles involved).

use proptest::prelude::*;
use stillpoint_table::testing::{arb_normal_table, arb_table};
use stillpoint_table::verify::{check_closed_cover, check_reduction};
use stillpoint_table::{collapse_chains, minimum_closed_cover, reduce, FlowTable, ReduceConfig};
use varisat::{ExtendFormula, Lit, Solver};

/// Whether the rows of `t` (read as a general incompletely specified machine) have a
/// closed cover by `k` output-consistent classes. Variables: `x[s][j]` (row `s` in class
/// `j`) and `y[j][c][i]` (the next states of class `j`'s members in column `c` all lie in
/// class `i`). This is the definition of a closed cover (methods.md §2.1; Unger's
/// Columbia notes on covers) encoded directly.
#[allow(clippy::needless_range_loop)]
pub(crate) fn closed_cover_exists(t: &FlowTable, k: usize) -> bool {
    let n = t.num_states();
    let mut solver = Solver::new();
    let x: Vec<Vec<Lit>> = (0..n)
        .map(|_| (0..k).map(|_| solver.new_lit()).collect())
        .collect();
    for row in &x {
        solver.add_clause(row);
    }
    let states: Vec<_> = t.states().collect();
    for (a, &sa) in states.iter().enumerate() {
        for (b, &sb) in states.iter().enumerate().skip(a + 1) {
            let conflict = t.columns().any(|c| {
                t.outputs(sa, c)
                    .iter()
                    .zip(t.outputs(sb, c))
                    .any(|(p, q)| p.conflicts(*q))
            });
            if conflict {
                for j in 0..k {
                    solver.add_clause(&[!x[a][j], !x[b][j]]);
                }
            }
        }
    }
    for j in 0..k {
        for c in t.columns() {
            let y: Vec<Lit> = (0..k).map(|_| solver.new_lit()).collect();
            solver.add_clause(&y);
            for (i, &yi) in y.iter().enumerate() {
                for (s, &st) in states.iter().enumerate() {
                    if let Some(nx) = t.next(st, c) {
                        solver.add_clause(&[!yi, !x[s][j], x[nx.index()][i]]);
                    }
                }
            }
        }
    }
    solver.solve().expect("the solver runs")
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn minimum_closed_cover_is_minimum(t in arb_table(7, 2, 2)) {
        let cover = minimum_closed_cover(&t, &ReduceConfig::default()).unwrap();
        prop_assert!(cover.optimal);
        check_closed_cover(&t, &cover.classes).unwrap();
        let k = cover.classes.len();
        prop_assert!(k <= t.num_states());
        prop_assert!(closed_cover_exists(&t, k));
        if k > 1 {
            prop_assert!(!closed_cover_exists(&t, k - 1), "{} classes would do:\n{}", k - 1, t.to_text());
        }
    }

    #[test]
    fn reduced_table_covers_the_original(t in arb_normal_table(7, 2)) {
        let r = reduce(&t, &ReduceConfig::default()).unwrap();
        check_reduction(&t, &r).unwrap();
        prop_assert!(r.table.num_states() <= t.num_states());
        prop_assert!(r.optimal);
        let normal = collapse_chains(&t).unwrap();
        let k = r.table.num_states();
        prop_assert!(closed_cover_exists(&normal, k));
        if k > 1 {
            prop_assert!(!closed_cover_exists(&normal, k - 1));
        }
    }

    #[test]
    fn any_table_reduces_or_names_its_oscillation(t in arb_table(8, 3, 2)) {
        match reduce(&t, &ReduceConfig::default()) {
            Ok(r) => check_reduction(&t, &r).unwrap(),
            Err(e) => prop_assert!(!stillpoint_table::analyze(&t).realizable, "{e}"),
        }
    }
}
