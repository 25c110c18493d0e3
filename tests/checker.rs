//! The independent checker: accepts valid hand-built plans and walks, rejects
//! one hand-built plan or walk per violation kind with exactly the expected
//! violation, and accepts one-route-per-task plans on the gdb set (whose cost
//! must not undercut the published lower bounds in ../shared/instances/reference.csv).

mod common;

use std::path::Path;

use arcwright::check::{check_plan, check_walks, At, Violation};
use arcwright::io::read_dat_file;
use arcwright::model::{Dir, Fleet, Instance, Link, Network, ServeDirection, ServiceSpec};
use arcwright::paths::Distances;
use arcwright::plan::{walk, Plan, Route, Step, Visit};

use Dir::{Backward as B, Forward as F};

fn link(from: usize, to: usize, oneway: bool, cost: i64, time: Option<i64>) -> Link {
    Link {
        from,
        to,
        oneway,
        cost,
        time,
        service: None,
        name: None,
        ..Link::default()
    }
}

fn serve(mut l: Link, demand: i64, time: Option<i64>, direction: ServeDirection) -> Link {
    l.service = Some(ServiceSpec {
        demand,
        cost: l.cost,
        time,
        direction,
    });
    l
}

/// Junctions 0..=4, depot 0. Tasks: t0 = link 0 (0-1, either way, service
/// time 5), t1 = link 1 (1->2 one-way), t2 = link 3 (2-3, forward only: one
/// side of a street). From 3 back to 0 three paths cost 5 (direct: time 5;
/// via 2: time 7; via 2 and 4: time 3); the checker must take time 3.
fn town(fleet: Fleet) -> Instance {
    let mut net = Network::with_junctions(5);
    net.add_link(serve(
        link(0, 1, false, 2, None),
        3,
        Some(5),
        ServeDirection::Either,
    )); // 0
    net.add_link(serve(
        link(1, 2, true, 3, None),
        4,
        None,
        ServeDirection::Either,
    )); // 1
    net.add_link(link(2, 0, false, 4, Some(6))); // 2
    net.add_link(serve(
        link(2, 3, false, 1, None),
        2,
        None,
        ServeDirection::Forward,
    )); // 3
    net.add_link(link(3, 0, false, 5, None)); // 4
    net.add_link(link(0, 4, false, 2, Some(1))); // 5
    net.add_link(link(4, 2, false, 2, Some(1))); // 6
    Instance::new("town", net, fleet, 0).unwrap()
}

fn fleet() -> Fleet {
    Fleet {
        capacity: 10,
        shift_limit: Some(100),
        max_vehicles: Some(3),
    }
}

fn route(visits: &[(usize, Dir)], load: i64, cost: i64, time: i64) -> Route {
    Route {
        visits: visits.iter().map(|&(t, d)| Visit::new(t, d)).collect(),
        load,
        cost,
        time,
    }
}

fn plan(routes: Vec<Route>) -> Plan {
    let cost = routes.iter().map(|r| r.cost).sum();
    Plan { routes, cost }
}

/// One truck: t0, t1, t2 forward, back 3-2-4-0. Cost 2+3+1+5 = 11, time
/// 5+3+1+(1+1+1) = 12, load 3+4+2 = 9 (computed by hand).
fn one_truck() -> Plan {
    plan(vec![route(&[(0, F), (1, F), (2, F)], 9, 11, 12)])
}

/// One truck per task, numbers by hand: t0 0->1->0 cost 4 time 7; t1
/// 0->1 (dh) 1->2 then 2-4-0 cost 9 time 7; t2 0-4-2 (dh) 2->3 then 3-2-4-0
/// cost 10 time 6.
fn three_trucks() -> Plan {
    plan(vec![
        route(&[(0, F)], 3, 4, 7),
        route(&[(1, F)], 4, 9, 7),
        route(&[(2, F)], 2, 10, 6),
    ])
}

fn s(link: usize, from: usize, to: usize, serve: bool) -> Step {
    Step {
        link,
        from,
        to,
        serve,
    }
}

/// The walk of `one_truck`, written by hand.
fn one_walk() -> Vec<Step> {
    vec![
        s(0, 0, 1, true),
        s(1, 1, 2, true),
        s(3, 2, 3, true),
        s(3, 3, 2, false),
        s(6, 2, 4, false),
        s(5, 4, 0, false),
    ]
}

fn at(route: usize, pos: usize) -> At {
    At { route, pos }
}

