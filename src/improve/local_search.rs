//! Local search on task sequences with neighbour lists and constant-time
//! move evaluation.
//!
//! Moves (for a task `u` and each task `v` among `u`'s nearest neighbours by
//! deadhead):
//! - *exchange* of a segment of 1–3 tasks starting at `u` with a segment of
//!   0–3 tasks right after (or right before) `v` in another route: covers
//!   relocate of one and two tasks, swap and cross-exchange;
//! - *relocate* of 1–3 tasks within a route (after or before `v`);
//! - intra-route *2-opt* (reversing the stretch between `u` and `v`) and the
//!   flip of a single task's direction;
//! - inter-route *2-opt\** in both forms (tails exchanged as they are, or
//!   with both halves reversed, which undirected tasks allow);
//! - moving one or two tasks to an empty route (when the fleet allows one).
//!
//! Every moved segment is tried in both directions (reversing a segment
//! flips the service direction of each task in it), so the directions of
//! moved tasks are re-optimised. Evaluation is `O(1)` per candidate: each
//! route keeps prefix sums of deadhead cost (forward and reversed), service
//! cost, time and load, so any new route is a concatenation of at most five
//! stretches of old routes, each summarised in constant time (in the spirit
//! of the segment concatenation of Vidal et al. 2014). A move is applied
//! when it lowers the total cost and keeps every route within capacity and
//! shift limit (first improvement). Pairs whose routes did not change since
//! `u` was last examined are skipped.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Instant;

use rand::seq::SliceRandom;
use rand::Rng;

use crate::construct::arcs::ArcMatrix;

/// Segment lengths (moved from `u`'s route, displaced at `v`) of the exchange moves.
const EXCHANGES: &[(usize, usize)] = &[(1, 0), (2, 0), (1, 1), (2, 1), (1, 2), (2, 2), (3, 0)];

/// Default neighbour-list size.
pub const DEFAULT_NEIGHBOURS: usize = 8;

/// For each task, its `k` nearest other tasks by [`ArcMatrix::task_gap`].
pub fn neighbour_lists(m: &ArcMatrix, k: usize) -> Vec<Vec<u32>> {
    use rayon::prelude::*;
    (0..m.n)
        .into_par_iter()
        .map(|u| {
            let mut v: Vec<(i64, u32)> = (0..m.n)
                .filter(|&v| v != u)
                .map(|v| (m.task_gap(u, v), v as u32))
                .collect();
            let k = k.min(v.len());
            if k > 0 && k < v.len() {
                v.select_nth_unstable(k - 1);
                v.truncate(k);
            }
            v.sort_unstable();
            v.into_iter().map(|(_, x)| x).collect()
        })
        .collect()
}

/// Cheapest deadhead cost of putting stretch `i0..=i1` of `rd` between arcs
/// `l` and `r`, in its better orientation (internal deadheads included;
/// reversal allowed or not, this is a lower bound).
#[inline(always)]
fn ins_at(m: &ArcMatrix, l: u32, r: u32, rd: &RouteData, i0: usize, i1: usize) -> i64 {
    let (f, t) = (rd.arcs[i0], rd.arcs[i1]);
    let fwd = m.d(l, f) + (rd.pre[i1].pd - rd.pre[i0].pd) + m.d(t, r);
    let rev = m.d(l, t ^ 1) + (rd.pre[i1].rpd - rd.pre[i0].rpd) + m.d(f ^ 1, r);
    fwd.min(rev)
}

#[derive(Clone, Copy, Debug)]
struct Seg {
    first: u32,
    last: u32,
    cost: i64,
    time: i64,
    load: i64,
}

#[derive(Clone, Copy, Debug)]
struct Piece {
    r: u32,
    i: u32,
    j: u32,
    rev: bool,
}

fn piece(r: usize, i: usize, j: usize, rev: bool) -> Piece {
    Piece {
        r: r as u32,
        i: i as u32,
        j: j as u32,
        rev,
    }
}

