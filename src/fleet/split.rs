//! The exact split of a giant tour into routes with tips, for one truck type
//! or a mixed fleet.
//!
//! A *giant tour* is an order of tasks. A split cuts it into consecutive
//! pieces, gives each piece a truck type (and so a yard), chooses the
//! service direction of every task and decides after which tasks the truck
//! tips, and at which dump site. [`split`] returns a split of least
//! objective (total cost, or total cost + weight × longest shift under
//! [`Balance::LongestShift`]) among all splits of the given order.
//!
//! **One route (the inner programme).** For a piece `tour[i..=j]` and a type
//! `k`, labels `(c, t, q)` describe a partial route that has served
//! `tour[i..=m]`, the last one in a known direction: `c` its milli-cost
//! (cost factor × cost driven + 1000 × unload costs, so that the route cost
//! is `fixed + ceil(c / 1000)`), `t` the time since leaving the yard, `q` the
//! load of the current trip. A label is extended to the next task, in each
//! allowed direction, either directly or through one of the dump sites
//! (drive there, wait for it to open, unload, drive to the next task; the
//! trip load restarts). A route is closed by driving to the yard, directly
//! (not allowed with a loaded truck that must return empty) or through a
//! dump site. This is the splitting procedure with intermediate facilities
//! of Willemse & Joubert (2016) (cited from memory), written here as a
//! label-setting programme over the order.
//!
//! *Why it is exact.* Every route of the piece is a choice of directions and
//! of one tip site or none in each gap (two tips in a row never pay: the
//! second unloads an empty truck), and the programme enumerates these
//! choices stage by stage. A label is dropped only when another label of the
//! same stage, ending at the same junction, is no worse in all of `c`, `t`
//! and `q`. Every later step is monotone in these three values: costs and
//! times only add, waiting for a dump site turns a later arrival into a
//! start that is not earlier (`max(arrival, opens)`), a site accepts an
//! arrival only up to its closing time, the load check is `q + demand ≤
//! capacity` and the shift check `t ≤ limit`. So whatever completes the
//! dropped label completes the kept one at no more cost, time or load, and
//! the kept one's completion is feasible whenever the dropped one's is; and
//! `ceil(c / 1000)` is monotone in `c`. Without a shift limit, opening hours
//! or balancing, times play no role and labels are compared on `(c, q)`
//! only. The closing step keeps, per piece and type, every closing time
//! that is not dominated in (cost, time).
//!
//! **The whole order (the outer programme).** Node `j` stands for "the first
//! `j` tasks are served"; every closed route of a piece `tour[i..j]` and
//! type is an edge `i → j`. With unlimited trucks of every type this is a
//! shortest path (Ulusoy 1985). With limited counts, each node keeps the
//! labels (cost, trucks used per limited type) that no other label beats in
//! all of them, as in the heterogeneous-fleet split of Prins (2009)
//! (cited from memory); this is exact unless more than [`LABEL_CAP`] labels
//! survive at a node, when the cheapest are kept and the result says
//! `exact: false`. Under [`Balance::LongestShift`] the programme is solved
//! once per candidate longest shift `T` (every distinct closing time, in
//! increasing order) with routes of time at most `T`, and the best value of
//! `cost + weight × longest` is kept; the loop stops as soon as
//! `cheapest cost + weight × T` cannot beat the best found. Candidates
//! below the largest, over all positions, of the quickest route covering
//! that position cannot be the longest shift and are skipped. When more than
//! [`MAX_THRESHOLDS`] candidates remain, that many evenly spread ones are
//! tried (the largest always among them, so a plan is found) and the result
//! says `exact: false`.
//!
//! **Cost.** `O(n² · L · 2 · (1 + S))` for the edges of `n` tasks, `S` dump
//! sites and `L` labels per stage (at most the number of distinct trip loads
//! without times), plus the outer programme over those edges.

use super::route::{route_cost, FleetRoute, Tip};
use super::tables::{ends, Tables};
use crate::model::{Balance, Cost, Dir, Instance};
use crate::plan::Visit;

/// Largest number of labels kept at a stage or node (see the module docs).
pub const LABEL_CAP: usize = 4096;

/// Largest number of candidate longest shifts tried under balancing (see
/// the module docs).
pub const MAX_THRESHOLDS: usize = 48;

const NONE: u32 = u32::MAX;

