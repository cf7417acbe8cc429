//! Profiling helper: one random 16-variable cube-given function, exact plain cover.
use stillpoint_cover::{minimize, Config, Cube, Function, HazardMode, MultiFunction};
fn main() {
    let n = 16;
    let mut x = 12345u64;
    let mut next = || {
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    };
    let on: Vec<Cube> = (0..96)
        .map(|_| {
            let mut c = Cube::full();
            while c.literal_count() < 8 {
                let v = (next() % n as u64) as usize;
                c = c.with_literal(v, Some(next() & 1 == 1));
            }
            c
        })
        .collect();
    let f = Function::from_cubes(n, on, vec![], vec![]).unwrap();
    let mf = MultiFunction::single((0..n).map(|i| format!("x{i}")).collect(), "f", f);
    let s = minimize(&mf, &Config::default().hazards(HazardMode::None)).unwrap();
    println!("{} {:?}", s.cube_count, s.stats.elapsed);
}
