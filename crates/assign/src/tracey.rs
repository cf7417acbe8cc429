//! Tracey's partition method: exact minimum width, and a fast heuristic.
//!
//! Reference: J. H. Tracey, "Internal state assignments for asynchronous sequential
//! machines", IEEE Trans. Electronic Computers EC-15(4), 1966; the steps follow
//! methods.md §4.2.
//!
//! **Exact** ([`Method::Tracey`](crate::Method::Tracey)): the minimum number of variables is the fewest compatible sets
//! of required dichotomies whose merged dichotomies cover every required one. Every
//! compatible set extends to a maximal compatible, so this equals the minimum unate cover
//! by maximal compatibles of §4.2 step 5; instead of listing the (possibly millions of)
//! maximal compatibles first, the branch and bound grows the merged compatibles while it
//! assigns each uncovered dichotomy to a variable (the dichotomy with the fewest feasible
//! variables first, as in DSATUR colouring). Symmetry breaking: variables are
//! interchangeable and so are their polarities, so a clique of pairwise incompatible
//! dichotomies is pre-placed one per variable, and a dichotomy opening a new variable
//! takes one orientation only; a branch ends when dichotomies that fit no open variable
//! include more pairwise incompatible ones than variables are left to open. The
//! heuristic's width is first improved downward (half the budget), then widths are tried
//! upward from the proven lower bound, so each width proven infeasible raises the bound;
//! when the budget stops the search the best code found is returned with
//! `optimal = false` and that bound.
//!
//! The branch and bound gets at most `BB_NODES` (20 000) nodes (it settles small tables at once);
//! if it has not proven its width, a local search (module `local`) looks for narrower
//! codes below the incumbent (walking from the incumbent's codes and from random ones),
//! then widths upward from the bound are decided by the local search and a SAT decision
//! procedure for one width (module `sat`: two solvers on the dichotomies at once, one
//! tuned to find codes, one to refute), each infeasible width raising the bound.
//!
//! **Heuristic** ([`Method::TraceyFast`](crate::Method::TraceyFast)): first-fit packing of the dichotomies into variables, in a
//! few deterministic orders, keeping the narrowest, then a descent (`descend`): each
//! narrower width is tried by walks from random codes with a fixed amount of work, until
//! a width is missed; its gap to the lower bound is reported, the bound raised on small
//! tables by a short SAT run (`raise_bound`). Weakness: neither the packing nor the
//! walks prove anything, so the width may be above the optimum (on fifteen random 24 x 16
//! tables it gave the proven optimum wherever one is known, in 0.26-0.40 s; on 64 x 16
//! it gives 14 where first-fit alone gave 22).
//!
//! **Lower bound**: `max(ceil(log2 n), c)` where `c` is the size of a clique of pairwise
//! incompatible dichotomies (each needs its own variable), raised by every width the exact
//! search proves infeasible.

use crate::dichotomy::{ones, Dichotomy};
use crate::problem::Problem;
use std::time::Instant;

/// ceil(log2 n), at least 1.
pub(crate) fn log2_bound(n: usize) -> usize {
    let mut k = 0;
    while (1usize << k) < n {
        k += 1;
    }
    k.max(1)
}

/// A greedy clique of pairwise incompatible (in every orientation) dichotomies: a proof
/// that at least its size many variables are needed.
pub(crate) fn incompatible_clique(ds: &[Dichotomy], starts: usize) -> Vec<usize> {
    let m = ds.len();
    if m == 0 {
        return Vec::new();
    }
    // Degrees on a sample when large (the bound stays a proof: any clique is).
    let sample: Vec<usize> = if m > 3000 {
        (0..m).step_by(m / 3000 + 1).collect()
    } else {
        (0..m).collect()
    };
    let mut deg: Vec<(usize, usize)> = sample
        .iter()
        .map(|&i| {
            (
                sample
                    .iter()
                    .filter(|&&j| !ds[i].compatible_unordered(ds[j]))
                    .count(),
                i,
            )
        })
        .collect();
    deg.sort_unstable_by(|a, b| b.cmp(a));
    let mut best = Vec::new();
    for &(_, start) in deg.iter().take(starts.max(1)) {
        let mut clique = vec![start];
        for &(_, j) in &deg {
            if clique
                .iter()
                .all(|&c| c != j && !ds[c].compatible_unordered(ds[j]))
            {
                clique.push(j);
            }
        }
        if clique.len() > best.len() {
            best = clique;
        }
    }
    best
}

