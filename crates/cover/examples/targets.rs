//! The two performance targets of the cover crate, on the inputs of the project's
//! benches (the generator of the root `benches/common/mod.rs` copied here: a cover
//! example cannot reach the root package). Manual runs, not a benchmark:
//!
//! - `cargo run --release -p stillpoint-cover --example targets -- exact [SEEDS] [REPS]`:
//!   the exact hazard-free (full mode) cover of `function_with_transitions(12, salt)` for
//!   salts `0..SEEDS`, median of `REPS` calls each;
//! - `... --example targets -- fast [N] [REPS]`: the heuristic cover of `function(N)`
//!   (plain and static) and `function_with_transitions(N, 0)` (full), median of `REPS`.

use std::time::{Duration, Instant};
use stillpoint_cover::{
    hazard, minimize, verify, Config, CoverError, Effort, Function, HazardMode, MultiFunction,
    Solution, Transition,
};

/// The seed of every bench input.
const SEED: u64 = 0x5717_1790;

fn seed_for(a: usize, b: usize, salt: u64) -> u64 {
    SEED ^ ((a as u64) << 20) ^ ((b as u64) << 8) ^ salt
}

/// The generator of the benches (SplitMix64 with a fixed offset of the seed).
struct Rng(u64);

impl Rng {
    fn new(seed: u64) -> Self {
        Rng(seed ^ 0x5DEE_CE66_D1CE_4E5B)
    }
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n.max(1) as u64) as usize
    }
    fn chance(&mut self, p: u32) -> bool {
        self.below(100) < p as usize
    }
}

fn random_sets(nvars: usize, salt: u64) -> (Vec<u64>, Vec<u64>) {
    let mut r = Rng::new(seed_for(nvars, 0, salt) ^ 0xF00D);
    let (mut on, mut dc) = (Vec::new(), Vec::new());
    for m in 0..1u64 << nvars {
        let x = r.below(100);
        if x < 30 {
            on.push(m);
        } else if x < 40 {
            dc.push(m);
        }
    }
    (on, dc)
}

fn single(nvars: usize, f: Function) -> MultiFunction {
    let vars = (0..nvars).map(|i| format!("v{i}")).collect();
    MultiFunction::single(vars, "f", f)
}

fn function(nvars: usize, salt: u64) -> MultiFunction {
    let (on, dc) = random_sets(nvars, salt);
    single(
        nvars,
        Function::from_minterms(nvars, &on, &dc, Vec::new()).expect("valid"),
    )
}

fn subcube(s: u64, mask: u64) -> Vec<u64> {
    let mut out = vec![s];
    let mut m = mask;
    while m != 0 {
        let b = m & m.wrapping_neg();
        m &= m - 1;
        let more: Vec<u64> = out.iter().map(|p| p ^ b).collect();
        out.extend(more);
    }
    out
}

fn function_with_transitions(nvars: usize, salt: u64) -> MultiFunction {
    let (on, dc) = random_sets(nvars, salt);
    let mut value = vec![None; 1usize << nvars];
    for &m in &on {
        value[m as usize] = Some(true);
    }
    let dcs: std::collections::BTreeSet<u64> = dc.iter().copied().collect();
    for m in 0..1u64 << nvars {
        if value[m as usize].is_none() && !dcs.contains(&m) {
            value[m as usize] = Some(false);
        }
    }
    let mut r = Rng::new(seed_for(nvars, 1, salt) ^ 0xBEEF);
    let want = 2 * nvars;
    let mut ts: Vec<Transition> = Vec::new();
    let mut tries = 0;
    while ts.len() < want && tries < 100 * want {
        tries += 1;
        let s = r.next_u64() & ((1u64 << nvars) - 1);
        let i = r.below(nvars);
        let mut mask = 1u64 << i;
        if r.chance(50) {
            let j = r.below(nvars);
            mask |= 1u64 << j;
        }
        let e = s ^ mask;
        let (Some(vs), Some(ve)) = (value[s as usize], value[e as usize]) else {
            continue;
        };
        let points = subcube(s, mask);
        if points.iter().any(|&p| value[p as usize].is_none()) {
            continue;
        }
        if vs == ve && points.iter().any(|&p| value[p as usize] != Some(vs)) {
            continue;
        }
        let t = Transition { start: s, end: e };
        if ts.contains(&t) {
            continue;
        }
        ts.push(t);
    }
    loop {
        let f = Function::from_minterms(nvars, &on, &dc, ts.clone()).expect("valid");
        match hazard::prepare("f", &f, HazardMode::Full) {
            Ok(_) => return single(nvars, f),
            Err(CoverError::NoHazardFreeCover { transition, .. })
            | Err(CoverError::FunctionHazard { transition, .. }) => {
                ts.retain(|t| *t != transition);
            }
            Err(e) => panic!("unexpected error: {e}"),
        }
    }
}