/// A partial route after serving a task.
#[derive(Clone, Copy, Debug)]
pub(super) struct Lab {
    c: Cost,
    t: Cost,
    q: Cost,
    /// 0 forward, 1 backward (of the last task).
    dir: u8,
    /// Arena index of this label's history.
    id: u32,
}

/// History of a label: previous label, direction of its task, tip before it.
#[derive(Clone, Copy, Debug)]
struct Hist {
    prev: u32,
    dir: u8,
    tip: u32,
}

/// A closing of a piece: route cost, time, label and final tip site.
#[derive(Clone, Copy, Debug)]
struct Close {
    cost: Cost,
    time: Cost,
    id: u32,
    tip: u32,
}

/// The inner programme for one type, started at one position of the tour.
struct RouteDp<'a> {
    inst: &'a Instance,
    tables: &'a Tables,
    k: usize,
    labs: Vec<Lab>,
    arena: Vec<Hist>,
    capped: bool,
    /// Whether label histories are kept (not needed to price a route).
    record: bool,
}

impl<'a> RouteDp<'a> {
    fn start(inst: &'a Instance, tables: &'a Tables, k: usize, task: usize) -> Self {
        let mut dp = RouteDp {
            inst,
            tables,
            k,
            labs: Vec::new(),
            arena: Vec::new(),
            capped: false,
            record: true,
        };
        let tt = &tables.types[k];
        if tt.serves[task] {
            let t = &inst.tasks()[task];
            for (d, dir) in [Dir::Forward, Dir::Backward].into_iter().enumerate() {
                if !t.allows(dir) {
                    continue;
                }
                let (s, _) = t.ends(dir);
                if let Some((c, tm)) = tables.leg(k, tt.yard, s) {
                    let lab = Lab {
                        c: tt.ty.cost_per_mille * (c + t.cost),
                        t: tm + t.time,
                        q: t.demand,
                        dir: d as u8,
                        id: 0,
                    };
                    dp.push(lab, NONE, NONE);
                }
            }
        }
        dp.prune();
        dp
    }

    fn push(&mut self, mut lab: Lab, prev: u32, tip: u32) {
        if self.tables.types[self.k]
            .ty
            .shift_limit
            .is_some_and(|s| lab.t > s)
        {
            return;
        }
        if self.record {
            lab.id = self.arena.len() as u32;
            self.arena.push(Hist {
                prev,
                dir: lab.dir,
                tip,
            });
        }
        self.labs.push(lab);
    }

    /// Drops dominated labels (same direction; `c`, `t` when timed, `q`).
    fn prune(&mut self) {
        let timed = self.tables.timed;
        self.labs
            .sort_unstable_by_key(|l| (l.dir, l.c, l.q, l.t, l.id));
        let mut kept: Vec<Lab> = Vec::with_capacity(self.labs.len());
        for l in &self.labs {
            let dominated = kept
                .iter()
                .rev()
                .take_while(|a| a.dir == l.dir)
                .any(|a| a.c <= l.c && a.q <= l.q && (!timed || a.t <= l.t));
            if !dominated {
                kept.push(*l);
            }
        }
        if kept.len() > LABEL_CAP {
            kept.sort_by_key(|l| (l.c, l.t, l.q, l.dir));
            kept.truncate(LABEL_CAP);
            kept.sort_by_key(|l| (l.dir, l.c, l.q, l.t));
            self.capped = true;
        }
        self.labs = kept;
    }

    /// End junction of a label serving `task`.
    fn end_of(&self, task: usize, dir: u8) -> usize {
        ends(
            self.inst,
            task,
            if dir == 0 {
                Dir::Forward
            } else {
                Dir::Backward
            },
        )
        .1
    }

    /// Arrival at dump site `f` from junction `at` at time `t`: the cost and
    /// the time unloading ends, or `None`.
    fn tip(&self, at: usize, t: Cost, f: usize) -> Option<(Cost, Cost)> {
        let s = &self.tables.sites[f];
        let (dc, dt) = self.tables.leg(self.k, at, s.junction)?;
        let mut start = t + dt;
        if let Some(h) = s.hours {
            start = h.start(start)?;
        }
        Some((dc, start + s.unload_time))
    }

