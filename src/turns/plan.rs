//! Routes and plans priced with turn-aware deadheads.

use super::paths::TurnDistances;
use crate::model::{Dir, Instance};
use crate::paths::UNREACHABLE;
use crate::plan::{Plan, Route, Totals, Visit};

/// The solver's number of a visit: `2·task`, plus one when served backward.
fn key(v: &Visit) -> usize {
    2 * v.task + (v.dir == Dir::Backward) as usize
}

/// Load, cost and time of a route from the yard and back, every turn
/// included (cost [`UNREACHABLE`] when a leg has no allowed way).
pub fn totals_with_turns(inst: &Instance, td: &TurnDistances, visits: &[Visit]) -> Totals {
    let yard = 2 * inst.tasks().len();
    let (mut load, mut cost, mut time) = (0, 0, 0);
    let mut at = yard;
    let legs = visits
        .iter()
        .map(key)
        .chain((!visits.is_empty()).then_some(yard));
    for b in legs {
        let c = td.cost(at, b);
        if c >= UNREACHABLE {
            return Totals {
                load,
                cost: UNREACHABLE,
                time: UNREACHABLE,
            };
        }
        cost += c;
        time += td.time(at, b);
        if b < yard {
            let t = &inst.tasks()[b / 2];
            cost += t.cost;
            time += t.time;
            load += t.demand;
        }
        at = b;
    }
    Totals { load, cost, time }
}

/// A plan of the given routes (empty ones dropped), priced with turns.
pub fn plan_from_visits(inst: &Instance, td: &TurnDistances, routes: Vec<Vec<Visit>>) -> Plan {
    let routes: Vec<Route> = routes
        .into_iter()
        .filter(|r| !r.is_empty())
        .map(|visits| {
            let t = totals_with_turns(inst, td, &visits);
            Route {
                visits,
                load: t.load,
                cost: t.cost,
                time: t.time,
            }
        })
        .collect();
    let cost = routes.iter().map(|r| r.cost).sum();
    Plan { routes, cost }
}
