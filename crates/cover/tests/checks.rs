//! Published and brief check values (methods.md §7.2, §7.3, §9.3), each with its source.

use crate::common::{single, strs};
use stillpoint_cover::ternary::{eval_sop, transition_is_clean, Tern};
use stillpoint_cover::{
    minimize, primes::primes, verify, Config, CoverError, Cube, Effort, HazardMode, Transition,
};

fn prime_strs(n: usize, on: &[u64], dc: &[u64]) -> Vec<String> {
    let all: Vec<Cube> = on.iter().chain(dc).map(|&m| Cube::minterm(n, m)).collect();
    strs(&primes(&all), n)
}

fn cfg(mode: HazardMode) -> Config {
    Config::default().hazards(mode)
}

#[test]
fn haz1_consensus_term() {
    // methods.md §7.2 CHECK HAZ-1 [memory, high; ternary value computed]: f = ab + a'c
    // (minterms 1,3,6,7 over abc); primes ab, a'c, bc; minimum {ab, a'c}; with b = c = 1
    // and a changing the minimum cover gives X, with bc added it gives 1.
    let mf = single(3, &[1, 3, 6, 7], &[], vec![]);
    assert_eq!(prime_strs(3, &[1, 3, 6, 7], &[]), ["-11", "0-1", "11-"]);
    let plain = minimize(&mf, &cfg(HazardMode::None)).unwrap();
    assert_eq!(strs(&plain.products, 3), ["0-1", "11-"]);
    let t = Transition { start: 3, end: 7 }; // 011 -> 111
    assert!(!transition_is_clean(&plain.products, 3, &t));
    assert_eq!(
        eval_sop(&plain.products, 3, &[Tern::X, Tern::One, Tern::One]),
        Tern::X
    );
    let safe = minimize(&mf, &cfg(HazardMode::Static)).unwrap();
    assert_eq!(strs(&safe.products, 3), ["-11", "0-1", "11-"]);
    assert!(safe.optimal);
    assert!(transition_is_clean(&safe.products, 3, &t));
    verify::check(&mf, &safe, HazardMode::Static).unwrap();
    assert!(verify::check(&mf, &plain, HazardMode::Static).is_err());
}

#[test]
fn table_9_3_row1_unique_minimum() {
    // methods.md §9.3 [computed by exhaustive search; sympy agrees]: Σm(0,1,2,5,6,7,8,9,10,14)
    // over abcd: 6 primes, unique minimum cd' + b'c' + a'bd (3 cubes, 7 literals).
    let on = [0, 1, 2, 5, 6, 7, 8, 9, 10, 14];
    assert_eq!(
        prime_strs(4, &on, &[]),
        ["--10", "-0-0", "-00-", "0-01", "01-1", "011-"]
    );
    let mf = single(4, &on, &[], vec![]);
    for effort in [Effort::Exact, Effort::Fast] {
        let s = minimize(&mf, &cfg(HazardMode::None).effort(effort)).unwrap();
        verify::check(&mf, &s, HazardMode::None).unwrap();
        if effort == Effort::Exact {
            assert_eq!(strs(&s.products, 4), ["--10", "-00-", "01-1"]);
            assert_eq!((s.cube_count, s.literal_count), (3, 7));
            assert!(s.optimal);
            assert_eq!(s.lower_bound, 3);
        } else {
            assert!(s.cube_count >= 3);
        }
    }
}

#[test]
fn table_9_3_row2_cyclic() {
    // methods.md §9.3 [computed]: Σm(0,1,2,5,6,7) over abc: 6 primes, no essential prime,
    // two minima of 3 cubes {b'c, a'c', ab} and {bc', a'b', ac}.
    let on = [0, 1, 2, 5, 6, 7];
    assert_eq!(
        prime_strs(3, &on, &[]),
        ["-01", "-10", "0-0", "00-", "1-1", "11-"]
    );
    let mf = single(3, &on, &[], vec![]);
    let s = minimize(&mf, &cfg(HazardMode::None)).unwrap();
    let got = strs(&s.products, 3);
    assert!(
        got == ["-01", "0-0", "11-"] || got == ["-10", "00-", "1-1"],
        "{got:?}"
    );
    assert!(s.optimal);
}

#[test]
fn table_9_3_row3_majority() {
    // methods.md §9.3 [computed]: majority Σm(3,5,6,7): 3 primes, all essential.
    let on = [3, 5, 6, 7];
    assert_eq!(prime_strs(3, &on, &[]), ["-11", "1-1", "11-"]);
    let s = minimize(&single(3, &on, &[], vec![]), &cfg(HazardMode::None)).unwrap();
    assert_eq!(strs(&s.products, 3), ["-11", "1-1", "11-"]);
}