#[test]
fn accepts_valid_plans_and_walks() {
    let inst = town(fleet());
    assert_eq!(check_plan(&inst, &one_truck()), Ok(()));
    assert_eq!(check_plan(&inst, &three_trucks()), Ok(()));
    assert_eq!(three_trucks().cost, 23);
    assert_eq!(check_walks(&inst, &[one_walk()]), Ok(()));
    // The crate's own evaluation and walks agree with the hand-made ones.
    let dist = Distances::new(&inst).unwrap();
    let p = Plan::from_visits(&inst, &dist, vec![one_truck().routes[0].visits.clone()]);
    assert_eq!(p, one_truck());
    assert_eq!(walk(&inst, &dist, &p.routes[0].visits), one_walk());
    let walks: Vec<_> = (0..3)
        .map(|r| three_trucks().walk(&inst, &dist, r))
        .collect();
    assert_eq!(check_walks(&inst, &walks), Ok(()));
    // Serving a two-way task backward is fine: t0 from 1 to 0 (deadhead 0->1 first).
    let back = plan(vec![
        route(&[(0, B)], 3, 4, 7),
        route(&[(1, F)], 4, 9, 7),
        route(&[(2, F)], 2, 10, 6),
    ]);
    assert_eq!(check_plan(&inst, &back), Ok(()));
}

fn rejects(inst: &Instance, p: &Plan, expected: Vec<Violation>) {
    let got = check_plan(inst, p).expect_err("plan must be rejected");
    for v in &got {
        println!("  {v}");
    }
    assert_eq!(got, expected);
}

#[test]
fn rejects_each_plan_violation() {
    let inst = town(fleet());

    let mut p = one_truck();
    p.routes[0].visits.push(Visit::new(7, F));
    rejects(
        &inst,
        &p,
        vec![Violation::UnknownTask {
            at: at(0, 3),
            task: 7,
            tasks: 3,
        }],
    );

    // t2 backward: deadhead 2->3 (1, 1), serve 3->2 (1, 1), back 2-4-0 (4, 2).
    let p = plan(vec![route(&[(0, F), (1, F), (2, B)], 9, 11, 12)]);
    rejects(
        &inst,
        &p,
        vec![Violation::DirectionNotAllowed {
            at: at(0, 2),
            task: 2,
            link: 3,
            street: inst.network().street_label(3),
        }],
    );

    let p = plan(vec![
        route(&[(0, F), (0, F)], 6, 8, 14),
        route(&[(1, F)], 4, 9, 7),
        route(&[(2, F)], 2, 10, 6),
    ]);
    rejects(
        &inst,
        &p,
        vec![Violation::ServedTwice {
            task: 0,
            link: 0,
            street: inst.network().street_label(0),
            first: at(0, 0),
            again: at(0, 1),
        }],
    );

    let mut p = three_trucks();
    p.routes.pop();
    p.cost = 13;
    rejects(
        &inst,
        &p,
        vec![Violation::NotServed {
            task: 2,
            link: 3,
            street: inst.network().street_label(3),
        }],
    );

    let small = town(Fleet {
        capacity: 8,
        ..fleet()
    });
    rejects(
        &small,
        &one_truck(),
        vec![Violation::OverCapacity {
            route: 0,
            load: 9,
            capacity: 8,
        }],
    );

    let short = town(Fleet {
        shift_limit: Some(11),
        ..fleet()
    });
    rejects(
        &short,
        &one_truck(),
        vec![Violation::OverShift {
            route: 0,
            time: 12,
            limit: 11,
        }],
    );

    let two = town(Fleet {
        max_vehicles: Some(2),
        ..fleet()
    });
    rejects(
        &two,
        &three_trucks(),
        vec![Violation::TooManyRoutes { routes: 3, max: 2 }],
    );

    let mut p = one_truck();
    p.routes.push(route(&[], 0, 0, 0));
    rejects(&inst, &p, vec![Violation::EmptyRoute { route: 1 }]);

    let mut p = three_trucks();
    p.routes[1].load = 5;
    rejects(
        &inst,
        &p,
        vec![Violation::WrongLoad {
            route: 1,
            reported: 5,
            actual: 4,
        }],
    );

    // A wrong route cost; the total, consistent with it, is then wrong too.
    let mut p = three_trucks();
    p.routes[2].cost = 9;
    p.cost = 22;
    rejects(
        &inst,
        &p,
        vec![
            Violation::WrongCost {
                route: 2,
                reported: 9,
                actual: 10,
            },
            Violation::WrongTotal {
                reported: 22,
                actual: 23,
            },
        ],
    );

    // Time along the direct 3->0 street (14) instead of the least-time tie (12).
    let mut p = one_truck();
    p.routes[0].time = 14;
    rejects(
        &inst,
        &p,
        vec![Violation::WrongTime {
            route: 0,
            reported: 14,
            actual: 12,
        }],
    );

    let mut p = three_trucks();
    p.cost = 24;
    rejects(
        &inst,
        &p,
        vec![Violation::WrongTotal {
            reported: 24,
            actual: 23,
        }],
    );
}

