//! Independent plan checker: verifies a plan from the instance alone.
//!
//! Nothing here trusts the solver or the crate's shortest-path module
//! ([`crate::paths`]): [`check_plan`] recomputes every shortest deadhead with
//! its own lexicographic Dijkstra search (least cost, ties broken by least
//! time, the convention documented in [`crate::model::Fleet::shift_limit`]),
//! and recomputes every load, cost and time from scratch. [`check_walks`]
//! checks explicit street-by-street walks ([`Step`]s) against the network;
//! [`check_turn_walks`] checks walks that state their turns (plan files of
//! scenarios with turn rules) turn by turn, with the checker's own turn
//! table, and their costs against the routes'.
//!
//! All problems found are returned, not only the first, as typed
//! [`Violation`]s. Their fields are 0-based indices, as in [`Plan::routes`],
//! [`Instance::tasks`], [`crate::model::Network::links`] and
//! [`crate::model::Network::junctions`] ([`Violation::NoPath`] also gives
//! the junctions' ids), plus the street's label where one is concerned.
//! Their `Display` speaks the words of the route sheets: trucks, services
//! and steps numbered from 1, the yard, and a street by its name and
//! junction ids ([`crate::model::Network::street_label`]; `street #N`, its
//! 0-based place in the street list, only for a step naming no street).
//! Junctions are given by their ids where the violation holds them,
//! otherwise as `junction #N` (0-based place in the junction list);
//! [`crate::report::describe`] words every finding with the instance at hand.
//!
//! For an instance built by [`Instance::new`] every task can be reached from
//! the depot and back, so [`Violation::NoPath`] cannot occur with allowed
//! directions; the check stays as a guard.
//!
//! ```
//! use arcwright::check::{check_plan, Violation};
//! use arcwright::model::{Dir, Fleet, Instance, Network};
//! use arcwright::plan::{Plan, Route, Visit};
//!
//! // A triangle: two required streets and one street to drive back on.
//! let mut net = Network::with_junctions(3);
//! net.add_required_edge(0, 1, 4, 2);
//! net.add_required_edge(1, 2, 5, 3);
//! net.add_edge(2, 0, 7);
//! let inst = Instance::new("triangle", net, Fleet::with_capacity(10), 0).unwrap();
//!
//! // One truck serves both streets and drives back: 4 + 5 + 7 = 16.
//! let visits = vec![Visit::new(0, Dir::Forward), Visit::new(1, Dir::Forward)];
//! let good = Plan { routes: vec![Route { visits, load: 5, cost: 16, time: 16 }], cost: 16 };
//! assert!(check_plan(&inst, &good).is_ok());
//!
//! // A plan that reports a wrong cost is rejected with the numbers involved.
//! let mut bad = good.clone();
//! bad.routes[0].cost = 15;
//! bad.cost = 15;
//! let v = check_plan(&inst, &bad).unwrap_err();
//! assert!(v.contains(&Violation::WrongCost { route: 0, reported: 15, actual: 16 }));
//! assert_eq!(v[0].to_string(), "Truck 1: the plan states cost 15, but the route costs 16");
//! ```

pub mod fleet;

use std::cmp::Reverse;
use std::collections::{BTreeMap, BinaryHeap};
use std::fmt;

use rayon::prelude::*;

use crate::model::{Cost, Dir, Instance};
use crate::plan::{Plan, Step};
use crate::turns::{TurnKind, TurnWalk};

mod turns;

/// Where a task was served: route index and position in the route (for
/// walks: the step index).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct At {
    /// Route (or walk) index.
    pub route: usize,
    /// Position of the visit in the route, or index of the step in the walk.
    pub pos: usize,
}

impl fmt::Display for At {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Truck {}, position {}", self.route + 1, self.pos + 1)
    }
}

