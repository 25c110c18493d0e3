//! Independent checker for plans of the fleet model ([`FleetPlan`]): routes
//! with tips, truck types and yards.
//!
//! Like [`super::check_plan`] it trusts neither the solver nor
//! [`crate::paths`]: it runs its own lexicographic Dijkstra search (least
//! cost, ties least time) on the network each truck type may drive (without
//! the streets it may not enter, listed by index or by road class, resolved
//! here from the street list on its own), and recomputes every trip load, the cost (fixed
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
use crate::plan::Visit;

/// One thing wrong with a fleet plan. Routes, visits and tips are 0-based
/// positions in the plan; streets are link indices.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum FleetViolation {
    /// A route names a truck type that does not exist.
    UnknownType {
        /// The route.
        route: usize,
        /// The type index given.
        truck_type: usize,
    },
    /// A route starts from another yard than its type's home yard.
    WrongYard {
        /// The route.
        route: usize,
        /// The yard the route names.
        yard: usize,
        /// The home yard of its truck type.
        home: usize,
    },
    /// More routes of a type than trucks of it.
    TooManyTrucks {
        /// The truck type's name.
        truck_type: String,
        /// Routes of that type.
        used: usize,
        /// Trucks of that type.
        count: usize,
    },
    /// A visit names a task that does not exist.
    UnknownTask {
        /// The route.
        route: usize,
        /// The visit's position in the route.
        visit: usize,
    },
    /// A task served in a direction it may not be served in.
    WrongDirection {
        /// The route.
        route: usize,
        /// The visit's position in the route.
        visit: usize,
        /// The street (link index).
        street: usize,
    },
    /// A task the route's truck type may not serve (or drive on).
    TypeMayNotServe {
        /// The route.
        route: usize,
        /// The visit's position in the route.
        visit: usize,
        /// The street (link index).
        street: usize,
        /// The truck type's name.
        truck_type: String,
        /// Why: `"no_entry"` (the type may not drive on it) or
        /// `"no_service"` (it may drive on it but not serve it).
        list: &'static str,
    },
    /// A task served more than once or not at all.
    ServedTimes {
        /// The street (link index).
        street: usize,
        /// How often the plan serves it.
        times: usize,
    },
    /// Tips out of order, at the start, twice in one gap or naming no dump site.
    BadTip {
        /// The route.
        route: usize,
        /// The tip's position in the route's tips.
        tip: usize,
    },
    /// A trip over the type's load limit.
    Overloaded {
        /// The route.
        route: usize,
        /// The trip's position in the route.
        trip: usize,
        /// Its load.
        load: Cost,
        /// The truck type's load limit.
        capacity: Cost,
    },
    /// A truck returns to its yard loaded although it must return empty.
    ReturnsLoaded {
        /// The route.
        route: usize,
        /// The load it returns with.
        load: Cost,
    },
    /// The route arrives at a dump site after it closes.
    SiteClosed {
        /// The route.
        route: usize,
        /// The tip's position in the route's tips.
        tip: usize,
        /// When the truck arrives.
        arrival: Cost,
        /// When the site closes.
        closes: Cost,
    },
    /// No path between two stops for the route's truck type.
    NoPath {
        /// The route.
        route: usize,
        /// Junction index of the stop left.
        from: usize,
        /// Junction index of the next stop.
        to: usize,
    },
    /// The route's shift time is over its type's limit.
    OverShift {
        /// The route.
        route: usize,
        /// Its shift time.
        time: Cost,
        /// The truck type's shift limit.
        limit: Cost,
    },
    /// A stated number (cost, time, driven, trip loads) differs from the recomputed one.
    Mismatch {
        /// The route.
        route: usize,
        /// Which number.
        what: &'static str,
        /// As stated in the plan.
        stated: String,
        /// As recomputed.
        actual: String,
    },
    /// The plan's cost is not the sum of its routes' costs.
    WrongTotal {
        /// As stated.
        stated: Cost,
        /// The sum of the route costs.
        actual: Cost,
    },
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
                list,
            } => {
                write!(f, "route {route}, visit {visit}: truck type `{truck_type}` may not serve street {street} (its {list})")
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

/// Which links a truck type may not enter, and which it may not serve
/// (entering barred included), per link: from its street lists and road
/// classes, read here from the street list itself.
fn barred(inst: &Instance, ty: &TruckType) -> (Vec<bool>, Vec<bool>) {
    let links = &inst.network().links;
    let mark = |streets: &[usize], classes: &[String], v: &mut Vec<bool>| {
        for &i in streets {
            if let Some(x) = v.get_mut(i) {
                *x = true;
            }
        }
        for (i, l) in links.iter().enumerate() {
            if l.class.as_ref().is_some_and(|c| classes.contains(c)) {
                v[i] = true;
            }
        }
    };
    let mut entry = vec![false; links.len()];
    mark(&ty.no_entry, &ty.no_entry_classes, &mut entry);
    let mut service = entry.clone();
    mark(&ty.no_service, &ty.no_service_classes, &mut service);
    (entry, service)
}

/// Lexicographic (cost, time) Dijkstra from `s` on the network without the
/// links marked in `banned`.
fn dijkstra(inst: &Instance, banned: &[bool], s: usize) -> Vec<(Cost, Cost)> {
    let net = inst.network();
    let n = net.junctions.len();
    let mut adj: Vec<Vec<(usize, Cost, Cost)>> = vec![Vec::new(); n];
    for (i, l) in net.links.iter().enumerate() {
        if banned[i] {
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

/// A route driven stop by stop, with everything recomputed so far.
struct Walker<'a> {
    inst: &'a Instance,
    ty: &'a TruckType,
    ri: usize,
    /// Per link: may not be entered; may not be served.
    no_entry: Vec<bool>,
    no_service: Vec<bool>,
    /// Shortest paths from the junctions left so far (source, rows).
    memo: Vec<(usize, Vec<(Cost, Cost)>)>,
    at: usize,
    time: Cost,
    driven: Cost,
    unload: Cost,
    loads: Vec<Cost>,
    /// Whether a stop could not be driven (then numbers are not compared).
    broken: bool,
    out: &'a mut Vec<FleetViolation>,
}

impl Walker<'_> {
    /// Drives to junction `b` on a shortest path of the truck type.
    fn drive(&mut self, b: usize) {
        let a = self.at;
        let pos = match self.memo.iter().position(|(s, _)| *s == a) {
            Some(p) => p,
            None => {
                self.memo.push((a, dijkstra(self.inst, &self.no_entry, a)));
                self.memo.len() - 1
            }
        };
        let (c, t) = self.memo[pos].1[b];
        if c < INF {
            self.driven += c;
            self.time += t;
        } else {
            self.out.push(FleetViolation::NoPath {
                route: self.ri,
                from: a,
                to: b,
            });
            self.broken = true;
        }
        self.at = b;
    }

    /// Tip number `ti`; `misplaced` when it may not stand where it does.
    fn tip(&mut self, ti: usize, site: usize, misplaced: bool) {
        let ops = self.inst.operations();
        let Some(site) = ops.dump_sites.get(site) else {
            self.out.push(FleetViolation::BadTip {
                route: self.ri,
                tip: ti,
            });
            self.broken = true;
            return;
        };
        if misplaced {
            self.out.push(FleetViolation::BadTip {
                route: self.ri,
                tip: ti,
            });
        }
        self.drive(site.junction);
        if let Some(h) = site.hours {
            if self.time > h.closes {
                self.out.push(FleetViolation::SiteClosed {
                    route: self.ri,
                    tip: ti,
                    arrival: self.time,
                    closes: h.closes,
                });
            }
            self.time = self.time.max(h.opens);
        }
        self.time += site.unload_time;
        self.unload += site.unload_cost;
        self.loads.push(0);
    }

    /// Visit number `pos`: drive to its start and serve it.
    fn serve(&mut self, pos: usize, v: Visit, served: &mut [usize]) {
        let Some(task) = self.inst.tasks().get(v.task) else {
            self.out.push(FleetViolation::UnknownTask {
                route: self.ri,
                visit: pos,
            });
            self.broken = true;
            return;
        };
        served[v.task] += 1;
        if !task.allows(v.dir) {
            self.out.push(FleetViolation::WrongDirection {
                route: self.ri,
                visit: pos,
                street: task.link,
            });
        }
        let ty = self.ty;
        if self.no_service[task.link] {
            self.out.push(FleetViolation::TypeMayNotServe {
                route: self.ri,
                visit: pos,
                street: task.link,
                truck_type: ty.name.clone(),
                list: if self.no_entry[task.link] {
                    "no_entry"
                } else {
                    "no_service"
                },
            });
        }
        let (s, e) = match v.dir {
            Dir::Forward => (task.tail, task.head),
            Dir::Backward => (task.head, task.tail),
        };
        self.drive(s);
        self.driven += task.cost;
        self.time += task.time;
        *self.loads.last_mut().expect("a trip") += task.demand;
        self.at = e;
    }

    /// The limits of the whole route, then its stated numbers.
    fn finish(self, r: &FleetRoute) {
        let (ty, ri) = (self.ty, self.ri);
        for (trip, &load) in self.loads.iter().enumerate() {
            if load > ty.capacity {
                self.out.push(FleetViolation::Overloaded {
                    route: ri,
                    trip,
                    load,
                    capacity: ty.capacity,
                });
            }
        }
        let ops = self.inst.operations();
        let last = *self.loads.last().expect("a trip");
        if ops.return_empty && !ops.dump_sites.is_empty() && last > 0 {
            self.out.push(FleetViolation::ReturnsLoaded {
                route: ri,
                load: last,
            });
        }
        if let Some(limit) = ty.shift_limit.filter(|&l| self.time > l) {
            self.out.push(FleetViolation::OverShift {
                route: ri,
                time: self.time,
                limit,
            });
        }
        if self.broken {
            return;
        }
        let milli = ty.cost_per_mille * self.driven + 1000 * self.unload;
        let cost = ty.fixed_cost + (milli + 999).div_euclid(1000);
        let numbers = [
            ("cost", r.cost.to_string(), cost.to_string()),
            ("shift time", r.time.to_string(), self.time.to_string()),
            ("cost driven", r.driven.to_string(), self.driven.to_string()),
            (
                "trip loads",
                format!("{:?}", r.trip_loads),
                format!("{:?}", self.loads),
            ),
        ];
        for (what, stated, actual) in numbers {
            if stated != actual {
                self.out.push(FleetViolation::Mismatch {
                    route: ri,
                    what,
                    stated,
                    actual,
                });
            }
        }
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
    let (no_entry, no_service) = barred(inst, ty);
    let mut w = Walker {
        inst,
        ty,
        ri,
        no_entry,
        no_service,
        memo: Vec::new(),
        at: yard,
        time: 0,
        driven: 0,
        unload: 0,
        loads: vec![0],
        broken: false,
        out,
    };
    let mut ti = 0;
    for pos in 0..=r.visits.len() {
        // Tips placed before visit `pos` (after `pos` visits).
        let mut first_here = true;
        while ti < r.tips.len() && r.tips[ti].after == pos {
            w.tip(ti, r.tips[ti].site, pos == 0 || !first_here);
            first_here = false;
            ti += 1;
        }
        let Some(&v) = r.visits.get(pos) else { break };
        w.serve(pos, v, served);
    }
    if ti < r.tips.len() {
        w.out.push(FleetViolation::BadTip { route: ri, tip: ti });
    }
    if !r.visits.is_empty() {
        w.drive(yard);
    }
    w.finish(r);
}
