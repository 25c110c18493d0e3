//! The coordinate system of a scenario's junctions, declared, never guessed.
//!
//! - [`Coordinates::Wgs84`]: `x` is the longitude and `y` the latitude in
//!   degrees (WGS 84, as in GeoJSON and OpenStreetMap).
//! - [`Coordinates::Planar`]: `x` east and `y` north in metres, optionally
//!   placed on the Earth by the longitude and latitude of the point `(0, 0)`.
//!   Without that origin the network can be drawn (SVG) but not placed on a
//!   world map (no GeoJSON).
//! - [`Coordinates::Undeclared`]: the scenario does not say (files written
//!   before the declaration existed). Drawn as plain planar numbers without
//!   a scale bar; never placed on a world map.

use serde::{Deserialize, Serialize};

/// Mean Earth radius in metres (spherical model).
pub const EARTH_RADIUS_M: f64 = 6_371_000.0;

/// A map from scenario coordinates to metres east and north.
pub type Projection = Box<dyn Fn(f64, f64) -> (f64, f64)>;

/// How the junction coordinates `x`, `y` are to be read.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize, Deserialize)]
pub enum Coordinates {
    /// Not declared.
    #[default]
    Undeclared,
    /// Longitude (`x`) and latitude (`y`) in degrees, WGS 84.
    Wgs84,
    /// Planar metres, `x` east and `y` north.
    Planar {
        /// Longitude and latitude (degrees, WGS 84) of the point `(0, 0)`.
        origin: Option<(f64, f64)>,
    },
}

/// A junction coordinate that cannot be what the scenario says it is.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{axis} {value} is {reason}")]
pub struct CoordError {
    /// `longitude`, `latitude`, `x` or `y`.
    pub axis: &'static str,
    /// The value as written (shortest text that reads back to it).
    pub value: String,
    /// What is wrong with it.
    pub reason: &'static str,
}

fn check(axis: &'static str, v: f64, limit: Option<f64>) -> Result<(), CoordError> {
    let bad = |reason| {
        Err(CoordError {
            axis,
            value: v.to_string(),
            reason,
        })
    };
    if !v.is_finite() {
        return bad("not a finite number");
    }
    match limit {
        Some(l) if v.abs() > l => bad(if l == 90.0 {
            "outside -90..=90 degrees"
        } else {
            "outside -180..=180 degrees"
        }),
        // Planar coordinates beyond the Earth's circumference are not a town.
        None if v.abs() > 4.0e7 => bad("beyond 40,000 km from the origin"),
        _ => Ok(()),
    }
}

impl Coordinates {
    /// Checks one junction's `(x, y)` against the system: finite numbers,
    /// longitude within ±180 and latitude within ±90 degrees for WGS 84,
    /// planar values within 40,000 km.
    ///
    /// # Errors
    ///
    /// A [`CoordError`] naming the axis, the value and the reason.
    pub fn check_point(self, x: f64, y: f64) -> Result<(), CoordError> {
        match self {
            Coordinates::Wgs84 => {
                check("longitude", x, Some(180.0))?;
                check("latitude", y, Some(90.0))
            }
            Coordinates::Planar { origin } => {
                check("x", x, None)?;
                check("y", y, None)?;
                // Placed on the Earth, the point must land on it.
                match origin.and_then(|_| self.lon_lat(x, y)) {
                    Some([lon, lat]) if lon.abs() > 180.0 || lat.abs() > 90.0 => Err(CoordError {
                        axis: if lat.abs() > 90.0 { "y" } else { "x" },
                        value: if lat.abs() > 90.0 { y } else { x }.to_string(),
                        reason: "too far from the origin to be placed on the Earth",
                    }),
                    _ => Ok(()),
                }
            }
            Coordinates::Undeclared => {
                check("x", x, None)?;
                check("y", y, None)
            }
        }
    }

    /// Checks the origin of a planar system (a longitude/latitude pair).
    ///
    /// # Errors
    ///
    /// A [`CoordError`] naming the axis, the value and the reason.
    pub fn check_origin(lon: f64, lat: f64) -> Result<(), CoordError> {
        Coordinates::Wgs84.check_point(lon, lat)
    }

    /// Whether points can be placed on a world map (GeoJSON).
    pub fn placeable(self) -> bool {
        matches!(
            self,
            Coordinates::Wgs84 | Coordinates::Planar { origin: Some(_) }
        )
    }

    /// Longitude and latitude of `(x, y)`, or `None` when the system cannot
    /// be placed on a world map. Planar metres are converted with a local
    /// equirectangular approximation around the origin (spherical Earth),
    /// good to a few metres over a town; values are rounded to 7 decimals
    /// (about 1 cm).
    pub fn lon_lat(self, x: f64, y: f64) -> Option<[f64; 2]> {
        match self {
            Coordinates::Wgs84 => Some([x, y]),
            Coordinates::Planar {
                origin: Some((lon0, lat0)),
            } => {
                let per_deg = EARTH_RADIUS_M * std::f64::consts::PI / 180.0;
                let lat = lat0 + y / per_deg;
                let lon = lon0 + x / (per_deg * lat0.to_radians().cos().max(1e-6));
                Some([round7(lon), round7(lat)])
            }
            _ => None,
        }
    }

    /// Metres east and north of `(x0, y0)` for drawing: planar coordinates
    /// as they are, WGS 84 projected equirectangularly with `cos(lat0)`
    /// scaling of longitudes (distances right to under 1% across a town).
    /// `None` for undeclared systems, whose unit is unknown.
    pub fn metres(self, lat0: f64) -> Option<Projection> {
        let per_deg = EARTH_RADIUS_M * std::f64::consts::PI / 180.0;
        let k = lat0.to_radians().cos();
        match self {
            Coordinates::Wgs84 => Some(Box::new(move |x: f64, y: f64| {
                (x * per_deg * k, y * per_deg)
            })),
            Coordinates::Planar { .. } => Some(Box::new(|x: f64, y: f64| (x, y))),
            Coordinates::Undeclared => None,
        }
    }
}

fn round7(v: f64) -> f64 {
    (v * 1e7).round() / 1e7
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn impossible_points_are_refused() {
        assert!(Coordinates::Wgs84.check_point(24.9, 60.2).is_ok());
        let e = Coordinates::Wgs84.check_point(24.9, 8993.0).unwrap_err();
        assert_eq!(e.axis, "latitude");
        assert!(Coordinates::Wgs84.check_point(-181.0, 0.0).is_err());
        assert!(Coordinates::Wgs84.check_point(f64::NAN, 0.0).is_err());
        let p = Coordinates::Planar { origin: None };
        assert!(p.check_point(1e308, 0.0).is_err());
        assert!(p.check_point(250.0, -180.0).is_ok());
    }

    #[test]
    fn planar_metres_are_placed_around_the_origin() {
        let c = Coordinates::Planar {
            origin: Some((10.0, 60.0)),
        };
        // One degree of latitude is about 111.2 km; at 60° N a degree of
        // longitude is half that (cos 60° = 0.5).
        let [lon, lat] = c.lon_lat(55_597.5, 111_195.0).unwrap();
        assert!((lat - 61.0).abs() < 1e-4, "{lat}");
        assert!((lon - 11.0).abs() < 1e-3, "{lon}");
        assert!(Coordinates::Planar { origin: None }
            .lon_lat(0.0, 0.0)
            .is_none());
        assert!(Coordinates::Undeclared.lon_lat(0.0, 0.0).is_none());
    }
}