/// One thing wrong with a plan or a walk.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum Violation {
    /// A visit names a task index that does not exist.
    #[error("Truck {}, service {}: no task #{task} (the instance has {tasks} streets to serve)", .at.route + 1, .at.pos + 1)]
    UnknownTask {
        /// Where.
        at: At,
        /// The task index given.
        task: usize,
        /// Number of tasks of the instance.
        tasks: usize,
    },
    /// A task is served backward although only forward service is allowed
    /// (a one-way street, or one side of a street).
    #[error(
        "Truck {}, service {}: {street} is served backward, but it may only be served forward (from its first junction to its second)",
        .at.route + 1, .at.pos + 1
    )]
    DirectionNotAllowed {
        /// Where.
        at: At,
        /// Task index.
        task: usize,
        /// Link index of the task.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
    },
    /// A task is served more than once.
    #[error(
        "{street} is served twice: by Truck {}, service {} and again by Truck {}, service {}",
        .first.route + 1, .first.pos + 1, .again.route + 1, .again.pos + 1
    )]
    ServedTwice {
        /// Task index.
        task: usize,
        /// Link index.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
        /// The first service.
        first: At,
        /// A later service.
        again: At,
    },
    /// A task is not served at all.
    #[error("{street} is not served")]
    NotServed {
        /// Task index.
        task: usize,
        /// Link index.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
    },
    /// A walk makes a turn the scenario's turn rules ban.
    #[error(
        "Truck {}, step {}: the turn from {from} into {to} at junction {via} is banned", .route + 1, .step + 1
    )]
    BannedTurn {
        /// Walk (route) index.
        route: usize,
        /// Index (0-based) of the step the turn leads into.
        step: usize,
        /// The street arrived on.
        from: String,
        /// The street turned into.
        to: String,
        /// The junction id of the turn.
        via: u64,
    },
    /// A walk states a turn of another kind or with another penalty than
    /// the turn rules give it.
    #[error(
        "Truck {}, step {}: the turn from {from} into {to} at junction {via} is stated as `{stated_kind}` costing {stated}, but the turn rules make it `{actual_kind}` costing {actual}",
        .route + 1, .step + 1
    )]
    WrongTurn {
        /// Walk (route) index.
        route: usize,
        /// Index (0-based) of the step the turn leads into.
        step: usize,
        /// The street arrived on.
        from: String,
        /// The street turned into.
        to: String,
        /// The junction id of the turn.
        via: u64,
        /// The kind the walk states.
        stated_kind: TurnKind,
        /// The kind of the turn from the street geometry.
        actual_kind: TurnKind,
        /// The penalty the walk states.
        stated: Cost,
        /// The penalty the turn rules give.
        actual: Cost,
    },
    /// A walk does not state one turn between each two of its steps.
    #[error("Truck {}: the walk has {steps} steps but states {turns} turns (one fewer than the steps)", .route + 1)]
    TurnCount {
        /// Walk (route) index.
        route: usize,
        /// Steps of the walk.
        steps: usize,
        /// Turns stated.
        turns: usize,
    },
    /// A route's walk, with its turns, does not cost what the route states.
    #[error("Truck {}: its walk costs {walk} (streets and turns), but the plan states cost {stated}", .route + 1)]
    WalkCost {
        /// Route index.
        route: usize,
        /// The walk's cost, recomputed.
        walk: Cost,
        /// The route's stated cost.
        stated: Cost,
    },
    /// A route's walk serves other streets, or in another order or
    /// direction, than the route's list of services.
    #[error("Truck {}: service {} of the walk is not service {} of the route's list", .route + 1, .position + 1, .position + 1)]
    WalkServices {
        /// Route index.
        route: usize,
        /// Position (0-based) of the first service that differs.
        position: usize,
    },
    /// The number of walks differs from the number of routes.
    #[error("the plan has {routes} routes but {walks} walks")]
    WalkCount {
        /// Routes of the plan.
        routes: usize,
        /// Walks given.
        walks: usize,
    },
    /// No path leads from one junction to the next in a route.
    #[error("Truck {}: no way to drive from junction {from_id} to junction {to_id}", .route + 1)]
    NoPath {
        /// Route index.
        route: usize,
        /// Junction index where the leg starts.
        from: usize,
        /// Its external id.
        from_id: u64,
        /// Junction index where it should end.
        to: usize,
        /// Its external id.
        to_id: u64,
    },
    /// A route carries more than a truck holds.
    #[error("Truck {}: load {load} exceeds the capacity {capacity} by {}", .route + 1, .load - .capacity)]
    OverCapacity {
        /// Route index.
        route: usize,
        /// Load of the route (recomputed).
        load: Cost,
        /// The truck capacity.
        capacity: Cost,
    },
    /// A route takes longer than the shift limit.
    #[error("Truck {}: time {time} exceeds the shift limit {limit} by {}", .route + 1, .time - .limit)]
    OverShift {
        /// Route index.
        route: usize,
        /// Time of the route (recomputed).
        time: Cost,
        /// The shift limit.
        limit: Cost,
    },
    /// The plan uses more trucks than the fleet has.
    #[error("the plan uses {routes} trucks, but the fleet has only {max}")]
    TooManyRoutes {
        /// Number of routes.
        routes: usize,
        /// The fleet's maximum.
        max: usize,
    },
    /// A route serves nothing.
    #[error("Truck {} serves nothing", .route + 1)]
    EmptyRoute {
        /// Route index.
        route: usize,
    },
    /// A route's reported load differs from the recomputed one.
    #[error("Truck {}: the plan states load {reported}, but its streets add up to {actual}", .route + 1)]
    WrongLoad {
        /// Route index.
        route: usize,
        /// Value in the plan.
        reported: Cost,
        /// Recomputed value.
        actual: Cost,
    },
    /// A route's reported cost differs from the recomputed one.
    #[error("Truck {}: the plan states cost {reported}, but the route costs {actual}", .route + 1)]
    WrongCost {
        /// Route index.
        route: usize,
        /// Value in the plan.
        reported: Cost,
        /// Recomputed value.
        actual: Cost,
    },
    /// A route's reported time differs from the recomputed one.
    #[error("Truck {}: the plan states time {reported}, but the route takes {actual}", .route + 1)]
    WrongTime {
        /// Route index.
        route: usize,
        /// Value in the plan.
        reported: Cost,
        /// Recomputed value.
        actual: Cost,
    },
    /// The plan's reported total cost differs from the sum of the
    /// recomputed route costs.
    #[error("the plan states a total cost of {reported}, but its trucks add up to {actual}")]
    WrongTotal {
        /// Value in the plan.
        reported: Cost,
        /// Recomputed value.
        actual: Cost,
    },
    /// A walk step names a link index that does not exist.
    #[error("Truck {}, step {}: no street #{link} (the network has {links} streets)", .at.route + 1, .at.pos + 1)]
    UnknownLink {
        /// Where.
        at: At,
        /// The link index given.
        link: usize,
        /// Number of links of the network.
        links: usize,
    },
    /// A walk step's junctions are not the two ends of its link.
    #[error("Truck {}, step {}: a step from junction #{from} to junction #{to} does not follow {street}", .at.route + 1, .at.pos + 1)]
    NotOnLink {
        /// Where.
        at: At,
        /// Link index.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
        /// Junction index the step starts at.
        from: usize,
        /// Junction index it ends at.
        to: usize,
    },
    /// A walk step drives a one-way link against its direction.
    #[error("Truck {}, step {}: one-way {street} is driven against its direction", .at.route + 1, .at.pos + 1)]
    AgainstOneWay {
        /// Where.
        at: At,
        /// Link index.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
    },
    /// A walk step does not start where the previous one ended.
    #[error("Truck {}, step {}: the step starts at junction #{found}, but the previous one ended at junction #{expected}", .at.route + 1, .at.pos + 1)]
    Disconnected {
        /// Where (the step that does not connect).
        at: At,
        /// Junction index where the previous step ended.
        expected: usize,
        /// Junction index where this step starts.
        found: usize,
    },
    /// A walk does not start at the depot.
    #[error("Truck {} starts at junction #{junction}, not at the yard", .route + 1)]
    NotFromDepot {
        /// Walk index.
        route: usize,
        /// Junction index where it starts.
        junction: usize,
    },
    /// A walk does not end at the depot.
    #[error("Truck {} ends at junction #{junction}, not at the yard", .route + 1)]
    NotToDepot {
        /// Walk index.
        route: usize,
        /// Junction index where it ends.
        junction: usize,
    },
    /// A walk serves a link that is not required.
    #[error("Truck {}, step {}: {street} is served but it is not to be served", .at.route + 1, .at.pos + 1)]
    ServesNonRequired {
        /// Where.
        at: At,
        /// Link index.
        link: usize,
        /// The street as messages name it ([`crate::model::Network::street_label`]:
        /// its name and junction ids, or its junction ids).
        street: String,
    },
}