/// Merged dichotomies, one per state variable.
pub(crate) type Classes = Vec<Dichotomy>;

fn covered(d: Dichotomy, cls: &[Dichotomy]) -> bool {
    cls.iter().any(|c| c.covers(d))
}

/// First-fit: put each dichotomy into the first variable it fits (either orientation).
fn first_fit(ds: &[Dichotomy], order: &[usize]) -> Classes {
    let mut cls: Classes = Vec::new();
    for &i in order {
        let d = ds[i];
        if covered(d, &cls) {
            continue;
        }
        // Prefer the variable that needs the fewest new states.
        let mut best: Option<(u32, usize, bool)> = None;
        for (j, c) in cls.iter().enumerate() {
            for flip in [false, true] {
                let o = if flip { d.swapped() } else { d };
                if c.compatible(o) {
                    let added = (o.left & !c.left).count_ones() + (o.right & !c.right).count_ones();
                    if best.map_or(true, |b| added < b.0) {
                        best = Some((added, j, flip));
                    }
                }
            }
        }
        match best {
            Some((_, j, flip)) => {
                let o = if flip { d.swapped() } else { d };
                cls[j].left |= o.left;
                cls[j].right |= o.right;
            }
            None => cls.push(d),
        }
    }
    cls
}

/// A small deterministic generator (SplitMix64, common practice, no source) for the
/// heuristic's orders and the local search's moves.
pub(crate) struct SplitMix(pub(crate) u64);
impl SplitMix {
    pub(crate) fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// A number in `0..n` (`0` when `n` is 0).
    pub(crate) fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// The heuristic: first-fit in `passes` orders (by size, then shuffled), the narrowest.
pub(crate) fn fast(ds: &[Dichotomy], passes: usize) -> Classes {
    let m = ds.len();
    let mut order: Vec<usize> = (0..m).collect();
    order.sort_by_key(|&i| std::cmp::Reverse((ds[i].left | ds[i].right).count_ones()));
    let mut best = first_fit(ds, &order);
    let mut rng = SplitMix(0x005e_ed0f_a551);
    for _ in 1..passes {
        for i in (1..m).rev() {
            let j = (rng.next() % (i as u64 + 1)) as usize;
            order.swap(i, j);
        }
        let c = first_fit(ds, &order);
        if c.len() < best.len() {
            best = c;
        }
    }
    best
}

/// The work units (see [`crate::sat::LOCAL_EVALS_PER_UNIT`]) of the heuristic's descent
/// ([`descend`]) in all: about 0.3 s of two threads on the machine it was measured on.
pub(crate) const DESCENT_WORK: u64 = 20_000;

/// The most work units of the descent's walks at one width (the width the walks miss,
/// where the descent stops, spends all of it); smaller tables get
/// [`DESCENT_PER_DICHOTOMY`] units per required dichotomy, at least 500.
pub(crate) const DESCENT_PER_WIDTH: u64 = 8_000;

/// The descent's work units per width and required dichotomy, below
/// [`DESCENT_PER_WIDTH`]: a walk's steps grow with the table, so a small table needs
/// (and gets) less.
pub(crate) const DESCENT_PER_DICHOTOMY: u64 = 16;

/// The heuristic's second stage: from the first-fit classes `best`, widths `w - 1, w - 2,
/// ...` down to `lb` are each tried by two walks from random codes
/// ([`crate::sat::random_walks`], at most [`DESCENT_PER_WIDTH`] units per width,
/// [`DESCENT_WORK`] in all); the first width the walks miss ends the descent. A heuristic
/// (the walks never prove a width infeasible); the result is the same on every run, the
/// deadline being only the safety net. On a random 64 x 16 table the walks from random
/// codes found widths 16, 15 and 14 in 0.02, 0.07 and 1.2 s where first-fit gave 22.
pub(crate) fn descend(
    n: usize,
    ds: &[Dichotomy],
    mut best: Classes,
    lb: usize,
    deadline: Option<Instant>,
) -> Classes {
    let mut work = crate::sat::Work::new(DESCENT_WORK, deadline);
    let per_width = (DESCENT_PER_DICHOTOMY * ds.len() as u64).clamp(500, DESCENT_PER_WIDTH);
    while best.len() > lb.max(1) && !work.spent() {
        let k = best.len() - 1;
        let room = work.left.min(per_width);
        match crate::sat::random_walks(n, ds, k, &mut work, room, k as u64) {
            Some(cls) => best = cls,
            None => break,
        }
    }
    best
}

/// The SAT conflicts the heuristic spends on raising its lower bound ([`raise_bound`]).
pub(crate) const BOUND_WORK: u64 = 4_000;

/// The most required dichotomies for which [`raise_bound`] tries at all: above it the
/// conflicts grow dear (64 x 4, 2 038 dichotomies: 0.5 s for no gain) and the widths
/// to refute lie beyond [`BOUND_WORK`].
pub(crate) const BOUND_MAX_DICHOTOMIES: usize = 1_000;

/// The heuristic's lower bound, raised: widths `lb, lb + 1, ...` below the width of
/// `best` are decided by one SAT solver (the refuting option set on the lexicographic
/// encoding, [`crate::sat::decide`]) with [`BOUND_WORK`] conflicts in all; each width
/// proven infeasible raises the bound, a code found at a width is taken (it is then
/// optimal), and the first width left undecided ends it. Conflicts, not time, are
/// counted, so the result is the same on every run (the deadline is the safety net).
/// Tables with more than [`BOUND_MAX_DICHOTOMIES`] dichotomies keep their bound.
pub(crate) fn raise_bound(
    n: usize,
    ds: &[Dichotomy],
    mut best: Classes,
    mut lb: usize,
    deadline: Option<Instant>,
) -> (Classes, usize) {
    use crate::sat::{decide, Answer, Sym, Tuning, Work};
    if ds.len() > BOUND_MAX_DICHOTOMIES {
        return (best, lb);
    }
    let mut work = Work::new(BOUND_WORK, deadline);
    while lb < best.len() && !work.spent() {
        match decide(n, ds, &[], lb, &mut work, 1, Sym::Lex, Tuning::Refute) {
            Answer::Infeasible => lb += 1,
            Answer::Found(mut found) => {
                if let Some(cls) = found.pop() {
                    best = cls;
                }
                break;
            }
            Answer::Stopped => break,
        }
    }
    (best, lb)
}

/// Why an exact search at one width ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Outcome {
    /// At least one cover was found.
    Found,
    /// No cover of this width exists (proof).
    Infeasible,
    /// The budget ran out first.
    Stopped,
}