#[test]
fn table_9_3_row5_dont_cares() {
    // methods.md §9.3 [computed]: Σm(4,8,10,11,12,15) + d(9,14): 4 primes
    // -100 1--0 1-1- 10--; two minima of 3 cubes {bc'd', ad', ac} and {bc'd', ac, ab'}.
    let (on, dc) = ([4, 8, 10, 11, 12, 15], [9, 14]);
    assert_eq!(prime_strs(4, &on, &dc), ["-100", "1--0", "1-1-", "10--"]);
    let mf = single(4, &on, &dc, vec![]);
    let s = minimize(&mf, &cfg(HazardMode::None)).unwrap();
    let got = strs(&s.products, 4);
    assert!(
        got == ["-100", "1--0", "1-1-"] || got == ["-100", "1-1-", "10--"],
        "{got:?}"
    );
    assert_eq!(s.cube_count, 3);
    verify::check(&mf, &s, HazardMode::None).unwrap();
}

#[test]
fn hf1_no_hazard_free_cover() {
    // methods.md §7.3 CHECK HF-1 [computed; derived from the Nowick & Dill conditions]:
    // abc, ON {000,010,110}, OFF {001,011,100}, DC {101,111}; T1 000->011 (1->0),
    // T2 010->110 (1->1). Required cube -10 of T2 meets the privileged cube 0-- of T1
    // without holding 000; its supercubes -1- and --0 hold off-set points. No
    // hazard-free SOP exists; T2 (or the conflict) must be reported.
    let t1 = Transition { start: 0, end: 3 };
    let t2 = Transition { start: 2, end: 6 };
    let mf = single(3, &[0, 2, 6], &[5, 7], vec![t1, t2]);
    match minimize(&mf, &cfg(HazardMode::Full)) {
        Err(CoverError::NoHazardFreeCover {
            output,
            transition,
            reason,
        }) => {
            assert_eq!(output, "f");
            assert_eq!(transition, t2);
            assert!(reason.contains("010 -> 110"), "{reason}");
            assert!(reason.contains("0--"), "{reason}");
        }
        other => panic!("expected no hazard-free cover, got {other:?}"),
    }
    // The fast effort reaches the same verdict (existence is decided before covering).
    assert!(matches!(
        minimize(&mf, &cfg(HazardMode::Full).effort(Effort::Fast)),
        Err(CoverError::NoHazardFreeCover { .. })
    ));
}

#[test]
fn hf1b_single_product() {
    // methods.md §7.3 CHECK HF-1b [computed]: HF-1 with 100 moved to ON: c' (--0) is a
    // dhf-implicant holding both required cubes -10 and 0-0; the hazard-free cover is {c'}.
    let t1 = Transition { start: 0, end: 3 };
    let t2 = Transition { start: 2, end: 6 };
    let mf = single(3, &[0, 2, 4, 6], &[5, 7], vec![t1, t2]);
    for effort in [Effort::Exact, Effort::Fast] {
        let s = minimize(&mf, &cfg(HazardMode::Full).effort(effort)).unwrap();
        assert_eq!(strs(&s.products, 3), ["--0"]);
        assert!(s.optimal);
        verify::check(&mf, &s, HazardMode::Full).unwrap();
    }
}

#[test]
fn function_hazard_is_refused() {
    // common practice, no source: 1->0 transition 000 -> 011 over a function with
    // f(000)=1, f(001)=0, f(011)=0 but f(010)=... make it non-monotone: f(001)=0, f(011)=1? no:
    // a 1->1 transition whose cube holds an off-set point is a static function hazard.
    let mf = single(3, &[0, 3], &[], vec![Transition { start: 0, end: 3 }]);
    match minimize(&mf, &cfg(HazardMode::Full)) {
        Err(CoverError::FunctionHazard {
            transition, reason, ..
        }) => {
            assert_eq!(transition, Transition { start: 0, end: 3 });
            assert!(reason.contains("000 -> 011"), "{reason}");
        }
        other => panic!("expected a function hazard, got {other:?}"),
    }
    // Dynamic: 000 (1) -> 011 (0) with 001 = 0 and 010 = 1 is monotone; with 011 = 0,
    // 001 = 0, 010 = 0 too; make 001 off and 011 on? that is 1->1. Use 000 -> 111:
    // f = 1 at 000, 0 at 001, 1 at 011, 0 at 111: path 000,001,011,111 gives 1,0,1,0.
    let mf = single(3, &[0, 3], &[], vec![Transition { start: 0, end: 7 }]);
    assert!(matches!(
        minimize(&mf, &cfg(HazardMode::Full)),
        Err(CoverError::FunctionHazard { .. })
    ));
}

