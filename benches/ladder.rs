//! The size ladder, run once per point: result quality (rows, widths, cube counts,
//! optimal or the gap to the proven bound) and a single-shot time, printed as markdown
//! tables for `docs/performance.md`. Not a criterion bench (quality, not timing
//! statistics); the criterion benches are `table`, `assign`, `cover` and `pipeline`.
//!
//! ```text
//! cargo bench --bench ladder                      # every section
//! cargo bench --bench ladder -- reduce tracey     # some sections
//! cargo bench --bench ladder -- push              # how far each exact method proves
//! ```
//! Sections: `reduce`, `tracey`, `assign` (every method), `cover`, `push` (with what the
//! heuristics reach beyond).
//! `STILLPOINT_LADDER_BUDGET=SECONDS` sets the budget of exact searches (default 60).

mod common;

use std::time::{Duration, Instant};
use stillpoint_assign::{assign, races, separation, AssignConfig, Method};
use stillpoint_cover::{minimize, verify, Config, Effort, HazardMode};
use stillpoint_table::{reduce, ReduceConfig};

fn budget() -> Duration {
    let s = std::env::var("STILLPOINT_LADDER_BUDGET")
        .ok()
        .and_then(|v| v.parse::<f64>().ok())
        .unwrap_or(60.0);
    Duration::from_secs_f64(s)
}

fn ms(d: Duration) -> String {
    format!("{:.2}", d.as_secs_f64() * 1e3)
}