/// The branch and bound for one width.
pub(crate) struct Search<'a> {
    ds: &'a [Dichotomy],
    width: usize,
    cls: Classes,
    fixed: usize,
    lists: Vec<Vec<u32>>,
    pub(crate) nodes: u64,
    node_limit: u64,
    deadline: Option<Instant>,
    stopped: bool,
    /// Whether the deadline (not the node limit) stopped the search.
    pub(crate) clock_fired: bool,
    want: usize,
    pub(crate) found: Vec<Classes>,
}

impl<'a> Search<'a> {
    pub(crate) fn new(
        ds: &'a [Dichotomy],
        clique: &[usize],
        width: usize,
        node_limit: u64,
        deadline: Option<Instant>,
        want: usize,
    ) -> Search<'a> {
        let cls: Classes = clique.iter().map(|&i| ds[i]).collect();
        Search {
            ds,
            width,
            fixed: cls.len(),
            cls,
            lists: Vec::new(),
            nodes: 0,
            node_limit,
            deadline,
            stopped: false,
            clock_fired: false,
            want: want.max(1),
            found: Vec::new(),
        }
    }

    pub(crate) fn run(&mut self) -> Outcome {
        if self.fixed > self.width {
            return Outcome::Infeasible;
        }
        let _ = self.fixed;
        let all: Vec<u32> = (0..self.ds.len() as u32).collect();
        self.lists.push(all);
        self.node(0);
        if !self.found.is_empty() {
            Outcome::Found
        } else if self.stopped {
            Outcome::Stopped
        } else {
            Outcome::Infeasible
        }
    }

    /// Returns true to stop the whole search.
    fn node(&mut self, depth: usize) -> bool {
        self.nodes += 1;
        if self.nodes >= self.node_limit {
            self.stopped = true;
            return true;
        }
        if self.nodes % 512 == 0 {
            if let Some(d) = self.deadline {
                if Instant::now() >= d {
                    self.stopped = true;
                    self.clock_fired = true;
                    return true;
                }
            }
        }
        // Filter the parent's pending list and pick the most constrained dichotomy.
        let mut list = std::mem::take(&mut self.lists[depth]);
        let mut next: Vec<u32> = if self.lists.len() > depth + 1 {
            std::mem::take(&mut self.lists[depth + 1])
        } else {
            Vec::new()
        };
        next.clear();
        let can_open = self.cls.len() < self.width;
        let mut best: Option<(usize, u32)> = None;
        let mut dead = false;
        let mut orphans: Vec<Dichotomy> = Vec::new();
        for &i in &list {
            let d = self.ds[i as usize];
            let mut opts = 0usize;
            let mut is_cov = false;
            for c in &self.cls {
                if c.covers(d) {
                    is_cov = true;
                    break;
                }
                opts += usize::from(c.compatible(d)) + usize::from(c.compatible(d.swapped()));
            }
            if is_cov {
                continue;
            }
            if opts == 0 && orphans.len() < 48 {
                orphans.push(d);
            }
            opts += usize::from(can_open);
            next.push(i);
            if opts == 0 {
                dead = true;
                break;
            }
            // Fewest choices first; among equals the dichotomy with more states.
            let size = (d.left | d.right).count_ones() as usize;
            let key = opts * 8 + (7 - size.min(7));
            if best.map_or(true, |b| key < b.0) {
                best = Some((key, i));
            }
        }
        std::mem::swap(&mut list, &mut self.lists[depth]);
        // Dichotomies that fit no open variable need new ones; pairwise incompatible
        // ones need one each.
        if !dead && orphans.len() > 1 {
            let room = self.width - self.cls.len();
            let mut clique: Vec<Dichotomy> = Vec::new();
            for &o in &orphans {
                if clique.iter().all(|&c| !c.compatible_unordered(o)) {
                    clique.push(o);
                }
            }
            if clique.len() > room {
                dead = true;
            }
        }
        if dead {
            self.put_back(depth, next);
            return false;
        }
        let Some((_, pick)) = best else {
            // Every dichotomy is covered: a solution.
            self.put_back(depth, next);
            self.found.push(self.cls.clone());
            return self.found.len() >= self.want;
        };
        while self.lists.len() <= depth + 1 {
            self.lists.push(Vec::new());
        }
        self.lists[depth + 1] = next;
        let d = self.ds[pick as usize];
        // Existing variables, fewest added states first.
        let mut opts: Vec<(u32, usize, bool)> = Vec::new();
        for (j, c) in self.cls.iter().enumerate() {
            for flip in [false, true] {
                let o = if flip { d.swapped() } else { d };
                if c.compatible(o) {
                    let added = (o.left & !c.left).count_ones() + (o.right & !c.right).count_ones();
                    opts.push((added, j, flip));
                }
            }
        }
        opts.sort_unstable();
        for (_, j, flip) in opts {
            let o = if flip { d.swapped() } else { d };
            let old = self.cls[j];
            self.cls[j].left |= o.left;
            self.cls[j].right |= o.right;
            let stop = self.node(depth + 1);
            self.cls[j] = old;
            if stop {
                return true;
            }
        }
        if can_open {
            self.cls.push(d);
            let stop = self.node(depth + 1);
            self.cls.pop();
            if stop {
                return true;
            }
        }
        false
    }

    fn put_back(&mut self, depth: usize, v: Vec<u32>) {
        while self.lists.len() <= depth + 1 {
            self.lists.push(Vec::new());
        }
        self.lists[depth + 1] = v;
    }
}

