//! Route sheets, GeoJSON and SVG checked with outside parsers (the `geojson`
//! and `roxmltree` crates) and against the plan's own figures.

mod common;

use arcwright::check::{check_plan, check_walks};
use arcwright::demo::{town, TownSpec};
use arcwright::model::{
    Coordinates, Dir, Fleet, Instance, Link, Network, ServeDirection, ServiceSpec,
};
use arcwright::paths::Distances;
use arcwright::plan::{totals, walk, Plan, Totals, Visit};
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
            let Totals { load, cost, time } = totals(inst, dist, &r);
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

/// Reads CSV with the `csv` crate (RFC 4180), header row included.
fn csv_rows(text: &str) -> Vec<Vec<String>> {
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .from_reader(text.as_bytes());
    r.records()
        .map(|x| x.unwrap().iter().map(String::from).collect())
        .collect()
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
        // Plain CSV: the header on line 1, no comment lines; the cautions
        // live in the summary and the Markdown sheets.
        assert!(csv.starts_with("step,street,link,"), "{csv}");
        assert!(!csv.contains(report::CAUTIONS[0]));
        let rows = csv_rows(&csv);
        assert!(rows.iter().all(|x| x.len() == rows[0].len()));
        let head = &rows[0];
        let col = |name: &str| head.iter().position(|h| h == name).unwrap();
        // The demo town declares its units: every column says it.
        let (dcol, acol, lcol, ccol) = (
            col("cost (m)"),
            col("action"),
            col("load_after (bins)"),
            col("cost_so_far (m)"),
        );
        let tcol = col("time_so_far (s)");
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
        assert_eq!(last[tcol].parse::<i64>().unwrap(), plan.routes[r].time);
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
    assert!(summary.contains(report::CAUTIONS[0]));
}

#[test]
fn geojson_parses_and_has_one_feature_per_step() {
    let (inst, dist, plan) = demo();
    // The invented town has planar metres without an origin: no GeoJSON.
    assert!(geo::feature_collection(&inst, &dist, &plan).is_none());
    let inst = inst
        .with_coordinates(Coordinates::Planar {
            origin: Some((10.0, 54.0)),
        })
        .unwrap();
    let text = geo::feature_collection(&inst, &dist, &plan).unwrap();
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
            matches!(n.tag_name().name(), "line" | "polyline")
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
    assert!(rows.iter().any(|r| r[1] == "street 2–3 (#1)"), "{rows:?}");
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
    let Some(p) = common::shared_file(
        "reports::research_files_without_coordinates_get_sheets_but_no_maps",
        "gdb/gdb1.dat",
    ) else {
        return;
    };
    let inst = arcwright::io::read_dat_file(p).unwrap().instance;
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    assert!(geo::feature_collection(&inst, &dist, &plan).is_none());
    assert!(svg::map(&inst, &dist, &plan).is_none());
    let summary = report::summary_table(&inst, &plan, &Default::default());
    assert!(
        summary.contains("gives no junction coordinates"),
        "{summary}"
    );
    let total: i64 = (0..plan.routes.len())
        .map(|r| {
            sheets::route_rows(&inst, &dist, &plan, r)
                .last()
                .unwrap()
                .cost_so_far
        })
        .sum();
    assert_eq!(total, plan.cost);
    let md = sheets::markdown(&inst, &dist, &plan);
    assert!(
        md.contains("| street "),
        "unnamed streets are named by their junctions"
    );
    // Research files have no times of their own and declare no units: no
    // time column repeating the cost, and the units are said to be unknown.
    let header = md.lines().find(|l| l.starts_with("| step")).unwrap();
    assert!(!header.contains("time"), "{header}");
    assert!(!md.contains("time 0") && !md.contains(", time "), "{md}");
    assert!(md.contains("cost (cost units)"));
    let csv = sheets::route_csv(&inst, &dist, &plan, 0);
    assert!(!csv.lines().next().unwrap().contains("time"));
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

fn scenario(text: &str) -> Instance {
    arcwright::io::read_scenario(text, "test.json").unwrap_or_else(|e| panic!("{e}"))
}

/// The README's example: a street of cost 25 served at cost 30, times in
/// minutes and a shift limit of 480; `units` and `lengths` as given.
fn mill_lane(units: &str, length: &str) -> Instance {
    scenario(&format!(
        r#"{{
  "format": "arcwright-scenario", "version": 1, "name": "Mill Lane"{units},
  "junctions": [ {{ "id": 1, "x": 0.0, "y": 0.0 }}, {{ "id": 2, "x": 250.0, "y": 0.0 }},
                 {{ "id": 3, "x": 250.0, "y": 180.0 }} ],
  "streets": [
    {{ "from": 1, "to": 2, "cost": 25{length}, "name": "Mill Lane",
       "service": {{ "demand": 40, "cost": 30, "time": 6 }} }},
    {{ "from": 2, "to": 3, "cost": 18{length}, "service": {{ "demand": 25, "cost": 20 }} }},
    {{ "from": 3, "to": 1, "cost": 31{length}, "drive_time": 4 }}
  ],
  "yard": 1, "fleet": {{ "capacity": 100, "shift_limit": 480, "max_trucks": 2 }}
}}"#
    ))
}

