//! The checker's own view of turn rules: which turns are allowed, what they
//! cost, and the least turn-aware cost of each leg of a route.
//!
//! Written apart from [`crate::turns`]'s table and search (only the angle
//! classification, [`crate::turns::turn_kind`], is shared): the allowed
//! turns are derived here from the rules and restrictions by a direct scan,
//! and each leg is searched with its own Dijkstra on (street, direction) states.

use std::cmp::Reverse;
use std::collections::{BTreeMap, BinaryHeap};

use super::{Found, Violation};
use crate::model::{Cost, Dir, Instance};
use crate::plan::{Route, Step};
use crate::turns::{turn_kind, TurnKind, TurnRules, TurnWalk, UTurns};

/// A street driven one way: (link, backward?).
type Drive = (usize, bool);

/// Allowed turns after each drive, with their penalties.
pub(super) struct Turns {
    next: BTreeMap<Drive, Vec<(Drive, Cost)>>,
}

fn ends(inst: &Instance, d: Drive) -> (usize, usize) {
    let l = &inst.network().links[d.0];
    if d.1 {
        (l.to, l.from)
    } else {
        (l.from, l.to)
    }
}

impl Turns {
    pub(super) fn new(inst: &Instance, rules: &TurnRules) -> Turns {
        let net = inst.network();
        let drives: Vec<Drive> = (0..net.links.len())
            .flat_map(|i| [(i, false), (i, true)])
            .filter(|&(i, back)| !back || !net.links[i].oneway)
            .collect();
        let mut leaving: BTreeMap<usize, Vec<Drive>> = BTreeMap::new();
        for &d in &drives {
            leaving.entry(ends(inst, d).0).or_default().push(d);
        }
        // Streets (loops aside) meeting at each junction, counted once.
        let mut meeting = vec![0usize; net.junctions.len()];
        for l in net.links.iter().filter(|l| l.from != l.to) {
            meeting[l.from] += 1;
            meeting[l.to] += 1;
        }
        let streets_at = |v: usize| meeting[v];
        let mut next = BTreeMap::new();
        for &d in &drives {
            let via = ends(inst, d).1;
            let mut list = Vec::new();
            for &e in leaving.get(&via).map_or(&[][..], |v| v) {
                if let Some(p) = turn_allowed(inst, rules, d.0, via, e.0, &streets_at) {
                    list.push((e, p));
                }
            }
            next.insert(d, list);
        }
        Turns { next }
    }

    /// The penalty of going on from `a` into `b`, `None` when not allowed.
    pub(super) fn penalty(&self, a: Drive, b: Drive) -> Option<Cost> {
        self.next.get(&a)?.iter().find(|x| x.0 == b).map(|x| x.1)
    }

    /// Least (cost, time) from having driven `from` (or from the yard) to
    /// starting `to` (or arriving at the yard), turns included.
    fn leg(&self, inst: &Instance, from: Option<Drive>, to: Option<Drive>) -> Option<(Cost, Cost)> {
        let net = inst.network();
        let yard = inst.depot();
        let mut best: BTreeMap<Drive, (Cost, Cost)> = BTreeMap::new();
        let mut heap = BinaryHeap::new();
        let mut answer: Option<(Cost, Cost)> = None;
        let offer = |ans: &mut Option<(Cost, Cost)>, c: (Cost, Cost)| {
            if ans.is_none_or(|a| c < a) {
                *ans = Some(c);
            }
        };
        // Going on from a state that has just driven `d` at (c, t).
        let starts: Vec<(Drive, Cost)> = match from {
            Some(d) => self.next[&d].clone(),
            None => self
                .next
                .keys()
                .filter(|&&d| ends(inst, d).0 == yard)
                .map(|&d| (d, 0))
                .collect(),
        };
        match (from, to) {
            (None, None) => return Some((0, 0)),
            (Some(d), None) if ends(inst, d).1 == yard => return Some((0, 0)),
            (None, Some(b)) if ends(inst, b).0 == yard => return Some((0, 0)),
            (Some(d), Some(b)) => {
                if let Some(p) = self.penalty(d, b) {
                    offer(&mut answer, (p, 0));
                }
            }
            _ => {}
        }
        for (e, p) in starts {
            let l = &net.links[e.0];
            heap.push(Reverse((p + l.cost, l.drive_time(), e)));
        }
        while let Some(Reverse((c, t, d))) = heap.pop() {
            if best.contains_key(&d) {
                continue;
            }
            best.insert(d, (c, t));
            if answer.is_some_and(|a| a.0 < c) {
                break;
            }
            match to {
                None if ends(inst, d).1 == yard => offer(&mut answer, (c, t)),
                Some(b) => {
                    if let Some(p) = self.penalty(d, b) {
                        offer(&mut answer, (c + p, t));
                    }
                }
                None => {}
            }
            for &(e, p) in &self.next[&d] {
                if !best.contains_key(&e) {
                    let l = &net.links[e.0];
                    heap.push(Reverse((c + p + l.cost, t + l.drive_time(), e)));
                }
            }
        }
        answer
    }
}