/// Fills the free states of each variable (in neither side) to keep transitions short:
/// each free bit takes the value most of its transition partners have (0 on a tie).
/// Returns one code per state, `y1` = first class = most significant bit.
pub(crate) fn fill(p: &Problem, cls: &[Dichotomy]) -> Vec<u64> {
    fill_with(p, cls, Fill::Majority)
}

/// How free bits are filled.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Fill {
    /// The value most transition partners have (0 on a tie).
    Majority,
    /// Always 0.
    Zero,
    /// Always 1.
    One,
}

/// [`fill`] with a chosen rule (the other rules give alternative codes).
pub(crate) fn fill_with(p: &Problem, cls: &[Dichotomy], rule: Fill) -> Vec<u64> {
    let n = p.num_states;
    let k = cls.len();
    let edges = p.transition_edges();
    let mut nbr: Vec<Vec<usize>> = vec![Vec::new(); n];
    for &(a, b) in &edges {
        nbr[a as usize].push(b as usize);
        nbr[b as usize].push(a as usize);
    }
    let mut codes = vec![0u64; n];
    for (j, c) in cls.iter().enumerate() {
        let mask = 1u64 << (k - 1 - j);
        let mut val: Vec<Option<bool>> = vec![None; n];
        for s in ones(c.left) {
            val[s] = Some(false);
        }
        for s in ones(c.right) {
            val[s] = Some(true);
        }
        for s in 0..n {
            if val[s].is_none() {
                let (mut z, mut o) = (0, 0);
                for &t in &nbr[s] {
                    match val[t] {
                        Some(true) => o += 1,
                        Some(false) => z += 1,
                        None => {}
                    }
                }
                val[s] = Some(match rule {
                    Fill::Majority => o > z,
                    Fill::Zero => false,
                    Fill::One => true,
                });
            }
            if val[s] == Some(true) {
                codes[s] |= mask;
            }
        }
    }
    codes
}

