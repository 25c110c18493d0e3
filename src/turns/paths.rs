//! Turn-aware deadhead costs between served streets, on the street-to-street graph.
//!
//! The search runs on *driving arcs* (a street driven in one direction, see
//! [`TurnTable`]): a state is "has just driven arc `e`", and going on into
//! arc `f` costs the turn penalty plus the deadhead cost of `f`. The cost
//! from the end of one served street to the start of the next therefore
//! includes every turn on the way: the turn out of the served street, the
//! turns between deadheaded streets, and the turn into the next served
//! street. Leaving the yard and arriving there is free of turns.
//!
//! Costs are lexicographic like [`crate::paths`]: least cost, then least
//! driving time (turn penalties add to the cost only).
//!
//! **Cost.** In full ([`TurnDistances::full`], up to [`FULL_MATRIX_TASKS`]
//! streets to serve): one Dijkstra search per task arc and one from the
//! yard, time `O(A · T log T)` for `A = 2n + 1` sources and `T` allowed
//! turns, memory `16·A²` bytes for the cost and time matrices (1 GB at 4,000
//! streets to serve, 25 GB at 20,000). Above that, on demand
//! ([`TurnDistances::on_demand`]): the yard's row and column in full (a
//! forward search and one on the reversed turns), any other leg by a search
//! when first asked, kept in a bounded cache (see
//! [`crate::paths::Distances::on_demand`]); measured 874 MiB peak for the
//! whole solver run at 19,510 streets with U-turns banned. Sources run in
//! parallel with rayon; the result does not depend on the number of threads.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use std::sync::Arc;

use rayon::prelude::*;

use super::table::{arc_of, head, tail, TurnTable};
use crate::model::{Cost, Dir, Instance};
use crate::paths::on_demand::{full_values, nearest, settle, Csr, RowCache, StateGraph, Until};
use crate::paths::UNREACHABLE;

impl Graph {
    /// The initial states of a search having just driven arc `e`.
    fn out_of(&self, e: u32) -> Vec<(u32, Cost, Cost)> {
        let mut v = Vec::new();
        self.moves(e, &mut |f, c, t| v.push((f, c, t)));
        v
    }

    /// The cost of starting to drive arc `f` given the value of having
    /// driven it (that value less its own deadhead).
    fn enter_value(&self, f: u32, (c, t): (Cost, Cost)) -> (Cost, Cost) {
        if c >= UNREACHABLE {
            return (UNREACHABLE, UNREACHABLE);
        }
        let (lc, lt) = self.link[f as usize / 2];
        (c - lc, t - lt)
    }

    /// [`Graph::enter_value`] of `f` in a full search's values.
    fn enter(&self, f: u32, values: &[(Cost, Cost)]) -> (Cost, Cost) {
        if f == u32::MAX {
            return (UNREACHABLE, UNREACHABLE);
        }
        self.enter_value(f, values[f as usize])
    }
}

/// Where a search starts.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Source {
    /// Having just driven this driving arc.
    After(u32),
    /// At this junction, heading any way (the yard).
    At(usize),
}

/// Result of one search: per driving arc, the best (cost, time) having driven
/// it, and the arc before it on that path (`u32::MAX`: the first one).
pub struct Search {
    /// Cost having driven each arc ([`UNREACHABLE`] when not reached).
    pub cost: Vec<Cost>,
    /// Driving time along the same path.
    pub time: Vec<Cost>,
    /// Predecessor arc.
    pub pred: Vec<u32>,
}

