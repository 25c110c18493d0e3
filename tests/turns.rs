//! Turn rules: the scenario format, their errors, and turn-aware distances
//! against an independent reference (Dijkstra of petgraph on a
//! street-to-street graph built here from the definitions in `arcwright::turns`).

use std::collections::HashMap;

use arcwright::demo::{town, TownSpec};
use arcwright::io::scenario::{read_scenario, write_scenario};
use arcwright::model::{Coordinates, Dir, Instance, TurnRestriction};
use arcwright::paths::{Distances, UNREACHABLE};
use arcwright::turns::{
    turn_kind, TurnDistances, TurnKind, TurnPenalties, TurnRules, TurnTable, UTurns,
};
use petgraph::graph::{DiGraph, NodeIndex};

/// A small invented town (coordinates, one-way streets, cul-de-sacs) with
/// two turn restrictions added at a junction of four streets.
fn small_town(restrict: bool) -> Instance {
    let base = town(&TownSpec::new(11, 3)).unwrap();
    let mut net = base.network().clone();
    if restrict {
        let v = (0..net.len())
            .find(|&v| {
                net.links
                    .iter()
                    .filter(|l| l.from == v || l.to == v)
                    .count()
                    == 4
            })
            .unwrap();
        let at: Vec<usize> = (0..net.links.len())
            .filter(|&i| net.links[i].from == v || net.links[i].to == v)
            .collect();
        net.turn_restrictions.push(TurnRestriction {
            rule: "no_left_turn".into(),
            from: at[0],
            via: v,
            to: at[1],
        });
        net.turn_restrictions.push(TurnRestriction {
            rule: "only_straight_on".into(),
            from: at[2],
            via: v,
            to: at[3],
        });
    }
    Instance::new("small", net, base.fleet().clone(), base.depot())
        .unwrap()
        .with_coordinates(Coordinates::Planar { origin: None })
        .unwrap()
}

fn arc(link: usize, back: bool) -> u32 {
    (2 * link + back as usize) as u32
}

/// The reference: every (arriving, leaving) pair of driving arcs at each
/// junction, allowed or not by the rules as documented, as edges of a
/// petgraph graph weighted by penalty + deadhead cost of the street entered.
#[allow(clippy::needless_range_loop)] // a, b are arc numbers, not just positions
fn reference(inst: &Instance, rules: &TurnRules) -> TurnDistances2 {
    let net = inst.network();
    let m = net.links.len();
    let ends = |a: u32| {
        let l = &net.links[a as usize / 2];
        if a.is_multiple_of(2) {
            (l.from, l.to)
        } else {
            (l.to, l.from)
        }
    };
    let drivable = |a: u32| a.is_multiple_of(2) || !net.links[a as usize / 2].oneway;
    let degree = |v: usize| {
        net.links
            .iter()
            .filter(|l| l.from != l.to && (l.from == v || l.to == v))
            .count()
    };
    let allowed = |e: u32, f: u32| -> Option<i64> {
        let (from, to, via) = (e as usize / 2, f as usize / 2, ends(e).1);
        for r in &net.turn_restrictions {
            if r.from == from && r.via == via {
                if r.rule.starts_with("no_") && r.to == to {
                    return None;
                }
                if r.rule.starts_with("only_")
                    && !net.turn_restrictions.iter().any(|q| {
                        q.from == from && q.via == via && q.to == to && q.rule.starts_with("only_")
                    })
                {
                    return None;
                }
            }
        }
        let kind = turn_kind(net, inst.coordinates(), from, via, to);
        if kind == TurnKind::UTurn && rules.u_turns == UTurns::DeadEndsOnly && degree(via) != 1 {
            return None;
        }
        Some(rules.penalty(kind))
    };
    let mut g: DiGraph<(), i64> = DiGraph::new();
    for _ in 0..2 * m + 1 {
        g.add_node(());
    }
    let yard = NodeIndex::new(2 * m);
    let mut pen = HashMap::new();
    for e in (0..2 * m as u32).filter(|&e| drivable(e)) {
        if ends(e).0 == inst.depot() {
            g.add_edge(
                yard,
                NodeIndex::new(e as usize),
                net.links[e as usize / 2].cost,
            );
        }
        for f in (0..2 * m as u32).filter(|&f| drivable(f) && ends(f).0 == ends(e).1) {
            if let Some(p) = allowed(e, f) {
                pen.insert((e, f), p);
                g.add_edge(
                    NodeIndex::new(e as usize),
                    NodeIndex::new(f as usize),
                    p + net.links[f as usize / 2].cost,
                );
            }
        }
    }
    let n = inst.tasks().len();
    let task_arc = |k: usize| -> Option<u32> {
        let t = &inst.tasks()[k / 2];
        (k.is_multiple_of(2) || t.either).then(|| arc(t.link, k % 2 == 1))
    };
    let mut out = vec![vec![UNREACHABLE; 2 * n + 1]; 2 * n + 1];
    for a in 0..=2 * n {
        let (node, at_end) = if a == 2 * n {
            (yard, inst.depot())
        } else {
            let Some(e) = task_arc(a) else { continue };
            (NodeIndex::new(e as usize), ends(e).1)
        };
        let d = petgraph::algo::dijkstra(&g, node, None, |e| *e.weight());
        for b in 0..=2 * n {
            let mut best = UNREACHABLE;
            if b == 2 * n {
                if at_end == inst.depot() {
                    best = 0;
                }
                for (&x, &c) in &d {
                    if x != yard && ends(x.index() as u32).1 == inst.depot() {
                        best = best.min(c);
                    }
                }
            } else if let Some(tb) = task_arc(b) {
                if a == 2 * n && ends(tb).0 == inst.depot() {
                    best = 0;
                }
                for (&x, &c) in &d {
                    if x != yard {
                        if let Some(p) = pen.get(&(x.index() as u32, tb)) {
                            best = best.min(c + p);
                        }
                    }
                }
            }
            out[a][b] = best;
        }
    }
    TurnDistances2(out)
}

