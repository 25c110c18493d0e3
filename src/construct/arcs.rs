//! Dense per-arc matrices for the solver's hot loops.
//!
//! An *arc* is a task served in one direction: task `t` gives arc `2t`
//! (forward, [`Dir::Forward`]) and arc `2t + 1` (backward). Two extra arcs,
//! `2n` and `2n + 1`, both stand for the depot, so that reversing an arc is
//! always `a ^ 1`. `d(a, b)` is the shortest deadhead cost from the end of
//! arc `a` to the start of arc `b`; with a shift limit `t(a, b)` is the
//! driving time along the same path.
//!
//! Two storage layouts, chosen by size:
//! - *by arc* (up to [`DENSE_ARCS`] arcs): one `(2n + 2)²` matrix;
//! - *by key junction* (larger instances): each arc keeps the key index of
//!   its start and end, and one `K × K` matrix over the depot and task ends
//!   holds the deadheads. Street networks have fewer key junctions than arcs
//!   (`K ≈ 0.65 × 2n` in the invented towns), so this takes `4·K²` bytes
//!   (twice that with times) instead of `4·(2n + 2)²`: 0.4 GB instead of
//!   3.7 GB for a town of 10,790 tasks with times.
//!
//! Both layouts are read the same way, `row_of_end[a] + column_of_start[b]`,
//! so the lookup has no branch (measured with `cargo bench --bench kernels`:
//! no change on egl-e4-C against a plain `a * arcs + b`).
//!
//! - *on demand*, when the distances given are
//!   ([`Distances::is_on_demand`], above 8,192 key junctions;
//!   [`TurnDistances::is_on_demand`], above 2,048 streets with turn rules):
//!   no square matrix; each leg is asked of the distances (searched and
//!   cached there), and [`ArcMatrix::restrict`] builds a district's dense
//!   matrix by one search per district junction that stops when every
//!   street of the district is reached. A leg longer than the route-length
//!   check assumed (twice the longest yard leg, see `on_demand`) reads as
//!   missing; without turns no leg is (the way through the yard bounds it).
//!
//! Entries are `i32` (a deadhead of at most [`MAX_LEG`]); a missing path is
//! stored as `-1` and read as [`BIG`] (`2^40`), which no feasible route ever
//! pays: the solver refuses instances on which a route could cost or take
//! `BIG` or more (`SolveError::RouteTooLong`), so a route sum below `BIG` is a
//! real route and one at or above it uses a missing path. Sums stay far from
//! `i64` overflow (a route would need 2^16 missing legs at cost scale 100).

use rayon::prelude::*;

use crate::model::{Cost, Dir, Instance};
use crate::paths::on_demand::Csr;
use crate::paths::{Distances, UNREACHABLE};
use crate::plan::Visit;
use crate::turns::TurnDistances;

/// Read for a missing path: larger than any feasible route (the solver
/// checks), small enough that sums never overflow `i64`.
pub const BIG: i64 = 1 << 40;

/// The longest deadhead the 32-bit matrices store.
pub const MAX_LEG: i64 = i32::MAX as i64;

/// Stored for a missing path.
const MISSING: i32 = -1;

/// Decodes a stored entry: itself, or [`BIG`] for [`MISSING`] (branch-free).
#[inline(always)]
fn decode(x: i32) -> i64 {
    let x = x as i64;
    x + ((x >> 63) & (BIG + 1))
}

/// Largest number of arcs stored in the by-arc layout (64 MiB per matrix).
pub const DENSE_ARCS: usize = 4096;

/// Where the legs of an on-demand matrix come from.
#[derive(Clone, Debug)]
enum Legs {
    /// Plain deadheads between junctions: each arc's start and end junction.
    Junctions {
        dist: Box<Distances>,
        start: Vec<u32>,
        end: Vec<u32>,
        /// The task arcs starting at each junction.
        starting: Csr,
    },
    /// Turn-aware deadheads between task arcs (the yard is `2n`).
    Turns(TurnDistances),
}

/// Each arc's service cost, service time, demand and whether it may be
/// served.
type PerArc = (Vec<i64>, Vec<i64>, Vec<i64>, Vec<bool>);

/// The dense part of an [`ArcMatrix`]: number of keys, key of each arc's
/// start, row offset of each arc's end, costs, times.
type Dense = (usize, Vec<u32>, Vec<usize>, Vec<i32>, Option<Vec<i32>>);