/// Forward adjacency of the deadhead graph: for each junction, (to, cost, time).
fn adjacency(inst: &Instance) -> Vec<Vec<(usize, Cost, Cost)>> {
    let net = inst.network();
    let mut adj = vec![Vec::new(); net.junctions.len()];
    for l in &net.links {
        let t = l.time.unwrap_or(l.cost);
        adj[l.from].push((l.to, l.cost, t));
        if !l.oneway {
            adj[l.to].push((l.from, l.cost, t));
        }
    }
    adj
}

/// Lexicographic (cost, time) Dijkstra from `s`; `None` for unreachable.
/// Least (cost, time) from `s` to every junction, found in order; the search
/// stops once every junction of `targets` is settled (values of junctions
/// not settled by then may be missing or too high: read only the targets).
fn shortest_from(
    adj: &[Vec<(usize, Cost, Cost)>],
    s: usize,
    targets: &[usize],
) -> Vec<Option<(Cost, Cost)>> {
    let mut best: Vec<Option<(Cost, Cost)>> = vec![None; adj.len()];
    let mut done = vec![false; adj.len()];
    let mut wanted = vec![false; adj.len()];
    let mut left = 0usize;
    for &t in targets {
        if !wanted[t] {
            wanted[t] = true;
            left += 1;
        }
    }
    let mut heap = BinaryHeap::new();
    best[s] = Some((0, 0));
    heap.push(Reverse((0 as Cost, 0 as Cost, s)));
    while let Some(Reverse((c, t, v))) = heap.pop() {
        if done[v] {
            continue;
        }
        done[v] = true;
        if wanted[v] {
            left -= 1;
            if left == 0 {
                break;
            }
        }
        for &(w, lc, lt) in &adj[v] {
            let cand = (c.saturating_add(lc), t.saturating_add(lt));
            if !done[w] && best[w].is_none_or(|b| cand < b) {
                best[w] = Some(cand);
                heap.push(Reverse((cand.0, cand.1, w)));
            }
        }
    }
    best
}

