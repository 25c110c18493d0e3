//! Mutated OSM XML and GeoJSON fed to the map readers and the builder: they
//! may reject it, but must never panic.

use arcwright::map::{build_scenario, parse_geojson, parse_osm_xml, MapOptions, YardChoice};
use proptest::prelude::*;

const XML: &str = r#"<?xml version="1.0"?>
<osm version="0.6">
 <node id="1" lat="60.0" lon="24.0"/>
 <node id="2" lat="60.0" lon="24.002"/>
 <node id="3" lat="60.001" lon="24.002"/>
 <node id="4" lat="60.001" lon="24.0"/>
 <way id="10"><nd ref="1"/><nd ref="2"/><nd ref="3"/><tag k="highway" v="residential"/><tag k="name" v="Ash Row"/></way>
 <way id="11"><nd ref="3"/><nd ref="4"/><nd ref="1"/><tag k="highway" v="primary"/><tag k="oneway" v="yes"/></way>
 <way id="12"><nd ref="2"/><nd ref="4"/><tag k="highway" v="service"/><tag k="oneway" v="-1"/></way>
 <relation id="20"><member type="way" ref="10" role="from"/><member type="node" ref="3" role="via"/><member type="way" ref="11" role="to"/><tag k="type" v="restriction"/><tag k="restriction" v="no_left_turn"/></relation>
</osm>
"#;

const GEOJSON: &str = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{"highway":"residential","name":"Ash Row","oneway":"no"},"geometry":{"type":"LineString","coordinates":[[24.0,60.0],[24.002,60.0],[24.002,60.001]]}},
 {"type":"Feature","properties":{"highway":"primary","one_way":true,"demand_per_km":300},"geometry":{"type":"MultiLineString","coordinates":[[[24.002,60.001],[24.0,60.001]],[[24.0,60.001],[24.0,60.0]]]}},
 {"type":"Feature","properties":{"required":true},"geometry":{"type":"LineString","coordinates":[[24.002,60.0],[24.0,60.001]]}}
]}"#;

const ALPHABET: &[u8] = b"0123456789-.,:\"<>/= []{}abeilnorstwyk\n";

fn mutate(text: &str, edits: &[(usize, usize, usize)]) -> String {
    let mut b = text.as_bytes().to_vec();
    for &(kind, pos, ch) in edits {
        let c = ALPHABET[ch % ALPHABET.len()];
        match kind % 4 {
            0 if !b.is_empty() => {
                let n = b.len();
                b[pos % n] = c;
            }
            1 => b.insert(pos % (b.len() + 1), c),
            2 if !b.is_empty() => {
                let n = b.len();
                b.remove(pos % n);
            }
            _ => b.truncate(pos % (b.len() + 1)),
        }
    }
    String::from_utf8_lossy(&b).into_owned()
}

fn build_all(map: &arcwright::map::RawMap) {
    for yard in [
        None,
        Some(YardChoice::Node(3)),
        Some(YardChoice::Point {
            lon: 24.001,
            lat: 60.0005,
        }),
    ] {
        let opts = MapOptions {
            yard,
            ..MapOptions::default()
        };
        let _ = build_scenario(map, &opts);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 300, ..ProptestConfig::default() })]

    #[test]
    fn osm_xml_never_panics(edits in prop::collection::vec((0..4usize, any::<usize>(), any::<usize>()), 1..6)) {
        if let Ok(map) = parse_osm_xml(&mutate(XML, &edits), "fuzz.osm") {
            build_all(&map);
        }
    }

    #[test]
    fn geojson_never_panics(edits in prop::collection::vec((0..4usize, any::<usize>(), any::<usize>()), 1..6)) {
        if let Ok(map) = parse_geojson(&mutate(GEOJSON, &edits), "fuzz.geojson") {
            build_all(&map);
        }
    }
}

#[test]
fn the_seeds_build() {
    let x = build_scenario(
        &parse_osm_xml(XML, "seed.osm").unwrap(),
        &MapOptions::default(),
    )
    .unwrap();
    assert_eq!(x.report.restrictions, 1);
    let g = build_scenario(
        &parse_geojson(GEOJSON, "seed.geojson").unwrap(),
        &MapOptions::default(),
    )
    .unwrap();
    // Ash Row is split where the third line starts; the one-way pair where it ends.
    assert_eq!(g.report.streets, 5);
}
