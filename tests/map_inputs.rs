//! Map readers: the OSM XML reader against the outside reference
//! (`scripts/osm_reference.py`: pyosmium 4.3.2, networkx 3.6.1, geographiclib
//! 2.1; fixture `tests/fixtures/osm/helsinki_cut.osm`, © OpenStreetMap
//! contributors, ODbL 1.0), the documented one-way and access rules on a
//! small invented town, and typed errors for bad input.

use std::path::PathBuf;

use arcwright::io::{read_scenario, write_scenario};
use arcwright::map::{
    build_scenario, load_map, parse_geojson, parse_osm_xml, Element, MapError, MapOptions, Profile,
    YardChoice,
};
use serde_json::Value;

fn temp(name: &str, bytes: &[u8]) -> PathBuf {
    let p = std::env::temp_dir().join(format!("arcwright-map-{}-{name}", std::process::id()));
    std::fs::write(&p, bytes).unwrap();
    p
}

#[test]
fn osm_xml_cut_matches_the_reference() {
    let r: Value = serde_json::from_str(
        &std::fs::read_to_string("tests/fixtures/osm/helsinki_reference.json").unwrap(),
    )
    .unwrap();
    let r = &r["cut"];
    let b = load_map(
        "tests/fixtures/osm/helsinki_cut.osm",
        &MapOptions::default(),
    )
    .unwrap();
    let rep = &b.report;
    assert_eq!(rep.junctions as u64, r["junctions"].as_u64().unwrap());
    assert_eq!(rep.streets as u64, r["streets"].as_u64().unwrap());
    assert_eq!(
        rep.one_way_streets as u64,
        r["one_way_streets"].as_u64().unwrap()
    );
    assert_eq!(rep.restrictions as u64, r["restrictions"].as_u64().unwrap());
    assert_eq!(
        rep.dropped.pieces as u64,
        r["dropped_segments"].as_u64().unwrap()
    );
    let want = r["length_m"].as_f64().unwrap();
    assert!((rep.length_m - want).abs() <= want * 1e-3);
}

#[test]
fn built_scenario_round_trips_through_json() {
    let b = load_map(
        "tests/fixtures/osm/helsinki_cut.osm",
        &MapOptions::default(),
    )
    .unwrap();
    let net = b.instance.network();
    assert!(!net.turn_restrictions.is_empty());
    assert!(net
        .links
        .iter()
        .all(|l| l.geometry.len() >= 2 && l.class.is_some()));
    let text = write_scenario(&b.instance);
    let again = read_scenario(&text, "again.json").unwrap();
    assert_eq!(again, b.instance);
}

/// Nodes 1..=4 on a square (about 110 m a side), numbered anticlockwise.
fn town(extra_ways: &str) -> String {
    let nodes = [
        (1, 24.0, 60.0),
        (2, 24.002, 60.0),
        (3, 24.002, 60.001),
        (4, 24.0, 60.001),
    ];
    let mut s = String::from("<?xml version='1.0' encoding='UTF-8'?>\n<osm version=\"0.6\">\n");
    for (id, lon, lat) in nodes {
        s += &format!("  <node id=\"{id}\" lat=\"{lat}\" lon=\"{lon}\"/>\n");
    }
    // The square: four two-way residential streets with their own names.
    for (id, a, b) in [(101, 1, 2), (102, 2, 3), (103, 3, 4), (104, 4, 1)] {
        s += &format!(
            "  <way id=\"{id}\"><nd ref=\"{a}\"/><nd ref=\"{b}\"/><tag k=\"highway\" v=\"residential\"/><tag k=\"name\" v=\"Side {id}\"/></way>\n"
        );
    }
    s += extra_ways;
    s += "</osm>\n";
    s
}

fn way(id: u32, a: u32, b: u32, tags: &[(&str, &str)]) -> String {
    let mut s = format!("  <way id=\"{id}\"><nd ref=\"{a}\"/><nd ref=\"{b}\"/>");
    s += &format!("<tag k=\"name\" v=\"Way {id}\"/>");
    for (k, v) in tags {
        s += &format!("<tag k=\"{k}\" v=\"{v}\"/>");
    }
    s + "</way>\n"
}