/// The exact result: best classes found, proven lower bound, whether proven optimal, and
/// alternative covers of the same width.
pub(crate) struct ExactResult {
    pub(crate) classes: Vec<Classes>,
    pub(crate) lower_bound: usize,
    pub(crate) optimal: bool,
    pub(crate) nodes: u64,
    pub(crate) clique: usize,
    /// Work units (conflicts, see [`crate::sat::Work`]) the SAT engine spent.
    pub(crate) sat_work: u64,
    /// Whether the wall-clock safety net, not a work limit, stopped a search.
    pub(crate) clock_fired: bool,
}

/// Nodes the branch and bound gets before the SAT engine takes over: it settles small
/// tables faster than building SAT instances, and is deterministic (node-limited).
pub(crate) const BB_NODES: u64 = 20_000;

/// The deterministic limits of one exact run: branch-and-bound nodes, SAT work (learned
/// clauses, see [`crate::sat::Work`]), and the wall-clock safety net.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Limits {
    pub(crate) nodes: u64,
    pub(crate) sat_work: u64,
    pub(crate) deadline: Option<Instant>,
}

impl Limits {
    /// No limit (tests that run the engines to the end).
    #[cfg(test)]
    pub(crate) fn unlimited() -> Limits {
        Limits {
            nodes: u64::MAX,
            sat_work: u64::MAX,
            deadline: None,
        }
    }
}

/// Exact minimum width (see the module doc): the branch and bound with at most
/// [`BB_NODES`] nodes, then, if it did not prove its width, the SAT engine.
pub(crate) fn exact(p: &Problem, ds: &[Dichotomy], limits: Limits, want: usize) -> ExactResult {
    let bb_limits = Limits {
        nodes: limits.nodes.min(BB_NODES),
        ..limits
    };
    let r = exact_bb(p, ds, bb_limits, want);
    if r.optimal || r.clock_fired {
        return r;
    }
    let lb = r.lower_bound;
    let mut work = crate::sat::Work::new(limits.sat_work, limits.deadline);
    let mut out = exact_sat(p, ds, &mut work, want, r.classes, lb, r.nodes);
    out.clock_fired |= r.clock_fired;
    out
}