fn rejects_walks(inst: &Instance, walks: &[Vec<Step>], expected: Vec<Violation>) {
    let got = check_walks(inst, walks).expect_err("walks must be rejected");
    for v in &got {
        println!("  {v}");
    }
    assert_eq!(got, expected);
}

#[test]
fn rejects_each_walk_violation() {
    let inst = town(fleet());

    let mut w = one_walk();
    w[4].link = 99;
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::UnknownLink {
            at: at(0, 4),
            link: 99,
            links: 7,
        }],
    );

    let mut w = one_walk();
    w[3].link = 4; // link 4 joins 3 and 0, not 3 and 2
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::NotOnLink {
            at: at(0, 3),
            link: 4,
            street: inst.network().street_label(4),
            from: 3,
            to: 2,
        }],
    );

    let w = vec![
        s(0, 0, 1, true),
        s(1, 1, 2, true),
        s(3, 2, 3, true),
        s(3, 3, 2, false),
        s(1, 2, 1, false), // against the one-way street
        s(0, 1, 0, false),
    ];
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::AgainstOneWay {
            at: at(0, 4),
            link: 1,
            street: inst.network().street_label(1),
        }],
    );

    let mut w = one_walk();
    w.remove(3);
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::Disconnected {
            at: at(0, 3),
            expected: 3,
            found: 2,
        }],
    );

    let w0 = vec![s(1, 1, 2, true), s(3, 2, 3, true), s(4, 3, 0, false)];
    let w1 = vec![s(0, 0, 1, true), s(0, 1, 0, false)];
    rejects_walks(
        &inst,
        &[w0, w1],
        vec![Violation::NotFromDepot {
            route: 0,
            junction: 1,
        }],
    );

    let mut w = one_walk();
    w.truncate(3);
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::NotToDepot {
            route: 0,
            junction: 3,
        }],
    );

    let mut w = one_walk();
    w[5].serve = true;
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::ServesNonRequired {
            at: at(0, 5),
            link: 5,
            street: inst.network().street_label(5),
        }],
    );

    let w = vec![
        s(0, 0, 1, true),
        s(1, 1, 2, true),
        s(3, 2, 3, false),
        s(3, 3, 2, true), // the forward-only side, served backward
        s(6, 2, 4, false),
        s(5, 4, 0, false),
    ];
    rejects_walks(
        &inst,
        &[w],
        vec![Violation::DirectionNotAllowed {
            at: at(0, 3),
            task: 2,
            link: 3,
            street: inst.network().street_label(3),
        }],
    );

    let extra = vec![s(0, 0, 1, true), s(0, 1, 0, false)];
    rejects_walks(
        &inst,
        &[one_walk(), extra.clone()],
        vec![Violation::ServedTwice {
            task: 0,
            link: 0,
            street: inst.network().street_label(0),
            first: at(0, 0),
            again: at(1, 0),
        }],
    );

    rejects_walks(
        &inst,
        &[extra],
        vec![
            Violation::NotServed {
                task: 1,
                link: 1,
                street: inst.network().street_label(1),
            },
            Violation::NotServed {
                task: 2,
                link: 3,
                street: inst.network().street_label(3),
            },
        ],
    );

    let idle = vec![s(5, 0, 4, false), s(5, 4, 0, false)];
    rejects_walks(
        &inst,
        &[one_walk(), idle, vec![]],
        vec![
            Violation::EmptyRoute { route: 1 },
            Violation::EmptyRoute { route: 2 },
        ],
    );

    let small = town(Fleet {
        capacity: 8,
        shift_limit: Some(11),
        max_vehicles: Some(3),
    });
    rejects_walks(
        &small,
        &[one_walk()],
        vec![
            Violation::OverCapacity {
                route: 0,
                load: 9,
                capacity: 8,
            },
            Violation::OverShift {
                route: 0,
                time: 12,
                limit: 11,
            },
        ],
    );

    let two = town(Fleet {
        max_vehicles: Some(2),
        ..fleet()
    });
    let dist = Distances::new(&two).unwrap();
    let walks: Vec<_> = (0..3)
        .map(|r| three_trucks().walk(&two, &dist, r))
        .collect();
    rejects_walks(
        &two,
        &walks,
        vec![Violation::TooManyRoutes { routes: 3, max: 2 }],
    );
}