/// Checks a plan against an instance, recomputing everything from scratch.
///
/// Checks: every visit names a real task, served in an allowed direction;
/// every task served exactly once; every leg (depot to first task, task to
/// task, last task to depot) has a path; no empty route; every route's load
/// within the capacity and time within the shift limit; at most
/// `max_vehicles` routes; and each route's reported load, cost and time and
/// the plan's total cost equal the recomputed values.
///
/// Route cost is service cost plus the least deadhead cost of every leg
/// (with turn rules: the least cost of driving on from the street served,
/// or the yard, to the start of the next, every turn's penalty included and
/// banned turns avoided, by the checker's own search on (street, direction)
/// states);
/// route time is service time plus the driving time along those least-cost
/// legs (ties between equally cheap paths broken by least time).
///
/// Returns every violation found (in a deterministic order).
///
/// # Errors
/// Every [`Violation`] found, when the plan is not valid for the instance.
///
/// # Complexity
/// One Dijkstra search `O((V + E) log V)` per distinct leg start (at most
/// the number of visits plus one), then `O(visits)`; memory `O(V + E)` per
/// search and one entry per leg.
///
/// ```
/// use arcwright::check::{check_plan, Violation};
/// use arcwright::model::{Dir, Fleet, Instance, Network};
/// use arcwright::plan::{Plan, Route, Visit};
/// let mut net = Network::with_junctions(2);
/// net.add_required_edge(0, 1, 5, 1);
/// let inst = Instance::new("one street", net, Fleet::with_capacity(1), 0).unwrap();
/// let there_and_back = Route { visits: vec![Visit::new(0, Dir::Forward)], load: 1, cost: 10, time: 10 };
/// assert!(check_plan(&inst, &Plan { routes: vec![there_and_back], cost: 10 }).is_ok());
/// let nothing = Plan { routes: vec![], cost: 0 };
/// assert_eq!(check_plan(&inst, &nothing), Err(vec![Violation::NotServed {
///     task: 0,
///     link: 0,
///     street: "street 1-2".into(),
/// }]));
/// ```
pub fn check_plan(inst: &Instance, plan: &Plan) -> Result<(), Vec<Violation>> {
    let mut out = Vec::new();
    fleet_size(inst, plan.routes.len(), &mut out);
    let mut cover = Coverage::new(inst);
    for (r, route) in plan.routes.iter().enumerate() {
        if route.visits.is_empty() {
            out.push(Violation::EmptyRoute { route: r });
        }
        for (p, v) in route.visits.iter().enumerate() {
            cover.visit(inst, At { route: r, pos: p }, v.task, v.dir, &mut out);
        }
    }
    cover.finish(inst, &mut out);

    let legs: Vec<Vec<(usize, usize)>> = plan.routes.iter().map(|r| legs_of(inst, r)).collect();
    let turns = inst
        .turn_rules()
        .map(|rules| turns::Turns::new(inst, rules));
    let leg_dist = if turns.is_some() {
        LegDistances::new()
    } else {
        leg_distances(inst, &legs)
    };
    // Routes are priced in parallel (rayon); their findings are listed in
    // route order as before.
    let priced: Vec<(Found, Vec<Violation>)> = plan
        .routes
        .par_iter()
        .enumerate()
        .map(|(r, route)| {
            let mut own = Vec::new();
            let found = match &turns {
                Some(t) => turns::route_totals(inst, t, r, route, &mut own),
                None => route_totals(inst, r, route, &legs[r], &leg_dist, &mut own),
            };
            (found, own)
        })
        .collect();
    let mut total: Cost = 0;
    let mut total_known = true;
    for ((r, route), (found, own)) in plan.routes.iter().enumerate().zip(priced) {
        out.extend(own);
        limits(
            inst,
            r,
            found.load,
            found.cost.map(|_| found.time),
            &mut out,
        );
        if route.load != found.load {
            out.push(Violation::WrongLoad {
                route: r,
                reported: route.load,
                actual: found.load,
            });
        }
        let Some(cost) = found.cost else {
            total_known = false;
            continue;
        };
        for (reported, actual, wrong) in [
            (route.cost, cost, WrongField::Cost),
            (route.time, found.time, WrongField::Time),
        ] {
            if reported != actual {
                out.push(wrong.violation(r, reported, actual));
            }
        }
        total = total.saturating_add(cost);
    }
    if total_known && plan.cost != total {
        out.push(Violation::WrongTotal {
            reported: plan.cost,
            actual: total,
        });
    }
    if out.is_empty() {
        Ok(())
    } else {
        Err(out)
    }
}