    /// Extends the labels after `prev` to the next task `task`.
    fn extend(&mut self, prev: usize, task: usize) {
        let tt = &self.tables.types[self.k];
        let (pm, cap) = (tt.ty.cost_per_mille, tt.ty.capacity);
        let old = std::mem::take(&mut self.labs);
        if !tt.serves[task] {
            return;
        }
        let t = &self.inst.tasks()[task];
        for a in &old {
            let at = self.end_of(prev, a.dir);
            for (d, dir) in [Dir::Forward, Dir::Backward].into_iter().enumerate() {
                if !t.allows(dir) {
                    continue;
                }
                let (s, _) = t.ends(dir);
                if a.q + t.demand <= cap {
                    if let Some((dc, dt)) = self.tables.leg(self.k, at, s) {
                        let lab = Lab {
                            c: a.c + pm * (dc + t.cost),
                            t: a.t + dt + t.time,
                            q: a.q + t.demand,
                            dir: d as u8,
                            id: 0,
                        };
                        self.push(lab, a.id, NONE);
                    }
                }
                if a.q == 0 {
                    continue;
                }
                for f in 0..self.tables.sites.len() {
                    let site = &self.tables.sites[f];
                    let Some((dc1, t1)) = self.tip(at, a.t, f) else {
                        continue;
                    };
                    let Some((dc2, dt2)) = self.tables.leg(self.k, site.junction, s) else {
                        continue;
                    };
                    let lab = Lab {
                        c: a.c + pm * (dc1 + dc2 + t.cost) + 1000 * site.unload_cost,
                        t: t1 + dt2 + t.time,
                        q: t.demand,
                        dir: d as u8,
                        id: 0,
                    };
                    self.push(lab, a.id, f as u32);
                }
            }
        }
        self.prune();
    }

    /// Closes every label after `last` (drive to the yard, directly or
    /// through a dump site); returns the closings not dominated in (cost,
    /// time), cheapest first. Without times only the cheapest.
    fn close(&self, last: usize) -> Vec<Close> {
        let tt = &self.tables.types[self.k];
        let pm = tt.ty.cost_per_mille;
        let must_tip = self.tables.return_empty && !self.tables.sites.is_empty();
        let mut out = Vec::new();
        let mut add = |c: Cost, t: Cost, id: u32, tip: u32| {
            if tt.ty.shift_limit.is_some_and(|s| t > s) {
                return;
            }
            out.push(Close {
                cost: route_cost(tt.ty.fixed_cost, c),
                time: t,
                id,
                tip,
            });
        };
        for a in &self.labs {
            let at = self.end_of(last, a.dir);
            if !(must_tip && a.q > 0) {
                if let Some((dc, dt)) = self.tables.leg(self.k, at, tt.yard) {
                    add(a.c + pm * dc, a.t + dt, a.id, NONE);
                }
            }
            if a.q == 0 {
                continue;
            }
            for f in 0..self.tables.sites.len() {
                let site = &self.tables.sites[f];
                let Some((dc1, t1)) = self.tip(at, a.t, f) else {
                    continue;
                };
                let Some((dc2, dt2)) = self.tables.leg(self.k, site.junction, tt.yard) else {
                    continue;
                };
                add(
                    a.c + pm * (dc1 + dc2) + 1000 * site.unload_cost,
                    t1 + dt2,
                    a.id,
                    f as u32,
                );
            }
        }
        out.sort_by_key(|x| (x.cost, x.time, x.id, x.tip));
        let mut kept: Vec<Close> = Vec::new();
        for x in out {
            let dominated = kept.last().is_some_and(|a| a.time <= x.time);
            if !dominated {
                kept.push(x);
            }
            if !self.tables.timed {
                break;
            }
        }
        kept
    }

    /// The route of a closing: visits and tips of `tour[i..=j]`.
    fn route(&self, tour: &[usize], i: usize, c: &Close) -> (Vec<Visit>, Vec<Tip>) {
        let mut dirs = Vec::new();
        let mut tips_before = Vec::new();
        let mut id = c.id;
        while id != NONE {
            let h = self.arena[id as usize];
            dirs.push(h.dir);
            tips_before.push(h.tip);
            id = h.prev;
        }
        dirs.reverse();
        tips_before.reverse();
        let mut visits = Vec::with_capacity(dirs.len());
        let mut tips = Vec::new();
        for (m, (&d, &tip)) in dirs.iter().zip(&tips_before).enumerate() {
            if tip != NONE {
                tips.push(Tip {
                    after: m,
                    site: tip as usize,
                });
            }
            let dir = if d == 0 { Dir::Forward } else { Dir::Backward };
            visits.push(Visit::new(tour[i + m], dir));
        }
        if c.tip != NONE {
            tips.push(Tip {
                after: visits.len(),
                site: c.tip as usize,
            });
        }
        (visits, tips)
    }
}