/// Prefix sums at one position of a route (one cache line).
#[derive(Clone, Copy, Debug, Default)]
struct Pre {
    /// Deadhead cost a0->a1->..->ak.
    pd: i64,
    /// Sum over m=1..=k of d(rev a_m, rev a_{m-1}).
    rpd: i64,
    /// Service cost of a0..=ak.
    ps: i64,
    /// The same three for times.
    td: i64,
    rtd: i64,
    pst: i64,
    /// Load of a0..=ak.
    pl: i64,
    /// Number of one-direction tasks among a0..=ak.
    pf: i64,
}

#[derive(Clone, Debug, Default)]
struct RouteData {
    arcs: Vec<u32>,
    pre: Vec<Pre>,
    cost: i64,
    time: i64,
    load: i64,
    modified: u64,
}

/// The result of one descent of [`LocalSearch::run`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Descent {
    /// The improved routes, as task arcs.
    pub routes: Vec<Vec<u32>>,
    /// Their true (unpenalised) total cost.
    pub cost: i64,
    /// Whether every route respects capacity and shift limit.
    pub feasible: bool,
}

/// Reusable local-search engine.
pub struct LocalSearch<'m> {
    m: &'m ArcMatrix,
    neigh: &'m [Vec<u32>],
    routes: Vec<RouteData>,
    pos: Vec<(u32, u32)>,
    last_tested: Vec<u64>,
    clock: u64,
    order: Vec<usize>,
    /// Moves applied in the last run (for statistics).
    pub moves: u64,
    pen_load: i64,
    pen_time: i64,
    deadline: Option<Instant>,
    stop: Option<Arc<AtomicBool>>,
}

const INFEASIBLE: i64 = i64::MAX / 4;

/// Internal costs are scaled by this factor so that penalty weights can be
/// fractional per unit of excess.
pub const SCALE: i64 = 100;

impl<'m> LocalSearch<'m> {
    /// A new engine over a matrix and its neighbour lists.
    pub fn new(m: &'m ArcMatrix, neigh: &'m [Vec<u32>]) -> Self {
        LocalSearch {
            m,
            neigh,
            routes: Vec::new(),
            pos: vec![(0, 0); m.n],
            last_tested: vec![0; m.n],
            clock: 1,
            order: (0..m.n).collect(),
            deadline: None,
            stop: None,
            moves: 0,
            pen_load: 0,
            pen_time: 0,
        }
    }

    /// Penalty weights (in 1/[`SCALE`] cost units per unit of excess load and
    /// excess time). With both 0 (the default) every route must stay within
    /// capacity and shift; otherwise excesses are allowed at that price.
    pub fn set_penalties(&mut self, load: i64, time: i64) {
        self.pen_load = load;
        self.pen_time = time;
    }

    #[inline(always)]
    fn penalised(&self, cost: i64, load: i64, time: i64) -> i64 {
        let m = self.m;
        let mut v = cost * SCALE;
        if load > m.capacity {
            if self.pen_load == 0 {
                return INFEASIBLE;
            }
            v += self.pen_load * (load - m.capacity);
        }
        if let Some(sh) = m.shift {
            if time > sh {
                if self.pen_time == 0 {
                    return INFEASIBLE;
                }
                v += self.pen_time * (time - sh);
            }
        }
        v
    }