/// Lexicographic Dijkstra on the driving arcs from `src`.
pub fn search(inst: &Instance, table: &TurnTable, src: Source) -> Search {
    let net = inst.network();
    let arcs = table.arcs();
    let mut s = Search {
        cost: vec![UNREACHABLE; arcs],
        time: vec![UNREACHABLE; arcs],
        pred: vec![u32::MAX; arcs],
    };
    let mut heap = BinaryHeap::new();
    let relax = |s: &mut Search, heap: &mut BinaryHeap<_>, f: u32, c: Cost, t: Cost, p: u32| {
        let l = &net.links[f as usize / 2];
        let (c, t) = (c + l.cost, t + l.drive_time());
        let fi = f as usize;
        if (c, t) < (s.cost[fi], s.time[fi]) {
            s.cost[fi] = c;
            s.time[fi] = t;
            s.pred[fi] = p;
            heap.push(Reverse((c, t, f)));
        }
    };
    match src {
        Source::After(a) => {
            let tr = table.turns(a);
            for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
                relax(&mut s, &mut heap, f, pen, 0, u32::MAX);
            }
        }
        Source::At(v) => {
            for f in 0..arcs as u32 {
                if table.drivable(f) && tail(net, f) == v {
                    relax(&mut s, &mut heap, f, 0, 0, u32::MAX);
                }
            }
        }
    }
    while let Some(Reverse((c, t, e))) = heap.pop() {
        if (c, t) != (s.cost[e as usize], s.time[e as usize]) {
            continue;
        }
        let tr = table.turns(e);
        for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
            relax(&mut s, &mut heap, f, c + pen, t, e);
        }
    }
    s
}

/// Turn-aware deadhead costs and times between the task arcs and the yard,
/// numbered as the solver numbers them: task `t` served forward is `2t`,
/// backward `2t + 1`, the yard is `2n`. Held in full matrices, or answered
/// on demand for large networks ([`TurnDistances::on_demand`]).
#[derive(Clone, Debug)]
pub struct TurnDistances {
    n: usize,
    cost: Vec<Cost>,
    time: Vec<Cost>,
    lazy: Option<Arc<Lazy>>,
}

/// Above this many streets to serve [`TurnDistances::new`] answers on
/// demand instead of holding the full matrices (which would take more than
/// 256 MiB).
pub const FULL_MATRIX_TASKS: usize = 2048;

/// The street-to-street graph searched on demand: states are driving arcs,
/// a move is a turn plus the next street's deadhead.
#[derive(Debug)]
struct Graph {
    table: TurnTable,
    /// Deadhead cost and drive time of each link.
    link: Vec<(Cost, Cost)>,
}

impl StateGraph for Graph {
    fn states(&self) -> usize {
        self.table.arcs()
    }

    fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost)) {
        let tr = self.table.turns(s);
        for (&g, &pen) in tr.next.iter().zip(tr.penalty) {
            let (c, t) = self.link[g as usize / 2];
            f(g, pen + c, t);
        }
    }
}

/// The turns of [`Graph`] reversed (for the legs into the yard).
#[derive(Debug)]
struct Reversed {
    start: Vec<u32>,
    /// (earlier arc, penalty + cost of the later arc, its time).
    prev: Vec<(u32, Cost, Cost)>,
}

impl StateGraph for Reversed {
    fn states(&self) -> usize {
        self.start.len() - 1
    }

    fn moves(&self, s: u32, f: &mut dyn FnMut(u32, Cost, Cost)) {
        for &(e, c, t) in
            &self.prev[self.start[s as usize] as usize..self.start[s as usize + 1] as usize]
        {
            f(e, c, t);
        }
    }
}

impl Reversed {
    fn of(g: &Graph) -> Reversed {
        let n = g.table.arcs();
        let mut deg = vec![0u32; n + 1];
        for e in 0..n as u32 {
            g.moves(e, &mut |f, _, _| deg[f as usize] += 1);
        }
        let mut start = vec![0u32; n + 1];
        for v in 0..n {
            start[v + 1] = start[v] + deg[v];
        }
        let mut fill = start.clone();
        let mut prev = vec![(0, 0, 0); start[n] as usize];
        for e in 0..n as u32 {
            g.moves(e, &mut |f, c, t| {
                prev[fill[f as usize] as usize] = (e, c, t);
                fill[f as usize] += 1;
            });
        }
        Reversed { start, prev }
    }
}

/// The on-demand side of [`TurnDistances`].
#[derive(Debug)]
struct Lazy {
    graph: Graph,
    /// Driving arc of each task arc (`u32::MAX` when it may not be driven).
    entry: Vec<u32>,
    /// Driving arc of each task arc, drivable or not (the source of its row).
    arc: Vec<u32>,
    /// From the yard to each task arc; from each task arc to the yard.
    from_yard: Vec<(Cost, Cost)>,
    to_yard: Vec<(Cost, Cost)>,
    cache: RowCache,
    /// The task arcs entered by each driving arc (at most one).
    entered: Csr,
    /// The longest deadhead cost of a street.
    longest: Cost,
    /// The turns reversed (searches into a street).
    rev: Reversed,
}