/// Arc-to-arc deadhead costs (and times) plus per-task data: dense
/// matrices, or answered on demand when the distances are
/// ([`Distances::is_on_demand`], [`TurnDistances::is_on_demand`]).
#[derive(Clone, Debug)]
pub struct ArcMatrix {
    /// Number of tasks `n`.
    pub n: usize,
    /// Number of arcs (`2n + 2`).
    pub arcs: usize,
    /// The depot arc (`2n`; `2n + 1` is its twin).
    pub depot: u32,
    /// Number of key junctions `K`.
    keys: usize,
    /// Key index of each arc's start junction.
    kstart: Vec<u32>,
    /// Key index of each arc's end junction, premultiplied by `K` (a row offset).
    kend_row: Vec<usize>,
    cost: Vec<i32>,
    time: Option<Vec<i32>>,
    /// Service cost per arc (0 for the depot).
    pub serve_cost: Vec<i64>,
    /// Service time per arc (0 for the depot).
    pub serve_time: Vec<i64>,
    /// Demand per arc (0 for the depot).
    pub demand: Vec<i64>,
    /// Whether the arc is an allowed service direction (depot arcs: true).
    pub allowed: Vec<bool>,
    /// Truck capacity.
    pub capacity: i64,
    /// Shift limit, if any.
    pub shift: Option<i64>,
    /// Fleet bound, if any.
    pub max_routes: Option<usize>,
    /// On-demand legs (the matrices are then empty).
    legs: Option<Legs>,
    /// On demand: legs above this read as missing ([`BIG`]); the longest
    /// leg the route-length check assumes.
    cap: i64,
}

/// The deadheads do not fit the solver's 32-bit matrix.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct MatrixOverflow {
    /// The offending value.
    pub value: Cost,
}

/// A stored entry for a deadhead of `x`.
fn conv(x: Cost) -> Result<i32, MatrixOverflow> {
    if x >= UNREACHABLE {
        Ok(MISSING)
    } else if x > MAX_LEG {
        Err(MatrixOverflow { value: x })
    } else {
        Ok(x as i32)
    }
}

/// Fills `m` (rows of `cols.len()` entries) with `f(row junction, column
/// junction)`, rows in parallel (rayon); reports the first overflow in row order.
fn fill_rows(
    m: &mut [i32],
    rows: &[usize],
    cols: &[usize],
    f: &(dyn Fn(usize, usize) -> Cost + Sync),
) -> Result<(), MatrixOverflow> {
    let found: Vec<Result<(), MatrixOverflow>> = m
        .par_chunks_mut(cols.len().max(1))
        .zip(rows.par_iter())
        .map(|(row, &u)| {
            for (x, &v) in row.iter_mut().zip(cols) {
                *x = conv(f(u, v))?;
            }
            Ok(())
        })
        .collect();
    found.into_iter().collect()
}

