use stillpoint_table::{parse_text, FlowTable};

/// A small deterministic generator (SplitMix64).
pub(crate) struct Rng(pub u64);

impl Rng {
    pub(crate) fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    pub(crate) fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
    pub(crate) fn chance(&mut self, percent: u64) -> bool {
        self.next() % 100 < percent
    }
}

/// A random normal table: `states` rows, every column of `inputs` inputs listed; in each
/// column some rows are stable, most others lead to one of them, a few are unspecified.
pub(crate) fn random_normal(seed: u64, states: usize, inputs: usize) -> FlowTable {
    let mut r = Rng(seed);
    let names: Vec<String> = (0..states).map(|i| format!("s{i}")).collect();
    let cols = 1usize << inputs;
    let mut grid = vec![vec![String::from("-"); cols]; states];
    for c in 0..cols {
        let mut stable: Vec<usize> = (0..states).filter(|_| r.chance(30)).collect();
        if stable.is_empty() {
            stable.push(r.below(states));
        }
        for s in 0..states {
            if stable.contains(&s) {
                grid[s][c] = format!("({})", names[s]);
            } else if !r.chance(15) {
                grid[s][c] = names[stable[r.below(stable.len())]].clone();
            }
        }
    }
    let mut text = String::from("inputs");
    for i in 0..inputs {
        text.push_str(&format!(" x{i}"));
    }
    text.push_str("\n   ");
    for c in 0..cols {
        let label: String = (0..inputs)
            .map(|i| {
                if c >> (inputs - 1 - i) & 1 == 1 {
                    '1'
                } else {
                    '0'
                }
            })
            .collect();
        text.push_str(&format!(" {label}"));
    }
    text.push('\n');
    for s in 0..states {
        text.push_str(&names[s]);
        for c in 0..cols {
            text.push(' ');
            text.push_str(&grid[s][c]);
        }
        text.push('\n');
    }
    parse_text(&text).expect("generated table parses")
}

/// The column pairs `(source, destination)` of a normal table, straight from its entries.
pub(crate) fn pairs(t: &FlowTable) -> Vec<Vec<(usize, usize)>> {
    t.columns()
        .map(|c| {
            t.states()
                .filter_map(|s| t.next(s, c).map(|n| (s.index(), n.index())))
                .collect()
        })
        .collect()
}

/// CHECK TRACEY-1 (methods.md §4.3): Unger, *Asynchronous Sequential Switching Circuits*,
/// problem 3.11, as solved in S. H. Unger, Columbia CS E6831 homework 6 solutions.
/// Columns A, B, C are written as input combinations 00, 01, 11.
pub(crate) const TRACEY1: &str = "\
inputs p q
      00    01    11
r1   (r1)   r2   (r1)
r2   (r2)  (r2)   r3
r3    r4   (r3)  (r3)
r4   (r4)   r5    r1
r5    r2   (r5)   r3
";

/// Adds to a SAT reference on code bits (`x[state][bit]`, `k` bits) the clauses saying that
/// some bit is constant on the states `a`, constant on the states `b`, and different on
/// the two: Tracey's separation written directly on the bits, with one indicator per bit
/// and polarity.
pub(crate) fn add_separation(
    s: &mut varisat::Solver,
    x: &[Vec<varisat::Lit>],
    k: usize,
    a: &[usize],
    b: &[usize],
) {
    use varisat::ExtendFormula;
    let mut any = Vec::new();
    for j in 0..k {
        for pol in [false, true] {
            let e = s.new_lit();
            for &p in a {
                s.add_clause(&[!e, if pol { x[p][j] } else { !x[p][j] }]);
            }
            for &q in b {
                s.add_clause(&[!e, if pol { !x[q][j] } else { x[q][j] }]);
            }
            any.push(e);
        }
    }
    s.add_clause(&any);
}
