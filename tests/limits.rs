//! Regression tests for the number limits and counts found by the fault test
//! of issue 8 (defects 3.2, 3.5, 3.6) and for `Solver::distances`.

use arcwright::check::check_plan;
use arcwright::model::{Fleet, Instance, Network};
use arcwright::paths::Distances;
use arcwright::{SolveError, Solver};

/// Defect 3.2: three services of 2e8 with one truck make one route of
/// 6e8 + deadheads (above the old 2^29 limit); it must be planned, not refused.
#[test]
fn a_route_above_two_to_the_29_is_planned() {
    let mut net = Network::with_junctions(3);
    net.add_required_edge(0, 1, 200_000_000, 1);
    net.add_required_edge(1, 2, 200_000_000, 1);
    net.add_required_edge(2, 0, 200_000_000, 1);
    let fleet = Fleet {
        max_vehicles: Some(1),
        ..Fleet::with_capacity(3)
    };
    let inst = Instance::new("big numbers", net, fleet, 0).unwrap();
    let sol = Solver::new(&inst).max_iterations(20).solve().unwrap();
    assert!(check_plan(&inst, &sol.plan).is_ok());
    assert_eq!(sol.plan.routes.len(), 1);
    // The triangle is served in one loop: 3 x 2e8, no deadhead.
    assert_eq!(sol.cost, 600_000_000);
    assert!(sol.cost > 1 << 29);
}

/// Beyond the solver's real limit (2^40 per route) the solve is refused with
/// the limit named, never answered with a wrong plan.
#[test]
fn routes_that_could_reach_two_to_the_40_are_refused_with_the_limit() {
    let mut net = Network::with_junctions(3);
    net.add_required_edge(0, 1, 1 << 39, 1);
    net.add_required_edge(1, 2, 1 << 39, 1);
    net.add_required_edge(2, 0, 1 << 39, 1);
    for l in &mut net.links {
        l.cost = 1; // cheap to drive, costly to serve: the deadheads fit 32 bits
    }
    let inst = Instance::new("huge numbers", net, Fleet::with_capacity(3), 0).unwrap();
    let err = Solver::new(&inst).max_iterations(20).solve().unwrap_err();
    match &err {
        SolveError::RouteTooLong { bound, limit } => {
            assert_eq!(*limit, 1 << 40);
            assert!(*bound >= 3 << 39);
        }
        other => panic!("expected RouteTooLong, got {other:?}"),
    }
    assert!(err.to_string().contains("1099511627776"), "{err}");
}

/// Distances built once are taken by the solver; the result is the same as
/// when the solver builds them itself. Distances of another instance are refused.
#[test]
fn solver_takes_the_callers_distances() {
    let mut net = Network::with_junctions(4);
    net.add_required_edge(0, 1, 10, 3);
    net.add_required_edge(1, 2, 12, 2);
    net.add_required_edge(2, 3, 10, 3);
    net.add_required_edge(3, 0, 12, 2);
    let inst = Instance::new("block", net, Fleet::with_capacity(5), 0).unwrap();
    let dist = Distances::new(&inst).unwrap();
    let own = Solver::new(&inst)
        .seed(3)
        .max_iterations(100)
        .solve()
        .unwrap();
    let given = Solver::new(&inst)
        .distances(&dist)
        .seed(3)
        .max_iterations(100)
        .solve()
        .unwrap();
    assert_eq!(own.plan, given.plan);

    let mut small = Network::with_junctions(2);
    small.add_required_edge(0, 1, 1, 1);
    let other = Instance::new("other", small, Fleet::with_capacity(5), 0).unwrap();
    let wrong = Distances::new(&other).unwrap();
    let err = Solver::new(&inst).distances(&wrong).solve().unwrap_err();
    assert!(
        matches!(err, SolveError::DistancesMismatch { .. }),
        "{err:?}"
    );
}
