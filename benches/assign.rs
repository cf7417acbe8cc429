//! Assignment stage: Tracey exact and fast over rows 8..64 and columns 4 and 16, race
//! analysis and the separation checker on the codes found, and the universal codes.
//! `cargo bench --bench assign`; figures in `docs/performance.md`.

#![allow(missing_docs)] // criterion_main! makes an undocumented `main`

mod common;

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;
use stillpoint_assign::{assign, races, separation, AssignConfig, Method};

const ROWS: [usize; 5] = [8, 16, 24, 32, 64];
const COLS: [usize; 2] = [4, 16];

fn methods(c: &mut Criterion) {
    for (label, method) in [
        ("tracey-exact", Method::Tracey),
        ("tracey-fast", Method::TraceyFast),
        ("tan", Method::Tan),
        ("one-hot", Method::OneHot),
    ] {
        // The exact method is timed only where it proves its width within 2 s (a run the
        // budget stops measures the budget); the ladder bench lists the other points.
        let cfg = AssignConfig::default()
            .method(method)
            .budget(Duration::from_secs(2));
        let mut g = common::group(c, label);
        for cols in COLS {
            for rows in ROWS {
                let t = common::table(rows, cols);
                if method == Method::Tracey {
                    let a = assign(&t, &cfg).expect("assigns");
                    if a.optimal != Some(true) {
                        eprintln!("{label} {rows}x{cols}: not proven within 2 s, not timed");
                        continue;
                    }
                }
                g.bench_with_input(BenchmarkId::new(format!("{cols}cols"), rows), &t, |b, t| {
                    b.iter(|| assign(black_box(t), &cfg).expect("assigns"))
                });
            }
        }
        g.finish();
    }
}

fn checking(c: &mut Criterion) {
    let mut g = common::group(c, "race-analysis");
    for cols in COLS {
        for rows in ROWS {
            let t = common::table(rows, cols);
            let cfg = AssignConfig::default().method(Method::TraceyFast);
            let a = assign(&t, &cfg).expect("assigns");
            g.bench_with_input(
                BenchmarkId::new(format!("{cols}cols"), rows),
                &(),
                |b, _| b.iter(|| races::analyze(black_box(&t), &a.codes).expect("analyses")),
            );
        }
    }
    g.finish();
    let mut g = common::group(c, "separation-check");
    for cols in COLS {
        let rows = 64;
        let t = common::table(rows, cols);
        let a = assign(&t, &AssignConfig::default().method(Method::TraceyFast)).expect("assigns");
        g.bench_with_input(
            BenchmarkId::new(format!("{cols}cols"), rows),
            &(),
            |b, _| b.iter(|| separation::check(black_box(&t), &a.codes).is_ok()),
        );
    }
    g.finish();
}

criterion_group!(benches, methods, checking);
criterion_main!(benches);
