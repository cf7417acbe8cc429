//! Exact state reduction of incompletely specified flow tables: compatibles and a
//! minimum closed cover.
//!
//! Steps (each in its own module, named for its method):
//! 1. pair chart (module `paull_unger`) with worklist propagation (Paull & Unger 1959);
//! 2. maximal compatibles as maximal cliques (Bron–Kerbosch (module `bron_kerbosch`) with
//!    pivoting, bitsets);
//! 3. prime compatibles (module `grasselli_luccio`) (Grasselli & Luccio 1965, every compatible
//!    tested against all its compatible supersets);
//! 4. a minimum closed cover (module `closed_cover`) by branch and bound, started from the better
//!    of "every maximal compatible" (always closed) and "every row alone", and stopped as
//!    soon as it meets the lower bound: the largest set of pairwise incompatible rows.
//!
//! When the node limit, the compatible count limit or the time budget stops a step, the
//! best closed cover found so far is returned with `optimal == false` and the proven lower
//! bound.

mod bitset;
mod bron_kerbosch;
mod closed_cover;
mod grasselli_luccio;
mod paull_unger;

use crate::error::TableError;
use crate::fundamental::collapse_chains;
use crate::ids::StateId;
use crate::table::{FlowTable, OutBit, Parts};
use bitset::BitSet;
use std::time::{Duration, Instant};

/// Settings of [`reduce`] and [`minimum_closed_cover`].
///
/// ```
/// use std::time::Duration;
/// let cfg = stillpoint_table::ReduceConfig::default().budget(Duration::from_secs(5)).node_limit(100_000);
/// assert_eq!(cfg.budget, Duration::from_secs(5));
/// ```
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ReduceConfig {
    /// Wall-clock budget of the whole search.
    pub budget: Duration,
    /// Limit on search nodes (clique enumeration, prime tests and covering, each).
    pub node_limit: u64,
    /// Limit on the number of compatibles enumerated for the prime test.
    pub max_compatibles: usize,
}

impl Default for ReduceConfig {
    fn default() -> Self {
        ReduceConfig {
            budget: Duration::from_secs(60),
            node_limit: 20_000_000,
            max_compatibles: 200_000,
        }
    }
}

impl ReduceConfig {
    /// Sets the time budget. \[default: 60 s\] \[range: any\]
    pub fn budget(mut self, d: Duration) -> Self {
        self.budget = d;
        self
    }

    /// Sets the node limit of each search phase. \[default: 20 000 000\] \[range: >= 1\]
    pub fn node_limit(mut self, n: u64) -> Self {
        self.node_limit = n.max(1);
        self
    }

    /// Sets the limit on enumerated compatibles. \[default: 200 000\] \[range: >= 1\]
    pub fn max_compatibles(mut self, n: usize) -> Self {
        self.max_compatibles = n.max(1);
        self
    }
}

/// Counts and times of a reduction.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ReduceStats {
    /// Rows before.
    pub states_before: usize,
    /// Rows after.
    pub states_after: usize,
    /// Compatible pairs of rows.
    pub compatible_pairs: usize,
    /// Maximal compatibles (0 if their enumeration was stopped).
    pub maximal_compatibles: usize,
    /// Compatibles enumerated (0 if stopped).
    pub compatibles: usize,
    /// Prime compatibles (0 if stopped).
    pub primes: usize,
    /// Branch-and-bound nodes.
    pub nodes: u64,
    /// Why the search is not proven optimal, when it is not.
    pub stopped_by: Option<String>,
    /// Wall-clock time of the whole reduction.
    pub time: Duration,
}

impl std::fmt::Display for ReduceStats {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "states {} -> {}, compatible pairs {}, maximal compatibles {}, compatibles {}, primes {}, nodes {}, time {:.3} s",
            self.states_before,
            self.states_after,
            self.compatible_pairs,
            self.maximal_compatibles,
            self.compatibles,
            self.primes,
            self.nodes,
            self.time.as_secs_f64()
        )?;
        if let Some(s) = &self.stopped_by {
            write!(f, " (stopped by {s})")?;
        }
        Ok(())
    }
}

