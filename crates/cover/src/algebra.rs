//! Operations on covers (lists of cubes) that never enumerate minterms: cofactors,
//! tautology, complement, containment, intersection and sharp, by unate recursion
//! (Brayton, Hachtel, McMullen & Sangiovanni-Vincentelli, *Logic Minimization
//! Algorithms for VLSI Synthesis*, Kluwer 1984). Exact.

use crate::budget::Clock;
use crate::cube::Cube;

/// The cofactor of `cover` with respect to cube `c`: the cubes meeting `c`, with the
/// variables of `c` removed.
pub fn cofactor(cover: &[Cube], c: &Cube) -> Vec<Cube> {
    let drop = !c.care_bits();
    cover
        .iter()
        .filter(|d| d.intersects(c))
        .map(|d| Cube::from_words(d.care_bits() & drop, d.value_bits()))
        .collect()
}

/// Splits on one variable: `(cover restricted to var = 0, cover restricted to var = 1)`
/// with the variable removed.
pub fn split(cover: &[Cube], var: usize) -> (Vec<Cube>, Vec<Cube>) {
    let bit = 1u64 << var;
    let mut lo = Vec::with_capacity(cover.len());
    let mut hi = Vec::with_capacity(cover.len());
    for d in cover {
        if d.care_bits() & bit == 0 {
            lo.push(*d);
            hi.push(*d);
        } else {
            let stripped = Cube::from_words(d.care_bits() & !bit, d.value_bits());
            if d.value_bits() & bit == 0 {
                lo.push(stripped);
            } else {
                hi.push(stripped);
            }
        }
    }
    (lo, hi)
}

/// The variable to split on: the one with literals of both polarities in most cubes,
/// or (when the cover is unate) `None`.
pub fn binate_var(cover: &[Cube]) -> Option<usize> {
    let mut pos = 0u64;
    let mut neg = 0u64;
    for d in cover {
        pos |= d.care_bits() & d.value_bits();
        neg |= d.care_bits() & !d.value_bits();
    }
    let binate = pos & neg;
    if binate == 0 {
        return None;
    }
    Some(most_frequent(cover, binate))
}

/// Among the variables in `candidates`, the one that appears as a literal in most cubes
/// (lowest index on ties).
pub fn most_frequent(cover: &[Cube], candidates: u64) -> usize {
    let mut counts = [0u32; 64];
    for d in cover {
        let mut bits = d.care_bits() & candidates;
        while bits != 0 {
            let v = bits.trailing_zeros() as usize;
            counts[v] += 1;
            bits &= bits - 1;
        }
    }
    let mut best = candidates.trailing_zeros() as usize;
    let mut bits = candidates;
    while bits != 0 {
        let v = bits.trailing_zeros() as usize;
        if counts[v] > counts[best] {
            best = v;
        }
        bits &= bits - 1;
    }
    best
}

/// Whether the cover is the constant 1 over the variables not yet removed.
pub fn tautology(cover: &[Cube]) -> bool {
    if cover.iter().any(|d| d.care_bits() == 0) {
        return true;
    }
    if cover.is_empty() {
        return false;
    }
    match binate_var(cover) {
        // A unate cover is a tautology only if it holds the universe.
        None => false,
        Some(v) => {
            let (lo, hi) = split(cover, v);
            tautology(&lo) && tautology(&hi)
        }
    }
}

/// Whether cube `c` lies inside the union of `cover`.
pub fn covers_cube(cover: &[Cube], c: &Cube) -> bool {
    tautology(&cofactor(cover, c))
}

/// Whether cube `c` meets the union of `cover`.
pub fn meets(cover: &[Cube], c: &Cube) -> bool {
    cover.iter().any(|d| d.intersects(c))
}

/// The complement of `cover` (within the variables `nvars`) as a list of pairwise
/// disjoint cubes, sorted like [`scc`] leaves a cover.
pub fn complement(cover: &[Cube], nvars: usize) -> Vec<Cube> {
    complement_within(cover, nvars, &Clock::unbounded()).unwrap_or_default()
}

/// [`complement`] under a deadline: `None` when it passed first.
pub(crate) fn complement_within(cover: &[Cube], nvars: usize, clock: &Clock) -> Option<Vec<Cube>> {
    let mut out = complement_rec(cover, crate::cube::mask(nvars), clock);
    if clock.expired() {
        return None;
    }
    // The pieces are pairwise disjoint (De Morgan pieces are disjoint, the halves of a
    // split are disjoint, and merged equal cubes stay disjoint from the rest), so no
    // cube lies inside another: sorting is all single-cube containment would do.
    out.sort_unstable_by_key(|c| (c.literal_count(), c.care_bits(), c.value_bits()));
    out.dedup();
    Some(out)
}