/// Friction 2.2: units are declared, never guessed: a shift limit of 480
/// minutes is not shown as 0:08:00, and undeclared units are said to be so.
#[test]
fn every_output_labels_the_declared_units() {
    let units = r#", "units": { "cost": "EUR", "time": "min", "load": "bins" }"#;
    let inst = mill_lane(units, "");
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    let summary = report::summary_table(&inst, &plan, &Default::default());
    assert!(
        summary.contains("shift limit 480 min (8:00 h)"),
        "{summary}"
    );
    assert!(summary.contains("capacity 100 bins"), "{summary}");
    assert!(summary.contains("costs in EUR"), "{summary}");
    assert!(!summary.contains("0:08:00"), "{summary}");
    let csv = sheets::route_csv(&inst, &dist, &plan, 0);
    let head = csv.lines().next().unwrap();
    for col in [
        "cost (EUR)",
        "time (min)",
        "load_after (bins)",
        "cost_so_far (EUR)",
    ] {
        assert!(head.contains(col), "{head}");
    }
    let md = sheets::markdown(&inst, &dist, &plan);
    assert!(
        md.contains("| cost (EUR) |") && md.contains("load (bins)"),
        "{md}"
    );
    // The same scenario without units: nothing assumed, no clock reading.
    let bare = mill_lane("", "");
    let plan = greedy(&bare, &dist);
    let summary = report::summary_table(&bare, &plan, &Default::default());
    assert!(summary.contains("shift limit 480 time units,"), "{summary}");
    assert!(summary.contains("declares no units"), "{summary}");
    assert!(!summary.contains(":0"), "{summary}");
    let head = sheets::route_csv(&bare, &dist, &plan, 0);
    assert!(
        head.starts_with("step,street,link,from_junction,to_junction,action,cost (cost units),")
    );
}

/// Friction 2.3: length, cost and time are shown as what they are: Mill
/// Lane is 250 m long, costs 25 to drive and 30 to serve, takes 6 minutes.
#[test]
fn sheets_show_length_cost_and_time_apart() {
    let units = r#", "units": { "cost": "EUR", "length": "m", "time": "min" }"#;
    let inst = mill_lane(units, r#", "length": 250"#);
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    valid(&inst, &dist, &plan);
    let rows = csv_rows(&sheets::route_csv(&inst, &dist, &plan, 0));
    let head = &rows[0];
    let col = |n: &str| {
        head.iter()
            .position(|h| h == n)
            .unwrap_or_else(|| panic!("{n}: {head:?}"))
    };
    let (c, l, t, a) = (
        col("cost (EUR)"),
        col("length (m)"),
        col("time (min)"),
        col("action"),
    );
    let mill = rows[1..]
        .iter()
        .find(|r| r[1] == "Mill Lane" && r[a] == "serve")
        .unwrap();
    assert_eq!(
        (mill[c].as_str(), mill[l].as_str(), mill[t].as_str()),
        ("30", "250", "6")
    );
    let summary = report::summary_table(&inst, &plan, &Default::default());
    assert!(summary.contains("lengths in m"), "{summary}");
}

/// CIELAB (D65) of an sRGB colour `#rrggbb`, by the formulas of IEC 61966-2-1
/// (sRGB) and CIE 15 (L*a*b*), written out here.
fn lab(hex: &str) -> [f64; 3] {
    let c = |i: usize| {
        let v = u8::from_str_radix(&hex[1 + 2 * i..3 + 2 * i], 16).unwrap() as f64 / 255.0;
        if v <= 0.04045 {
            v / 12.92
        } else {
            ((v + 0.055) / 1.055).powf(2.4)
        }
    };
    let (r, g, b) = (c(0), c(1), c(2));
    let x = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047;
    let y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
    let z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
    let f = |t: f64| {
        if t > 216.0 / 24389.0 {
            t.cbrt()
        } else {
            t * 24389.0 / 27.0 / 116.0 + 16.0 / 116.0
        }
    };
    [
        116.0 * f(y) - 16.0,
        500.0 * (f(x) - f(y)),
        200.0 * (f(y) - f(z)),
    ]
}

fn delta_e(a: [f64; 3], b: [f64; 3]) -> f64 {
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
}

/// Friction 2.8: 30 trucks stay distinguishable: every two route colours
/// differ by CIE 1976 ΔE ≥ 20 (about four times a just-noticeable difference
/// of ~2.3 at this scale; common practice for categorical palettes asks well
/// above 10), and each is apart from the grey network and the white page.
#[test]
fn thirty_route_colours_stay_apart() {
    let p = svg::PALETTE;
    assert_eq!(p.len(), 30);
    for i in 0..p.len() {
        for j in i + 1..p.len() {
            let d = delta_e(lab(p[i]), lab(p[j]));
            assert!(d >= 20.0, "{} and {}: ΔE {d:.1}", p[i], p[j]);
        }
        assert!(delta_e(lab(p[i]), lab("#d4d4d4")) >= 25.0, "{}", p[i]);
        assert!(delta_e(lab(p[i]), lab("#ffffff")) >= 30.0, "{}", p[i]);
    }
    // A plan of 30 trucks draws them in 30 different colours.
    let (inst, dist, _) = demo();
    let routes: Vec<Vec<Visit>> = (0..30).map(|t| vec![Visit::new(t, Dir::Forward)]).collect();
    let plan = Plan::from_visits(&inst, &dist, routes);
    let text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&text).unwrap();
    let mut colours: Vec<&str> = doc
        .descendants()
        .filter(|n| n.attribute("id").is_some_and(|id| id.ends_with("-serve")))
        .map(|n| n.attribute("stroke").unwrap())
        .collect();
    colours.sort_unstable();
    colours.dedup();
    assert_eq!(colours.len(), 30);
}