impl TurnDistances {
    /// Computes every entry (one search per source, in parallel), or, above
    /// [`FULL_MATRIX_TASKS`] streets to serve, answers on demand
    /// ([`TurnDistances::on_demand`]).
    pub fn new(inst: &Instance, table: &TurnTable) -> TurnDistances {
        if inst.tasks().len() > FULL_MATRIX_TASKS {
            return Self::on_demand(inst, table);
        }
        Self::full(inst, table)
    }

    /// Every entry in full matrices: `16 (2n + 1)^2` bytes.
    pub fn full(inst: &Instance, table: &TurnTable) -> TurnDistances {
        let n = inst.tasks().len();
        let w = 2 * n + 1;
        let rows: Vec<(Vec<Cost>, Vec<Cost>)> = (0..w)
            .into_par_iter()
            .map(|r| row(inst, table, r))
            .collect();
        let mut cost = Vec::with_capacity(w * w);
        let mut time = Vec::with_capacity(w * w);
        for (c, t) in rows {
            cost.extend(c);
            time.extend(t);
        }
        TurnDistances {
            n,
            cost,
            time,
            lazy: None,
        }
    }

    /// Turn-aware distances answered on demand, equal to
    /// [`TurnDistances::full`]: the yard's row and column in full (one
    /// search each, the column on the reversed turns), other legs by a
    /// search on the street-to-street graph when first asked, kept in a
    /// bounded cache (see [`crate::paths::Distances::on_demand`]).
    ///
    /// # Complexity
    /// `O(A + T)` memory for `A` driving arcs and `T` allowed turns, plus the
    /// cache; each question not cached costs one search that stops when it
    /// reaches the asked street.
    pub fn on_demand(inst: &Instance, table: &TurnTable) -> TurnDistances {
        let net = inst.network();
        let n = inst.tasks().len();
        let graph = Graph {
            table: table.clone(),
            link: net.links.iter().map(|l| (l.cost, l.drive_time())).collect(),
        };
        let mut entry = vec![u32::MAX; 2 * n];
        let mut arc = vec![0u32; 2 * n];
        for (t, task) in inst.tasks().iter().enumerate() {
            for (k, dir) in [Dir::Forward, Dir::Backward].into_iter().enumerate() {
                let e = arc_of(task.link, dir);
                arc[2 * t + k] = e;
                if k == 0 || table.drivable(e) {
                    entry[2 * t + k] = e;
                }
            }
        }
        let depot = inst.depot();
        let arcs = table.arcs();
        let out_of_yard: Vec<(u32, Cost, Cost)> = (0..arcs as u32)
            .filter(|&f| table.drivable(f) && tail(net, f) == depot)
            .map(|f| {
                (
                    f,
                    graph.link[f as usize / 2].0,
                    graph.link[f as usize / 2].1,
                )
            })
            .collect();
        let into_yard: Vec<(u32, Cost, Cost)> = (0..arcs as u32)
            .filter(|&e| head(net, e) == depot)
            .map(|e| (e, 0, 0))
            .collect();
        let rev = Reversed::of(&graph);
        let (fwd, back) = rayon::join(
            || full_values(arcs, &settle(&graph, &out_of_yard, Until::All)),
            || full_values(arcs, &settle(&rev, &into_yard, Until::All)),
        );
        let from_yard = entry.iter().map(|&f| graph.enter(f, &fwd)).collect();
        let to_yard = arc.iter().map(|&e| back[e as usize]).collect();
        let entered = Csr::of(
            arcs,
            (0..2 * n as u32)
                .filter(|&b| entry[b as usize] != u32::MAX)
                .map(|b| (entry[b as usize] as usize, b)),
        );
        let longest = graph.link.iter().map(|l| l.0).max().unwrap_or(0);
        TurnDistances {
            n,
            cost: Vec::new(),
            time: Vec::new(),
            lazy: Some(Arc::new(Lazy {
                graph,
                entry,
                arc,
                from_yard,
                to_yard,
                cache: RowCache::new(arcs),
                entered,
                longest,
                rev,
            })),
        }
    }