impl ArcMatrix {
    /// Builds the matrices from the instance's shortest paths.
    ///
    /// # Errors
    /// [`MatrixOverflow`] when a deadhead is longer than [`MAX_LEG`].
    pub fn new(inst: &Instance, dist: &Distances) -> Result<Self, MatrixOverflow> {
        let tasks = inst.tasks();
        let n = tasks.len();
        let arcs = 2 * n + 2;
        let depot = inst.depot();
        let mut start = vec![depot; arcs];
        let mut end = vec![depot; arcs];
        let mut serve_cost = vec![0; arcs];
        let mut serve_time = vec![0; arcs];
        let mut demand = vec![0; arcs];
        let mut allowed = vec![true; arcs];
        for (i, t) in tasks.iter().enumerate() {
            for (k, dir) in [Dir::Forward, Dir::Backward].into_iter().enumerate() {
                let a = 2 * i + k;
                let (s, e) = t.ends(dir);
                start[a] = s;
                end[a] = e;
                serve_cost[a] = t.cost;
                serve_time[a] = t.time;
                demand[a] = t.demand;
                allowed[a] = t.allows(dir);
            }
        }
        let timed = inst.fleet().shift_limit.is_some();
        if dist.is_on_demand() {
            let starting = Csr::of(
                inst.network().junctions.len(),
                (0..2 * n).map(|a| (start[a], a as u32)),
            );
            let legs = Legs::Junctions {
                dist: Box::new(dist.clone()),
                start: start.iter().map(|&v| v as u32).collect(),
                end: end.iter().map(|&v| v as u32).collect(),
                starting,
            };
            let per_arc = (serve_cost, serve_time, demand, allowed);
            return Ok(Self::answering(inst, per_arc, legs));
        }
        // Local numbering of the junctions the arcs touch (all are keys of
        // `dist`, which holds at least the depot and the task ends).
        let mut local: Vec<usize> = start.iter().chain(&end).copied().collect();
        local.sort_unstable();
        local.dedup();
        let k = local.len();
        let index = |v: usize| local.binary_search(&v).expect("arc end is a key") as u32;
        let dense = arcs <= DENSE_ARCS;
        // Row offset of each arc's end and column of each arc's start.
        let (kstart, kend_row): (Vec<u32>, Vec<usize>) = if dense {
            (
                (0..arcs as u32).collect(),
                (0..arcs).map(|a| a * arcs).collect(),
            )
        } else {
            (
                start.iter().map(|&v| index(v)).collect(),
                end.iter().map(|&v| index(v) as usize * k).collect(),
            )
        };
        // Row and column junctions of the matrix.
        let (rows, cols): (&[usize], &[usize]) = if dense {
            (&end, &start)
        } else {
            (&local, &local)
        };
        let w = cols.len();
        let mut cost = vec![0i32; rows.len() * w];
        let mut time = if timed {
            vec![0i32; rows.len() * w]
        } else {
            Vec::new()
        };
        fill_rows(&mut cost, rows, cols, &|u, v| dist.cost(u, v))?;
        if timed {
            fill_rows(&mut time, rows, cols, &|u, v| dist.time(u, v))?;
        }
        let per_arc = (serve_cost, serve_time, demand, allowed);
        let dense = (k, kstart, kend_row, cost, timed.then_some(time));
        Ok(Self::assemble(inst, per_arc, dense))
    }

    /// Builds the matrices from turn-aware deadheads ([`TurnDistances`]):
    /// the cost from the end of arc `a` to the start of `b` then depends on
    /// the streets arrived and left on, so the by-arc layout is used at every
    /// size (`4·(2n + 2)²` bytes, twice that with times).
    ///
    /// # Errors
    /// [`MatrixOverflow`] when a deadhead is longer than [`MAX_LEG`].
    pub fn with_turns(inst: &Instance, td: &TurnDistances) -> Result<Self, MatrixOverflow> {
        let n = inst.tasks().len();
        let arcs = 2 * n + 2;
        let mut serve_cost = vec![0; arcs];
        let mut serve_time = vec![0; arcs];
        let mut demand = vec![0; arcs];
        let mut allowed = vec![true; arcs];
        for (i, t) in inst.tasks().iter().enumerate() {
            for (k, dir) in [Dir::Forward, Dir::Backward].into_iter().enumerate() {
                let a = 2 * i + k;
                serve_cost[a] = t.cost;
                serve_time[a] = t.time;
                demand[a] = t.demand;
                allowed[a] = t.allows(dir);
            }
        }
        let timed = inst.fleet().shift_limit.is_some();
        if td.is_on_demand() {
            let per_arc = (serve_cost, serve_time, demand, allowed);
            return Ok(Self::answering(inst, per_arc, Legs::Turns(td.clone())));
        }
        let conv = |x: Cost| -> Result<i32, MatrixOverflow> {
            if x >= UNREACHABLE {
                Ok(MISSING)
            } else if x > MAX_LEG {
                Err(MatrixOverflow { value: x })
            } else {
                Ok(x as i32)
            }
        };
        // Both depot arcs are the yard (row and column 2n of `td`).
        let key = |a: usize| a.min(2 * n);
        let mut cost = vec![0i32; arcs * arcs];
        let mut time = if timed { vec![0i32; arcs * arcs] } else { Vec::new() };
        for a in 0..arcs {
            for b in 0..arcs {
                cost[a * arcs + b] = conv(td.cost(key(a), key(b)))?;
                if timed {
                    time[a * arcs + b] = conv(td.time(key(a), key(b)))?;
                }
            }
        }
        let per_arc = (serve_cost, serve_time, demand, allowed);
        let kstart = (0..arcs as u32).collect();
        let kend_row = (0..arcs).map(|a| a * arcs).collect();
        let dense = (arcs, kstart, kend_row, cost, timed.then_some(time));
        Ok(Self::assemble(inst, per_arc, dense))
    }