#[test]
fn one_way_and_access_rules_follow_osm_tagging() {
    let hw = ("highway", "residential");
    let extra = [
        way(201, 1, 3, &[hw, ("oneway", "yes")]),
        way(202, 1, 3, &[hw, ("oneway", "-1")]),
        way(203, 2, 4, &[hw, ("junction", "roundabout")]),
        way(
            204,
            2,
            4,
            &[hw, ("junction", "roundabout"), ("oneway", "no")],
        ),
        way(205, 2, 4, &[("highway", "motorway")]),
        way(206, 1, 3, &[hw, ("oneway", "reversible")]),
        way(207, 1, 3, &[hw, ("access", "private")]),
        way(
            208,
            1,
            3,
            &[("highway", "service"), ("service", "parking_aisle")],
        ),
        way(209, 1, 3, &[hw, ("area", "yes")]),
        way(210, 1, 3, &[("highway", "construction")]),
        way(211, 1, 3, &[("highway", "footway")]),
        way(212, 1, 3, &[hw, ("hgv", "no")]),
        way(213, 2, 4, &[hw, ("oneway", "true")]),
    ]
    .concat();
    let map = parse_osm_xml(&town(&extra), "town.osm").unwrap();
    let b = build_scenario(&map, &MapOptions::default()).unwrap();
    let g = &b.graph;
    let node = |i: usize| g.junctions[i].node;
    let find = |name: &str| {
        g.streets
            .iter()
            .find(|s| s.name.as_deref() == Some(name))
            .map(|s| (node(s.from), node(s.to), s.one_way))
    };
    assert_eq!(find("Side 101"), Some((1, 2, false)));
    assert_eq!(find("Way 201"), Some((1, 3, true)));
    assert_eq!(
        find("Way 202"),
        Some((3, 1, true)),
        "oneway=-1 runs against the drawing"
    );
    assert_eq!(
        find("Way 203"),
        Some((2, 4, true)),
        "roundabouts are one-way"
    );
    assert_eq!(find("Way 204"), Some((2, 4, false)), "oneway=no wins");
    assert_eq!(find("Way 205"), Some((2, 4, true)), "motorways are one-way");
    assert_eq!(find("Way 213"), Some((2, 4, true)));
    for closed in [
        "Way 206", "Way 207", "Way 208", "Way 209", "Way 210", "Way 211", "Way 212",
    ] {
        assert_eq!(find(closed), None, "{closed} must not be driven");
    }
    assert_eq!(b.report.ways_closed, 5);
    assert_eq!(b.report.ways_other_class, 2);
    // Served streets: residential both sides in one pass (either direction on
    // a two-way street); the motorway is only driven.
    let inst = &b.instance;
    let serving = |name: &str| {
        inst.tasks()
            .iter()
            .filter(|t| inst.network().links[t.link].name.as_deref() == Some(name))
            .map(|t| t.either)
            .collect::<Vec<_>>()
    };
    assert_eq!(serving("Side 101"), vec![true]);
    assert_eq!(serving("Way 201"), vec![false]);
    assert!(serving("Way 205").is_empty());
}

#[test]
fn chains_of_pieces_become_one_street_with_its_polyline() {
    // A two-way street 1-5-6-2 drawn as two ways meeting at 6, with a bend at
    // 5: one street of four points. A branch at 2 keeps 2 a junction.
    let extra = "  <node id=\"5\" lat=\"59.9995\" lon=\"24.0005\"/>\n  <node id=\"6\" lat=\"59.9995\" lon=\"24.0015\"/>\n".to_string()
        + "  <way id=\"301\"><nd ref=\"1\"/><nd ref=\"5\"/><nd ref=\"6\"/><tag k=\"highway\" v=\"residential\"/><tag k=\"name\" v=\"Loop Lane\"/></way>\n"
        + "  <way id=\"302\"><nd ref=\"6\"/><nd ref=\"2\"/><tag k=\"highway\" v=\"residential\"/><tag k=\"name\" v=\"Loop Lane\"/></way>\n";
    let map = parse_osm_xml(&town(&extra), "town.osm").unwrap();
    let b = build_scenario(&map, &MapOptions::default()).unwrap();
    let loop_lane: Vec<_> = b
        .graph
        .streets
        .iter()
        .filter(|s| s.name.as_deref() == Some("Loop Lane"))
        .collect();
    assert_eq!(loop_lane.len(), 1);
    assert_eq!(loop_lane[0].geometry.len(), 4);
    assert_eq!(b.report.junctions, 4);
}

