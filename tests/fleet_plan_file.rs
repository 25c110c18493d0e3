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
