//! Independent checker for plans of the fleet model ([`FleetPlan`]): routes
//! with tips, truck types and yards.
//!
//! Like [`super::check_plan`] it trusts neither the solver nor
//! [`crate::paths`]: it runs its own lexicographic Dijkstra search (least
//! cost, ties least time) on the network each truck type may drive (without
//! its `no_entry` streets), and recomputes every trip load, the cost (fixed
//! cost, per-mille factor rounded up, unload costs), the shift time (with
//! waiting for dump sites to open and unloading) and every limit from the
//! instance and its [`crate::model::Operations`] alone.
//!
//! ```
//! use arcwright::check::fleet::check_fleet_plan;
//! use arcwright::fleet::{FleetPlan, FleetRoute, Tip, Tables};
//! use arcwright::model::{Dir, DumpSite, Fleet, Instance, Network, Operations};
//! use arcwright::plan::Visit;
//!
//! let mut net = Network::with_junctions(3);
//! net.add_required_edge(0, 1, 4, 3);
//! net.add_required_edge(1, 2, 5, 3);
//! net.add_edge(2, 0, 7);
//! let inst = Instance::new("triangle", net, Fleet::with_capacity(4), 0).unwrap();
//! let site = DumpSite { name: None, junction: 1, unload_time: 10, unload_cost: 0, hours: None };
//! let inst = inst
//!     .with_operations(Operations { dump_sites: vec![site], ..Operations::default() })
//!     .unwrap();
//! let tables = Tables::new(&inst).unwrap();
//! // Serve 0 -> 1, tip at junction 1, serve 1 -> 2, back via 1 to tip again, home.
//! let visits = vec![Visit::new(0, Dir::Forward), Visit::new(1, Dir::Forward)];
//! let tips = vec![Tip { after: 1, site: 0 }, Tip { after: 2, site: 0 }];
//! let route = FleetRoute::new(&inst, &tables, 0, visits, tips).unwrap();
//! assert_eq!(route.trip_loads, vec![3, 3, 0]);
//! let plan = FleetPlan::new(vec![route]);
//! assert!(check_fleet_plan(&inst, &plan).is_ok());
//! ```

use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::fmt;

use crate::fleet::{FleetPlan, FleetRoute};
use crate::model::{Cost, Dir, Instance, TruckType};

/// One thing wrong with a fleet plan. Routes, visits and tips are 0-based
/// positions in the plan; streets are link indices.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum FleetViolation {
    /// A route names a truck type that does not exist.
    UnknownType { route: usize, truck_type: usize },
    /// A route starts from another yard than its type's home yard.
    WrongYard {
        route: usize,
        yard: usize,
        home: usize,
    },
    /// More routes of a type than trucks of it.
    TooManyTrucks {
        truck_type: String,
        used: usize,
        count: usize,
    },
    /// A visit names a task that does not exist.
    UnknownTask { route: usize, visit: usize },
    /// A task served in a direction it may not be served in.
    WrongDirection {
        route: usize,
        visit: usize,
        street: usize,
    },
    /// A task the route's truck type may not serve (or drive on).
    TypeMayNotServe {
        route: usize,
        visit: usize,
        street: usize,
        truck_type: String,
    },
    /// A task served more than once or not at all.
    ServedTimes { street: usize, times: usize },
    /// Tips out of order, at the start, twice in one gap or naming no dump site.
    BadTip { route: usize, tip: usize },
    /// A trip over the type's load limit.
    Overloaded {
        route: usize,
        trip: usize,
        load: Cost,
        capacity: Cost,
    },
    /// A truck returns to its yard loaded although it must return empty.
    ReturnsLoaded { route: usize, load: Cost },
    /// The route arrives at a dump site after it closes.
    SiteClosed {
        route: usize,
        tip: usize,
        arrival: Cost,
        closes: Cost,
    },
    /// No path between two stops for the route's truck type.
    NoPath {
        route: usize,
        from: usize,
        to: usize,
    },
    /// The route's shift time is over its type's limit.
    OverShift {
        route: usize,
        time: Cost,
        limit: Cost,
    },
    /// A stated number (cost, time, driven, trip loads) differs from the recomputed one.
    Mismatch {
        route: usize,
        what: &'static str,
        stated: String,
        actual: String,
    },
    /// The plan's cost is not the sum of its routes' costs.
    WrongTotal { stated: Cost, actual: Cost },
}

