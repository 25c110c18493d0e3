//! Separation: finding cuts that the current LP point violates.
//!
//! Candidate junction sets come from
//! - the Gomory–Hu tree of the graph weighted by `x` (every subtree below the
//!   yard): among them a minimum `T`-odd cut, `T` the junctions of odd
//!   degree in the required links, so every violated odd-cut inequality is
//!   found (Padberg & Rao 1982, Math. Oper. Res. 7);
//! - the Gomory–Hu tree weighted by `x + r` (`r`: required links per pair),
//!   whose minimum cuts are the small left-hand sides `x(δ(S)) + r(S)` of
//!   the capacity inequality `x(δ(S)) + r(S) ≥ 2k(S)` (a heuristic, as in
//!   Belenguer & Benavent 2003);
//! - the connected pieces of the support of `x` joined with the required
//!   links, and the sets of junctions at least a given distance from the
//!   yard with their connected pieces (depot-distance levels).
//!
//! Each candidate's right-hand side is computed exactly by
//! [`Formulation::cut`], which holds whatever the candidate; floats only
//! choose which sets to try.

use std::collections::{HashSet, VecDeque};
use std::time::Instant;

use super::formulation::{Cut, Formulation};
use super::growth::{Grower, Growth};
use super::mincut::{CutTree, FlowGraph};
use crate::model::Cost;

/// A cut is added only when violated by more than this.
pub const MIN_VIOLATION: f64 = 1e-4;

/// Largest number of junctions on which the Gomory–Hu trees are built.
pub const MAX_TREE_JUNCTIONS: usize = 2500;

/// Largest number of junctions added to a seed by greedy growth.
pub const MAX_GROWTH_STEPS: usize = 400;

/// Perturbation amplitudes of the growth passes (the first plain greedy).
/// Measured on egl: three passes instead of one raise the average bound /
/// best known from 0.9874 to about 0.989 at the same time per instance.
pub const GROWTH_NOISE: [f64; 3] = [0.0, 0.5, 1.0];

/// Most junction additions (over all growths) per separation round:
/// keeps a round under about a second on networks of thousands of
/// junctions (all seeds are grown on the public sets).
pub const GROWTH_WORK: usize = 400_000;

/// Reusable separation state for one formulation.
pub struct Separator {
    /// Required links per column.
    req: Vec<f64>,
    /// Depot-distance level sets, computed once.
    levels: Vec<Vec<bool>>,
    grower: Grower,
}

impl Separator {
    /// Prepares the separation of `form`'s cuts.
    pub fn new(form: &Formulation) -> Separator {
        let mut req = vec![0.0; form.columns().len()];
        let pair: std::collections::HashMap<(usize, usize), usize> = form
            .columns()
            .iter()
            .enumerate()
            .map(|(i, c)| ((c.u, c.v), i))
            .collect();
        for (a, b) in form.task_ends() {
            if let Some(&i) = pair.get(&(a.min(b), a.max(b))) {
                req[i] += 1.0;
            }
        }
        Separator {
            req,
            levels: depot_levels(form),
            grower: Grower::new(form),
        }
    }

    /// The level cuts (depot-distance sets) with a positive right-hand
    /// side: with them alone the LP is at least
    /// [`crate::bounds::depot_cut_bound`] (its per-level crossings, priced at
    /// the level widths, form a feasible dual).
    pub fn level_cuts(&self, form: &Formulation, seen: &mut HashSet<Vec<usize>>) -> Vec<Cut> {
        let mut out = Vec::new();
        for level in &self.levels {
            if let Some(cut) = form.cut(level) {
                if seen.insert(cut.set.clone()) {
                    out.push(cut);
                }
            }
        }
        out
    }