    /// Deadhead cost from the end of `a` to the start of `b`.
    #[inline(always)]
    pub fn d(&self, a: u32, b: u32) -> i64 {
        if self.legs.is_some() {
            return self.leg(a, b).0;
        }
        decode(self.cost[self.cell(a, b)])
    }

    /// A matrix of `inst` with no square arrays, answering from `legs`;
    /// `per_arc` is each arc's (service cost, service time, demand,
    /// allowed).
    fn answering(inst: &Instance, per_arc: PerArc, legs: Legs) -> ArcMatrix {
        let dense = (0, Vec::new(), Vec::new(), Vec::new(), None);
        Self::assemble(inst, per_arc, dense).on_demand(legs)
    }

    /// The matrix of `inst` from its per-arc data and its dense part
    /// (number of keys, key of each arc's start, row offset of each arc's
    /// end, costs, times), with the fleet's limits.
    fn assemble(inst: &Instance, per_arc: PerArc, dense: Dense) -> ArcMatrix {
        let (serve_cost, serve_time, demand, allowed) = per_arc;
        let (keys, kstart, kend_row, cost, time) = dense;
        let arcs = serve_cost.len();
        let n = (arcs - 2) / 2;
        ArcMatrix {
            n,
            arcs,
            depot: (2 * n) as u32,
            keys,
            kstart,
            kend_row,
            cost,
            time,
            serve_cost,
            serve_time,
            demand,
            allowed,
            capacity: inst.fleet().capacity,
            shift: inst.fleet().shift_limit,
            max_routes: inst.fleet().max_vehicles,
            legs: None,
            cap: MAX_LEG,
        }
    }

    /// The matrix answering on demand from `legs`, with its length cap set
    /// from the yard's legs (see [`ArcMatrix::longest_legs`]).
    fn on_demand(mut self, legs: Legs) -> ArcMatrix {
        self.legs = Some(legs);
        self.cap = i64::MAX;
        let (d, t) = self.yard_legs();
        // Without turns a leg is at most the way through the yard; with turns
        // (a turn at the yard may be banned) the same bound is assumed and a
        // longer leg reads as missing, which only forgoes such routes.
        self.cap = (2 * d.max(t)).min(MAX_LEG);
        self
    }

    /// The longest leg out of the yard plus the longest into it (cost, time).
    fn yard_legs(&self) -> (i64, i64) {
        let (mut d, mut t) = ((0, 0), (0, 0));
        for a in 0..2 * self.n as u32 {
            let (c1, t1) = self.leg(self.depot, a);
            let (c2, t2) = self.leg(a, self.depot);
            if c1 < BIG {
                d.0 = d.0.max(c1);
                t.0 = t.0.max(t1);
            }
            if c2 < BIG {
                d.1 = d.1.max(c2);
                t.1 = t.1.max(t2);
            }
        }
        (d.0 + d.1, t.0 + t.1)
    }

    /// An on-demand leg (cost, time); [`BIG`] when missing or above the cap.
    #[inline(never)]
    fn leg(&self, a: u32, b: u32) -> (i64, i64) {
        let (c, t) = match self.legs.as_ref().expect("on-demand legs") {
            Legs::Junctions {
                dist, start, end, ..
            } => {
                dist.leg(end[a as usize] as usize, start[b as usize] as usize)
            }
            Legs::Turns(td) => {
                let key = |x: u32| (x as usize).min(2 * self.n);
                td.leg(key(a), key(b))
            }
        };
        self.capped(c, t)
    }

    fn capped(&self, c: Cost, t: Cost) -> (i64, i64) {
        if c >= UNREACHABLE || c > self.cap || t > self.cap {
            (BIG, BIG)
        } else {
            (c, t)
        }
    }

    /// The legs (cost, time) from the end of `a` to the start of every arc,
    /// from one full search when on demand ([`BIG`] for missing ones).
    pub fn row_from(&self, a: u32) -> Vec<(i64, i64)> {
        let Some(legs) = &self.legs else {
            return (0..self.arcs as u32).map(|b| (self.d(a, b), self.t(a, b))).collect();
        };
        let pick = |(c, t): (i64, i64)| if self.timed() { (c, t) } else { (c, c) };
        match legs {
            Legs::Junctions {
                dist, start, end, ..
            } => {
                let row = dist.row(end[a as usize] as usize);
                start
                    .iter()
                    .map(|&v| pick(self.capped(row[v as usize].0, row[v as usize].1)))
                    .collect()
            }
            Legs::Turns(td) => {
                let row = td.row((a as usize).min(2 * self.n));
                (0..self.arcs)
                    .map(|b| {
                        let (c, t) = row[b.min(2 * self.n)];
                        pick(self.capped(c, t))
                    })
                    .collect()
            }
        }
    }