/// A closed cover of a table's rows by compatibles: the result of
/// [`minimum_closed_cover`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ClosedCover {
    /// The classes, each a sorted list of rows; together they cover every row.
    pub classes: Vec<Vec<StateId>>,
    /// Whether the number of classes is proven minimum.
    pub optimal: bool,
    /// A proven lower bound on the number of classes of any closed cover.
    pub lower_bound: usize,
    /// Counts and times.
    pub stats: ReduceStats,
}

/// The result of [`reduce`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Reduction {
    /// The reduced table (normal: every unstable entry leads to a stable one).
    pub table: FlowTable,
    /// The original rows of each new row, in new-row order.
    pub classes: Vec<Vec<StateId>>,
    /// For each original row, the new row that represents it (the first class holding it).
    pub class_of: Vec<StateId>,
    /// Whether the number of rows is proven minimum.
    pub optimal: bool,
    /// A proven lower bound on the rows of any reduced table.
    pub lower_bound: usize,
    /// Counts and times.
    pub stats: ReduceStats,
}

fn next_matrix(t: &FlowTable) -> Vec<Vec<Option<usize>>> {
    t.states()
        .map(|s| {
            t.columns()
                .map(|c| t.next(s, c).map(|x| x.index()))
                .collect()
        })
        .collect()
}

fn to_ids(b: &BitSet) -> Vec<StateId> {
    b.iter().map(StateId::from_index).collect()
}

/// Whether `cover` is a closed cover of `t` by output-compatible classes (the check used
/// to accept a candidate; see also [`crate::verify`]).
fn is_closed(next: &[Vec<Option<usize>>], ncols: usize, cover: &[BitSet]) -> bool {
    let n = next.len();
    let mut all = BitSet::new(n);
    for c in cover {
        all.or_with(c);
    }
    all.len() == n
        && cover.iter().all(|c| {
            grasselli_luccio::class_set(next, ncols, c)
                .iter()
                .all(|d| cover.iter().any(|e| d.is_subset(e)))
        })
}

