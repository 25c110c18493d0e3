//! Route sheets, GeoJSON and SVG checked with outside parsers (the `geojson`
//! and `roxmltree` crates) and against the plan's own figures.

use std::path::PathBuf;

use arcwright::check::{check_plan, check_walks};
use arcwright::demo::{town, TownSpec};
use arcwright::model::{Dir, Fleet, Instance, Link, Network, ServeDirection, ServiceSpec};
use arcwright::paths::Distances;
use arcwright::plan::{evaluate, walk, Plan, Visit};
use arcwright::report::{self, geo, sheets, svg};

/// A simple feasible plan independent of the solver: tasks in link order,
/// each in its cheaper allowed direction, a new truck whenever the load or
/// the shift would be exceeded.
fn greedy(inst: &Instance, dist: &Distances) -> Plan {
    let mut routes: Vec<Vec<Visit>> = vec![Vec::new()];
    for (i, t) in inst.tasks().iter().enumerate() {
        let dirs: Vec<Dir> = [Dir::Forward, Dir::Backward]
            .into_iter()
            .filter(|&d| t.allows(d))
            .collect();
        let fits = |r: &Vec<Visit>, d: Dir| {
            let mut r = r.clone();
            r.push(Visit::new(i, d));
            let (load, cost, time) = evaluate(inst, dist, &r);
            let ok =
                load <= inst.fleet().capacity && inst.fleet().shift_limit.is_none_or(|s| time <= s);
            ok.then_some(cost)
        };
        let cur = routes.last().unwrap();
        let best = dirs
            .iter()
            .filter_map(|&d| fits(cur, d).map(|c| (c, d)))
            .min();
        match best {
            Some((_, d)) => routes.last_mut().unwrap().push(Visit::new(i, d)),
            None => {
                let d = dirs
                    .iter()
                    .copied()
                    .min_by_key(|&d| fits(&Vec::new(), d).unwrap_or(i64::MAX))
                    .unwrap();
                routes.push(vec![Visit::new(i, d)]);
            }
        }
    }
    Plan::from_visits(inst, dist, routes)
}

fn shared(rel: &str) -> Option<PathBuf> {
    let p = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../shared/instances")
        .join(rel);
    if p.exists() {
        Some(p)
    } else {
        println!("SKIPPED: {} is absent", p.display());
        None
    }
}

/// Minimal RFC 4180 reader for the test (quoted fields, doubled quotes).
fn csv_rows(text: &str) -> Vec<Vec<String>> {
    let mut rows = Vec::new();
    for line in text.lines().filter(|l| !l.starts_with('#')) {
        let mut fields = Vec::new();
        let mut cur = String::new();
        let mut quoted = false;
        let mut chars = line.chars().peekable();
        while let Some(c) = chars.next() {
            match (c, quoted) {
                ('"', true) if chars.peek() == Some(&'"') => {
                    cur.push('"');
                    chars.next();
                }
                ('"', _) => quoted = !quoted,
                (',', false) => fields.push(std::mem::take(&mut cur)),
                (c, _) => cur.push(c),
            }
        }
        fields.push(cur);
        rows.push(fields);
    }
    rows
}

fn demo() -> (Instance, Distances, Plan) {
    let inst = town(&TownSpec::demo()).unwrap();
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    (inst, dist, plan)
}

/// The test plans are themselves valid (independent checker), so the sheets
/// are made from real plans.
fn valid(inst: &Instance, dist: &Distances, plan: &Plan) {
    check_plan(inst, plan).unwrap();
    let walks: Vec<_> = plan
        .routes
        .iter()
        .map(|r| walk(inst, dist, &r.visits))
        .collect();
    check_walks(inst, &walks).unwrap();
}

#[test]
fn sheet_totals_add_up_to_the_plan() {
    let (inst, dist, plan) = demo();
    assert!(plan.routes.len() >= 2);
    let mut total = 0;
    let mut served = 0;
    for r in 0..plan.routes.len() {
        let csv = sheets::route_csv(&inst, &dist, &plan, r);
        for c in report::CAUTIONS {
            assert!(csv.contains(c));
        }
        let rows = csv_rows(&csv);
        let head = &rows[0];
        let col = |name: &str| head.iter().position(|h| h == name).unwrap();
        let (dcol, acol, lcol, ccol) = (
            col("distance"),
            col("action"),
            col("load_after"),
            col("distance_after"),
        );
        let body = &rows[1..];
        assert_eq!(body.len(), walk(&inst, &dist, &plan.routes[r].visits).len());
        let sum: i64 = body.iter().map(|x| x[dcol].parse::<i64>().unwrap()).sum();
        let last = body.last().unwrap();
        assert_eq!(last[ccol].parse::<i64>().unwrap(), sum);
        assert_eq!(sum, plan.routes[r].cost, "truck {}", r + 1);
        assert_eq!(
            last[lcol].parse::<i64>().unwrap(),
            plan.routes[r].load,
            "truck {}",
            r + 1
        );
        assert_eq!(body[0][acol], "deadhead (leave yard)");
        assert_eq!(last[acol], "deadhead (return to yard)");
        served += body.iter().filter(|x| x[acol] == "serve").count();
        total += sum;
        // Time column agrees with the route's time.
        let rows = sheets::route_rows(&inst, &dist, &plan, r);
        assert_eq!(rows.last().unwrap().time, plan.routes[r].time);
    }
    assert_eq!(total, plan.cost);
    assert_eq!(served, inst.tasks().len());
    let md = sheets::markdown(&inst, &dist, &plan);
    for r in 0..plan.routes.len() {
        assert!(md.contains(&format!("## Truck {}\n", r + 1)));
    }
    assert!(md.contains(report::CAUTIONS[0]));
    let summary = report::summary_table(&inst, &plan, &Default::default());
    assert!(summary.contains(&plan.cost.to_string()));
}

