//! GeoJSON (RFC 7946) of a plan: one LineString feature per step of every route.

use serde_json::{json, Value};

use crate::fleet::FleetPlan;
use crate::model::Instance;
use crate::paths::Distances;
use crate::plan::Plan;

use super::sheets::{all_rows, shows_lengths, shows_times, Action, SheetRow};

/// All junction coordinates, or `None` when any junction lacks one.
pub(crate) fn points(inst: &Instance) -> Option<Vec<(f64, f64)>> {
    inst.network()
        .junctions
        .iter()
        .map(|j| Some((j.x?, j.y?)))
        .collect()
}

/// The plan as a GeoJSON FeatureCollection (RFC 7946: WGS 84 longitude and
/// latitude), or `None` when the scenario has no coordinates or they cannot
/// be placed on a world map (see [`crate::model::Coordinates::placeable`]: planar
/// coordinates need an origin, undeclared ones are never guessed). Each
/// feature is one step of a route's walk (a LineString from junction to
/// junction, along the street's shape when the scenario has one) with properties `route` (1-based truck number), `step`,
/// `action` (`serve` or `deadhead`), `street`, `link` (0-based index in the
/// scenario's street list, as in plan files), `from`/`to` (junction ids),
/// `cost`, and `length` and `time` where the sheets show them (with turn
/// rules also `turn`, `turn_cost` and `manoeuvre`, as in the CSV sheets); the yard is a
/// Point with `yard: true`. The collection carries a foreign member `units`
/// with the scenario's units (`null` where undeclared).
pub fn feature_collection(inst: &Instance, dist: &Distances, plan: &Plan) -> Option<String> {
    points(inst)?;
    feature_collection_of_rows(inst, &all_rows(inst, dist, plan))
}

/// [`feature_collection`] from the rows of every route ([`all_rows`]).
pub fn feature_collection_of_rows(inst: &Instance, all: &[Vec<SheetRow>]) -> Option<String> {
    collection(inst, all, None)
}

/// The GeoJSON of a fleet plan from its rows ([`super::fleet::fleet_rows`]):
/// as [`feature_collection`], with `action` also `to_dump_site` (the loaded
/// way to a dump site) or `from_dump_site` (from it to the next street or
/// the yard), each step's `truck_type` and `yard` by name, and a Point per
/// yard (`yard: true`, `name`) and dump site (`dump_site: true`, `name`,
/// `unload_time`). `None` as for [`feature_collection`].
pub fn fleet_feature_collection(
    inst: &Instance,
    plan: &FleetPlan,
    all: &[Vec<SheetRow>],
) -> Option<String> {
    collection(inst, all, Some(plan))
}

fn collection(inst: &Instance, all: &[Vec<SheetRow>], fleet: Option<&FleetPlan>) -> Option<String> {
    let ops = inst.operations();
    let (types, yards) = (ops.types_of(inst), ops.yards_of(inst));
    let pts = points(inst)?;
    let coords = inst.coordinates();
    if !coords.placeable() {
        return None;
    }
    // Every point was checked against the system when the scenario was read
    // (Instance::with_coordinates), so each converts to a valid position.
    let at = |j: usize| coords.lon_lat(pts[j].0, pts[j].1);
    let (lengths, times) = (shows_lengths(inst), shows_times(inst));
    let net = inst.network();
    let mut features = Vec::new();
    for (r, rows) in all.iter().enumerate() {
        for row in rows {
            let (a, b) = row.ends;
            let mut props = json!({
                "route": r + 1,
                "step": row.step,
                "action": match row.action {
                    Action::Serve => "serve",
                    Action::ToDumpSite => "to_dump_site",
                    Action::FromDumpSite => "from_dump_site",
                    _ => "deadhead",
                },
                "street": row.street,
                "link": row.link,
                "from": row.from,
                "to": row.to,
                "cost": row.cost,
            });
            if lengths {
                props["length"] = json!(row.length);
            }
            if times {
                props["time"] = json!(row.step_time);
            }
            if let Some(route) = fleet.and_then(|p| p.routes.get(r)) {
                props["truck_type"] = json!(types.get(route.truck_type).map(|t| &t.name));
                props["yard"] = json!(yards.get(route.yard).map(|y| &y.name));
            }
            if let Some(m) = &row.manoeuvre {
                // With turn rules: the turn into this street and the instruction.
                if let Some(t) = row.turn {
                    props["turn"] = json!(t.kind.to_string());
                    props["turn_cost"] = json!(t.cost);
                }
                props["manoeuvre"] = json!(m);
            }
            let l = &net.links[row.link];
            let line = if l.geometry.len() >= 2 {
                // The street's shape, in the direction of travel.
                let mut pts = l
                    .geometry
                    .iter()
                    .map(|p| coords.lon_lat(p[0], p[1]))
                    .collect::<Option<Vec<_>>>()?;
                if a != l.from {
                    pts.reverse();
                }
                pts
            } else {
                vec![at(a)?, at(b)?]
            };
            features.push(json!({
                "type": "Feature",
                "geometry": { "type": "LineString", "coordinates": line },
                "properties": props,
            }));
        }
    }
    features.push(json!({
        "type": "Feature",
        "geometry": { "type": "Point", "coordinates": at(inst.depot())? },
        "properties": { "yard": true, "junction": net.junctions[inst.depot()].id },
    }));
    if !ops.yards.is_empty() {
        // Name the depot (the first yard) and add the other yards.
        let last = features.len() - 1;
        features[last]["properties"]["name"] = json!(ops.yards[0].name);
        for y in &ops.yards[1..] {
            features.push(json!({
                "type": "Feature",
                "geometry": { "type": "Point", "coordinates": at(y.junction)? },
                "properties": { "yard": true, "name": y.name, "junction": net.junctions[y.junction].id },
            }));
        }
    }
    for (i, site) in ops.dump_sites.iter().enumerate() {
        features.push(json!({
            "type": "Feature",
            "geometry": { "type": "Point", "coordinates": at(site.junction)? },
            "properties": {
                "dump_site": true,
                "name": super::fleet::site_name(inst, i),
                "junction": net.junctions[site.junction].id,
                "unload_time": site.unload_time,
            },
        }));
    }
    let u = inst.units();
    let fc = json!({
        "type": "FeatureCollection",
        "units": { "cost": u.cost, "length": u.length, "time": u.time, "load": u.load },
        "features": Value::Array(features),
    });
    Some(serde_json::to_string_pretty(&fc).expect("JSON values always serialize"))
}