/// An edge of the outer programme: a closed route of `tour[i..j]` of type `k`.
#[derive(Clone, Copy, Debug)]
struct Edge {
    j: u32,
    k: u32,
    cost: Cost,
    time: Cost,
}

/// The result of a split.
#[derive(Clone, Debug)]
pub struct FleetSplit {
    /// The routes, in tour order.
    pub routes: Vec<FleetRoute>,
    /// Total cost.
    pub cost: Cost,
    /// Longest shift time.
    pub longest: Cost,
    /// The objective (cost, plus weight × longest under balancing).
    pub objective: Cost,
    /// Whether no label cap was hit (then the split is optimal for the order).
    pub exact: bool,
}

/// Why a tour could not be split.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SplitError {
    /// No split of this order respects the limits and the truck counts.
    Infeasible,
}

/// The best final label, the longest-shift limit it was found with, and
/// all node labels (for walking back).
type Best = (Node, Cost, Vec<Vec<Node>>);

/// Node label of the outer programme.
#[derive(Clone, Debug)]
struct Node {
    cost: Cost,
    routes: u32,
    used: Vec<u32>,
    /// (previous node, label index there, edge index among edges[prev]).
    back: (u32, u32, u32),
}

/// Splits `tour` (task indices, any order of any subset) into routes of least
/// objective for this order (see the module docs).
///
/// # Errors
///
/// [`SplitError::Infeasible`] when no split respects the load and shift
/// limits and the numbers of trucks.
pub fn split(inst: &Instance, tables: &Tables, tour: &[usize]) -> Result<FleetSplit, SplitError> {
    split_with(inst, tables, tour, MAX_THRESHOLDS)
}

/// [`split`] trying at most `thresholds` candidate longest shifts under
/// balancing (at least 1; see the module docs).
///
/// # Errors
///
/// As [`split`].
pub fn split_with(
    inst: &Instance,
    tables: &Tables,
    tour: &[usize],
    thresholds: usize,
) -> Result<FleetSplit, SplitError> {
    let thresholds = thresholds.max(1);
    let n = tour.len();
    if n == 0 {
        return Ok(FleetSplit {
            routes: Vec::new(),
            cost: 0,
            longest: 0,
            objective: 0,
            exact: true,
        });
    }
    let (edges, mut exact) = edges(inst, tables, tour);
    let weight = match inst.operations().balance {
        Balance::LongestShift { weight } if weight > 0 => weight,
        _ => 0,
    };
    let (best, nodes_exact) = if weight == 0 {
        let (nodes, ex) = outer(tables, &edges, n, Cost::MAX);
        let b = nodes[n].first().cloned().ok_or(SplitError::Infeasible)?;
        (Some((b, Cost::MAX, nodes)), ex)
    } else {
        let (best, ex, sampled) = balanced(tables, &edges, n, weight, thresholds)?;
        exact &= !sampled;
        (best, ex)
    };
    exact &= nodes_exact;
    let (b, limit, nodes) = best.ok_or(SplitError::Infeasible)?;
    // Walk back through the nodes, rebuilding each route with its inner programme.
    let mut pieces = Vec::new();
    let (mut j, mut lab) = (n, b);
    while j > 0 {
        let (i, li, ei) = lab.back;
        let e = edges[i as usize][ei as usize];
        pieces.push((i as usize, j, e));
        lab = nodes[i as usize][li as usize].clone();
        j = i as usize;
    }
    pieces.reverse();
    let mut routes = Vec::with_capacity(pieces.len());
    for (i, j, e) in pieces {
        debug_assert!(e.time <= limit);
        let r = route_of(inst, tables, e.k as usize, &tour[i..j], (e.cost, e.time))
            .expect("the edge's closing is found again");
        routes.push(r);
    }
    let cost = routes.iter().map(|r| r.cost).sum();
    let longest = routes.iter().map(|r| r.time).max().unwrap_or(0);
    Ok(FleetSplit {
        routes,
        cost,
        longest,
        objective: cost + weight * longest,
        exact,
    })
}

