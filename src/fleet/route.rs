//! Routes with tips: the plan representation of the fleet model, and its
//! evaluation (cost, shift time, load of every trip).

use serde::{Deserialize, Serialize};

use super::tables::{ends, Tables};
use crate::model::{Cost, Instance};
use crate::plan::Visit;

/// A tip: the truck drives to a dump site and unloads.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Tip {
    /// How many of the route's visits are served before this tip.
    pub after: usize,
    /// The dump site (index into [`crate::model::Operations::dump_sites`]).
    pub site: usize,
}

/// One truck's route: from its yard, the visits in order with tips between
/// them (and possibly after the last one), back to its yard.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FleetRoute {
    /// Truck type (index into the types in effect,
    /// [`crate::model::Operations::types_of`]).
    pub truck_type: usize,
    /// Home yard (index into [`crate::model::Operations::yards_of`]).
    pub yard: usize,
    /// Services in driving order.
    pub visits: Vec<Visit>,
    /// Tips in driving order (`after` non-decreasing, at most one per gap).
    pub tips: Vec<Tip>,
    /// Load of each trip: the visits before the first tip, between two tips,
    /// and after the last tip (this last one is 0 when the route ends with a tip).
    pub trip_loads: Vec<Cost>,
    /// Cost of the route: fixed cost + ceil(cost factor × driven / 1000) + unload costs.
    pub cost: Cost,
    /// Cost of the links driven (serving and deadheading), before the factor.
    pub driven: Cost,
    /// Shift time: driving, serving, waiting and unloading.
    pub time: Cost,
}

/// A plan of the fleet model.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FleetPlan {
    /// The routes, one per truck used.
    pub routes: Vec<FleetRoute>,
    /// Sum of the routes' costs.
    pub cost: Cost,
}

impl FleetPlan {
    /// Builds a plan from routes, summing their costs.
    pub fn new(routes: Vec<FleetRoute>) -> FleetPlan {
        let cost = routes.iter().map(|r| r.cost).sum();
        FleetPlan { routes, cost }
    }

    /// The longest and the shortest shift time (0, 0 without routes).
    pub fn shift_spread(&self) -> (Cost, Cost) {
        let longest = self.routes.iter().map(|r| r.time).max().unwrap_or(0);
        let shortest = self.routes.iter().map(|r| r.time).min().unwrap_or(0);
        (longest, shortest)
    }

    /// The value the solver minimises under the instance's balance setting:
    /// total cost, plus weight × longest shift with
    /// [`crate::model::Balance::LongestShift`].
    pub fn objective(&self, inst: &Instance) -> Cost {
        match inst.operations().balance {
            crate::model::Balance::LeastCost => self.cost,
            crate::model::Balance::LongestShift { weight } => {
                self.cost + weight * self.shift_spread().0
            }
        }
    }

    /// Number of trips of all routes (a route ending with a tip counts each
    /// tip as the end of a trip; a route without tips is one trip).
    pub fn trips(&self) -> usize {
        self.routes
            .iter()
            .map(|r| r.trip_loads.iter().filter(|&&l| l > 0).count().max(1))
            .sum()
    }

    /// Number of tips of all routes.
    pub fn tips(&self) -> usize {
        self.routes.iter().map(|r| r.tips.len()).sum()
    }
}

/// Route cost from the milli-cost `pm · driven + 1000 · unload`.
pub(crate) fn route_cost(fixed: Cost, milli: Cost) -> Cost {
    fixed + (milli + 999).div_euclid(1000)
}

/// Why a route does not evaluate.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum RouteProblem {
    /// No path between two stops for this truck type.
    NoPath,
    /// The truck type may not serve a visit.
    NotServable,
    /// A dump site is closed when the truck arrives.
    SiteClosed,
    /// Tips out of order or out of range.
    BadTips,
}

