//! The heuristic on a point table (functions of up to 20 variables): our own greedy
//! expand / irredundant / reduce loop where every legality test and every coverage
//! count is a lookup per point of the cube, so dense functions (hundreds of thousands
//! of on-set points) are covered in time linear in the space.
//!
//! - Seeds: the closures of the required cubes, then every on-set point not yet held,
//!   hardest first (fewest neighbours outside the off-set).
//! - Expand: raise one literal at a time, choosing the variable whose new half weighs
//!   most (on-set points not yet held, the ones with more off-set neighbours more, then
//!   on-set points already held), while the cube stays a legal product (no off-set point, no illegal intersection with a privileged cube;
//!   when raising a literal meets a privileged cube illegally, its closure is tried).
//! - Static mode: every adjacent on-on pair held by no product gets a product grown
//!   from the pair.
//! - Irredundant: a product goes when every on-set point, required cube and (static
//!   mode) adjacent pair it holds is held by another; smallest products first.
//! - Reduce: each product shrinks to the supercube of what only it holds (then its
//!   closure), is expanded again, and the pass ends with irredundant; kept when the
//!   cost falls ([`ROUNDS`] round; none in static mode, where it gains a few tenths of
//!   a percent at twice the time).
//!
//! Every intermediate cover is valid, so when the clock runs out the current one is
//! returned (the points not yet held are added unexpanded).
//!
//! The lower bound: a greedy set of on-set points no two of which lie in one
//! implicant. An implicant holding point `p` lies inside `N(p)`, the cube of `p` with
//! every variable free whose flip from `p` is not an off-set point; two points can
//! share an implicant only if each lies in the other's `N` and the supercube of the
//! two holds no off-set point. Points with `N(p)` of at most [`BOUND_DIM`] free
//! variables are tried, and a point joins the set when no member is compatible with
//! it (the members compatible with `p` all lie in `N(p)`, which is enumerated).

use crate::budget::Clock;
use crate::cube::{mask, Cube};
use crate::hazard::OutputSpec;
use crate::points::{each_point, Table, OFF, ON};

/// Points whose `N(p)` has at most this many free variables are lower-bound
/// candidates even when no product of the cover holds them alone.
const BOUND_DIM: u32 = 6;

/// The largest `N(p)` (free variables) the lower bound enumerates.
const ENUM_DIM: u32 = 8;

/// The longest chosen list the lower bound scans for a candidate with a larger `N`.
const SCAN_MAX: usize = 2048;

/// Rounds of reduce / expand / irredundant after the first cover (above 16 variables).
const ROUNDS: usize = 1;

/// The same, up to 16 variables (stopping early when a round gains nothing).
const SMALL_ROUNDS: usize = 4;

/// The working state: the chosen products and how often each point, adjacent pair and
/// required cube is held.
pub(crate) struct Engine<'a> {
    s: &'a OutputSpec,
    st: &'a [u8],
    n: usize,
    full: u64,
    /// Chosen products (`None` once removed).
    cubes: Vec<Option<Cube>>,
    /// Products holding each on-set point (other points are not counted).
    cnt: Vec<u32>,
    /// Static mode: products holding the pair `(p, p ^ 1 << v)` of on-set points at
    /// `rank(p) * n + v` (for `p` with bit `v` clear; `rank` counts the on-set points
    /// below `p`, so only on-set points take room: a third of the table's size times
    /// `n`, which keeps these random accesses in fewer pages), saturating at 255 (a
    /// saturated count is never trusted to allow a removal).
    pairs: Vec<u8>,
    /// The on-set points as a bitset (the hot loops read a point's state here: an
    /// eighth of the state table) and, in static mode, how many lie below each word.
    on_bits: Vec<u64>,
    on_below: Vec<u32>,
    /// Products holding each required cube.
    req: Vec<u32>,
    /// The table's neighbour masks ([`Table::neighbours`]).
    nb: &'a [u32],
    /// [`Engine::weight`] of every point, kept up to date by [`Engine::paint`] (one
    /// byte per point: the expand scores read this alone).
    wt: Vec<u8>,
}