/// Two end points in pixels.
type Segment = ((f64, f64), (f64, f64));

/// Pixel end points of an SVG `line` or `polyline`.
fn ends_of(n: roxmltree::Node) -> Segment {
    let f = |a: &str| n.attribute(a).unwrap().parse::<f64>().unwrap();
    if n.tag_name().name() == "line" {
        return ((f("x1"), f("y1")), (f("x2"), f("y2")));
    }
    let pts: Vec<(f64, f64)> = n
        .attribute("points")
        .unwrap()
        .split(' ')
        .map(|p| {
            let (x, y) = p.split_once(',').unwrap();
            (x.parse().unwrap(), y.parse().unwrap())
        })
        .collect();
    (pts[0], *pts.last().unwrap())
}

fn title(n: roxmltree::Node) -> String {
    n.children()
        .find(|c| c.tag_name().name() == "title")
        .and_then(|t| t.text())
        .unwrap_or_default()
        .to_string()
}

fn dist2(a: (f64, f64), b: (f64, f64)) -> f64 {
    ((a.0 - b.0).powi(2) + (a.1 - b.1).powi(2)).sqrt()
}

/// Friction 2.8: the map shows the direction of service, marks one-way
/// streets, keeps every truck's deadhead legs visible on shared streets,
/// labels turning points with the sheets' junction numbers, keeps the yard
/// label inside the picture and the scale bar off the network.
#[test]
fn the_map_shows_direction_one_way_streets_and_shared_deadheads() {
    let (inst, dist, plan) = demo();
    let text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&text).unwrap();
    let by_id = |id: &str| {
        doc.descendants()
            .find(|n| n.attribute("id") == Some(id))
            .unwrap()
    };
    // Junction positions, from the network's street tooltips "… (junctions a–b)".
    let mut at: std::collections::HashMap<u64, (f64, f64)> = Default::default();
    let network = by_id("network");
    for n in network.children().filter(|n| n.is_element()) {
        let t = title(n);
        let ids = t
            .rsplit_once("(junctions ")
            .unwrap()
            .1
            .trim_end_matches(')');
        let (a, b) = ids.split_once('–').unwrap();
        let (pa, pb) = ends_of(n);
        at.insert(a.parse().unwrap(), pa);
        at.insert(b.parse().unwrap(), pb);
    }
    // One-way streets are marked, with a chevron.
    let one_way: Vec<_> = network
        .children()
        .filter(|n| n.attribute("class") == Some("one-way"))
        .collect();
    let n_one_way = inst.network().links.iter().filter(|l| l.oneway).count();
    assert!(n_one_way > 0);
    assert_eq!(one_way.len(), n_one_way);
    assert!(one_way
        .iter()
        .all(|n| n.attribute("marker-mid") == Some("url(#one-way)")));
    // Every served step has an arrow and runs from its `from` junction.
    let mut deadheads: Vec<(usize, String, Segment)> = Vec::new();
    for r in 0..plan.routes.len() {
        let serve = by_id(&format!("route-{}-serve", r + 1));
        for n in serve.children().filter(|n| n.is_element()) {
            assert_eq!(
                n.attribute("marker-mid"),
                Some(format!("url(#arrow-{})", r + 1).as_str())
            );
            let t = title(n);
            let (from, to) = t.rsplit_once('(').unwrap().1.split_once(" → ").unwrap();
            let to = to.split_once(',').unwrap().0;
            let (a, b) = ends_of(n);
            let (ja, jb) = (at[&from.parse().unwrap()], at[&to.parse().unwrap()]);
            assert!(dist2(a, ja) < 4.0 && dist2(b, jb) < 4.0, "{t}");
        }
        let dead = by_id(&format!("route-{}-deadhead", r + 1));
        for n in dead.children().filter(|n| n.is_element()) {
            let t = title(n);
            let key = t.split_once(": ").unwrap().1.to_string();
            deadheads.push((r, key, ends_of(n)));
        }
    }
    assert!(doc
        .descendants()
        .any(|n| n.attribute("id") == Some("arrow-1")));
    // Deadhead legs of different trucks on the same street in the same
    // direction are drawn apart (lanes), never on top of each other.
    let mut shared = 0;
    for (i, a) in deadheads.iter().enumerate() {
        for b in &deadheads[i + 1..] {
            if a.0 != b.0 && a.1 == b.1 {
                shared += 1;
                assert!(
                    dist2(a.2 .0, b.2 .0) > 1.5,
                    "{} hidden under another truck",
                    a.1
                );
            }
        }
    }
    assert!(
        shared > 0,
        "the demo plan has trucks sharing a street empty"
    );
    // Junction labels are junction numbers of the sheets.
    let rows = sheets::all_rows(&inst, &dist, &plan);
    let ids: std::collections::HashSet<String> = rows
        .iter()
        .flatten()
        .flat_map(|r| [r.from.to_string(), r.to.to_string()])
        .collect();
    let labels: Vec<String> = by_id("junction-labels")
        .children()
        .filter(|n| n.is_element())
        .filter_map(|n| n.text().map(String::from))
        .collect();
    assert!(labels.len() >= plan.routes.len());
    assert!(labels.iter().all(|l| ids.contains(l)), "{labels:?}");
    // The scale bar sits below every street.
    let lowest = at.values().map(|p| p.1).fold(f64::MIN, f64::max);
    let bar = by_id("scale")
        .children()
        .find(|n| n.tag_name().name() == "line")
        .unwrap();
    assert!(ends_of(bar).0 .1 > lowest + 5.0);
}

