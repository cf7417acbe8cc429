//! Property tests over many small random inputs (issue 7): every answer of every stage
//! passes the independent checkers. Each property runs at least 1000 cases, generated
//! from fixed seeds so that a failure names the seed that reproduces it.

use std::time::Duration;
use stillpoint::assign::{self, one_hot, separation, AssignConfig, Codes, Method};
use stillpoint::cover::{self, Config, Effort, Function, HazardMode, MultiFunction, Transition};
use stillpoint::table::testing::{random_normal_table, random_table, Rng};
use stillpoint::table::{collapse_chains, parse_json, parse_text, reduce, verify, ReduceConfig};

const CASES: u64 = 1000;

/// parse(print(t)) == t for both forms, and across forms.
#[test]
fn tables_survive_both_printers() {
    for seed in 0..CASES {
        let t = random_table(seed, 6, 3, 2);
        let text = t.to_text();
        let back = parse_text(&text).unwrap_or_else(|e| panic!("seed {seed}: {e}\n{text}"));
        assert_eq!(back, t, "seed {seed}: text round trip\n{text}");
        let json = t.to_json();
        let back = parse_json(&json).unwrap_or_else(|e| panic!("seed {seed}: {e}\n{json}"));
        assert_eq!(back, t, "seed {seed}: json round trip\n{json}");
    }
}

/// Every reduction covers the original (checked by `verify::check_reduction`), never
/// grows the table, and its lower bound is at most its answer.
#[test]
fn reductions_cover_the_original() {
    let cfg = ReduceConfig::default()
        .budget(Duration::from_secs(2))
        .node_limit(100_000);
    let mut reduced = 0;
    for seed in 0..CASES {
        let t = random_table(seed, 6, 2, 2);
        if collapse_chains(&t).is_err() {
            assert!(
                reduce(&t, &cfg).is_err(),
                "seed {seed}: an oscillating table reduced"
            );
            continue;
        }
        let r = reduce(&t, &cfg).unwrap_or_else(|e| panic!("seed {seed}: {e}"));
        verify::check_reduction(&t, &r).unwrap_or_else(|e| panic!("seed {seed}: {e}"));
        assert!(
            r.table.num_states() <= t.num_states(),
            "seed {seed}: reduction grew"
        );
        assert!(
            r.lower_bound <= r.table.num_states(),
            "seed {seed}: bound above answer"
        );
        reduced += 1;
    }
    assert!(reduced >= CASES / 4, "too few realizable tables: {reduced}");
}

/// Every assignment method's codes pass the separation checker (one-hot: its own
/// two-step checker); the proven lower bound is at most the width; the exact method is
/// never wider than the heuristic.
#[test]
fn codes_pass_the_separation_checker() {
    let budget = Duration::from_secs(2);
    for seed in 0..CASES {
        let states = 2 + (seed % 5) as usize;
        let inputs = 1 + (seed % 2) as usize;
        let t = random_normal_table(seed, states, inputs);
        let mut widths = Vec::new();
        for m in [
            Method::Tracey,
            Method::TraceyFast,
            Method::Liu,
            Method::Tan,
            Method::OneHot,
        ] {
            let a = match assign::assign(&t, &AssignConfig::default().method(m).budget(budget)) {
                Ok(a) => a,
                Err(e) => panic!("seed {seed}: {m:?} refused a normal table: {e}"),
            };
            assert_eq!(a.codes.len(), t.num_states());
            if a.multi_step {
                one_hot::check(&t, &a.codes)
                    .unwrap_or_else(|v| panic!("seed {seed}: one-hot: {v:?}"));
            } else {
                separation::check(&t, &a.codes)
                    .unwrap_or_else(|v| panic!("seed {seed}: {m:?}: {v:?}\n{}", t.to_text()));
                assert!(
                    a.lower_bound <= a.codes.width(),
                    "seed {seed}: {m:?}: bound"
                );
                widths.push((m, a.codes.width(), a.optimal));
            }
            // The codes file printer and reader agree.
            let text = a.codes.to_text(&t);
            let back = Codes::parse(&text, false, &t).unwrap_or_else(|e| panic!("{e}\n{text}"));
            assert_eq!(back, a.codes, "seed {seed}: codes text round trip");
        }
        let exact = widths
            .iter()
            .find(|w| w.0 == Method::Tracey)
            .expect("tracey ran");
        for w in &widths {
            if exact.2 == Some(true) {
                assert!(
                    exact.1 <= w.1,
                    "seed {seed}: optimal tracey wider than {w:?}"
                );
            }
        }
    }
}

/// A random function over `n` variables with some listed transitions.
fn random_function(r: &mut Rng, n: usize) -> MultiFunction {
    let (mut on, mut dc) = (Vec::new(), Vec::new());
    for m in 0..1u64 << n {
        match r.below(10) {
            0..=3 => on.push(m),
            4 => dc.push(m),
            _ => {}
        }
    }
    // Two distinct specified points (a transition needs specified end points).
    let specified: Vec<u64> = (0..1u64 << n).filter(|m| !dc.contains(m)).collect();
    let mut transitions = Vec::new();
    if specified.len() >= 2 {
        for _ in 0..r.below(3) {
            let i = r.below(specified.len());
            let j = (i + 1 + r.below(specified.len() - 1)) % specified.len();
            transitions.push(Transition {
                start: specified[i],
                end: specified[j],
            });
        }
    }
    let f = Function::from_minterms(n, &on, &dc, transitions).expect("valid function");
    let vars = (0..n).map(|i| format!("v{i}")).collect();
    MultiFunction::single(vars, "f", f)
}

/// Every cover the minimiser returns passes the independent checker, in every mode and
/// effort; its lower bound is at most its cube count; exact is never worse than fast.
#[test]
fn covers_pass_the_cover_checker() {
    let mut r = Rng::new(7);
    let mut refused = 0;
    for case in 0..CASES {
        let n = 1 + (case % 5) as usize;
        let mf = random_function(&mut r, n);
        let has_transitions = !mf.outputs[0].1.transitions().is_empty();
        let modes: &[HazardMode] = if has_transitions {
            &[HazardMode::None, HazardMode::Static, HazardMode::Full]
        } else {
            &[HazardMode::None, HazardMode::Static]
        };
        for &mode in modes {
            let mut counts = Vec::new();
            for effort in [Effort::Exact, Effort::Fast] {
                let cfg = Config::default()
                    .hazards(mode)
                    .effort(effort)
                    .budget(Duration::from_secs(2));
                match cover::minimize(&mf, &cfg) {
                    Err(_) => refused += 1, // a function hazard on a listed transition
                    Ok(sol) => {
                        cover::verify::check(&mf, &sol, mode)
                            .unwrap_or_else(|v| panic!("case {case} {mode:?}/{effort:?}: {v:?}"));
                        assert!(sol.lower_bound <= sol.cube_count, "case {case}: bound");
                        counts.push((effort, sol.cube_count, sol.optimal));
                    }
                }
            }
            if let [(Effort::Exact, e, true), (Effort::Fast, f, _)] = counts[..] {
                assert!(e <= f, "case {case} {mode:?}: optimal exact {e} > fast {f}");
            }
        }
    }
    eprintln!("covers: {refused} refusals (function hazards) over {CASES} functions");
}