/// A minimum closed cover of the rows of `t` by compatibles, treating `t` as a general
/// incompletely specified machine (no chain collapsing, stable entries not required).
///
/// # Errors
/// None at present; the `Result` leaves room for limits.
///
/// # Complexity
/// Exponential in the worst case; bounded by `cfg`.
///
/// # Example
/// ```
/// use stillpoint_table::{minimum_closed_cover, parse_text, ReduceConfig};
/// // a and b agree wherever both are specified; c conflicts with both on z
/// let t = parse_text("inputs x\noutputs z\n   0      1\na  (a)/0  -/-\nb  -/-    (b)/0\nc  (c)/1  a/-\n")?;
/// let cover = minimum_closed_cover(&t, &ReduceConfig::default())?;
/// assert_eq!(cover.classes.len(), 2);
/// assert!(cover.optimal);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn minimum_closed_cover(t: &FlowTable, cfg: &ReduceConfig) -> Result<ClosedCover, TableError> {
    let start = Instant::now();
    let deadline = start + cfg.budget;
    let n = t.num_states();
    let ncols = t.num_columns();
    let next = next_matrix(t);
    let chart = paull_unger::pair_chart(t);
    let mut stats = ReduceStats {
        states_before: n,
        compatible_pairs: chart.compatible_pairs,
        ..Default::default()
    };
    // lower bound: a clique of pairwise incompatible rows
    let inc: Vec<BitSet> = (0..n)
        .map(|s| {
            let mut b = BitSet::full(n).and_not(&chart.adj[s]);
            b.remove(s);
            b
        })
        .collect();
    let (clique, _) = bron_kerbosch::maximum_clique(&inc, cfg.node_limit.min(2_000_000));
    let mut lower = clique.len().max(1);
    // incumbent: every row alone
    let singles: Vec<BitSet> = (0..n)
        .map(|s| {
            let mut b = BitSet::new(n);
            b.insert(s);
            b
        })
        .collect();
    let mut best: Vec<BitSet> = singles;
    let mut optimal = best.len() <= lower;
    let finish = |best: Vec<BitSet>, optimal: bool, lower: usize, mut stats: ReduceStats| {
        let mut classes: Vec<Vec<StateId>> = best.iter().map(to_ids).collect();
        classes.sort();
        stats.states_after = classes.len();
        stats.time = start.elapsed();
        let lower_bound = if optimal {
            classes.len()
        } else {
            lower.min(classes.len())
        };
        Ok(ClosedCover {
            classes,
            optimal,
            lower_bound,
            stats,
        })
    };
    if optimal {
        return finish(best, true, lower, stats);
    }
    let mut limit = cfg.node_limit;
    let Some(maximal) = bron_kerbosch::maximal_cliques(&chart.adj, &mut limit) else {
        stats.stopped_by = Some("the node limit while listing maximal compatibles".into());
        return finish(best, false, lower, stats);
    };
    stats.maximal_compatibles = maximal.len();
    // incumbent: the maximal compatibles, dropping redundant ones while the cover stays closed
    let mut mc = maximal.clone();
    let mut i = mc.len();
    while i > 0 {
        i -= 1;
        let mut trial = mc.clone();
        trial.remove(i);
        if is_closed(&next, ncols, &trial) {
            mc = trial;
        }
    }
    if mc.len() < best.len() {
        best = mc;
    }
    if best.len() <= lower {
        return finish(best, true, lower, stats);
    }
    let Some(compatibles) = grasselli_luccio::all_compatibles(&maximal, cfg.max_compatibles) else {
        stats.stopped_by = Some(format!("the limit of {} compatibles", cfg.max_compatibles));
        return finish(best, false, lower, stats);
    };
    stats.compatibles = compatibles.len();
    let mut limit = cfg.node_limit;
    let Some(primes) = grasselli_luccio::primes(&chart.adj, &next, ncols, &compatibles, &mut limit)
    else {
        stats.stopped_by = Some("the node limit while testing prime compatibles".into());
        return finish(best, false, lower, stats);
    };
    stats.primes = primes.len();
    if Instant::now() >= deadline {
        stats.stopped_by = Some("the time budget".into());
        return finish(best, false, lower, stats);
    }
    let (sets, gammas): (Vec<BitSet>, Vec<Vec<BitSet>>) = primes.into_iter().unzip();
    let problem = closed_cover::Problem {
        n,
        primes: &sets,
        gammas: &gammas,
    };
    let out =
        closed_cover::minimum_closed_cover(&problem, best.len(), lower, cfg.node_limit, deadline);
    stats.nodes = out.nodes;
    if let Some(b) = out.best {
        best = b.into_iter().map(|i| sets[i].clone()).collect();
    }
    if out.complete {
        optimal = true;
    } else {
        lower = lower.max(out.root_bound);
        optimal = best.len() <= lower;
        if !optimal {
            stats.stopped_by = Some("the node limit or time budget of the covering search".into());
        }
    }
    finish(best, optimal, lower, stats)
}

/// Reduces the rows of a flow table: collapses chains, finds a minimum closed cover
/// ([`minimum_closed_cover`]) and forms one row per class.
///
/// Merge rule (documented in `docs/table.md`): the outputs of a new row in a column are
/// the specified outputs of its members (they agree, being compatible); its next state is
/// a class containing the members' next states, preferring the class itself, then the
/// first class that contains that set and is stable in the column; chains this leaves are
/// followed to their stable end, which still contains the set. The result is a normal
/// table whose every class reproduces every specified behaviour of each of its members;
/// the reset state becomes the first class holding the original reset. A class of one row
/// keeps that row's name; a merged class is named by joining its members' names with `_`
/// (made unique with a numeric suffix if needed).
///
/// # Errors
/// [`TableError::Oscillation`] when a column oscillates (nothing to reduce).
///
/// # Example
/// ```
/// use stillpoint_table::{parse_text, reduce, ReduceConfig};
/// let t = parse_text("inputs x\noutputs z\n   0      1\na  (a)/0  b/-\nb  a/-    (b)/1\nc  (c)/0  b/-\n")?;
/// let r = reduce(&t, &ReduceConfig::default())?;
/// assert_eq!(r.table.num_states(), 1); // a, b and c never disagree
/// assert!(r.table.is_normal());
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn reduce(t: &FlowTable, cfg: &ReduceConfig) -> Result<Reduction, TableError> {
    let normal = collapse_chains(t)?;
    let cover = minimum_closed_cover(&normal, cfg)?;
    form_table(&normal, cover)
}