#[test]
fn each_side_streets_are_two_forward_passes() {
    let extra = way(401, 1, 3, &[("highway", "primary")])
        + &way(402, 2, 4, &[("highway", "primary"), ("oneway", "yes")]);
    let map = parse_osm_xml(&town(&extra), "town.osm").unwrap();
    let b = build_scenario(&map, &MapOptions::default()).unwrap();
    let inst = &b.instance;
    let ends = |name: &str| {
        let mut v: Vec<(u64, u64, bool)> = inst
            .tasks()
            .iter()
            .filter(|t| inst.network().links[t.link].name.as_deref() == Some(name))
            .map(|t| {
                let j = &inst.network().junctions;
                (j[t.tail].id, j[t.head].id, t.either)
            })
            .collect();
        v.sort();
        v
    };
    assert_eq!(ends("Way 401"), vec![(1, 3, false), (3, 1, false)]);
    assert_eq!(ends("Way 402"), vec![(2, 4, false), (2, 4, false)]);
    // One kerb per pass: each pass carries half of a both-sides demand.
    let p = Profile::refuse();
    let t = inst
        .tasks()
        .iter()
        .find(|t| inst.network().links[t.link].name.as_deref() == Some("Way 401"))
        .unwrap();
    let len = b
        .graph
        .streets
        .iter()
        .find(|s| s.name.as_deref() == Some("Way 401"))
        .unwrap()
        .length_m;
    assert_eq!(
        t.demand,
        (len * f64::from(p.demand_per_km_of_kerb) / 1000.0).round() as i64
    );
    assert_eq!(inst.network().links[t.link].cost, len.round() as i64);
}

#[test]
fn geojson_own_properties_override_the_profile() {
    let text = r#"{"type":"FeatureCollection","features":[
      {"type":"Feature","properties":{"name":"Quay","required":false},
       "geometry":{"type":"LineString","coordinates":[[24.0,60.0],[24.002,60.0]]}},
      {"type":"Feature","properties":{"name":"Hill","demand_per_km":1000,"highway":"residential"},
       "geometry":{"type":"LineString","coordinates":[[24.002,60.0],[24.002,60.001]]}},
      {"type":"Feature","properties":{"name":"Back","one_way":true},
       "geometry":{"type":"MultiLineString","coordinates":[[[24.002,60.001],[24.0,60.001]],[[24.0,60.001],[24.0,60.0]]]}},
      {"type":"Feature","properties":{"name":"Tree"},"geometry":{"type":"Point","coordinates":[24.001,60.0005]}}
    ]}"#;
    let map = parse_geojson(text, "mine.geojson").unwrap();
    assert_eq!(map.ways.len(), 4, "the MultiLineString gives two lines");
    let b = build_scenario(&map, &MapOptions::default()).unwrap();
    let inst = &b.instance;
    let task = |name: &str| {
        inst.tasks()
            .iter()
            .find(|t| inst.network().links[t.link].name.as_deref() == Some(name))
            .cloned()
    };
    assert!(task("Quay").is_none(), "required: false");
    let hill = task("Hill").unwrap();
    let len = b
        .graph
        .streets
        .iter()
        .find(|s| s.name.as_deref() == Some("Hill"))
        .unwrap()
        .length_m;
    assert_eq!(
        hill.demand,
        (len * 2.0).round() as i64,
        "1000 per km, two kerbs"
    );
    assert!(!task("Back").unwrap().either, "one_way: true");
    // The two lines of "Back" meet at a corner only they use: one street.
    assert_eq!(b.report.streets, 3);
}

fn is<T>(r: Result<T, MapError>, f: impl Fn(&MapError) -> bool) -> String {
    match r {
        Ok(_) => panic!("expected an error"),
        Err(e) => {
            assert!(f(&e), "unexpected error: {e:?}");
            e.to_string()
        }
    }
}

