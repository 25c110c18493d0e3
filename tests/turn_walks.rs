//! The explicit walk with turns: its cost against the turn-aware distances
//! (themselves checked against petgraph in `tests/turns.rs`), the plan file
//! that carries it, the checker on tampered walks, and the drivers'
//! manoeuvres on a hand-drawn junction whose walk and costs are computed by
//! hand in the comments.

use arcwright::check::{check_plan, check_turn_walks, Violation};
use arcwright::demo::{town, TownSpec};
use arcwright::io::plan_json::{read_plan_with, read_walks, write_plan_record, PlanRecord};
use arcwright::model::{
    Coordinates, Dir, Fleet, Instance, Junction, Link, Network, ServeDirection, ServiceSpec,
    TurnRestriction,
};
use arcwright::paths::Distances;
use arcwright::plan::{Plan, Visit};
use arcwright::report::sheets::{csv_of_rows, markdown_of_rows, rows_of_walks};
use arcwright::turns::{
    route_with_turns, totals_with_turns, unservable, walk_with_turns, walks_with_turns,
    TurnDistances, TurnKind, TurnPenalties, TurnRules, TurnTable, TurnWalk,
};
use arcwright::Solver;

fn rules() -> TurnRules {
    TurnRules::trucks(TurnPenalties {
        left: 15,
        u_turn: 30,
        ..TurnPenalties::default()
    })
}

/// A small invented town with coordinates, cul-de-sacs and one-way streets.
fn small_town() -> Instance {
    town(&TownSpec::new(11, 3))
        .unwrap()
        .with_turn_rules(Some(rules()))
        .unwrap()
}

/// Junctions with exactly one street (loops aside), counted here.
fn is_dead_end(inst: &Instance, v: usize) -> bool {
    inst.network()
        .links
        .iter()
        .filter(|l| l.from != l.to && (l.from == v || l.to == v))
        .count()
        == 1
}

#[test]
fn walks_cost_what_the_turn_aware_distances_price() {
    let inst = small_town();
    let table = TurnTable::new(&inst, inst.turn_rules().unwrap()).unwrap();
    let td = TurnDistances::new(&inst, &table);
    let n = inst.tasks().len();
    // Sequences in a seeded pseudo-random order (a plain LCG), both directions.
    let mut x: u64 = 7;
    let mut next = |m: usize| {
        x = x
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (x >> 33) as usize % m
    };
    for _ in 0..200 {
        let len = 1 + next(6);
        let visits: Vec<Visit> = (0..len)
            .map(|_| {
                let t = next(n);
                let dir = if inst.tasks()[t].either && next(2) == 1 {
                    Dir::Backward
                } else {
                    Dir::Forward
                };
                Visit::new(t, dir)
            })
            .collect();
        let want = totals_with_turns(&inst, &td, &visits);
        let w = walk_with_turns(&inst, &table, &visits).unwrap();
        assert_eq!(w.cost(&inst), want.cost, "{visits:?}");
        assert_eq!(w.time(&inst), want.time, "{visits:?}");
        assert_eq!(w.turns.len() + 1, w.steps.len());
        assert_eq!(
            route_with_turns(&inst, &table, visits.clone()).cost,
            want.cost
        );
    }
    // A solved plan: its walks cost its routes, pass the checker, and make
    // U-turns only at dead ends.
    let sol = Solver::new(&inst)
        .seed(2)
        .max_iterations(30)
        .solve()
        .unwrap();
    check_plan(&inst, &sol.plan).unwrap();
    let walks = walks_with_turns(&inst, &table, &sol.plan).unwrap();
    check_turn_walks(&inst, &sol.plan, &walks).unwrap();
    for (w, r) in walks.iter().zip(&sol.plan.routes) {
        assert_eq!(w.cost(&inst), r.cost);
        for (k, t) in w.turns.iter().enumerate() {
            if t.kind == TurnKind::UTurn {
                assert!(is_dead_end(&inst, w.steps[k].to), "U-turn at {k}");
            }
        }
    }
}

/// The plan file of the small town's solved plan with its walks.
fn written() -> (Instance, Plan, Vec<TurnWalk>, String) {
    let inst = small_town();
    let table = TurnTable::new(&inst, inst.turn_rules().unwrap()).unwrap();
    let sol = Solver::new(&inst)
        .seed(5)
        .max_iterations(20)
        .solve()
        .unwrap();
    let plan = sol.plan.self_loops_forward(&inst);
    let walks = walks_with_turns(&inst, &table, &plan).unwrap();
    let record = PlanRecord {
        walks: Some(walks.clone()),
        ..PlanRecord::default()
    };
    let text = write_plan_record(&inst, &plan, &record);
    (inst, plan, walks, text)
}

