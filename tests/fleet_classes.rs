//! Truck types that may not enter or serve road classes (issue 10): the
//! per-type distances route around barred streets (against a Floyd–Warshall
//! written here, on the network without them), the split and the solver give
//! a type only streets it may serve (class restrictions behave exactly as the
//! street lists this test resolves from the classes on its own, whose split
//! `tests/fleet_split.rs` compares with an enumeration), the checker catches
//! both kinds of breach, and the scenario names its mistakes in its own words.

use arcwright::check::fleet::{check_fleet_plan, FleetViolation};
use arcwright::error::ParseProblem;
use arcwright::fleet::split::split;
use arcwright::fleet::{FleetPlan, FleetRoute, FleetSolver, Tables};
use arcwright::io::{read_scenario, write_scenario};
use arcwright::model::{
    DumpSite, Fleet, Instance, Link, ModelError, Network, Operations, OperationsError, ServiceSpec,
    TruckType,
};
use arcwright::paths::UNREACHABLE;
use arcwright::plan::Visit;

const INF: i64 = i64::MAX / 8;

/// A small deterministic generator (64-bit LCG, Knuth's constants).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self, n: u64) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 33) % n
    }
}

/// The links of `net` whose class is in `classes`, or whose index is in
/// `links` (this test's own resolution).
fn resolve(net: &Network, links: &[usize], classes: &[&str]) -> Vec<usize> {
    (0..net.links.len())
        .filter(|&i| {
            links.contains(&i)
                || net.links[i]
                    .class
                    .as_deref()
                    .is_some_and(|c| classes.contains(&c))
        })
        .collect()
}

/// Lexicographic (cost, time) all-pairs shortest paths without `banned` links.
fn floyd(net: &Network, banned: &[usize]) -> Vec<Vec<(i64, i64)>> {
    let n = net.junctions.len();
    let mut d = vec![vec![(INF, INF); n]; n];
    for (v, row) in d.iter_mut().enumerate() {
        row[v] = (0, 0);
    }
    for (i, l) in net.links.iter().enumerate() {
        if banned.contains(&i) {
            continue;
        }
        let w = (l.cost, l.drive_time());
        let mut put = |a: usize, b: usize| d[a][b] = d[a][b].min(w);
        put(l.from, l.to);
        if !l.oneway {
            put(l.to, l.from);
        }
    }
    for k in 0..n {
        for i in 0..n {
            for j in 0..n {
                if d[i][k].0 < INF && d[k][j].0 < INF {
                    let w = (d[i][k].0 + d[k][j].0, d[i][k].1 + d[k][j].1);
                    d[i][j] = d[i][j].min(w);
                }
            }
        }
    }
    d
}

/// A town of `n` junctions: a two-way `residential` ring, `lane` and
/// `primary` shortcuts (some one-way), `tasks` of them required; a landfill.
fn town(seed: u64, n: usize, tasks: usize) -> Instance {
    let mut g = Lcg(seed);
    let mut net = Network::with_junctions(n);
    let mut ends: Vec<(usize, usize, &str)> =
        (0..n).map(|v| (v, (v + 1) % n, "residential")).collect();
    for k in 0..n {
        let a = g.next(n as u64) as usize;
        let b = (a + 2 + g.next(n as u64 - 3) as usize) % n;
        ends.push((a, b, if k % 2 == 0 { "lane" } else { "primary" }));
    }
    // Required streets spread over the three classes.
    let mut order: Vec<usize> = (0..ends.len()).collect();
    for i in (1..order.len()).rev() {
        order.swap(i, g.next(i as u64 + 1) as usize);
    }
    let required = &order[..tasks];
    for (i, &(a, b, class)) in ends.iter().enumerate() {
        let cost = if class == "residential" {
            6 + g.next(6) as i64
        } else {
            1 + g.next(4) as i64
        };
        let service = required.contains(&i).then(|| ServiceSpec {
            demand: 1 + g.next(3) as i64,
            cost: cost + 1,
            time: None,
            direction: arcwright::model::ServeDirection::Either,
        });
        net.add_link(Link {
            from: a,
            to: b,
            oneway: class != "residential" && g.next(3) == 0,
            cost,
            time: Some(cost + g.next(3) as i64),
            service,
            class: Some(class.to_string()),
            ..Link::default()
        });
    }
    Instance::new(format!("classes {seed}"), net, Fleet::with_capacity(8), 0).unwrap()
}