/// The best of the outer programmes with routes no longer than each
/// candidate longest shift, under `cost + weight × longest`; also whether
/// every outer programme was exact and whether the candidates were sampled.
fn balanced(
    tables: &Tables,
    edges: &[Vec<Edge>],
    n: usize,
    weight: Cost,
    thresholds: usize,
) -> Result<(Option<Best>, bool, bool), SplitError> {
    let mut sampled = false;
    // The longest shift is at least, for every position, the quickest
    // route that covers it.
    let mut quickest = vec![Cost::MAX; n];
    for (i, list) in edges.iter().enumerate() {
        for e in list {
            for q in &mut quickest[i..e.j as usize] {
                *q = (*q).min(e.time);
            }
        }
    }
    let t_lo = quickest.iter().copied().max().unwrap_or(0);
    let mut times: Vec<Cost> = edges
        .iter()
        .flatten()
        .map(|e| e.time)
        .filter(|&t| t >= t_lo)
        .collect();
    times.sort_unstable();
    times.dedup();
    if times.len() > thresholds {
        // Evenly spread candidates, the largest always kept: a plan is
        // still found, but the balance is no longer exact.
        let m = times.len();
        times = (1..=thresholds)
            .map(|k| times[k * m / thresholds - 1])
            .collect();
        sampled = true;
    }
    let (free, mut ex) = outer(tables, edges, n, Cost::MAX);
    let floor = free[n].first().ok_or(SplitError::Infeasible)?.cost;
    let mut best: Option<Best> = None;
    let mut best_value = Cost::MAX;
    for &t in &times {
        if floor + weight * t >= best_value {
            break;
        }
        let (nodes, e) = outer(tables, edges, n, t);
        ex &= e;
        if let Some(b) = nodes[n].first() {
            let v = b.cost + weight * t;
            if v < best_value {
                best_value = v;
                best = Some((b.clone(), t, nodes));
            }
        }
    }
    Ok((best, ex, sampled))
}

/// All edges of the outer programme, grouped by start node.
fn edges(inst: &Instance, tables: &Tables, tour: &[usize]) -> (Vec<Vec<Edge>>, bool) {
    let n = tour.len();
    let mut out = vec![Vec::new(); n];
    let mut exact = true;
    for (i, list) in out.iter_mut().enumerate() {
        for k in 0..tables.types.len() {
            let mut dp = RouteDp::start(inst, tables, k, tour[i]);
            for j in i..n {
                if j > i {
                    dp.extend(tour[j - 1], tour[j]);
                }
                if dp.labs.is_empty() {
                    break;
                }
                for c in dp.close(tour[j]) {
                    list.push(Edge {
                        j: (j + 1) as u32,
                        k: k as u32,
                        cost: c.cost,
                        time: c.time,
                    });
                }
            }
            exact &= !dp.capped;
        }
    }
    (out, exact)
}

/// The outer programme with routes of time at most `limit`: per node the
/// labels not dominated in (cost, trucks used per limited type), cheapest
/// first (ties: fewer routes).
fn outer(tables: &Tables, edges: &[Vec<Edge>], n: usize, limit: Cost) -> (Vec<Vec<Node>>, bool) {
    let counts: Vec<Option<usize>> = tables.types.iter().map(|t| t.ty.count).collect();
    let limited: Vec<usize> = (0..counts.len()).filter(|&k| counts[k].is_some()).collect();
    let slot = |k: usize| limited.iter().position(|&x| x == k);
    let mut nodes: Vec<Vec<Node>> = vec![Vec::new(); n + 1];
    nodes[0].push(Node {
        cost: 0,
        routes: 0,
        used: vec![0; limited.len()],
        back: (NONE, NONE, NONE),
    });
    let mut exact = true;
    for i in 0..n {
        if nodes[i].is_empty() {
            continue;
        }
        // Prune node i once all its incoming edges are in.
        let mut labels = std::mem::take(&mut nodes[i]);
        labels.sort_by(|a, b| (a.cost, a.routes, &a.used).cmp(&(b.cost, b.routes, &b.used)));
        let mut kept: Vec<Node> = Vec::new();
        for l in labels {
            let dominated = kept
                .iter()
                .any(|a| a.cost <= l.cost && a.used.iter().zip(&l.used).all(|(x, y)| x <= y));
            if !dominated {
                kept.push(l);
            }
        }
        if kept.len() > LABEL_CAP {
            kept.truncate(LABEL_CAP);
            exact = false;
        }
        nodes[i] = kept;
        for (li, l) in nodes[i].clone().iter().enumerate() {
            for (ei, e) in edges[i].iter().enumerate() {
                if e.time > limit {
                    continue;
                }
                let mut used = l.used.clone();
                if let Some(s) = slot(e.k as usize) {
                    used[s] += 1;
                    if used[s] as usize > counts[e.k as usize].unwrap_or(usize::MAX) {
                        continue;
                    }
                }
                let j = e.j as usize;
                let cand = Node {
                    cost: l.cost + e.cost,
                    routes: l.routes + 1,
                    used,
                    back: (i as u32, li as u32, ei as u32),
                };
                if limited.is_empty() {
                    // One label per node: the cheapest (ties: fewer routes).
                    match nodes[j].first() {
                        Some(x) if (x.cost, x.routes) <= (cand.cost, cand.routes) => {}
                        _ => nodes[j] = vec![cand],
                    }
                } else {
                    nodes[j].push(cand);
                }
            }
        }
    }
    nodes[n].sort_by(|a, b| (a.cost, a.routes, &a.used).cmp(&(b.cost, b.routes, &b.used)));
    (nodes, exact)
}