struct TurnDistances2(Vec<Vec<i64>>);

fn allowed_arc(inst: &Instance, k: usize) -> bool {
    k == 2 * inst.tasks().len() || k.is_multiple_of(2) || inst.tasks()[k / 2].either
}

#[test]
fn turn_aware_costs_equal_a_petgraph_street_to_street_graph() {
    let inst = small_town(true);
    for rules in [
        TurnRules::trucks(TurnPenalties {
            straight: 0,
            right: 3,
            left: 11,
            u_turn: 40,
        }),
        TurnRules {
            u_turns: UTurns::Allowed,
            penalties: TurnPenalties {
                straight: 1,
                right: 0,
                left: 5,
                u_turn: 7,
            },
            ..TurnRules::default()
        },
    ] {
        let table = TurnTable::new(&inst, &rules).unwrap();
        let ours = TurnDistances::new(&inst, &table);
        let theirs = reference(&inst, &rules);
        let w = ours.width();
        let mut checked = 0;
        for a in (0..w).filter(|&a| allowed_arc(&inst, a)) {
            for b in (0..w).filter(|&b| allowed_arc(&inst, b)) {
                assert_eq!(
                    ours.cost(a, b),
                    theirs.0[a][b],
                    "from {a} to {b} under {rules:?}"
                );
                checked += 1;
            }
        }
        assert!(checked > 1000, "only {checked} pairs");
    }
}

#[test]
fn free_turns_give_todays_distances() {
    let inst = small_town(false);
    let rules = TurnRules {
        u_turns: UTurns::Allowed,
        ..TurnRules::default()
    };
    let table = TurnTable::new(&inst, &rules).unwrap();
    let ours = TurnDistances::new(&inst, &table);
    let dist = Distances::new(&inst).unwrap();
    let n = inst.tasks().len();
    let end = |k: usize| {
        if k == 2 * n {
            inst.depot()
        } else {
            inst.tasks()[k / 2]
                .ends(if k.is_multiple_of(2) {
                    Dir::Forward
                } else {
                    Dir::Backward
                })
                .1
        }
    };
    let start = |k: usize| {
        if k == 2 * n {
            inst.depot()
        } else {
            inst.tasks()[k / 2]
                .ends(if k.is_multiple_of(2) {
                    Dir::Forward
                } else {
                    Dir::Backward
                })
                .0
        }
    };
    for a in (0..=2 * n).filter(|&a| allowed_arc(&inst, a)) {
        for b in (0..=2 * n).filter(|&b| allowed_arc(&inst, b)) {
            assert_eq!(
                (ours.cost(a, b), ours.time(a, b)),
                (dist.cost(end(a), start(b)), dist.time(end(a), start(b))),
                "from {a} to {b}"
            );
        }
    }
}