/// The one check of the fleet bound, shared by plans and walks.
fn fleet_size(inst: &Instance, routes: usize, out: &mut Vec<Violation>) {
    if let Some(max) = inst.fleet().max_vehicles {
        if routes > max {
            out.push(Violation::TooManyRoutes { routes, max });
        }
    }
}

/// The one check of a route's load and shift limits, shared by plans and
/// walks; `time` is `None` when it cannot be known (a leg without a path).
fn limits(inst: &Instance, route: usize, load: Cost, time: Option<Cost>, out: &mut Vec<Violation>) {
    let fleet = inst.fleet();
    if load > fleet.capacity {
        out.push(Violation::OverCapacity {
            route,
            load,
            capacity: fleet.capacity,
        });
    }
    if let (Some(limit), Some(time)) = (fleet.shift_limit, time) {
        if time > limit {
            out.push(Violation::OverShift { route, time, limit });
        }
    }
}

/// Which tasks were served where: finds unknown tasks, forbidden
/// directions, second services and (at the end) tasks never served.
struct Coverage {
    seen: Vec<Option<At>>,
}

impl Coverage {
    fn new(inst: &Instance) -> Self {
        Coverage {
            seen: vec![None; inst.tasks().len()],
        }
    }

    fn visit(&mut self, inst: &Instance, at: At, task: usize, dir: Dir, out: &mut Vec<Violation>) {
        let tasks = inst.tasks();
        let Some(t) = tasks.get(task) else {
            out.push(Violation::UnknownTask {
                at,
                task,
                tasks: tasks.len(),
            });
            return;
        };
        if dir == Dir::Backward && !t.either {
            out.push(Violation::DirectionNotAllowed {
                at,
                task,
                link: t.link,
                street: inst.network().street_label(t.link),
            });
        }
        match self.seen[task] {
            Some(first) => out.push(Violation::ServedTwice {
                task,
                link: t.link,
                street: inst.network().street_label(t.link),
                first,
                again: at,
            }),
            None => self.seen[task] = Some(at),
        }
    }

