//! The whole pipeline (`synthesize`: collapse, reduce, assign, encode, minimise, build the
//! network, verify), and the ternary simulation of every total-state transition of a
//! synthesised design, over random normal tables (rows 8..64, columns 4..16, see
//! `POINTS`; the default configuration, exact searches under a 2 s budget, stops at 32
//! rows). `cargo bench --bench pipeline`; figures in `docs/performance.md`.

#![allow(missing_docs)] // criterion_main! makes an undocumented `main`

mod common;

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;
use stillpoint::assign::Method;
use stillpoint::cover::Effort;
use stillpoint::sim::check_transition;
use stillpoint::synth::{synthesize, SynthConfig};

/// (rows, columns): the points measured.
const POINTS: [(usize, usize); 10] = [
    (8, 4),
    (16, 4),
    (24, 4),
    (32, 4),
    (8, 8),
    (8, 16),
    (32, 16),
    (64, 4),
    (64, 8),
    (64, 16),
];

fn configs() -> [(&'static str, SynthConfig); 2] {
    [
        (
            "synth-fast",
            SynthConfig::default()
                .method(Method::TraceyFast)
                .effort(Effort::Fast)
                .alternatives(1)
                .budget(Duration::from_secs(10)),
        ),
        (
            "synth-default",
            SynthConfig::default().budget(Duration::from_secs(2)),
        ),
    ]
}

fn pipeline(c: &mut Criterion) {
    for (label, cfg) in configs() {
        let mut g = common::group(c, label);
        for (rows, cols) in POINTS {
            if label == "synth-default" && rows > 32 {
                continue;
            }
            {
                let t = common::table(rows, cols);
                let probe = std::panic::catch_unwind(|| synthesize(&t, &cfg));
                match probe {
                    Err(_) => eprintln!("{label} {rows}x{cols}: skipped: the run panicked"),
                    Ok(Ok(_)) => {
                        g.bench_with_input(
                            BenchmarkId::new(format!("{cols}cols"), rows),
                            &t,
                            |b, t| b.iter(|| synthesize(black_box(t), &cfg).expect("synthesises")),
                        );
                    }
                    Ok(Err(e)) => eprintln!("{label} {rows}x{cols}: skipped: {e}"),
                }
            }
        }
        g.finish();
    }
}

fn simulation(c: &mut Criterion) {
    let cfg = configs()[0].1.clone();
    let mut g = common::group(c, "ternary-sim");
    for (rows, cols) in POINTS {
        {
            let t = common::table(rows, cols);
            let Ok(Ok(d)) = std::panic::catch_unwind(|| synthesize(&t, &cfg)) else {
                continue;
            };
            let checks = d.checks();
            let model = d.verification.model;
            g.bench_with_input(
                BenchmarkId::new(format!("{cols}cols"), rows),
                &checks,
                |b, checks| {
                    b.iter(|| {
                        checks
                            .iter()
                            .map(|(_, t)| check_transition(&d.network, t, model).len())
                            .sum::<usize>()
                    })
                },
            );
        }
    }
    g.finish();
}

criterion_group!(benches, pipeline, simulation);
criterion_main!(benches);