impl fmt::Display for FleetViolation {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        use FleetViolation as V;
        match self {
            V::UnknownType { route, truck_type } => {
                write!(f, "route {route}: truck type {truck_type} does not exist")
            }
            V::WrongYard { route, yard, home } => {
                write!(
                    f,
                    "route {route}: starts from yard {yard}, but its truck type's yard is {home}"
                )
            }
            V::TooManyTrucks {
                truck_type,
                used,
                count,
            } => {
                write!(
                    f,
                    "truck type `{truck_type}`: {used} routes, but only {count} trucks"
                )
            }
            V::UnknownTask { route, visit } => {
                write!(f, "route {route}, visit {visit}: no such street to serve")
            }
            V::WrongDirection {
                route,
                visit,
                street,
            } => {
                write!(f, "route {route}, visit {visit}: street {street} served against its allowed direction")
            }
            V::TypeMayNotServe {
                route,
                visit,
                street,
                truck_type,
            } => {
                write!(f, "route {route}, visit {visit}: truck type `{truck_type}` may not serve street {street}")
            }
            V::ServedTimes { street, times } => {
                write!(f, "street {street} is served {times} times, not once")
            }
            V::BadTip { route, tip } => write!(
                f,
                "route {route}, tip {tip}: misplaced or unknown dump site"
            ),
            V::Overloaded {
                route,
                trip,
                load,
                capacity,
            } => {
                write!(
                    f,
                    "route {route}, trip {trip}: load {load} over the load limit {capacity}"
                )
            }
            V::ReturnsLoaded { route, load } => {
                write!(
                    f,
                    "route {route}: returns to its yard with load {load} without tipping"
                )
            }
            V::SiteClosed {
                route,
                tip,
                arrival,
                closes,
            } => {
                write!(f, "route {route}, tip {tip}: arrives at {arrival}, the dump site closes at {closes}")
            }
            V::NoPath { route, from, to } => {
                write!(
                    f,
                    "route {route}: no path from junction {from} to {to} for its truck type"
                )
            }
            V::OverShift { route, time, limit } => {
                write!(f, "route {route}: shift time {time} over the limit {limit}")
            }
            V::Mismatch {
                route,
                what,
                stated,
                actual,
            } => {
                write!(
                    f,
                    "route {route}: {what} stated {stated}, recomputed {actual}"
                )
            }
            V::WrongTotal { stated, actual } => {
                write!(f, "plan cost stated {stated}, the routes sum to {actual}")
            }
        }
    }
}

const INF: Cost = Cost::MAX / 4;

/// Lexicographic (cost, time) Dijkstra from `s` on the network without `banned` links.
fn dijkstra(inst: &Instance, banned: &[usize], s: usize) -> Vec<(Cost, Cost)> {
    let net = inst.network();
    let n = net.junctions.len();
    let mut adj: Vec<Vec<(usize, Cost, Cost)>> = vec![Vec::new(); n];
    for (i, l) in net.links.iter().enumerate() {
        if banned.contains(&i) {
            continue;
        }
        let t = l.time.unwrap_or(l.cost);
        adj[l.from].push((l.to, l.cost, t));
        if !l.oneway {
            adj[l.to].push((l.from, l.cost, t));
        }
    }
    let mut d = vec![(INF, INF); n];
    d[s] = (0, 0);
    let mut heap = BinaryHeap::from([Reverse((0, 0, s))]);
    while let Some(Reverse((c, t, v))) = heap.pop() {
        if (c, t) > d[v] {
            continue;
        }
        for &(w, lc, lt) in &adj[v] {
            let nd = (c + lc, t + lt);
            if nd < d[w] {
                d[w] = nd;
                heap.push(Reverse((nd.0, nd.1, w)));
            }
        }
    }
    d
}

/// Checks a fleet plan against `inst` and its operations; returns every
/// violation found.
///
/// # Errors
///
/// The list of [`FleetViolation`]s when the plan is not valid.
pub fn check_fleet_plan(inst: &Instance, plan: &FleetPlan) -> Result<(), Vec<FleetViolation>> {
    let ops = inst.operations();
    let types = ops.types_of(inst);
    let yards = ops.yards_of(inst);
    let mut out = Vec::new();
    let mut served = vec![0usize; inst.tasks().len()];
    let mut used = vec![0usize; types.len()];
    for (ri, r) in plan.routes.iter().enumerate() {
        let Some(ty) = types.get(r.truck_type) else {
            out.push(FleetViolation::UnknownType {
                route: ri,
                truck_type: r.truck_type,
            });
            continue;
        };
        used[r.truck_type] += 1;
        if r.yard != ty.yard {
            out.push(FleetViolation::WrongYard {
                route: ri,
                yard: r.yard,
                home: ty.yard,
            });
        }
        check_route(
            inst,
            ty,
            yards[ty.yard].junction,
            ri,
            r,
            &mut served,
            &mut out,
        );
    }
    for (k, ty) in types.iter().enumerate() {
        if let Some(count) = ty.count {
            if used[k] > count {
                out.push(FleetViolation::TooManyTrucks {
                    truck_type: ty.name.clone(),
                    used: used[k],
                    count,
                });
            }
        }
    }
    for (i, &times) in served.iter().enumerate() {
        if times != 1 {
            out.push(FleetViolation::ServedTimes {
                street: inst.tasks()[i].link,
                times,
            });
        }
    }
    let actual: Cost = plan.routes.iter().map(|r| r.cost).sum();
    if actual != plan.cost {
        out.push(FleetViolation::WrongTotal {
            stated: plan.cost,
            actual,
        });
    }
    if out.is_empty() {
        Ok(())
    } else {
        Err(out)
    }
}