    fn finish(self, inst: &Instance, out: &mut Vec<Violation>) {
        for (i, s) in self.seen.iter().enumerate() {
            if s.is_none() {
                let link = inst.tasks()[i].link;
                out.push(Violation::NotServed {
                    task: i,
                    link,
                    street: inst.network().street_label(link),
                });
            }
        }
    }
}

/// The deadhead legs of a route as (from, to) junction pairs, yard to
/// yard, skipping unknown tasks.
fn legs_of(inst: &Instance, route: &crate::plan::Route) -> Vec<(usize, usize)> {
    let depot = inst.depot();
    let mut at = depot;
    let mut legs = Vec::new();
    for v in &route.visits {
        if let Some(t) = inst.tasks().get(v.task) {
            let (s, e) = t.ends(v.dir);
            legs.push((at, s));
            at = e;
        }
    }
    if !route.visits.is_empty() {
        legs.push((at, depot));
    }
    legs
}

type LegDistances = BTreeMap<Leg, Option<(Cost, Cost)>>;

/// A leg: from junction, to junction.
type Leg = (usize, usize);

/// Least cost (and its time) of every leg, one search per distinct start.
fn leg_distances(inst: &Instance, legs: &[Vec<(usize, usize)>]) -> LegDistances {
    let adj = adjacency(inst);
    let mut by_source: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
    for l in legs.iter().flatten() {
        by_source.entry(l.0).or_default().push(l.1);
    }
    // One search per distinct start, stopped when its ends are reached; in
    // parallel (rayon), collected in the starts' order.
    let found: Vec<LegDistances> = by_source
        .into_par_iter()
        .map(|(s, targets)| {
            let d = shortest_from(&adj, s, &targets);
            targets.iter().map(|&t| ((s, t), d[t])).collect()
        })
        .collect();
    found.into_iter().flatten().collect()
}

/// A route's recomputed load, cost (`None` when a leg has no path) and time.
struct Found {
    load: Cost,
    cost: Option<Cost>,
    time: Cost,
}

