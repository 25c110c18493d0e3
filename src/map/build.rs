//! The pipeline: segments, strongly connected part, streets, lengths, turn
//! restrictions, yard.

use std::collections::{BTreeSet, HashMap};

use super::address::count_addresses;
use super::contract::{contract, keep_strong, Chain};
use super::error::MapError;
use super::graph::{segments, FilterStats, WayAttr};
use super::length::polyline_metres;
use super::long::cut_long;
use super::profile::{Profile, Serve};
use super::raw::RawMap;
use super::yard::{centre, nearest, YardChoice, YardHow, YardReport};

/// Largest distance, in metres, from a yard point to the nearest drivable
/// junction before the yard counts as outside the map.
pub const MAX_YARD_SNAP_M: f64 = 1000.0;

/// A street of the built network: a chain of way pieces between two
/// junctions, in driving direction when one-way.
#[derive(Clone, Debug, PartialEq)]
pub struct Street {
    /// Index of the first junction in [`StreetGraph::junctions`].
    pub from: usize,
    /// Index of the last junction.
    pub to: usize,
    /// May only be driven from `from` to `to`.
    pub one_way: bool,
    /// `[lon, lat]` points from `from` to `to`.
    pub geometry: Vec<[f64; 2]>,
    /// Geodesic length on WGS84, metres.
    pub length_m: f64,
    /// `name`, else `ref`.
    pub name: Option<String>,
    /// Road class (`highway=*`).
    pub class: String,
    /// Way ids (GeoJSON: feature positions) at the `from` and `to` ends.
    pub end_ways: (i64, i64),
    /// The GeoJSON `required` setting, when given.
    pub required: Option<bool>,
    /// The GeoJSON `demand_per_km` setting, when given.
    pub demand_per_km: Option<u32>,
    /// Address points given to this street (demand per address).
    pub addresses: u32,
}

/// A junction of the built network.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MapJunction {
    /// Node id (GeoJSON: the reader's number for the position).
    pub node: i64,
    /// `[lon, lat]`.
    pub at: [f64; 2],
}

/// A kept turn restriction, by street and junction index.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct StreetTurn {
    /// Relation id.
    pub relation: i64,
    /// `no_*` / `only_*` value.
    pub rule: String,
    /// Street arriving at `via`.
    pub from: usize,
    /// Junction index.
    pub via: usize,
    /// Street leaving `via`.
    pub to: usize,
}

/// What was left out because trucks cannot drive around it.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Dropped {
    /// Way pieces (between junctions) dropped.
    pub pieces: usize,
    /// Their total length, metres.
    pub length_m: f64,
    /// Up to five of their names (sorted).
    pub names: Vec<String>,
}

/// The street network as a planner needs it.
#[derive(Clone, Debug, PartialEq)]
pub struct StreetGraph {
    /// Junctions, sorted by node id.
    pub junctions: Vec<MapJunction>,
    /// Streets.
    pub streets: Vec<Street>,
    /// Turn restrictions between kept streets.
    pub turns: Vec<StreetTurn>,
    /// The yard junction (index) and how it was found.
    pub yard: (usize, YardReport),
    /// What was left out.
    pub dropped: Dropped,
    /// Ways read with a `highway` tag (GeoJSON: lines).
    pub ways_read: usize,
    /// Ways of a class the profile does not drive.
    pub ways_other_class: usize,
    /// Ways closed by access, service kind, `area=yes` or `oneway=reversible`.
    pub ways_closed: usize,
    /// References to nodes the file does not hold (clipped extracts).
    pub missing_node_refs: usize,
    /// Cuts made in streets too long for one truck to serve in one pass.
    pub long_cuts: usize,
    /// Address points in the map.
    pub addresses_read: usize,
    /// Address points given to a served street; `Some` when demand is
    /// counted by address (the profile asks for it and the map has them).
    pub addresses_snapped: Option<usize>,
}