fn complement_rec(cover: &[Cube], space: u64, clock: &Clock) -> Vec<Cube> {
    if clock.tick() {
        return Vec::new();
    }
    if cover.is_empty() {
        return vec![Cube::full()];
    }
    if cover.iter().any(|d| d.care_bits() & space == 0) {
        return Vec::new();
    }
    if cover.len() == 1 {
        // De Morgan, as disjoint pieces: l1' + l1 l2' + l1 l2 l3' + ...
        let d = cover[0];
        let mut out = Vec::new();
        let mut prefix = Cube::full();
        let mut bits = d.care_bits() & space;
        while bits != 0 {
            let v = bits.trailing_zeros() as usize;
            let lit = d.literal(v);
            out.push(prefix.with_literal(v, lit.map(|p| !p)));
            prefix = prefix.with_literal(v, lit);
            bits &= bits - 1;
        }
        return out;
    }
    let v = match binate_var(cover) {
        Some(v) => v,
        None => {
            let mut all = 0u64;
            for d in cover {
                all |= d.care_bits();
            }
            most_frequent(cover, all & space)
        }
    };
    let (lo, hi) = split(cover, v);
    let sub = space & !(1u64 << v);
    let c0 = complement_rec(&lo, sub, clock);
    let c1 = complement_rec(&hi, sub, clock);
    merge_halves(c0, c1, v)
}

/// Joins `var'·c0 + var·c1`, merging equal cubes of both halves into one without `var`.
fn merge_halves(mut c0: Vec<Cube>, mut c1: Vec<Cube>, var: usize) -> Vec<Cube> {
    c0.sort();
    c0.dedup();
    c1.sort();
    c1.dedup();
    let mut out = Vec::with_capacity(c0.len() + c1.len());
    let (mut i, mut j) = (0, 0);
    while i < c0.len() || j < c1.len() {
        if j >= c1.len() || (i < c0.len() && c0[i] < c1[j]) {
            out.push(c0[i].with_literal(var, Some(false)));
            i += 1;
        } else if i >= c0.len() || c1[j] < c0[i] {
            out.push(c1[j].with_literal(var, Some(true)));
            j += 1;
        } else {
            out.push(c0[i]);
            i += 1;
            j += 1;
        }
    }
    out
}

/// Pairwise intersection of two covers (single-cube containment applied).
pub fn intersect(a: &[Cube], b: &[Cube]) -> Vec<Cube> {
    intersect_within(a, b, &Clock::unbounded()).unwrap_or_default()
}

/// [`intersect`] under a deadline: `None` when it passed first.
pub(crate) fn intersect_within(a: &[Cube], b: &[Cube], clock: &Clock) -> Option<Vec<Cube>> {
    let mut out = Vec::new();
    for x in a {
        if clock.tick() {
            return None;
        }
        for y in b {
            if let Some(z) = x.intersection(y) {
                out.push(z);
            }
        }
    }
    scc_within(&mut out, clock);
    Some(out)
}

/// The points of cube `a` outside cube `b`, as disjoint cubes.
pub fn cube_minus(a: &Cube, b: &Cube) -> Vec<Cube> {
    if !a.intersects(b) {
        return vec![*a];
    }
    let mut out = Vec::new();
    let mut prefix = *a;
    let mut bits = b.care_bits() & !a.care_bits();
    while bits != 0 {
        let v = bits.trailing_zeros() as usize;
        let lit = b.literal(v);
        out.push(prefix.with_literal(v, lit.map(|p| !p)));
        prefix = prefix.with_literal(v, lit);
        bits &= bits - 1;
    }
    out
}

/// The points of `cover` outside every cube of `minus` (a cover, single-cube
/// containment applied).
pub fn sharp(cover: &[Cube], minus: &[Cube]) -> Vec<Cube> {
    let mut start = cover.to_vec();
    scc(&mut start);
    sharp_within(&start, minus, &Clock::unbounded()).unwrap_or_default()
}