/// The penalty of the turn from link `from` into `to` at `via`, `None` when banned.
fn turn_allowed(
    inst: &Instance,
    rules: &TurnRules,
    from: usize,
    via: usize,
    to: usize,
    streets_at: &dyn Fn(usize) -> usize,
) -> Option<Cost> {
    let net = inst.network();
    if rules.obey_restrictions {
        let here = net
            .turn_restrictions
            .iter()
            .filter(|r| r.from == from && r.via == via);
        let mut only = here.clone().filter(|r| r.is_only()).peekable();
        if only.peek().is_some() && !only.any(|r| r.to == to) {
            return None;
        }
        if here.filter(|r| !r.is_only()).any(|r| r.to == to) {
            return None;
        }
    }
    let kind = turn_kind(net, inst.coordinates(), from, via, to);
    if kind == TurnKind::UTurn && rules.u_turns == UTurns::DeadEndsOnly && streets_at(via) != 1 {
        return None;
    }
    Some(rules.penalty(kind))
}

/// A route's load, cost and time with turn-aware legs.
pub(super) fn route_totals(
    inst: &Instance,
    turns: &Turns,
    r: usize,
    route: &Route,
    out: &mut Vec<Violation>,
) -> Found {
    let (mut load, mut cost, mut time) = (0 as Cost, 0 as Cost, 0 as Cost);
    let mut at: Option<Drive> = None;
    let mut reachable = true;
    let stops: Vec<Option<Drive>> = route
        .visits
        .iter()
        .filter_map(|v| {
            let t = inst.tasks().get(v.task)?;
            load = load.saturating_add(t.demand);
            cost = cost.saturating_add(t.cost);
            time = time.saturating_add(t.time);
            Some(Some((t.link, v.dir == Dir::Backward)))
        })
        .chain((!route.visits.is_empty()).then_some(None))
        .collect();
    for to in stops {
        match turns.leg(inst, at, to) {
            Some((c, t)) => {
                cost = cost.saturating_add(c);
                time = time.saturating_add(t);
            }
            None => {
                reachable = false;
                let a = at.map_or(inst.depot(), |d| ends(inst, d).1);
                let b = to.map_or(inst.depot(), |d| ends(inst, d).0);
                let ids = |j: usize| inst.network().junctions[j].id;
                out.push(Violation::NoPath {
                    route: r,
                    from: a,
                    from_id: ids(a),
                    to: b,
                    to_id: ids(b),
                });
            }
        }
        at = to;
    }
    Found {
        load,
        cost: reachable.then_some(cost),
        time,
    }
}