impl<'a> Engine<'a> {
    /// An empty cover of `s` over its point table.
    pub(crate) fn new(s: &'a OutputSpec, t: &'a Table) -> Engine<'a> {
        let n = t.nvars();
        let size = 1usize << n;
        let (st, nb) = (t.states(), t.neighbours());
        let wt = st
            .iter()
            .zip(nb)
            .map(|(&s, &m)| if s == ON { fresh_weight(n, m) } else { 0 })
            .collect();
        let on_bits: Vec<u64> = st
            .chunks(64)
            .map(|w| {
                w.iter()
                    .enumerate()
                    .fold(0u64, |a, (i, &x)| a | u64::from(x == ON) << i)
            })
            .collect();
        let mut on_below = Vec::new();
        if s.adjacent_pairs {
            let mut below = 0u32;
            on_below = on_bits
                .iter()
                .map(|w| {
                    let b = below;
                    below += w.count_ones();
                    b
                })
                .collect();
        }
        let on_count = on_bits
            .iter()
            .filter(|_| s.adjacent_pairs)
            .map(|w| w.count_ones() as usize)
            .sum::<usize>();
        Engine {
            s,
            st: t.states(),
            n,
            full: mask(n),
            cubes: Vec::new(),
            cnt: vec![0; size],
            pairs: vec![0; on_count * n],
            on_bits,
            on_below,
            req: vec![0; s.required.len()],
            nb,
            wt,
        }
    }

    /// Where the count of the pair `(p, p | 1 << v)` of on-set points is kept.
    #[inline]
    fn slot(&self, p: usize, v: usize) -> usize {
        pair_slot(&self.on_bits, &self.on_below, self.n, p, v)
    }

    /// The products chosen, in the order they were added.
    pub(crate) fn cubes(&self) -> Vec<Cube> {
        self.cubes.iter().flatten().copied().collect()
    }

    fn cost(&self) -> (usize, usize) {
        self.cubes
            .iter()
            .flatten()
            .fold((0, 0), |(a, b), c| (a + 1, b + c.literal_count()))
    }

    /// Adds product `c` to the counts (not to the list).
    fn paint(&mut self, c: &Cube, up: bool) {
        let n = self.n;
        let free = self.full & !c.care_bits();
        let (cnt, pairs, wt, nb) = (&mut self.cnt, &mut self.pairs, &mut self.wt, self.nb);
        let (on_bits, on_below) = (&self.on_bits, &self.on_below);
        let pairs_on = !pairs.is_empty();
        each_point(c, n, |p| {
            // Only on-set points are counted (no count of another point is read).
            if !on_at(on_bits, p) {
                return true;
            }
            if up {
                cnt[p] += 1;
                if cnt[p] == 1 {
                    wt[p] = 1;
                }
            } else {
                cnt[p] -= 1;
                if cnt[p] == 0 {
                    wt[p] = fresh_weight(n, nb[p]);
                }
            }
            if pairs_on {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    if on_at(on_bits, p | 1 << v) {
                        let x = &mut pairs[pair_slot(on_bits, on_below, n, p, v)];
                        if *x != u8::MAX {
                            *x = if up { *x + 1 } else { *x - 1 };
                        }
                    }
                }
            }
            true
        });
        for (k, r) in self.s.required.iter().enumerate() {
            if c.contains(&r.cube) {
                if up {
                    self.req[k] += 1;
                } else {
                    self.req[k] -= 1;
                }
            }
        }
    }

    fn add(&mut self, c: Cube) {
        self.paint(&c, true);
        self.cubes.push(Some(c));
    }

    /// Whether `c` meets no privileged cube illegally.
    fn priv_ok(&self, c: &Cube) -> bool {
        self.s
            .privileged
            .iter()
            .all(|q| !q.cube.intersects(c) || c.contains(&q.start))
    }

    /// The weight of point `p` for growing a product over it: 0 off the on-set, 1 for
    /// an on-set point already held, and for one not yet held 2 plus its off-set
    /// neighbours (points with few ways out are the ones a later product covers
    /// badly; measured: about 2 % fewer products at 16 variables than a flat weight).
    #[inline]
    fn weight(&self, p: usize) -> u32 {
        self.wt[p] as u32
    }

    /// The variables `v` for which raising `v` in `c` may meet a privileged cube
    /// illegally (all others certainly do not): for a legal `c`, only a privileged cube
    /// one literal away along `v`, whose start point the raised cube misses.
    fn priv_suspects(&self, c: &Cube) -> u64 {
        let mut out = 0u64;
        for q in &self.s.privileged {
            let d = c.care_bits() & q.cube.care_bits() & (c.value_bits() ^ q.cube.value_bits());
            if d == 0 {
                if !c.contains(&q.start) {
                    // `c` itself is not legal: check every raise in full.
                    return u64::MAX;
                }
            } else if d & (d - 1) == 0 {
                let rest = c.care_bits() & !d;
                if (c.value_bits() ^ q.start.value_bits()) & rest != 0 {
                    out |= d;
                }
            }
        }
        out
    }

    /// Grows the legal cube `c` to a maximal legal cube, greedily.
    fn expand(&self, mut c: Cube) -> Cube {
        loop {
            let mut best: Option<(u32, Cube)> = None;
            let mut bits = c.care_bits() & self.full;
            each_point(&c, self.n, |p| {
                bits &= self.nb[p] as u64;
                bits != 0
            });
            let suspects = if self.s.privileged.is_empty() {
                0
            } else {
                self.priv_suspects(&c)
            };
            while bits != 0 {
                let v = bits.trailing_zeros() as usize;
                bits &= bits - 1;
                let up = c.with_literal(v, None);
                let mut score = 0u32;
                if suspects >> v & 1 == 0 || self.priv_ok(&up) {
                    let half = Cube::from_words(c.care_bits(), c.value_bits() ^ (1 << v));
                    each_point(&half, self.n, |p| {
                        score += self.weight(p);
                        true
                    });
                    if !matches!(best, Some((b, _)) if b >= score) {
                        best = Some((score, up));
                    }
                } else {
                    let big = self.s.closure(&up);
                    let ok = each_point(&big, self.n, |p| {
                        if !c.contains(&Cube::from_words(self.full, p as u64)) {
                            score += self.weight(p);
                        }
                        self.st[p] != OFF
                    });
                    if ok && !matches!(best, Some((b, _)) if b >= score) {
                        best = Some((score, big));
                    }
                }
            }
            match best {
                Some((_, up)) => c = up,
                None => return c,
            }
        }
    }

    /// Whether product `k` can go: everything it holds is held by another product.
    fn removable(&self, c: &Cube) -> bool {
        let n = self.n;
        let free = self.full & !c.care_bits();
        let pairs_on = !self.pairs.is_empty();
        let points_ok = each_point(c, n, |p| {
            if !on_at(&self.on_bits, p) {
                return true;
            }
            if self.cnt[p] < 2 {
                return false;
            }
            if pairs_on {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    if on_at(&self.on_bits, p | 1 << v) {
                        let x = self.pairs[self.slot(p, v)];
                        if x < 2 || x == u8::MAX {
                            return false;
                        }
                    }
                }
            }
            true
        });
        points_ok
            && self
                .s
                .required
                .iter()
                .zip(&self.req)
                .all(|(r, &k)| k >= 2 || !c.contains(&r.cube))
    }

    /// Drops redundant products, smallest first.
    fn irredundant(&mut self, clock: &Clock) {
        let order = by_literals(&self.cubes, true);
        for k in order {
            if clock.tick() {
                return;
            }
            let Some(c) = self.cubes[k] else { continue };
            if self.removable(&c) {
                self.paint(&c, false);
                self.cubes[k] = None;
            }
        }
    }

    /// The first cover: required cubes, then every on-set point, then (static mode)
    /// every open adjacent pair. When `clock` runs out, the rest is added unexpanded.
    fn first_cover(&mut self, clock: &Clock) -> bool {
        let s = self.s;
        for r in &s.required {
            let c = s.closure(&r.cube);
            let c = if clock.tick() { c } else { self.expand(c) };
            self.add(c);
        }
        // On-set points, fewest non-off neighbours first.
        let n = self.n;
        let mut buckets: Vec<Vec<u32>> = vec![Vec::new(); n + 1];
        for p in 0..self.st.len() {
            if self.st[p] == ON && self.cnt[p] == 0 {
                buckets[self.nb[p].count_ones() as usize].push(p as u32);
            }
        }
        for b in &buckets {
            for &p in b {
                let p = p as usize;
                if self.cnt[p] > 0 {
                    continue;
                }
                let mut c = Cube::from_words(self.full, p as u64);
                if !self.priv_ok(&c) {
                    c = s.closure(&c);
                    if !each_point(&c, n, |q| self.st[q] != OFF) {
                        // Cannot happen after the existence test; never return an
                        // invalid cover.
                        return false;
                    }
                }
                let c = if clock.tick() { c } else { self.expand(c) };
                self.add(c);
            }
        }
        if s.adjacent_pairs {
            for p in 0..self.st.len() {
                if self.st[p] != ON {
                    continue;
                }
                let mut f = self.nb[p] as u64 & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    if !on_at(&self.on_bits, p | 1 << v) || self.pairs[self.slot(p, v)] > 0 {
                        continue;
                    }
                    let c = Cube::from_words(self.full & !(1 << v), p as u64);
                    let c = if clock.tick() { c } else { self.expand(c) };
                    self.add(c);
                }
            }
        }
        true
    }

    /// Shrinks product `k` to the supercube of what only it holds (then its closure);
    /// drops it when it holds nothing alone.
    fn reduce_one(&mut self, k: usize) -> bool {
        let Some(c) = self.cubes[k] else {
            return false;
        };
        let n = self.n;
        let free = self.full & !c.care_bits();
        let pairs_on = !self.pairs.is_empty();
        let mut sc: Option<Cube> = None;
        let join = |sc: &mut Option<Cube>, x: Cube| {
            *sc = Some(match *sc {
                Some(y) => y.supercube(&x),
                None => x,
            });
        };
        each_point(&c, n, |p| {
            if self.st[p] != ON {
                return true;
            }
            let pt = Cube::from_words(self.full, p as u64);
            if self.cnt[p] == 1 {
                join(&mut sc, pt);
            }
            if pairs_on {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    let x = if on_at(&self.on_bits, p | 1 << v) {
                        self.pairs[self.slot(p, v)]
                    } else {
                        0
                    };
                    // (A saturated count may hide a last holder: kept, like one.)
                    if x == 1 || x == u8::MAX {
                        join(&mut sc, pt.with_literal(v, None));
                    }
                }
            }
            true
        });
        for (r, &h) in self.s.required.iter().zip(&self.req) {
            if h == 1 && c.contains(&r.cube) {
                join(&mut sc, r.cube);
            }
        }
        let x = sc.map(|x| self.s.closure(&x));
        if x == Some(c) {
            return false;
        }
        self.paint(&c, false);
        if let Some(x) = x {
            self.paint(&x, true);
        }
        self.cubes[k] = x;
        true
    }

    /// Expands product `k` again (it is taken out while it grows).
    fn expand_one(&mut self, k: usize) {
        let Some(c) = self.cubes[k] else { return };
        self.paint(&c, false);
        let e = self.expand(c);
        self.paint(&e, true);
        self.cubes[k] = Some(e);
    }

    fn compact(&mut self) {
        self.cubes.retain(|c| c.is_some());
    }
}

