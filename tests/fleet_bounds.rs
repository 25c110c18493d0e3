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

/// The capacity bounds count trucks with the fleet's shift limit; a truck
/// type without a shift limit needs fewer trucks, so those bounds must be
/// dropped. Here the fleet's shift limit of 12 counts two trucks for the
/// far square (service time 20), each driving 200 out and back, but the one
/// truck type has no shift limit: one truck serves all, and the fleet bound
/// stays below its plan.
#[test]
fn capacity_bounds_are_dropped_when_a_type_may_drive_longer() {
    use arcwright::model::TruckType;
    let mut plain = instance();
    let mut fleet = plain.fleet().clone();
    fleet.capacity = 16;
    fleet.shift_limit = Some(12);
    plain = plain.with_fleet(fleet).unwrap();
    let ty = TruckType {
        name: "long shift".into(),
        count: None,
        capacity: 16,
        shift_limit: None,
        yard: 0,
        fixed_cost: 0,
        cost_per_mille: 1000,
        no_entry: vec![],
        no_service: vec![],
        no_entry_classes: vec![],
        no_service_classes: vec![],
    };
    let inst = plain
        .clone()
        .with_operations(Operations {
            truck_types: vec![ty],
            ..Operations::default()
        })
        .unwrap();
    let sol = FleetSolver::new(&inst)
        .max_iterations(50)
        .moves(50)
        .solve()
        .unwrap();
    assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
    assert_eq!(sol.plan.routes.len(), 1);
    let lb = fleet_bound(&inst, &Tables::new(&inst).unwrap());
    assert!(lb.value <= sol.cost, "{lb:?} > {}", sol.cost);
}

/// The trip bound by hand: yard 0 on a square 0-1-2-3 of required streets
/// (cost 5, demand 4 each, load limit 8), a landfill at junction 4, 50 from
/// corner 2. Two trips (16 / 8). Least in-legs: 0 and 0 (the two streets at
/// the yard). Least out-legs: 50 and 50 (the two streets ending at 2). Back
/// from the landfill to the yard: 60. Bound 20 + 0 + 100 + 60 = 180; the
/// matching and connection bounds give only the service cost, 20.
#[test]
fn trip_bound_counts_the_drives_to_the_landfill() {
    use arcwright::fleet::bound::{trip_bound, TRIPS};
    let mut net = Network::with_junctions(5);
    net.add_required_edge(0, 1, 5, 4);
    net.add_required_edge(1, 2, 5, 4);
    net.add_required_edge(2, 3, 5, 4);
    net.add_required_edge(3, 0, 5, 4);
    net.add_edge(2, 4, 50);
    let plain = Instance::new("square and landfill", net, Fleet::with_capacity(8), 0).unwrap();
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("landfill".into()),
            junction: 4,
            unload_time: 0,
            unload_cost: 0,
            hours: None,
        }],
        ..Operations::default()
    };
    let inst = plain.with_operations(ops).unwrap();
    let tables = Tables::new(&inst).unwrap();
    assert_eq!(trip_bound(&inst, &tables), Some(180));
    let lb = fleet_bound(&inst, &tables);
    assert_eq!((lb.value, lb.by), (180, TRIPS));
    let sol = FleetSolver::new(&inst)
        .max_iterations(50)
        .moves(50)
        .solve()
        .unwrap();
    assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
    assert!(sol.cost >= 180);
    assert_eq!(sol.lower_bound.value, 180);
}
