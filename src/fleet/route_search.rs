//! Local search on the routes of a fleet plan, each move priced exactly by
//! re-running the inner programme of the split ([`super::split`]) on the
//! routes it touches only.
//!
//! A plan is held as *sequences*: per route, its truck type and the order of
//! its tasks. Directions and tips are not fixed: the price of a sequence is
//! the exact optimum over every choice of directions and tips, its *front*
//! (the `(cost, time)` closings not dominated in both, see
//! [`super::split::route_price`]). The objective of the plan is then exact
//! for its sequences:
//!
//! - least cost: the sum of the routes' cheapest closings;
//! - `cost + w × longest shift`: the least, over every candidate longest
//!   shift `T` (each time of a front), of the sum over routes of the
//!   cheapest closing no longer than `T`, plus `w · T`.
//!
//! **Moves.** For a task `u` and each task `v` among its nearest: relocate
//! `u` right after or right before `v`, swap `u` and `v`; in one route,
//! reverse the stretch from after `u` to `v` (the directions are re-chosen
//! by the price); between two routes, exchange their tails after `u` and
//! `v` (2-opt*, both ways of joining). Once per route: change its truck type
//! (and so its yard) to any other type with a truck left, and once per task:
//! move it to a new route of any type with a truck left. A move is priced by
//! the fronts of the (one or two) routes it changes, so its cost is
//! proportional to the length of those routes, not of the plan. Truck counts
//! are kept; a route that cannot keep its type's load limit per trip, shift
//! limit or opening hours has an empty front and the move is refused.
//!
//! **Descent.** Tasks wait in a queue (first all, later the two tasks of a
//! move applied and their nearest); the first strictly improving move of a
//! task is applied. A changed route is priced from its first changed task
//! on, starting from the labels its old version had there. The descent ends at a local optimum, when the move budget is
//! used or when the limits ([`Limits`]) say stop.

use std::collections::VecDeque;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Instant;

use rand::Rng;
use rand_chacha::ChaCha12Rng;

use super::route::FleetPlan;
use super::split::{route_of, route_price, FleetSplit, Stages};
use super::tables::Tables;
use crate::model::{Balance, Cost, Instance};

/// When to stop: a deadline and an external flag.
#[derive(Clone, Debug, Default)]
pub(super) struct Limits {
    pub deadline: Option<Instant>,
    pub stop: Option<Arc<AtomicBool>>,
}

impl Limits {
    /// Whether the deadline has passed or the flag is set.
    pub fn hit(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
            || self
                .stop
                .as_ref()
                .is_some_and(|s| s.load(Ordering::Relaxed))
    }
}

/// One route: truck type, tasks in order, its front and the labels of its
/// stages (to price a changed route from the first change on).
#[derive(Clone, Debug)]
struct Seq {
    k: usize,
    tasks: Vec<usize>,
    front: Vec<(Cost, Cost)>,
    stages: Arc<Stages>,
}

/// A route a move proposes: where it goes, its type, its tasks.
type Change = (Slot, usize, Vec<usize>);

/// Fronts priced during one look at a task (a route without the task is
/// priced once for all its moves): type, tasks, front, exact.
type Memo = Vec<(usize, Vec<usize>, Vec<(Cost, Cost)>, bool)>;

/// A route a move leaves behind: an existing one (by index) or a new one.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Slot {
    Old(usize),
    New,
}

/// A priced route of a move: where it goes, type, tasks, front.
type PricedRoute = (Slot, usize, Vec<usize>, Vec<(Cost, Cost)>);

/// A priced move: the changed routes (with their fronts) and the plan's new
/// value.
struct Priced {
    changes: Vec<PricedRoute>,
    objective: Cost,
    exact: bool,
}

/// A plan as sequences, with its exact objective (see the module docs).
#[derive(Clone, Debug)]
pub(super) struct Routes<'a> {
    inst: &'a Instance,
    tables: &'a Tables,
    weight: Cost,
    seqs: Vec<Seq>,
    used: Vec<usize>,
    /// Route and position of every task.
    pos: Vec<(usize, usize)>,
    /// The objective (cost, plus weight × longest shift when balancing).
    pub objective: Cost,
    /// The total cost of the plan that reaches the objective.
    pub cost: Cost,
    /// Whether every front was computed without hitting a label cap.
    pub exact: bool,
}