fn reduce_ladder(rows: &[usize], cols: &[usize]) {
    println!("\n### State reduction (exact), one run per point\n");
    println!("| rows x cols | rows after | lower bound | optimal | compatible pairs | maximal | primes | nodes | ms |");
    println!("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    let cfg = ReduceConfig::default().budget(budget());
    for &c in cols {
        for &n in rows {
            let t = common::table(n, c);
            let s = Instant::now();
            let r = reduce(&t, &cfg).expect("normal tables reduce");
            let el = s.elapsed();
            println!(
                "| {n} x {c} | {} | {} | {} | {} | {} | {} | {} | {} |",
                r.table.num_states(),
                r.lower_bound,
                r.optimal,
                r.stats.compatible_pairs,
                r.stats.maximal_compatibles,
                r.stats.primes,
                r.stats.nodes,
                ms(el)
            );
        }
    }
}

fn tracey_ladder(rows: &[usize], cols: &[usize]) {
    println!("\n### Tracey exact and fast, one run per point\n");
    println!("| rows x cols | dichotomies | exact width | bound | optimal | nodes | exact ms | fast width | fast bound | fast ms | races ms | critical |");
    println!("| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    for &c in cols {
        for &n in rows {
            let t = common::table(n, c);
            let cfg = AssignConfig::default().budget(budget());
            let s = Instant::now();
            let a = assign(&t, &cfg.clone().method(Method::Tracey)).expect("tracey");
            let te = s.elapsed();
            let s = Instant::now();
            let f = assign(&t, &cfg.method(Method::TraceyFast)).expect("tracey-fast");
            let tf = s.elapsed();
            let s = Instant::now();
            let rr = races::analyze(&t, &a.codes).expect("races");
            let tr = s.elapsed();
            assert!(separation::check(&t, &a.codes).is_ok());
            assert!(separation::check(&t, &f.codes).is_ok());
            println!(
                "| {n} x {c} | {} | {} | {} | {} | {} | {} | {} | {} | {} | {} | {} |",
                a.stats.dichotomies,
                a.codes.width(),
                a.lower_bound,
                a.optimal == Some(true),
                a.stats.nodes,
                ms(te),
                f.codes.width(),
                f.lower_bound,
                ms(tf),
                ms(tr),
                rr.critical.len()
            );
        }
    }
}

fn assign_ladder(rows: &[usize], cols: &[usize]) {
    println!("\n### Width per method\n");
    let methods = [
        Method::Tracey,
        Method::TraceyFast,
        Method::Liu,
        Method::Tan,
        Method::Adjacent,
        Method::OneHot,
    ];
    print!("| rows x cols | bound |");
    for m in methods {
        print!(" {m} |");
    }
    println!();
    println!("|{}", " --- |".repeat(methods.len() + 2));
    for &c in cols {
        for &n in rows {
            let t = common::table(n, c);
            let mut bound = 0;
            let mut cells = Vec::new();
            for m in methods {
                let cfg = AssignConfig::default()
                    .budget(budget())
                    .method(m)
                    .node_limit(5_000_000);
                let s = Instant::now();
                match assign(&t, &cfg) {
                    Ok(a) => {
                        bound = bound.max(a.lower_bound);
                        let tag = match a.optimal {
                            Some(true) => " (opt)",
                            _ => "",
                        };
                        cells.push(format!("{}{tag}, {} ms", a.codes.width(), ms(s.elapsed())));
                    }
                    Err(e) => cells.push(format!("-: {}", short(&e.to_string()))),
                }
            }
            println!("| {n} x {c} | {bound} | {} |", cells.join(" | "));
        }
    }
}

fn short(s: &str) -> String {
    s.chars().take(60).collect()
}

fn pipeline_ladder(rows: &[usize], cols: &[usize]) {
    use stillpoint::synth::{synthesize, SynthConfig};
    println!("\n### The whole pipeline, one run per point\n");
    println!("| rows x cols | config | rows after | state vars | products | literals | verified | ms | reduce / assign / cover / verify ms |");
    println!("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    for &c in cols {
        for &n in rows {
            let t = common::table(n, c);
            for (label, cfg) in [
                (
                    "fast",
                    SynthConfig::default()
                        .method(Method::TraceyFast)
                        .effort(Effort::Fast)
                        .alternatives(1)
                        .budget(budget()),
                ),
                ("default", SynthConfig::default().budget(budget())),
            ] {
                let s = Instant::now();
                let r = std::panic::catch_unwind(|| synthesize(&t, &cfg));
                let Ok(r) = r else {
                    println!("| {n} x {c} | {label} | panicked (see above) | | | | | | |");
                    continue;
                };
                match r {
                    Ok(d) => println!(
                        "| {n} x {c} | {label} | {} | {} | {} | {} | {} | {} | {} / {} / {} / {} |",
                        d.table.num_states(),
                        d.assignment.codes.width(),
                        d.solution.cube_count,
                        d.solution.literal_count,
                        d.verification.ok,
                        ms(s.elapsed()),
                        ms(d.stats.reduce_time),
                        ms(d.stats.assign_time),
                        ms(d.stats.cover_time),
                        ms(d.stats.verify_time)
                    ),
                    Err(e) => println!(
                        "| {n} x {c} | {label} | error: {} | | | | | {} | |",
                        short(&e.to_string()),
                        ms(s.elapsed())
                    ),
                }
            }
        }
    }
}

fn cover_ladder(vars: &[usize], sparse: bool) {
    if sparse {
        println!("\n### Two-level covers, sparse cube-specified functions, one run per point\n");
    } else {
        println!(
            "\n### Two-level covers, random functions (30 % on, 10 % dc), one run per point\n"
        );
    }
    println!("| vars | mode | effort | cubes | literals | bound | optimal | primes | nodes | ms | checker |");
    println!("| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    for &n in vars {
        let (plain, trans) = if sparse {
            let f = common::sparse_function(n, 0);
            (f.clone(), f)
        } else {
            (common::function(n), common::function_with_transitions(n, 0))
        };
        let ntrans = trans.outputs[0].1.transitions().len();
        for (mode, f) in [
            (HazardMode::None, &plain),
            (HazardMode::Static, &plain),
            (HazardMode::Full, &trans),
        ] {
            for effort in [Effort::Exact, Effort::Fast] {
                let cfg = Config::default()
                    .hazards(mode)
                    .effort(effort)
                    .budget(budget());
                let s = Instant::now();
                let r = minimize(f, &cfg);
                let el = s.elapsed();
                match r {
                    Ok(sol) => {
                        let ok = verify::check(f, &sol, mode).is_ok();
                        println!(
                            "| {n} | {}{} | {:?} | {} | {} | {} | {} | {} | {} | {} | {} |",
                            mode.name(),
                            if mode == HazardMode::Full {
                                format!(" ({ntrans} transitions)")
                            } else {
                                String::new()
                            },
                            effort,
                            sol.cube_count,
                            sol.literal_count,
                            sol.lower_bound,
                            sol.optimal,
                            sol.stats.primes,
                            sol.stats.nodes,
                            ms(el),
                            ok
                        );
                    }
                    Err(e) => println!("| {n} | {} | {effort:?} | error: {e} |", mode.name()),
                }
            }
        }
    }
}

/// Goes up each exact method's ladder until a point is not proven optimal.
fn push() {
    println!(
        "\n### How far the exact methods prove (budget {:?})\n",
        budget()
    );
    println!("| method | size | result | optimal | ms |");
    println!("| --- | --- | --- | --- | --- |");
    for c in [4usize, 8, 16] {
        for n in [16usize, 24, 32, 40, 48, 64, 96, 128] {
            let t = common::table(n, c);
            let s = Instant::now();
            let r = reduce(&t, &ReduceConfig::default().budget(budget())).expect("reduce");
            println!(
                "| reduce | {n} x {c} | {} rows (bound {}) | {} | {} |",
                r.table.num_states(),
                r.lower_bound,
                r.optimal,
                ms(s.elapsed())
            );
            if !r.optimal {
                break;
            }
        }
    }
    for c in [4usize, 16] {
        for n in [32usize, 48, 64, 96, 128] {
            let t = common::table(n, c);
            let s = Instant::now();
            let cfg = AssignConfig::default().budget(budget());
            match assign(&t, &cfg) {
                Ok(a) => {
                    println!(
                        "| tracey | {n} x {c} | width {} (bound {}) | {} | {} |",
                        a.codes.width(),
                        a.lower_bound,
                        a.optimal == Some(true),
                        ms(s.elapsed())
                    );
                    if a.optimal != Some(true) {
                        break;
                    }
                }
                Err(e) => {
                    println!("| tracey | {n} x {c} | error: {e} | - | - |");
                    break;
                }
            }
        }
    }
    for (family, vars) in [
        ("dense", &[8usize, 10, 12, 14][..]),
        ("sparse", &[8, 12, 16, 20, 24, 32][..]),
    ] {
        for mode in [HazardMode::None, HazardMode::Full] {
            for &n in vars {
                let f = match (family, mode) {
                    ("sparse", _) => common::sparse_function(n, 0),
                    (_, HazardMode::Full) => common::function_with_transitions(n, 0),
                    _ => common::function(n),
                };
                let s = Instant::now();
                let cfg = Config::default().hazards(mode).budget(budget());
                match minimize(&f, &cfg) {
                    Ok(sol) => {
                        println!(
                            "| cover {} {family} | {n} vars | {} cubes (bound {}) | {} | {} |",
                            mode.name(),
                            sol.cube_count,
                            sol.lower_bound,
                            sol.optimal,
                            ms(s.elapsed())
                        );
                        if !sol.optimal {
                            break;
                        }
                    }
                    Err(e) => {
                        println!(
                            "| cover {} {family} | {n} vars | error: {e} | - | - |",
                            mode.name()
                        );
                        break;
                    }
                }
            }
        }
    }
}

/// What the heuristics reach beyond the exact methods: `tracey-fast` codes, heuristic
/// covers of dense functions and the whole pipeline's fast configuration, one run each.
fn beyond() {
    println!("\n### Beyond: the heuristics, one run each\n");
    println!("| method | size | result | ms |");
    println!("| --- | --- | --- | --- |");
    for (n, c) in [(64usize, 16usize), (128, 16), (256, 16), (512, 16)] {
        let t = common::table(n, c);
        let s = Instant::now();
        let cfg = AssignConfig::default().method(Method::TraceyFast);
        match assign(&t, &cfg) {
            Ok(a) => println!(
                "| tracey-fast | {n} x {c} | width {} (bound {}) | {} |",
                a.codes.width(),
                a.lower_bound,
                ms(s.elapsed())
            ),
            Err(e) => println!("| tracey-fast | {n} x {c} | error: {e} | - |"),
        }
    }
    for n in [16usize, 18, 20] {
        for mode in [HazardMode::None, HazardMode::Full] {
            let f = if mode == HazardMode::Full {
                common::function_with_transitions(n, 0)
            } else {
                common::function(n)
            };
            let s = Instant::now();
            let cfg = Config::default().hazards(mode).effort(Effort::Fast);
            match minimize(&f, &cfg) {
                Ok(sol) => println!(
                    "| cover {} dense, heuristic | {n} vars | {} cubes (bound {}) | {} |",
                    mode.name(),
                    sol.cube_count,
                    sol.lower_bound,
                    ms(s.elapsed())
                ),
                Err(e) => println!(
                    "| cover {} dense, heuristic | {n} vars | error: {e} | - |",
                    mode.name()
                ),
            }
        }
    }
    for (n, c) in [(64usize, 16usize), (96, 16), (128, 16)] {
        let s = Instant::now();
        match synth_fast(n, c) {
            Ok(what) => println!("| synth fast | {n} x {c} | {what} | {} |", ms(s.elapsed())),
            Err(e) => println!("| synth fast | {n} x {c} | error: {e} | - |"),
        }
    }
}

/// The whole pipeline's fast configuration (`tracey-fast` codes, heuristic cover) on the
/// bench table of `rows x cols`: rows after reduction, width, products, verified.
fn synth_fast(rows: usize, cols: usize) -> Result<String, String> {
    let t = common::table(rows, cols);
    let cfg = stillpoint::synth::SynthConfig::default()
        .method(Method::TraceyFast)
        .effort(Effort::Fast)
        .alternatives(1)
        .budget(budget());
    let d = stillpoint::synth::synthesize(&t, &cfg).map_err(|e| e.to_string())?;
    Ok(format!(
        "{} rows, width {}, {} products, verified {}",
        d.table.num_states(),
        d.assignment.codes.width(),
        d.solution.cube_count,
        d.verification.ok
    ))
}

/// One run of one point, for profiling: `one cover MODE EFFORT VARS [sparse]`,
/// `one tracey ROWS COLS`, `one tracey-fast ROWS COLS`, `one synth-fast ROWS COLS`,
/// `one reduce ROWS COLS`.
fn one(args: &[String]) {
    let num = |i: usize| -> usize { args.get(i).and_then(|a| a.parse().ok()).expect("a number") };
    let s = Instant::now();
    match args.first().map(String::as_str) {
        Some("cover") => {
            let mode = match args[1].as_str() {
                "none" => HazardMode::None,
                "static" => HazardMode::Static,
                _ => HazardMode::Full,
            };
            let effort = if args[2] == "fast" {
                Effort::Fast
            } else {
                Effort::Exact
            };
            let n = num(3);
            let f = match (args.get(4).map(String::as_str), mode) {
                (Some("sparse"), _) => common::sparse_function(n, 0),
                (_, HazardMode::Full) => common::function_with_transitions(n, 0),
                _ => common::function(n),
            };
            let made = s.elapsed();
            let cfg = Config::default()
                .hazards(mode)
                .effort(effort)
                .budget(budget());
            let sol = minimize(&f, &cfg).expect("minimises");
            println!(
                "cubes {} literals {} bound {} optimal {} primes {} nodes {}; input {} ms, total {} ms",
                sol.cube_count,
                sol.literal_count,
                sol.lower_bound,
                sol.optimal,
                sol.stats.primes,
                sol.stats.nodes,
                ms(made),
                ms(s.elapsed())
            );
        }
        Some(m @ ("tracey" | "tracey-fast")) => {
            let t = common::table(num(1), num(2));
            let method = if m == "tracey" {
                Method::Tracey
            } else {
                Method::TraceyFast
            };
            let a = assign(&t, &AssignConfig::default().method(method).budget(budget()))
                .expect("assigns");
            println!(
                "width {} bound {} optimal {:?} nodes {}; {} ms",
                a.codes.width(),
                a.lower_bound,
                a.optimal,
                a.stats.nodes,
                ms(s.elapsed())
            );
        }
        Some("synth-fast") => match synth_fast(num(1), num(2)) {
            Ok(what) => println!("{what}; {} ms", ms(s.elapsed())),
            Err(e) => println!("error: {e}"),
        },
        Some("reduce") => {
            let t = common::table(num(1), num(2));
            let r = reduce(&t, &ReduceConfig::default().budget(budget())).expect("reduces");
            println!("{}", r.stats);
        }
        _ => eprintln!("usage: one cover|tracey|tracey-fast|synth-fast|reduce ..."),
    }
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    if args.first().map(String::as_str) == Some("one") {
        one(&args[1..]);
        return;
    }
    let on = |s: &str| args.is_empty() || args.iter().any(|a| a == s);
    println!(
        "Ladder: budget {:?}, {} threads available",
        budget(),
        std::thread::available_parallelism().map_or(1, |n| n.get())
    );
    if on("reduce") {
        reduce_ladder(&[8, 12, 16, 20, 24], &[4, 8]);
    }
    if on("tracey") {
        tracey_ladder(&[8, 16, 24, 32, 64], &[4, 16]);
    }
    if on("assign") {
        assign_ladder(&[8, 16, 24, 32, 64], &[4, 16]);
    }
    if on("cover") {
        cover_ladder(&[8, 12], false);
        cover_ladder(&[8, 12, 16, 20], true);
    }
    if on("pipeline") {
        pipeline_ladder(&[8, 16, 24, 32, 64], &[4, 8, 16]);
    }
    if on("push") {
        push();
        beyond();
    }
}
