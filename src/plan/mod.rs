//! Plans: routes of ordered services, their costs and loads, and their explicit walks.
//!
//! The total cost of a plan follows the convention of the published values:
//! service cost of every task plus every deadhead driven, including the legs
//! from and back to the depot.

use serde::{Deserialize, Serialize};

use crate::model::{Cost, Dir, Instance};
use crate::paths::{Distances, UNREACHABLE};

/// One service: a task served in a direction.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct Visit {
    /// Task index into [`Instance::tasks`].
    pub task: usize,
    /// Service direction.
    pub dir: Dir,
}

impl Visit {
    /// Shorthand constructor.
    pub fn new(task: usize, dir: Dir) -> Self {
        Visit { task, dir }
    }
}

/// One truck's route: depot, the services in order (with shortest deadheads
/// between them), depot.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Route {
    /// Services in driving order.
    pub visits: Vec<Visit>,
    /// Total demand served.
    pub load: Cost,
    /// Service plus deadhead cost.
    pub cost: Cost,
    /// Service plus driving time (compared with the shift limit).
    pub time: Cost,
}

/// A fleet plan.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Plan {
    /// The routes, one per truck used.
    pub routes: Vec<Route>,
    /// Sum of the routes' costs.
    pub cost: Cost,
}

/// Load, cost and time of one route (see [`totals`]).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Totals {
    /// Demand collected on the route.
    pub load: Cost,
    /// Service plus deadhead cost, yard to yard.
    pub cost: Cost,
    /// Service plus driving time, yard to yard.
    pub time: Cost,
}

/// Load, cost and time of a sequence of visits driven from the yard and back.
/// The cost and time are [`UNREACHABLE`] when a leg has no path.
pub fn totals(inst: &Instance, dist: &Distances, visits: &[Visit]) -> Totals {
    let depot = inst.depot();
    let (mut load, mut cost, mut time) = (0, 0, 0);
    let mut at = depot;
    for v in visits {
        let t = &inst.tasks()[v.task];
        let (s, e) = t.ends(v.dir);
        let c = dist.cost(at, s);
        if c >= UNREACHABLE {
            return Totals {
                load,
                cost: UNREACHABLE,
                time: UNREACHABLE,
            };
        }
        cost += c + t.cost;
        time += dist.time(at, s) + t.time;
        load += t.demand;
        at = e;
    }
    if !visits.is_empty() {
        let c = dist.cost(at, depot);
        if c >= UNREACHABLE {
            return Totals {
                load,
                cost: UNREACHABLE,
                time: UNREACHABLE,
            };
        }
        cost += c;
        time += dist.time(at, depot);
    }
    Totals { load, cost, time }
}

impl Route {
    /// Builds a route and computes its load, cost and time.
    pub fn new(inst: &Instance, dist: &Distances, visits: Vec<Visit>) -> Route {
        let Totals { load, cost, time } = totals(inst, dist, &visits);
        Route {
            visits,
            load,
            cost,
            time,
        }
    }
}

/// One link driven in a walk.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Step {
    /// Link index.
    pub link: usize,
    /// Junction where the step starts.
    pub from: usize,
    /// Junction where it ends.
    pub to: usize,
    /// True when the link is served on this step, false when deadheaded.
    pub serve: bool,
}

impl Plan {
    /// The same plan with every self-loop task (a street whose two ends are
    /// one junction) served [`Dir::Forward`]. Both directions of a self-loop
    /// are the same drive, with the same load, cost and time, and a plan file
    /// (`from`, `to` junctions) cannot tell them apart: a plan written after
    /// this reads back equal.
    pub fn self_loops_forward(mut self, inst: &Instance) -> Plan {
        for r in &mut self.routes {
            for v in &mut r.visits {
                let t = &inst.tasks()[v.task];
                if t.tail == t.head {
                    v.dir = Dir::Forward;
                }
            }
        }
        self
    }

    /// Builds a plan from visit sequences, dropping empty ones.
    pub fn from_visits(inst: &Instance, dist: &Distances, routes: Vec<Vec<Visit>>) -> Plan {
        let routes: Vec<Route> = routes
            .into_iter()
            .filter(|r| !r.is_empty())
            .map(|r| Route::new(inst, dist, r))
            .collect();
        let cost = routes.iter().map(|r| r.cost).sum();
        Plan { routes, cost }
    }

    /// The plan's total service cost (equal for every feasible plan).
    pub fn service_cost(&self, inst: &Instance) -> Cost {
        self.routes
            .iter()
            .flat_map(|r| &r.visits)
            .map(|v| inst.tasks()[v.task].cost)
            .sum()
    }

    /// The plan's deadhead cost.
    pub fn deadhead_cost(&self, inst: &Instance) -> Cost {
        self.cost - self.service_cost(inst)
    }

    /// Number of tasks served.
    pub fn visits(&self) -> usize {
        self.routes.iter().map(|r| r.visits.len()).sum()
    }

    /// Writes route `r` out as an explicit walk from the depot and back:
    /// every link driven, marked serve or deadhead.
    pub fn walk(&self, inst: &Instance, dist: &Distances, r: usize) -> Vec<Step> {
        walk(inst, dist, &self.routes[r].visits)
    }
}

/// Expands visits into the explicit walk from the depot and back.
pub fn walk(inst: &Instance, dist: &Distances, visits: &[Visit]) -> Vec<Step> {
    let mut steps = Vec::new();
    let mut at = inst.depot();
    let leg = |steps: &mut Vec<Step>, a: usize, b: usize| {
        for h in dist.path(a, b).unwrap_or_default() {
            steps.push(Step {
                link: h.link,
                from: h.from,
                to: h.to,
                serve: false,
            });
        }
    };
    for v in visits {
        let t = &inst.tasks()[v.task];
        let (s, e) = t.ends(v.dir);
        leg(&mut steps, at, s);
        steps.push(Step {
            link: t.link,
            from: s,
            to: e,
            serve: true,
        });
        at = e;
    }
    if !visits.is_empty() {
        leg(&mut steps, at, inst.depot());
    }
    steps
}

/// Total cost of an explicit walk: each served step costs the service cost of
/// its link, each deadheaded step the link's driving cost.
///
/// # Panics
///
/// If a step names a link outside the network, or serves a link that has no
/// service ([`crate::check::check_walks`] reports both as violations; walks built by
/// [`walk`] have neither).
pub fn walk_cost(inst: &Instance, steps: &[Step]) -> Cost {
    steps
        .iter()
        .map(|s| {
            let l = &inst.network().links[s.link];
            if s.serve {
                l.service
                    .as_ref()
                    .expect("a served step is on a required link")
                    .cost
            } else {
                l.cost
            }
        })
        .sum()
}