/// The objective and cost of a plan whose routes have these fronts (each
/// non-empty, cheapest first, times decreasing), with the longest shift it
/// allows (`Cost::MAX` under least cost).
fn value<'f>(
    fronts: impl Iterator<Item = &'f [(Cost, Cost)]> + Clone,
    weight: Cost,
) -> (Cost, Cost, Cost) {
    if weight == 0 {
        let c = fronts.map(|f| f[0].0).sum();
        return (c, c, Cost::MAX);
    }
    // The longest shift is at least the quickest closing of every route.
    let floor = fronts.clone().map(|f| f[f.len() - 1].1).max().unwrap_or(0);
    let mut times: Vec<Cost> = fronts
        .clone()
        .flat_map(|f| f.iter().map(|x| x.1))
        .filter(|&t| t >= floor)
        .collect();
    times.sort_unstable();
    times.dedup();
    if times.is_empty() {
        return (0, 0, 0); // no routes
    }
    let mut best = (Cost::MAX, Cost::MAX, Cost::MAX);
    for t in times {
        let cost: Cost = fronts
            .clone()
            .map(|f| f.iter().find(|x| x.1 <= t).expect("t above the floor").0)
            .sum();
        let v = cost + weight * t;
        if v < best.0 {
            best = (v, cost, t);
        }
    }
    best
}