fn route_totals(
    inst: &Instance,
    r: usize,
    route: &crate::plan::Route,
    legs: &[(usize, usize)],
    leg_dist: &LegDistances,
    out: &mut Vec<Violation>,
) -> Found {
    let (mut load, mut cost, mut time) = (0 as Cost, 0 as Cost, 0 as Cost);
    for v in &route.visits {
        if let Some(t) = inst.tasks().get(v.task) {
            load = load.saturating_add(t.demand);
            cost = cost.saturating_add(t.cost);
            time = time.saturating_add(t.time);
        }
    }
    let ids = |j: usize| inst.network().junctions[j].id;
    let mut reachable = true;
    for &(a, b) in legs {
        match leg_dist[&(a, b)] {
            Some((c, t)) => {
                cost = cost.saturating_add(c);
                time = time.saturating_add(t);
            }
            None => {
                reachable = false;
                out.push(Violation::NoPath {
                    route: r,
                    from: a,
                    from_id: ids(a),
                    to: b,
                    to_id: ids(b),
                });
            }
        }
    }
    Found {
        load,
        cost: reachable.then_some(cost),
        time,
    }
}

/// A reported route figure that may be wrong.
#[derive(Clone, Copy)]
enum WrongField {
    Cost,
    Time,
}

impl WrongField {
    fn violation(self, route: usize, reported: Cost, actual: Cost) -> Violation {
        match self {
            WrongField::Cost => Violation::WrongCost {
                route,
                reported,
                actual,
            },
            WrongField::Time => Violation::WrongTime {
                route,
                reported,
                actual,
            },
        }
    }
}

/// Checks explicit walks, one per truck, street by street.
///
/// Checks: every step names a real link and follows it between its two ends,
/// never against a one-way link; each step starts where the previous ended;
/// each walk starts and ends at the depot and serves something; served steps
/// are on required links, in an allowed direction, and every task is served
/// exactly once; nothing else is served; with turn rules, no turn between
/// two steps is banned ([`Violation::BannedTurn`]). Also the fleet limits: load within
/// capacity, time (service time of served steps plus driving time of the
/// others) within the shift limit, and at most `max_vehicles` walks.
///
/// # Errors
/// Every [`Violation`] found, when the walks are not valid for the instance.
pub fn check_walks(inst: &Instance, walks: &[Vec<Step>]) -> Result<(), Vec<Violation>> {
    let net = inst.network();
    let mut task_of = vec![None; net.links.len()];
    for (i, t) in inst.tasks().iter().enumerate() {
        task_of[t.link] = Some(i);
    }
    let mut out = Vec::new();
    fleet_size(inst, walks.len(), &mut out);
    let mut cover = Coverage::new(inst);
    let turns = inst
        .turn_rules()
        .map(|rules| turns::Turns::new(inst, rules));
    for (r, walk) in walks.iter().enumerate() {
        walk_ends(inst, r, walk, &mut out);
        if let Some(t) = &turns {
            if walk.iter().all(|s| s.link < net.links.len()) {
                turns::walk_turns(inst, t, r, walk, &mut out);
            }
        }
        let (mut load, mut time, mut served) = (0 as Cost, 0 as Cost, 0usize);
        for (p, s) in walk.iter().enumerate() {
            let at = At { route: r, pos: p };
            if p > 0 && walk[p - 1].to != s.from {
                out.push(Violation::Disconnected {
                    at,
                    expected: walk[p - 1].to,
                    found: s.from,
                });
            }
            let Some(forward) = step_on_link(inst, at, s, &mut out) else {
                continue;
            };
            let l = &net.links[s.link];
            if !s.serve {
                time = time.saturating_add(l.time.unwrap_or(l.cost));
                continue;
            }
            let Some(ti) = task_of[s.link] else {
                out.push(Violation::ServesNonRequired {
                    at,
                    link: s.link,
                    street: net.street_label(s.link),
                });
                continue;
            };
            let t = &inst.tasks()[ti];
            served += 1;
            load = load.saturating_add(t.demand);
            time = time.saturating_add(t.time);
            // A loop link (from == to) is forward either way.
            let dir = if forward { Dir::Forward } else { Dir::Backward };
            cover.visit(inst, at, ti, dir, &mut out);
        }
        if served == 0 {
            out.push(Violation::EmptyRoute { route: r });
        }
        limits(inst, r, load, Some(time), &mut out);
    }
    cover.finish(inst, &mut out);
    if out.is_empty() {
        Ok(())
    } else {
        Err(out)
    }
}