/// Checks one route of type `ty` from junction `yard`; counts its services
/// in `served` and pushes what is wrong onto `out`.
fn check_route(
    inst: &Instance,
    ty: &TruckType,
    yard: usize,
    ri: usize,
    r: &FleetRoute,
    served: &mut [usize],
    out: &mut Vec<FleetViolation>,
) {
    let ops = inst.operations();
    let mut memo: Vec<(usize, Vec<(Cost, Cost)>)> = Vec::new();
    let mut leg = |a: usize, b: usize| -> Option<(Cost, Cost)> {
        let pos = match memo.iter().position(|(s, _)| *s == a) {
            Some(p) => p,
            None => {
                memo.push((a, dijkstra(inst, &ty.no_entry, a)));
                memo.len() - 1
            }
        };
        let d = memo[pos].1[b];
        (d.0 < INF).then_some(d)
    };
    let (mut driven, mut time, mut unload) = (0, 0, 0);
    let mut loads = vec![0];
    let mut at = yard;
    let mut ti = 0;
    let mut broken = false;
    for pos in 0..=r.visits.len() {
        // Tips placed before visit `pos` (after `pos` visits).
        let mut first_here = true;
        while ti < r.tips.len() && r.tips[ti].after == pos {
            let tip = r.tips[ti];
            let Some(site) = ops.dump_sites.get(tip.site) else {
                out.push(FleetViolation::BadTip { route: ri, tip: ti });
                broken = true;
                ti += 1;
                continue;
            };
            if pos == 0 || !first_here {
                out.push(FleetViolation::BadTip { route: ri, tip: ti });
            }
            first_here = false;
            match leg(at, site.junction) {
                None => {
                    out.push(FleetViolation::NoPath {
                        route: ri,
                        from: at,
                        to: site.junction,
                    });
                    broken = true;
                }
                Some((c, t)) => {
                    driven += c;
                    let mut arrive = time + t;
                    if let Some(h) = site.hours {
                        if arrive > h.closes {
                            out.push(FleetViolation::SiteClosed {
                                route: ri,
                                tip: ti,
                                arrival: arrive,
                                closes: h.closes,
                            });
                        }
                        arrive = arrive.max(h.opens);
                    }
                    time = arrive + site.unload_time;
                }
            }
            unload += site.unload_cost;
            loads.push(0);
            at = site.junction;
            ti += 1;
        }
        let Some(v) = r.visits.get(pos) else { break };
        let Some(task) = inst.tasks().get(v.task) else {
            out.push(FleetViolation::UnknownTask {
                route: ri,
                visit: pos,
            });
            broken = true;
            continue;
        };
        served[v.task] += 1;
        if !task.allows(v.dir) {
            out.push(FleetViolation::WrongDirection {
                route: ri,
                visit: pos,
                street: task.link,
            });
        }
        if ty.no_entry.contains(&task.link) || ty.no_service.contains(&task.link) {
            out.push(FleetViolation::TypeMayNotServe {
                route: ri,
                visit: pos,
                street: task.link,
                truck_type: ty.name.clone(),
            });
        }
        let (s, e) = match v.dir {
            Dir::Forward => (task.tail, task.head),
            Dir::Backward => (task.head, task.tail),
        };
        match leg(at, s) {
            None => {
                out.push(FleetViolation::NoPath {
                    route: ri,
                    from: at,
                    to: s,
                });
                broken = true;
            }
            Some((c, t)) => {
                driven += c + task.cost;
                time += t + task.time;
            }
        }
        *loads.last_mut().expect("a trip") += task.demand;
        at = e;
    }
    if ti < r.tips.len() {
        out.push(FleetViolation::BadTip { route: ri, tip: ti });
    }
    if !r.visits.is_empty() {
        match leg(at, yard) {
            None => {
                out.push(FleetViolation::NoPath {
                    route: ri,
                    from: at,
                    to: yard,
                });
                broken = true;
            }
            Some((c, t)) => {
                driven += c;
                time += t;
            }
        }
    }
    for (trip, &load) in loads.iter().enumerate() {
        if load > ty.capacity {
            out.push(FleetViolation::Overloaded {
                route: ri,
                trip,
                load,
                capacity: ty.capacity,
            });
        }
    }
    let last = *loads.last().expect("a trip");
    if ops.return_empty && !ops.dump_sites.is_empty() && last > 0 {
        out.push(FleetViolation::ReturnsLoaded {
            route: ri,
            load: last,
        });
    }
    if let Some(limit) = ty.shift_limit {
        if time > limit {
            out.push(FleetViolation::OverShift {
                route: ri,
                time,
                limit,
            });
        }
    }
    if broken {
        return;
    }
    let milli = ty.cost_per_mille * driven + 1000 * unload;
    let cost = ty.fixed_cost + (milli + 999).div_euclid(1000);
    let mut differ = |what, stated: String, actual: String| {
        if stated != actual {
            out.push(FleetViolation::Mismatch {
                route: ri,
                what,
                stated,
                actual,
            });
        }
    };
    differ("cost", r.cost.to_string(), cost.to_string());
    differ("shift time", r.time.to_string(), time.to_string());
    differ("cost driven", r.driven.to_string(), driven.to_string());
    differ(
        "trip loads",
        format!("{:?}", r.trip_loads),
        format!("{loads:?}"),
    );
}
