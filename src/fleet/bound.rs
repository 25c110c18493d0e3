//! Lower bounds that stay valid with dump sites, several yards and truck
//! types.
//!
//! Which bound of [`crate::bounds`] holds with which feature (a plan of the
//! fleet model is still a union of closed walks, one per truck, that serve
//! every street once; tips only add driving):
//!
//! | bound | dump sites | several yards | truck types (factors, fixed costs, restrictions) |
//! |---|---|---|---|
//! | service cost | yes | yes | yes, scaled (below) |
//! | [`odd_matching_bound`] (even degrees of closed walks) | yes | yes | yes, scaled |
//! | [`imbalance_flow_bound`] (in = out of closed walks) | yes | yes | yes, scaled |
//! | [`connection_bound`] (every walk passes the depot) | yes | **no**: walks from different yards need not meet | yes, scaled |
//! | capacity bounds ([`depot_degree_bound`], [`depot_cut_bound`], [`blended_bound`]: trucks leave the depot loaded at most to the capacity, and with the fleet's shift limit at most that long) | **no**: a truck that tips carries more than one load per route, and trips start at dump sites | **no** | only when every type's load limit is at most the instance fleet's and, when the fleet has a shift limit, every type has one no longer |
//! | [`trip_bound`] (below: trips, not trucks) | yes (it needs them) | yes | yes, scaled |
//!
//! Restricted streets only remove links, so bounds on the whole network stay
//! valid. Shift limits and opening hours only remove plans (except in the
//! capacity bounds, which use the fleet's shift limit to count trucks, hence
//! the condition above). Balancing changes what is minimised, not the plans:
//! the bound is on the cost.
//!
//! With dump sites the capacity argument is made on *trips* instead of
//! trucks ([`trip_bound`]): every trip carries at most the largest load
//! limit `Q`, so a plan has at least `T = ⌈total demand / Q⌉` trips with a
//! positive load, and with [`crate::model::Operations::return_empty`] each
//! of them ends with a tip: at least `T` unload costs of the cheapest dump
//! site.
//!
//! The cost of a plan is `Σ fixed + Σ ⌈factor · driven / 1000⌉ + Σ unload`
//! ([`crate::model::Operations`]). The driven cost of all routes together is
//! at least the base bound `B` (the largest valid one of the table), so the
//! plan costs at least `⌈f · B / 1000⌉ + F · r + U · t` with `f` the least
//! cost factor, `F` the least fixed cost, `r` the least number of routes (1,
//! or `⌈total demand / Q⌉` without dump sites), `U` the least unload cost
//! and `t` the least number of tips above. With dump sites `B` is the larger
//! of the table's best and [`trip_bound`].
//!
//! [`odd_matching_bound`]: crate::bounds::odd_matching_bound
//! [`imbalance_flow_bound`]: crate::bounds::imbalance_flow_bound
//! [`connection_bound`]: crate::bounds::connection_bound
//! [`depot_degree_bound`]: crate::bounds::depot_degree_bound
//! [`depot_cut_bound`]: crate::bounds::depot_cut_bound
//! [`blended_bound`]: crate::bounds::blended_bound

use super::tables::Tables;
use crate::bounds::{self, LowerBound};
use crate::model::Dir;
use crate::model::{Cost, Instance};
use crate::paths::Distances;

/// The best lower bound valid for the instance's features (see the module
/// docs); its `by` names the base bound used.
pub fn fleet_bound(inst: &Instance, tables: &Tables) -> LowerBound {
    let ops = inst.operations();
    let all = match Distances::new(inst) {
        Ok(d) => bounds::all_bounds(inst, &d),
        Err(_) => vec![LowerBound {
            value: inst.total_service_cost(),
            by: bounds::SERVICE,
        }],
    };
    let yards = ops.yards_of(inst);
    let one_yard_at_depot = yards.iter().all(|y| y.junction == inst.depot());
    // The capacity bounds count trucks with the fleet's load limit and
    // shift limit (`bounds::min_vehicles`): valid only when no type may
    // carry more or drive longer.
    let fleet = inst.fleet();
    let capacity_ok = ops.dump_sites.is_empty()
        && one_yard_at_depot
        && tables.types.iter().all(|t| {
            t.ty.capacity <= fleet.capacity
                && fleet
                    .shift_limit
                    .is_none_or(|l| t.ty.shift_limit.is_some_and(|s| s <= l))
        });
    let valid = |by: &str| match by {
        bounds::SERVICE | bounds::ODD_MATCHING | bounds::IMBALANCE_FLOW => true,
        bounds::CONNECTION => one_yard_at_depot,
        _ => capacity_ok,
    };
    let mut base = all
        .into_iter()
        .filter(|b| valid(b.by))
        .reduce(|a, b| if b.value > a.value { b } else { a })
        .expect("the service-cost bound is always valid");
    if let Some(v) = trip_bound(inst, tables) {
        if v > base.value {
            base = LowerBound {
                value: v,
                by: TRIPS,
            };
        }
    }
    if inst.tasks().is_empty() {
        return LowerBound {
            value: 0,
            by: base.by,
        };
    }
    let types = &tables.types;
    let factor = types
        .iter()
        .map(|t| t.ty.cost_per_mille)
        .min()
        .unwrap_or(1000);
    let fixed = types.iter().map(|t| t.ty.fixed_cost).min().unwrap_or(0);
    let q = types
        .iter()
        .map(|t| t.ty.capacity)
        .max()
        .unwrap_or(1)
        .max(1);
    let demand = inst.total_demand();
    let loads = (demand + q - 1) / q;
    let routes = if ops.dump_sites.is_empty() {
        loads.max(1)
    } else {
        1
    };
    let tips = if ops.return_empty && !ops.dump_sites.is_empty() {
        loads
    } else {
        0
    };
    let unload: Cost = ops
        .dump_sites
        .iter()
        .map(|s| s.unload_cost)
        .min()
        .unwrap_or(0);
    LowerBound {
        value: (factor * base.value + 999).div_euclid(1000) + fixed * routes + unload * tips,
        by: base.by,
    }
}