    /// The nearest task arcs from the end of arc `a` (not the depot) among
    /// those `accept(arc, cost, time)` takes, with `(cost, time)` read as
    /// [`ArcMatrix::d`] and [`ArcMatrix::t`] would (legs above the cap are
    /// missing, never accepted): every accepted arc of least cost, in no
    /// particular order. On demand one search that stops as soon as the
    /// least accepted leg is known exactly (a full search at worst); else a
    /// scan of the matrix row.
    pub fn nearest_arcs(
        &self,
        a: u32,
        accept: &mut dyn FnMut(u32, i64, i64) -> bool,
    ) -> Vec<u32> {
        let timed = self.timed();
        let mut take = |b: u32, c: Cost, t: Cost| {
            let (c, t) = self.capped(c, t);
            c < BIG && accept(b, c, if timed { t } else { c })
        };
        let found = match &self.legs {
            None => {
                let mut least = i64::MAX;
                let mut out = Vec::new();
                for b in 0..2 * self.n as u32 {
                    let (c, t) = (self.d(a, b), self.t(a, b));
                    if c <= least && c < BIG && accept(b, c, t) {
                        if c < least {
                            least = c;
                            out.clear();
                        }
                        out.push(b);
                    }
                }
                return out;
            }
            Some(Legs::Junctions { dist, end, starting, .. }) => {
                dist.nearest_from(end[a as usize] as usize, starting, self.cap, &mut take)
            }
            Some(Legs::Turns(td)) => td.nearest_from(a as usize, self.cap, &mut take),
        };
        found.into_iter().map(|x| x.0).collect()
    }

    /// The legs `(d(a, b), t(a, b))` from arc `a` to each of a few arcs
    /// `bs`, the values [`ArcMatrix::d`] and [`ArcMatrix::t`] give. On
    /// demand the legs not cached are found by one search from `a` stopped
    /// when all of them are reached (not cached): far legs cost one search
    /// for all of `bs` instead of one each.
    pub fn legs_from(&self, a: u32, bs: &[u32]) -> Vec<(i64, i64)> {
        let Some(legs) = &self.legs else {
            return bs.iter().map(|&b| (self.d(a, b), self.t(a, b))).collect();
        };
        let raw = match legs {
            Legs::Junctions { dist, start, end, .. } => {
                let vs: Vec<usize> = bs.iter().map(|&b| start[b as usize] as usize).collect();
                dist.legs_to(end[a as usize] as usize, &vs)
            }
            Legs::Turns(td) => {
                let key = |x: u32| (x as usize).min(2 * self.n);
                let keys: Vec<usize> = bs.iter().map(|&b| key(b)).collect();
                td.legs_to(key(a), &keys)
            }
        };
        raw.into_iter()
            .map(|(c, t)| {
                let (c, t) = self.capped(c, t);
                (c, if self.timed() { t } else { c })
            })
            .collect()
    }

    /// Whether the legs are answered on demand.
    pub fn is_on_demand(&self) -> bool {
        self.legs.is_some()
    }

    #[inline(always)]
    fn cell(&self, a: u32, b: u32) -> usize {
        self.kend_row[a as usize] + self.kstart[b as usize] as usize
    }

    /// The longest stored deadhead cost and time (missing paths left out).
    pub fn longest_legs(&self) -> (i64, i64) {
        if self.legs.is_some() {
            return (self.cap, self.cap);
        }
        let longest = |v: &[i32]| v.iter().copied().max().unwrap_or(0).max(0) as i64;
        let d = longest(&self.cost);
        (d, self.time.as_deref().map_or(d, longest))
    }

    /// Number of key junctions the matrices are indexed by.
    pub fn key_junctions(&self) -> usize {
        self.keys
    }

    /// Bytes held by the deadhead matrices.
    pub fn matrix_bytes(&self) -> usize {
        4 * (self.cost.len() + self.time.as_ref().map_or(0, |t| t.len()))
    }