#[test]
fn messages_name_truck_street_and_numbers_in_the_sheets_words() {
    let v = Violation::OverCapacity {
        route: 2,
        load: 12,
        capacity: 10,
    };
    assert_eq!(
        v.to_string(),
        "Truck 3: load 12 exceeds the capacity 10 by 2"
    );
    let v = Violation::ServedTwice {
        task: 4,
        link: 9,
        street: "street 3-4".into(),
        first: at(0, 1),
        again: at(3, 0),
    };
    assert_eq!(
        v.to_string(),
        "street 3-4 is served twice: by Truck 1, service 2 and again by Truck 4, service 1"
    );
    // Walks: steps numbered from 1, the yard by its name, no "link" or "depot".
    let v = Violation::NotToDepot {
        route: 1,
        junction: 4,
    };
    assert_eq!(
        v.to_string(),
        "Truck 2 ends at junction #4, not at the yard"
    );
    // The checker names a street by its name where it has one: a triangle
    // with a named required street that no truck serves, and a walk that
    // drives a one-way street backward.
    let mut net = Network::with_junctions(3);
    net.add_required_edge(0, 1, 4, 2);
    net.add_required_edge(1, 2, 5, 3);
    net.add_edge(2, 0, 7);
    net.links[1].name = Some("Mill Lane".into());
    net.links[2].oneway = true;
    let tri = Instance::new("triangle", net, Fleet::with_capacity(10), 0).unwrap();
    let dist = Distances::new(&tri).unwrap();
    let only_first = Plan::from_visits(&tri, &dist, vec![vec![Visit::new(0, F)]]);
    let found = check_plan(&tri, &only_first).unwrap_err();
    let label = tri.network().street_label(1);
    assert!(label.contains("Mill Lane"), "{label}");
    assert_eq!(found[0].to_string(), format!("{label} is not served"));
    let backward = vec![Step {
        link: 2,
        from: 0,
        to: 2,
        serve: false,
    }];
    let found = check_walks(&tri, &[backward]).unwrap_err();
    assert!(
        found.iter().any(|v| v.to_string()
            == "Truck 1, step 1: one-way street 3-1 is driven against its direction"),
        "{found:?}"
    );
    for v in found.iter().chain([
        &Violation::NotFromDepot {
            route: 0,
            junction: 1,
        },
        &Violation::UnknownLink {
            at: at(0, 0),
            link: 9,
            links: 3,
        },
        &Violation::TooManyRoutes { routes: 3, max: 2 },
    ]) {
        let s = v.to_string();
        for word in ["link", "depot", "route", "vehicle"] {
            assert!(!s.contains(word), "{s:?} says {word:?}");
        }
    }
}

/// Lower bounds from ../shared/instances/reference.csv (CARPData.jl compilation).
fn lower_bounds(root: &Path) -> std::collections::HashMap<String, i64> {
    arcwright::io::read_reference(root.join("reference.csv"))
        .unwrap()
        .into_iter()
        .map(|r| (r.instance, r.lower_bound))
        .collect()
}

#[test]
fn one_route_per_task_on_gdb() {
    let Some(root) = common::shared_dir("checker::one_route_per_task_on_gdb") else {
        return;
    };
    let lb = lower_bounds(&root);
    for k in 1..=23 {
        let name = format!("gdb{k}");
        let d = read_dat_file(root.join(format!("gdb/{name}.dat"))).unwrap();
        let inst = &d.instance;
        let dist = Distances::new(inst).unwrap();
        let visits: Vec<Vec<Visit>> = (0..inst.tasks().len())
            .map(|t| vec![Visit::new(t, F)])
            .collect();
        let p = Plan::from_visits(inst, &dist, visits);
        assert_eq!(check_plan(inst, &p), Ok(()), "{name}");
        let walks: Vec<_> = (0..p.routes.len())
            .map(|r| p.walk(inst, &dist, r))
            .collect();
        assert_eq!(check_walks(inst, &walks), Ok(()), "{name}");
        assert!(
            p.cost >= lb[&name],
            "{name}: {} below the published bound",
            p.cost
        );
        // Corrupt one route's cost: the checker notices.
        let mut bad = p.clone();
        bad.routes[0].cost -= 1;
        bad.cost -= 1;
        let v = check_plan(inst, &bad).unwrap_err();
        assert!(
            matches!(
                v[..],
                [
                    Violation::WrongCost { route: 0, .. },
                    Violation::WrongTotal { .. }
                ]
            ),
            "{name}: {v:?}"
        );
    }
}