/// Two truck types: `small` may not serve `primary` streets, `large` may not
/// enter `lane`s; with `by_class` false, the same as street lists resolved here.
fn with_types(inst: &Instance, by_class: bool) -> Result<Instance, OperationsError> {
    let net = inst.network();
    let mut small = TruckType::new("small", 5);
    small.count = Some(3);
    let mut large = TruckType::new("large", 9);
    large.fixed_cost = 10;
    large.cost_per_mille = 1200;
    if by_class {
        small.no_service_classes = vec!["primary".into()];
        large.no_entry_classes = vec!["lane".into()];
    } else {
        small.no_service = resolve(net, &[], &["primary"]);
        large.no_entry = resolve(net, &[], &["lane"]);
    }
    let ops = Operations {
        dump_sites: vec![DumpSite {
            name: Some("landfill".into()),
            junction: net.junctions.len() / 2,
            unload_time: 4,
            unload_cost: 0,
            hours: None,
        }],
        truck_types: vec![small, large],
        ..Operations::default()
    };
    inst.clone().with_operations(ops)
}

#[test]
fn distances_route_around_the_classes_a_type_may_not_enter() {
    let mut compared = 0;
    let mut detours = 0;
    for seed in 1..=20u64 {
        let plain = town(seed, 9, 6);
        let Ok(inst) = with_types(&plain, true) else {
            continue;
        };
        let tables = Tables::new(&inst).unwrap();
        let net = inst.network();
        let free = floyd(net, &[]);
        for (k, barred) in [(0, vec![]), (1, resolve(net, &[], &["lane"]))] {
            let want = floyd(net, &barred);
            let d = tables.dist(k);
            for &u in d.keys() {
                for &v in d.keys() {
                    let got = (d.cost(u, v) < UNREACHABLE).then(|| (d.cost(u, v), d.time(u, v)));
                    let w = (want[u][v].0 < INF).then_some(want[u][v]);
                    assert_eq!(got, w, "seed {seed} type {k} {u}->{v}");
                    compared += 1;
                    detours += usize::from(w.is_some_and(|w| w > free[u][v]));
                }
            }
        }
    }
    assert!(
        compared > 1000 && detours > 50,
        "{compared} pairs, {detours} detours"
    );
}

#[test]
fn class_restrictions_plan_exactly_as_their_street_lists() {
    let mut planned = 0;
    for seed in 1..=12u64 {
        let plain = town(seed, 8, 7);
        let (Ok(by_class), Ok(by_street)) = (with_types(&plain, true), with_types(&plain, false))
        else {
            continue;
        };
        let (tc, ts) = (
            Tables::new(&by_class).unwrap(),
            Tables::new(&by_street).unwrap(),
        );
        let mut g = Lcg(seed);
        for _ in 0..5 {
            let mut tour: Vec<usize> = (0..by_class.tasks().len()).collect();
            for i in (1..tour.len()).rev() {
                tour.swap(i, g.next(i as u64 + 1) as usize);
            }
            let a = split(&by_class, &tc, &tour)
                .ok()
                .map(|s| (s.cost, s.routes));
            let b = split(&by_street, &ts, &tour)
                .ok()
                .map(|s| (s.cost, s.routes));
            assert_eq!(a, b, "seed {seed} tour {tour:?}");
        }
        let solve = |inst: &Instance| {
            FleetSolver::new(inst)
                .seed(seed)
                .max_iterations(10)
                .moves(60)
                .solve()
                .unwrap()
        };
        let (a, b) = (solve(&by_class), solve(&by_street));
        assert_eq!(a.plan, b.plan, "seed {seed}");
        assert!(check_fleet_plan(&by_class, &a.plan).is_ok());
        // No route serves a street its type may not serve (resolved here).
        let net = by_class.network();
        let no_serve = [
            resolve(net, &[], &["primary"]),
            resolve(net, &[], &["lane"]),
        ];
        for r in &a.plan.routes {
            for v in &r.visits {
                let link = by_class.tasks()[v.task].link;
                assert!(
                    !no_serve[r.truck_type].contains(&link),
                    "seed {seed}: type {} serves {link}",
                    r.truck_type
                );
            }
        }
        planned += 1;
    }
    assert!(planned >= 8, "only {planned} towns valid");
}