/// Evaluates a route of type `k` from yard junction `tables.types[k].yard`:
/// fills `trip_loads`, `cost`, `driven` and `time` (limits are not checked).
///
/// # Errors
///
/// A [`RouteProblem`] when the route cannot be driven as given.
pub fn evaluate(
    inst: &Instance,
    tables: &Tables,
    k: usize,
    visits: &[Visit],
    tips: &[Tip],
) -> Result<(Vec<Cost>, Cost, Cost, Cost), RouteProblem> {
    let tt = &tables.types[k];
    let yard = tt.yard;
    let (mut driven, mut time, mut unload) = (0, 0, 0);
    let mut loads = vec![0];
    let mut at = yard;
    let mut ti = 0;
    let mut tip_at = |at: &mut usize, time: &mut Cost, driven: &mut Cost, site: usize| {
        let s = tables.sites.get(site).ok_or(RouteProblem::BadTips)?;
        let (c, t) = tables.leg(k, *at, s.junction).ok_or(RouteProblem::NoPath)?;
        *driven += c;
        let mut arrive = *time + t;
        if let Some(h) = s.hours {
            arrive = h.start(arrive).ok_or(RouteProblem::SiteClosed)?;
        }
        *time = arrive + s.unload_time;
        unload += s.unload_cost;
        *at = s.junction;
        Ok::<(), RouteProblem>(())
    };
    for (i, v) in visits.iter().enumerate() {
        while ti < tips.len() && tips[ti].after == i {
            if i == 0 || (ti > 0 && tips[ti - 1].after == i) {
                return Err(RouteProblem::BadTips);
            }
            tip_at(&mut at, &mut time, &mut driven, tips[ti].site)?;
            loads.push(0);
            ti += 1;
        }
        let task = inst.tasks().get(v.task).ok_or(RouteProblem::NotServable)?;
        if !tt.serves[v.task] || !task.allows(v.dir) {
            return Err(RouteProblem::NotServable);
        }
        let (s, e) = ends(inst, v.task, v.dir);
        let (c, t) = tables.leg(k, at, s).ok_or(RouteProblem::NoPath)?;
        driven += c + task.cost;
        time += t + task.time;
        *loads.last_mut().expect("one trip at least") += task.demand;
        at = e;
    }
    while ti < tips.len() && tips[ti].after == visits.len() {
        if visits.is_empty() || (ti > 0 && tips[ti - 1].after == visits.len()) {
            return Err(RouteProblem::BadTips);
        }
        tip_at(&mut at, &mut time, &mut driven, tips[ti].site)?;
        loads.push(0);
        ti += 1;
    }
    if ti != tips.len() {
        return Err(RouteProblem::BadTips);
    }
    if !visits.is_empty() {
        let (c, t) = tables.leg(k, at, yard).ok_or(RouteProblem::NoPath)?;
        driven += c;
        time += t;
    }
    let milli = tt.ty.cost_per_mille * driven + 1000 * unload;
    Ok((loads, route_cost(tt.ty.fixed_cost, milli), driven, time))
}

impl FleetRoute {
    /// Builds and evaluates a route of type `k` (from its home yard).
    ///
    /// # Errors
    ///
    /// A [`RouteProblem`] when the route cannot be driven as given.
    pub fn new(
        inst: &Instance,
        tables: &Tables,
        k: usize,
        visits: Vec<Visit>,
        tips: Vec<Tip>,
    ) -> Result<FleetRoute, RouteProblem> {
        let (trip_loads, cost, driven, time) = evaluate(inst, tables, k, &visits, &tips)?;
        Ok(FleetRoute {
            truck_type: k,
            yard: tables.types[k].ty.yard,
            visits,
            tips,
            trip_loads,
            cost,
            driven,
            time,
        })
    }

    /// Whether the route keeps its type's load limit on every trip, its
    /// shift limit, and ends with a tip when it must.
    pub fn feasible(&self, tables: &Tables) -> bool {
        let ty = &tables.types[self.truck_type].ty;
        let last = *self.trip_loads.last().unwrap_or(&0);
        self.trip_loads.iter().all(|&l| l <= ty.capacity)
            && ty.shift_limit.is_none_or(|s| self.time <= s)
            && !(tables.return_empty && !tables.sites.is_empty() && last > 0)
    }
}
