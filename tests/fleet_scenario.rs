//! The scenario format's dump sites, yards, truck types and balance setting:
//! reading, writing back, and typed errors in the file's own words.

use arcwright::error::ParseProblem;
use arcwright::io::{read_scenario, read_scenario_file, write_scenario};
use arcwright::model::{Balance, Hours, ModelError, OperationsError};

fn fixture(name: &str) -> String {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures");
    std::fs::read_to_string(p.join(name)).unwrap()
}

/// The fixture with `edit` applied to its JSON value.
fn edited(edit: impl FnOnce(&mut serde_json::Value)) -> String {
    let mut v: serde_json::Value = serde_json::from_str(&fixture("fleet/two_yards.json")).unwrap();
    edit(&mut v);
    serde_json::to_string_pretty(&v).unwrap()
}

fn problem(text: &str) -> (String, Option<String>, ParseProblem) {
    let e = read_scenario(text, "bad.json").unwrap_err();
    let p = e.problem().unwrap().clone();
    (
        e.to_string(),
        p.path().map(str::to_string),
        p.innermost().clone(),
    )
}

#[test]
fn todays_files_read_with_every_feature_off() {
    let inst = read_scenario_file(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/tiny.json"),
    )
    .unwrap();
    assert!(inst.operations().is_plain(&inst));
    assert_eq!(inst.operations(), &Default::default());
    // Written back without any of the new fields.
    let text = write_scenario(&inst);
    for key in [
        "yards",
        "dump_sites",
        "truck_types",
        "balance",
        "return_empty",
    ] {
        assert!(!text.contains(key), "{key} written for a plain scenario");
    }
}

#[test]
fn reads_yards_dump_sites_truck_types_and_balance() {
    let inst = read_scenario(&fixture("fleet/two_yards.json"), "two_yards.json").unwrap();
    let ops = inst.operations();
    assert!(!ops.is_plain(&inst));
    assert_eq!(ops.yards.len(), 2);
    assert_eq!(inst.network().junctions[ops.yards[1].junction].id, 6);
    assert_eq!(inst.depot(), ops.yards[0].junction);
    let site = &ops.dump_sites[0];
    assert_eq!(inst.network().junctions[site.junction].id, 5);
    assert_eq!((site.unload_time, site.unload_cost), (20, 7));
    assert_eq!(
        site.hours,
        Some(Hours {
            opens: 10,
            closes: 400
        })
    );
    assert!(ops.return_empty);
    let (small, large) = (&ops.truck_types[0], &ops.truck_types[1]);
    assert_eq!(
        (small.count, small.capacity, small.shift_limit, small.yard),
        (Some(2), 5, Some(300), 0)
    );
    assert_eq!((small.fixed_cost, small.cost_per_mille), (50, 800));
    assert_eq!(small.no_entry, vec![5]);
    assert_eq!(
        (large.count, large.yard, large.cost_per_mille),
        (None, 1, 1250)
    );
    assert_eq!(large.no_service, vec![0]);
    assert_eq!(ops.balance, Balance::LongestShift { weight: 2 });
    // The plain model's view: the largest load limit, unlimited trucks.
    assert_eq!(inst.fleet().capacity, 9);
    assert_eq!(inst.fleet().max_vehicles, None);
    // Round trip.
    let again = read_scenario(&write_scenario(&inst), "again.json").unwrap();
    assert_eq!(again, inst);
}

#[test]
fn a_dump_site_no_street_can_reach_is_named() {
    // A junction 7 with a one-way street leaving it: nothing reaches it.
    let text = edited(|v| {
        v["junctions"]
            .as_array_mut()
            .unwrap()
            .push(serde_json::json!({ "id": 7 }));
        v["streets"]
            .as_array_mut()
            .unwrap()
            .push(serde_json::json!({ "from": 7, "to": 1, "one_way": true, "cost": 1 }));
        v["dump_sites"]
            .as_array_mut()
            .unwrap()
            .push(serde_json::json!({ "junction": 7, "unload_time": 5 }));
    });
    let (msg, path, p) = problem(&text);
    assert_eq!(path.as_deref(), Some("dump_sites[1]"));
    assert_eq!(
        p,
        ParseProblem::Model(ModelError::Operations(
            OperationsError::DumpSiteUnreachable { site: 1, street: 0 }
        ))
    );
    assert!(
        msg.contains("dump site 1") && msg.contains("street 0"),
        "{msg}"
    );
}

#[test]
fn a_truck_type_no_street_admits_is_named() {
    let text = edited(|v| v["truck_types"][0]["no_service"] = serde_json::json!([0, 1, 2]));
    let (msg, path, p) = problem(&text);
    assert_eq!(path.as_deref(), Some("truck_types[0]"));
    assert!(matches!(
        p,
        ParseProblem::Model(ModelError::Operations(OperationsError::TypeServesNothing { ref truck })) if truck == "small"
    ));
    assert!(msg.contains("truck type `small`"), "{msg}");
}

#[test]
fn a_yard_with_no_trucks_is_named() {
    let text = edited(|v| v["truck_types"][1]["yard"] = serde_json::json!("north"));
    let (msg, path, _) = problem(&text);
    assert_eq!(path.as_deref(), Some("yards[1]"));
    assert!(msg.contains("yard `south` has no trucks"), "{msg}");
}

#[test]
fn a_street_no_truck_type_can_serve_is_named() {
    // Quarry Row (street 0): the large type may not serve it, the small one
    // may not drive on it.
    let text = edited(|v| v["truck_types"][0]["no_entry"] = serde_json::json!([0]));
    let (msg, path, _) = problem(&text);
    assert_eq!(path.as_deref(), Some("streets[0]"));
    assert!(
        msg.contains("street 0: no truck type can serve it"),
        "{msg}"
    );
}

type Edit = dyn Fn(&mut serde_json::Value);

#[test]
fn other_mistakes_point_at_their_field() {
    let cases: Vec<(Box<Edit>, &str)> = vec![
        (
            Box::new(|v| v["truck_types"][0]["yard"] = serde_json::json!("east")),
            "truck_types[0].yard",
        ),
        (Box::new(|v| v["yard"] = serde_json::json!(1)), "yard"),
        (
            Box::new(|v| v["fleet"] = serde_json::json!({ "capacity": 3 })),
            "fleet",
        ),
        (
            Box::new(|v| v["dump_sites"][0]["unload_time"] = serde_json::json!(-1)),
            "dump_sites[0].unload_time",
        ),
        (
            Box::new(|v| v["dump_sites"][0]["closes"] = serde_json::json!(5)),
            "dump_sites[0].closes",
        ),
        (
            Box::new(|v| v["truck_types"][1]["cost_per_mille"] = serde_json::json!(-5)),
            "truck_types[1].cost_per_mille",
        ),
        (
            Box::new(|v| v["truck_types"][1]["capacity"] = serde_json::json!(0)),
            "truck_types[1].capacity",
        ),
        (
            Box::new(|v| v["truck_types"][1]["no_service"] = serde_json::json!([99])),
            "truck_types[1].no_service",
        ),
        (
            Box::new(|v| v["truck_types"][1]["name"] = serde_json::json!("small")),
            "truck_types[0]",
        ),
    ];
    for (edit, want) in cases {
        let (msg, path, _) = problem(&edited(edit));
        assert_eq!(path.as_deref(), Some(want), "{msg}");
        assert!(msg.starts_with("bad.json:"), "{msg}");
    }
}