impl<'a> Routes<'a> {
    /// The routes of a split (re-priced as sequences: never worse).
    pub fn from_split(inst: &'a Instance, tables: &'a Tables, s: &FleetSplit) -> Routes<'a> {
        let weight = match inst.operations().balance {
            Balance::LongestShift { weight } if weight > 0 => weight,
            _ => 0,
        };
        let mut exact = true;
        let mut used = vec![0; tables.types.len()];
        let seqs: Vec<Seq> = s
            .routes
            .iter()
            .map(|r| {
                let tasks: Vec<usize> = r.visits.iter().map(|v| v.task).collect();
                let (front, ex, stages) =
                    route_price(inst, tables, r.truck_type, &tasks, None, true);
                exact &= ex;
                assert!(!front.is_empty(), "a route of the split has a closing");
                used[r.truck_type] += 1;
                Seq {
                    k: r.truck_type,
                    tasks,
                    front,
                    stages: Arc::new(stages.unwrap_or_default()),
                }
            })
            .collect();
        let mut r = Routes {
            inst,
            tables,
            weight,
            seqs,
            used,
            pos: vec![(0, 0); inst.tasks().len()],
            objective: 0,
            cost: 0,
            exact,
        };
        r.refresh();
        r
    }

    /// Recomputes positions and the objective.
    fn refresh(&mut self) {
        for (ri, s) in self.seqs.iter().enumerate() {
            for (i, &t) in s.tasks.iter().enumerate() {
                self.pos[t] = (ri, i);
            }
        }
        let (o, c, _) = value(self.seqs.iter().map(|s| s.front.as_slice()), self.weight);
        self.objective = o;
        self.cost = c;
    }

    /// The tasks of all routes, one route after the other (a giant tour
    /// whose exact split is at least as good as these routes).
    pub fn order(&self) -> Vec<usize> {
        self.seqs
            .iter()
            .flat_map(|s| s.tasks.iter().copied())
            .collect()
    }

    /// The plan: every route with the directions and tips of its closing
    /// (the cheapest within the longest shift that reaches the objective).
    pub fn plan(&self) -> FleetPlan {
        let (_, _, limit) = value(self.seqs.iter().map(|s| s.front.as_slice()), self.weight);
        let routes = self
            .seqs
            .iter()
            .map(|s| {
                let c = *s
                    .front
                    .iter()
                    .find(|x| x.1 <= limit)
                    .expect("within the limit");
                route_of(self.inst, self.tables, s.k, &s.tasks, c).expect("the closing is found")
            })
            .collect();
        FleetPlan::new(routes)
    }

    /// The stages a changed route of type `k` with `tasks` can start from:
    /// those of the route it replaces, up to their common first tasks.
    fn prefix(&self, slot: Slot, k: usize, tasks: &[usize]) -> Option<(&Stages, usize)> {
        let Slot::Old(r) = slot else { return None };
        let old = &self.seqs[r];
        if old.k != k {
            return None;
        }
        let same = old
            .tasks
            .iter()
            .zip(tasks)
            .take_while(|(a, b)| a == b)
            .count();
        Some((old.stages.as_ref(), same))
    }

    /// Prices a move that replaces or adds the routes of `changes` (a route
    /// left without tasks is dropped); `None` when a route is infeasible or a
    /// type has no truck left.
    fn price(&self, changes: Vec<Change>, memo: &mut Memo) -> Option<Priced> {
        let mut used = self.used.clone();
        for (slot, k, tasks) in &changes {
            if let Slot::Old(r) = slot {
                used[self.seqs[*r].k] -= 1;
            }
            if !tasks.is_empty() {
                used[*k] += 1;
            }
        }
        let counts_ok = self
            .tables
            .types
            .iter()
            .zip(&used)
            .all(|(t, &u)| t.ty.count.is_none_or(|c| u <= c));
        if !counts_ok {
            return None;
        }
        let mut exact = true;
        let mut out = Vec::with_capacity(changes.len());
        for (slot, k, tasks) in changes {
            let known = memo.iter().find(|m| m.0 == k && m.1 == tasks);
            let (front, ex) = match known {
                Some(m) => (m.2.clone(), m.3),
                None => {
                    let prefix = self.prefix(slot, k, &tasks);
                    let (f, ex, _) = route_price(self.inst, self.tables, k, &tasks, prefix, false);
                    if memo.len() < 4 {
                        memo.push((k, tasks.clone(), f.clone(), ex));
                    }
                    (f, ex)
                }
            };
            exact &= ex;
            if front.is_empty() {
                return None;
            }
            out.push((slot, k, tasks, front));
        }
        let changed = |r: usize| out.iter().any(|c| c.0 == Slot::Old(r));
        let fronts = self
            .seqs
            .iter()
            .enumerate()
            .filter(|&(r, _)| !changed(r))
            .map(|(_, s)| s.front.as_slice())
            .chain(
                out.iter()
                    .filter(|c| !c.2.is_empty())
                    .map(|c| c.3.as_slice()),
            );
        let (objective, _, _) = value(fronts, self.weight);
        Some(Priced {
            changes: out,
            objective,
            exact,
        })
    }

    /// Applies a priced move.
    fn apply(&mut self, p: Priced) {
        let mut seqs = Vec::with_capacity(p.changes.len());
        for (slot, k, tasks, front) in p.changes {
            let prefix = self.prefix(slot, k, &tasks);
            let (_, _, stages) = route_price(self.inst, self.tables, k, &tasks, prefix, true);
            let seq = Seq {
                k,
                tasks,
                front,
                stages: Arc::new(stages.unwrap_or_default()),
            };
            seqs.push((slot, seq));
        }
        for (slot, seq) in seqs {
            match slot {
                Slot::Old(r) => {
                    self.used[self.seqs[r].k] -= 1;
                    if !seq.tasks.is_empty() {
                        self.used[seq.k] += 1;
                    }
                    self.seqs[r] = seq;
                }
                Slot::New => {
                    if !seq.tasks.is_empty() {
                        self.used[seq.k] += 1;
                        self.seqs.push(seq);
                    }
                }
            }
        }
        self.seqs.retain(|s| !s.tasks.is_empty());
        self.exact &= p.exact;
        self.refresh();
    }

    /// The moves of task `u` towards task `v` (see the module docs), as
    /// route changes.
    fn moves_towards(&self, u: usize, v: usize) -> Vec<Vec<Change>> {
        let (ra, ia) = self.pos[u];
        let (rb, ib) = self.pos[v];
        let (a, b) = (&self.seqs[ra], &self.seqs[rb]);
        let mut out = Vec::new();
        if ra == rb {
            let t = &a.tasks;
            for after in [true, false] {
                let mut s = t.clone();
                s.remove(ia);
                let at = s.iter().position(|&x| x == v).expect("v") + usize::from(after);
                s.insert(at, u);
                if s != *t {
                    out.push(vec![(Slot::Old(ra), a.k, s)]);
                }
            }
            let mut s = t.clone();
            s.swap(ia, ib);
            out.push(vec![(Slot::Old(ra), a.k, s)]);
            let (lo, hi) = (ia.min(ib), ia.max(ib));
            if hi > lo + 1 {
                let mut s = t.clone();
                s[lo + 1..=hi].reverse();
                out.push(vec![(Slot::Old(ra), a.k, s)]);
            }
            return out;
        }
        let mut a_less = a.tasks.clone();
        a_less.remove(ia);
        for after in [true, false] {
            let mut s = b.tasks.clone();
            s.insert(ib + usize::from(after), u);
            out.push(vec![
                (Slot::Old(ra), a.k, a_less.clone()),
                (Slot::Old(rb), b.k, s),
            ]);
        }
        let (mut sa, mut sb) = (a.tasks.clone(), b.tasks.clone());
        sa[ia] = v;
        sb[ib] = u;
        out.push(vec![(Slot::Old(ra), a.k, sa), (Slot::Old(rb), b.k, sb)]);
        // 2-opt*: tails exchanged, or heads joined and tails joined.
        let (ah, at) = a.tasks.split_at(ia + 1);
        let (bh, bt) = b.tasks.split_at(ib + 1);
        let join =
            |x: &[usize], y: &[usize]| -> Vec<usize> { x.iter().chain(y).copied().collect() };
        out.push(vec![
            (Slot::Old(ra), a.k, join(ah, bt)),
            (Slot::Old(rb), b.k, join(bh, at)),
        ]);
        let rev = |x: &[usize]| -> Vec<usize> { x.iter().rev().copied().collect() };
        out.push(vec![
            (Slot::Old(ra), a.k, join(ah, &rev(bh))),
            (Slot::Old(rb), b.k, join(&rev(at), bt)),
        ]);
        out
    }

    /// Moves of `u` alone: to a new route of each type with a truck left
    /// and, when `u` starts its route, that route changed to each other type.
    fn moves_alone(&self, u: usize) -> Vec<Vec<Change>> {
        let (ra, ia) = self.pos[u];
        let a = &self.seqs[ra];
        let mut out = Vec::new();
        for k in 0..self.tables.types.len() {
            if !self.tables.types[k].serves[u] {
                continue;
            }
            if a.tasks.len() > 1 {
                let mut rest = a.tasks.clone();
                rest.remove(ia);
                out.push(vec![(Slot::Old(ra), a.k, rest), (Slot::New, k, vec![u])]);
            }
            if ia == 0 && k != a.k {
                out.push(vec![(Slot::Old(ra), k, a.tasks.clone())]);
            }
        }
        out
    }

    /// The first strictly improving move of `u` (towards its nearest
    /// tasks first, then alone), applied; returns the other task of the
    /// move (`u` itself for a move alone), or `None`. Counts the moves priced.
    fn improve_task(&mut self, u: usize, near: &[usize], priced: &mut u64) -> Option<usize> {
        let mut tries: Vec<(usize, Vec<Change>)> = Vec::new();
        for &v in near {
            if v != u {
                tries.extend(self.moves_towards(u, v).into_iter().map(|m| (v, m)));
            }
        }
        tries.extend(self.moves_alone(u).into_iter().map(|m| (u, m)));
        let mut memo = Memo::new();
        for (v, m) in tries {
            *priced += 1;
            if let Some(p) = self.price(m, &mut memo) {
                if p.objective < self.objective {
                    self.apply(p);
                    return Some(v);
                }
            }
        }
        None
    }

    /// Descends from the plan to a local optimum of the moves, looking first
    /// at the tasks of `start` and their nearest (all tasks when `start` is
    /// empty); after a move, at its two tasks and their nearest. Stops early
    /// at the limits. Returns the number of improving moves and of moves
    /// priced.
    pub fn descend(&mut self, near: &[Vec<usize>], start: &[usize], limits: &Limits) -> (u64, u64) {
        let n = self.inst.tasks().len();
        let mut queued = vec![false; n];
        let mut queue: VecDeque<usize> = VecDeque::new();
        let enqueue = |queue: &mut VecDeque<usize>, queued: &mut Vec<bool>, t: usize| {
            if !queued[t] {
                queued[t] = true;
                queue.push_back(t);
            }
        };
        if start.is_empty() {
            for u in 0..n {
                enqueue(&mut queue, &mut queued, u);
            }
        }
        for &u in start {
            for t in std::iter::once(u).chain(near[u].iter().copied()) {
                enqueue(&mut queue, &mut queued, t);
            }
        }
        let (mut improving, mut priced) = (0, 0);
        while let Some(u) = queue.pop_front() {
            queued[u] = false;
            if limits.hit() {
                break;
            }
            if let Some(v) = self.improve_task(u, &near[u], &mut priced) {
                improving += 1;
                for x in [u, v] {
                    for t in std::iter::once(x).chain(near[x].iter().copied()) {
                        enqueue(&mut queue, &mut queued, t);
                    }
                }
            }
        }
        (improving, priced)
    }

    /// A random perturbation: up to `count` random moves of near tasks, each
    /// kept whatever its price when it is feasible. Returns the tasks moved.
    pub fn perturb(
        &mut self,
        near: &[Vec<usize>],
        rng: &mut ChaCha12Rng,
        count: usize,
    ) -> Vec<usize> {
        let n = self.inst.tasks().len();
        let mut moved = Vec::new();
        if n < 2 {
            return moved;
        }
        for _ in 0..count {
            let u = rng.random_range(0..n);
            let v = near[u][rng.random_range(0..near[u].len())];
            if v == u {
                continue;
            }
            let mut m = self.moves_towards(u, v);
            if m.is_empty() {
                continue;
            }
            let pick = rng.random_range(0..m.len());
            if let Some(p) = self.price(m.swap_remove(pick), &mut Memo::new()) {
                self.apply(p);
                moved.extend([u, v]);
            }
        }
        moved
    }
}
