//! Properties of Euler tours, postman tours and lower bounds on random
//! graphs and instances (proptest), and two facts of the trade.

use arcwright::bounds::{all_bounds, bound};
use arcwright::check::check_walks;
use arcwright::model::{Dir, Fleet, Instance, Link, Network, ServeDirection, ServiceSpec};
use arcwright::paths::{Distances, UNREACHABLE};
use arcwright::plan::{totals, Totals, Visit};
use arcwright::postman::chinese::undirected_postman;
use arcwright::postman::euler::{check_tour, euler_tour, is_eulerian};
use arcwright::postman::rural::{rural_lower_bound, rural_tour};
use arcwright::postman::Multigraph;
use proptest::prelude::*;
use rand::seq::SliceRandom;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// A connected random multigraph: a random tree plus extra edges.
fn connected(n: usize, extra: usize, seed: u64) -> Multigraph {
    let mut r = ChaCha8Rng::seed_from_u64(seed);
    let mut g = Multigraph::new(n);
    for v in 1..n {
        let u = r.random_range(0..v);
        g.add(u, v, r.random_range(0..50));
    }
    for _ in 0..extra {
        let (u, v) = (r.random_range(0..n), r.random_range(0..n));
        g.add(u, v, r.random_range(0..50));
    }
    g
}

/// Doubling every edge makes any connected graph Eulerian.
fn doubled(g: &Multigraph) -> Multigraph {
    let mut h = g.clone();
    for e in &g.edges {
        h.add(e.u, e.v, e.cost);
    }
    h
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    #[test]
    fn rural_tour_checks_and_respects_its_bound(n in 2usize..40, extra in 0usize..50, seed: u64) {
        let mut r = ChaCha8Rng::seed_from_u64(seed ^ 0x5eed);
        let g = connected(n, extra, seed);
        let mut net = Network::with_junctions(n);
        for e in &g.edges {
            if r.random_bool(0.4) {
                net.add_required_edge(e.u, e.v, e.cost, 1);
            } else {
                net.add_edge(e.u, e.v, e.cost);
            }
        }
        let inst = Instance::new("rural", net, Fleet::with_capacity(1000), r.random_range(0..n)).unwrap();
        let t = rural_tour(&inst).unwrap();
        // The independent checker: a closed walk from the depot serving
        // every required link once in an allowed direction.
        if !inst.tasks().is_empty() {
            prop_assert!(check_walks(&inst, std::slice::from_ref(&t.steps)).is_ok());
        }
        let walked: i64 = t.steps.iter().map(|s| inst.network().links[s.link].cost).sum();
        prop_assert_eq!(walked, t.cost);
        prop_assert!(rural_lower_bound(&inst).unwrap() <= t.cost);
    }

    #[test]
    fn euler_tour_uses_every_link_once_and_is_closed(n in 2usize..60, extra in 0usize..80, seed: u64) {
        let g = doubled(&connected(n, extra, seed));
        let start = (seed as usize) % n;
        let t = euler_tour(&g, start).unwrap();
        prop_assert_eq!(t.len(), g.edges.len());
        // Checks: closed at start, each step starts where the last ended,
        // each edge used exactly once, driven between its ends.
        prop_assert!(check_tour(&g, &t, start, true, false).is_ok());
    }

    #[test]
    fn postman_cost_is_links_plus_pairing(n in 1usize..50, extra in 0usize..60, seed: u64) {
        let g = connected(n, extra, seed);
        let t = undirected_postman(&g, 0).unwrap();
        prop_assert_eq!(t.link_cost, g.edges.iter().map(|e| e.cost).sum::<i64>());
        prop_assert_eq!(t.extra_cost, t.added.iter().map(|&e| g.edges[e].cost).sum::<i64>());
        prop_assert_eq!(t.cost, t.link_cost + t.extra_cost);
        prop_assert_eq!(t.tour.len(), g.edges.len() + t.added.len());
        let walked: i64 = t.tour.iter().map(|s| g.edges[s.edge].cost).sum();
        prop_assert_eq!(walked, t.cost);
        // Never more than driving everything twice (a valid postman tour).
        prop_assert!(t.cost <= 2 * t.link_cost);
        // The augmented graph is Eulerian.
        let mut aug = g.clone();
        for &e in &t.added { aug.edges.push(g.edges[e]); }
        prop_assert!(is_eulerian(&aug));
    }

    #[test]
    fn bounds_never_exceed_feasible_plans(n in 2usize..14, extra in 0usize..20, seed: u64, mixed: bool) {
        let mut r = ChaCha8Rng::seed_from_u64(seed);
        // A third of the mixed cases fix every service direction, so the
        // directed imbalance-flow bound applies.
        let all_forward = seed % 3 == 0;
        let g = connected(n, extra, seed);
        let mut net = Network::with_junctions(n);
        for e in &g.edges {
            let oneway = mixed && r.random_bool(0.3);
            let required = r.random_bool(0.6);
            let service = required.then(|| ServiceSpec {
                demand: r.random_range(0..6),
                // Service cost may differ from the deadhead cost.
                cost: e.cost + r.random_range(-(e.cost.min(3))..4),
                time: None,
                direction: if mixed && (all_forward || r.random_bool(0.3)) { ServeDirection::Forward } else { ServeDirection::Either },
            });
            net.add_link(Link { from: e.u, to: e.v, oneway, cost: e.cost, time: None, service, name: None, ..Link::default() });
        }
        if mixed {
            // Two-way backbone so most instances stay valid.
            for v in 1..n { net.add_link(Link { from: v - 1, to: v, oneway: false, cost: r.random_range(1..60), time: None, service: None, name: None, ..Link::default() }); }
        }
        let cap = r.random_range(5..15);
        let mut fleet = Fleet::with_capacity(cap);
        if r.random_bool(0.3) {
            fleet.shift_limit = Some(r.random_range(100..400));
        }
        let shift = fleet.shift_limit;
        let Ok(inst) = Instance::new("random", net, fleet, r.random_range(0..n)) else {
            return Ok(());
        };
        let dist = Distances::new(&inst).unwrap();
        let best = bound(&inst, &dist).value;
        let nt = inst.tasks().len();
        let dir_of = |i: usize, r: &mut ChaCha8Rng| {
            let t = &inst.tasks()[i];
            if t.either && r.random_bool(0.5) { Dir::Backward } else { Dir::Forward }
        };
        // Plan 1: one route per task.
        let mut plans: Vec<Vec<Vec<Visit>>> = vec![(0..nt).map(|i| vec![Visit::new(i, dir_of(i, &mut r))]).collect()];
        // Random groupings respecting capacity.
        for _ in 0..8 {
            let mut order: Vec<usize> = (0..nt).collect();
            order.shuffle(&mut r);
            let mut routes: Vec<Vec<Visit>> = vec![Vec::new()];
            let mut load = 0;
            for i in order {
                let d = inst.tasks()[i].demand;
                if load + d > cap || r.random_bool(0.15) {
                    routes.push(Vec::new());
                    load = 0;
                }
                load += d;
                routes.last_mut().unwrap().push(Visit::new(i, dir_of(i, &mut r)));
            }
            plans.push(routes);
        }
        'plans: for routes in plans {
            let mut total = 0;
            for rt in routes.iter().filter(|rt| !rt.is_empty()) {
                let Totals { load, cost, time } = totals(&inst, &dist, rt);
                prop_assert!(load <= cap);
                prop_assert!(cost < UNREACHABLE);
                if shift.is_some_and(|l| time > l) {
                    // Not feasible under the shift limit: no claim.
                    continue 'plans;
                }
                total += cost;
            }
            for b in all_bounds(&inst, &dist) {
                prop_assert!(b.value <= total, "{} = {} > plan {}", b.by, b.value, total);
            }
            prop_assert!(best <= total);
        }
    }
}