/// Builds the reduced table of a normal table from a closed cover (the merge rule of
/// [`reduce`]).
fn form_table(t: &FlowTable, cover: ClosedCover) -> Result<Reduction, TableError> {
    let n = t.num_states();
    let nc = t.num_columns();
    let k = t.num_outputs();
    let classes = cover.classes;
    let sets: Vec<BitSet> = classes
        .iter()
        .map(|c| {
            let mut b = BitSet::new(n);
            for s in c {
                b.insert(s.index());
            }
            b
        })
        .collect();
    let implied = |ci: usize, col: usize| -> BitSet {
        let mut d = BitSet::new(n);
        for s in sets[ci].iter() {
            if let Some(x) = t.next(
                StateId::from_index(s),
                crate::ids::ColumnId::from_index(col),
            ) {
                d.insert(x.index());
            }
        }
        d
    };
    let m = sets.len();
    let mut next: Vec<Option<StateId>> = vec![None; m * nc];
    let mut out = vec![OutBit::Free; m * nc * k];
    for ci in 0..m {
        for col in 0..nc {
            let c = crate::ids::ColumnId::from_index(col);
            for s in &classes[ci] {
                let o = t.outputs(*s, c);
                for j in 0..k {
                    let slot = &mut out[(ci * nc + col) * k + j];
                    *slot = slot.merge(o[j]);
                }
            }
            let mut need = implied(ci, col);
            if need.is_empty() {
                continue;
            }
            let mut chosen = None;
            for _ in 0..=n + 1 {
                let holds = |d: usize| need.is_subset(&sets[d]);
                let settled = |d: usize| holds(d) && implied(d, col).is_subset(&sets[d]);
                let pick = if settled(ci) {
                    Some(ci)
                } else {
                    (0..m).find(|&d| settled(d))
                };
                if let Some(d) = pick {
                    chosen = Some(d);
                    break;
                }
                match (0..m).find(|&d| holds(d)) {
                    Some(d) => {
                        let grown = implied(d, col);
                        let mut g = need.clone();
                        g.or_with(&grown);
                        if g == need {
                            chosen = Some(d);
                            break;
                        }
                        need = g;
                    }
                    None => break,
                }
            }
            next[ci * nc + col] = chosen.map(StateId::from_index);
        }
    }
    // names
    let mut names: Vec<String> = Vec::with_capacity(m);
    for c in &classes {
        let base = c
            .iter()
            .map(|&s| t.state_name(s))
            .collect::<Vec<_>>()
            .join("_");
        let mut name = base.clone();
        let mut k2 = 2;
        while names.contains(&name) {
            name = format!("{base}_{k2}");
            k2 += 1;
        }
        names.push(name);
    }
    let class_of: Vec<StateId> = t
        .states()
        .map(|s| StateId::from_index(sets.iter().position(|b| b.contains(s.index())).unwrap_or(0)))
        .collect();
    let reset = t.reset().map(|r| class_of[r.index()]);
    let table = FlowTable::from_parts(Parts {
        name: t.name().map(str::to_string),
        inputs: t.input_names().to_vec(),
        outputs: t.output_names().to_vec(),
        states: names,
        columns: t.columns().map(|c| t.column_value(c)).collect(),
        next,
        out,
        reset,
    })?;
    Ok(Reduction {
        table,
        classes,
        class_of,
        optimal: cover.optimal,
        lower_bound: cover.lower_bound,
        stats: cover.stats,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::parse_text;

    /// CHECK SR-1 of methods.md §2.3 ([computed] by exhaustive search in the brief): six
    /// rows, two columns; minimum closed cover 4 blocks, while the best closed cover made
    /// of maximal compatibles has 5. Rows r0..r5, columns I0 = `0`, I1 = `1`.
    const SR1: &str = "inputs i\noutputs z\n\
        \x20   0      1\n\
        r0  r3/-   -/0\n\
        r1  -/0    r0/1\n\
        r2  -/-    r2/1\n\
        r3  r0/0   r5/-\n\
        r4  r4/-   -/0\n\
        r5  r4/1   r3/-\n";

    fn sets(v: &[Vec<StateId>]) -> Vec<String> {
        v.iter()
            .map(|c| c.iter().map(|s| s.index().to_string()).collect())
            .collect()
    }

    #[test]
    fn check_sr_1() {
        let t = parse_text(SR1).unwrap();
        let chart = paull_unger::pair_chart(&t);
        // incompatible pairs 01 02 12 14 15 24 35 (the brief's list)
        let mut inc = Vec::new();
        for a in 0..6 {
            for b in a + 1..6 {
                if !chart.adj[a].contains(b) {
                    inc.push(format!("{a}{b}"));
                }
            }
        }
        assert_eq!(inc, ["01", "02", "12", "14", "15", "24", "35"]);
        let mut limit = 1000;
        let max = bron_kerbosch::maximal_cliques(&chart.adj, &mut limit).unwrap();
        let mut names: Vec<String> = max
            .iter()
            .map(|b| b.iter().map(|s| s.to_string()).collect())
            .collect();
        names.sort();
        assert_eq!(names, ["034", "045", "13", "23", "25"]);
        let next = next_matrix(&t);
        let gamma = |s: &str| -> Vec<String> {
            let mut b = BitSet::new(6);
            for ch in s.chars() {
                b.insert(ch as usize - '0' as usize);
            }
            grasselli_luccio::class_set(&next, 2, &b)
                .iter()
                .map(|d| d.iter().map(|x| x.to_string()).collect())
                .collect()
        };
        assert_eq!(gamma("13"), ["05"]);
        assert_eq!(gamma("23"), ["25"]);
        assert_eq!(gamma("25"), ["23"]);
        assert!(gamma("034").is_empty());
        assert_eq!(gamma("045"), ["34"]);
        // the maximal compatibles alone need all 5
        assert!(!is_closed(&next, 2, &max[..4]));
        let cover = minimum_closed_cover(&t, &ReduceConfig::default()).unwrap();
        assert_eq!(cover.classes.len(), 4, "{:?}", sets(&cover.classes));
        assert!(cover.optimal);
        assert_eq!(cover.lower_bound, 4);
        crate::verify::check_closed_cover(&t, &cover.classes).unwrap();
    }

    #[test]
    fn merged_rows_stay_normal() {
        let t = parse_text(
            "inputs a b\noutputs z\n    00      01      11      10\n\
             p   (p)/0   q/-     -       s/-\n\
             q   p/-     (q)/0   r/-     -\n\
             r   -       q/-     (r)/1   s/-\n\
             s   p/-     -       r/-     (s)/1\n",
        )
        .unwrap();
        let r = reduce(&t, &ReduceConfig::default()).unwrap();
        crate::verify::check_reduction(&t, &r).unwrap();
        assert!(r.optimal);
        assert_eq!(r.table.num_states(), 1, "{}", r.table.to_text()); // z = a: one row suffices
    }

    #[test]
    fn budget_stop_returns_a_valid_cover() {
        let t = parse_text(SR1).unwrap();
        let cover = minimum_closed_cover(&t, &ReduceConfig::default().node_limit(1)).unwrap();
        crate::verify::check_closed_cover(&t, &cover.classes).unwrap();
        assert!(cover.lower_bound <= 4);
        assert!(cover.classes.len() >= 4);
    }
}