/// The SAT engine (see [`crate::sat`]) with the local search ([`crate::local`]): first,
/// from the incumbent `best` (at least one cover), widths `ub - 1, ub - 2, ...` are
/// searched for by the local search alone (from the incumbent's codes and then from
/// random codes, at most an eighth of the allowance in all, per width and start four
/// first allowances or, for the last open width, a quarter of one) while it finds codes;
/// then widths `lb, lb + 1, ...` upward are decided ([`crate::sat::decide_pair`]: local search, then a solver tuned to
/// find codes and one tuned to refute, at once, and for a width that resists, its cubes
/// shared by two solvers), each proven infeasible raising the
/// bound, until one is feasible (it is then optimal) or the allowance stops a solve.
pub(crate) fn exact_sat(
    p: &Problem,
    ds: &[Dichotomy],
    work: &mut crate::sat::Work,
    want: usize,
    mut best: Vec<Classes>,
    lower_bound: usize,
    nodes: u64,
) -> ExactResult {
    use crate::sat::{decide, decide_pair, local_search, Answer, Sym, Tuning};
    let clique = incompatible_clique(ds, ds.len().min(512));
    let n = p.num_states;
    let mut lb = lower_bound.max(log2_bound(n)).max(clique.len());
    let mut ub = best[0].len().max(1);
    let start_of = |cls: &Classes| fill(p, cls);
    // Downward, local search only.
    let mut down = work.part(if work.left == u64::MAX {
        u64::MAX
    } else {
        work.left / 8
    });
    while ub > lb && !down.spent() {
        let start = start_of(&best[0]);
        // Each width at most a quarter of a first allowance when it is the last open
        // one (the upward phase tries it again), four first allowances otherwise
        // (bounded also when the work is not), from the narrowed incumbent and then the
        // same again from random codes: the local search mostly finds codes at once or
        // not at all, and the two starts find different ones.
        let first = crate::sat::FIRST_ALLOWANCE;
        let room = down
            .left
            .min(if ub - 1 > lb { 4 * first } else { first / 4 });
        let found = local_search(n, ds, ub - 1, &start, &mut down, room, 0).or_else(|| {
            let room = down.left.min(room);
            crate::sat::random_walks(n, ds, ub - 1, &mut down, room, 0)
        });
        match found {
            Some(cls) => {
                ub -= 1;
                best = vec![cls];
            }
            None => break,
        }
    }
    work.absorb(&down);
    // Upward, decided.
    while lb < ub && !work.spent() {
        let start = start_of(&best[0]);
        match decide_pair(n, ds, &clique, lb, work, want, &start) {
            Answer::Found(f) => {
                ub = lb;
                best = f;
            }
            Answer::Infeasible => lb += 1,
            Answer::Stopped => break,
        }
    }
    if lb >= ub && want > best.len() && !work.spent() {
        // Alternatives at the optimal width.
        let mut part = work.part(work.left / 4);
        let alt = decide(
            n,
            ds,
            &clique,
            ub,
            &mut part,
            want,
            Sym::Clique,
            Tuning::Find,
        );
        if let Answer::Found(f) = alt {
            if f.len() > best.len() {
                best = f;
            }
        }
        work.absorb(&part);
    }
    ExactResult {
        classes: best,
        optimal: lb >= ub,
        lower_bound: lb.min(ub),
        nodes,
        clique: clique.len(),
        sat_work: work.used,
        clock_fired: work.clock_fired,
    }
}

