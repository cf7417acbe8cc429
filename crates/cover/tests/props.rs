//! Property tests on small random functions (at most 8 variables, a few hundred cases).

use crate::common::{petrick_min, single};
use proptest::prelude::*;
use stillpoint_cover::ternary::transition_is_clean;
use stillpoint_cover::{minimize, verify, Config, CoverError, Effort, HazardMode, Transition};

/// A random function: each point on (1), off (0) or dc (2), weighted.
fn function(max_vars: usize) -> impl Strategy<Value = (usize, Vec<u64>, Vec<u64>)> {
    (2..=max_vars).prop_flat_map(|n| {
        prop::collection::vec(
            prop_oneof![4 => Just(0u8), 4 => Just(1u8), 1 => Just(2u8)],
            1usize << n,
        )
        .prop_map(move |vals| {
            let on = (0..vals.len() as u64)
                .filter(|&m| vals[m as usize] == 1)
                .collect();
            let dc = (0..vals.len() as u64)
                .filter(|&m| vals[m as usize] == 2)
                .collect();
            (n, on, dc)
        })
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 80, ..ProptestConfig::default() })]

    #[test]
    fn exact_equals_petrick_and_fast_is_no_better((n, on, dc) in function(5)) {
        // Petrick's method (product of sums multiplied out) as the brute-force oracle.
        let mf = single(n, &on, &dc, vec![]);
        let exact = minimize(&mf, &Config::default().hazards(HazardMode::None)).unwrap();
        prop_assert!(exact.optimal);
        prop_assert_eq!(exact.cube_count, petrick_min(n, &on, &dc));
        verify::check(&mf, &exact, HazardMode::None).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        let fast = minimize(&mf, &Config::default().hazards(HazardMode::None).effort(Effort::Fast)).unwrap();
        verify::check(&mf, &fast, HazardMode::None).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        prop_assert!(fast.cube_count >= exact.cube_count);
        prop_assert!(fast.lower_bound <= exact.cube_count);
    }

    #[test]
    fn static_covers_hold_every_adjacent_pair((n, on, dc) in function(7)) {
        let mf = single(n, &on, &dc, vec![]);
        for effort in [Effort::Exact, Effort::Fast] {
            let s = minimize(&mf, &Config::default().hazards(HazardMode::Static).effort(effort)).unwrap();
            verify::check(&mf, &s, HazardMode::Static).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
            // Ternary evaluation never shows X on a single-variable 1 -> 1 change.
            for &m in &on {
                for b in 0..n {
                    let m2 = m ^ (1 << b);
                    if on.contains(&m2) {
                        let t = Transition { start: m, end: m2 };
                        prop_assert!(transition_is_clean(&s.products, n, &t));
                    }
                }
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 120, ..ProptestConfig::default() })]

    #[test]
    fn full_covers_pass_the_checker(
        (n, on, dc) in function(6),
        picks in prop::collection::vec((any::<u64>(), any::<u64>()), 1..4),
    ) {
        let size = 1u64 << n;
        let specified = |m: u64| !dc.contains(&m);
        let ts: Vec<Transition> = picks
            .iter()
            .map(|&(a, b)| Transition { start: a % size, end: b % size })
            .filter(|t| t.start != t.end && specified(t.start) && specified(t.end))
            .collect();
        let mf = single(n, &on, &dc, ts.clone());
        let exact = match minimize(&mf, &Config::default()) {
            Ok(s) => s,
            Err(CoverError::FunctionHazard { .. }) | Err(CoverError::NoHazardFreeCover { .. }) => {
                // The heuristic must agree that no cover exists (decided before covering).
                prop_assert!(minimize(&mf, &Config::default().effort(Effort::Fast)).is_err());
                return Ok(());
            }
            Err(e) => return Err(TestCaseError::fail(format!("{e}"))),
        };
        prop_assert!(exact.optimal);
        verify::check(&mf, &exact, HazardMode::Full).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        let fast = minimize(&mf, &Config::default().effort(Effort::Fast)).unwrap();
        verify::check(&mf, &fast, HazardMode::Full).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        prop_assert!(fast.cube_count >= exact.cube_count);
        for t in &ts {
            prop_assert!(transition_is_clean(&exact.products, n, t));
            prop_assert!(transition_is_clean(&fast.products, n, t));
        }
    }
}