/// The positions of the products in `cubes` (removed ones skipped when `most_first`,
/// kept in the other order as literal count 0), ordered by literal count (most first
/// when `most_first`, else fewest first), ties by position: the order of a sort on
/// `(literals, position)`, by counting (literal counts are at most 64).
fn by_literals(cubes: &[Option<Cube>], most_first: bool) -> Vec<usize> {
    order_by(
        cubes,
        |c| match c {
            Some(c) => Some(c.literal_count()),
            None if most_first => None,
            None => Some(0),
        },
        most_first,
    )
}

/// [`by_literals`] of a list of products (none removed).
fn by_literals_of(cubes: &[Cube], most_first: bool) -> Vec<usize> {
    order_by(cubes, |c| Some(c.literal_count()), most_first)
}

/// The positions of `items` with a literal count (`lits`; `None` leaves one out), by
/// count (most first when `most_first`), ties by position.
fn order_by<T>(items: &[T], lits: impl Fn(&T) -> Option<usize>, most_first: bool) -> Vec<usize> {
    let mut start = [0usize; 66];
    let key = |l: usize| if most_first { 64 - l } else { l };
    for l in items.iter().filter_map(&lits) {
        start[key(l) + 1] += 1;
    }
    for i in 1..start.len() {
        start[i] += start[i - 1];
    }
    let mut order = vec![0usize; start[65]];
    for (k, l) in items
        .iter()
        .enumerate()
        .filter_map(|(k, c)| lits(c).map(|l| (k, l)))
    {
        let b = &mut start[key(l)];
        order[*b] = k;
        *b += 1;
    }
    order
}

