//! Where the trucks start: a point snapped to the nearest drivable junction,
//! a node id, or the junction nearest the map's centre.

use std::fmt;
use std::str::FromStr;

use super::error::MapError;
use super::length::metres;

/// How the yard is given.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum YardChoice {
    /// A point (WGS84 decimal degrees), snapped to the nearest junction.
    Point {
        /// Longitude.
        lon: f64,
        /// Latitude.
        lat: f64,
    },
    /// A node of the map by id (OSM node id; GeoJSON: the reader's number).
    Node(i64),
}

impl FromStr for YardChoice {
    type Err = MapError;

    /// `LON,LAT` (such as `24.94,60.17`) or `node:ID`.
    ///
    /// ```
    /// use arcwright::map::YardChoice;
    /// assert_eq!("node:42".parse::<YardChoice>().unwrap(), YardChoice::Node(42));
    /// assert!(matches!("24.9, 60.1".parse(), Ok(YardChoice::Point { .. })));
    /// assert!("60.1".parse::<YardChoice>().is_err());
    /// ```
    fn from_str(s: &str) -> Result<Self, MapError> {
        let bad = || MapError::YardSyntax {
            text: s.to_string(),
        };
        if let Some(id) = s.trim().strip_prefix("node:") {
            return id.trim().parse().map(YardChoice::Node).map_err(|_| bad());
        }
        let (a, b) = s.split_once(',').ok_or_else(bad)?;
        let lon: f64 = a.trim().parse().map_err(|_| bad())?;
        let lat: f64 = b.trim().parse().map_err(|_| bad())?;
        if !(-180.0..=180.0).contains(&lon) || !(-90.0..=90.0).contains(&lat) {
            return Err(bad());
        }
        Ok(YardChoice::Point { lon, lat })
    }
}

/// How the yard was found.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum YardHow {
    /// Snapped from the given point; `distance_m` away.
    Snapped {
        /// The point given.
        lon: f64,
        /// The point given.
        lat: f64,
        /// Distance from the point to the junction, metres.
        distance_m: f64,
    },
    /// The node given.
    Node,
    /// No yard given: the junction nearest the centre of the map's streets.
    Centre {
        /// Distance from the centre to the junction, metres.
        distance_m: f64,
    },
}

/// The yard as placed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct YardReport {
    /// The junction's node id.
    pub node: i64,
    /// Its longitude.
    pub lon: f64,
    /// Its latitude.
    pub lat: f64,
    /// How it was found.
    pub how: YardHow,
}

impl fmt::Display for YardReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "junction {} at {:.6}, {:.6}",
            self.node, self.lon, self.lat
        )?;
        match self.how {
            YardHow::Snapped { distance_m, .. } => {
                write!(f, " (the given point snapped {distance_m:.0} m)")
            }
            YardHow::Node => write!(f, " (the node given)"),
            YardHow::Centre { distance_m } => write!(
                f,
                " (no yard given: the junction nearest the map's centre, {distance_m:.0} m from it)"
            ),
        }
    }
}

/// The junction (index) nearest to a point, and its distance in metres.
pub(crate) fn nearest(junctions: &[[f64; 2]], p: [f64; 2]) -> Option<(usize, f64)> {
    junctions
        .iter()
        .enumerate()
        .map(|(i, &q)| (i, metres(p, q)))
        .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)))
}

/// The centre of the bounding box of the junctions.
pub(crate) fn centre(junctions: &[[f64; 2]]) -> [f64; 2] {
    let (mut x0, mut y0, mut x1, mut y1) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
    for p in junctions {
        x0 = x0.min(p[0]);
        y0 = y0.min(p[1]);
        x1 = x1.max(p[0]);
        y1 = y1.max(p[1]);
    }
    [(x0 + x1) / 2.0, (y0 + y1) / 2.0]
}