/// Exact minimum width by the branch and bound alone. First the heuristic's width is
/// improved downward (each width found feasible becomes the new best) for up to half the
/// node limit; then widths are tried upward from the lower bound, each proven infeasible
/// raising it.
pub(crate) fn exact_bb(p: &Problem, ds: &[Dichotomy], limits: Limits, want: usize) -> ExactResult {
    let node_limit = limits.nodes;
    let deadline = limits.deadline;
    let mut best: Vec<Classes> = vec![fast(ds, 16)];
    let clique = incompatible_clique(ds, 8);
    let mut lb = log2_bound(p.num_states).max(clique.len());
    let mut ub = best[0].len().max(1);
    let mut nodes = 0u64;
    let mut clock_fired = false;
    let result = |classes, lb: usize, ub: usize, nodes, clock_fired| ExactResult {
        classes,
        optimal: lb >= ub,
        lower_bound: lb.min(ub),
        nodes,
        clique: clique.len(),
        sat_work: 0,
        clock_fired,
    };
    // Downward: improve the upper bound.
    while ub > lb {
        let k = ub - 1;
        let mut s = Search::new(
            ds,
            &clique,
            k,
            (node_limit.saturating_sub(nodes)) / 2,
            deadline,
            1,
        );
        let out = s.run();
        nodes += s.nodes;
        clock_fired |= s.clock_fired;
        match out {
            Outcome::Found => {
                ub = k;
                best = s.found;
            }
            Outcome::Infeasible => {
                lb = ub;
            }
            Outcome::Stopped => break,
        }
    }
    // Upward: prove the lower bound.
    let mut k = lb;
    while k < ub && !clock_fired {
        let mut s = Search::new(
            ds,
            &clique,
            k,
            node_limit.saturating_sub(nodes),
            deadline,
            1,
        );
        let out = s.run();
        nodes += s.nodes;
        clock_fired |= s.clock_fired;
        match out {
            Outcome::Found => {
                // Only when the downward phase stopped early: k is the optimum.
                best = s.found;
                lb = k;
                ub = k;
            }
            Outcome::Infeasible => {
                lb = k + 1;
                k += 1;
            }
            Outcome::Stopped => return result(best, lb, ub, nodes, clock_fired),
        }
    }
    // lb == ub: the best cover is optimal; collect alternatives if asked and not yet done.
    if lb >= ub && want > best.len() && nodes < node_limit && !clock_fired {
        let mut s = Search::new(
            ds,
            &clique,
            ub,
            node_limit.saturating_sub(nodes),
            deadline,
            want,
        );
        if s.run() == Outcome::Found && s.found.len() > best.len() {
            best = s.found;
        }
        nodes += s.nodes;
        clock_fired |= s.clock_fired;
    }
    result(best, lb, ub, nodes, clock_fired)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dichotomy::required_for;

    fn set(states: &[u32]) -> u128 {
        states.iter().fold(0, |a, &s| a | 1u128 << (s - 1))
    }

    #[test]
    fn tracey1_exact() {
        // CHECK TRACEY-1 (methods.md §4.3): minimum 3 variables, unique optimum
        // y1 = (14;235), y2 = (125;34), y3 = (123;45). Source: S. H. Unger, Columbia
        // CS E6831 homework 6 solutions, problem 3.11.
        let p = crate::dichotomy::tests::tracey1();
        let ds = required_for(&p).unwrap();
        let r = exact(
            &p,
            &ds,
            Limits {
                nodes: 1_000_000,
                ..Limits::unlimited()
            },
            10,
        );
        assert!(r.optimal);
        assert_eq!(r.lower_bound, 3);
        let want = [
            Dichotomy {
                left: set(&[1, 4]),
                right: set(&[2, 3, 5]),
            },
            Dichotomy {
                left: set(&[1, 2, 5]),
                right: set(&[3, 4]),
            },
            Dichotomy {
                left: set(&[1, 2, 3]),
                right: set(&[4, 5]),
            },
        ];
        for cls in &r.classes {
            let codes = fill(&p, cls);
            // Each variable, as an unordered partition of all five states.
            let mut parts: Vec<Dichotomy> = (0..3)
                .map(|j| {
                    let ones = (0..5).filter(|&s| codes[s] >> (2 - j) & 1 == 1);
                    let r = ones.fold(0u128, |a, s| a | 1 << s);
                    Dichotomy {
                        left: 0b11111 & !r,
                        right: r,
                    }
                    .normalized()
                })
                .collect();
            parts.sort();
            let mut w: Vec<Dichotomy> = want.iter().map(|d| d.normalized()).collect();
            w.sort();
            assert_eq!(parts, w);
        }
    }

    #[test]
    fn sat_engine_matches_branch_and_bound() {
        // The two exact engines must agree on the minimum width; each cover is rechecked
        // by the independent separation checker after filling.
        let mut compared = 0;
        for seed in 0..40u64 {
            let rows = 5 + (seed % 8) as usize; // 5..=12
            let t = stillpoint_table::testing::random_normal_table(seed + 500, rows, 3);
            let p = Problem::from_table(&t).unwrap();
            let ds = required_for(&p).unwrap();
            let bb = exact_bb(&p, &ds, Limits::unlimited(), 3);
            let mut work = crate::sat::Work::unlimited();
            let sat = exact_sat(&p, &ds, &mut work, 3, vec![fast(&ds, 4)], 0, 0);
            assert!(bb.optimal && sat.optimal, "seed {seed}");
            assert_eq!(bb.lower_bound, sat.lower_bound, "seed {seed}");
            let w = bb.classes[0].len().max(1);
            for cls in sat.classes.iter().chain(&bb.classes) {
                assert_eq!(cls.len().max(1), w, "seed {seed}");
                let mut cls = cls.clone();
                cls.resize(w, Dichotomy { left: 0, right: 0 });
                let codes = crate::Codes::new(w, fill(&p, &cls)).unwrap();
                assert!(crate::separation::check(&t, &codes).is_ok(), "seed {seed}");
            }
            compared += 1;
        }
        assert_eq!(compared, 40);
    }

    #[test]
    fn the_descent_narrows_first_fit_and_stays_race_free() {
        // On random 24 x 16 tables the descent is never wider than first-fit, never below
        // the bound, the same on two runs, and its filled codes pass the independent
        // separation checker.
        let mut narrower = 0;
        for seed in 0..4u64 {
            let t = stillpoint_table::testing::random_normal_table(seed, 24, 4);
            let p = Problem::from_table(&t).unwrap();
            let ds = required_for(&p).unwrap();
            let first = fast(&ds, 12);
            let lb = log2_bound(p.num_states);
            let a = descend(p.num_states, &ds, first.clone(), lb, None);
            let b = descend(p.num_states, &ds, first.clone(), lb, None);
            assert_eq!(a, b, "seed {seed}");
            assert!(a.len() <= first.len() && a.len() >= lb, "seed {seed}");
            narrower += usize::from(a.len() < first.len());
            let codes = crate::Codes::new(a.len(), fill(&p, &a)).unwrap();
            assert!(crate::separation::check(&t, &codes).is_ok(), "seed {seed}");
        }
        assert!(narrower > 0);
    }

    #[test]
    fn the_raised_bound_never_passes_the_optimum() {
        // On small random tables the heuristic's raised bound is at most the optimum of
        // the branch and bound run to the end, and a code it takes is of that width.
        let mut raised = 0;
        for seed in 0..30u64 {
            let rows = 6 + (seed % 7) as usize; // 6..=12
            let t = stillpoint_table::testing::random_normal_table(seed + 900, rows, 3);
            let p = Problem::from_table(&t).unwrap();
            let ds = required_for(&p).unwrap();
            let optimum = exact_bb(&p, &ds, Limits::unlimited(), 1).classes[0].len();
            let first = fast(&ds, 12);
            let lb = log2_bound(p.num_states);
            let (cls, bound) = raise_bound(p.num_states, &ds, first.clone(), lb, None);
            assert!(bound <= optimum && bound >= lb, "seed {seed}");
            assert!(
                cls.len() <= first.len() && cls.len() >= optimum,
                "seed {seed}"
            );
            raised += usize::from(bound > lb);
            let codes = crate::Codes::new(cls.len(), fill(&p, &cls)).unwrap();
            assert!(crate::separation::check(&t, &codes).is_ok(), "seed {seed}");
        }
        assert!(raised > 0);
    }

    #[test]
    fn log2() {
        assert_eq!(
            (
                log2_bound(1),
                log2_bound(2),
                log2_bound(5),
                log2_bound(8),
                log2_bound(9)
            ),
            (1, 1, 3, 3, 4)
        );
    }
}
