//! The explicit walk of a route under turn rules: every street driven, in
//! order, with the turn made between each two.
//!
//! Each leg (yard → first service, service → service, last service → yard)
//! is the least-cost way on the street-to-street graph, the same way
//! [`TurnDistances`](super::TurnDistances) prices: least cost (turn
//! penalties included), then least driving time. So the cost of a walk
//! ([`TurnWalk::cost`]) equals the route's cost priced with turns
//! ([`totals_with_turns`](super::totals_with_turns)).
//!
//! **Cost.** One search on the driving arcs per leg: `O(T log T)` for `T`
//! allowed turns, memory `O(A)` for `A` driving arcs; routes are expanded in
//! parallel (rayon), with the same result for any number of threads.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use rayon::prelude::*;

use super::paths::{source_of, Source};
use super::rules::TurnKind;
use super::table::{arc_of, head, tail, TurnTable};
use crate::model::{Cost, Instance};
use crate::paths::UNREACHABLE;
use crate::plan::{walk_cost, Plan, Route, Step, Visit};

/// A turn made from one street of a walk into the next.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Turn {
    /// Left, right, straight on, U-turn (or unknown without coordinates).
    pub kind: TurnKind,
    /// The penalty paid for it, in the scenario's cost unit.
    pub cost: Cost,
}

/// One route driven street by street, with the turn before each street.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct TurnWalk {
    /// Every street driven, in order, served or deadheaded, from the yard
    /// back to the yard.
    pub steps: Vec<Step>,
    /// `turns[k]` is the turn from `steps[k]` into `steps[k + 1]`: one fewer
    /// than the steps (leaving and entering the yard is free of turns).
    pub turns: Vec<Turn>,
}

impl TurnWalk {
    /// The sum of the turn penalties.
    pub fn turn_cost(&self) -> Cost {
        self.turns.iter().map(|t| t.cost).sum()
    }

    /// How many turns of kind `kind` the walk makes.
    pub fn count(&self, kind: TurnKind) -> usize {
        self.turns.iter().filter(|t| t.kind == kind).count()
    }

    /// The walk's cost: service cost of the served steps, driving cost of
    /// the others, plus every turn penalty.
    ///
    /// # Panics
    ///
    /// As [`walk_cost`]: a step on a link outside the network, or a served
    /// step on a link with no service (walks of [`walk_with_turns`] have neither).
    pub fn cost(&self, inst: &Instance) -> Cost {
        walk_cost(inst, &self.steps) + self.turn_cost()
    }
}

/// The walk of a route serving `visits` in order under the turn rules of
/// `table`; `None` when some leg has no allowed way (a route the solver
/// would price as unreachable).
///
/// ```
/// use arcwright::model::{Dir, Fleet, Instance, Network};
/// use arcwright::plan::Visit;
/// use arcwright::turns::{walk_with_turns, TurnKind, TurnPenalties, TurnRules, TurnTable};
///
/// // A spur: yard 0 — 1 — 2 (a dead end). Serving 1→2 means turning back at 2.
/// let mut net = Network::with_junctions(3);
/// net.add_edge(0, 1, 5);
/// net.add_required_edge(1, 2, 4, 1);
/// let inst = Instance::new("spur", net, Fleet::with_capacity(9), 0).unwrap();
/// let rules = TurnRules::trucks(TurnPenalties { u_turn: 30, ..Default::default() });
/// let table = TurnTable::new(&inst, &rules).unwrap();
/// let w = walk_with_turns(&inst, &table, &[Visit::new(0, Dir::Forward)]).unwrap();
/// assert_eq!(w.steps.len(), 4); // 0→1, serve 1→2, 2→1, 1→0
/// assert_eq!(w.count(TurnKind::UTurn), 1); // at the dead end only
/// assert_eq!(w.cost(&inst), 5 + 4 + 4 + 5 + 30);
/// ```
pub fn walk_with_turns(inst: &Instance, table: &TurnTable, visits: &[Visit]) -> Option<TurnWalk> {
    let net = inst.network();
    let n = inst.tasks().len();
    let key = |v: &Visit| 2 * v.task + (v.dir == crate::model::Dir::Backward) as usize;
    let mut arcs: Vec<(u32, bool)> = Vec::new();
    let mut at = 2 * n; // the yard
    let stops = visits
        .iter()
        .map(|v| Some(key(v)))
        .chain((!visits.is_empty()).then_some(None));
    for to in stops {
        let target = to.map(|k| {
            let t = &inst.tasks()[k / 2];
            arc_of(
                t.link,
                if k % 2 == 0 {
                    crate::model::Dir::Forward
                } else {
                    crate::model::Dir::Backward
                },
            )
        });
        for a in leg(inst, table, source_of(inst, at), target)? {
            arcs.push((a, false));
        }
        if let (Some(k), Some(a)) = (to, target) {
            arcs.push((a, true));
            at = k;
        }
    }
    let steps: Vec<Step> = arcs
        .iter()
        .map(|&(a, serve)| Step {
            link: a as usize / 2,
            from: tail(net, a),
            to: head(net, a),
            serve,
        })
        .collect();
    let turns = arcs
        .windows(2)
        .map(|w| {
            let (a, b) = (w[0].0, w[1].0);
            let kind = super::turn_kind(
                net,
                inst.coordinates(),
                a as usize / 2,
                head(net, a),
                b as usize / 2,
            );
            Some(Turn {
                kind,
                cost: table.penalty(a, b)?,
            })
        })
        .collect::<Option<Vec<Turn>>>()?;
    Some(TurnWalk { steps, turns })
}

