//! The budget stops an exact search on a hard case: the answer is still a valid cover,
//! marked not optimal, with a proven bound no larger than its size. No timing is
//! asserted (the budget only decides how far the search gets).

use crate::common::single;
use std::time::Duration;
use stillpoint_cover::{minimize, verify, Config, Effort, HazardMode};

/// A random function of `n` variables: `p_on` % on-set, `p_dc` % don't-cares (a linear
/// congruential generator with Knuth's MMIX constants; common practice, no source).
fn random(n: usize, p_on: u64, p_dc: u64, seed: u64) -> (Vec<u64>, Vec<u64>) {
    let mut x = seed;
    let (mut on, mut dc) = (Vec::new(), Vec::new());
    for m in 0..1u64 << n {
        x = x
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let r = (x >> 11) % 100;
        if r < p_on {
            on.push(m);
        } else if r < p_on + p_dc {
            dc.push(m);
        }
    }
    (on, dc)
}

#[test]
fn budget_stops_a_hard_exact_search_with_a_bound() {
    // 12 variables, 45 % on, 15 % dc: the product count of this covering core is not
    // proven within seconds (measured on our machine: about 1 700 rows by 3 300
    // columns left after the root reductions).
    let (on, dc) = random(12, 45, 15, 5);
    let mf = single(12, &on, &dc, vec![]);
    for mode in [HazardMode::None, HazardMode::Full] {
        let cfg = Config::default()
            .hazards(mode)
            .budget(Duration::from_millis(400));
        let sol = minimize(&mf, &cfg).expect("a cover");
        verify::check(&mf, &sol, mode).expect("the stopped search's cover is valid");
        assert!(sol.stats.stopped, "{mode:?}: the budget stopped a phase");
        assert!(!sol.optimal, "{mode:?}: not claimed optimal");
        assert!(!sol.literals_optimal);
        assert!(sol.lower_bound >= 1 && sol.lower_bound <= sol.cube_count);
        assert!(sol.cube_count < on.len(), "better than the on-set points");
        let out = &sol.outputs[0];
        assert!(!out.optimal && out.lower_bound <= out.cubes.len());
        // The heuristic on the same function: a valid cover, never below the bound.
        let fast = minimize(&mf, &cfg.clone().effort(Effort::Fast)).expect("a cover");
        verify::check(&mf, &fast, mode).expect("the heuristic cover is valid");
        assert!(fast.cube_count >= sol.lower_bound);
        assert!(fast.lower_bound <= sol.cube_count);
    }
}

#[test]
fn literal_budget_keeps_the_proven_count() {
    // 12 variables, 30 % on, 10 % dc: the product count is proven by the first phase;
    // with no time for the second phase the literals are not claimed minimum.
    let (on, dc) = random(12, 30, 10, 5);
    let mf = single(12, &on, &dc, vec![]);
    let cfg = Config::default()
        .hazards(HazardMode::None)
        .literal_budget(Duration::ZERO);
    let sol = minimize(&mf, &cfg).expect("a cover");
    verify::check(&mf, &sol, HazardMode::None).expect("valid");
    assert!(sol.optimal, "the product count is proven");
    assert_eq!(sol.lower_bound, sol.cube_count);
    assert!(!sol.literals_optimal, "the literal phase had no time");
    assert!(sol.stats.stopped);
}

#[test]
fn point_table_heuristic_is_valid_in_every_mode() {
    // 14 variables, 30 % on, 10 % dc, with listed transitions of up to four changing
    // variables (those the function refuses are dropped): the heuristic's covers pass
    // the independent checker and their bounds lie between 1 and their size.
    use stillpoint_cover::{CoverError, Function, MultiFunction, Transition};
    let n = 14;
    let (on, dc) = random(n, 30, 10, 7);
    let mut x = 99u64;
    let mut next = move || {
        x = x
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        x >> 11
    };
    let mut ts: Vec<Transition> = (0..12)
        .map(|_| {
            let a = next() % (1 << n);
            Transition {
                start: a,
                end: a ^ (next() % 15 + 1),
            }
        })
        .filter(|t| dc.binary_search(&t.start).is_err() && dc.binary_search(&t.end).is_err())
        .collect();
    let vars = crate::common::vars(n);
    let full = loop {
        let f = Function::from_minterms(n, &on, &dc, ts.clone()).expect("function");
        let mf = MultiFunction::single(vars.clone(), "f", f);
        match minimize(&mf, &Config::default().effort(Effort::Fast)) {
            Err(CoverError::FunctionHazard { transition, .. })
            | Err(CoverError::NoHazardFreeCover { transition, .. }) => {
                ts.retain(|t| *t != transition)
            }
            Err(e) => panic!("{e}"),
            Ok(_) => break mf,
        }
    };
    assert!(
        !full.outputs[0].1.transitions().is_empty(),
        "some transition kept"
    );
    let plain = single(n, &on, &dc, vec![]);
    for (mf, mode) in [
        (&plain, HazardMode::None),
        (&plain, HazardMode::Static),
        (&full, HazardMode::Full),
    ] {
        let fast =
            minimize(mf, &Config::default().hazards(mode).effort(Effort::Fast)).expect("a cover");
        verify::check(mf, &fast, mode).expect("the heuristic cover is valid");
        assert!(fast.lower_bound >= 1 && fast.lower_bound <= fast.cube_count);
        assert!(!fast.literals_optimal);
    }
}
