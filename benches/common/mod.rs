//! Shared input factories of the benches and the QoR test: random normal flow tables by
//! size and random functions by variable count, all deterministic in a fixed seed.
//!
//! Used by `benches/*.rs` (`mod common;`) and by `tests/qor.rs` (through `#[path]`), so
//! the figures in `docs/performance.md` and the QoR baseline are taken on the same inputs.

#![allow(dead_code)]

use stillpoint_cover::{hazard, CoverError, Cube, Function, HazardMode, MultiFunction, Transition};
use stillpoint_table::testing::{random_normal_table, Rng};
use stillpoint_table::FlowTable;

/// The seed of every bench input (varied per size so sizes are not prefixes of each other).
pub(crate) const SEED: u64 = 0x5717_1790;

/// `log2` of a column count (columns must be a power of two, 2..=256).
pub(crate) fn inputs_for(columns: usize) -> usize {
    assert!(
        columns.is_power_of_two() && columns >= 2,
        "columns must be 2^k"
    );
    columns.trailing_zeros() as usize
}

/// The seed of a table of `rows` x `columns`, or a function of `nvars` variables (`b = 0`).
pub(crate) fn seed_for(a: usize, b: usize, salt: u64) -> u64 {
    SEED ^ ((a as u64) << 20) ^ ((b as u64) << 8) ^ salt
}

/// A random normal flow table of `rows` rows and `columns` columns (every input
/// combination listed), from [`random_normal_table`] with a seed fixed by the size.
pub(crate) fn table(rows: usize, columns: usize) -> FlowTable {
    table_seeded(rows, columns, 0)
}

/// As [`table`], with a `salt` to get other tables of the same size.
pub(crate) fn table_seeded(rows: usize, columns: usize, salt: u64) -> FlowTable {
    random_normal_table(seed_for(rows, columns, salt), rows, inputs_for(columns))
}

/// The minterm lists of a random function: each point is on with probability 30 %, a
/// don't-care with probability 10 %, off otherwise. Deterministic in `(nvars, salt)`.
pub(crate) fn random_sets(nvars: usize, salt: u64) -> (Vec<u64>, Vec<u64>) {
    let mut r = Rng::new(seed_for(nvars, 0, salt) ^ 0xF00D);
    let mut on = Vec::new();
    let mut dc = Vec::new();
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

/// A random function of `nvars` variables (30 % on, 10 % don't-care), no transitions.
pub(crate) fn function(nvars: usize) -> MultiFunction {
    function_seeded(nvars, 0)
}

/// As [`function`], with a `salt`.
pub(crate) fn function_seeded(nvars: usize, salt: u64) -> MultiFunction {
    let (on, dc) = random_sets(nvars, salt);
    let f = Function::from_minterms(nvars, &on, &dc, Vec::new()).expect("valid minterms");
    single(nvars, f)
}

fn single(nvars: usize, f: Function) -> MultiFunction {
    let vars = (0..nvars).map(|i| format!("v{i}")).collect();
    MultiFunction::single(vars, "f", f)
}

/// A random function of `nvars` variables (30 % on, 10 % don't-care) with about
/// `2 * nvars` listed transitions of one or two changing variables, chosen so that each
/// is free of function hazards (every point of its cube specified; a static one constant
/// on its cube) and, together, they admit a hazard-free cover (a transition the
/// Nowick & Dill existence test refuses is dropped, deterministically).
pub(crate) fn function_with_transitions(nvars: usize, salt: u64) -> MultiFunction {
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
        // every point of the cube [s, e] specified; static ones constant
        let (Some(vs), Some(ve)) = (value[s as usize], value[e as usize]) else {
            continue;
        };
        let points: Vec<u64> = subcube(s, mask);
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
        let f = Function::from_minterms(nvars, &on, &dc, ts.clone()).expect("valid function");
        match hazard::prepare("f", &f, HazardMode::Full) {
            Ok(_) => return single(nvars, f),
            Err(CoverError::NoHazardFreeCover { transition, .. })
            | Err(CoverError::FunctionHazard { transition, .. }) => {
                ts.retain(|t| *t != transition);
            }
            Err(e) => panic!("unexpected error preparing a bench function: {e}"),
        }
    }
}

/// A cube-specified function of `nvars` variables, as the synthesis stage produces: the
/// on-set is `2 * nvars` random cubes of about `nvars / 2` literals, the don't-care set up
/// to `nvars` such cubes disjoint from it, the rest off; about `nvars` listed transitions
/// of one changing variable that start in the on-set (static 1->1 inside an on-cube, or
/// dynamic 1->0 to an off point), filtered as in [`function_with_transitions`]. Needs no
/// minterm enumeration, so it scales to 20 variables and beyond.
pub(crate) fn sparse_function(nvars: usize, salt: u64) -> MultiFunction {
    let mut r = Rng::new(seed_for(nvars, 2, salt) ^ 0xC0DE);
    let full = if nvars == 64 {
        u64::MAX
    } else {
        (1u64 << nvars) - 1
    };
    let random_cube = |r: &mut Rng| {
        let lits = nvars / 2 + r.below(nvars / 4 + 1);
        let mut care = 0u64;
        while (care.count_ones() as usize) < lits.min(nvars) {
            care |= 1u64 << r.below(nvars);
        }
        Cube::from_words(care, r.next_u64() & full)
    };
    let on: Vec<Cube> = (0..2 * nvars).map(|_| random_cube(&mut r)).collect();
    let dc: Vec<Cube> = (0..nvars)
        .map(|_| random_cube(&mut r))
        .filter(|d| on.iter().all(|c| !c.intersects(d)))
        .collect();
    let plain = Function::from_cubes(nvars, on.clone(), dc.clone(), Vec::new()).expect("valid");
    // a point word (bit i = variable i) as a minterm number (variable 0 most significant)
    let minterm = |p: u64| (0..nvars).fold(0u64, |m, i| m | ((p >> i) & 1) << (nvars - 1 - i));
    let mut ts: Vec<Transition> = Vec::new();
    for _ in 0..4 * nvars {
        if ts.len() >= nvars {
            break;
        }
        let c = on[r.below(on.len())];
        let p = (c.value_bits() | (r.next_u64() & !c.care_bits())) & full;
        let q = p ^ (1u64 << r.below(nvars));
        let (s, e) = (minterm(p), minterm(q));
        match plain.value(e) {
            Some(_) => {
                let t = Transition { start: s, end: e };
                if !ts.contains(&t) {
                    ts.push(t);
                }
            }
            None => continue,
        }
    }
    loop {
        let f = Function::from_cubes(nvars, on.clone(), dc.clone(), ts.clone()).expect("valid");
        match hazard::prepare("f", &f, HazardMode::Full) {
            Ok(_) => return single(nvars, f),
            Err(CoverError::NoHazardFreeCover { transition, .. })
            | Err(CoverError::FunctionHazard { transition, .. }) => {
                ts.retain(|t| *t != transition);
            }
            Err(e) => panic!("unexpected error preparing a bench function: {e}"),
        }
    }
}

/// The points of the sub-cube spanned from `s` by the bits of `mask`.
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

/// A criterion group with short settings (10 samples, 0.3 s warm-up, 2 s measurement),
/// so that the whole suite runs in a few minutes.
pub(crate) fn group<'a>(
    c: &'a mut criterion::Criterion,
    name: &str,
) -> criterion::BenchmarkGroup<'a, criterion::measurement::WallTime> {
    let mut g = c.benchmark_group(name);
    g.sample_size(10)
        .warm_up_time(std::time::Duration::from_millis(300))
        .measurement_time(std::time::Duration::from_secs(2));
    g
}
