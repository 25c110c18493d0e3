//! Fleet plan files: a solved scenario with two yards, a landfill and two
//! truck types is written, read back equal, and every tip is in the file.

use arcwright::check::fleet::check_fleet_plan;
use arcwright::fleet::FleetSolver;
use arcwright::io::{read_fleet_plan, read_scenario, write_fleet_plan};

fn scenario() -> arcwright::model::Instance {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/fleet/two_yards.json");
    read_scenario(&std::fs::read_to_string(p).unwrap(), "two_yards.json").unwrap()
}

#[test]
fn a_plan_with_tips_round_trips_and_records_every_tip() {
    let inst = scenario();
    let sol = FleetSolver::new(&inst)
        .max_iterations(30)
        .moves(50)
        .solve()
        .unwrap();
    assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
    // Must return empty: every route ends with a tip at the landfill.
    assert!(sol
        .plan
        .routes
        .iter()
        .all(|r| r.tips.last().is_some_and(|t| t.after == r.visits.len())));
    let text = write_fleet_plan(&inst, &sol.plan);
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    let tip_stops = v["routes"]
        .as_array()
        .unwrap()
        .iter()
        .flat_map(|r| r["stops"].as_array().unwrap())
        .filter(|s| s.get("tip").is_some())
        .count();
    assert_eq!(tip_stops, sol.plan.tips());
    assert_eq!(v["tips"], serde_json::json!(sol.plan.tips()));
    assert!(text.contains("\"name\": \"Landfill\""));
    let back = read_fleet_plan(&text, "plan.json", &inst).unwrap();
    assert_eq!(back, sol.plan);
    // A changed route cost is caught, with its place.
    let mut bad = v.clone();
    let c = bad["routes"][0]["cost"].as_i64().unwrap();
    bad["routes"][0]["cost"] = serde_json::json!(c + 1);
    let e = read_fleet_plan(&bad.to_string(), "plan.json", &inst).unwrap_err();
    assert_eq!(e.problem().unwrap().path(), Some("routes[0].cost"), "{e}");
    // A tip at a dump site that does not exist.
    let mut bad = v.clone();
    let stops = bad["routes"][0]["stops"].as_array_mut().unwrap();
    let last = stops.len() - 1;
    stops[last]["tip"]["site"] = serde_json::json!(4);
    let e = read_fleet_plan(&bad.to_string(), "plan.json", &inst).unwrap_err();
    assert!(e.to_string().contains("no dump site is named `4`"), "{e}");
}

#[test]
fn sheets_show_each_tip_and_the_map_marks_dump_sites_and_yards() {
    use arcwright::report::fleet::fleet_markdown;
    let units = arcwright::model::Units {
        time: Some("min".into()),
        ..Default::default()
    };
    let inst = scenario().with_units(units);
    let sol = FleetSolver::new(&inst)
        .max_iterations(30)
        .moves(50)
        .solve()
        .unwrap();
    let md = fleet_markdown(&inst, &sol.plan);
    assert_eq!(
        md.matches("tip at Landfill (junction 5), unload 20 min")
            .count(),
        sol.plan.tips()
    );
    assert_eq!(md.matches("\n## Truck ").count(), sol.plan.routes.len());
    assert!(md.contains("serve Quarry Row from junction"), "{md}");
    assert!(md.contains("This plan is advice"));
    // The map of the demo town (which has coordinates) with a landfill and a
    // second yard marks both.
    let town = arcwright::io::read_scenario_file(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("instances/demo-town.json"),
    )
    .unwrap();
    let (a, b) = (town.depot(), town.tasks()[0].tail);
    // A plain plan of the town, drawn on the town with operations.
    let plan = arcwright::Solver::new(&town)
        .max_iterations(1)
        .solve()
        .unwrap()
        .plan;
    let ops = arcwright::model::Operations {
        dump_sites: vec![arcwright::model::DumpSite {
            name: Some("Landfill".into()),
            junction: b,
            unload_time: 900,
            unload_cost: 0,
            hours: None,
        }],
        yards: vec![
            arcwright::model::Yard {
                name: "depot".into(),
                junction: a,
            },
            arcwright::model::Yard {
                name: "north".into(),
                junction: town.tasks()[5].head,
            },
        ],
        truck_types: vec![
            arcwright::model::TruckType {
                yard: 1,
                name: "north truck".into(),
                ..town.operations().types_of(&town)[0].clone()
            },
            arcwright::model::TruckType {
                name: "depot truck".into(),
                ..town.operations().types_of(&town)[0].clone()
            },
        ],
        ..Default::default()
    };
    let town = town.with_operations(ops).unwrap();
    let dist = arcwright::paths::Distances::new(&town).unwrap();
    // Today's solver refuses the operations rather than ignore them.
    assert_eq!(
        arcwright::Solver::new(&town)
            .max_iterations(1)
            .solve()
            .unwrap_err(),
        arcwright::SolveError::NeedsFleetSolver
    );
    let svg = arcwright::report::svg::map(&town, &dist, &plan).unwrap();
    assert!(svg.contains(r#"<g id="sites">"#));
    assert!(svg.contains(">Landfill</text>") && svg.contains(">Yard north</text>"));
}