    /// Cuts violated at `x` by more than [`MIN_VIOLATION`] whose sets are
    /// not in `seen`, most violated first, at most `limits.max_cuts`; their
    /// sets are added to `seen`. Past `limits.deadline` no more candidates
    /// are tried (what was found is returned).
    pub fn separate(
        &self,
        form: &Formulation,
        x: &[f64],
        limits: &Limits,
        seen: &mut HashSet<Vec<usize>>,
    ) -> Vec<Cut> {
        let mut found: Vec<(f64, Cut)> = Vec::new();
        let mut local: HashSet<Vec<usize>> = HashSet::new();
        let mut consider = |mask: &[bool]| {
            if let Some(cut) = form.cut(mask) {
                let viol = cut.rhs as f64 - form.lhs(&cut, x);
                if viol > MIN_VIOLATION && !seen.contains(&cut.set) && local.insert(cut.set.clone())
                {
                    found.push((viol, cut));
                }
            }
        };
        let late = || limits.deadline.is_some_and(|d| Instant::now() >= d);
        let n = form.junctions();
        let mut seeds: Vec<Vec<usize>> = Vec::new();
        if n <= MAX_TREE_JUNCTIONS {
            let zero = vec![0.0; x.len()];
            for weights in [&zero, &self.req] {
                for mask in tree_sets(form, x, weights) {
                    consider(&mask);
                    seeds.push((0..n).filter(|&v| mask[v]).collect());
                }
                if late() {
                    break;
                }
            }
        }
        for mask in support_pieces(form, x, &self.req) {
            consider(&mask);
        }
        for level in &self.levels {
            if late() {
                break;
            }
            consider(level);
            seeds.push((0..n).filter(|&v| level[v]).collect());
            for mask in pieces_within(form, level) {
                consider(&mask);
            }
        }
        self.grow_all(form, x, limits, seeds, &mut consider);
        found.sort_by(|a, b| b.0.total_cmp(&a.0).then_with(|| a.1.set.cmp(&b.1.set)));
        found.truncate(limits.max_cuts);
        found
            .into_iter()
            .map(|(_, c)| {
                seen.insert(c.set.clone());
                c
            })
            .collect()
    }

    /// Greedy growth ([`Grower`]) from `seeds` and from every task end,
    /// inward (three passes, see [`GROWTH_NOISE`]) and outward from the
    /// yard, within [`GROWTH_WORK`]; every set found goes to `consider`.
    fn grow_all(
        &self,
        form: &Formulation,
        x: &[f64],
        limits: &Limits,
        mut seeds: Vec<Vec<usize>>,
        consider: &mut impl FnMut(&[bool]),
    ) {
        let late = || limits.deadline.is_some_and(|d| Instant::now() >= d);
        let n = form.junctions();
        let depot = form.depot();
        let mut touched = vec![false; n];
        for (a, b) in form.task_ends() {
            touched[a] = true;
            touched[b] = true;
        }
        let singles: Vec<usize> = (0..n).filter(|&v| touched[v] && v != depot).collect();
        seeds.extend(singles.iter().map(|&v| vec![v]));
        let steps = n.min(MAX_GROWTH_STEPS);
        // At most GROWTH_WORK / steps growths per round, spread evenly over
        // the seeds and shifted every round.
        let passes = GROWTH_NOISE.len() + 1;
        let per_pass = (GROWTH_WORK / steps.max(1) / passes).max(1);
        for (pass, amplitude) in GROWTH_NOISE.iter().enumerate() {
            for i in spread(seeds.len(), per_pass, limits.round + pass) {
                if late() {
                    break;
                }
                let how = Growth {
                    outer: false,
                    max_steps: steps,
                    min_violation: MIN_VIOLATION,
                    seed: ((pass as u64 + 1) * 0x9E37_79B9_7F4A_7C15) ^ i as u64,
                    amplitude: *amplitude,
                };
                for mask in self.grower.grow(form, x, &seeds[i], how) {
                    consider(&mask);
                }
            }
        }
        let outer = std::iter::once(depot)
            .chain(spread(singles.len(), per_pass, limits.round).map(|i| singles[i]));
        for v in outer {
            if late() {
                break;
            }
            let how = Growth {
                outer: true,
                max_steps: steps,
                min_violation: MIN_VIOLATION,
                ..Growth::default()
            };
            for mask in self.grower.grow(form, x, &[v], how) {
                consider(&mask);
            }
        }
    }
}

/// How much one separation round may do.
#[derive(Clone, Debug)]
pub struct Limits {
    /// Most cuts returned.
    pub max_cuts: usize,
    /// Round number (shifts the sample of growth seeds on large networks).
    pub round: usize,
    /// Try no more candidates after this instant.
    pub deadline: Option<Instant>,
}

/// `take` indices out of `0..len`, evenly spread, shifted by `shift`; all of
/// them when `take >= len`.
fn spread(len: usize, take: usize, shift: usize) -> impl Iterator<Item = usize> {
    let take = take.min(len);
    let offset = if len > take {
        shift % (len / take.max(1)).max(1)
    } else {
        0
    };
    (0..take).map(move |k| (k * len / take.max(1) + offset) % len.max(1))
}

