//! Tracey's dichotomies: the separation requirements of a table, their reduction, and the
//! maximal compatible sets of oriented dichotomies.
//!
//! Reference: J. H. Tracey, "Internal state assignments for asynchronous sequential
//! machines", IEEE Trans. Electronic Computers EC-15(4), 1966. A dichotomy `(P; Q)` is a
//! pair of disjoint state sets; a state variable covers it when it is constant on `P`,
//! constant on `Q`, and the two constants differ. State sets are bitsets over
//! [`StateId::index`](stillpoint_table::StateId::index), so a problem has at most
//! [`MAX_STATES`] states.

use crate::problem::Problem;
use crate::AssignError;
use std::collections::BTreeSet;
use stillpoint_table::FlowTable;

/// The largest number of states the dichotomy methods accept (state sets are `u128`).
pub const MAX_STATES: usize = 128;

/// A dichotomy `(left; right)`: two disjoint sets of states, as bitsets over the state
/// index (bit `i` is the state with index `i`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Dichotomy {
    /// The states a covering variable puts on one side (0 in the oriented form).
    pub left: u128,
    /// The states on the other side (1 in the oriented form).
    pub right: u128,
}

impl Dichotomy {
    /// The same dichotomy with its sides swapped.
    pub fn swapped(self) -> Dichotomy {
        Dichotomy {
            left: self.right,
            right: self.left,
        }
    }

    /// The unordered form: the side holding the lowest state goes left.
    pub fn normalized(self) -> Dichotomy {
        let all = self.left | self.right;
        if all != 0 && self.left & (all & all.wrapping_neg()) == 0 {
            self.swapped()
        } else {
            self
        }
    }

    /// Whether `self` covers `other` as unordered dichotomies (each side of `other` lies
    /// inside a different side of `self`).
    pub fn covers(self, other: Dichotomy) -> bool {
        let sub = |a: u128, b: u128| a & !b == 0;
        (sub(other.left, self.left) && sub(other.right, self.right))
            || (sub(other.left, self.right) && sub(other.right, self.left))
    }

    /// Whether two oriented dichotomies are compatible (may share one variable with these
    /// orientations): `left1 ∩ right2 = ∅` and `right1 ∩ left2 = ∅`.
    pub fn compatible(self, other: Dichotomy) -> bool {
        self.left & other.right == 0 && self.right & other.left == 0
    }

    /// Whether two unordered dichotomies can share a variable in some orientation.
    pub fn compatible_unordered(self, other: Dichotomy) -> bool {
        self.compatible(other) || self.compatible(other.swapped())
    }
}

/// The reduced required dichotomies of a normal table: one per two transition pairs of a
/// column with different destinations, the covered ones removed, plus `({s}; {t})` for
/// every two states no other dichotomy separates (distinct codes). Unordered: the side
/// with the lowest state is `left`. Sorted.
///
/// # Errors
/// [`AssignError::NotNormal`] when a chain is left in the table,
/// [`AssignError::TooManyStates`] beyond [`MAX_STATES`].
///
/// # Example
/// ```
/// # use stillpoint_table::parse_text;
/// // One column with two destinations: `a -> b` must be kept apart from stable `c`.
/// let t = parse_text("inputs x\n  0 1\na b (a)\nb (b) c\nc (c) (c)\n")?;
/// let ds = stillpoint_assign::dichotomy::required(&t)?;
/// assert!(!ds.is_empty());
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn required(table: &FlowTable) -> Result<Vec<Dichotomy>, AssignError> {
    let p = Problem::from_table(table)?;
    required_for(&p)
}

pub(crate) fn check_size(n: usize) -> Result<(), AssignError> {
    if n > MAX_STATES {
        Err(AssignError::TooManyStates {
            states: n,
            max: MAX_STATES,
        })
    } else {
        Ok(())
    }
}

