//! Flow-table stage: exact state reduction over the size ladder (rows 8..24, columns 4
//! and 8), and the cheap analyses (chain collapsing, Unger's test) on a large table.
//! `cargo bench --bench table`; figures in `docs/performance.md`.

#![allow(missing_docs)] // criterion_main! makes an undocumented `main`

mod common;

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use stillpoint_table::{collapse_chains, essential_hazards, reduce, ReduceConfig};

fn reduction(c: &mut Criterion) {
    // A node limit keeps the work per run fixed (no time budget in the measured loop).
    let cfg = ReduceConfig::default().node_limit(2_000_000);
    let mut g = common::group(c, "reduce-exact");
    for cols in [4usize, 8] {
        for rows in [8usize, 12, 16, 20, 24] {
            let t = common::table(rows, cols);
            g.bench_with_input(BenchmarkId::new(format!("{cols}cols"), rows), &t, |b, t| {
                b.iter(|| reduce(black_box(t), &cfg).expect("reduces"))
            });
        }
    }
    g.finish();
}

fn analyses(c: &mut Criterion) {
    let mut g = common::group(c, "table-analyses");
    let t = common::table(64, 16);
    g.bench_function("collapse-chains/64x16", |b| {
        b.iter(|| collapse_chains(black_box(&t)).expect("normal"))
    });
    g.bench_function("essential-hazards/64x16", |b| {
        b.iter(|| essential_hazards(black_box(&t)))
    });
    g.finish();
}

criterion_group!(benches, reduction, analyses);
criterion_main!(benches);
