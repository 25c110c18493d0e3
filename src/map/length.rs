//! Lengths on the WGS84 ellipsoid (Karney's geodesic algorithm, via the `geo`
//! crate), in metres.

use geo::{Distance, Geodesic, Point};

/// Geodesic distance between two `[lon, lat]` points, metres.
pub fn metres(a: [f64; 2], b: [f64; 2]) -> f64 {
    Geodesic.distance(Point::new(a[0], a[1]), Point::new(b[0], b[1]))
}

/// Length of a polyline of `[lon, lat]` points, metres.
pub fn polyline_metres(points: &[[f64; 2]]) -> f64 {
    points.windows(2).map(|w| metres(w[0], w[1])).sum()
}
