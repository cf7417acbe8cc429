//! Rough timings of a manual run (not a benchmark): `cargo run --release -p
//! stillpoint-cover --example timing [-- N SEEDS]`.

use std::time::{Duration, Instant};
use stillpoint_cover::{
    minimize, verify, Config, Cube, Effort, Function, HazardMode, MultiFunction, Transition,
};

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

fn random_minterms(n: usize, seed: u64, p_on: u64, p_dc: u64) -> (Vec<u64>, Vec<u64>) {
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
    (on, dc)
}

fn random_cubes(n: usize, seed: u64, count: usize, lits: usize) -> Vec<Cube> {
    let mut r = Rng(seed * 7919 + 3);
    (0..count)
        .map(|_| {
            let mut c = Cube::full();
            while c.literal_count() < lits {
                let v = (r.next() % n as u64) as usize;
                c = c.with_literal(v, Some(r.next() & 1 == 1));
            }
            c
        })
        .collect()
}

fn run(label: &str, mf: &MultiFunction, cfg: &Config, mode: HazardMode) {
    let t = Instant::now();
    match minimize(mf, cfg) {
        Ok(s) => {
            let el = t.elapsed();
            let ok = verify::check(mf, &s, mode).is_ok();
            println!(
                "{label}: {:>8.1} ms  cubes {:>4} lits {:>5} optimal {} lb {} primes {} cols {} rows {} core {:?} nodes {} verified {ok}",
                el.as_secs_f64() * 1e3,
                s.cube_count,
                s.literal_count,
                s.optimal,
                s.lower_bound,
                s.stats.primes,
                s.stats.columns,
                s.stats.rows,
                s.stats.core,
                s.stats.nodes
            );
        }
        Err(e) => println!("{label}: {:>8.1} ms  {e}", t.elapsed().as_secs_f64() * 1e3),
    }
}

/// Drops listed transitions that the function refuses (function hazard or no
/// hazard-free cover) until the rest can be minimised.
fn keep_valid(
    n: usize,
    on: &[u64],
    dc: &[u64],
    mut ts: Vec<Transition>,
    vars: &[String],
) -> MultiFunction {
    loop {
        let f = Function::from_minterms(n, on, dc, ts.clone()).unwrap();
        let mf = MultiFunction::single(vars.to_vec(), "f", f);
        match minimize(&mf, &Config::default().node_limit(1)) {
            Err(stillpoint_cover::CoverError::FunctionHazard { transition, .. })
            | Err(stillpoint_cover::CoverError::NoHazardFreeCover { transition, .. }) => {
                ts.retain(|t| *t != transition)
            }
            _ => return mf,
        }
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let seeds: u64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(3);
    let vars = |n: usize| (0..n).map(|i| format!("x{i}")).collect::<Vec<_>>();
    let budget = Duration::from_secs(10);
    for n in [8usize, 12] {
        for p_on in [10u64, 20, 30, 45] {
            for seed in 0..seeds {
                let (on, dc) = random_minterms(n, seed, p_on, 5);
                let f = Function::from_minterms(n, &on, &dc, vec![]).unwrap();
                let mf = MultiFunction::single(vars(n), "f", f);
                for (mode, name) in [(HazardMode::None, "none"), (HazardMode::Static, "static")] {
                    run(
                        &format!("n={n} on={p_on}% seed={seed} {name:6} exact"),
                        &mf,
                        &Config::default().hazards(mode).budget(budget),
                        mode,
                    );
                    run(
                        &format!("n={n} on={p_on}% seed={seed} {name:6} fast "),
                        &mf,
                        &Config::default().hazards(mode).effort(Effort::Fast),
                        mode,
                    );
                }
                let mut r = Rng(seed + 99);
                let ts: Vec<Transition> = (0..12)
                    .map(|_| {
                        let a = r.next() % (1 << n);
                        let b = a ^ (r.next() % 15 + 1);
                        Transition { start: a, end: b }
                    })
                    .filter(|t| !dc.contains(&t.start) && !dc.contains(&t.end))
                    .collect();
                let mf = keep_valid(n, &on, &dc, ts, &vars(n));
                let k = mf.outputs[0].1.transitions().len();
                run(
                    &format!("n={n} on={p_on}% seed={seed} full({k:2}) exact"),
                    &mf,
                    &Config::default().budget(budget),
                    HazardMode::Full,
                );
                run(
                    &format!("n={n} on={p_on}% seed={seed} full({k:2}) fast "),
                    &mf,
                    &Config::default().effort(Effort::Fast),
                    HazardMode::Full,
                );
            }
        }
    }
    for n in [16usize, 20, 24] {
        for seed in 0..seeds {
            let on = random_cubes(n, seed, 6 * n, n / 2);
            let c = on.len();
            let f = Function::from_cubes(n, on, vec![], vec![]).unwrap();
            let mf = MultiFunction::single(vars(n), "f", f);
            run(
                &format!("n={n} cubes={c} seed={seed} none   fast "),
                &mf,
                &Config::default()
                    .hazards(HazardMode::None)
                    .effort(Effort::Fast),
                HazardMode::None,
            );
            run(
                &format!("n={n} cubes={c} seed={seed} none   exact"),
                &mf,
                &Config::default().hazards(HazardMode::None).budget(budget),
                HazardMode::None,
            );
            run(
                &format!("n={n} cubes={c} seed={seed} static fast "),
                &mf,
                &Config::default()
                    .hazards(HazardMode::Static)
                    .effort(Effort::Fast),
                HazardMode::Static,
            );
        }
    }
    for p_on in [10u64, 20] {
        for seed in 0..seeds {
            let n = 16;
            let (on, dc) = random_minterms(n, seed, p_on, 5);
            let f = Function::from_minterms(n, &on, &dc, vec![]).unwrap();
            let mf = MultiFunction::single(vars(n), "f", f);
            run(
                &format!("n=16 on={p_on}% seed={seed} none   exact"),
                &mf,
                &Config::default().hazards(HazardMode::None).budget(budget),
                HazardMode::None,
            );
        }
    }
}
