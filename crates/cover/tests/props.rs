//! Property tests on small random functions (at most 8 variables, a few hundred cases).

use crate::common::{petrick_min, single};
use proptest::prelude::*;
use stillpoint_cover::ternary::transition_is_clean;
use stillpoint_cover::{
    minimize, verify, Config, CoverError, Cube, Effort, HazardMode, Transition,
};

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
        prop_assert!(exact.literals_optimal);
        prop_assert_eq!(exact.cube_count, petrick_min(n, &on, &dc));
        verify::check(&mf, &exact, HazardMode::None).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        let fast = minimize(&mf, &Config::default().hazards(HazardMode::None).effort(Effort::Fast)).unwrap();
        verify::check(&mf, &fast, HazardMode::None).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        prop_assert!(fast.cube_count >= exact.cube_count);
        prop_assert!(fast.lower_bound <= exact.cube_count);
        // A search stopped early still gives a valid cover and a true lower bound.
        let cut = minimize(&mf, &Config::default().hazards(HazardMode::None).node_limit(1)).unwrap();
        verify::check(&mf, &cut, HazardMode::None).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
        prop_assert!(cut.lower_bound <= exact.cube_count && exact.cube_count <= cut.cube_count);
    }

    #[test]
    fn shared_outputs_pass_the_checker((n, on, dc) in function(5), (_, on2, dc2) in function(5)) {
        // Two outputs over the same variables (the second one's points folded into range).
        let size = 1u64 << n;
        let mut on2: Vec<u64> = on2.iter().map(|m| m % size).collect();
        on2.sort_unstable();
        on2.dedup();
        let mut dc2: Vec<u64> = dc2.iter().map(|m| m % size).filter(|m| !on2.contains(m)).collect();
        dc2.sort_unstable();
        dc2.dedup();
        let f = stillpoint_cover::Function::from_minterms(n, &on, &dc, vec![]).unwrap();
        let g = stillpoint_cover::Function::from_minterms(n, &on2, &dc2, vec![]).unwrap();
        let mf = stillpoint_cover::MultiFunction { vars: crate::common::vars(n), outputs: vec![("f".into(), f), ("g".into(), g)] };
        for mode in [HazardMode::None, HazardMode::Static] {
            let shared = minimize(&mf, &Config::default().hazards(mode)).unwrap();
            verify::check(&mf, &shared, mode).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
            let apart = minimize(&mf, &Config::default().hazards(mode).share_products(false)).unwrap();
            verify::check(&mf, &apart, mode).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
            let fast = minimize(&mf, &Config::default().hazards(mode).effort(Effort::Fast)).unwrap();
            verify::check(&mf, &fast, mode).map_err(|v| TestCaseError::fail(format!("{v:?}")))?;
            prop_assert!(shared.optimal);
            // Sharing never needs more distinct products than covering the outputs apart.
            prop_assert!(shared.cube_count <= apart.cube_count);
            prop_assert!(fast.cube_count >= shared.cube_count);
        }
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
        (n, on, dc) in function(5),
        picks in prop::collection::vec((any::<u64>(), 1u64..8), 1..4),
    ) {
        let size = 1u64 << n;
        let specified = |m: u64| !dc.contains(&m);
        // Short transitions (up to three changing variables) so that many are valid.
        let ts: Vec<Transition> = picks
            .iter()
            .map(|&(a, d)| Transition { start: a % size, end: (a % size) ^ (d % size) })
            .filter(|t| t.start != t.end && specified(t.start) && specified(t.end))
            .collect();
        let mf = single(n, &on, &dc, ts.clone());
        let oracle = all_legal_products(n, &on, &dc, &ts);
        let oracle_ok = verify::check(&mf, &oracle, HazardMode::Full).is_ok();
        let exact = match minimize(&mf, &Config::default()) {
            Ok(s) => s,
            Err(CoverError::FunctionHazard { .. }) | Err(CoverError::NoHazardFreeCover { .. }) => {
                // Independent oracle: then even the set of all individually legal products
                // fails the checker.
                prop_assert!(!oracle_ok, "a hazard-free cover exists: {:?}", oracle.products);
                // The heuristic must agree that no cover exists (decided before covering).
                prop_assert!(minimize(&mf, &Config::default().effort(Effort::Fast)).is_err());
                return Ok(());
            }
            Err(e) => return Err(TestCaseError::fail(format!("{e}"))),
        };
        prop_assert!(oracle_ok);
        prop_assert!(exact.optimal);
        prop_assert!(exact.literals_optimal);
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

/// Every cube (of all 3^n) that on its own breaks no per-product condition: no off-set
/// point, meets no 0 -> 0 transition cube, and holds the 1-end of every dynamic
/// transition cube it meets. A hazard-free cover exists iff this set is one (the other
/// conditions only get easier with more products). Computed by point enumeration.
fn all_legal_products(
    n: usize,
    on: &[u64],
    dc: &[u64],
    ts: &[Transition],
) -> stillpoint_cover::Solution {
    let value = |m: u64| {
        if on.contains(&m) {
            Some(true)
        } else if dc.contains(&m) {
            None
        } else {
            Some(false)
        }
    };
    let mut cubes = Vec::new();
    let mut total = 1usize;
    for _ in 0..n {
        total *= 3;
    }
    for code in 0..total {
        let mut s = String::new();
        let mut k = code;
        for _ in 0..n {
            s.push(['0', '1', '-'][k % 3]);
            k /= 3;
        }
        let c = Cube::parse(&s).unwrap();
        let pts: Vec<u64> = (0..1u64 << n)
            .filter(|&m| c.contains_minterm(n, m))
            .collect();
        if pts.iter().any(|&m| value(m) == Some(false)) {
            continue;
        }
        let mut ok = true;
        for t in ts {
            let tc = t.cube(n);
            let (a, b) = (value(t.start), value(t.end));
            if a == Some(false) && b == Some(false) && c.intersects(&tc) {
                ok = false;
            }
            if a != b && c.intersects(&tc) {
                let one = if a == Some(true) { t.start } else { t.end };
                if !c.contains_minterm(n, one) {
                    ok = false;
                }
            }
        }
        if ok {
            cubes.push(c);
        }
    }
    cubes.sort();
    let lits = cubes.iter().map(|c| c.literal_count()).sum();
    stillpoint_cover::Solution {
        outputs: vec![stillpoint_cover::OutputCover {
            name: "f".into(),
            cubes: cubes.clone(),
            optimal: false,
            lower_bound: 0,
        }],
        cube_count: cubes.len(),
        products: cubes,
        literal_count: lits,
        optimal: false,
        literals_optimal: false,
        lower_bound: 0,
        stats: Default::default(),
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn function_files_never_panic(src in "[ -~\n]{0,80}", body in "[0-9a-z .,:\\[\\]{}\"\n-]{0,60}") {
        // Bad input is an error with a position, never a panic.
        let _ = stillpoint_cover::file::parse_text(&src);
        let _ = stillpoint_cover::file::parse_json(&src);
        let text = format!("vars a b c\n{body}");
        if let Err(e) = stillpoint_cover::file::parse_text(&text) {
            prop_assert!(e.line >= 1 && e.col >= 1);
        }
        let json = format!("{{\"vars\": [\"a\", \"b\"], {body}}}");
        if let Err(e) = stillpoint_cover::file::parse_json(&json) {
            prop_assert!(e.line >= 1 && e.col >= 1);
        }
    }
}
