//! The map reader on a real OpenStreetMap extract (`../shared/osm/helsinki.osm.pbf`,
//! © OpenStreetMap contributors, ODbL 1.0) against an outside reference:
//! `scripts/osm_reference.py`, which builds the same network with pyosmium
//! (osmium 4.3.2), networkx 3.6.1 (strongly connected components) and
//! geographiclib 2.1 (geodesic lengths, Karney's algorithm) and wrote
//! `tests/fixtures/osm/helsinki_reference.json` and the GeoJSON export
//! `tests/fixtures/osm/helsinki_streets.geojson`.

mod common;

use arcwright::map::{load_map, MapOptions, MapScenario, YardChoice};
use serde_json::Value;

/// The extract, after [`pbf`] found it (`common::shared_osm`).
fn pbf_path() -> std::path::PathBuf {
    common::shared_osm("map_osm").expect("checked by pbf()")
}

fn reference() -> Value {
    let text = std::fs::read_to_string("tests/fixtures/osm/helsinki_reference.json").unwrap();
    serde_json::from_str(&text).unwrap()
}

fn pbf() -> Option<MapScenario> {
    let path = common::shared_osm("map_osm")?;
    Some(load_map(path, &MapOptions::default()).expect("the Helsinki extract builds"))
}

/// Counts equal, total length within 0.1 % of the reference.
fn same_network(b: &MapScenario, r: &Value, with_restrictions: bool) {
    let rep = &b.report;
    assert_eq!(
        rep.junctions as u64,
        r["junctions"].as_u64().unwrap(),
        "junctions"
    );
    assert_eq!(
        rep.streets as u64,
        r["streets"].as_u64().unwrap(),
        "streets"
    );
    assert_eq!(
        rep.one_way_streets as u64,
        r["one_way_streets"].as_u64().unwrap(),
        "one-way streets"
    );
    if with_restrictions {
        assert_eq!(
            rep.restrictions as u64,
            r["restrictions"].as_u64().unwrap(),
            "turn restrictions"
        );
    }
    assert_eq!(
        rep.dropped.pieces as u64,
        r["dropped_segments"].as_u64().unwrap(),
        "pieces left out"
    );
    let want = r["length_m"].as_f64().unwrap();
    assert!(
        (rep.length_m - want).abs() <= want * 1e-3,
        "length {} m, reference {want} m",
        rep.length_m
    );
}

#[test]
fn helsinki_pbf_matches_the_pyosmium_networkx_reference() {
    let Some(b) = pbf() else { return };
    let r = reference();
    println!("{}", b.report);
    same_network(&b, &r["full"], true);
    assert_eq!(
        b.instance.network().turn_restrictions.len(),
        b.report.restrictions
    );
}

#[test]
fn helsinki_street_lengths_match_geographiclib() {
    let Some(b) = pbf() else { return };
    let r = reference();
    let g = &b.graph;
    for s in r["samples"].as_array().unwrap() {
        let (from, to) = (
            s["from_node"].as_i64().unwrap(),
            s["to_node"].as_i64().unwrap(),
        );
        let way = s["first_way"].as_i64().unwrap();
        let st = g
            .streets
            .iter()
            .find(|st| {
                g.junctions[st.from].node == from
                    && g.junctions[st.to].node == to
                    && st.end_ways.0 == way
            })
            .unwrap_or_else(|| panic!("no street {from} -> {to} (way {way})"));
        let want = s["length_m"].as_f64().unwrap();
        assert!(
            (st.length_m - want).abs() <= want * 1e-3,
            "street {from} -> {to}: {} m, reference {want} m",
            st.length_m
        );
        assert_eq!(st.geometry.len() as u64, s["nodes"].as_u64().unwrap());
    }
}

#[test]
fn geojson_export_gives_the_same_network() {
    let r = reference();
    let b = load_map(
        "tests/fixtures/osm/helsinki_streets.geojson",
        &MapOptions::default(),
    )
    .expect("the GeoJSON export builds");
    println!("{}", b.report);
    assert_eq!(
        b.report.ways_read as u64,
        r["geojson_features"].as_u64().unwrap()
    );
    // GeoJSON cannot carry turn restrictions.
    same_network(&b, &r["full"], false);
    assert_eq!(b.report.restrictions, 0);
    if let Some(p) = pbf() {
        assert_eq!(p.report.length_m.round(), b.report.length_m.round());
    }
}

#[test]
fn yard_point_snaps_to_the_nearest_junction() {
    let Some(b) = pbf() else { return };
    let j = b.graph.junctions[b.graph.streets[0].from];
    let opts = MapOptions {
        yard: Some(YardChoice::Point {
            lon: j.at[0] + 0.0001,
            lat: j.at[1],
        }),
        ..MapOptions::default()
    };
    let y = load_map(pbf_path(), &opts).unwrap();
    let yard = y.report.yard;
    match yard.how {
        arcwright::map::YardHow::Snapped { distance_m, .. } => {
            assert!(distance_m < 10.0, "{distance_m}");
        }
        other => panic!("{other:?}"),
    }
    assert_eq!(
        y.instance.network().junctions[y.instance.depot()].id as i64,
        yard.node
    );
}