/// Whether point `q` is in the on-set, from the on-set bitset (an eighth of the state
/// table, read at scattered points by the paint, removal and pair loops).
#[inline]
fn on_at(on_bits: &[u64], q: usize) -> bool {
    on_bits[q >> 6] >> (q & 63) & 1 == 1
}

/// [`Engine::slot`] from the on-set bitset and its counts per word.
#[inline]
fn pair_slot(on_bits: &[u64], on_below: &[u32], n: usize, p: usize, v: usize) -> usize {
    let w = p >> 6;
    let rank = on_below[w] as usize + (on_bits[w] & ((1u64 << (p & 63)) - 1)).count_ones() as usize;
    rank * n + v
}

/// The weight of an on-set point held by no product, from its neighbour mask `m` (see
/// [`Engine::weight`]).
#[inline]
fn fresh_weight(n: usize, m: u32) -> u8 {
    (2 + n as u32 - m.count_ones()) as u8
}

/// The heuristic cover of one output over its point table; `None` only if a seed point
/// has no legal product (which the existence test rules out).
pub(crate) fn cover(s: &OutputSpec, t: &Table, clock: &Clock) -> Option<Vec<Cube>> {
    let mut e = Engine::new(s, t);
    if !e.first_cover(clock) {
        return None;
    }
    e.irredundant(clock);
    e.compact();
    let mut best = e.cubes();
    let mut best_cost = e.cost();
    // Above 16 variables one round (none in static mode, where it gains a few tenths
    // of a percent at twice the time); small spaces get more.
    let rounds = if t.nvars() <= 16 {
        SMALL_ROUNDS
    } else if s.adjacent_pairs {
        0
    } else {
        ROUNDS
    };
    for _ in 0..rounds {
        if clock.now() {
            break;
        }
        let order = by_literals(&e.cubes, false);
        // A product reduce left alone is still maximal: only the shrunk ones grow again.
        let mut shrunk = vec![false; e.cubes.len()];
        for &k in &order {
            if clock.tick() {
                break;
            }
            shrunk[k] = e.reduce_one(k);
        }
        for &k in order.iter().rev() {
            if clock.tick() {
                break;
            }
            if shrunk[k] {
                e.expand_one(k);
            }
        }
        e.irredundant(clock);
        e.compact();
        let c = e.cost();
        if c < best_cost {
            best_cost = c;
            best = e.cubes();
        } else {
            break;
        }
    }
    Some(best)
}