/// [`sharp`] under a deadline: `None` when it passed first.
///
/// Containment is kept up piece by piece instead of by a pass over the whole list: a
/// piece split off a cube `a` is dropped when it lies inside another cube that meets
/// `a` (only those can hold it) or inside a piece kept before it. A cube that no
/// subtracted cube touched is kept as it is, so a containment-free `cover` gives a
/// containment-free result, and a large cover that the subtracted cubes barely touch
/// costs a scan per subtracted cube, not a quadratic pass.
pub(crate) fn sharp_within(cover: &[Cube], minus: &[Cube], clock: &Clock) -> Option<Vec<Cube>> {
    let mut cur: Vec<Cube> = cover.to_vec();
    let mut hit: Vec<bool> = Vec::new();
    for b in minus {
        if clock.tick() {
            return None;
        }
        hit.clear();
        hit.extend(cur.iter().map(|a| a.intersects(b)));
        if !hit.iter().any(|&h| h) {
            continue;
        }
        let mut next: Vec<Cube> = cur
            .iter()
            .zip(&hit)
            .filter(|&(_, &h)| !h)
            .map(|(a, _)| *a)
            .collect();
        let untouched = next.len();
        for (a, _) in cur.iter().zip(&hit).filter(|&(_, &h)| h) {
            let near: Vec<Cube> = next[..untouched]
                .iter()
                .filter(|d| d.intersects(a))
                .copied()
                .collect();
            for piece in cube_minus(a, b) {
                let inside = near.iter().any(|d| d.contains(&piece))
                    || next[untouched..].iter().any(|d| d.contains(&piece));
                if !inside {
                    next.push(piece);
                }
            }
        }
        cur = next;
    }
    if clock.expired() {
        None
    } else {
        Some(cur)
    }
}

/// Single-cube containment: removes duplicates and cubes inside another cube of the
/// list. The survivors are sorted (largest cubes first, then by their words).
pub fn scc(cover: &mut Vec<Cube>) {
    scc_within(cover, &Clock::unbounded());
}

/// [`scc`] under a deadline. When the deadline passes first the list is left sorted
/// and free of duplicates, holding the same points, but possibly not containment-free.
pub(crate) fn scc_within(cover: &mut Vec<Cube>, clock: &Clock) {
    cover.sort_unstable_by_key(|c| (c.literal_count(), c.care_bits(), c.value_bits()));
    cover.dedup();
    if clock.expired() {
        return;
    }
    // A cube can lie only inside a cube with fewer literals (equal ones are gone), and
    // those come first: `smaller` counts the kept cubes with fewer literals than `c`.
    let mut kept: Vec<Cube> = Vec::with_capacity(cover.len());
    let mut smaller = 0;
    let mut level = 0;
    for (i, c) in cover.iter().enumerate() {
        let l = c.literal_count();
        if l != level {
            level = l;
            smaller = kept.len();
        }
        if smaller > 64 && clock.tick() {
            // Out of time: keep the rest unchecked (same points, still sorted).
            kept.extend_from_slice(&cover[i..]);
            break;
        }
        if !kept[..smaller].iter().any(|k| k.contains(c)) {
            kept.push(*c);
        }
    }
    *cover = kept;
}

/// A point (as a cube of `nvars` literals) of `a ∩ b`, if the cubes meet.
pub fn witness(a: &Cube, b: &Cube, nvars: usize) -> Option<Cube> {
    let c = a.intersection(b)?;
    // Absent variables read as 0.
    Some(Cube::from_words(crate::cube::mask(nvars), c.value_bits()))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cv(v: &[&str]) -> Vec<Cube> {
        v.iter().map(|s| Cube::parse(s).unwrap()).collect()
    }

    fn points(cover: &[Cube], n: usize) -> Vec<u64> {
        (0..1u64 << n)
            .filter(|&m| cover.iter().any(|c| c.contains_minterm(n, m)))
            .collect()
    }

    #[test]
    fn tautology_and_complement() {
        assert!(tautology(&cv(&["1--", "0--"])));
        assert!(tautology(&cv(&["11-", "0-1", "-0-", "0-0", "1-0"])));
        assert!(!tautology(&cv(&["11-", "0-1"])));
        let f = cv(&["11-", "0-1"]);
        let g = complement(&f, 3);
        let pf = points(&f, 3);
        let pg = points(&g, 3);
        assert_eq!(pf.len() + pg.len(), 8);
        assert!(pf.iter().all(|m| !pg.contains(m)));
    }

    #[test]
    fn sharp_and_minus() {
        let a = cv(&["----"]);
        let b = cv(&["1-0-", "01--"]);
        let d = sharp(&a, &b);
        let pd = points(&d, 4);
        let pb = points(&b, 4);
        assert_eq!(pd.len() + pb.len(), 16);
        assert!(covers_cube(
            &cv(&["1-0-", "1-1-"]),
            &Cube::parse("1---").unwrap()
        ));
    }
}