/// Builds the street graph of a map under a profile, with the yard.
///
/// # Errors
///
/// [`MapError::Empty`], [`MapError::NoStreets`], [`MapError::YardNotOnStreet`],
/// [`MapError::YardTooFar`].
pub fn build_graph(
    map: &RawMap,
    profile: &Profile,
    yard: Option<YardChoice>,
) -> Result<StreetGraph, MapError> {
    let file = map.file.clone();
    if map.elements == 0 {
        return Err(MapError::Empty {
            file,
            detail: "no nodes, ways or relations".into(),
        });
    }
    let node_yard = match yard {
        Some(YardChoice::Node(n)) => Some(n),
        _ => None,
    };
    let (segs, attrs, stats) = segments(map, profile, node_yard);
    if segs.is_empty() {
        return Err(MapError::NoStreets {
            file,
            detail: no_streets_detail(map, &stats),
        });
    }
    if let Some(n) = node_yard {
        if !segs.iter().any(|s| s.nodes.contains(&n)) {
            return Err(MapError::YardNotOnStreet { file, node: n });
        }
    }
    let (kept, gone) = keep_strong(segs, &attrs, node_yard);
    if kept.is_empty() {
        return Err(MapError::NoStreets {
            file,
            detail: match node_yard {
                Some(n) => format!("trucks cannot leave the yard node {n} and come back"),
                None => "no streets trucks can drive around (all dead-end one-ways)".into(),
            },
        });
    }
    let dropped = dropped(map, &attrs, &gone);
    let chains = contract(&kept, &attrs, node_yard);
    let (chains, long_cuts) = cut_long(chains, &attrs, &map.nodes, profile);
    let mut ids: Vec<i64> = chains
        .iter()
        .flat_map(|c| [c.nodes[0], c.nodes[c.nodes.len() - 1]])
        .collect::<BTreeSet<_>>()
        .into_iter()
        .collect();
    if let Some(n) = node_yard {
        if !ids.contains(&n) {
            ids.push(n);
            ids.sort_unstable();
        }
    }
    let index: HashMap<i64, usize> = ids.iter().enumerate().map(|(i, &n)| (n, i)).collect();
    let junctions: Vec<MapJunction> = ids
        .iter()
        .map(|&n| MapJunction {
            node: n,
            at: map.nodes[&n],
        })
        .collect();
    let mut streets: Vec<Street> = chains
        .iter()
        .map(|c| street(map, &attrs, &index, c))
        .collect();
    let addresses_snapped = match profile.demand_per_address {
        Some(_) if !map.addresses.is_empty() => {
            let served: Vec<bool> = streets
                .iter()
                .map(|s| {
                    s.required
                        .unwrap_or(profile.classes[&s.class].serve != Serve::No)
                })
                .collect();
            let snap = f64::from(profile.address_snap_m);
            let (counts, snapped) = count_addresses(&streets, &served, &map.addresses, snap);
            for (s, c) in streets.iter_mut().zip(counts) {
                s.addresses = c;
            }
            Some(snapped)
        }
        _ => None,
    };
    let turns = turns(map, &streets, &index);
    let yard = place_yard(&file, &junctions, &index, yard)?;
    Ok(StreetGraph {
        junctions,
        streets,
        turns,
        yard,
        dropped,
        ways_read: map.ways.len(),
        ways_other_class: stats.ways_other_class,
        ways_closed: stats.ways_closed,
        missing_node_refs: stats.missing_node_refs,
        long_cuts,
        addresses_read: map.addresses.len(),
        addresses_snapped,
    })
}

fn no_streets_detail(map: &RawMap, stats: &FilterStats) -> String {
    if map.ways.is_empty() {
        return format!(
            "no way with a `highway` tag among its {} elements",
            map.elements
        );
    }
    format!(
        "{} highway ways, none a street the trucks may drive ({} of a road class the profile does not drive, {} closed to trucks{})",
        map.ways.len(),
        stats.ways_other_class,
        stats.ways_closed,
        if stats.missing_node_refs > 0 {
            format!(", {} node references missing from the file", stats.missing_node_refs)
        } else {
            String::new()
        }
    )
}