    fn rebuild(&mut self, r: usize) {
        let m = self.m;
        let rd = &mut self.routes[r];
        let len = rd.arcs.len();
        rd.pre.clear();
        rd.pre.resize(len, Pre::default());
        for k in 1..len {
            let (a, b) = (rd.arcs[k - 1], rd.arcs[k]);
            rd.pre[k].pd = rd.pre[k - 1].pd + m.d(a, b);
            rd.pre[k].rpd = rd.pre[k - 1].rpd + m.d(b ^ 1, a ^ 1);
            rd.pre[k].ps = rd.pre[k - 1].ps + m.serve_cost[b as usize];
            rd.pre[k].td = rd.pre[k - 1].td + m.t(a, b);
            rd.pre[k].rtd = rd.pre[k - 1].rtd + m.t(b ^ 1, a ^ 1);
            rd.pre[k].pst = rd.pre[k - 1].pst + m.serve_time[b as usize];
            rd.pre[k].pl = rd.pre[k - 1].pl + m.demand[b as usize];
            rd.pre[k].pf = rd.pre[k - 1].pf + (!m.allowed[(b ^ 1) as usize]) as i64;
        }
        let (c, t, l) = (
            rd.pre[len - 1].pd + rd.pre[len - 1].ps,
            rd.pre[len - 1].td + rd.pre[len - 1].pst,
            rd.pre[len - 1].pl,
        );
        let pc = self.penalised(c, l, t);
        let rd = &mut self.routes[r];
        rd.time = t;
        rd.load = l;
        rd.cost = pc;
        rd.modified = self.clock;
        for k in 1..len - 1 {
            self.pos[ArcMatrix::task(rd.arcs[k])] = (r as u32, k as u32);
        }
    }

    #[inline(always)]
    fn seg(&self, p: Piece) -> Option<Seg> {
        let rd = &self.routes[p.r as usize];
        let (i, j) = (p.i as usize, p.j as usize);
        let m = self.m;
        let (fa, la) = (rd.arcs[i], rd.arcs[j]);
        let serv = rd.pre[j].ps - rd.pre[i].ps + m.serve_cost[fa as usize];
        let stime = rd.pre[j].pst - rd.pre[i].pst + m.serve_time[fa as usize];
        let load = rd.pre[j].pl - rd.pre[i].pl + m.demand[fa as usize];
        if !p.rev {
            Some(Seg {
                first: fa,
                last: la,
                cost: rd.pre[j].pd - rd.pre[i].pd + serv,
                time: rd.pre[j].td - rd.pre[i].td + stime,
                load,
            })
        } else {
            if rd.pre[j].pf - rd.pre[i].pf + (!m.allowed[(fa ^ 1) as usize]) as i64 > 0 {
                return None;
            }
            Some(Seg {
                first: la ^ 1,
                last: fa ^ 1,
                cost: rd.pre[j].rpd - rd.pre[i].rpd + serv,
                time: rd.pre[j].rtd - rd.pre[i].rtd + stime,
                load,
            })
        }
    }

    /// Cost of the route made of `pieces`, or [`INFEASIBLE`].
    #[inline(always)]
    fn eval(&self, pieces: &[Piece]) -> i64 {
        let m = self.m;
        let mut acc = match self.seg(pieces[0]) {
            Some(s) => s,
            None => return INFEASIBLE,
        };
        for &p in &pieces[1..] {
            if p.i > p.j {
                continue;
            }
            let s = match self.seg(p) {
                Some(s) => s,
                None => return INFEASIBLE,
            };
            acc.cost += m.d(acc.last, s.first) + s.cost;
            if m.timed() {
                acc.time += m.t(acc.last, s.first) + s.time;
            }
            acc.load += s.load;
            acc.last = s.last;
        }
        self.penalised(acc.cost, acc.load, acc.time)
    }

    fn materialize(&mut self, pieces: &[Piece]) -> Vec<u32> {
        let mut out = Vec::new();
        for p in pieces {
            if p.i > p.j {
                continue;
            }
            let a = &self.routes[p.r as usize].arcs;
            if p.rev {
                out.extend((p.i..=p.j).rev().map(|k| a[k as usize] ^ 1));
            } else {
                out.extend_from_slice(&a[p.i as usize..=p.j as usize]);
            }
        }
        let d = self.m.depot;
        let l = out.len();
        out[0] = d;
        out[l - 1] = d;
        out
    }