/// The subtree sets of the Gomory–Hu tree of weights `x + extra`, rooted at
/// the yard (each mask is a subtree, so it avoids the yard).
fn tree_sets(form: &Formulation, x: &[f64], extra: &[f64]) -> Vec<Vec<bool>> {
    let n = form.junctions();
    let depot = form.depot();
    // Relabel so that the yard is vertex 0.
    let label = |v: usize| {
        if v == depot {
            0
        } else if v == 0 {
            depot
        } else {
            v
        }
    };
    let edges: Vec<(usize, usize, f64)> = form
        .columns()
        .iter()
        .enumerate()
        .map(|(i, c)| (label(c.u), label(c.v), x[i].max(0.0) + extra[i]))
        .collect();
    let mut g = FlowGraph::new(n, &edges);
    let tree = CutTree::new(&mut g);
    tree.subtrees()
        .into_iter()
        .skip(1)
        .map(|members| {
            let mut mask = vec![false; n];
            for v in members {
                mask[label(v)] = true;
            }
            mask
        })
        .collect()
}

/// Connected pieces of the graph of the columns with `x > 1e-6` or a
/// required link, except the yard's piece.
fn support_pieces(form: &Formulation, x: &[f64], req: &[f64]) -> Vec<Vec<bool>> {
    let keep: Vec<bool> = (0..x.len()).map(|i| x[i] > 1e-6 || req[i] > 0.0).collect();
    let all = vec![true; form.junctions()];
    pieces(form, &all, &keep)
}

/// Connected pieces of the junctions in `within` (through any column).
fn pieces_within(form: &Formulation, within: &[bool]) -> Vec<Vec<bool>> {
    let keep = vec![true; form.columns().len()];
    let p = pieces(form, within, &keep);
    if p.len() <= 1 {
        Vec::new()
    } else {
        p
    }
}

/// Connected pieces of the junctions in `within` through the columns in
/// `keep`, the yard's piece left out, pieces without a task end left out.
fn pieces(form: &Formulation, within: &[bool], keep: &[bool]) -> Vec<Vec<bool>> {
    let n = form.junctions();
    let adj = form.adjacency();
    let mut comp = vec![usize::MAX; n];
    let mut count = 0;
    for s in 0..n {
        if !within[s] || comp[s] != usize::MAX {
            continue;
        }
        comp[s] = count;
        let mut q = VecDeque::from([s]);
        while let Some(v) = q.pop_front() {
            for &(c, w) in &adj[v] {
                let w = w as usize;
                if keep[c as usize] && within[w] && comp[w] == usize::MAX {
                    comp[w] = count;
                    q.push_back(w);
                }
            }
        }
        count += 1;
    }
    let mut has_task = vec![false; count];
    for (a, b) in form.task_ends() {
        for v in [a, b] {
            if comp[v] != usize::MAX {
                has_task[comp[v]] = true;
            }
        }
    }
    let depot_comp = comp[form.depot()];
    (0..count)
        .filter(|&k| has_task[k] && k != depot_comp)
        .map(|k| comp.iter().map(|&c| c == k).collect())
        .collect()
}

/// The sets `{v : dist(v) ≥ t}` for every distinct positive shortest-path
/// distance `t` from the yard (columns' costs), nearest first.
fn depot_levels(form: &Formulation) -> Vec<Vec<bool>> {
    let n = form.junctions();
    let adj = form.adjacency();
    let cols = form.columns();
    let mut dist = vec![Cost::MAX; n];
    let mut heap = std::collections::BinaryHeap::new();
    dist[form.depot()] = 0;
    heap.push(std::cmp::Reverse((0 as Cost, form.depot())));
    while let Some(std::cmp::Reverse((d, v))) = heap.pop() {
        if d > dist[v] {
            continue;
        }
        for &(c, w) in &adj[v] {
            let nd = d + cols[c as usize].cost;
            if nd < dist[w as usize] {
                dist[w as usize] = nd;
                heap.push(std::cmp::Reverse((nd, w as usize)));
            }
        }
    }
    let mut values: Vec<Cost> = dist
        .iter()
        .copied()
        .filter(|&d| d > 0 && d < Cost::MAX)
        .collect();
    values.sort_unstable();
    values.dedup();
    values
        .into_iter()
        .map(|t| dist.iter().map(|&d| d >= t && d < Cost::MAX).collect())
        .collect()
}
