//! Random flow tables for tests (feature `testing`): a deterministic generator of normal
//! tables and `proptest` strategies.

use crate::ids::StateId;
use crate::table::{FlowTable, OutBit, Parts};
use proptest::prelude::*;

/// A tiny deterministic generator (SplitMix64), so tables depend on the seed only.
#[derive(Clone, Debug)]
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed.
    pub fn new(seed: u64) -> Self {
        Rng(seed ^ 0x5DEE_CE66_D1CE_4E5B)
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// A number in `0..n` (`n >= 1`).
    pub fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n.max(1) as u64) as usize
    }

    /// True with probability `p` percent.
    pub fn chance(&mut self, p: u32) -> bool {
        self.below(100) < p as usize
    }
}

fn names(prefix: &str, n: usize) -> Vec<String> {
    (0..n).map(|i| format!("{prefix}{i}")).collect()
}

fn bit(r: &mut Rng, free: u32) -> OutBit {
    if r.chance(free) {
        OutBit::Free
    } else if r.chance(50) {
        OutBit::One
    } else {
        OutBit::Zero
    }
}

/// A random normal table: `states` rows (at least 1), `inputs` inputs (1..=8), every
/// combination listed, every row stable in one or two columns, about a third of the
/// unstable entries unspecified, the others leading to a row stable in that column;
/// 1 or 2 outputs, specified on stable entries and often unspecified on unstable ones.
/// Deterministic in `seed`.
pub fn random_normal_table(seed: u64, states: usize, inputs: usize) -> FlowTable {
    let mut r = Rng::new(seed);
    let ns = states.max(1);
    let ni = inputs.clamp(1, 8);
    let nc = 1usize << ni;
    let k = 1 + r.below(2);
    let mut stable_in = vec![Vec::new(); nc];
    for s in 0..ns {
        let c = r.below(nc);
        stable_in[c].push(s);
        if r.chance(40) {
            let d = r.below(nc);
            if d != c {
                stable_in[d].push(s);
            }
        }
    }
    let mut next = vec![None; ns * nc];
    let mut out = vec![OutBit::Free; ns * nc * k];
    for c in 0..nc {
        for s in 0..ns {
            let at = s * nc + c;
            if stable_in[c].contains(&s) {
                next[at] = Some(StateId::from_index(s));
                for j in 0..k {
                    out[at * k + j] = bit(&mut r, 10);
                }
            } else if !stable_in[c].is_empty() && !r.chance(33) {
                let t = stable_in[c][r.below(stable_in[c].len())];
                next[at] = Some(StateId::from_index(t));
                for j in 0..k {
                    out[at * k + j] = bit(&mut r, 70);
                }
            }
        }
    }
    FlowTable::from_parts(Parts {
        name: Some(format!("random_{seed}")),
        inputs: names("x", ni),
        outputs: names("z", k),
        states: names("s", ns),
        columns: (0..nc as u32).collect(),
        next,
        out,
        reset: None,
    })
    .expect("generated tables are valid")
}

/// A random table of any shape (possibly non-normal, with oscillations, rows without
/// stable entries, unlisted columns, a reset and a name), deterministic in `seed`.
pub fn random_table(
    seed: u64,
    max_states: usize,
    max_inputs: usize,
    max_outputs: usize,
) -> FlowTable {
    let mut r = Rng::new(seed);
    let ns = 1 + r.below(max_states.max(1));
    let ni = 1 + r.below(max_inputs.clamp(1, 8));
    let k = r.below(max_outputs + 1);
    let mut cols: Vec<u32> = (0..1u32 << ni).filter(|_| r.chance(75)).collect();
    if cols.is_empty() {
        cols.push(r.below(1 << ni) as u32);
    }
    // shuffle the listed order
    for i in (1..cols.len()).rev() {
        let j = r.below(i + 1);
        cols.swap(i, j);
    }
    let nc = cols.len();
    let next = (0..ns * nc)
        .map(|_| {
            if r.chance(30) {
                None
            } else {
                Some(StateId::from_index(r.below(ns)))
            }
        })
        .collect();
    let out = (0..ns * nc * k).map(|_| bit(&mut r, 40)).collect();
    let reset = if r.chance(50) {
        Some(StateId::from_index(r.below(ns)))
    } else {
        None
    };
    let name = if r.chance(50) {
        Some(format!("t{}", r.below(1000)))
    } else {
        None
    };
    FlowTable::from_parts(Parts {
        name,
        inputs: names("in", ni),
        outputs: names("out", k),
        states: names("st", ns),
        columns: cols,
        next,
        out,
        reset,
    })
    .expect("generated tables are valid")
}

/// Random tables of any shape ([`random_table`]) with at most these sizes.
pub fn arb_table(
    max_states: usize,
    max_inputs: usize,
    max_outputs: usize,
) -> impl Strategy<Value = FlowTable> {
    any::<u64>().prop_map(move |seed| random_table(seed, max_states, max_inputs, max_outputs))
}

/// Random normal tables ([`random_normal_table`]) with `1..=max_states` rows and
/// `1..=max_inputs` inputs.
pub fn arb_normal_table(max_states: usize, max_inputs: usize) -> impl Strategy<Value = FlowTable> {
    (any::<u64>(), 1..=max_states.max(1), 1..=max_inputs.max(1))
        .prop_map(|(seed, s, i)| random_normal_table(seed, s, i))
}