/// The walks of every route of `plan` ([`walk_with_turns`]), in parallel;
/// `None` when some route has a leg with no allowed way.
pub fn walks_with_turns(inst: &Instance, table: &TurnTable, plan: &Plan) -> Option<Vec<TurnWalk>> {
    plan.routes
        .par_iter()
        .map(|r| walk_with_turns(inst, table, &r.visits))
        .collect()
}

/// The deadheaded arcs of the least (cost, time) leg from `src` to entering
/// arc `target` (to arriving at the yard when `None`), as [`TurnDistances`]
/// prices it; `None` when there is no allowed way. A Dijkstra search on the
/// driving arcs like [`super::search`], stopped as soon as no arc left in
/// the queue can end the leg more cheaply than the best end found (every
/// cost and penalty is at least zero).
///
/// [`TurnDistances`]: super::TurnDistances
fn leg(inst: &Instance, table: &TurnTable, src: Source, target: Option<u32>) -> Option<Vec<u32>> {
    let net = inst.network();
    let yard = inst.depot();
    // Directly, without deadheading.
    let direct = match (src, target) {
        (Source::After(a), Some(b)) => table.penalty(a, b).map(|p| (p, 0)),
        (Source::After(a), None) => (head(net, a) == yard).then_some((0, 0)),
        (Source::At(v), Some(b)) => (tail(net, b) == v).then_some((0, 0)),
        (Source::At(_), None) => Some((0, 0)),
    };
    if direct == Some((0, 0)) {
        return Some(Vec::new());
    }
    let arcs = table.arcs();
    let mut best_at = vec![(UNREACHABLE, UNREACHABLE); arcs];
    let mut pred = vec![u32::MAX; arcs];
    let mut heap = BinaryHeap::new();
    let mut relax = |best_at: &mut Vec<(Cost, Cost)>,
                     heap: &mut BinaryHeap<_>,
                     f: u32,
                     c: Cost,
                     t: Cost,
                     p: u32| {
        let l = &net.links[f as usize / 2];
        let x = (c + l.cost, t + l.drive_time());
        if x < best_at[f as usize] {
            best_at[f as usize] = x;
            pred[f as usize] = p;
            heap.push(Reverse((x.0, x.1, f)));
        }
    };
    match src {
        Source::After(a) => {
            let tr = table.turns(a);
            for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
                relax(&mut best_at, &mut heap, f, pen, 0, u32::MAX);
            }
        }
        Source::At(v) => {
            for f in 0..arcs as u32 {
                if table.drivable(f) && tail(net, f) == v {
                    relax(&mut best_at, &mut heap, f, 0, 0, u32::MAX);
                }
            }
        }
    }
    let mut best: Option<((Cost, Cost), Option<u32>)> = direct.map(|d| (d, None));
    while let Some(Reverse((c, t, e))) = heap.pop() {
        if (c, t) != best_at[e as usize] {
            continue;
        }
        if best.is_some_and(|(b, _)| (c, t) >= b) {
            break;
        }
        let end = match target {
            Some(b) => table.penalty(e, b).map(|p| (c + p, t)),
            None => (head(net, e) == yard).then_some((c, t)),
        };
        if let Some(x) = end {
            if best.is_none_or(|(b, _)| x < b) {
                best = Some((x, Some(e)));
            }
        }
        let tr = table.turns(e);
        for (&f, &pen) in tr.next.iter().zip(tr.penalty) {
            relax(&mut best_at, &mut heap, f, c + pen, t, e);
        }
    }
    let (_, last) = best?;
    let mut path = Vec::new();
    let mut e = last;
    while let Some(a) = e {
        path.push(a);
        let p = pred[a as usize];
        e = (p != u32::MAX).then_some(p);
    }
    path.reverse();
    Some(path)
}

impl TurnWalk {
    /// The walk's time: service time of the served steps, driving time of
    /// the others (turns add to the cost only).
    ///
    /// # Panics
    ///
    /// As [`TurnWalk::cost`].
    pub fn time(&self, inst: &Instance) -> Cost {
        let net = inst.network();
        self.steps
            .iter()
            .map(|s| {
                let l = &net.links[s.link];
                if s.serve {
                    let sv = l
                        .service
                        .as_ref()
                        .expect("a served step is on a required link");
                    sv.time.unwrap_or(sv.cost)
                } else {
                    l.drive_time()
                }
            })
            .sum()
    }
}

/// A route serving `visits` in order, its cost and time priced along its
/// walk with turns ([`walk_with_turns`]); cost and time are [`UNREACHABLE`]
/// when a leg has no allowed way. Equal to
/// [`totals_with_turns`](super::totals_with_turns) without its distance matrix.
pub fn route_with_turns(inst: &Instance, table: &TurnTable, visits: Vec<Visit>) -> Route {
    let load = visits.iter().map(|v| inst.tasks()[v.task].demand).sum();
    let (cost, time) = match walk_with_turns(inst, table, &visits) {
        Some(w) => (w.cost(inst), w.time(inst)),
        None => (UNREACHABLE, UNREACHABLE),
    };
    Route {
        visits,
        load,
        cost,
        time,
    }
}