/// Makes `cover` irredundant for `s` over its point table (used after sharing).
pub(crate) fn irredundant(s: &OutputSpec, t: &Table, cover: &[Cube], clock: &Clock) -> Vec<Cube> {
    let mut e = Engine::new(s, t);
    for &c in cover {
        e.add(c);
    }
    e.irredundant(clock);
    e.cubes()
}

/// The lower bound of the module docs: a greedy set of on-set points pairwise in no
/// common legal product. Candidates: for each product of `cover` (smallest first) a
/// point only it holds, then the points whose `N` has at most [`BOUND_DIM`] free
/// variables (fewest first). Two points are compatible when each lies in the other's
/// `N` and the closure of their supercube holds no off-set point (every legal product
/// holding both holds that closure). A candidate's chosen compatible partners lie in its
/// `N`, which is enumerated when it has at most [`ENUM_DIM`] free variables; otherwise
/// the chosen list is scanned while it is short, and the candidate is skipped beyond.
pub(crate) fn lower_bound(s: &OutputSpec, t: &Table, cover: &[Cube], clock: &Clock) -> usize {
    let n = t.nvars();
    let st = t.states();
    let free_of = t.neighbours();
    use rayon::prelude::*;
    // The cover's uniquely held points and the small-`N` points do not depend on each
    // other: built side by side (each in a fixed order, whatever the threads).
    let unique = || {
        let mut cnt = vec![0u8; st.len()];
        for c in cover {
            each_point(c, n, |p| {
                if st[p] == ON {
                    cnt[p] = cnt[p].saturating_add(1);
                }
                true
            });
        }
        let by_size = by_literals_of(cover, true);
        by_size
            .par_iter()
            .with_min_len(4096)
            .filter_map(|&k| {
                let mut found = None;
                each_point(&cover[k], n, |p| {
                    if st[p] == ON && cnt[p] == 1 {
                        found = Some(p as u32);
                        false
                    } else {
                        true
                    }
                });
                found
            })
            .collect::<Vec<u32>>()
    };
    let small = || {
        let mut buckets: Vec<Vec<u32>> = vec![Vec::new(); BOUND_DIM as usize + 1];
        for p in 0..st.len() {
            let f = free_of[p].count_ones();
            if st[p] == ON && f <= BOUND_DIM {
                buckets[f as usize].push(p as u32);
            }
        }
        buckets.into_iter().flatten().collect::<Vec<u32>>()
    };
    let (mut cands, small) = rayon::join(unique, small);
    // Two greedy orders (each set is a bound; the larger counts): the points with the
    // smallest N first, and the cover's uniquely held points first. Above 16 variables
    // only the second (measured: the better one there, 62 096 against 54 383 points at
    // 20 variables, and the time is short).
    let a = if n <= 16 {
        greedy_points(s, t, &small, clock)
    } else {
        0
    };
    cands.extend_from_slice(&small);
    let b = greedy_points(s, t, &cands, clock);
    let k = a.max(b);
    if k == 0 && st.contains(&ON) {
        return 1;
    }
    k
}