#[test]
fn dont_cares_in_static_transitions() {
    // common practice, no source: a don't-care inside a 1->1 cube becomes 1, inside a
    // 0->0 cube it becomes 0.
    let t = Transition { start: 0, end: 3 }; // 00 -> 11 over ab, 01 is dc
    let mf = single(2, &[0, 2, 3], &[1], vec![t]);
    let s = minimize(&mf, &cfg(HazardMode::Full)).unwrap();
    assert_eq!(strs(&s.products, 2), ["--"]);
    let t0 = Transition { start: 0, end: 3 }; // 000 -> 011 over abc, 001 is dc
    let mf = single(3, &[5], &[1], vec![t0]);
    let plain = minimize(&mf, &cfg(HazardMode::None)).unwrap();
    assert_eq!(strs(&plain.products, 3), ["-01"]);
    let s = minimize(&mf, &cfg(HazardMode::Full)).unwrap();
    assert_eq!(strs(&s.products, 3), ["101"]);
    verify::check(&mf, &s, HazardMode::Full).unwrap();
}

#[test]
fn multi_output_sharing() {
    // common practice, no source: f = ab + a'c and g = ab c' + ... share the product ab
    // when it is an implicant of both.
    let vars = crate::common::vars(3);
    let f = stillpoint_cover::Function::from_minterms(3, &[1, 3, 6, 7], &[], vec![]).unwrap();
    let g = stillpoint_cover::Function::from_minterms(3, &[6, 7, 0], &[], vec![]).unwrap();
    let mf = stillpoint_cover::MultiFunction {
        vars,
        outputs: vec![("f".into(), f), ("g".into(), g)],
    };
    let s = minimize(&mf, &cfg(HazardMode::None)).unwrap();
    verify::check(&mf, &s, HazardMode::None).unwrap();
    assert_eq!(s.cube_count, 3); // ab (shared), a'c, a'b'c'
    assert!(s.optimal);
    let unshared = minimize(&mf, &cfg(HazardMode::None).share_products(false)).unwrap();
    verify::check(&mf, &unshared, HazardMode::None).unwrap();
    let fast = minimize(&mf, &cfg(HazardMode::None).effort(Effort::Fast)).unwrap();
    verify::check(&mf, &fast, HazardMode::None).unwrap();
    assert!(fast.cube_count >= 3);
}

#[test]
fn wide_function_from_cubes() {
    // 24 variables given as cubes: no minterm enumeration anywhere.
    let n = 24;
    let mk = |s: &str| {
        let mut t = s.to_string();
        while t.len() < n {
            t.push('-');
        }
        Cube::parse(&t).unwrap()
    };
    let on = vec![mk("11"), mk("0-1"), mk("---1--0-1"), mk("1-0---1-----1")];
    let f = stillpoint_cover::Function::from_cubes(n, on, vec![mk("00001")], vec![]).unwrap();
    let mf = stillpoint_cover::MultiFunction::single(crate::common::vars(n), "f", f);
    for effort in [Effort::Exact, Effort::Fast] {
        let s = minimize(&mf, &cfg(HazardMode::Static).effort(effort)).unwrap();
        verify::check(&mf, &s, HazardMode::Static).unwrap();
    }
}

#[test]
fn constant_functions() {
    // common practice, no source: the empty cover for 0, the universal cube for 1.
    for effort in [Effort::Exact, Effort::Fast] {
        for mode in [HazardMode::None, HazardMode::Static, HazardMode::Full] {
            let zero = single(3, &[], &[1, 2], vec![]);
            let s = minimize(&zero, &cfg(mode).effort(effort)).unwrap();
            assert_eq!(s.cube_count, 0);
            assert!(s.optimal);
            let one = single(
                3,
                &[0, 1, 2, 3, 4, 5, 6],
                &[7],
                vec![Transition { start: 0, end: 6 }],
            );
            let s = minimize(&one, &cfg(mode).effort(effort)).unwrap();
            assert_eq!(strs(&s.products, 3), ["---"]);
            verify::check(&one, &s, mode).unwrap();
            let none = single(0, &[0], &[], vec![]);
            let s = minimize(&none, &cfg(mode).effort(effort)).unwrap();
            assert_eq!(s.cube_count, 1);
        }
    }
}

#[test]
fn bad_input_is_an_error_not_a_panic() {
    use stillpoint_cover::Function;
    assert!(Function::from_minterms(3, &[8], &[], vec![]).is_err());
    assert!(Function::from_minterms(3, &[1], &[1], vec![]).is_err());
    assert!(Function::from_minterms(65, &[], &[], vec![]).is_err());
    assert!(Function::from_minterms(3, &[1], &[2], vec![Transition { start: 1, end: 2 }]).is_err());
    assert!(Function::from_minterms(3, &[1], &[], vec![Transition { start: 1, end: 1 }]).is_err());
    assert!(Cube::parse("10x").is_err());
    let f = Function::from_minterms(3, &[1], &[], vec![]).unwrap();
    let mf = stillpoint_cover::MultiFunction {
        vars: crate::common::vars(2),
        outputs: vec![("f".into(), f)],
    };
    assert!(minimize(&mf, &Config::default()).is_err());
}