    /// Deadhead time from the end of `a` to the start of `b` (the cost when
    /// there is no shift limit).
    #[inline(always)]
    pub fn t(&self, a: u32, b: u32) -> i64 {
        if self.legs.is_some() {
            return if self.timed() {
                self.leg(a, b).1
            } else {
                self.leg(a, b).0
            };
        }
        match &self.time {
            Some(t) => decode(t[self.cell(a, b)]),
            None => self.d(a, b),
        }
    }

    /// Whether route times must be checked.
    #[inline(always)]
    pub fn timed(&self) -> bool {
        self.shift.is_some()
    }

    /// The arc of task `t` in direction `dir`.
    #[inline(always)]
    pub fn arc(t: usize, dir: Dir) -> u32 {
        (2 * t + (dir == Dir::Backward) as usize) as u32
    }

    /// The task of arc `a` (`n` for the depot).
    #[inline(always)]
    pub fn task(a: u32) -> usize {
        (a >> 1) as usize
    }

    /// The visit of a task arc.
    pub fn visit(a: u32) -> Visit {
        let dir = if a & 1 == 0 {
            Dir::Forward
        } else {
            Dir::Backward
        };
        Visit::new(Self::task(a), dir)
    }

    /// Cost, time and load of a route given as task arcs (no depot arcs),
    /// driven from the depot and back.
    pub fn route_eval(&self, arcs: &[u32]) -> (i64, i64, i64) {
        let (mut c, mut t, mut l) = (0, 0, 0);
        let mut prev = self.depot;
        for &a in arcs {
            c += self.d(prev, a) + self.serve_cost[a as usize];
            t += self.t(prev, a) + self.serve_time[a as usize];
            l += self.demand[a as usize];
            prev = a;
        }
        if !arcs.is_empty() {
            c += self.d(prev, self.depot);
            t += self.t(prev, self.depot);
        }
        (c, t, l)
    }

    /// Whether a route (task arcs) respects capacity and shift limit.
    pub fn route_feasible(&self, arcs: &[u32]) -> bool {
        let (c, t, l) = self.route_eval(arcs);
        c < BIG
            && l <= self.capacity
            && self.shift.is_none_or(|s| t <= s)
            && arcs.iter().all(|&a| self.allowed[a as usize])
    }

    /// The sub-problem of the tasks `tasks` (indices of this matrix's tasks,
    /// distinct): a matrix in the by-arc layout whose task `i` is task
    /// `tasks[i]` here (arc `2i + k` is arc `2 tasks[i] + k`), with the same
    /// depot, capacity and shift and the fleet bound `max_routes`. Entries
    /// are copied (on demand: searched among the district's streets only),
    /// so costs are exactly this matrix's. Memory `4 (2s + 2)^2`
    /// bytes (twice with times) for `s` tasks: the district search's matrix.
    pub fn restrict(&self, tasks: &[usize], max_routes: Option<usize>) -> ArcMatrix {
        self.restrict_until(tasks, max_routes, &|| false)
            .expect("never given up")
    }

    /// [`ArcMatrix::restrict`], given up (`None`) when `give_up` answers
    /// true before one of the searches of an on-demand matrix (asked once
    /// per search): a district whose matrix is still being searched at the
    /// deadline is dropped.
    pub(crate) fn restrict_until(
        &self,
        tasks: &[usize],
        max_routes: Option<usize>,
        give_up: &(dyn Fn() -> bool + Sync),
    ) -> Option<ArcMatrix> {
        let s = tasks.len();
        let arcs = 2 * s + 2;
        let parent: Vec<u32> = tasks
            .iter()
            .flat_map(|&t| [2 * t as u32, 2 * t as u32 + 1])
            .chain([self.depot, self.depot + 1])
            .collect();
        let copy = |v: &[i32]| -> Vec<i32> {
            let mut out = Vec::with_capacity(arcs * arcs);
            for &a in &parent {
                out.extend(parent.iter().map(|&b| v[self.cell(a, b)]));
            }
            out
        };
        let (cost, time) = match &self.legs {
            None => (copy(&self.cost), self.time.as_deref().map(copy)),
            Some(legs) => self.block(legs, &parent, give_up)?,
        };
        let pick_i64 = |v: &[i64]| parent.iter().map(|&a| v[a as usize]).collect();
        Some(ArcMatrix {
            n: s,
            arcs,
            depot: (2 * s) as u32,
            keys: arcs,
            kstart: (0..arcs as u32).collect(),
            kend_row: (0..arcs).map(|a| a * arcs).collect(),
            cost,
            time,
            serve_cost: pick_i64(&self.serve_cost),
            serve_time: pick_i64(&self.serve_time),
            demand: pick_i64(&self.demand),
            allowed: parent.iter().map(|&a| self.allowed[a as usize]).collect(),
            capacity: self.capacity,
            shift: self.shift,
            max_routes,
            legs: None,
            cap: MAX_LEG,
        })
    }