    /// Whether the legs are answered on demand (not held in matrices).
    pub fn is_on_demand(&self) -> bool {
        self.lazy.is_some()
    }

    /// Cost and time from the end of task arc (or yard) `a` to the start of
    /// `b` ([`UNREACHABLE`] for both when no allowed way exists).
    pub fn leg(&self, a: usize, b: usize) -> (Cost, Cost) {
        let Some(z) = &self.lazy else {
            let i = a * self.width() + b;
            return (self.cost[i], self.time[i]);
        };
        let yard = 2 * self.n;
        if a == yard && b == yard {
            (0, 0)
        } else if a == yard {
            z.from_yard[b]
        } else if b == yard {
            z.to_yard[a]
        } else if z.entry[b] == u32::MAX {
            (UNREACHABLE, UNREACHABLE)
        } else {
            let init = z.graph.out_of(z.arc[a]);
            let f = z.entry[b];
            let got = z.cache.leg(z.arc[a] as usize, f, |v, min| {
                settle(&z.graph, &init, Until::Reach(v, min))
            });
            z.graph.enter_value(f, got)
        }
    }

    /// Legs from task arc (or yard) `a` to every task arc and the yard
    /// (indexed like the columns): one full search when on demand (not
    /// cached).
    pub(crate) fn row(&self, a: usize) -> Vec<(Cost, Cost)> {
        let w = self.width();
        let Some(z) = &self.lazy else {
            return (0..w).map(|b| self.leg(a, b)).collect();
        };
        if a == 2 * self.n {
            return (0..w).map(|b| self.leg(a, b)).collect();
        }
        let found = full_values(
            z.graph.table.arcs(),
            &settle(&z.graph, &z.graph.out_of(z.arc[a]), Until::All),
        );
        let mut out: Vec<(Cost, Cost)> =
            z.entry.iter().map(|&f| z.graph.enter(f, &found)).collect();
        out.push(z.to_yard[a]);
        out
    }

    /// The nearest task arcs from the end of task arc `a` (on demand only,
    /// not the yard): `accept(task arc, cost, time)` filters them by their
    /// exact leg (the value of [`TurnDistances::leg`]); returns every
    /// accepted task arc of least leg cost with its leg, searching only as
    /// far as needed (see [`crate::paths::on_demand::nearest`]); nothing
    /// when none with a leg up to `limit` qualifies.
    pub(crate) fn nearest_from(
        &self,
        a: usize,
        limit: Cost,
        accept: &mut dyn FnMut(u32, Cost, Cost) -> bool,
    ) -> Vec<(u32, Cost, Cost)> {
        let z = self.lazy.as_ref().expect("on-demand turn distances");
        let init = z.graph.out_of(z.arc[a]);
        let offset = |f: u32| z.graph.link[f as usize / 2];
        let reach = limit.saturating_add(z.longest);
        nearest(&z.graph, &init, &z.entered, &offset, reach, accept)
    }

    /// The legs from task arc (or yard) `a` to each of a few task arcs (or
    /// the yard) `bs`, the values of [`TurnDistances::leg`]: from the
    /// matrices or the cache when they hold them, else by one search from
    /// `a` stopped when every one of `bs` is reached (not cached), instead
    /// of one search per leg.
    pub(crate) fn legs_to(&self, a: usize, bs: &[usize]) -> Vec<(Cost, Cost)> {
        let Some(z) = &self.lazy else {
            return bs.iter().map(|&b| self.leg(a, b)).collect();
        };
        let yard = 2 * self.n;
        let quick = |b: usize| {
            if a == yard || b == yard || z.entry[b] == u32::MAX {
                Some(self.leg(a, b))
            } else {
                let f = z.entry[b];
                let got = z.cache.peek(z.arc[a] as usize, f)?;
                Some(z.graph.enter_value(f, got))
            }
        };
        let mut out: Vec<Option<(Cost, Cost)>> = bs.iter().map(|&b| quick(b)).collect();
        let missing: Vec<u32> = bs
            .iter()
            .zip(&out)
            .filter(|(_, x)| x.is_none())
            .map(|(&b, _)| z.entry[b])
            .collect();
        if !missing.is_empty() {
            let init = z.graph.out_of(z.arc[a]);
            let mut found = settle(&z.graph, &init, Until::Among(&missing)).order;
            found.sort_unstable_by_key(|x| x.0);
            for (x, &b) in out.iter_mut().zip(bs) {
                if x.is_none() {
                    let f = z.entry[b];
                    let v = match found.binary_search_by_key(&f, |x| x.0) {
                        Ok(i) => (found[i].1, found[i].2),
                        Err(_) => (UNREACHABLE, UNREACHABLE),
                    };
                    *x = Some(z.graph.enter_value(f, v));
                }
            }
        }
        out.into_iter().map(|x| x.expect("every leg")).collect()
    }