/// Common practice: the postman cost of an Eulerian network is the sum of
/// its link costs (no link is repeated).
#[test]
fn eulerian_network_costs_its_links() {
    for seed in 0..50 {
        let g = doubled(&connected(30, 20, seed));
        let t = undirected_postman(&g, 0).unwrap();
        assert_eq!(t.cost, g.total_cost());
        assert!(t.added.is_empty());
    }
}

/// Common practice: with exactly two odd junctions the extra cost is their
/// shortest-path distance.
#[test]
fn two_odd_junctions_cost_their_distance() {
    for seed in 0..50u64 {
        let mut g = doubled(&connected(30, 20, seed));
        let (a, b) = (seed as usize % 30, (seed as usize * 7 + 3) % 30);
        if a == b {
            continue;
        }
        g.add(a, b, 1000);
        assert_eq!(g.odd_vertices(), {
            let mut v = vec![a, b];
            v.sort();
            v
        });
        let (d, _) = g.dijkstra(&[a], false);
        let t = undirected_postman(&g, 0).unwrap();
        assert_eq!(t.extra_cost, d[b]);
        assert_eq!(t.cost, g.total_cost() + d[b]);
    }
}

/// On a one-way network where every link is required (service cost =
/// deadhead cost), the imbalance-flow bound is the directed Chinese postman
/// value (itself checked against networkx in tests/postman_networkx.rs).
#[test]
fn imbalance_flow_is_the_directed_postman_value_when_all_is_required() {
    use arcwright::bounds::imbalance_flow_bound;
    use arcwright::postman::chinese::directed_postman;
    let mut applied = 0;
    for seed in 0..40u64 {
        let mut r = ChaCha8Rng::seed_from_u64(seed);
        let n = r.random_range(2..25);
        let mut g = Multigraph::new(n);
        for v in 0..n {
            g.add(v, (v + 1) % n, r.random_range(1..30));
        }
        for _ in 0..r.random_range(0..2 * n) {
            g.add(
                r.random_range(0..n),
                r.random_range(0..n),
                r.random_range(0..30),
            );
        }
        let mut net = Network::with_junctions(n);
        for e in &g.edges {
            net.add_link(Link {
                from: e.u,
                to: e.v,
                oneway: true,
                cost: e.cost,
                time: None,
                service: Some(ServiceSpec {
                    demand: 1,
                    cost: e.cost,
                    time: None,
                    direction: ServeDirection::Forward,
                }),
                name: None,
                ..Link::default()
            });
        }
        let inst = Instance::new("directed", net, Fleet::with_capacity(10_000), 0).unwrap();
        let dist = Distances::new(&inst).unwrap();
        let v = imbalance_flow_bound(&inst, &dist)
            .expect("applies")
            .unwrap();
        assert_eq!(v, directed_postman(&g, 0).unwrap().cost, "seed {seed}");
        applied += 1;
    }
    assert_eq!(applied, 40);
}
