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

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let seeds: u64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(3);
    let vars = |n: usize| (0..n).map(|i| format!("x{i}")).collect::<Vec<_>>();
    let budget = Duration::from_secs(10);
    for n in [8usize, 10, 12] {
        for seed in 0..seeds {
            let (on, dc) = random_minterms(n, seed, 45, 10);
            let f = Function::from_minterms(n, &on, &dc, vec![]).unwrap();
            let mf = MultiFunction::single(vars(n), "f", f);
            for (mode, name) in [(HazardMode::None, "none"), (HazardMode::Static, "static")] {
                run(
                    &format!("n={n} seed={seed} {name} exact"),
                    &mf,
                    &Config::default().hazards(mode).budget(budget),
                    mode,
                );
                run(
                    &format!("n={n} seed={seed} {name} fast "),
                    &mf,
                    &Config::default().hazards(mode).effort(Effort::Fast),
                    mode,
                );
            }
            // Full mode with a few random transitions.
            let mut r = Rng(seed + 99);
            let ts: Vec<Transition> = (0..6)
                .map(|_| {
                    let a = r.next() % (1 << n);
                    let b = a ^ (r.next() % 8 + 1);
                    Transition { start: a, end: b }
                })
                .filter(|t| !dc.contains(&t.start) && !dc.contains(&t.end))
                .collect();
            let f = Function::from_minterms(n, &on, &dc, ts).unwrap();
            let mf = MultiFunction::single(vars(n), "f", f);
            run(
                &format!("n={n} seed={seed} full exact"),
                &mf,
                &Config::default().budget(budget),
                HazardMode::Full,
            );
        }
    }
    for n in [16usize, 20, 24] {
        for seed in 0..seeds {
            let on = random_cubes(n, seed, 6 * n, n / 2);
            let f = Function::from_cubes(n, on, vec![], vec![]).unwrap();
            let mf = MultiFunction::single(vars(n), "f", f);
            run(
                &format!("n={n} seed={seed} cubes none fast "),
                &mf,
                &Config::default()
                    .hazards(HazardMode::None)
                    .effort(Effort::Fast),
                HazardMode::None,
            );
            run(
                &format!("n={n} seed={seed} cubes static fast "),
                &mf,
                &Config::default()
                    .hazards(HazardMode::Static)
                    .effort(Effort::Fast),
                HazardMode::Static,
            );
            run(
                &format!("n={n} seed={seed} cubes none exact"),
                &mf,
                &Config::default().hazards(HazardMode::None).budget(budget),
                HazardMode::None,
            );
        }
    }
    for seed in 0..seeds {
        let n = 16;
        let (on, dc) = random_minterms(n, seed, 45, 10);
        let f = Function::from_minterms(n, &on, &dc, vec![]).unwrap();
        let mf = MultiFunction::single(vars(n), "f", f);
        run(
            &format!("n=16 seed={seed} minterms none exact"),
            &mf,
            &Config::default().hazards(HazardMode::None).budget(budget),
            HazardMode::None,
        );
    }
}
