//! How close each exact search stops to its budget: hard cases under budgets of 1, 2 and
//! 5 s, one run each, printing the wall time, the overrun in per cent, and what came back
//! (best answer, proven bound, `optimal`). `cargo bench --bench budgets`; the figures are
//! in `docs/robustness.md`. Timings are printed, never asserted.

#![allow(missing_docs)] // a harness-free bench has an undocumented `main`

mod common;

use std::time::{Duration, Instant};
use stillpoint::assign::{assign, AssignConfig, Method};
use stillpoint::cover::{minimize, Config, HazardMode};
use stillpoint::synth::{synthesize, SynthConfig};
use stillpoint_table::{parse_text, reduce, ReduceConfig};

fn row(what: &str, budget: Duration, took: Duration, answer: String) {
    let over = 100.0 * (took.as_secs_f64() - budget.as_secs_f64()) / budget.as_secs_f64();
    println!(
        "| {what} | {:.0} s | {:.2} s | {over:+.1} % | {answer} |",
        budget.as_secs_f64(),
        took.as_secs_f64()
    );
}

fn main() {
    // `cargo bench` passes `--bench`; any other argument filters the cases by name.
    let filter: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    let wanted = |name: &str| filter.is_empty() || filter.iter().any(|f| name.contains(f.as_str()));
    println!("| search | budget | wall | over | answer |");
    println!("| --- | --- | --- | --- | --- |");
    let budgets = [1u64, 2, 5].map(Duration::from_secs);
    for b in budgets {
        if wanted("reduce") {
            let t = common::table(64, 16);
            let t0 = Instant::now();
            let r = reduce(&t, &ReduceConfig::default().budget(b)).expect("reduces");
            row(
                "reduce 64 x 16",
                b,
                t0.elapsed(),
                format!(
                    "{} rows, bound {}, optimal {}",
                    r.table.num_states(),
                    r.lower_bound,
                    r.optimal
                ),
            );
        }
        for (rows, cols) in [(24, 16), (32, 16)] {
            let name = format!("tracey {rows} x {cols}");
            if !wanted(&name) {
                continue;
            }
            let t = common::table(rows, cols);
            let t0 = Instant::now();
            let a = assign(
                &t,
                &AssignConfig::default().method(Method::Tracey).budget(b),
            )
            .expect("assigns");
            row(
                &name,
                b,
                t0.elapsed(),
                format!(
                    "width {}, bound {}, optimal {:?}",
                    a.codes.width(),
                    a.lower_bound,
                    a.optimal
                ),
            );
        }
        for (n, mode) in [
            (16, HazardMode::None),
            (16, HazardMode::Full),
            (20, HazardMode::None),
        ] {
            let name = format!("cover {n} vars {mode:?}");
            if !wanted(&name) {
                continue;
            }
            let f = if mode == HazardMode::Full {
                common::function_with_transitions(n, 0)
            } else {
                common::function(n)
            };
            let t0 = Instant::now();
            let r = minimize(&f, &Config::default().hazards(mode).budget(b));
            let answer = match r {
                Ok(s) => format!(
                    "{} products, bound {}, optimal {}",
                    s.cube_count, s.lower_bound, s.optimal
                ),
                Err(e) => format!("error: {e}"),
            };
            row(&name, b, t0.elapsed(), answer);
        }
        if wanted("synth") {
            let src = std::fs::read_to_string(concat!(
                env!("CARGO_MANIFEST_DIR"),
                "/tests/data/conveyor_sorter.flow"
            ))
            .expect("corpus table");
            let t = parse_text(&src).expect("parses");
            let t0 = Instant::now();
            let d = synthesize(&t, &SynthConfig::default().budget(b));
            let answer = match d {
                Ok(d) => format!(
                    "width {}, {} products, verified {}",
                    d.assignment.codes.width(),
                    d.solution.cube_count,
                    d.verification.ok
                ),
                Err(e) => format!("error: {e}"),
            };
            row("synth conveyor_sorter (30 x 16)", b, t0.elapsed(), answer);
        }
    }
}