    fn apply(&mut self, changes: &[(usize, &[Piece])]) {
        let new: Vec<(usize, Vec<u32>)> = changes
            .iter()
            .map(|(r, p)| (*r, self.materialize(p)))
            .collect();
        self.clock += 1;
        self.moves += 1;
        let mut filled = false;
        for (r, arcs) in new {
            filled |= self.routes[r].arcs.len() == 2 && arcs.len() > 2;
            self.routes[r].arcs = arcs;
            self.rebuild(r);
        }
        if filled && self.empty_route().is_none() {
            let used = self.routes.len();
            if self.m.max_routes.is_none_or(|k| used < k) {
                self.routes.push(RouteData {
                    arcs: vec![self.m.depot, self.m.depot],
                    ..Default::default()
                });
                let r = self.routes.len() - 1;
                self.rebuild(r);
            }
        }
    }

    /// Loads routes (task arcs, no depot arcs).
    fn load(&mut self, routes: &[Vec<u32>]) {
        self.routes.clear();
        let d = self.m.depot;
        for r in routes.iter().filter(|r| !r.is_empty()) {
            let mut arcs = Vec::with_capacity(r.len() + 2);
            arcs.push(d);
            arcs.extend_from_slice(r);
            arcs.push(d);
            self.routes.push(RouteData {
                arcs,
                ..Default::default()
            });
        }
        for r in 0..self.routes.len() {
            self.rebuild(r);
        }
        self.ensure_empty();
    }

    /// Keeps exactly one empty route when the fleet bound allows it.
    fn ensure_empty(&mut self) {
        let empties: Vec<usize> = (0..self.routes.len())
            .filter(|&r| self.routes[r].arcs.len() == 2)
            .collect();
        let used = self.routes.len() - empties.len();
        let want = usize::from(self.m.max_routes.is_none_or(|k| used < k));
        if empties.len() == want {
            return;
        }
        // Remove all empties, then add one if wanted.
        let keep: Vec<RouteData> = std::mem::take(&mut self.routes)
            .into_iter()
            .filter(|r| r.arcs.len() > 2)
            .collect();
        self.routes = keep;
        if want == 1 {
            self.routes.push(RouteData {
                arcs: vec![self.m.depot, self.m.depot],
                ..Default::default()
            });
        }
        for r in 0..self.routes.len() {
            self.rebuild(r);
        }
    }

    /// Current routes as task arcs.
    pub fn routes(&self) -> Vec<Vec<u32>> {
        self.routes
            .iter()
            .filter(|r| r.arcs.len() > 2)
            .map(|r| r.arcs[1..r.arcs.len() - 1].to_vec())
            .collect()
    }

    /// Current total cost (unpenalised) and whether every route is feasible.
    pub fn cost(&self) -> (i64, bool) {
        let mut total = 0;
        let mut ok = true;
        for r in &self.routes {
            let len = r.arcs.len();
            total += r.pre[len - 1].pd + r.pre[len - 1].ps;
            ok &= r.load <= self.m.capacity && self.m.shift.is_none_or(|s| r.time <= s);
        }
        (total, ok)
    }

    /// Makes [`LocalSearch::run`] return early (with the routes as they are
    /// then) once `deadline` has passed or `stop` is raised. Checked every
    /// few hundred tasks, so only the stop of the search depends on time.
    pub fn interrupt_at(&mut self, deadline: Option<Instant>, stop: Option<Arc<AtomicBool>>) {
        self.deadline = deadline;
        self.stop = stop;
    }

    fn interrupted(&self) -> bool {
        self.deadline.is_some_and(|d| Instant::now() >= d)
            || self
                .stop
                .as_ref()
                .is_some_and(|f| f.load(Ordering::Relaxed))
    }