/// Every banned turn of a walk, and the sum of the penalties of the others.
pub(super) fn walk_turns(
    inst: &Instance,
    turns: &Turns,
    w: usize,
    walk: &[Step],
    out: &mut Vec<Violation>,
) -> Cost {
    let net = inst.network();
    let drive = |s: &Step| (s.link, s.from != net.links[s.link].from);
    let mut total = 0;
    for (k, pair) in walk.windows(2).enumerate() {
        if pair[0].to != pair[1].from {
            // Reported as a walk that does not connect.
            continue;
        }
        let (a, b) = (drive(&pair[0]), drive(&pair[1]));
        match turns.penalty(a, b) {
            Some(p) => total += p,
            None => out.push(Violation::BannedTurn {
                route: w,
                step: k + 1,
                from: net.street_label(a.0),
                to: net.street_label(b.0),
                via: net.junctions[pair[0].to].id,
            }),
        }
    }
    total
}

/// Whether every step of a walk is a real link driven between its two ends
/// (otherwise [`super::check_walks`] reports it and nothing more is judged).
fn steps_on_links(inst: &Instance, walk: &[Step]) -> bool {
    let links = &inst.network().links;
    walk.iter().all(|s| {
        links
            .get(s.link)
            .is_some_and(|l| (s.from, s.to) == (l.from, l.to) || (s.from, s.to) == (l.to, l.from))
    })
}

/// The stated turns of a walk against the rules, its services against the
/// route's, and its cost against the route's stated cost.
pub(super) fn stated_turns(
    inst: &Instance,
    turns: &Turns,
    r: usize,
    w: &TurnWalk,
    route: &Route,
    out: &mut Vec<Violation>,
) {
    let net = inst.network();
    if !steps_on_links(inst, &w.steps) {
        return;
    }
    if w.turns.len() + 1 != w.steps.len().max(1) {
        out.push(Violation::TurnCount {
            route: r,
            steps: w.steps.len(),
            turns: w.turns.len(),
        });
        return;
    }
    let drive = |s: &Step| (s.link, s.from != net.links[s.link].from);
    let mut penalties: Cost = 0;
    for (k, (pair, stated)) in w.steps.windows(2).zip(&w.turns).enumerate() {
        if pair[0].to != pair[1].from {
            continue;
        }
        let (a, b) = (drive(&pair[0]), drive(&pair[1]));
        let Some(actual) = turns.penalty(a, b) else {
            continue; // a banned turn, reported by check_walks
        };
        penalties = penalties.saturating_add(actual);
        let via = pair[0].to;
        let kind = turn_kind(net, inst.coordinates(), a.0, via, b.0);
        if stated.cost != actual || stated.kind != kind {
            out.push(Violation::WrongTurn {
                route: r,
                step: k + 1,
                from: net.street_label(a.0),
                to: net.street_label(b.0),
                via: net.junctions[via].id,
                stated_kind: stated.kind,
                actual_kind: kind,
                stated: stated.cost,
                actual,
            });
        }
    }
    // The walk's services against the route's list.
    let served: Vec<Drive> = w.steps.iter().filter(|s| s.serve).map(drive).collect();
    let listed: Vec<Option<Drive>> = route
        .visits
        .iter()
        .map(|v| {
            let t = inst.tasks().get(v.task)?;
            let l = &net.links[t.link];
            Some((t.link, v.dir == Dir::Backward && l.from != l.to))
        })
        .collect();
    let n = served.len().max(listed.len());
    if let Some(position) =
        (0..n).find(|&i| served.get(i).copied() != listed.get(i).copied().flatten())
    {
        out.push(Violation::WalkServices { route: r, position });
    }
    // The walk's cost: every step's cost plus the turns' penalties.
    let mut cost = penalties;
    for s in &w.steps {
        let l = &net.links[s.link];
        let c = if s.serve {
            match &l.service {
                Some(sv) => sv.cost,
                None => return, // reported by check_walks
            }
        } else {
            l.cost
        };
        cost = cost.saturating_add(c);
    }
    if cost != route.cost {
        out.push(Violation::WalkCost {
            route: r,
            walk: cost,
            stated: route.cost,
        });
    }
}