/// The checker (its own Dijkstra) and the crate's evaluation (`paths` +
/// `plan`) are two independent computations: on random instances and random
/// plans they must agree on every load, cost and time, and the walks written
/// by `plan::walk` must pass the walk checker with the same loads and times.
#[test]
fn agrees_with_the_crate_on_random_plans() {
    use rand::seq::SliceRandom;
    use rand::{Rng, SeedableRng};
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
    let mut checked = 0;
    let mut limits_hit = 0;
    for _ in 0..300 {
        let n = rng.random_range(2..10);
        let mut net = Network::with_junctions(n);
        for v in 0..n {
            let t = rng.random_bool(0.5).then(|| rng.random_range(0..9));
            net.add_link(link(v, (v + 1) % n, false, rng.random_range(0..9), t));
        }
        for _ in 0..rng.random_range(1..3 * n) {
            let (a, b) = (rng.random_range(0..n), rng.random_range(0..n));
            let t = rng.random_bool(0.5).then(|| rng.random_range(0..9));
            let mut l = link(a, b, rng.random_bool(0.4), rng.random_range(0..9), t);
            if rng.random_bool(0.7) {
                let dir = if rng.random_bool(0.3) {
                    ServeDirection::Forward
                } else {
                    ServeDirection::Either
                };
                let st = rng.random_bool(0.5).then(|| rng.random_range(0..12));
                l = serve(l, rng.random_range(0..6), st, dir);
                if let Some(s) = l.service.as_mut() {
                    s.cost = rng.random_range(0..9);
                }
            }
            net.add_link(l);
        }
        let fleet = Fleet {
            capacity: rng.random_range(5..15),
            shift_limit: Some(rng.random_range(10..60)),
            max_vehicles: None,
        };
        let inst = Instance::new("random", net, fleet.clone(), rng.random_range(0..n)).unwrap();
        let dist = Distances::new(&inst).unwrap();
        let mut visits: Vec<Visit> = inst
            .tasks()
            .iter()
            .enumerate()
            .map(|(i, t)| {
                Visit::new(
                    i,
                    if t.either && rng.random_bool(0.5) {
                        B
                    } else {
                        F
                    },
                )
            })
            .collect();
        visits.shuffle(&mut rng);
        let k = rng.random_range(1..=visits.len().max(1));
        let mut routes: Vec<Vec<Visit>> = vec![Vec::new(); k];
        for v in visits {
            routes[rng.random_range(0..k)].push(v);
        }
        let p = Plan::from_visits(&inst, &dist, routes);
        let mut expected = Vec::new();
        for (r, route) in p.routes.iter().enumerate() {
            if route.load > fleet.capacity {
                expected.push(Violation::OverCapacity {
                    route: r,
                    load: route.load,
                    capacity: fleet.capacity,
                });
            }
            if route.time > fleet.shift_limit.unwrap() {
                expected.push(Violation::OverShift {
                    route: r,
                    time: route.time,
                    limit: fleet.shift_limit.unwrap(),
                });
            }
        }
        limits_hit += usize::from(!expected.is_empty());
        let got = check_plan(&inst, &p).err().unwrap_or_default();
        assert_eq!(got, expected, "{inst:?}\n{p:?}");
        let walks: Vec<_> = (0..p.routes.len())
            .map(|r| p.walk(&inst, &dist, r))
            .collect();
        let got = check_walks(&inst, &walks).err().unwrap_or_default();
        assert_eq!(got, expected, "walks {inst:?}\n{p:?}");
        checked += 1;
    }
    println!("{checked} random plans agree; {limits_hit} of them break a limit");
    assert!(limits_hit > 10 && limits_hit < checked - 10);
}
