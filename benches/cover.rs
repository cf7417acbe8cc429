//! Cover stage: prime generation, and exact and heuristic covering, plain and
//! hazard-free, of two families of functions:
//! - `dense`: random minterm functions (30 % on, 10 % don't-care); 8 and 12 variables
//!   only: at 16 variables one run takes tens of seconds (see `docs/performance.md`);
//! - `sparse`: cube-specified functions as synthesis produces them (2n on-cubes of about
//!   n/2 literals), 8 to 20 variables.
//!
//! Exact covering is bounded by a node limit, not time, so every run does the same work.
//! `cargo bench --bench cover`; figures in `docs/performance.md`.

#![allow(missing_docs)] // criterion_main! makes an undocumented `main`

mod common;

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use stillpoint_cover::{minimize, primes::primes, Config, Cube, Effort, HazardMode, MultiFunction};

const DENSE: [usize; 2] = [8, 12];
const SPARSE: [usize; 4] = [8, 12, 16, 20];

fn inputs(family: &str, mode: HazardMode, n: usize) -> MultiFunction {
    match (family, mode) {
        ("dense", HazardMode::Full) => common::function_with_transitions(n, 0),
        ("dense", _) => common::function(n),
        _ => common::sparse_function(n, 0),
    }
}

fn prime_generation(c: &mut Criterion) {
    let mut g = common::group(c, "primes");
    for (family, vars) in [("dense", &DENSE[..]), ("sparse", &SPARSE[..])] {
        for &n in vars {
            let f = inputs(family, HazardMode::None, n);
            let func = &f.outputs[0].1;
            let care: Vec<Cube> = func
                .on_cubes()
                .iter()
                .chain(func.dc_cubes())
                .copied()
                .collect();
            g.bench_with_input(BenchmarkId::new(family, n), &care, |b, care| {
                b.iter(|| primes(black_box(care)))
            });
        }
    }
    g.finish();
}

fn covering(c: &mut Criterion) {
    for (label, mode, effort) in [
        ("cover-exact-plain", HazardMode::None, Effort::Exact),
        ("cover-exact-full", HazardMode::Full, Effort::Exact),
        ("cover-fast-plain", HazardMode::None, Effort::Fast),
        ("cover-fast-full", HazardMode::Full, Effort::Fast),
    ] {
        let cfg = Config::default()
            .hazards(mode)
            .effort(effort)
            .node_limit(2_000);
        let mut g = common::group(c, label);
        for (family, vars) in [("dense", &DENSE[..]), ("sparse", &SPARSE[..])] {
            for &n in vars {
                let f = inputs(family, mode, n);
                g.bench_with_input(BenchmarkId::new(family, n), &f, |b, f| {
                    b.iter(|| minimize(black_box(f), &cfg).expect("minimises"))
                });
            }
        }
        g.finish();
    }
}

criterion_group!(benches, prime_generation, covering);
criterion_main!(benches);