#[test]
fn bad_maps_get_typed_errors_naming_file_and_element() {
    let opts = MapOptions::default();
    // Truncated PBF.
    let bytes = std::fs::read("tests/fixtures/osm/no_highways.osm.pbf").unwrap();
    let p = temp("truncated.osm.pbf", &bytes[..bytes.len() - 40]);
    let m = is(load_map(&p, &opts), |e| matches!(e, MapError::Pbf { .. }));
    assert!(m.contains("truncated.osm.pbf"), "{m}");
    if let Ok(big) = std::fs::read("../shared/osm/helsinki.osm.pbf") {
        let p = temp("half.osm.pbf", &big[..big.len() / 2]);
        is(load_map(&p, &opts), |e| matches!(e, MapError::Pbf { .. }));
    }
    // A PBF without streets.
    let m = is(
        load_map("tests/fixtures/osm/no_highways.osm.pbf", &opts),
        |e| matches!(e, MapError::NoStreets { .. }),
    );
    assert!(m.contains("no way with a `highway` tag"), "{m}");
    // GeoJSON of points only.
    let pts = r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[24.0,60.0]}}]}"#;
    let m = is(parse_geojson(pts, "bins.geojson"), |e| {
        matches!(e, MapError::NoStreets { .. })
    });
    assert!(m.contains("bins.geojson") && m.contains("1 Point"), "{m}");
    // Empty maps, in the three formats.
    is(
        parse_geojson(r#"{"type":"FeatureCollection","features":[]}"#, "e.geojson"),
        |e| matches!(e, MapError::Empty { .. }),
    );
    let map = parse_osm_xml("<osm version=\"0.6\"></osm>", "e.osm").unwrap();
    is(build_scenario(&map, &opts), |e| {
        matches!(e, MapError::Empty { .. })
    });
    let p = temp("empty.osm.pbf", b"");
    is(load_map(&p, &opts), |e| matches!(e, MapError::Empty { .. }));
    // Element-level problems name the element.
    let bad = r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"required":"yes"},"geometry":{"type":"LineString","coordinates":[[24.0,60.0],[24.1,60.0]]}}]}"#;
    let m = is(parse_geojson(bad, "g.geojson"), |e| {
        matches!(
            e,
            MapError::Element {
                element: Element::Feature(0),
                ..
            }
        )
    });
    assert!(m.contains("features[0]") && m.contains("required"), "{m}");
    let bad = "<osm>\n<node id=\"7\" lat=\"95\" lon=\"24\"/>\n</osm>";
    is(parse_osm_xml(bad, "n.osm"), |e| {
        matches!(
            e,
            MapError::Element {
                element: Element::Node(7),
                ..
            }
        )
    });
    let bad = "<osm>\n<node id=\"7\" lat=\"60\" lon=\"24\"/>\n<way id=\"x\">\n</osm>";
    let m = is(parse_osm_xml(bad, "w.osm"), |e| {
        matches!(e, MapError::Syntax { line: 3, .. })
    });
    assert!(m.starts_with("w.osm:3:"), "{m}");
    is(load_map("town.shp", &opts), |e| {
        matches!(e, MapError::UnknownFormat { .. })
    });
}

#[test]
fn yard_outside_the_map_or_off_the_streets_is_an_error() {
    let map = parse_osm_xml(&town(""), "town.osm").unwrap();
    let far = MapOptions {
        yard: Some(YardChoice::Point {
            lon: 25.0,
            lat: 60.0,
        }),
        ..MapOptions::default()
    };
    let m = is(build_scenario(&map, &far), |e| {
        matches!(e, MapError::YardTooFar { .. })
    });
    assert!(m.contains("town.osm") && m.contains("yard"), "{m}");
    let node = MapOptions {
        yard: Some(YardChoice::Node(99)),
        ..MapOptions::default()
    };
    is(build_scenario(&map, &node), |e| {
        matches!(e, MapError::YardNotOnStreet { node: 99, .. })
    });
    let ok = MapOptions {
        yard: Some(YardChoice::Node(3)),
        ..MapOptions::default()
    };
    let b = build_scenario(&map, &ok).unwrap();
    assert_eq!(b.instance.network().junctions[b.instance.depot()].id, 3);
}