    /// The legs between task arc `a` and each of the task arcs `bs` (not
    /// the yard): from `a` to each, or from each to `a` when `into`; the
    /// values of [`TurnDistances::leg`], by one search (on the reversed
    /// turns when `into`) stopped when every one of `bs` is reached (not
    /// cached). On demand only.
    pub(crate) fn legs_between(&self, a: usize, bs: &[usize], into: bool) -> Vec<(Cost, Cost)> {
        let z = self.lazy.as_ref().expect("on-demand turn distances");
        let none = (UNREACHABLE, UNREACHABLE);
        let value =
            |found: &[(u32, Cost, Cost)], s: u32| match found.binary_search_by_key(&s, |x| x.0) {
                Ok(i) => (found[i].1, found[i].2),
                Err(_) => none,
            };
        if into {
            // From "has driven b's street" to "has driven a's street":
            // backwards from the latter; a's own deadhead then comes off.
            let f = z.entry[a];
            if f == u32::MAX {
                return vec![none; bs.len()];
            }
            let states: Vec<u32> = bs.iter().map(|&b| z.arc[b]).collect();
            let mut found = settle(&z.rev, &[(f, 0, 0)], Until::Among(&states)).order;
            found.sort_unstable_by_key(|x| x.0);
            // From a's own street back to it takes a loop, which the
            // backward search (started there at zero) does not give.
            states
                .iter()
                .zip(bs)
                .map(|(&e, &b)| {
                    if e == f {
                        self.leg(b, a)
                    } else {
                        z.graph.enter_value(f, value(&found, e))
                    }
                })
                .collect()
        } else {
            let states: Vec<u32> = bs
                .iter()
                .map(|&b| z.entry[b])
                .filter(|&f| f != u32::MAX)
                .collect();
            let init = z.graph.out_of(z.arc[a]);
            let mut found = settle(&z.graph, &init, Until::Among(&states)).order;
            found.sort_unstable_by_key(|x| x.0);
            bs.iter()
                .map(|&b| match z.entry[b] {
                    u32::MAX => none,
                    f => z.graph.enter_value(f, value(&found, f)),
                })
                .collect()
        }
    }

    /// Legs from every task arc (or yard) of `rows` to every one of `cols`
    /// (row-major): one search per row, stopped when every column is
    /// reached (not cached) when on demand; `None` when `give_up` answers
    /// true before a row's search.
    pub(crate) fn block(
        &self,
        rows: &[usize],
        cols: &[usize],
        give_up: &(dyn Fn() -> bool + Sync),
    ) -> Option<Vec<(Cost, Cost)>> {
        let Some(z) = &self.lazy else {
            return Some(
                rows.iter()
                    .flat_map(|&a| cols.iter().map(move |&b| self.leg(a, b)))
                    .collect(),
            );
        };
        let yard = 2 * self.n;
        let inits: Vec<Vec<(u32, Cost, Cost)>> = rows
            .iter()
            .map(|&a| {
                if a == yard {
                    Vec::new()
                } else {
                    z.graph.out_of(z.arc[a])
                }
            })
            .collect();
        let targets: Vec<u32> = cols
            .iter()
            .filter(|&&b| b != yard && z.entry[b] != u32::MAX)
            .map(|&b| z.entry[b])
            .collect();
        let found = crate::paths::on_demand::block(&z.graph, &inits, &targets, give_up)?;
        let mut out = Vec::with_capacity(rows.len() * cols.len());
        for (i, &a) in rows.iter().enumerate() {
            let mut k = i * targets.len();
            for &b in cols {
                out.push(if b == yard || a == yard {
                    self.leg(a, b)
                } else if z.entry[b] == u32::MAX {
                    (UNREACHABLE, UNREACHABLE)
                } else {
                    k += 1;
                    z.graph.enter_value(z.entry[b], found[k - 1])
                });
            }
        }
        Some(out)
    }