#[test]
fn geojson_parses_and_has_one_feature_per_step() {
    let (inst, dist, plan) = demo();
    let text = geo::feature_collection(&inst, &dist, &plan, None).unwrap();
    let gj: geojson::GeoJson = text.parse().expect("valid GeoJSON");
    let geojson::GeoJson::FeatureCollection(fc) = gj else {
        panic!("not a FeatureCollection")
    };
    let steps: usize = (0..plan.routes.len())
        .map(|r| walk(&inst, &dist, &plan.routes[r].visits).len())
        .sum();
    assert_eq!(fc.features.len(), steps + 1, "one per step plus the yard");
    let mut lines = 0;
    let mut serve = 0;
    for f in &fc.features {
        let g = f.geometry.as_ref().unwrap();
        match &g.value {
            geojson::Value::LineString(c) => {
                lines += 1;
                assert_eq!(c.len(), 2);
                for p in c {
                    assert!(p[0].abs() <= 180.0 && p[1].abs() <= 90.0);
                }
                let props = f.properties.as_ref().unwrap();
                for k in ["route", "step", "action", "street", "link"] {
                    assert!(props.contains_key(k), "{k}");
                }
                if props["action"] == "serve" {
                    serve += 1;
                }
            }
            geojson::Value::Point(_) => {}
            other => panic!("unexpected geometry {other:?}"),
        }
    }
    assert_eq!(lines, steps);
    assert_eq!(serve, inst.tasks().len());
}

#[test]
fn svg_is_well_formed_and_draws_every_step() {
    let (inst, dist, plan) = demo();
    let text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&text).expect("well-formed XML");
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");
    let steps: usize = (0..plan.routes.len())
        .map(|r| walk(&inst, &dist, &plan.routes[r].visits).len())
        .sum();
    let drawn = doc
        .descendants()
        .filter(|n| {
            n.tag_name().name() == "line"
                && n.parent()
                    .and_then(|p| p.attribute("id"))
                    .is_some_and(|id| id.starts_with("route-"))
        })
        .count();
    assert_eq!(drawn, steps);
    let network = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("network"))
        .unwrap();
    assert_eq!(
        network.children().filter(|n| n.is_element()).count(),
        inst.network().links.len()
    );
    assert!(doc
        .descendants()
        .any(|n| n.attribute("id") == Some("legend")));
    assert!(doc.descendants().any(|n| n.attribute("id") == Some("yard")));
}

#[test]
fn awkward_names_survive_csv_markdown_and_svg() {
    let mut net = Network::with_junctions(3);
    for (i, j) in net.junctions.iter_mut().enumerate() {
        j.x = Some(i as f64 * 100.0);
        j.y = Some((i % 2) as f64 * 80.0);
    }
    let name = r#"Smith, "Old" & <New> | Road"#;
    for (a, b) in [(0, 1), (1, 2), (2, 0)] {
        net.add_link(Link {
            from: a,
            to: b,
            oneway: false,
            cost: 100,
            time: Some(12),
            service: Some(ServiceSpec {
                demand: 3,
                cost: 100,
                time: Some(60),
                direction: ServeDirection::Either,
            }),
            name: (a == 0).then(|| name.to_string()),
            ..Link::default()
        });
    }
    let inst = Instance::new("awkward", net, Fleet::with_capacity(10), 0).unwrap();
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    let csv = sheets::route_csv(&inst, &dist, &plan, 0);
    let rows = csv_rows(&csv);
    assert!(rows.iter().any(|r| r[1] == name));
    assert!(rows.iter().any(|r| r[1] == "link 1"));
    assert!(rows[1..].iter().all(|r| r.len() == rows[0].len()));
    let svg_text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&svg_text).unwrap();
    assert!(doc
        .descendants()
        .any(|n| n.text().is_some_and(|t| t.contains(name))));
    let md = sheets::markdown(&inst, &dist, &plan);
    assert!(md.contains(r#"Smith, "Old" & <New> \| Road"#));
}

#[test]
fn research_files_without_coordinates_get_sheets_but_no_maps() {
    let Some(p) = shared("gdb/gdb1.dat") else {
        return;
    };
    let inst = arcwright::io::read_dat_file(p).unwrap().instance;
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    assert!(geo::feature_collection(&inst, &dist, &plan, None).is_none());
    assert!(svg::map(&inst, &dist, &plan).is_none());
    let total: i64 = (0..plan.routes.len())
        .map(|r| {
            sheets::route_rows(&inst, &dist, &plan, r)
                .last()
                .unwrap()
                .cumulative_distance
        })
        .sum();
    assert_eq!(total, plan.cost);
    assert!(sheets::markdown(&inst, &dist, &plan).contains("| link "));
}

#[test]
fn committed_demo_picture_is_well_formed() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/docs/demo-plan.svg");
    let text = std::fs::read_to_string(path).unwrap();
    let doc = roxmltree::Document::parse(&text).expect("well-formed XML");
    assert_eq!(doc.root_element().tag_name().name(), "svg");
    let inst = town(&TownSpec::demo()).unwrap();
    let network = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("network"))
        .unwrap();
    assert_eq!(
        network.children().filter(|n| n.is_element()).count(),
        inst.network().links.len(),
        "docs/demo-plan.svg is not a map of the demo town"
    );
}
