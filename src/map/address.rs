//! Address points on streets: each address is given to the nearest served
//! street within the profile's snap distance, for demand per address.
//!
//! Distances here only decide which street is nearest, so a local
//! equirectangular projection (spherical Earth) is used; a grid of cells as
//! wide as the snap distance keeps the search near each point.

use std::collections::HashMap;

use super::build::Street;

const R: f64 = 6_371_000.0;

/// Projects `[lon, lat]` to metres east and north around latitude `lat0`.
fn project(p: [f64; 2], k: f64) -> [f64; 2] {
    let d = R * std::f64::consts::PI / 180.0;
    [p[0] * d * k, p[1] * d]
}

fn seg_dist(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    let len2 = dx * dx + dy * dy;
    let t = if len2 > 0.0 {
        (((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let (x, y) = (a[0] + t * dx - p[0], a[1] + t * dy - p[1]);
    (x * x + y * y).sqrt()
}

/// For every street, the number of address points nearest to it (within
/// `snap_m` metres); only streets with `served[i]` take addresses. Returns
/// the counts and how many addresses found a street.
pub(crate) fn count_addresses(
    streets: &[Street],
    served: &[bool],
    addresses: &[[f64; 2]],
    snap_m: f64,
) -> (Vec<u32>, usize) {
    let mut counts = vec![0u32; streets.len()];
    if addresses.is_empty() || streets.is_empty() || snap_m <= 0.0 {
        return (counts, 0);
    }
    let lat0 = streets[0].geometry[0][1];
    let k = lat0.to_radians().cos();
    let cell = |p: [f64; 2]| {
        (
            (p[0] / snap_m).floor() as i64,
            (p[1] / snap_m).floor() as i64,
        )
    };
    // Segment (street, start point) in every cell its bounding box touches.
    let mut grid: HashMap<(i64, i64), Vec<(usize, usize)>> = HashMap::new();
    let shapes: Vec<Vec<[f64; 2]>> = streets
        .iter()
        .map(|s| s.geometry.iter().map(|&p| project(p, k)).collect())
        .collect();
    for (i, pts) in shapes.iter().enumerate() {
        if !served[i] {
            continue;
        }
        for j in 0..pts.len().saturating_sub(1) {
            let (c0, c1) = (cell(pts[j]), cell(pts[j + 1]));
            let (x0, x1) = (c0.0.min(c1.0), c0.0.max(c1.0));
            let (y0, y1) = (c0.1.min(c1.1), c0.1.max(c1.1));
            // Very long segments cover many cells; cap the work per segment.
            if (x1 - x0 + 1) * (y1 - y0 + 1) > 10_000 {
                continue;
            }
            for x in x0..=x1 {
                for y in y0..=y1 {
                    grid.entry((x, y)).or_default().push((i, j));
                }
            }
        }
    }
    let mut snapped = 0;
    for &a in addresses {
        let p = project(a, k);
        let (cx, cy) = cell(p);
        let mut best: Option<(f64, usize)> = None;
        for x in cx - 1..=cx + 1 {
            for y in cy - 1..=cy + 1 {
                for &(i, j) in grid.get(&(x, y)).map(Vec::as_slice).unwrap_or(&[]) {
                    let d = seg_dist(p, shapes[i][j], shapes[i][j + 1]);
                    if d <= snap_m && best.is_none_or(|(bd, bi)| (d, i) < (bd, bi)) {
                        best = Some((d, i));
                    }
                }
            }
        }
        if let Some((_, i)) = best {
            counts[i] += 1;
            snapped += 1;
        }
    }
    (counts, snapped)
}
