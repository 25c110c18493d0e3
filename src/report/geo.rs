//! GeoJSON (RFC 7946) of a plan: one LineString feature per step of every route.

use serde_json::{json, Value};

use crate::model::Instance;
use crate::paths::Distances;
use crate::plan::Plan;

use super::sheets::{all_rows, Action, SheetRow};

/// How the junction coordinates of a scenario are to be read.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Coordinates {
    /// Longitude and latitude in degrees (WGS 84), written as they are.
    LonLat,
    /// Planar metres (x east, y north) around an origin placed at the given
    /// longitude and latitude; converted with a local equirectangular
    /// approximation, good to a few metres over a town.
    Metres {
        /// Longitude of the point `(0, 0)`.
        origin_lon: f64,
        /// Latitude of the point `(0, 0)`.
        origin_lat: f64,
    },
}

impl Coordinates {
    /// Guesses from the values: longitude/latitude when every `x` lies in
    /// `[-180, 180]` and every `y` in `[-90, 90]` and the spread is under
    /// five degrees (a town or a region), otherwise planar metres placed at
    /// longitude 0, latitude 0 (an invented place in the sea, so that an
    /// invented town is never mistaken for a real one).
    pub fn guess(inst: &Instance) -> Option<Coordinates> {
        let pts = points(inst)?;
        let (mut lo_x, mut hi_x, mut lo_y, mut hi_y) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
        for &(x, y) in &pts {
            lo_x = lo_x.min(x);
            hi_x = hi_x.max(x);
            lo_y = lo_y.min(y);
            hi_y = hi_y.max(y);
        }
        let degrees = lo_x >= -180.0
            && hi_x <= 180.0
            && lo_y >= -90.0
            && hi_y <= 90.0
            && hi_x - lo_x < 5.0
            && hi_y - lo_y < 5.0;
        Some(if degrees {
            Coordinates::LonLat
        } else {
            Coordinates::Metres {
                origin_lon: 0.0,
                origin_lat: 0.0,
            }
        })
    }

    fn lon_lat(self, x: f64, y: f64) -> [f64; 2] {
        match self {
            Coordinates::LonLat => [x, y],
            Coordinates::Metres {
                origin_lon,
                origin_lat,
            } => {
                // Metres per degree of latitude and of longitude near the origin
                // (spherical Earth of mean radius 6 371 km).
                let per_deg = 6_371_000.0 * std::f64::consts::PI / 180.0;
                let lat = origin_lat + y / per_deg;
                let lon = origin_lon + x / (per_deg * origin_lat.to_radians().cos());
                [round7(lon), round7(lat)]
            }
        }
    }
}

fn round7(v: f64) -> f64 {
    (v * 1e7).round() / 1e7
}

/// All junction coordinates, or `None` when any junction lacks one.
pub(crate) fn points(inst: &Instance) -> Option<Vec<(f64, f64)>> {
    inst.network()
        .junctions
        .iter()
        .map(|j| Some((j.x?, j.y?)))
        .collect()
}

/// The plan as a GeoJSON FeatureCollection, or `None` when the scenario has
/// no coordinates. Each feature is one step of a route's walk (a LineString
/// from junction to junction) with properties `route` (1-based truck number),
/// `step`, `action` (`serve` or `deadhead`), `street`, `link` (0-based index in the scenario's
/// street list, as in plan files and checker messages),
/// `from`/`to` (junction ids) and `distance`. `coords` says how to read the
/// coordinates ([`Coordinates::guess`] when `None`).
pub fn feature_collection(
    inst: &Instance,
    dist: &Distances,
    plan: &Plan,
    coords: Option<Coordinates>,
) -> Option<String> {
    points(inst)?;
    feature_collection_of_rows(inst, &all_rows(inst, dist, plan), coords)
}

/// [`feature_collection`] from the rows of every route ([`all_rows`]).
pub fn feature_collection_of_rows(
    inst: &Instance,
    all: &[Vec<SheetRow>],
    coords: Option<Coordinates>,
) -> Option<String> {
    let pts = points(inst)?;
    let coords = coords.or_else(|| Coordinates::guess(inst))?;
    let net = inst.network();
    let mut features = Vec::new();
    for (r, rows) in all.iter().enumerate() {
        for row in rows {
            let (a, b) = row.ends;
            let line = vec![
                coords.lon_lat(pts[a].0, pts[a].1),
                coords.lon_lat(pts[b].0, pts[b].1),
            ];
            features.push(json!({
                "type": "Feature",
                "geometry": { "type": "LineString", "coordinates": line },
                "properties": {
                    "route": r + 1,
                    "step": row.step,
                    "action": if row.action == Action::Serve { "serve" } else { "deadhead" },
                    "street": row.street,
                    "link": row.link,
                    "from": row.from,
                    "to": row.to,
                    "distance": row.distance,
                },
            }));
        }
    }
    let (yx, yy) = pts[inst.depot()];
    features.push(json!({
        "type": "Feature",
        "geometry": { "type": "Point", "coordinates": coords.lon_lat(yx, yy) },
        "properties": { "yard": true, "junction": net.junctions[inst.depot()].id },
    }));
    let fc = json!({ "type": "FeatureCollection", "features": Value::Array(features) });
    Some(serde_json::to_string_pretty(&fc).expect("JSON values always serialize"))
}
