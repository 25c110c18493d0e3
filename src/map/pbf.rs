//! The OpenStreetMap PBF reader (the `osmpbf` crate).
//!
//! Two passes over the file: the first keeps the `highway=*` ways and the
//! turn-restriction relations, the second the positions of the nodes those
//! ways use. Memory grows with the streets, not with the whole extract.

use std::collections::HashSet;
use std::fs::File;
use std::io::BufReader;
use std::path::Path;

use osmpbf::{Element as Pbf, ElementReader, RelMemberType};

use super::error::MapError;
use super::raw::{
    restriction_rule, street_tags, MapFormat, RawMap, RawRestriction, RawWay, ADDRESS_KEY,
};

fn open(path: &Path, file: &str) -> Result<ElementReader<BufReader<File>>, MapError> {
    let f = File::open(path).map_err(|source| MapError::Io {
        file: file.to_string(),
        source,
    })?;
    Ok(ElementReader::new(BufReader::new(f)))
}

/// The same float as `value / 1e7` everywhere (fixed-point OSM positions).
fn lon_lat(lon: i32, lat: i32) -> [f64; 2] {
    [f64::from(lon) / 1e7, f64::from(lat) / 1e7]
}

fn broken(file: &str, e: osmpbf::Error) -> MapError {
    MapError::Pbf {
        file: file.to_string(),
        problem: e.to_string(),
    }
}

/// Reads an OSM PBF file.
///
/// # Errors
///
/// [`MapError::Io`] when the file cannot be opened; [`MapError::Pbf`] when it
/// is truncated or not PBF. An empty map or one without streets is not an
/// error here (the builder reports it).
pub fn read_pbf(path: &Path) -> Result<RawMap, MapError> {
    let file = path.display().to_string();
    let mut map = RawMap::new(&file, MapFormat::Pbf);
    let mut elements = 0usize;
    open(path, &file)?
        .for_each(|el| {
            elements += 1;
            match el {
                Pbf::Way(w) => {
                    if w.tags().any(|(k, _)| k == ADDRESS_KEY) {
                        map.address_ways.push(w.refs().collect());
                    }
                    if let Some(tags) = street_tags(w.tags()) {
                        map.ways.push(RawWay {
                            id: w.id(),
                            nodes: w.refs().collect(),
                            tags,
                            overrides: Default::default(),
                        });
                    }
                }
                Pbf::Relation(r) => {
                    let Some(rule) = restriction_rule(r.tags()) else {
                        return;
                    };
                    let mut rr = RawRestriction {
                        id: r.id(),
                        rule,
                        from: Vec::new(),
                        via_nodes: Vec::new(),
                        unusable: 0,
                        to: Vec::new(),
                    };
                    for m in r.members() {
                        let role = m.role().unwrap_or("");
                        match (role, m.member_type) {
                            ("from", RelMemberType::Way) => rr.from.push(m.member_id),
                            ("to", RelMemberType::Way) => rr.to.push(m.member_id),
                            ("via", RelMemberType::Node) => rr.via_nodes.push(m.member_id),
                            ("via" | "from" | "to", _) => rr.unusable += 1,
                            _ => {}
                        }
                    }
                    map.restrictions.push(rr);
                }
                Pbf::Node(n) => {
                    if n.tags().any(|(k, _)| k == ADDRESS_KEY) {
                        map.addresses
                            .push(lon_lat(n.decimicro_lon(), n.decimicro_lat()));
                    }
                }
                Pbf::DenseNode(n) => {
                    if n.tags().any(|(k, _)| k == ADDRESS_KEY) {
                        map.addresses
                            .push(lon_lat(n.decimicro_lon(), n.decimicro_lat()));
                    }
                }
            }
        })
        .map_err(|e| broken(&file, e))?;
    let wanted: HashSet<i64> = map
        .ways
        .iter()
        .flat_map(|w| w.nodes.iter().copied())
        .collect();
    let for_addresses: HashSet<i64> = map.address_ways.iter().flatten().copied().collect();
    let nodes = &mut map.nodes;
    let mut address_nodes = std::collections::HashMap::new();
    let mut keep = |id: i64, lon: i32, lat: i32| {
        if wanted.contains(&id) {
            nodes.insert(id, lon_lat(lon, lat));
        }
        if for_addresses.contains(&id) {
            address_nodes.insert(id, lon_lat(lon, lat));
        }
    };
    open(path, &file)?
        .for_each(|el| match el {
            Pbf::Node(n) => keep(n.id(), n.decimicro_lon(), n.decimicro_lat()),
            Pbf::DenseNode(n) => keep(n.id(), n.decimicro_lon(), n.decimicro_lat()),
            _ => {}
        })
        .map_err(|e| broken(&file, e))?;
    map.resolve_address_ways(&address_nodes);
    map.elements = elements;
    Ok(map)
}