const SCENARIO: &str = r#"{
  "format": "arcwright-scenario", "version": 1, "name": "tee",
  "coordinates": { "system": "planar" },
  "junctions": [ { "id": 1, "x": 0, "y": 0 }, { "id": 2, "x": 100, "y": 0 },
                 { "id": 3, "x": 200, "y": 0 }, { "id": 4, "x": 100, "y": 100 } ],
  "streets": [
    { "from": 1, "to": 2, "cost": 10, "name": "Mill Lane", "service": { "demand": 1, "cost": 10 } },
    { "from": 2, "to": 3, "cost": 10, "name": "Kiln Row" },
    { "from": 2, "to": 4, "cost": 10, "name": "Ferry Street" }
  ],
  "yard": 1,
  "fleet": { "capacity": 10 },
  "turn_restrictions": [ { "rule": "no_left_turn", "from_street": 0, "via": 2, "to_street": 2 } ]
  RULES
}"#;

#[test]
fn scenario_turn_rules_read_write_and_default() {
    let plain = read_scenario(&SCENARIO.replace("RULES", ""), "tee.json").unwrap();
    assert!(plain.turn_rules().is_none());
    assert!(!write_scenario(&plain).contains("turn_rules"));
    let text = SCENARIO.replace(
        "RULES",
        r#", "turn_rules": { "driving_side": "left", "penalties": { "left": 5, "u_turn": 30 } }"#,
    );
    let inst = read_scenario(&text, "tee.json").unwrap();
    let rules = *inst.turn_rules().unwrap();
    assert_eq!(rules.penalties.left, 5);
    assert_eq!(rules.u_turns, UTurns::DeadEndsOnly);
    assert!(rules.obey_restrictions);
    assert!(rules.crosses_traffic(TurnKind::Right));
    let again = read_scenario(&write_scenario(&inst), "again.json").unwrap();
    assert_eq!(again, inst);
    // Mill Lane -> Ferry Street (north) is a left turn, banned by the restriction;
    // Mill Lane -> Kiln Row is straight on; the U-turn at 2 is banned (3 streets).
    let table = TurnTable::new(&inst, &rules).unwrap();
    assert_eq!(table.penalty(arc(0, false), arc(2, false)), None);
    assert_eq!(table.penalty(arc(0, false), arc(1, false)), Some(0));
    assert_eq!(table.penalty(arc(0, false), arc(0, true)), None);
    // At the dead end 3 the U-turn is allowed and pays its penalty.
    assert_eq!(table.penalty(arc(1, false), arc(1, true)), Some(30));
    // Ferry Street back onto Mill Lane (heading south, then west) is a right turn.
    assert_eq!(table.penalty(arc(2, true), arc(0, true)), Some(0));
}