fn dropped(map: &RawMap, attrs: &[Option<WayAttr>], gone: &[super::graph::Segment]) -> Dropped {
    let mut names = BTreeSet::new();
    let mut length_m = 0.0;
    for s in gone {
        let pts: Vec<[f64; 2]> = s.nodes.iter().map(|n| map.nodes[n]).collect();
        length_m += polyline_metres(&pts);
        if let Some(n) = attrs[s.way].as_ref().and_then(|a| a.name.clone()) {
            names.insert(n);
        }
    }
    Dropped {
        pieces: gone.len(),
        length_m,
        names: names.into_iter().take(5).collect(),
    }
}

fn street(
    map: &RawMap,
    attrs: &[Option<WayAttr>],
    index: &HashMap<i64, usize>,
    c: &Chain,
) -> Street {
    let a = attrs[c.way].as_ref().expect("chains come from streets");
    let geometry: Vec<[f64; 2]> = c.nodes.iter().map(|n| map.nodes[n]).collect();
    Street {
        from: index[&c.nodes[0]],
        to: index[&c.nodes[c.nodes.len() - 1]],
        one_way: a.one_way,
        length_m: polyline_metres(&geometry),
        geometry,
        name: a.name.clone(),
        class: a.class.clone(),
        end_ways: (map.ways[c.end_ways.0].id, map.ways[c.end_ways.1].id),
        required: a.overrides.required,
        demand_per_km: a.overrides.demand_per_km,
        addresses: 0,
    }
}

/// Rule 8: restrictions whose via node is a junction where streets of the
/// from and to ways end.
fn turns(map: &RawMap, streets: &[Street], index: &HashMap<i64, usize>) -> Vec<StreetTurn> {
    let mut ends: HashMap<(usize, i64), Vec<usize>> = HashMap::new();
    for (i, s) in streets.iter().enumerate() {
        ends.entry((s.from, s.end_ways.0)).or_default().push(i);
        ends.entry((s.to, s.end_ways.1)).or_default().push(i);
    }
    let mut out = Vec::new();
    for r in &map.restrictions {
        if !(r.rule.starts_with("no_") || r.rule.starts_with("only_"))
            || r.from.len() != 1
            || r.to.len() != 1
            || r.via_nodes.len() != 1
            || r.unusable > 0
        {
            continue;
        }
        let Some(&via) = index.get(&r.via_nodes[0]) else {
            continue;
        };
        let (Some(f), Some(t)) = (ends.get(&(via, r.from[0])), ends.get(&(via, r.to[0]))) else {
            continue;
        };
        // Prefer a street that arrives at (leaves) the via junction.
        let from = *f.iter().find(|&&s| streets[s].to == via).unwrap_or(&f[0]);
        let to = *t.iter().find(|&&s| streets[s].from == via).unwrap_or(&t[0]);
        out.push(StreetTurn {
            relation: r.id,
            rule: r.rule.clone(),
            from,
            via,
            to,
        });
    }
    out
}

fn place_yard(
    file: &str,
    junctions: &[MapJunction],
    index: &HashMap<i64, usize>,
    yard: Option<YardChoice>,
) -> Result<(usize, YardReport), MapError> {
    let pts: Vec<[f64; 2]> = junctions.iter().map(|j| j.at).collect();
    let report = |i: usize, how| {
        (
            i,
            YardReport {
                node: junctions[i].node,
                lon: junctions[i].at[0],
                lat: junctions[i].at[1],
                how,
            },
        )
    };
    match yard {
        Some(YardChoice::Node(n)) => Ok(report(index[&n], YardHow::Node)),
        Some(YardChoice::Point { lon, lat }) => {
            let (i, d) = nearest(&pts, [lon, lat]).expect("a built network has junctions");
            if d > MAX_YARD_SNAP_M {
                return Err(MapError::YardTooFar {
                    file: file.to_string(),
                    lon,
                    lat,
                    distance_m: d,
                    max_m: MAX_YARD_SNAP_M,
                });
            }
            Ok(report(
                i,
                YardHow::Snapped {
                    lon,
                    lat,
                    distance_m: d,
                },
            ))
        }
        None => {
            let (i, d) = nearest(&pts, centre(&pts)).expect("a built network has junctions");
            Ok(report(i, YardHow::Centre { distance_m: d }))
        }
    }
}