    /// Improves `routes` until no move improves the (penalised) cost; returns
    /// the routes, their true cost and whether all are feasible.
    pub fn run<R: Rng>(&mut self, routes: &[Vec<u32>], rng: &mut R) -> Descent {
        self.load(routes);
        self.moves = 0;
        self.last_tested.iter_mut().for_each(|x| *x = 0);
        self.clock = 1;
        for r in 0..self.routes.len() {
            self.routes[r].modified = 1;
        }
        let mut order = std::mem::take(&mut self.order);
        order.shuffle(rng);
        let mut pass = 0;
        let watch = self.deadline.is_some() || self.stop.is_some();
        'descent: loop {
            let mut improved = false;
            for (k, &u) in order.iter().enumerate() {
                if watch && k % 256 == 255 && self.interrupted() {
                    break 'descent;
                }
                let tested = self.last_tested[u];
                self.last_tested[u] = self.clock;
                let nb = self.neigh[u].len();
                for vi in 0..nb {
                    let v = self.neigh[u][vi] as usize;
                    let (ru, _) = self.pos[u];
                    let (rv, _) = self.pos[v];
                    if pass > 0
                        && self.routes[ru as usize]
                            .modified
                            .max(self.routes[rv as usize].modified)
                            <= tested
                    {
                        continue;
                    }
                    if self.try_pair(u, v) {
                        improved = true;
                    }
                }
                if (pass == 0 || self.routes[self.pos[u].0 as usize].modified > tested)
                    && self.try_alone(u)
                {
                    improved = true;
                }
            }
            pass += 1;
            if !improved {
                break;
            }
        }
        self.order = order;
        self.ensure_empty();
        let (cost, feasible) = self.cost();
        Descent {
            routes: self.routes(),
            cost,
            feasible,
        }
    }

    /// Loads `routes` and evaluates, without applying any, every relocation
    /// of one task (both directions) right after each of its neighbours in
    /// another route; returns the number of candidates evaluated and the
    /// best (most negative) change of total cost. For benchmarks of the
    /// constant-time evaluation.
    pub fn scan_relocations(&mut self, routes: &[Vec<u32>]) -> (usize, i64) {
        self.load(routes);
        let mut count = 0;
        let mut best = 0;
        for u in 0..self.m.n {
            let (ru, i) = self.pos[u];
            let (ru, i) = (ru as usize, i as usize);
            let lu = self.routes[ru].arcs.len();
            let pu = [piece(ru, 0, i - 1, false), piece(ru, i + 1, lu - 1, false)];
            let cu = self.eval(&pu) - self.routes[ru].cost;
            for &v in &self.neigh[u] {
                let (rv, j) = self.pos[v as usize];
                let (rv, j) = (rv as usize, j as usize);
                if rv == ru {
                    continue;
                }
                let lv = self.routes[rv].arcs.len();
                for rev in [false, true] {
                    let pv = [
                        piece(rv, 0, j, false),
                        piece(ru, i, i, rev),
                        piece(rv, j + 1, lv - 1, false),
                    ];
                    let c = self.eval(&pv);
                    count += 1;
                    if c < INFEASIBLE {
                        best = best.min(cu + c - self.routes[rv].cost);
                    }
                }
            }
        }
        (count, best / SCALE)
    }

    fn empty_route(&self) -> Option<usize> {
        self.routes.iter().position(|r| r.arcs.len() == 2)
    }

    /// Moves of `u` alone: flip its direction, move it (with its successor) to an empty route.
    fn try_alone(&mut self, u: usize) -> bool {
        let (ru, i) = self.pos[u];
        let (ru, i) = (ru as usize, i as usize);
        let len = self.routes[ru].arcs.len();
        let old = self.routes[ru].cost;
        let p = [
            piece(ru, 0, i - 1, false),
            piece(ru, i, i, true),
            piece(ru, i + 1, len - 1, false),
        ];
        if self.eval(&p) < old {
            self.apply(&[(ru, &p)]);
            return true;
        }
        if let Some(re) = self.empty_route() {
            if len > 3 {
                for l1 in 1..=2usize {
                    if self.try_exchange(ru, i, l1, re, 0, 0, true) {
                        return true;
                    }
                }
            }
        }
        false
    }

    fn try_pair(&mut self, u: usize, v: usize) -> bool {
        let (ru, i) = self.pos[u];
        let (rv, j) = self.pos[v];
        let (ru, i, rv, j) = (ru as usize, i as usize, rv as usize, j as usize);
        if ru != rv {
            for &(l1, l2) in EXCHANGES {
                if self.try_exchange(ru, i, l1, rv, j, l2, true)
                    || (l2 <= l1.min(1) && self.try_exchange(ru, i, l1, rv, j, l2, false))
                {
                    return true;
                }
            }
            self.try_two_opt_star(ru, i, rv, j)
        } else {
            for l1 in 1..=3 {
                if self.try_intra_relocate(ru, i, l1, j)
                    || (j > 1 && self.try_intra_relocate(ru, i, l1, j - 1))
                {
                    return true;
                }
            }
            self.try_two_opt(ru, i, j)
        }
    }

    /// Segment A = U[i..i+l1) goes after (or before) v at V[j]; the l2 tasks
    /// it displaces there go where A was.
    #[allow(clippy::too_many_arguments)]
    fn try_exchange(
        &mut self,
        ru: usize,
        i: usize,
        l1: usize,
        rv: usize,
        j: usize,
        l2: usize,
        after: bool,
    ) -> bool {
        let lu = self.routes[ru].arcs.len();
        let lv = self.routes[rv].arcs.len();
        if i + l1 > lu - 1 {
            return false;
        }
        let (b0, b1) = if after {
            if j + l2 > lv - 2 {
                return false;
            }
            (j + 1, j + l2)
        } else {
            if j < l2 + 1 {
                return false;
            }
            (j - l2, j - 1)
        };
        let (a0, a1) = (i, i + l1 - 1);
        // Quick load test.
        let cap = self.m.capacity;
        let (ru_d, rv_d) = (&self.routes[ru], &self.routes[rv]);
        let load_a = ru_d.pre[a1].pl - ru_d.pre[a0 - 1].pl;
        let load_b = if l2 > 0 {
            rv_d.pre[b1].pl - rv_d.pre[b0 - 1].pl
        } else {
            0
        };
        let cap = if self.pen_load == 0 {
            cap
        } else {
            cap + cap / 2
        };
        if ru_d.load - load_a + load_b > cap || rv_d.load - load_b + load_a > cap {
            return false;
        }
        let old = ru_d.cost + rv_d.cost;
        if !self.m.timed() && self.exchange_cannot_gain(ru, rv, (a0, a1), (b0, b1), l2 == 0) {
            return false;
        }
        let mut best_v = INFEASIBLE;
        let mut pv_best = [piece(0, 0, 0, false); 3];
        for rev in [false, true] {
            let pv = if after {
                [
                    piece(rv, 0, j, false),
                    piece(ru, a0, a1, rev),
                    piece(rv, j + l2 + 1, lv - 1, false),
                ]
            } else {
                [
                    piece(rv, 0, j - l2 - 1, false),
                    piece(ru, a0, a1, rev),
                    piece(rv, j, lv - 1, false),
                ]
            };
            let c = self.eval(&pv);
            if c < best_v {
                best_v = c;
                pv_best = pv;
            }
        }
        if best_v >= INFEASIBLE {
            return false;
        }
        let mut best_u = INFEASIBLE;
        let mut pu_best = [piece(0, 0, 0, false); 3];
        let revs: &[bool] = if l2 == 0 { &[false] } else { &[false, true] };
        for &rev in revs {
            let pu = [
                piece(ru, 0, a0 - 1, false),
                if l2 == 0 {
                    piece(rv, 1, 0, false)
                } else {
                    piece(rv, b0, b1, rev)
                },
                piece(ru, a1 + 1, lu - 1, false),
            ];
            let c = self.eval(&pu);
            if c < best_u {
                best_u = c;
                pu_best = pu;
            }
        }
        if best_u >= INFEASIBLE || best_u + best_v >= old {
            return false;
        }
        self.apply(&[(ru, &pu_best), (rv, &pv_best)]);
        true
    }

    /// For [`LocalSearch::try_exchange`] without times: whether a lower
    /// bound on the change of moving `ru[a0..=a1]` and `rv[b0..=b1]` (empty
    /// when `empty_b`) across shows that it cannot gain. Exact without
    /// reversals: service costs only move between routes, so only the
    /// deadheads at the cut points, the internal deadheads (best
    /// orientation) and the load penalties change.
    #[inline(always)]
    fn exchange_cannot_gain(
        &self,
        ru: usize,
        rv: usize,
        (a0, a1): (usize, usize),
        (b0, b1): (usize, usize),
        empty_b: bool,
    ) -> bool {
        let m = self.m;
        let (ru_d, rv_d) = (&self.routes[ru], &self.routes[rv]);
        let load_a = ru_d.pre[a1].pl - ru_d.pre[a0 - 1].pl;
        let load_b = if empty_b {
            0
        } else {
            rv_d.pre[b1].pl - rv_d.pre[b0 - 1].pl
        };
        let (ua, va) = (&ru_d.arcs, &rv_d.arcs);
        let (ul, ur) = (ua[a0 - 1], ua[a1 + 1]);
        let (vl, vr) = (va[b0 - 1], va[b1 + 1]);
        let rem_a = m.d(ul, ua[a0]) + (ru_d.pre[a1].pd - ru_d.pre[a0].pd) + m.d(ua[a1], ur);
        let ins_a = ins_at(m, vl, vr, ru_d, a0, a1);
        let (rem_b, ins_b) = if empty_b {
            (m.d(vl, vr), m.d(ul, ur))
        } else {
            (
                m.d(vl, va[b0]) + (rv_d.pre[b1].pd - rv_d.pre[b0].pd) + m.d(va[b1], vr),
                ins_at(m, ul, ur, rv_d, b0, b1),
            )
        };
        let pen = |load: i64| self.pen_load * (load - m.capacity).max(0);
        let dpen = pen(ru_d.load - load_a + load_b) + pen(rv_d.load - load_b + load_a)
            - pen(ru_d.load)
            - pen(rv_d.load);
        (ins_a + ins_b - rem_a - rem_b) * SCALE + dpen >= 0
    }

    fn try_two_opt_star(&mut self, ru: usize, i: usize, rv: usize, j: usize) -> bool {
        let lu = self.routes[ru].arcs.len();
        let lv = self.routes[rv].arcs.len();
        let old = self.routes[ru].cost + self.routes[rv].cost;
        let cap = self.m.capacity;
        let cap = if self.pen_load == 0 {
            cap
        } else {
            cap + cap / 2
        };
        let (ud, vd) = (&self.routes[ru], &self.routes[rv]);
        let (uh, vh) = (ud.pre[i].pl, vd.pre[j - 1].pl);
        let m = self.m;
        let pen = |load: i64| self.pen_load * (load - m.capacity).max(0);
        let old_pen = pen(ud.load) + pen(vd.load);
        let (ua, va) = (&ud.arcs, &vd.arcs);
        let old_dead = ud.pre[lu - 1].pd + vd.pre[lv - 1].pd;
        // Exact change without times: service costs only move between routes.
        let gain_a = if m.timed() {
            -1
        } else {
            let nu = ud.pre[i].pd + m.d(ua[i], va[j]) + vd.pre[lv - 1].pd - vd.pre[j].pd;
            let nv =
                vd.pre[j - 1].pd + m.d(va[j - 1], ua[i + 1]) + ud.pre[lu - 1].pd - ud.pre[i + 1].pd;
            (nu + nv - old_dead) * SCALE + pen(uh + vd.load - vh) + pen(vh + ud.load - uh) - old_pen
        };
        // (a) U[..=i] + V[j..], V[..j) + U[i+1..]
        if gain_a < 0 && uh + vd.load - vh <= cap && vh + ud.load - uh <= cap {
            let pa_u = [piece(ru, 0, i, false), piece(rv, j, lv - 1, false)];
            let pa_v = [piece(rv, 0, j - 1, false), piece(ru, i + 1, lu - 1, false)];
            let ca = self.eval(&pa_u);
            if ca < INFEASIBLE {
                let cb = self.eval(&pa_v);
                if cb < INFEASIBLE && ca + cb < old {
                    self.apply(&[(ru, &pa_u), (rv, &pa_v)]);
                    return true;
                }
            }
        }
        // (b) U[..=i] + rev V[..=j], rev U[i+1..] + V[j+1..]
        let (ud, vd) = (&self.routes[ru], &self.routes[rv]);
        let vh = vd.pre[j].pl;
        if uh + vh > cap || ud.load - uh + vd.load - vh > cap {
            return false;
        }
        if !m.timed() {
            let (ua, va) = (&ud.arcs, &vd.arcs);
            let nu = ud.pre[i].pd + m.d(ua[i], va[j] ^ 1) + vd.pre[j].rpd;
            let nv = ud.pre[lu - 1].rpd - ud.pre[i + 1].rpd
                + m.d(ua[i + 1] ^ 1, va[j + 1])
                + vd.pre[lv - 1].pd
                - vd.pre[j + 1].pd;
            let pen = |load: i64| self.pen_load * (load - m.capacity).max(0);
            let d = (nu + nv - old_dead) * SCALE + pen(uh + vh) + pen(ud.load - uh + vd.load - vh)
                - old_pen;
            if d >= 0 {
                return false;
            }
        }
        let pb_u = [piece(ru, 0, i, false), piece(rv, 0, j, true)];
        let pb_v = [
            piece(ru, i + 1, lu - 1, true),
            piece(rv, j + 1, lv - 1, false),
        ];
        let ca = self.eval(&pb_u);
        if ca < INFEASIBLE {
            let cb = self.eval(&pb_v);
            if cb < INFEASIBLE && ca + cb < old {
                self.apply(&[(ru, &pb_u), (rv, &pb_v)]);
                return true;
            }
        }
        false
    }

    /// Moves R[i..i+l1) to just after position p of the same route.
    fn try_intra_relocate(&mut self, r: usize, i: usize, l1: usize, p: usize) -> bool {
        let len = self.routes[r].arcs.len();
        if i + l1 > len - 1 {
            return false;
        }
        let (a0, a1) = (i, i + l1 - 1);
        if p + 1 >= a0 && p <= a1 {
            return false;
        }
        let old = self.routes[r].cost;
        if !self.m.timed() {
            // Lower bound on the change: same load, only cut deadheads change.
            let m = self.m;
            let rd = &self.routes[r];
            let a = &rd.arcs;
            let rem = m.d(a[a0 - 1], a[a0])
                + (rd.pre[a1].pd - rd.pre[a0].pd)
                + m.d(a[a1], a[a1 + 1])
                + m.d(a[p], a[p + 1]);
            let add = m.d(a[a0 - 1], a[a1 + 1]) + ins_at(m, a[p], a[p + 1], rd, a0, a1);
            if add >= rem {
                return false;
            }
        }
        let mut best = INFEASIBLE;
        let mut bp = [piece(0, 0, 0, false); 4];
        for rev in [false, true] {
            let ps = if p < a0 {
                [
                    piece(r, 0, p, false),
                    piece(r, a0, a1, rev),
                    piece(r, p + 1, a0 - 1, false),
                    piece(r, a1 + 1, len - 1, false),
                ]
            } else {
                [
                    piece(r, 0, a0 - 1, false),
                    piece(r, a1 + 1, p, false),
                    piece(r, a0, a1, rev),
                    piece(r, p + 1, len - 1, false),
                ]
            };
            let c = self.eval(&ps);
            if c < best {
                best = c;
                bp = ps;
            }
        }
        if best < old {
            self.apply(&[(r, &bp)]);
            return true;
        }
        false
    }

    fn try_two_opt(&mut self, r: usize, i: usize, j: usize) -> bool {
        let len = self.routes[r].arcs.len();
        let old = self.routes[r].cost;
        let ps = if i < j {
            [
                piece(r, 0, i, false),
                piece(r, i + 1, j, true),
                piece(r, j + 1, len - 1, false),
            ]
        } else {
            [
                piece(r, 0, j - 1, false),
                piece(r, j, i - 1, true),
                piece(r, i, len - 1, false),
            ]
        };
        if self.eval(&ps) < old {
            self.apply(&[(r, &ps)]);
            return true;
        }
        false
    }
}
