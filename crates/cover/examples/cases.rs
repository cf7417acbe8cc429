//! Manual timing of the budget and speed cases (not a benchmark):
//! `cargo run --release -p stillpoint-cover --example cases -- CASE [BUDGET_S] [SEED]
//! [LITERAL_BUDGET_S]`
//! with CASE one of `dense12` / `dense13` / `dense14` (12 to 14 variables, 45 % on,
//! 15 % dc, plain, exact), `scatter30` (5000
//! random minterms of 30 variables, static, exact), `fast20` (20 variables, 30 % on,
//! 10 % dc, plain, heuristic), `exact12` / `exact12full` / `exact12static` (12
//! variables, 30 % on, 10 % dc), `exact16` / `exact16full` / `exact16static` (16 variables, 30 % on, 10 % dc),
//! `fast12`, `fast16`, `fast20` with optional suffix `full` / `static` (the heuristic on
//! 12, 16 or 20 variables, 30 % on, 10 % dc).

use std::time::{Duration, Instant};
use stillpoint_cover::{
    minimize, verify, Config, CoverError, Effort, Function, HazardMode, MultiFunction, Transition,
};

struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        self.0 >> 11
    }
    fn below(&mut self, n: u64) -> u64 {
        self.next() % n
    }
}

fn random(n: usize, p_on: u64, p_dc: u64, seed: u64) -> (Vec<u64>, Vec<u64>) {
    let mut r = Lcg(seed);
    let (mut on, mut dc) = (Vec::new(), Vec::new());
    for m in 0..1u64 << n {
        let x = r.below(100);
        if x < p_on {
            on.push(m);
        } else if x < p_on + p_dc {
            dc.push(m);
        }
    }
    (on, dc)
}

fn with_transitions(n: usize, on: &[u64], dc: &[u64], seed: u64) -> MultiFunction {
    let mut r = Lcg(seed ^ 0x5eed);
    let vars: Vec<String> = (0..n).map(|i| format!("x{i}")).collect();
    let mut ts: Vec<Transition> = (0..12)
        .map(|_| {
            let a = r.below(1 << n);
            let b = a ^ (r.below(15) + 1);
            Transition { start: a, end: b }
        })
        .filter(|t| dc.binary_search(&t.start).is_err() && dc.binary_search(&t.end).is_err())
        .collect();
    loop {
        let f = Function::from_minterms(n, on, dc, ts.clone()).expect("function");
        let mf = MultiFunction::single(vars.clone(), "f", f);
        match minimize(&mf, &Config::default().effort(Effort::Fast)) {
            Err(CoverError::FunctionHazard { transition, .. })
            | Err(CoverError::NoHazardFreeCover { transition, .. }) => {
                ts.retain(|t| *t != transition)
            }
            _ => return mf,
        }
    }
}

fn main() {
    let a: Vec<String> = std::env::args().collect();
    let case = a.get(1).map(String::as_str).unwrap_or("dense14");
    let budget = a.get(2).and_then(|s| s.parse::<f64>().ok()).unwrap_or(1.0);
    let seed: u64 = a.get(3).and_then(|s| s.parse().ok()).unwrap_or(5);
    let (n, p_on, p_dc, mode, effort) = match case {
        "dense14" => (14, 45, 15, HazardMode::None, Effort::Exact),
        "dense12" => (12, 45, 15, HazardMode::None, Effort::Exact),
        "dense13" => (13, 45, 15, HazardMode::None, Effort::Exact),
        "scatter30" => (30, 0, 0, HazardMode::Static, Effort::Exact),
        "fast20" => (20, 30, 10, HazardMode::None, Effort::Fast),
        "fast20full" => (20, 30, 10, HazardMode::Full, Effort::Fast),
        "fast20static" => (20, 30, 10, HazardMode::Static, Effort::Fast),
        "fast16" => (16, 30, 10, HazardMode::None, Effort::Fast),
        "fast16full" => (16, 30, 10, HazardMode::Full, Effort::Fast),
        "fast16static" => (16, 30, 10, HazardMode::Static, Effort::Fast),
        "fast12" => (12, 30, 10, HazardMode::None, Effort::Fast),
        "fast12full" => (12, 30, 10, HazardMode::Full, Effort::Fast),
        "fast12static" => (12, 30, 10, HazardMode::Static, Effort::Fast),
        "exact12" => (12, 30, 10, HazardMode::None, Effort::Exact),
        "exact12full" => (12, 30, 10, HazardMode::Full, Effort::Exact),
        "exact12static" => (12, 30, 10, HazardMode::Static, Effort::Exact),
        "exact16" => (16, 30, 10, HazardMode::None, Effort::Exact),
        "exact16full" => (16, 30, 10, HazardMode::Full, Effort::Exact),
        "exact16static" => (16, 30, 10, HazardMode::Static, Effort::Exact),
        "exact20" => (20, 30, 10, HazardMode::None, Effort::Exact),
        "exact20full" => (20, 30, 10, HazardMode::Full, Effort::Exact),
        other => panic!("unknown case {other}"),
    };
    let vars: Vec<String> = (0..n).map(|i| format!("x{i}")).collect();
    let mf = if case == "scatter30" {
        let mut rng = Lcg(11);
        let mut seen = std::collections::BTreeSet::new();
        while seen.len() < 5000 {
            seen.insert(rng.below(1 << 30));
        }
        let on: Vec<u64> = seen.into_iter().collect();
        MultiFunction::single(
            vars,
            "f",
            Function::from_minterms(n, &on, &[], vec![]).expect("f"),
        )
    } else {
        let (on, dc) = random(n, p_on, p_dc, seed);
        if mode == HazardMode::Full {
            with_transitions(n, &on, &dc, seed)
        } else {
            MultiFunction::single(
                vars,
                "f",
                Function::from_minterms(n, &on, &dc, vec![]).expect("f"),
            )
        }
    };
    let mut cfg = Config::default()
        .hazards(mode)
        .effort(effort)
        .budget(Duration::from_secs_f64(budget));
    if let Some(l) = a.get(4).and_then(|s| s.parse::<f64>().ok()) {
        cfg = cfg.literal_budget(Duration::from_secs_f64(l));
    }
    let t = Instant::now();
    match minimize(&mf, &cfg) {
        Ok(s) => {
            let ms = t.elapsed().as_secs_f64() * 1e3;
            let ok = if n <= 20 || case == "scatter30" {
                format!("{}", verify::check(&mf, &s, mode).is_ok())
            } else {
                "skipped".into()
            };
            println!(
                "{case} seed {seed} budget {budget} s: {ms:.1} ms, cubes {} lits {} lb {} optimal {} literals_optimal {} count search {:.1} ms primes {} rows {} core {:?} nodes {} verified {ok}",
                s.cube_count,
                s.literal_count,
                s.lower_bound,
                s.optimal,
                s.literals_optimal,
                s.stats.count_search.as_secs_f64() * 1e3,
                s.stats.primes,
                s.stats.rows,
                s.stats.core,
                s.stats.nodes,
            );
        }
        Err(e) => println!(
            "{case} seed {seed}: error after {:.1} ms: {e}",
            t.elapsed().as_secs_f64() * 1e3
        ),
    }
}
