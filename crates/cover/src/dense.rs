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
    /// One record of [`Engine::stride`] bytes per on-set point `p`, at `rank(p) *
    /// stride` (`rank` counts the on-set points below `p`, so only on-set points take
    /// room): the products holding `p` (bytes 0..4, little-endian) and, in static mode,
    /// at byte `4 + v` for `v` with bit `v` of `p` clear, the products holding both `p`
    /// and `p | 1 << v`, saturating at 255 (a saturated count is never trusted to allow
    /// a removal). The count is kept whatever `p | 1 << v` is and read only when it is
    /// an on-set point too (an adjacent pair), so painting need not look it up.
    /// Painting a product and testing its removal touch each of its points' counts in
    /// one place.
    rec: Vec<u8>,
    /// The record size: 4, and `4 + n` in static mode.
    stride: usize,
    /// The point bitsets, 64 points a [`Word`].
    words: Vec<Word>,
    /// [`fresh_weight`] of each on-set point, by rank.
    fresh: Vec<u8>,
    /// Products holding each required cube.
    req: Vec<u32>,
    /// The table's neighbour masks ([`Table::neighbours`]).
    nb: &'a [u32],
}

impl<'a> Engine<'a> {
    /// An empty cover of `s` over its point table.
    pub(crate) fn new(s: &'a OutputSpec, t: &'a Table) -> Engine<'a> {
        let n = t.nvars();
        let (st, nb) = (t.states(), t.neighbours());
        // The words and the fresh weights on the thread pool (a word depends on its 64
        // points alone, the weights are collected in order), then the counts below.
        use rayon::prelude::*;
        let mut words: Vec<Word> = st
            .par_chunks(64)
            .with_min_len(256)
            .map(|w| {
                let (mut on, mut not_off) = (0u64, 0u64);
                for (i, &x) in w.iter().enumerate() {
                    on |= u64::from(x == ON) << i;
                    not_off |= u64::from(x != OFF) << i;
                }
                Word {
                    on,
                    held: 0,
                    not_off,
                    below: 0,
                }
            })
            .collect();
        let mut below = 0u32;
        for w in &mut words {
            w.below = below;
            below += w.on.count_ones();
        }
        let fresh: Vec<u8> = words
            .par_iter()
            .enumerate()
            .with_min_len(256)
            .flat_map_iter(|(k, w)| {
                let mut x = w.on;
                std::iter::from_fn(move || {
                    (x != 0).then(|| {
                        let p = k << 6 | x.trailing_zeros() as usize;
                        x &= x - 1;
                        fresh_weight(n, nb[p]) as u8
                    })
                })
            })
            .collect();
        let stride = if s.adjacent_pairs { 4 + n } else { 4 };
        Engine {
            s,
            st,
            n,
            full: mask(n),
            cubes: Vec::new(),
            rec: vec![0; below as usize * stride],
            stride,
            words,
            fresh,
            req: vec![0; s.required.len()],
            nb,
        }
    }

    /// Where the record of on-set point `p` starts in [`Engine::rec`].
    #[inline]
    fn record(&self, p: usize) -> usize {
        rank(&self.words, p) * self.stride
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
        let free = self.full & !c.care_bits();
        let stride = self.stride;
        let (rec, words) = (&mut self.rec, &mut self.words);
        each_point(c, self.n, |p| {
            // Only on-set points are counted (no count of another point is read).
            if !on_at(words, p) {
                return true;
            }
            let r = rank(words, p) * stride;
            let k = count(rec, r);
            let k = if up { k + 1 } else { k - 1 };
            rec[r..r + 4].copy_from_slice(&k.to_le_bytes());
            // Held by one product after a raise, by none after a fall: the bit flips.
            if k == u32::from(up) {
                words[p >> 6].held ^= 1 << (p & 63);
            }
            if stride > 4 {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    let x = &mut rec[r + 4 + v];
                    if *x != u8::MAX {
                        *x = if up { *x + 1 } else { *x - 1 };
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
    /// Read from the point's [`Word`], and only for a point not yet held from the
    /// table of fresh weights.
    #[inline]
    fn weight(&self, p: usize) -> u32 {
        let w = &self.words[p >> 6];
        if !bit(w.on, p) {
            0
        } else if bit(w.held, p) {
            1
        } else {
            self.fresh[rank(&self.words, p)] as u32
        }
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

    /// The literals of `c` that can be raised without meeting the off-set: those in
    /// the neighbour mask of every point of `c`.
    fn raisable(&self, c: &Cube) -> u64 {
        let mut bits = c.care_bits() & self.full;
        each_point(c, self.n, |p| {
            bits &= self.nb[p] as u64;
            bits != 0
        });
        bits
    }

    /// Those of the literals `bits` whose flip from every point of cube `h` leaves the
    /// off-set: with `bits` the raisable literals of a cube but the one raised, and
    /// `h` the half it gained, the raisable literals of the raised cube (read from the
    /// bitset, not the neighbour masks of the new points).
    fn still_raisable(&self, mut bits: u64, h: &Cube) -> u64 {
        each_point(h, self.n, |q| {
            let mut f = bits;
            while f != 0 {
                let u = f.trailing_zeros() as usize;
                f &= f - 1;
                let x = q ^ 1 << u;
                if !bit(self.words[x >> 6].not_off, x) {
                    bits &= !(1 << u);
                }
            }
            bits != 0
        });
        bits
    }

    /// Grows the legal cube `c` to a maximal legal cube, greedily.
    fn expand(&self, c: Cube) -> Cube {
        self.grow(c, self.raisable(&c))
    }

    /// [`Engine::expand`] of `c` given its raisable literals `bits`.
    fn grow(&self, mut c: Cube, mut bits: u64) -> Cube {
        loop {
            // The best raise: its score, the cube, and the half it gains (`None`: a
            // closure, whose raisable literals are recomputed).
            let mut best: Option<(u32, Cube, Option<Cube>)> = None;
            let suspects = if self.s.privileged.is_empty() {
                0
            } else {
                self.priv_suspects(&c)
            };
            let mut left = bits;
            while left != 0 {
                let v = left.trailing_zeros() as usize;
                left &= left - 1;
                let up = c.with_literal(v, None);
                let mut score = 0u32;
                if suspects >> v & 1 == 0 || self.priv_ok(&up) {
                    let half = Cube::from_words(c.care_bits(), c.value_bits() ^ (1 << v));
                    each_point(&half, self.n, |p| {
                        score += self.weight(p);
                        true
                    });
                    if !matches!(best, Some((b, ..)) if b >= score) {
                        best = Some((score, up, Some(half)));
                    }
                } else {
                    let big = self.s.closure(&up);
                    let ok = each_point(&big, self.n, |p| {
                        if !c.contains(&Cube::from_words(self.full, p as u64)) {
                            score += self.weight(p);
                        }
                        self.st[p] != OFF
                    });
                    if ok && !matches!(best, Some((b, ..)) if b >= score) {
                        best = Some((score, big, None));
                    }
                }
            }
            match best {
                Some((_, up, Some(half))) => {
                    // The raised cube is `c` and the half: its raisable literals are
                    // those of `c` but the raised one that the half allows too.
                    bits = self.still_raisable(bits & up.care_bits(), &half);
                    c = up;
                }
                Some((_, big, None)) => {
                    c = big;
                    bits = self.raisable(&c);
                }
                None => return c,
            }
        }
    }

    /// Whether product `k` can go: everything it holds is held by another product.
    fn removable(&self, c: &Cube) -> bool {
        let free = self.full & !c.care_bits();
        let points_ok = each_point(c, self.n, |p| {
            if !on_at(&self.words, p) {
                return true;
            }
            let r = self.record(p);
            if count(&self.rec, r) < 2 {
                return false;
            }
            if self.stride > 4 {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    if on_at(&self.words, p | 1 << v) {
                        let x = self.rec[r + 4 + v];
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
        // (Each point with its neighbour mask, read here in order: a point's raisable
        // literals.)
        let mut buckets: Vec<Vec<(u32, u32)>> = vec![Vec::new(); n + 1];
        for (w, word) in self.words.iter().enumerate() {
            let mut x = word.on & !word.held;
            while x != 0 {
                let p = w << 6 | x.trailing_zeros() as usize;
                x &= x - 1;
                let m = self.nb[p];
                buckets[m.count_ones() as usize].push((p as u32, m));
            }
        }
        for b in &buckets {
            for &(p, m) in b {
                let p = p as usize;
                if bit(self.words[p >> 6].held, p) {
                    continue;
                }
                let mut c = Cube::from_words(self.full, p as u64);
                let mut bits = u64::from(m) & self.full;
                if !self.priv_ok(&c) {
                    c = s.closure(&c);
                    if !each_point(&c, n, |q| self.st[q] != OFF) {
                        // Cannot happen after the existence test; never return an
                        // invalid cover.
                        return false;
                    }
                    bits = self.raisable(&c);
                }
                let c = if clock.tick() { c } else { self.grow(c, bits) };
                self.add(c);
            }
        }
        if s.adjacent_pairs {
            // The on-set points in order: a point's record follows the last one's.
            let mut r = 0;
            for w in 0..self.words.len() {
                let mut x = self.words[w].on;
                while x != 0 {
                    let p = w << 6 | x.trailing_zeros() as usize;
                    x &= x - 1;
                    let m = u64::from(self.nb[p]);
                    let mut f = m & !(p as u64);
                    while f != 0 {
                        let v = f.trailing_zeros() as usize;
                        f &= f - 1;
                        let q = p | 1 << v;
                        if !on_at(&self.words, q) || self.rec[r + 4 + v] > 0 {
                            continue;
                        }
                        // The pair's raisable literals: those in both points' masks.
                        let c = Cube::from_words(self.full & !(1 << v), p as u64);
                        let c = if clock.tick() {
                            c
                        } else {
                            self.grow(c, c.care_bits() & m & u64::from(self.nb[q]))
                        };
                        self.add(c);
                    }
                    r += self.stride;
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
        let free = self.full & !c.care_bits();
        let mut sc: Option<Cube> = None;
        let join = |sc: &mut Option<Cube>, x: Cube| {
            *sc = Some(match *sc {
                Some(y) => y.supercube(&x),
                None => x,
            });
        };
        each_point(&c, self.n, |p| {
            if !on_at(&self.words, p) {
                return true;
            }
            let pt = Cube::from_words(self.full, p as u64);
            let r = self.record(p);
            if count(&self.rec, r) == 1 {
                join(&mut sc, pt);
            }
            if self.stride > 4 {
                let mut f = free & !(p as u64);
                while f != 0 {
                    let v = f.trailing_zeros() as usize;
                    f &= f - 1;
                    let x = if on_at(&self.words, p | 1 << v) {
                        self.rec[r + 4 + v]
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

/// 64 points' words of the bitsets the hot loops read at scattered points, side by
/// side: one cache line tells whether a point is on, held or outside the off-set, and
/// its rank among the on-set points (a bitset is an eighth of the state table).
#[derive(Debug, Clone, Copy)]
struct Word {
    /// The on-set points.
    on: u64,
    /// The on-set points held by some product (kept by [`Engine::paint`]).
    held: u64,
    /// The points outside the off-set.
    not_off: u64,
    /// The on-set points below this word.
    below: u32,
}

/// Whether bit `q` mod 64 of `x` is set (point `q` in its word's bitset `x`).
#[inline]
fn bit(x: u64, q: usize) -> bool {
    x >> (q & 63) & 1 == 1
}

/// Whether point `q` is in the on-set.
#[inline]
fn on_at(words: &[Word], q: usize) -> bool {
    bit(words[q >> 6].on, q)
}

/// The on-set points below `p`.
#[inline]
fn rank(words: &[Word], p: usize) -> usize {
    let w = &words[p >> 6];
    w.below as usize + (w.on & ((1u64 << (p & 63)) - 1)).count_ones() as usize
}

/// The holder count of the record at `r` of [`Engine::rec`].
#[inline]
fn count(rec: &[u8], r: usize) -> u32 {
    let mut b = [0u8; 4];
    b.copy_from_slice(&rec[r..r + 4]);
    u32::from_le_bytes(b)
}

/// The weight of an on-set point held by no product, from its neighbour mask `m` (see
/// [`Engine::weight`]).
fn fresh_weight(n: usize, m: u32) -> u32 {
    2 + n as u32 - m.count_ones()
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
        // The points held by one product and by more, as two bitsets (small enough to
        // stay in cache while the products are painted in).
        let words = st.len().div_ceil(64);
        let (mut once, mut more) = (vec![0u64; words], vec![0u64; words]);
        for c in cover {
            each_point(c, n, |p| {
                let (w, b) = (p >> 6, 1u64 << (p & 63));
                more[w] |= once[w] & b;
                once[w] |= b;
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
                    if (once[p >> 6] & !more[p >> 6]) >> (p & 63) & 1 == 1 && st[p] == ON {
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
