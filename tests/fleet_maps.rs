//! Maps of fleet plans: the explicit walks behind them agree with the
//! independent checker's figures and keep off the streets a type may not
//! enter; the SVG (parsed with `roxmltree`) draws every truck's way to a dump
//! site and back and labels yards and dump sites; the GeoJSON (parsed with the
//! `geojson` crate) marks those legs and places the yards and dump sites.

use arcwright::check::fleet::check_fleet_plan;
use arcwright::fleet::{FleetSolver, Tables};
use arcwright::io::read_scenario;
use arcwright::model::Instance;
use arcwright::report::fleet::fleet_rows;
use arcwright::report::geo::fleet_feature_collection;
use arcwright::report::sheets::Action;
use arcwright::report::svg::fleet_map;

/// The two-yard fixture on planar coordinates placed on the Earth, the
/// large type barred from `lane`s (Quarry Row is one).
fn scenario() -> Instance {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/fleet/two_yards.json");
    let mut v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap();
    let xy = [
        (0.0, 0.0),
        (400.0, 0.0),
        (400.0, 300.0),
        (0.0, 300.0),
        (-900.0, 300.0),
        (700.0, 300.0),
    ];
    for (i, (x, y)) in xy.iter().enumerate() {
        v["junctions"][i]["x"] = serde_json::json!(x);
        v["junctions"][i]["y"] = serde_json::json!(y);
    }
    v["coordinates"] =
        serde_json::json!({ "system": "planar", "origin": { "lon": 24.9, "lat": 60.2 } });
    v["streets"][0]["class"] = serde_json::json!("lane");
    v["truck_types"][1]["no_entry"] = serde_json::json!(["lane"]);
    v["truck_types"][1]["no_service"] = serde_json::json!([]);
    // Tight loads and a dear large truck, so that a truck tips between
    // streets too.
    v["truck_types"][0]["capacity"] = serde_json::json!(4);
    v["truck_types"][0]["count"] = serde_json::json!(1);
    v["truck_types"][1]["capacity"] = serde_json::json!(4);
    v["truck_types"][1]["fixed_cost"] = serde_json::json!(1000);
    read_scenario(&v.to_string(), "two_yards.json").unwrap()
}

#[test]
fn walks_agree_with_the_checker_and_keep_off_barred_streets() {
    let inst = scenario();
    let sol = FleetSolver::new(&inst)
        .max_iterations(20)
        .moves(50)
        .solve()
        .unwrap();
    assert!(check_fleet_plan(&inst, &sol.plan).is_ok());
    assert!(
        sol.plan.tips() > sol.plan.routes.len(),
        "some truck tips between streets"
    );
    let tables = Tables::new(&inst).unwrap();
    let rows = fleet_rows(&inst, &tables, &sol.plan);
    let ops = inst.operations();
    for (r, route) in sol.plan.routes.iter().enumerate() {
        let rows = &rows[r];
        // The walk's streets cost what the checker accepted as driven.
        assert_eq!(
            rows.iter().map(|x| x.cost).sum::<i64>(),
            route.driven,
            "truck {r}"
        );
        // It serves the visits, in order.
        let served: Vec<usize> = rows
            .iter()
            .filter(|x| x.action == Action::Serve)
            .map(|x| x.link)
            .collect();
        let visits: Vec<usize> = route
            .visits
            .iter()
            .map(|v| inst.tasks()[v.task].link)
            .collect();
        assert_eq!(served, visits);
        // Each tip is reached by a leg to its dump site (the fixture's yards
        // and streets are all away from the landfill).
        let arrivals = rows
            .windows(2)
            .filter(|w| w[0].action == Action::ToDumpSite && w[1].action != Action::ToDumpSite)
            .count()
            + usize::from(rows.last().is_some_and(|x| x.action == Action::ToDumpSite));
        assert_eq!(arrivals, route.tips.len(), "truck {r}");
        for w in rows
            .windows(2)
            .filter(|w| w[0].action == Action::ToDumpSite && w[1].action != Action::ToDumpSite)
        {
            assert_eq!(w[0].ends.1, ops.dump_sites[0].junction);
            assert_eq!(w[1].action, Action::FromDumpSite);
        }
        // The large type never drives on the lane (street 0).
        if ops.truck_types[route.truck_type].name == "large" {
            assert!(rows.iter().all(|x| x.link != 0), "large on the lane");
        }
    }
}

#[test]
fn the_map_and_geojson_show_the_way_to_the_dump_site_and_back() {
    let inst = scenario();
    let sol = FleetSolver::new(&inst)
        .max_iterations(20)
        .moves(50)
        .solve()
        .unwrap();
    let tables = Tables::new(&inst).unwrap();
    let rows = fleet_rows(&inst, &tables, &sol.plan);
    let svg = fleet_map(&inst, &sol.plan, &rows).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    for (r, route) in sol.plan.routes.iter().enumerate() {
        let group = doc
            .descendants()
            .find(|n| n.attribute("id") == Some(&format!("route-{}-deadhead", r + 1)))
            .unwrap();
        let dotted = group
            .children()
            .filter(|n| n.attribute("stroke-dasharray") == Some("1.5 3"))
            .count();
        let legs = rows[r]
            .iter()
            .filter(|x| matches!(x.action, Action::ToDumpSite | Action::FromDumpSite))
            .count();
        assert_eq!(dotted, legs, "truck {}", r + 1);
        assert!(route.tips.is_empty() || dotted > 0);
    }
    let texts: Vec<&str> = doc.descendants().filter_map(|n| n.text()).collect();
    for label in [
        "Landfill",
        "Yard north (1)",
        "Yard south",
        "to or from a dump site",
    ] {
        assert!(
            texts.iter().any(|t| t.contains(label)),
            "no `{label}` in the map"
        );
    }
    let gj: geojson::GeoJson = fleet_feature_collection(&inst, &sol.plan, &rows)
        .unwrap()
        .parse()
        .unwrap();
    let geojson::GeoJson::FeatureCollection(fc) = gj else {
        panic!("not a collection")
    };
    let prop =
        |f: &geojson::Feature, k: &str| f.properties.as_ref().and_then(|p| p.get(k)).cloned();
    let to_site = fc
        .features
        .iter()
        .filter(|f| prop(f, "action") == Some("to_dump_site".into()))
        .count();
    let from_site = fc
        .features
        .iter()
        .filter(|f| prop(f, "action") == Some("from_dump_site".into()))
        .count();
    assert!(to_site > 0 && from_site > 0);
    assert!(fc
        .features
        .iter()
        .all(|f| prop(f, "action").is_none() || prop(f, "truck_type").is_some()));
    let site = fc
        .features
        .iter()
        .find(|f| prop(f, "dump_site") == Some(true.into()))
        .unwrap();
    assert_eq!(prop(site, "name"), Some("Landfill".into()));
    let yards: Vec<_> = fc
        .features
        .iter()
        .filter(|f| prop(f, "yard") == Some(true.into()))
        .filter_map(|f| prop(f, "name"))
        .collect();
    assert_eq!(
        yards,
        vec![serde_json::json!("north"), serde_json::json!("south")]
    );
}