/// A walk starts and ends at the yard.
fn walk_ends(inst: &Instance, r: usize, walk: &[Step], out: &mut Vec<Violation>) {
    let depot = inst.depot();
    if let (Some(first), Some(last)) = (walk.first(), walk.last()) {
        if first.from != depot {
            out.push(Violation::NotFromDepot {
                route: r,
                junction: first.from,
            });
        }
        if last.to != depot {
            out.push(Violation::NotToDepot {
                route: r,
                junction: last.to,
            });
        }
    }
}

/// Whether a step drives its link forward (`Some(true)`), backward, or is
/// not on it at all (`None`, with the violation recorded). Driving a
/// one-way link backward is recorded too.
fn step_on_link(inst: &Instance, at: At, s: &Step, out: &mut Vec<Violation>) -> Option<bool> {
    let links = &inst.network().links;
    let Some(l) = links.get(s.link) else {
        out.push(Violation::UnknownLink {
            at,
            link: s.link,
            links: links.len(),
        });
        return None;
    };
    let forward = (s.from, s.to) == (l.from, l.to);
    let backward = (s.from, s.to) == (l.to, l.from);
    if !forward && !backward {
        out.push(Violation::NotOnLink {
            at,
            link: s.link,
            street: inst.network().street_label(s.link),
            from: s.from,
            to: s.to,
        });
        return None;
    }
    if !forward && l.oneway {
        out.push(Violation::AgainstOneWay {
            at,
            link: s.link,
            street: inst.network().street_label(s.link),
        });
    }
    Some(forward)
}

/// Checks a plan together with the explicit walks its plan file states, one
/// per route, turns included ([`TurnWalk`]): everything [`check_walks`]
/// checks on the steps (a walk that does not connect, banned turns, every
/// street served once, ...), and on top, with the checker's own turn table
/// (the scenario's turn rules, or free turns without them):
///
/// - each stated turn has the kind and the penalty the rules give it
///   ([`Violation::WrongTurn`]), one turn between each two steps
///   ([`Violation::TurnCount`]);
/// - the walk serves the route's services in their order and direction
///   ([`Violation::WalkServices`]);
/// - the walk's cost (service and driving cost of its steps plus the
///   penalties of its turns) is the route's stated cost
///   ([`Violation::WalkCost`]); one walk per route ([`Violation::WalkCount`]).
///
/// It does not check the plan's own figures against the least-cost legs:
/// [`check_plan`] does.
///
/// # Errors
/// Every [`Violation`] found.
pub fn check_turn_walks(
    inst: &Instance,
    plan: &Plan,
    walks: &[TurnWalk],
) -> Result<(), Vec<Violation>> {
    let steps: Vec<Vec<Step>> = walks.iter().map(|w| w.steps.clone()).collect();
    let mut out = check_walks(inst, &steps).err().unwrap_or_default();
    if walks.len() != plan.routes.len() {
        out.push(Violation::WalkCount {
            routes: plan.routes.len(),
            walks: walks.len(),
        });
    }
    let free = crate::turns::TurnRules {
        u_turns: crate::turns::UTurns::Allowed,
        obey_restrictions: false,
        ..crate::turns::TurnRules::default()
    };
    let table = turns::Turns::new(inst, inst.turn_rules().unwrap_or(&free));
    for (r, (w, route)) in walks.iter().zip(&plan.routes).enumerate() {
        turns::stated_turns(inst, &table, r, w, route, &mut out);
    }
    if out.is_empty() {
        Ok(())
    } else {
        Err(out)
    }
}
