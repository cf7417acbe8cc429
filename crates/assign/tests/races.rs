//! Race analysis against brute force: every order of bit changes enumerated (k <= 4), and
//! a GMW exploration (every non-empty subset of excited variables may change first) of the
//! Tracey-filled next-state map when the code is race-free.

use crate::common::{pairs, random_normal, Rng};
use stillpoint_assign::{races, separation, Codes};
use stillpoint_table::FlowTable;

/// The points passed by all orders of bit changes from `a` to `b`.
fn passed(a: u64, b: u64, k: usize) -> Vec<u64> {
    let bits: Vec<u64> = (0..k)
        .map(|i| 1u64 << i)
        .filter(|m| (a ^ b) & m != 0)
        .collect();
    let mut out = vec![a];
    let mut perm: Vec<usize> = (0..bits.len()).collect();
    // Heap's algorithm over all orders.
    fn heap(n: usize, perm: &mut Vec<usize>, bits: &[u64], a: u64, out: &mut Vec<u64>) {
        if n <= 1 {
            let mut cur = a;
            for &i in perm.iter() {
                cur ^= bits[i];
                out.push(cur);
            }
            return;
        }
        for i in 0..n {
            heap(n - 1, perm, bits, a, out);
            let j = if n % 2 == 0 { i } else { 0 };
            perm.swap(j, n - 1);
        }
    }
    let len = perm.len();
    heap(len, &mut perm, &bits, a, &mut out);
    out.sort_unstable();
    out.dedup();
    out
}

fn random_codes(r: &mut Rng, n: usize, k: usize) -> Codes {
    let mut pool: Vec<u64> = (0..1u64 << k).collect();
    for i in (1..pool.len()).rev() {
        pool.swap(i, r.below(i + 1));
    }
    Codes::new(k, pool[..n].to_vec()).unwrap()
}

/// Brute force: a transition is critical when some order passes a point, other than its
/// two ends, that some order of another entry of the column (other destination) passes.
/// `(column, source, destination)` triples.
type Moves = Vec<(usize, usize, usize)>;

fn brute(t: &FlowTable, codes: &Codes) -> (Moves, Moves) {
    let k = codes.width();
    let c = |s: usize| codes.as_slice()[s];
    let (mut crit, mut non) = (Vec::new(), Vec::new());
    for (ci, col) in pairs(t).iter().enumerate() {
        for &(s, d) in col {
            if s == d {
                continue;
            }
            let mine = passed(c(s), c(d), k);
            let bad = col.iter().any(|&(u, v)| {
                v != d && u != s && {
                    let theirs = passed(c(u), c(v), k);
                    mine.iter()
                        .any(|p| *p != c(s) && *p != c(d) && theirs.contains(p))
                }
            });
            if bad {
                crit.push((ci, s, d));
            } else if (c(s) ^ c(d)).count_ones() >= 2 {
                non.push((ci, s, d));
            }
        }
    }
    (crit, non)
}

/// GMW exploration from `start` on a total map `f`: the terminal points reached.
fn gmw_outcomes(f: &[u64], start: u64) -> Vec<u64> {
    let mut seen = vec![false; f.len()];
    let mut stack = vec![start];
    seen[start as usize] = true;
    let mut ends = Vec::new();
    while let Some(y) = stack.pop() {
        let e = f[y as usize] ^ y;
        if e == 0 {
            ends.push(y);
            continue;
        }
        let mut sub = e;
        while sub != 0 {
            let z = y ^ sub;
            if !seen[z as usize] {
                seen[z as usize] = true;
                stack.push(z);
            }
            sub = (sub - 1) & e;
        }
    }
    ends.sort_unstable();
    ends
}