/// Friction 2.8: the yard's label stays inside the picture, also when the
/// yard is the easternmost junction.
#[test]
fn the_yard_label_stays_inside_the_picture() {
    let mut net = Network::with_junctions(3);
    for (j, (x, y)) in net
        .junctions
        .iter_mut()
        .zip([(0.0, 0.0), (500.0, 0.0), (1000.0, 0.0)])
    {
        j.x = Some(x);
        j.y = Some(y);
    }
    net.add_required_edge(0, 1, 500, 1);
    net.add_required_edge(1, 2, 500, 1);
    let inst = Instance::new("east yard", net, Fleet::with_capacity(5), 2)
        .unwrap()
        .with_coordinates(Coordinates::Planar { origin: None })
        .unwrap();
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    let text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&text).unwrap();
    let legend_left = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("legend"))
        .and_then(|g| g.children().find(|n| n.tag_name().name() == "rect"))
        .and_then(|r| r.attribute("x"))
        .unwrap()
        .parse::<f64>()
        .unwrap();
    let label = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("yard"))
        .and_then(|g| g.children().find(|n| n.tag_name().name() == "text"))
        .unwrap();
    let x: f64 = label.attribute("x").unwrap().parse().unwrap();
    let w = 7.5 * label.text().unwrap().len() as f64;
    let (left, right) = match label.attribute("text-anchor") {
        Some("end") => (x - w, x),
        _ => (x, x + w),
    };
    assert!(
        left >= 0.0 && right <= legend_left,
        "label spans {left:.0}..{right:.0}"
    );
}

