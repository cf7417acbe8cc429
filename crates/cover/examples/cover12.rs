//! Exact covering on random functions (manual runs, not a benchmark):
//! `cargo run --release -p stillpoint-cover --example cover12 -- N P_ON P_DC SEEDS BUDGET_S`.

use std::time::{Duration, Instant};
use stillpoint_cover::{minimize, verify, Config, Function, HazardMode, MultiFunction, Transition};

struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        // xorshift64*
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
}

fn arg(args: &[String], i: usize, d: u64) -> u64 {
    args.get(i).and_then(|s| s.parse().ok()).unwrap_or(d)
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let n = arg(&args, 1, 12) as usize;
    let (p_on, p_dc) = (arg(&args, 2, 30), arg(&args, 3, 10));
    let seeds = arg(&args, 4, 10);
    let budget = Duration::from_secs(arg(&args, 5, 10));
    let vars: Vec<String> = (0..n).map(|i| format!("x{i}")).collect();
    for seed in 0..seeds {
        let mut r = Rng(seed * 2654435761 + 1);
        let (mut on, mut dc) = (Vec::new(), Vec::new());
        for m in 0..1u64 << n {
            let x = r.next() % 100;
            if x < p_on {
                on.push(m);
            } else if x < p_on + p_dc {
                dc.push(m);
            }
        }
        let mut ts: Vec<Transition> = (0..12)
            .map(|_| {
                let a = r.next() % (1 << n);
                let b = a ^ (r.next() % 15 + 1);
                Transition { start: a, end: b }
            })
            .filter(|t| !dc.contains(&t.start) && !dc.contains(&t.end))
            .collect();
        let full = loop {
            let f = Function::from_minterms(n, &on, &dc, ts.clone()).unwrap();
            let mf = MultiFunction::single(vars.clone(), "f", f);
            match minimize(&mf, &Config::default().node_limit(1)) {
                Err(stillpoint_cover::CoverError::FunctionHazard { transition, .. })
                | Err(stillpoint_cover::CoverError::NoHazardFreeCover { transition, .. }) => {
                    ts.retain(|t| *t != transition)
                }
                _ => break mf,
            }
        };
        let f = Function::from_minterms(n, &on, &dc, vec![]).unwrap();
        let plain = MultiFunction::single(vars.clone(), "f", f);
        for (mf, mode, name) in [
            (&plain, HazardMode::None, "none"),
            (&plain, HazardMode::Static, "static"),
            (&full, HazardMode::Full, "full"),
        ] {
            let cfg = Config::default().hazards(mode).budget(budget);
            let t = Instant::now();
            match minimize(mf, &cfg) {
                Ok(s) => println!(
                    "n={n} seed={seed} {name:6} {:>9.1} ms cubes {:>4} lits {:>5} lb {:>4} optimal {} core {:?} nodes {} verified {}",
                    t.elapsed().as_secs_f64() * 1e3,
                    s.cube_count,
                    s.literal_count,
                    s.lower_bound,
                    s.optimal,
                    s.stats.core,
                    s.stats.nodes,
                    verify::check(mf, &s, mode).is_ok()
                ),
                Err(e) => println!("n={n} seed={seed} {name:6} error {e}"),
            }
        }
    }
}