#[test]
fn analysis_agrees_with_brute_force() {
    let mut r = Rng(99);
    let mut crit_seen = 0;
    let mut free_seen = 0;
    for seed in 0..300u64 {
        let n = 3 + (seed % 4) as usize; // 3..=6
        let k = (n as f64).log2().ceil() as usize + (seed % 2) as usize;
        let k = k.clamp(2, 4);
        let t = random_normal(seed + 5, n, 1 + (seed % 2) as usize);
        let codes = random_codes(&mut r, n, k);
        let rep = races::analyze(&t, &codes).unwrap();
        let (crit, non) = brute(&t, &codes);
        let got_c: Moves = rep
            .critical
            .iter()
            .map(|c| (c.column.index(), c.state.index(), c.to.index()))
            .collect();
        let got_n: Moves = rep
            .noncritical
            .iter()
            .map(|c| (c.column.index(), c.state.index(), c.to.index()))
            .collect();
        assert_eq!(got_c, crit, "seed {seed}");
        assert_eq!(got_n, non, "seed {seed}");
        assert_eq!(
            rep.race_free(),
            separation::check(&t, &codes).is_ok(),
            "seed {seed}"
        );
        // Each reported order: one bit per step inside the transition's cube, ending in
        // the cube of an entry that leads to `ends_in`.
        let col_pairs = pairs(&t);
        for c in &rep.critical {
            let (cs, ct) = (codes.code(c.state), codes.code(c.to));
            assert_eq!(c.order[0], cs);
            for w in c.order.windows(2) {
                assert_eq!((w[0] ^ w[1]).count_ones(), 1);
            }
            let last = *c.order.last().unwrap();
            assert_ne!(last, cs);
            assert_ne!(last, ct);
            assert_eq!((last ^ cs) & !(cs ^ ct), 0, "inside the transition cube");
            assert_ne!(c.ends_in, c.to);
            let other = col_pairs[c.column.index()].iter().any(|&(u, v)| {
                v == c.ends_in.index() && {
                    let (cu, cv) = (codes.as_slice()[u], codes.as_slice()[v]);
                    (last ^ cu) & !(cu ^ cv) == 0
                }
            });
            assert!(
                other,
                "seed {seed}: the last point lies in an entry leading to ends_in"
            );
            crit_seen += 1;
        }
        if rep.race_free() {
            free_seen += 1;
            // Tracey filling: every point of an entry's cube goes to its destination.
            for (ci, col) in col_pairs.iter().enumerate() {
                let mut f: Vec<u64> = (0..1u64 << k).collect();
                for &(u, v) in col {
                    let (cu, cv) = (codes.as_slice()[u], codes.as_slice()[v]);
                    for p in 0..1u64 << k {
                        if (p ^ cu) & !(cu ^ cv) == 0 {
                            f[p as usize] = cv;
                        }
                    }
                }
                for &(u, v) in col {
                    let ends = gmw_outcomes(&f, codes.as_slice()[u]);
                    assert_eq!(ends, vec![codes.as_slice()[v]], "seed {seed} column {ci}");
                }
            }
        }
    }
    assert!(crit_seen > 50 && free_seen > 10, "{crit_seen} {free_seen}");
}

#[test]
fn race1_published_shape() {
    // CHECK RACE-1 (methods.md §3.2): a = 00, c = 11: `a -> c` may pass through b's code
    // (critical); `c -> a` with no other state's code on its path is not. Source: the
    // "race-free state assignment, three-row flow-table example" textbook page cited
    // there. The table is our own layout of that situation.
    let t = stillpoint_table::parse_text("inputs x\n  0 1\na (a) c\nb - (b)\nc a (c)\n").unwrap();
    let codes = Codes::new(2, vec![0b00, 0b01, 0b11]).unwrap();
    let rep = races::analyze(&t, &codes).unwrap();
    assert_eq!(rep.critical.len(), 1);
    assert_eq!(rep.critical[0].state.index(), 0);
    assert_eq!(rep.critical[0].ends_in.index(), 1);
    assert_eq!(rep.noncritical.len(), 1);
    assert_eq!(rep.noncritical[0].state.index(), 2);
}