/// A plan made for trucks without restrictions, checked against types with
/// them: the checker finds the served street it may not serve and the leg
/// through a street it may not enter, on its own.
#[test]
fn the_checker_finds_barred_service_and_barred_driving() {
    // 0 -1- 1 -2- 2, and a lane 0 -> 2 that is the short way (cost 1).
    let mut net = Network::with_junctions(4);
    let street = |from, to, cost, class: &str, service| Link {
        from,
        to,
        cost,
        class: Some(class.into()),
        service,
        ..Link::default()
    };
    let serve = |demand| {
        Some(ServiceSpec {
            demand,
            cost: 3,
            time: None,
            direction: arcwright::model::ServeDirection::Either,
        })
    };
    net.add_link(street(0, 1, 5, "residential", serve(1))); // 0
    net.add_link(street(1, 2, 5, "primary", serve(1))); // 1
    net.add_link(street(2, 0, 1, "lane", None)); // 2
    net.add_link(street(2, 3, 4, "residential", None)); // 3
    let inst = Instance::new("checker", net, Fleet::with_capacity(9), 0).unwrap();
    let ops = |ty: TruckType| Operations {
        truck_types: vec![ty],
        ..Operations::default()
    };
    let free = inst
        .clone()
        .with_operations(ops(TruckType::new("any", 9)))
        .unwrap();
    let tables = Tables::new(&free).unwrap();
    let route = FleetRoute::new(
        &free,
        &tables,
        0,
        vec![
            Visit::new(0, arcwright::model::Dir::Forward),
            Visit::new(1, arcwright::model::Dir::Forward),
        ],
        vec![],
    )
    .unwrap();
    let plan = FleetPlan::new(vec![route]);
    assert!(check_fleet_plan(&free, &plan).is_ok());
    // Now the type may not serve primary streets and may not enter lanes.
    let mut ty = TruckType::new("any", 9);
    ty.no_service_classes = vec!["primary".into()];
    ty.no_entry_classes = vec!["lane".into()];
    // Street 1 must then be served by someone: a second type that may.
    let mut other = TruckType::new("other", 9);
    other.no_entry = vec![0];
    let both = Operations {
        truck_types: vec![ty, other],
        ..Operations::default()
    };
    let barred = inst.clone().with_operations(both).unwrap();
    let v = check_fleet_plan(&barred, &plan).unwrap_err();
    assert!(
        v.iter().any(|x| matches!(
            x,
            FleetViolation::TypeMayNotServe {
                street: 1,
                list: "no_service",
                ..
            }
        )),
        "{v:?}"
    );
    // The way home from junction 2 took the lane (cost 1); without it the
    // truck drives 2 -> 1 -> 0 (cost 10), so the stated cost is wrong.
    assert!(
        v.iter()
            .any(|x| matches!(x, FleetViolation::Mismatch { what: "cost", .. })),
        "{v:?}"
    );
    // And serving a street of a class it may not enter is named as such.
    let mut ty = TruckType::new("any", 9);
    ty.no_entry_classes = vec!["primary".into()];
    let both = Operations {
        truck_types: vec![ty, TruckType::new("other", 9)],
        ..Operations::default()
    };
    let barred = inst.with_operations(both).unwrap();
    let v = check_fleet_plan(&barred, &plan).unwrap_err();
    assert!(
        v.iter().any(|x| matches!(
            x,
            FleetViolation::TypeMayNotServe {
                street: 1,
                list: "no_entry",
                ..
            }
        )),
        "{v:?}"
    );
}

fn fixture() -> serde_json::Value {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/fleet/two_yards.json");
    let mut v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap();
    // Classes for the streets: Quarry Row a lane, Kiln Street primary.
    for (i, class) in [
        "lane",
        "residential",
        "primary",
        "residential",
        "primary",
        "residential",
    ]
    .iter()
    .enumerate()
    {
        v["streets"][i]["class"] = serde_json::json!(class);
    }
    v
}

fn problem(v: &serde_json::Value) -> (String, Option<String>, ParseProblem) {
    let text = serde_json::to_string_pretty(v).unwrap();
    let e = read_scenario(&text, "bad.json").unwrap_err();
    let p = e.problem().unwrap().clone();
    (
        e.to_string(),
        p.path().map(str::to_string),
        p.innermost().clone(),
    )
}

