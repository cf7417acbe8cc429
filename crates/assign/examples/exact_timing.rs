//! Timing of the exact Tracey method on random tables (manual measurement; timings never
//! decide a test): `cargo run --release -p stillpoint-assign --example exact_timing --
//! [ROWS INPUTS SEEDS BUDGET_S [FIRST_SEED]]`: seeds `FIRST_SEED..FIRST_SEED + SEEDS`
//! (from 0; the benches' 24 x 16 tables are seeds 1452738448 to 1452738452). Without
//! arguments: 24 x 16 and 32 x 16, 10 seeds each, 60 s budget.

use std::time::{Duration, Instant};
use stillpoint_assign::{assign, separation, AssignConfig, Method};
use stillpoint_table::testing::random_normal_table;

fn main() {
    let args: Vec<u64> = std::env::args()
        .skip(1)
        .map(|a| a.parse().expect("numbers"))
        .collect();
    let first = args.get(4).copied().unwrap_or(0);
    let runs: Vec<(usize, usize, u64, u64)> = if args.len() >= 4 {
        vec![(args[0] as usize, args[1] as usize, args[2], args[3])]
    } else {
        vec![(24, 4, 10, 60), (32, 4, 10, 60)]
    };
    for (rows, inputs, seeds, budget) in runs {
        let mut times = Vec::new();
        let mut proven = 0;
        for seed in first..first + seeds {
            let t = random_normal_table(seed, rows, inputs);
            let cfg = AssignConfig::default()
                .method(Method::Tracey)
                .budget(Duration::from_secs(budget));
            let t0 = Instant::now();
            let a = assign(&t, &cfg).expect("assign");
            let dt = t0.elapsed().as_secs_f64();
            assert!(separation::check(&t, &a.codes).is_ok());
            proven += usize::from(a.optimal == Some(true));
            times.push(dt);
            println!(
                "{rows}x{} seed {seed}: width {} lower bound {} optimal {:?} {:.3} s, \
                 sat work {} units, nodes {}, clock stopped {}",
                1 << inputs,
                a.codes.width(),
                a.lower_bound,
                a.optimal,
                dt,
                a.stats.sat_work,
                a.stats.nodes,
                a.stats.clock_stopped
            );
        }
        times.sort_by(f64::total_cmp);
        println!(
            "{rows}x{}: {proven}/{seeds} proven, median {:.3} s, max {:.3} s",
            1 << inputs,
            times[times.len() / 2],
            times[times.len() - 1]
        );
    }
}