/// [`required`] on a problem.
pub(crate) fn required_for(p: &Problem) -> Result<Vec<Dichotomy>, AssignError> {
    check_size(p.num_states)?;
    let bit = |s: u32| 1u128 << s;
    let mut raw: BTreeSet<Dichotomy> = BTreeSet::new();
    for col in &p.columns {
        let pairs = &col.pairs;
        for i in 0..pairs.len() {
            let (s, t) = pairs[i];
            let a = bit(s) | bit(t);
            for &(u, v) in &pairs[i + 1..] {
                if t == v {
                    continue;
                }
                let b = bit(u) | bit(v);
                if a & b != 0 {
                    continue; // cannot happen in a normal table
                }
                raw.insert(Dichotomy { left: a, right: b }.normalized());
            }
        }
    }
    // Remove covered ones: sides have at most two states, so a dichotomy is covered only
    // by one that adds states to a side of size one.
    let n = p.num_states as u32;
    let mut kept: Vec<Dichotomy> = Vec::with_capacity(raw.len());
    for &d in &raw {
        let (l, r) = (d.left.count_ones(), d.right.count_ones());
        let used = d.left | d.right;
        let mut covered = false;
        let mut try_sup = |left: u128, right: u128| {
            if !covered
                && (left, right) != (d.left, d.right)
                && raw.contains(&Dichotomy { left, right }.normalized())
            {
                covered = true;
            }
        };
        let extra: Vec<u128> = (0..n).map(bit).filter(|b| b & used == 0).collect();
        if l == 1 {
            for &x in &extra {
                try_sup(d.left | x, d.right);
            }
        }
        if r == 1 {
            for &x in &extra {
                try_sup(d.left, d.right | x);
            }
        }
        if l == 1 && r == 1 {
            for &x in &extra {
                for &y in &extra {
                    if x != y {
                        try_sup(d.left | x, d.right | y);
                    }
                }
            }
        }
        if !covered {
            kept.push(d);
        }
    }
    // Distinct codes.
    let mut sep = vec![0u128; p.num_states];
    for d in &kept {
        for s in ones(d.left) {
            sep[s] |= d.right;
        }
        for s in ones(d.right) {
            sep[s] |= d.left;
        }
    }
    for (s, &sep_s) in sep.iter().enumerate() {
        for t in s + 1..p.num_states {
            if sep_s & (1u128 << t) == 0 {
                kept.push(Dichotomy {
                    left: 1u128 << s,
                    right: 1u128 << t,
                });
            }
        }
    }
    kept.sort_unstable();
    Ok(kept)
}

/// The indices of the set bits, ascending.
pub(crate) fn ones(mut set: u128) -> impl Iterator<Item = usize> {
    std::iter::from_fn(move || {
        if set == 0 {
            None
        } else {
            let i = set.trailing_zeros() as usize;
            set &= set - 1;
            Some(i)
        }
    })
}

/// Orients unordered dichotomies as in Tracey's method: the state found in the most
/// dichotomies goes on the left of every dichotomy holding it; every other dichotomy is
/// kept in both orientations. Returns the oriented list and, for each entry, the index of
/// the unordered dichotomy it came from.
pub fn orient(dichotomies: &[Dichotomy]) -> (Vec<Dichotomy>, Vec<usize>) {
    let mut count = [0usize; MAX_STATES];
    for d in dichotomies {
        for s in ones(d.left | d.right) {
            count[s] += 1;
        }
    }
    let pivot = (0..MAX_STATES)
        .max_by_key(|&s| (count[s], std::cmp::Reverse(s)))
        .unwrap_or(0);
    let pbit = 1u128 << pivot;
    let mut out = Vec::new();
    let mut from = Vec::new();
    for (i, &d) in dichotomies.iter().enumerate() {
        if d.left & pbit != 0 {
            out.push(d);
            from.push(i);
        } else if d.right & pbit != 0 {
            out.push(d.swapped());
            from.push(i);
        } else {
            out.push(d);
            from.push(i);
            out.push(d.swapped());
            from.push(i);
        }
    }
    (out, from)
}

/// The maximal compatible sets of oriented dichotomies (maximal cliques of the
/// compatibility graph), by Bron–Kerbosch with pivoting on `u64` bitsets. Each set is a
/// sorted list of indices into `oriented`; the list is sorted.
///
/// # Errors
/// [`AssignError::Budget`] when more than `limit` maximal sets exist.
pub fn maximal_compatibles(
    oriented: &[Dichotomy],
    limit: usize,
) -> Result<Vec<Vec<usize>>, AssignError> {
    let m = oriented.len();
    let words = m.div_ceil(64).max(1);
    let mut adj = vec![vec![0u64; words]; m];
    for i in 0..m {
        for j in 0..m {
            if i != j && oriented[i].compatible(oriented[j]) {
                adj[i][j / 64] |= 1 << (j % 64);
            }
        }
    }
    let mut out = Vec::new();
    let mut all = vec![0u64; words];
    for i in 0..m {
        all[i / 64] |= 1 << (i % 64);
    }
    let mut r = Vec::new();
    bron_kerbosch(&adj, &mut r, all, vec![0u64; words], &mut out, limit)?;
    for c in &mut out {
        c.sort_unstable();
    }
    out.sort();
    Ok(out)
}

fn bits_of(set: &[u64]) -> Vec<usize> {
    let mut v = Vec::new();
    for (w, &word) in set.iter().enumerate() {
        let mut x = word;
        while x != 0 {
            v.push(w * 64 + x.trailing_zeros() as usize);
            x &= x - 1;
        }
    }
    v
}

