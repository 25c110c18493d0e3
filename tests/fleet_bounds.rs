//! Bounds with dump sites: the plain problem's capacity bounds count trucks
//! leaving the yard, which a truck that tips does not need; the fleet bound
//! must drop them and stay below the cost of a plan that uses the tips.

use arcwright::bounds::all_bounds;
use arcwright::check::fleet::check_fleet_plan;
use arcwright::fleet::bound::fleet_bound;
use arcwright::fleet::{FleetSolver, Tables};
use arcwright::model::{DumpSite, Fleet, Instance, Network, Operations};
use arcwright::paths::Distances;

/// Yard 0, 100 away from a square 1-2-3-4 of required streets (cost 5,
/// demand 4 each, capacity 4): the plain problem needs four trucks, each
/// driving 200 to and from the square (its depot-cut bound counts them). A
/// transfer station at junction 1 (a corner of the square) lets one truck
/// drive out once, tip after each street and drive back once.
fn instance() -> Instance {
    let mut net = Network::with_junctions(5);
    net.add_edge(0, 1, 100);
    net.add_required_edge(1, 2, 5, 4);
    net.add_required_edge(2, 3, 5, 4);
    net.add_required_edge(3, 4, 5, 4);
    net.add_required_edge(4, 1, 5, 4);
    Instance::new("far square", net, Fleet::with_capacity(4), 0).unwrap()
}

#[test]
fn capacity_bounds_are_dropped_when_trucks_tip() {
    let plain = instance();
    let plain_best = all_bounds(&plain, &Distances::new(&plain).unwrap())
        .into_iter()
        .map(|b| b.value)
        .max()
        .unwrap();
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("transfer station".into()),
            junction: 1,
            unload_time: 0,
            unload_cost: 0,
            hours: None,
        }],
        ..Operations::default()
    };
    let inst = plain.clone().with_operations(ops).unwrap();
    let sol = FleetSolver::new(&inst)
        .max_iterations(50)
        .moves(50)
        .solve()
        .unwrap();
    assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
    // One truck that tips beats the plain problem's bound (which counts
    // four trucks from the yard), so that bound would be wrong here.
    assert!(
        sol.cost < plain_best,
        "{} vs plain bound {plain_best}",
        sol.cost
    );
    let lb = fleet_bound(&inst, &Tables::new(&inst).unwrap());
    assert!(lb.value <= sol.cost, "{lb:?} > {}", sol.cost);
    // The plain instance keeps its capacity bounds: trucks cannot tip.
    assert!(plain_best >= 4 * 200 + 20);
}