fn median(mut v: Vec<Duration>) -> Duration {
    v.sort();
    v[v.len() / 2]
}

/// The median and the least wall time of `reps` calls, and the last solution.
fn timed(mf: &MultiFunction, cfg: &Config, reps: usize) -> (Duration, Duration, Solution) {
    let mut times = Vec::with_capacity(reps);
    let mut last = None;
    for _ in 0..reps.max(1) {
        let t = Instant::now();
        let s = minimize(mf, cfg).expect("minimises");
        times.push(t.elapsed());
        last = Some(s);
    }
    let least = times.iter().copied().min().unwrap_or_default();
    (median(times), least, last.expect("one run"))
}

fn line(label: &str, (t, least): (Duration, Duration), s: &Solution, ok: bool) {
    println!(
        "{label}: {:>8.1} ms (least {:>6.1})  products {:>6} literals {:>7} bound {:>6} optimal {} literals_optimal {} count {:>7.1} ms nodes {} core {:?} verified {ok}",
        t.as_secs_f64() * 1e3,
        least.as_secs_f64() * 1e3,
        s.cube_count,
        s.literal_count,
        s.lower_bound,
        s.optimal,
        s.literals_optimal,
        s.stats.count_search.as_secs_f64() * 1e3,
        s.stats.nodes,
        s.stats.core,
    );
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let what = args.get(1).map(String::as_str).unwrap_or("exact");
    let a = |i: usize, d: usize| args.get(i).and_then(|s| s.parse().ok()).unwrap_or(d);
    match what {
        "exact" => {
            let (seeds, reps) = (a(2, 10), a(3, 3));
            let mut all = Vec::new();
            for salt in 0..seeds as u64 {
                let mf = function_with_transitions(12, salt);
                let mut cfg = Config::default().hazards(HazardMode::Full);
                if let Ok(ms) = std::env::var("LITERAL_MS") {
                    cfg = cfg.literal_budget(Duration::from_millis(ms.parse().unwrap_or(0)));
                }
                let (t, least, s) = timed(&mf, &cfg, reps);
                let ok = verify::check(&mf, &s, HazardMode::Full).is_ok();
                line(&format!("exact full 12 seed {salt}"), (t, least), &s, ok);
                all.push(t);
            }
            println!(
                "median over seeds: {:.1} ms",
                median(all).as_secs_f64() * 1e3
            );
        }
        "fast" => {
            let (n, reps) = (a(2, 20), a(3, 5));
            let plain = function(n, 0);
            let full = function_with_transitions(n, 0);
            for (mf, mode) in [
                (&plain, HazardMode::None),
                (&plain, HazardMode::Static),
                (&full, HazardMode::Full),
            ] {
                if args.get(4).is_some_and(|m| m != mode.name()) {
                    continue;
                }
                let cfg = Config::default().hazards(mode).effort(Effort::Fast);
                let (t, least, s) = timed(mf, &cfg, reps);
                let ok = verify::check(mf, &s, mode).is_ok();
                line(&format!("fast {} {n}", mode.name()), (t, least), &s, ok);
            }
        }
        _ => eprintln!("usage: targets exact [SEEDS] [REPS] | targets fast [N] [REPS]"),
    }
}
