//! An exact reference that shares nothing with the dichotomy search: minimum width by a
//! SAT encoding directly on code bits (`k` bits per state; for every two entries of a
//! column with different destinations some bit separates their pairs; distinct codes),
//! solved with the `varisat` crate (a general-purpose CDCL SAT solver).

use crate::common::{add_separation, pairs, random_normal};
use stillpoint_assign::{assign, separation, AssignConfig, Method};
use varisat::{ExtendFormula, Lit, Solver};

/// Whether a race-free STT unicode code of width `k` exists, by SAT.
fn sat_width_ok(n: usize, cols: &[Vec<(usize, usize)>], k: usize) -> bool {
    let mut s = Solver::new();
    let x: Vec<Vec<Lit>> = (0..n)
        .map(|_| (0..k).map(|_| s.new_lit()).collect())
        .collect();
    // Symmetry: complementing a variable keeps a code valid, so state 0 may be all zeros.
    for j in 0..k {
        s.add_clause(&[!x[0][j]]);
    }
    // Permuting variables keeps state 0 at zero, so state 1's ones may be put last.
    if n > 1 {
        for j in 0..k - 1 {
            s.add_clause(&[!x[1][j], x[1][j + 1]]);
        }
    }
    let separate = |s: &mut Solver, a: &[usize], b: &[usize]| add_separation(s, &x, k, a, b);
    for col in cols {
        for (i, &(a, b)) in col.iter().enumerate() {
            for &(c, d) in &col[i + 1..] {
                if b != d && a != d && b != c {
                    separate(&mut s, &[a, b], &[c, d]);
                }
            }
        }
    }
    for a in 0..n {
        for b in a + 1..n {
            separate(&mut s, &[a], &[b]);
        }
    }
    s.solve().expect("solver runs")
}

#[test]
fn exact_tracey_matches_sat_on_random_tables() {
    let mut checked = 0;
    for seed in 0..240u64 {
        let states = 4 + (seed % 7) as usize; // 4..=10
        let inputs = 2 + (seed % 2) as usize; // 2..=3
        let t = random_normal(seed * 7919 + 1, states, inputs);
        let a = assign(&t, &AssignConfig::default()).unwrap();
        assert!(separation::check(&t, &a.codes).is_ok(), "seed {seed}");
        assert_eq!(a.optimal, Some(true), "seed {seed}");
        let w = a.codes.width();
        let cols = pairs(&t);
        // The SAT minimum is w: w bits suffice and w - 1 do not.
        assert!(sat_width_ok(states, &cols, w), "seed {seed}");
        assert!(
            w == 1 || !sat_width_ok(states, &cols, w - 1),
            "seed {seed}: SAT finds fewer bits"
        );
        let want = w;
        assert!(a.lower_bound <= want);
        // The heuristic is never narrower than the optimum and its code is valid.
        let f = assign(&t, &AssignConfig::default().method(Method::TraceyFast)).unwrap();
        assert!(separation::check(&t, &f.codes).is_ok());
        assert!(f.codes.width() >= want);
        assert!(f.lower_bound <= want);
        checked += 1;
    }
    assert!(checked >= 200);
}