#[test]
fn turn_rule_errors_name_the_streets() {
    let bad = SCENARIO
        .replace(
            r#""from_street": 0, "via": 2, "to_street": 2"#,
            r#""from_street": 1, "via": 1, "to_street": 2"#,
        )
        .replace("RULES", r#", "turn_rules": {}"#);
    let e = read_scenario(&bad, "tee.json").unwrap_err().to_string();
    assert!(e.contains("turn_restrictions[0]"), "{e}");
    assert!(e.contains("street \"Kiln Row\" (junctions 2-3) and street \"Ferry Street\" (junctions 2-4) do not meet at junction 1"), "{e}");
    // Mill Lane one way, only a left turn into Ferry Street out of it, and that is banned.
    let trap = SCENARIO
        .replace(r#""cost": 10, "name": "Mill Lane", "service": { "demand": 1, "cost": 10 }"#,
                 r#""cost": 10, "one_way": true, "name": "Mill Lane", "service": { "demand": 1, "cost": 10, "directions": "forward" }"#)
        .replace(r#"{ "from": 2, "to": 3, "cost": 10, "name": "Kiln Row" },"#, r#"{ "from": 3, "to": 2, "cost": 10, "name": "Kiln Row", "one_way": true },"#)
        .replace(r#"{ "from": 2, "to": 4, "cost": 10, "name": "Ferry Street" }"#,
                 r#"{ "from": 2, "to": 4, "cost": 10, "name": "Ferry Street" }, { "from": 4, "to": 1, "cost": 10 }"#)
        .replace("RULES", r#", "turn_rules": {}"#);
    let e = read_scenario(&trap, "trap.json").unwrap_err().to_string();
    assert!(e.contains("streets[0]") && e.contains("street \"Mill Lane\" (junctions 1-2) is to be served, but every turn out of it at junction 2 is banned"), "{e}");
    let neg = SCENARIO.replace(
        "RULES",
        r#", "turn_rules": { "penalties": { "left": -1 } }"#,
    );
    let e = read_scenario(&neg, "neg.json").unwrap_err().to_string();
    assert!(e.contains("turn_rules.penalties.left"), "{e}");
}

// ---- The solver with turn rules, against enumeration ----

use arcwright::check::{check_plan, check_walks, Violation};
use arcwright::model::{Fleet, Junction, Link, Network};
use arcwright::plan::{Plan, Route, Step, Visit};
use arcwright::Solver;

/// The cost the independent checker computes for a plan of these routes
/// (read from its `WrongCost` findings on routes reported at cost -1).
fn checker_cost(inst: &Instance, routes: &[Vec<Visit>]) -> i64 {
    let plan = Plan {
        routes: routes
            .iter()
            .map(|v| Route {
                visits: v.clone(),
                load: 0,
                cost: -1,
                time: 0,
            })
            .collect(),
        cost: -1,
    };
    let found = check_plan(inst, &plan).unwrap_err();
    let mut total = 0;
    for v in found {
        match v {
            Violation::WrongCost { actual, .. } => total += actual,
            Violation::NoPath { .. } => return i64::MAX,
            _ => {}
        }
    }
    total
}

/// The best plan of a network with at most two streets to serve: one truck
/// for all, or one truck per street (every partition of two tasks).
fn best_plan(inst: &Instance) -> i64 {
    let alone: i64 = (0..inst.tasks().len())
        .map(|t| {
            [Dir::Forward, Dir::Backward]
                .into_iter()
                .filter(|&d| inst.tasks()[t].allows(d))
                .map(|d| checker_cost(inst, &[vec![Visit::new(t, d)]]))
                .min()
                .unwrap()
        })
        .sum();
    assert!(inst.tasks().len() <= 2);
    best_single_route(inst).min(alone)
}

/// Every plan of one truck: all orders and directions of all tasks.
fn best_single_route(inst: &Instance) -> i64 {
    fn rec(inst: &Instance, left: &mut Vec<usize>, cur: &mut Vec<Visit>, best: &mut i64) {
        if left.is_empty() {
            *best = (*best).min(checker_cost(inst, std::slice::from_ref(cur)));
            return;
        }
        for i in 0..left.len() {
            let t = left.remove(i);
            for dir in [Dir::Forward, Dir::Backward] {
                if inst.tasks()[t].allows(dir) {
                    cur.push(Visit::new(t, dir));
                    rec(inst, left, cur, best);
                    cur.pop();
                }
            }
            left.insert(i, t);
        }
    }
    let mut best = i64::MAX;
    rec(
        inst,
        &mut (0..inst.tasks().len()).collect(),
        &mut Vec::new(),
        &mut best,
    );
    best
}

/// Yard 0; Mill Lane 0-1 to serve (10); 1-2 and 2-0 (10 each) around; a
/// cul-de-sac 1-3 (1). No coordinates: only U-turns are known.
fn spur(rules: Option<TurnRules>) -> Instance {
    let mut net = Network::with_junctions(4);
    let a = net.add_required_edge(0, 1, 10, 1);
    net.links[a].name = Some("Mill Lane".into());
    net.add_edge(1, 2, 10);
    net.add_edge(2, 0, 10);
    net.add_edge(1, 3, 1);
    Instance::new("spur", net, Fleet::with_capacity(5), 0)
        .unwrap()
        .with_turn_rules(rules)
        .unwrap()
}

#[test]
fn banning_u_turns_changes_the_hand_computed_optimum() {
    // Free turns: out along Mill Lane and straight back, 10 + 10 = 20.
    // U-turns only at dead ends (penalty 5): the way back is either round
    // 1-2-0 (10 + 20 = 30) or into the cul-de-sac and back,
    // 10 + 1 + 5 + 1 + 10 = 27: the optimum.
    let free = spur(None);
    let trucks = spur(Some(TurnRules::trucks(TurnPenalties {
        u_turn: 5,
        ..TurnPenalties::default()
    })));
    assert_eq!(best_single_route(&free), 20);
    assert_eq!(best_single_route(&trucks), 27);
    for (inst, want) in [(&free, 20), (&trucks, 27)] {
        let sol = Solver::new(inst)
            .seed(3)
            .max_iterations(50)
            .solve()
            .unwrap();
        assert_eq!(sol.cost, want);
        check_plan(inst, &sol.plan).unwrap();
        assert!(sol.lower_bound.value <= want);
    }
    // A plan that reports the free-turn cost is caught.
    let visits = vec![Visit::new(0, Dir::Forward)];
    let tampered = Plan {
        routes: vec![Route {
            visits,
            load: 1,
            cost: 20,
            time: 20,
        }],
        cost: 20,
    };
    let v = check_plan(&trucks, &tampered).unwrap_err();
    assert!(
        v.contains(&Violation::WrongCost {
            route: 0,
            reported: 20,
            actual: 27
        }),
        "{v:?}"
    );
    // A walk with the U-turn at junction 1 is caught; the one through the cul-de-sac passes.
    let step = |link, from, to, serve| Step {
        link,
        from,
        to,
        serve,
    };
    let u_turn = vec![step(0, 0, 1, true), step(0, 1, 0, false)];
    let v = check_walks(&trucks, std::slice::from_ref(&u_turn)).unwrap_err();
    assert!(
        matches!(
            &v[0],
            Violation::BannedTurn {
                step: 1,
                via: 2,
                ..
            }
        ),
        "{v:?}"
    );
    assert!(
        v[0].to_string()
            .contains("street \"Mill Lane\" (junctions 1-2) into street \"Mill Lane\""),
        "{}",
        v[0]
    );
    assert!(check_walks(&free, &[u_turn]).is_ok());
    let cul = vec![
        step(0, 0, 1, true),
        step(3, 1, 3, false),
        step(3, 3, 1, false),
        step(0, 1, 0, false),
    ];
    check_walks(&trucks, &[cul]).unwrap();
}

/// A plus-shaped pair of blocks with coordinates: junctions on a 3 × 2
/// grid, yard at the south-west corner, two streets to serve.
fn grid(rules: Option<TurnRules>) -> Instance {
    let pts = [
        (0.0, 0.0),
        (100.0, 0.0),
        (200.0, 0.0),
        (0.0, 100.0),
        (100.0, 100.0),
        (200.0, 100.0),
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
    for (a, b) in [(0, 1), (1, 2), (3, 4), (4, 5), (0, 3), (1, 4), (2, 5)] {
        net.add_link(Link {
            from: a,
            to: b,
            cost: 10,
            ..Link::default()
        });
    }
    for (i, demand) in [(1usize, 2), (3, 2)] {
        net.links[i].service = Some(arcwright::model::ServiceSpec {
            demand,
            cost: 10,
            time: None,
            direction: arcwright::model::ServeDirection::Either,
        });
    }
    Instance::new("grid", net, Fleet::with_capacity(10), 0)
        .unwrap()
        .with_coordinates(Coordinates::Planar { origin: None })
        .unwrap()
        .with_turn_rules(rules)
        .unwrap()
}

#[test]
fn left_turn_penalties_change_the_enumerated_optimum() {
    let left = TurnRules::trucks(TurnPenalties {
        left: 25,
        ..TurnPenalties::default()
    });
    let free = grid(None);
    let turned = grid(Some(left));
    let best_free = best_plan(&free);
    let best_turned = best_plan(&turned);
    // Every plan that is optimal with free turns costs more with the penalty.
    let sol_free = Solver::new(&free)
        .seed(1)
        .max_iterations(100)
        .solve()
        .unwrap();
    assert_eq!(sol_free.cost, best_free);
    let routes: Vec<Vec<Visit>> = sol_free
        .plan
        .routes
        .iter()
        .map(|r| r.visits.clone())
        .collect();
    let repriced = checker_cost(&turned, &routes);
    assert!(
        repriced > best_turned,
        "free optimum {best_free} repriced {repriced}, optimum {best_turned}"
    );
    let sol = Solver::new(&turned)
        .seed(1)
        .max_iterations(100)
        .solve()
        .unwrap();
    assert_eq!(sol.cost, best_turned);
    check_plan(&turned, &sol.plan).unwrap();
    assert!(sol.lower_bound.value <= best_turned);
}

/// Turn-aware distances answered on demand (yard row and column from a
/// forward and a reversed search, other legs by cached searches and by
/// blocks) equal the full matrices, which equal the petgraph reference above.
#[test]
fn on_demand_turn_distances_equal_the_full_matrices() {
    // The larger town has more driving arcs than a new cached row holds.
    for inst in [small_town(true), town(&TownSpec::new(5, 9)).unwrap()] {
        for rules in [
            TurnRules::default(),
            TurnRules::trucks(TurnPenalties {
                straight: 0,
                right: 3,
                left: 11,
                u_turn: 40,
            }),
        ] {
            let table = TurnTable::new(&inst, &rules).unwrap();
            let full = TurnDistances::full(&inst, &table);
            let lazy = TurnDistances::on_demand(&inst, &table);
            assert!(lazy.is_on_demand() && !full.is_on_demand());
            let w = full.width();
            // Backwards, so that rows are asked far targets first and near later.
            for a in (0..w).rev() {
                for b in (0..w).rev() {
                    assert_eq!(lazy.leg(a, b), full.leg(a, b), "{a} -> {b} under {rules:?}");
                }
            }
        }
    }
}