/// Name of [`trip_bound`].
pub const TRIPS: &str = "trips to the dump sites";

/// The trip bound: a lower bound on the cost driven (serving and
/// deadheading, before cost factors, fixed and unload costs) by all routes
/// of any plan of an instance with dump sites; `None` without dump sites.
///
/// Let `Q` be the largest load limit of the truck types and `T = ⌈total
/// demand / Q⌉`. For a task `t` let `in(t)` be the least deadhead, in either
/// allowed direction, from a place a trip can start (the yard of a type, by
/// that type's distances, or a dump site, by the least over the types'
/// distances) to where `t`'s service starts, and `out(t)` the least deadhead
/// from where it ends to a place a loaded trip can end (a dump site, and the
/// yards too when trucks need not return empty). Then the cost driven is at
/// least
///
/// `total service cost + (the T least in(t)) + (the T least out(t)) + r`,
///
/// with `r` the least deadhead from a dump site to the yard of a type when
/// trucks must return empty and every task has a positive demand (else 0).
///
/// *Why.* Every trip carries at most `Q`, so at least `T` trips carry a
/// positive load. Each such trip starts at its truck's yard (its first trip)
/// or at a dump site (after a tip) and deadheads from there to its first
/// served task: at least `in` of that task. It deadheads from its last
/// served task to where it ends, a dump site (a tip) or, only for the last
/// trip of a truck that may return loaded, the yard: at least `out` of that
/// task. Tasks are served once, so the first tasks of these trips are
/// distinct, and so are their last tasks: the in-legs cost at least the `T`
/// least `in(t)` together, the out-legs the `T` least `out(t)`. With
/// [`crate::model::Operations::return_empty`] and only tasks of positive
/// demand, a route's last trip carries a load, ends with a tip, and the
/// truck then deadheads from that dump site to its yard: at least `r`, on
/// a part of the walk that is neither an in-leg nor an out-leg. All these
/// deadheads are distinct parts of the walks and none serves, so they add to
/// the service cost. A type's distances avoid its `no_entry` streets and so
/// are never shorter than the least over all types. Shift limits, opening
/// hours, counts and balancing only remove plans.
pub fn trip_bound(inst: &Instance, tables: &Tables) -> Option<Cost> {
    if tables.sites.is_empty() {
        return None;
    }
    let tasks = inst.tasks();
    let q = tables.types.iter().map(|t| t.ty.capacity).max()?.max(1);
    let trips = ((inst.total_demand() + q - 1) / q).max(0) as usize;
    let nk = tables.types.len();
    // Least deadhead over the types from u to v (sites), or of type k's own
    // (its yard).
    let least = |u: usize, v: usize| {
        (0..nk)
            .filter_map(|k| tables.leg(k, u, v))
            .map(|x| x.0)
            .min()
    };
    let own = |k: usize, u: usize, v: usize| tables.leg(k, u, v).map(|x| x.0);
    let mut ins = Vec::with_capacity(tasks.len());
    let mut outs = Vec::with_capacity(tasks.len());
    for t in tasks {
        let dirs = [Dir::Forward, Dir::Backward]
            .into_iter()
            .filter(|&d| t.allows(d));
        let mut best_in = Cost::MAX;
        let mut best_out = Cost::MAX;
        for d in dirs {
            let (s, e) = t.ends(d);
            for site in &tables.sites {
                best_in = best_in.min(least(site.junction, s).unwrap_or(Cost::MAX));
                best_out = best_out.min(least(e, site.junction).unwrap_or(Cost::MAX));
            }
            for (k, tt) in tables.types.iter().enumerate() {
                best_in = best_in.min(own(k, tt.yard, s).unwrap_or(Cost::MAX));
                if !tables.return_empty {
                    best_out = best_out.min(own(k, e, tt.yard).unwrap_or(Cost::MAX));
                }
            }
        }
        // Unreachable everywhere: the instance is refused before; stay sound.
        ins.push(if best_in == Cost::MAX { 0 } else { best_in });
        outs.push(if best_out == Cost::MAX { 0 } else { best_out });
    }
    ins.sort_unstable();
    outs.sort_unstable();
    let legs: Cost = ins.iter().take(trips).sum::<Cost>() + outs.iter().take(trips).sum::<Cost>();
    let back = if tables.return_empty && trips > 0 && tasks.iter().all(|t| t.demand > 0) {
        tables
            .types
            .iter()
            .enumerate()
            .flat_map(|(k, tt)| {
                tables
                    .sites
                    .iter()
                    .filter_map(move |s| own(k, s.junction, tt.yard))
            })
            .min()
            .unwrap_or(0)
    } else {
        0
    };
    Some(inst.total_service_cost() + legs + back)
}