#[test]
fn the_plan_file_carries_the_walk_and_reads_back() {
    let (inst, plan, walks, text) = written();
    let dist = Distances::new(&inst).unwrap();
    assert_eq!(
        read_plan_with(&text, "plan.json", &inst, &dist).unwrap(),
        plan
    );
    assert_eq!(
        read_walks(&text, "plan.json", &inst).unwrap(),
        Some(walks.clone())
    );
    // What an outside tool sees, read with serde_json alone: each walk goes
    // from the yard back to it, every step starts where the last ended, and
    // the route's cost is the streets' costs plus the stated turn costs.
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    let net = inst.network();
    let yard = net.junctions[inst.depot()].id;
    for r in v["routes"].as_array().unwrap() {
        let steps = r["walk"].as_array().unwrap();
        assert_eq!(steps[0]["from"], yard);
        assert_eq!(steps.last().unwrap()["to"], yard);
        let mut cost = 0;
        for (k, s) in steps.iter().enumerate() {
            if k > 0 {
                assert_eq!(s["from"], steps[k - 1]["to"]);
                cost += s["turn_cost"].as_i64().unwrap();
            }
            let l = &net.links[s["link"].as_u64().unwrap() as usize];
            cost += if s["serve"].as_bool().unwrap() {
                l.service.as_ref().unwrap().cost
            } else {
                l.cost
            };
        }
        assert_eq!(cost, r["cost"].as_i64().unwrap());
    }
    // A file without walks reads as none.
    let bare = write_plan_record(&inst, &plan, &PlanRecord::default());
    assert_eq!(read_walks(&bare, "plan.json", &inst).unwrap(), None);
}

/// Reads the tampered text's plan and walks and checks them.
fn check_text(inst: &Instance, v: &serde_json::Value) -> Vec<Violation> {
    let text = v.to_string();
    let dist = Distances::new(inst).unwrap();
    let plan =
        arcwright::io::plan_json::read_plan_as_written(&text, "plan.json", inst, &dist).unwrap();
    let walks = read_walks(&text, "plan.json", inst).unwrap().unwrap();
    let mut out = check_plan(inst, &plan).err().unwrap_or_default();
    out.extend(
        check_turn_walks(inst, &plan, &walks)
            .err()
            .unwrap_or_default(),
    );
    out
}

#[test]
fn tampered_walks_are_caught() {
    let (inst, _, walks, text) = written();
    let good: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(check_text(&inst, &good), vec![]);
    // A wrong turn cost: the first turn of truck 1 stated 7 dearer.
    let mut v = good.clone();
    let stated = v["routes"][0]["walk"][1]["turn_cost"].as_i64().unwrap();
    v["routes"][0]["walk"][1]["turn_cost"] = (stated + 7).into();
    let found = check_text(&inst, &v);
    assert!(
        found.iter().any(|x| matches!(x,
            Violation::WrongTurn { route: 0, step: 1, stated: s, actual: a, .. }
                if *s == stated + 7 && *a == stated)),
        "{found:?}"
    );
    // A wrong turn kind.
    let mut v = good.clone();
    let kind = v["routes"][0]["walk"][1]["turn"]
        .as_str()
        .unwrap()
        .to_string();
    v["routes"][0]["walk"][1]["turn"] = if kind == "left" { "right" } else { "left" }.into();
    assert!(check_text(&inst, &v).iter().any(|x| matches!(
        x,
        Violation::WrongTurn {
            route: 0,
            step: 1,
            ..
        }
    )));
    // A walk that does not connect: a deadhead step in the middle removed.
    let w = &walks[0];
    let k = (1..w.steps.len() - 1)
        .find(|&k| !w.steps[k].serve && w.steps[k].from != w.steps[k].to)
        .expect("truck 1 deadheads somewhere");
    let mut v = good.clone();
    v["routes"][0]["walk"].as_array_mut().unwrap().remove(k);
    let found = check_text(&inst, &v);
    assert!(
        found.iter().any(
            |x| matches!(x, Violation::Disconnected { at, .. } if at.route == 0 && at.pos == k)
        ),
        "{found:?}"
    );
    // The route's cost stated without the turns.
    let mut v = good.clone();
    let cost = v["routes"][0]["cost"].as_i64().unwrap();
    let turns = walks[0].turn_cost();
    assert!(turns > 0, "truck 1 pays for some turn");
    v["routes"][0]["cost"] = (cost - turns).into();
    let found = check_text(&inst, &v);
    assert!(found.contains(&Violation::WalkCost {
        route: 0,
        walk: cost,
        stated: cost - turns
    }));
    assert!(found.contains(&Violation::WrongCost {
        route: 0,
        reported: cost - turns,
        actual: cost
    }));
    // A served step marked as driven only: the walk no longer serves the list.
    let mut v = good;
    let s = walks[0].steps.iter().position(|s| s.serve).unwrap();
    v["routes"][0]["walk"][s]["serve"] = false.into();
    let found = check_text(&inst, &v);
    assert!(found
        .iter()
        .any(|x| matches!(x, Violation::WalkServices { route: 0, .. })));
    assert!(found
        .iter()
        .any(|x| matches!(x, Violation::NotServed { .. })));
}

