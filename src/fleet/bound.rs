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
//! | capacity bounds ([`depot_degree_bound`], [`depot_cut_bound`], [`blended_bound`]: trucks leave the depot loaded at most to the capacity) | **no**: a truck that tips carries more than one load per route, and trips start at dump sites | **no** | only when every type's load limit is at most the instance fleet's |
//!
//! Restricted streets only remove links, so bounds on the whole network stay
//! valid. Shift limits and opening hours only remove plans.
//!
//! With dump sites the capacity argument is made on *trips* instead of
//! trucks: every trip carries at most the largest load limit `Q`, so a plan
//! has at least `⌈total demand / Q⌉` trips, and with
//! [`crate::model::Operations::return_empty`] each of them ends with a tip:
//! at least that many unload costs of the cheapest dump site.
//!
//! The cost of a plan is `Σ fixed + Σ ⌈factor · driven / 1000⌉ + Σ unload`
//! ([`crate::model::Operations`]). The driven cost of all routes together is
//! at least the base bound `B` (the largest valid one of the table), so the
//! plan costs at least `⌈f · B / 1000⌉ + F · r + U · t` with `f` the least
//! cost factor, `F` the least fixed cost, `r` the least number of routes (1,
//! or `⌈total demand / Q⌉` without dump sites), `U` the least unload cost
//! and `t` the least number of tips above.
//!
//! [`odd_matching_bound`]: crate::bounds::odd_matching_bound
//! [`imbalance_flow_bound`]: crate::bounds::imbalance_flow_bound
//! [`connection_bound`]: crate::bounds::connection_bound
//! [`depot_degree_bound`]: crate::bounds::depot_degree_bound
//! [`depot_cut_bound`]: crate::bounds::depot_cut_bound
//! [`blended_bound`]: crate::bounds::blended_bound

use super::tables::Tables;
use crate::bounds::{self, LowerBound};
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
    let capacity_ok = ops.dump_sites.is_empty()
        && one_yard_at_depot
        && tables
            .types
            .iter()
            .all(|t| t.ty.capacity <= inst.fleet().capacity);
    let valid = |by: &str| match by {
        bounds::SERVICE | bounds::ODD_MATCHING | bounds::IMBALANCE_FLOW => true,
        bounds::CONNECTION => one_yard_at_depot,
        _ => capacity_ok,
    };
    let base = all
        .into_iter()
        .filter(|b| valid(b.by))
        .reduce(|a, b| if b.value > a.value { b } else { a })
        .expect("the service-cost bound is always valid");
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