    /// The dense cost (and time) matrix among `arcs` from on-demand legs:
    /// one bounded search per row (see [`crate::paths::on_demand`]); `None`
    /// when `give_up` answers true before a search.
    fn block(
        &self,
        legs: &Legs,
        arcs: &[u32],
        give_up: &(dyn Fn() -> bool + Sync),
    ) -> Option<(Vec<i32>, Option<Vec<i32>>)> {
        let found = match legs {
            Legs::Junctions {
                dist, start, end, ..
            } => {
                let rows: Vec<usize> = arcs.iter().map(|&a| end[a as usize] as usize).collect();
                let cols: Vec<usize> = arcs.iter().map(|&a| start[a as usize] as usize).collect();
                dist.block(&rows, &cols, give_up)?
            }
            Legs::Turns(td) => {
                let keys: Vec<usize> = arcs.iter().map(|&a| (a as usize).min(2 * self.n)).collect();
                td.block(&keys, &keys, give_up)?
            }
        };
        let store = |x: i64| if x >= BIG { MISSING } else { x as i32 };
        let (mut cost, mut time) = (Vec::with_capacity(found.len()), Vec::new());
        for &(c, t) in &found {
            let (c, t) = self.capped(c, t);
            cost.push(store(c));
            if self.timed() {
                time.push(store(t));
            }
        }
        Some((cost, self.timed().then_some(time)))
    }

    /// [`ArcMatrix::task_gap`] from task `u` to each of `others`, the same
    /// values. With junction legs on demand it takes four searches (out of
    /// the ends of `u`'s two arcs, and into their starts on the reversed
    /// network, each stopped when `others`' arcs are settled) instead of a
    /// leg search per pair: the pairs of a candidate list may be far apart
    /// by the directed network although near on the map. With turn rules on
    /// demand likewise, on the street-to-street graph (the searches into
    /// `u`'s arcs run on the reversed turns).
    pub fn task_gaps(&self, u: usize, others: &[u32]) -> Vec<i64> {
        let Some(legs) = &self.legs else {
            return others.iter().map(|&v| self.task_gap(u, v as usize)).collect();
        };
        let arcs = |t: usize| {
            [2 * t as u32, 2 * t as u32 + 1]
                .into_iter()
                .filter(|&a| self.allowed[a as usize])
        };
        let mut best = vec![i64::MAX; others.len()];
        for a in arcs(u) {
            // Out of `a` to the start of every arc of the others, and from
            // the end of every arc of the others into `a`.
            for into in [false, true] {
                let found = match legs {
                    Legs::Junctions {
                        dist, start, end, ..
                    } => {
                        let (from, of) = if into { (start, end) } else { (end, start) };
                        let targets: Vec<usize> = others
                            .iter()
                            .flat_map(|&v| arcs(v as usize))
                            .map(|b| of[b as usize] as usize)
                            .collect();
                        dist.legs_between(from[a as usize] as usize, &targets, into)
                            .expect("on-demand distances")
                    }
                    Legs::Turns(td) => {
                        let targets: Vec<usize> = others
                            .iter()
                            .flat_map(|&v| arcs(v as usize))
                            .map(|b| b as usize)
                            .collect();
                        td.legs_between(a as usize, &targets, into)
                    }
                };
                let mut next = found.into_iter();
                for (i, &v) in others.iter().enumerate() {
                    for _ in arcs(v as usize) {
                        let (c, t) = next.next().expect("one leg per arc");
                        best[i] = best[i].min(self.capped(c, t).0);
                    }
                }
            }
        }
        best
    }

    /// Minimum deadhead between two tasks in any allowed directions, both ways.
    pub fn task_gap(&self, u: usize, v: usize) -> i64 {
        let mut best = i64::MAX;
        for a in [2 * u as u32, 2 * u as u32 + 1] {
            for b in [2 * v as u32, 2 * v as u32 + 1] {
                if self.allowed[a as usize] && self.allowed[b as usize] {
                    best = best.min(self.d(a, b)).min(self.d(b, a));
                }
            }
        }
        best
    }
}