#[test]
fn a_banned_turn_in_a_stated_walk_is_caught() {
    // Yard 0; Mill Lane 0-1 to serve (10); 1-2 and 2-0 around (10 each); a
    // cul-de-sac 1-3 (1). U-turns only at dead ends (penalty 5).
    let mut net = Network::with_junctions(4);
    let a = net.add_required_edge(0, 1, 10, 1);
    net.links[a].name = Some("Mill Lane".into());
    net.add_edge(1, 2, 10);
    net.add_edge(2, 0, 10);
    net.add_edge(1, 3, 1);
    let inst = Instance::new("spur", net, Fleet::with_capacity(5), 0)
        .unwrap()
        .with_turn_rules(Some(TurnRules::trucks(TurnPenalties {
            u_turn: 5,
            ..TurnPenalties::default()
        })))
        .unwrap();
    let table = TurnTable::new(&inst, inst.turn_rules().unwrap()).unwrap();
    let route = route_with_turns(&inst, &table, vec![Visit::new(0, Dir::Forward)]);
    assert_eq!(route.cost, 10 + 1 + 5 + 1 + 10); // through the cul-de-sac
    let plan = Plan {
        cost: route.cost,
        routes: vec![route],
    };
    let text = write_plan_record(
        &inst,
        &plan,
        &PlanRecord {
            walks: walks_with_turns(&inst, &table, &plan),
            ..PlanRecord::default()
        },
    );
    let mut v: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(check_text(&inst, &v), vec![]);
    // Turning back on Mill Lane at junction 2 (id 2) instead: banned.
    v["routes"][0]["walk"] = serde_json::json!([
        {"link": 0, "from": 1, "to": 2, "serve": true},
        {"link": 0, "from": 2, "to": 1, "serve": false, "turn": "u_turn", "turn_cost": 5}
    ]);
    v["routes"][0]["cost"] = 25.into();
    let found = check_text(&inst, &v);
    assert!(
        found.iter().any(|x| matches!(
            x,
            Violation::BannedTurn {
                route: 0,
                step: 1,
                via: 2,
                ..
            }
        )),
        "{found:?}"
    );
}

/// A junction C = (0, 0) with four arms, coordinates in metres, north up:
/// Station Road from the yard Y = (0, -100); Mill Lane to W = (-100, 0),
/// served both sides; Quarry Close to N = (0, 100), served one side at a
/// time (this pass: forward, the right-hand kerb); an unnamed street to
/// E = (100, 0). W, N and E are dead ends. Every street costs 100.
fn crossing(named_mill_lane: bool) -> Instance {
    let pts = [
        (0.0, -100.0),
        (0.0, 0.0),
        (-100.0, 0.0),
        (0.0, 100.0),
        (100.0, 0.0),
    ];
    let mut net = Network {
        junctions: pts
            .iter()
            .enumerate()
            .map(|(i, &(x, y))| Junction {
                id: i as u64 + 1,
                x: Some(x),
                y: Some(y),
            })
            .collect(),
        ..Network::default()
    };
    let serve = |direction| ServiceSpec {
        demand: 1,
        cost: 100,
        time: None,
        direction,
    };
    for (from, to, name, service) in [
        (0, 1, Some("Station Road"), None),
        (
            1,
            2,
            named_mill_lane.then_some("Mill Lane"),
            Some(serve(ServeDirection::Either)),
        ),
        (
            1,
            3,
            Some("Quarry Close"),
            Some(serve(ServeDirection::Forward)),
        ),
        (1, 4, None, None),
    ] {
        net.add_link(Link {
            from,
            to,
            cost: 100,
            name: name.map(String::from),
            service,
            ..Link::default()
        });
    }
    Instance::new("crossing", net, Fleet::with_capacity(10), 0)
        .unwrap()
        .with_coordinates(Coordinates::Planar { origin: None })
        .unwrap()
        .with_turn_rules(Some(rules()))
        .unwrap()
}