    /// Number of rows and columns (`2n + 1`).
    pub fn width(&self) -> usize {
        2 * self.n + 1
    }

    /// Least cost from the end of task arc (or yard) `a` to the start of `b`,
    /// turns included; [`UNREACHABLE`] when no allowed way exists.
    pub fn cost(&self, a: usize, b: usize) -> Cost {
        self.leg(a, b).0
    }

    /// Driving time along the path of [`TurnDistances::cost`].
    pub fn time(&self, a: usize, b: usize) -> Cost {
        self.leg(a, b).1
    }

    /// Bytes held.
    pub fn bytes(&self) -> usize {
        let lazy = self.lazy.as_ref().map_or(0, |z| {
            z.cache.bytes() + 16 * (z.from_yard.len() + z.to_yard.len()) + z.graph.table.bytes()
        });
        8 * (self.cost.len() + self.time.len()) + lazy
    }
}

/// The driving arc of task arc `a` (`None` for the yard).
pub fn driving_arc(inst: &Instance, a: usize) -> Option<u32> {
    let t = inst.tasks().get(a / 2)?;
    Some(arc_of(
        t.link,
        if a.is_multiple_of(2) {
            Dir::Forward
        } else {
            Dir::Backward
        },
    ))
}

/// The start of a search from task arc (or yard) `a`.
pub fn source_of(inst: &Instance, a: usize) -> Source {
    match driving_arc(inst, a) {
        Some(e) => Source::After(e),
        None => Source::At(inst.depot()),
    }
}

/// One row: from task arc (or yard) `r` to every task arc and the yard.
fn row(inst: &Instance, table: &TurnTable, r: usize) -> (Vec<Cost>, Vec<Cost>) {
    let net = inst.network();
    let n = inst.tasks().len();
    let w = 2 * n + 1;
    let mut best = vec![(UNREACHABLE, UNREACHABLE); w];
    // Task arc of each driving arc that serves a task.
    let mut entry = vec![u32::MAX; table.arcs()];
    for (t, task) in inst.tasks().iter().enumerate() {
        entry[arc_of(task.link, Dir::Forward) as usize] = 2 * t as u32;
        if table.drivable(arc_of(task.link, Dir::Backward)) {
            entry[arc_of(task.link, Dir::Backward) as usize] = 2 * t as u32 + 1;
        }
    }
    let src = source_of(inst, r);
    let s = search(inst, table, src);
    let depot = inst.depot();
    let mut improve = |k: usize, c: Cost, t: Cost| {
        if (c, t) < best[k] {
            best[k] = (c, t);
        }
    };
    // Directly: the next served street starts where this one ends.
    match src {
        Source::After(a) => {
            let tr = table.turns(a);
            for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
                if entry[f as usize] != u32::MAX {
                    improve(entry[f as usize] as usize, pen, 0);
                }
            }
            if head(net, a) == depot {
                improve(2 * n, 0, 0);
            }
        }
        Source::At(v) => {
            for (f, &k) in entry.iter().enumerate() {
                if k != u32::MAX && tail(net, f as u32) == v {
                    improve(k as usize, 0, 0);
                }
            }
            improve(2 * n, 0, 0);
        }
    }
    // After a deadhead ending with arc e.
    for e in 0..table.arcs() {
        let (c, t) = (s.cost[e], s.time[e]);
        if c >= UNREACHABLE {
            continue;
        }
        if head(net, e as u32) == depot {
            improve(2 * n, c, t);
        }
        let tr = table.turns(e as u32);
        for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
            if entry[f as usize] != u32::MAX {
                improve(entry[f as usize] as usize, c + pen, t);
            }
        }
    }
    best.into_iter().unzip()
}
