//! Profiling helper: `one N MODE EFFORT` on a random cube-given function
//! (6N cubes of N/2 literals), or `one N MODE EFFORT P_ON` on random minterms.
use stillpoint_cover::{
    minimize, verify, Config, Cube, Effort, Function, HazardMode, MultiFunction,
};
fn main() {
    let a: Vec<String> = std::env::args().collect();
    let n: usize = a.get(1).and_then(|s| s.parse().ok()).unwrap_or(16);
    let mode = match a.get(2).map(String::as_str) {
        Some("static") => HazardMode::Static,
        Some("full") => HazardMode::Full,
        _ => HazardMode::None,
    };
    let effort = if a.get(3).map(String::as_str) == Some("fast") {
        Effort::Fast
    } else {
        Effort::Exact
    };
    let p_on: Option<u64> = a.get(4).and_then(|s| s.parse().ok());
    let mut x = 12345u64;
    let mut next = || {
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    };
    let f = if let Some(p) = p_on {
        let on: Vec<u64> = (0..1u64 << n).filter(|_| next() % 100 < p).collect();
        Function::from_minterms(n, &on, &[], vec![]).unwrap()
    } else {
        let on: Vec<Cube> = (0..6 * n)
            .map(|_| {
                let mut c = Cube::full();
                while c.literal_count() < n / 2 {
                    let v = (next() % n as u64) as usize;
                    c = c.with_literal(v, Some(next() & 1 == 1));
                }
                c
            })
            .collect();
        Function::from_cubes(n, on, vec![], vec![]).unwrap()
    };
    let mf = MultiFunction::single((0..n).map(|i| format!("x{i}")).collect(), "f", f);
    let cfg = Config::default()
        .hazards(mode)
        .effort(effort)
        .budget(std::time::Duration::from_secs(10));
    let s = minimize(&mf, &cfg).unwrap();
    println!(
        "cubes {} lits {} optimal {} lb {} {:?} core {:?} nodes {} verified {}",
        s.cube_count,
        s.literal_count,
        s.optimal,
        s.lower_bound,
        s.stats.elapsed,
        s.stats.core,
        s.stats.nodes,
        verify::check(&mf, &s, mode).is_ok()
    );
}