#[test]
fn sheets_read_as_driving_directions() {
    let inst = crossing(true);
    let table = TurnTable::new(&inst, inst.turn_rules().unwrap()).unwrap();
    // Mill Lane first, then Quarry Close. By hand: Station Road north (100),
    // left into Mill Lane (15) serving it (100), U-turn at its dead end W
    // (30) and back (100); heading east at C, Quarry Close is to the left
    // (15), served (100); U-turn at N (30), back (100), and straight on down
    // Station Road (0, 100): 600 for the streets + 90 for the turns.
    let visits = vec![Visit::new(0, Dir::Forward), Visit::new(1, Dir::Forward)];
    let w = walk_with_turns(&inst, &table, &visits).unwrap();
    assert_eq!(w.cost(&inst), 690);
    let plan = Plan {
        routes: vec![route_with_turns(&inst, &table, visits)],
        cost: 690,
    };
    let rows = rows_of_walks(&inst, std::slice::from_ref(&w));
    let said: Vec<String> = rows[0]
        .iter()
        .map(|r| r.manoeuvre.clone().unwrap())
        .collect();
    assert_eq!(
        said,
        [
            "leave the yard along Station Road",
            "left onto Mill Lane, serve both sides",
            "U-turn at the dead end of Mill Lane (junction 3)",
            "left onto Quarry Close, serve the right side",
            "U-turn at the dead end of Quarry Close (junction 4)",
            "straight on onto Station Road",
        ]
    );
    assert_eq!(rows[0].last().unwrap().cost_so_far, 690);
    let md = markdown_of_rows(&inst, &plan, &rows);
    assert!(
        md.contains("Turns: 2 left, 0 right, 2 U-turns (all at dead ends)"),
        "{md}"
    );
    // The CSV sheet has the turn, its cost and the manoeuvre on each row.
    let csv = csv_of_rows(&inst, &rows[0]);
    let mut r = csv::Reader::from_reader(csv.as_bytes());
    let head = r.headers().unwrap().clone();
    let col = |name: &str| head.iter().position(|h| h.starts_with(name)).unwrap();
    let recs: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(&recs[1][col("turn")], "left");
    assert_eq!(&recs[1][col("turn_cost")], "15");
    assert_eq!(&recs[2][col("turn")], "u_turn");
    assert_eq!(&recs[3][col("manoeuvre")], said[3]);
    // Without a name, the street is given by its junctions.
    let unnamed = crossing(false);
    let t2 = TurnTable::new(&unnamed, unnamed.turn_rules().unwrap()).unwrap();
    let w2 = walk_with_turns(&unnamed, &t2, &[Visit::new(0, Dir::Forward)]).unwrap();
    let rows2 = rows_of_walks(&unnamed, &[w2]);
    assert_eq!(
        rows2[0][1].manoeuvre.as_deref(),
        Some("left at junction 2 toward junction 3, serve both sides")
    );
    // The solver finds the cheaper order by hand: Quarry Close first
    // (straight on, 0), U-turn (30), right into Mill Lane (0), U-turn (30),
    // right onto Station Road (0): 600 + 60.
    let sol = Solver::new(&inst)
        .seed(1)
        .max_iterations(30)
        .solve()
        .unwrap();
    assert_eq!(sol.cost, 660);
    let best = walks_with_turns(&inst, &table, &sol.plan).unwrap();
    assert_eq!(best[0].count(TurnKind::Left), 0);
    assert_eq!(best[0].count(TurnKind::UTurn), 2);
}

#[test]
fn streets_the_rules_cut_off_are_found() {
    // Yard 0; 0-1 two-way; a one-way street 1→2 to serve; 2-0 two-way.
    // Banning the turn from the one-way street into 2-0 leaves no way out
    // of it (it cannot be driven back): it cannot be served.
    let mut net = Network::with_junctions(3);
    net.add_edge(0, 1, 5);
    let one_way = net.add_link(Link {
        from: 1,
        to: 2,
        oneway: true,
        cost: 5,
        service: Some(ServiceSpec {
            demand: 1,
            cost: 5,
            time: None,
            direction: ServeDirection::Forward,
        }),
        ..Link::default()
    });
    let back = net.add_edge(2, 0, 5);
    net.turn_restrictions.push(TurnRestriction {
        rule: "no_right_turn".into(),
        from: one_way,
        via: 2,
        to: back,
    });
    let inst = Instance::new("cut", net, Fleet::with_capacity(5), 0).unwrap();
    let table = TurnTable::without_ways_out_check(&inst, &rules()).unwrap();
    assert_eq!(unservable(&inst, &table), vec![0]);
    assert!(TurnTable::new(&inst, &rules()).is_err());
    let free = TurnTable::new(
        &inst,
        &TurnRules {
            obey_restrictions: false,
            ..rules()
        },
    )
    .unwrap();
    assert!(unservable(&inst, &free).is_empty());
}