#[test]
fn a_profile_with_an_unknown_road_class_is_an_error() {
    let text = std::fs::read_to_string("src/map/profiles/refuse.toml")
        .unwrap()
        .replace("living_street  =", "living_stret  =");
    let p = temp("typo.toml", text.as_bytes());
    let m = is(
        Profile::read_file(&p),
        |e| matches!(e, MapError::UnknownRoadClass { class, line: Some(_), .. } if class == "living_stret"),
    );
    assert!(m.contains("typo.toml:"), "{m}");
}

#[test]
fn streets_too_heavy_for_one_truck_are_cut_or_named() {
    let extra = "  <node id=\"5\" lat=\"59.9995\" lon=\"24.0005\"/>\n  <node id=\"6\" lat=\"59.9995\" lon=\"24.0015\"/>\n".to_string()
        + "  <way id=\"301\"><nd ref=\"1\"/><nd ref=\"5\"/><nd ref=\"6\"/><nd ref=\"2\"/><tag k=\"highway\" v=\"residential\"/><tag k=\"name\" v=\"Loop Lane\"/></way>\n";
    let map = parse_osm_xml(&town(&extra), "town.osm").unwrap();
    // 400 kg per km of kerb, both kerbs: a 100 kg truck serves at most 125 m
    // in one pass; the 180 m lane is cut at its inner nodes.
    let mut small = MapOptions::default();
    small.profile.truck.capacity = 100;
    let b = build_scenario(&map, &small).unwrap();
    assert_eq!(b.report.long_cuts, 2);
    let pieces = b
        .graph
        .streets
        .iter()
        .filter(|s| s.name.as_deref() == Some("Loop Lane"));
    assert_eq!(pieces.count(), 3);
    assert!(b.instance.tasks().iter().all(|t| t.demand <= 100));
    // A single 111 m piece cannot be cut: a typed error naming the street.
    small.profile.truck.capacity = 50;
    let m = is(build_scenario(&map, &small), |e| {
        matches!(e, MapError::Model { .. })
    });
    assert!(
        m.contains("street Side 10") && m.contains("capacity 50"),
        "{m}"
    );
}

#[test]
fn demand_by_address_counts_the_nearest_served_street() {
    // Two houses just south of Side 101 (1-2), one building with an address
    // just north of Side 103 (3-4), and one address far out of town.
    let extra = r#"  <node id="50" lat="59.99995" lon="24.0005"><tag k="addr:housenumber" v="1"/></node>
  <node id="51" lat="59.99995" lon="24.0015"><tag k="addr:housenumber" v="3"/></node>
  <node id="52" lat="60.01" lon="24.01"><tag k="addr:housenumber" v="99"/></node>
  <node id="60" lat="60.00105" lon="24.0010"/>
  <node id="61" lat="60.00105" lon="24.0012"/>
  <node id="62" lat="60.00110" lon="24.0012"/>
  <way id="70"><nd ref="60"/><nd ref="61"/><nd ref="62"/><nd ref="60"/><tag k="building" v="house"/><tag k="addr:housenumber" v="2"/></way>
"#;
    let map = parse_osm_xml(&town(extra), "town.osm").unwrap();
    assert_eq!(map.addresses.len(), 4);
    let mut opts = MapOptions::default();
    opts.profile.demand_per_address = Some(10);
    let b = build_scenario(&map, &opts).unwrap();
    assert_eq!(b.report.addresses_snapped, Some(3));
    let inst = &b.instance;
    let demand = |name: &str| {
        inst.tasks()
            .iter()
            .filter(|t| inst.network().links[t.link].name.as_deref() == Some(name))
            .map(|t| t.demand)
            .collect::<Vec<_>>()
    };
    assert_eq!(demand("Side 101"), vec![20]);
    assert_eq!(demand("Side 103"), vec![10]);
    assert!(demand("Side 102").is_empty(), "no address: only driven");
    // Without per_address the same map is served by kerb length.
    let b = build_scenario(&map, &MapOptions::default()).unwrap();
    assert_eq!(b.report.addresses_snapped, None);
    assert_eq!(b.instance.tasks().len(), 4);
}