/// The greedy set of [`lower_bound`] over candidates `cands`, in order: its size.
fn greedy_points(s: &OutputSpec, t: &Table, cands: &[u32], clock: &Clock) -> usize {
    let n = t.nvars();
    let st = t.states();
    let full = mask(n);
    let free_of = t.neighbours();
    // The members as a bitset (an eighth of a byte table: the enumerations below test
    // it at scattered points).
    let mut chosen = vec![0u64; st.len().div_ceil(64)];
    let is = |b: &[u64], q: usize| b[q >> 6] >> (q & 63) & 1 == 1;
    let mut list: Vec<usize> = Vec::new();
    for &p in cands {
        let p = p as usize;
        if is(&chosen, p) {
            continue;
        }
        if clock.tick() {
            break;
        }
        let fp = free_of[p] as u64;
        let compatible = |q: usize| -> bool {
            let d = (p ^ q) as u64;
            if d & !(free_of[q] as u64) != 0 || d & !fp != 0 {
                return false;
            }
            let sc = s.closure(&Cube::from_words(full & !d, p as u64));
            t.off_witness(&sc).is_none()
        };
        let clash = if fp.count_ones() <= ENUM_DIM {
            let np = Cube::from_words(full & !fp, p as u64);
            !each_point(&np, n, |q| !(is(&chosen, q) && compatible(q)))
        } else if list.len() <= SCAN_MAX {
            list.iter().any(|&q| compatible(q))
        } else {
            continue;
        };
        if !clash {
            chosen[p >> 6] |= 1 << (p & 63);
            list.push(p);
        }
    }
    list.len()
}