/// Friction 2.7: longitude/latitude at 54° N is projected, not stretched: a
/// square of 1 km × 1 km on the ground is drawn square (it was 1.7 times
/// too wide, 1 / cos 54°).
#[test]
fn lon_lat_is_projected_with_the_latitude() {
    let dlat = 1000.0 / 111_195.0;
    let dlon = dlat / 54f64.to_radians().cos();
    let inst = scenario(&format!(
        r#"{{ "format": "arcwright-scenario", "version": 1, "name": "square",
  "coordinates": {{ "system": "wgs84" }},
  "junctions": [ {{ "id": 1, "x": 10.0, "y": 54.0 }}, {{ "id": 2, "x": {e}, "y": 54.0 }},
                 {{ "id": 3, "x": {e}, "y": {n} }}, {{ "id": 4, "x": 10.0, "y": {n} }} ],
  "streets": [ {{ "from": 1, "to": 2, "cost": 1000, "service": {{ "demand": 1, "cost": 1000 }} }},
               {{ "from": 2, "to": 3, "cost": 1000 }}, {{ "from": 3, "to": 4, "cost": 1000 }},
               {{ "from": 4, "to": 1, "cost": 1000 }} ],
  "yard": 1, "fleet": {{ "capacity": 5 }} }}"#,
        e = 10.0 + dlon,
        n = 54.0 + dlat
    ));
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    let text = svg::map(&inst, &dist, &plan).unwrap();
    let doc = roxmltree::Document::parse(&text).unwrap();
    let network = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("network"))
        .unwrap();
    let pts: Vec<(f64, f64)> = network
        .children()
        .filter(|n| n.is_element())
        .flat_map(|n| {
            let (a, b) = ends_of(n);
            [a, b]
        })
        .collect();
    let span = |f: fn(&(f64, f64)) -> f64| {
        pts.iter().map(f).fold(f64::MIN, f64::max) - pts.iter().map(f).fold(f64::MAX, f64::min)
    };
    let (w, h) = (span(|p| p.0), span(|p| p.1));
    assert!((w / h - 1.0).abs() < 0.01, "{w:.1} x {h:.1} px");
    // And it has a scale bar: a kilometre is about the square's side.
    assert!(doc
        .descendants()
        .any(|n| n.attribute("id") == Some("scale")));
    // GeoJSON keeps WGS 84 as written.
    let g = geo::feature_collection(&inst, &dist, &plan).unwrap();
    assert!(g.contains("54.0"));
}

/// Haversine distance in metres on a sphere of radius 6,371 km (the
/// textbook great-circle formula, written out here).
fn haversine(a: [f64; 2], b: [f64; 2]) -> f64 {
    let (la1, la2) = (a[1].to_radians(), b[1].to_radians());
    let (dla, dlo) = (la2 - la1, (b[0] - a[0]).to_radians());
    let h = (dla / 2.0).sin().powi(2) + la1.cos() * la2.cos() * (dlo / 2.0).sin().powi(2);
    2.0 * 6_371_000.0 * h.sqrt().asin()
}

/// Friction 2.7: planar metres with an origin are placed on the Earth in
/// WGS 84 (distances kept within 0.5% of the great-circle distance); the
/// yard at (0, 0) lands on the origin.
#[test]
fn planar_metres_with_an_origin_are_placed_in_wgs84() {
    let units =
        r#", "coordinates": { "system": "planar", "origin": { "lon": 24.94, "lat": 60.17 } }"#;
    let inst = mill_lane(units, "");
    let dist = Distances::new(&inst).unwrap();
    let plan = greedy(&inst, &dist);
    let g: geojson::GeoJson = geo::feature_collection(&inst, &dist, &plan)
        .unwrap()
        .parse()
        .unwrap();
    let geojson::GeoJson::FeatureCollection(fc) = g else {
        panic!()
    };
    let mut yard = None;
    let mut legs = Vec::new();
    for f in &fc.features {
        match &f.geometry.as_ref().unwrap().value {
            geojson::Value::Point(p) => yard = Some([p[0], p[1]]),
            geojson::Value::LineString(l) => legs.push(l.clone()),
            _ => {}
        }
    }
    assert_eq!(yard.unwrap(), [24.94, 60.17]);
    // Mill Lane (250 m east) and the street from junction 2 to 3 (180 m north).
    for l in legs {
        let d = haversine([l[0][0], l[0][1]], [l[1][0], l[1][1]]);
        let planar = [250.0, 180.0, (250f64.powi(2) + 180f64.powi(2)).sqrt()];
        assert!(planar.iter().any(|p| (d - p).abs() / p < 0.005), "{d:.1} m");
    }
    // Without an origin there is no GeoJSON, and the summary says why.
    let bare = mill_lane(r#", "coordinates": { "system": "planar" }"#, "");
    assert!(geo::feature_collection(&bare, &dist, &plan).is_none());
    let summary = report::summary_table(&bare, &plan, &Default::default());
    assert!(summary.contains("cannot be"), "{summary}");
}