fn bron_kerbosch(
    adj: &[Vec<u64>],
    r: &mut Vec<usize>,
    p: Vec<u64>,
    x: Vec<u64>,
    out: &mut Vec<Vec<usize>>,
    limit: usize,
) -> Result<(), AssignError> {
    if p.iter().all(|&w| w == 0) {
        if x.iter().all(|&w| w == 0) {
            if out.len() >= limit {
                return Err(AssignError::Budget {
                    what: "maximal compatible sets",
                });
            }
            out.push(r.clone());
        }
        return Ok(());
    }
    // Pivot: the vertex of P ∪ X with the most neighbours in P.
    let union: Vec<u64> = p.iter().zip(&x).map(|(a, b)| a | b).collect();
    let pivot = bits_of(&union)
        .into_iter()
        .max_by_key(|&u| {
            adj[u]
                .iter()
                .zip(&p)
                .map(|(a, b)| (a & b).count_ones())
                .sum::<u32>()
        })
        .unwrap_or(0);
    let cand: Vec<u64> = p.iter().zip(&adj[pivot]).map(|(a, b)| a & !b).collect();
    let mut p = p;
    let mut x = x;
    for v in bits_of(&cand) {
        let np: Vec<u64> = p.iter().zip(&adj[v]).map(|(a, b)| a & b).collect();
        let nx: Vec<u64> = x.iter().zip(&adj[v]).map(|(a, b)| a & b).collect();
        r.push(v);
        bron_kerbosch(adj, r, np, nx, out, limit)?;
        r.pop();
        p[v / 64] &= !(1 << (v % 64));
        x[v / 64] |= 1 << (v % 64);
    }
    Ok(())
}

/// The merged dichotomy `(∪ left; ∪ right)` of a compatible set.
pub fn merge(oriented: &[Dichotomy], set: &[usize]) -> Dichotomy {
    set.iter()
        .fold(Dichotomy { left: 0, right: 0 }, |acc, &i| Dichotomy {
            left: acc.left | oriented[i].left,
            right: acc.right | oriented[i].right,
        })
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    fn set(states: &[u32]) -> u128 {
        states.iter().fold(0, |a, &s| a | 1u128 << (s - 1))
    }
    fn d(l: &[u32], r: &[u32]) -> Dichotomy {
        Dichotomy {
            left: set(l),
            right: set(r),
        }
    }

    /// CHECK TRACEY-1 (methods.md §4.3): the table of Unger's book, problem 3.11, as
    /// solved in S. H. Unger, Columbia CS E6831 homework 6 solutions. States 1..5 are
    /// indices 0..4; columns A, B, C.
    pub(crate) fn tracey1() -> Problem {
        let p = |v: &[(u32, u32)]| v.iter().map(|&(a, b)| (a - 1, b - 1)).collect::<Vec<_>>();
        Problem::new(
            5,
            vec![
                p(&[(1, 1), (2, 2), (3, 4), (4, 4), (5, 2)]),
                p(&[(1, 2), (2, 2), (3, 3), (4, 5), (5, 5)]),
                p(&[(1, 1), (2, 3), (3, 3), (4, 1), (5, 3)]),
            ],
        )
    }

    #[test]
    fn tracey1_required_dichotomies() {
        // Published maximal dichotomies: (1;25) (1;34) (25;34) from A, (12;3) (12;45)
        // (3;45) from B, (14;23) (14;35) from C. Source: Unger, Columbia CS E6831 HW 6
        // solution, problem 3.11.
        let mut want = vec![
            d(&[1], &[2, 5]),
            d(&[1], &[3, 4]),
            d(&[2, 5], &[3, 4]),
            d(&[1, 2], &[3]),
            d(&[1, 2], &[4, 5]),
            d(&[3], &[4, 5]),
            d(&[1, 4], &[2, 3]),
            d(&[1, 4], &[3, 5]),
        ]
        .into_iter()
        .map(Dichotomy::normalized)
        .collect::<Vec<_>>();
        want.sort();
        let got = required_for(&tracey1()).unwrap();
        assert_eq!(got, want);
    }

    #[test]
    fn tracey1_maximal_compatibles() {
        // The published list (Unger, Columbia CS E6831 HW 6 solution, problem 3.11) is
        // aef, eh', df, bdg, dh', bcd, ch; methods.md §4.3 [computed] adds ab, ag', ah,
        // which are compatible by the rule of §4.2 step 4. We check the union of both.
        let a = d(&[1], &[2, 5]);
        let b = d(&[1], &[3, 4]);
        let c = d(&[1, 2], &[4, 5]);
        let dd = d(&[1, 2], &[3]);
        let e = d(&[1, 4], &[2, 3]);
        let f = d(&[1, 4], &[3, 5]);
        let g = d(&[2, 5], &[3, 4]);
        let h = d(&[3], &[4, 5]);
        let oriented = vec![a, b, c, dd, e, f, g, g.swapped(), h, h.swapped()];
        let names = ["a", "b", "c", "d", "e", "f", "g", "g'", "h", "h'"];
        let cl = maximal_compatibles(&oriented, 1000).unwrap();
        let mut got: Vec<String> = cl
            .iter()
            .map(|s| s.iter().map(|&i| names[i]).collect::<String>())
            .collect();
        got.sort();
        let mut want: Vec<String> = [
            "aef", "eh'", "df", "bdg", "dh'", "bcd", "ch", "ab", "ag'", "ah",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect();
        want.sort();
        assert_eq!(got, want);
    }
}
