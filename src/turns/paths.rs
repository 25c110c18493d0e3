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
//! **Cost.** One Dijkstra search per task arc and one from the yard: time
//! `O(A · T log T)` for `A = 2n + 1` sources and `T` allowed turns; memory
//! `16·A²` bytes for the cost and time matrices (1 GB at 4,000 streets to
//! serve; 25 GB at 20,000, too much: see the README). Sources run in
//! parallel with rayon; the result does not depend on the number of threads.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use rayon::prelude::*;

use super::table::{arc_of, head, tail, TurnTable};
use crate::model::{Cost, Dir, Instance};
use crate::paths::UNREACHABLE;

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
/// backward `2t + 1`, the yard is `2n`.
#[derive(Clone, Debug)]
pub struct TurnDistances {
    n: usize,
    cost: Vec<Cost>,
    time: Vec<Cost>,
}

impl TurnDistances {
    /// Computes every entry (one search per source, in parallel).
    pub fn new(inst: &Instance, table: &TurnTable) -> TurnDistances {
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
        TurnDistances { n, cost, time }
    }

    /// Number of rows and columns (`2n + 1`).
    pub fn width(&self) -> usize {
        2 * self.n + 1
    }

    /// Least cost from the end of task arc (or yard) `a` to the start of `b`,
    /// turns included; [`UNREACHABLE`] when no allowed way exists.
    pub fn cost(&self, a: usize, b: usize) -> Cost {
        self.cost[a * self.width() + b]
    }

    /// Driving time along the path of [`TurnDistances::cost`].
    pub fn time(&self, a: usize, b: usize) -> Cost {
        self.time[a * self.width() + b]
    }

    /// Bytes held.
    pub fn bytes(&self) -> usize {
        8 * (self.cost.len() + self.time.len())
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