#[test]
fn the_scenario_reads_and_writes_class_lists() {
    let mut v = fixture();
    v["truck_types"][0]["no_entry"] = serde_json::json!([5, "motorway"]);
    v["truck_types"][0]["no_service"] = serde_json::json!(["primary"]);
    v["truck_types"][1]["no_entry"] = serde_json::json!(["lane"]);
    v["truck_types"][1]["no_service"] = serde_json::json!([]);
    let inst = read_scenario(&v.to_string(), "classes.json").unwrap();
    let ops = inst.operations();
    let (small, large) = (&ops.truck_types[0], &ops.truck_types[1]);
    assert_eq!(
        (small.no_entry.clone(), small.no_entry_classes.clone()),
        (vec![5], vec!["motorway".to_string()])
    );
    assert_eq!(small.no_service_classes, vec!["primary".to_string()]);
    assert_eq!(large.no_entry_classes, vec!["lane".to_string()]);
    assert_eq!(small.no_service_links(inst.network()), vec![2, 4, 5]);
    assert_eq!(large.no_entry_links(inst.network()), vec![0]);
    let again = read_scenario(&write_scenario(&inst), "again.json").unwrap();
    assert_eq!(again, inst);
}

#[test]
fn class_mistakes_are_named_in_the_files_words() {
    // A misspelt class.
    let mut v = fixture();
    v["truck_types"][1]["no_service"] = serde_json::json!([0, "primry"]);
    let (msg, path, p) = problem(&v);
    assert_eq!(path.as_deref(), Some("truck_types[1].no_service"), "{msg}");
    assert!(
        matches!(p, ParseProblem::Model(ModelError::Operations(OperationsError::UnknownRoadClass { ref class, .. })) if class == "primry")
    );
    assert!(
        msg.contains("road class `primry`") && msg.contains("truck type `large`"),
        "{msg}"
    );
    // Neither a street nor a class.
    let mut v = fixture();
    v["truck_types"][1]["no_entry"] = serde_json::json!([-1]);
    let (msg, _, _) = problem(&v);
    // serde names the line of the bad value (the `-1`).
    let line = serde_json::to_string_pretty(&v)
        .unwrap()
        .lines()
        .position(|l| l.trim() == "-1")
        .unwrap()
        + 1;
    assert!(msg.starts_with(&format!("bad.json:{line}:")), "{msg}");
    assert!(
        msg.contains("a street (its position in `streets`, from 0) or a road class name"),
        "{msg}"
    );
    // A type that no street admits: small may enter no class of a street to serve.
    let mut v = fixture();
    v["truck_types"][0]["no_entry"] = serde_json::json!(["lane", "residential", "primary"]);
    let (msg, path, _) = problem(&v);
    assert_eq!(path.as_deref(), Some("truck_types[0]"), "{msg}");
    assert!(msg.contains("truck type `small` may serve none"), "{msg}");
    // A required street no type may serve: Kiln Street (primary, street 2).
    let mut v = fixture();
    v["truck_types"][0]["no_service"] = serde_json::json!(["primary"]);
    v["truck_types"][1]["no_service"] = serde_json::json!([0, "primary"]);
    let (msg, path, _) = problem(&v);
    assert_eq!(path.as_deref(), Some("streets[2]"), "{msg}");
    assert!(
        msg.contains("street 2: no truck type can serve it"),
        "{msg}"
    );
    // A street to serve that every type allowed to serve it cannot reach:
    // Quarry Row made one-way 1 -> 2; small may not serve it; large may not
    // enter street 3 (4 - 1), the only other way to junction 1.
    let mut v = fixture();
    v["streets"][0]["one_way"] = serde_json::json!(true);
    v["truck_types"][0]["no_service"] = serde_json::json!([0]);
    v["truck_types"][1]["no_entry"] = serde_json::json!([3]);
    v["truck_types"][1]["no_service"] = serde_json::json!([]);
    let (msg, path, p) = problem(&v);
    assert_eq!(path.as_deref(), Some("streets[0]"), "{msg}");
    assert_eq!(
        p,
        ParseProblem::Model(ModelError::Operations(
            OperationsError::StreetServedByNone { street: 0 }
        ))
    );
    // Without the one-way rule large reaches it (and back) along Quarry Row itself.
    v["streets"][0]["one_way"] = serde_json::json!(false);
    assert!(read_scenario(&v.to_string(), "ok.json").is_ok());
}