/// The labels after each task of a route (no histories), kept so that a
/// changed route is priced from its first changed task on ([`route_price`]).
#[derive(Clone, Debug, Default)]
pub(super) struct Stages {
    labs: Vec<Vec<Lab>>,
    capped: bool,
}

/// The inner programme run on one route: the closings of a route of type
/// `k` serving `seq` in this order (directions and tips chosen), as
/// `(cost, time)` pairs not dominated in both, cheapest first (only the
/// cheapest when times play no role, see the module docs); empty when no
/// such route keeps the type's limits. The flag is `false` when a label cap
/// was hit (the front may then miss closings).
///
/// `prefix`: the [`Stages`] of a route of the same type whose first `same`
/// tasks are those of `seq`; the programme then starts after them (the
/// labels of a stage depend only on the tasks before it). With `keep` the
/// stages of `seq` are returned too. Costs `O(m · L · 2 · (1 + S))` for the
/// `m` tasks priced: the exact price of one route, used by the local search
/// on routes.
pub(super) fn route_price(
    inst: &Instance,
    tables: &Tables,
    k: usize,
    seq: &[usize],
    prefix: Option<(&Stages, usize)>,
    keep: bool,
) -> (Vec<(Cost, Cost)>, bool, Option<Stages>) {
    let Some((&first, _)) = seq.split_first() else {
        return (vec![(0, 0)], true, keep.then(Stages::default));
    };
    let mut stages = Vec::new();
    let (mut dp, from) = match prefix {
        Some((st, same)) if same > 0 => {
            let same = same.min(seq.len()).min(st.labs.len());
            if keep {
                stages.extend(st.labs[..same].iter().cloned());
            }
            let dp = RouteDp {
                inst,
                tables,
                k,
                labs: st.labs[same - 1].clone(),
                arena: Vec::new(),
                capped: st.capped,
                record: false,
            };
            (dp, same)
        }
        _ => {
            let mut dp = RouteDp::start(inst, tables, k, first);
            dp.record = false;
            if keep {
                stages.push(dp.labs.clone());
            }
            (dp, 1)
        }
    };
    for m in from..seq.len() {
        if dp.labs.is_empty() {
            return (Vec::new(), !dp.capped, None);
        }
        dp.extend(seq[m - 1], seq[m]);
        if keep {
            stages.push(dp.labs.clone());
        }
    }
    let front = dp
        .close(seq[seq.len() - 1])
        .iter()
        .map(|c| (c.cost, c.time))
        .collect();
    let capped = dp.capped;
    (
        front,
        !capped,
        keep.then_some(Stages {
            labs: stages,
            capped,
        }),
    )
}

/// The route of type `k` serving `seq` in this order whose closing is
/// `(cost, time)` (one of [`route_price`]'s), with its directions and tips;
/// `None` when no closing has these values.
pub(super) fn route_of(
    inst: &Instance,
    tables: &Tables,
    k: usize,
    seq: &[usize],
    (cost, time): (Cost, Cost),
) -> Option<FleetRoute> {
    let (&first, _) = seq.split_first()?;
    let mut dp = RouteDp::start(inst, tables, k, first);
    for w in seq.windows(2) {
        dp.extend(w[0], w[1]);
    }
    let c = dp
        .close(seq[seq.len() - 1])
        .into_iter()
        .find(|c| c.cost == cost && c.time == time)?;
    let (visits, tips) = dp.route(seq, 0, &c);
    let r = FleetRoute::new(inst, tables, k, visits, tips).ok()?;
    debug_assert_eq!((r.cost, r.time), (cost, time));
    Some(r)
}
