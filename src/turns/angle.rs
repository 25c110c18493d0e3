//! The kind of a turn from the street geometry: left, right, straight or U-turn.
//!
//! The heading of a street at a junction is the direction of its last (or
//! first) straight piece there: from the geometry point next to the junction,
//! or from the other end when the street has no geometry. WGS 84 longitudes
//! are scaled by the cosine of the junction's latitude (a local flat map).
//! The turn is *straight* when the two headings are within 30° of each other
//! (common practice; no source), else *left* or *right* by the sign of their
//! cross product (y north). The test uses products only, no trigonometry on
//! the angle, so it is exact up to the rounding of the coordinates.

use super::rules::TurnKind;
use crate::model::{Coordinates, Network};

/// `tan 30°`: the straight-ahead half-width.
const TAN_30: f64 = 0.577_350_269_189_625_8;

/// The point next to junction `at` along link `link`, and `at`'s own point,
/// in local planar units; `None` without coordinates.
fn piece(
    net: &Network,
    coords: Coordinates,
    link: usize,
    at: usize,
) -> Option<([f64; 2], [f64; 2])> {
    let l = &net.links[link];
    let here = &net.junctions[at];
    let (hx, hy) = (here.x?, here.y?);
    let next = if l.geometry.len() >= 2 {
        if at == l.from {
            l.geometry[1]
        } else {
            l.geometry[l.geometry.len() - 2]
        }
    } else {
        let other = &net.junctions[if at == l.from { l.to } else { l.from }];
        [other.x?, other.y?]
    };
    let sx = match coords {
        Coordinates::Wgs84 => hy.to_radians().cos(),
        _ => 1.0,
    };
    Some(([next[0] * sx, next[1]], [hx * sx, hy]))
}

/// The kind of the turn made at junction `via` when arriving along `from`
/// and leaving along `to` (link indices). Leaving along the link one arrived
/// on is a U-turn (except on a loop street that starts and ends at `via`);
/// without coordinates every other turn is [`TurnKind::Unknown`].
pub fn turn_kind(
    net: &Network,
    coords: Coordinates,
    from: usize,
    via: usize,
    to: usize,
) -> TurnKind {
    let lf = &net.links[from];
    if from == to && lf.from != lf.to {
        return TurnKind::UTurn;
    }
    let (Some((p, v)), Some((q, _))) = (piece(net, coords, from, via), piece(net, coords, to, via))
    else {
        return TurnKind::Unknown;
    };
    // Incoming heading: from p to v; outgoing: from v to q.
    let a = [v[0] - p[0], v[1] - p[1]];
    let b = [q[0] - v[0], q[1] - v[1]];
    let dot = a[0] * b[0] + a[1] * b[1];
    let cross = a[0] * b[1] - a[1] * b[0];
    if (a[0] == 0.0 && a[1] == 0.0) || (b[0] == 0.0 && b[1] == 0.0) || !dot.is_finite() {
        return TurnKind::Unknown;
    }
    if dot > 0.0 && cross.abs() <= TAN_30 * dot {
        TurnKind::Straight
    } else if cross > 0.0 {
        TurnKind::Left
    } else {
        TurnKind::Right
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::{Junction, Link};

    fn net(points: &[(f64, f64)], links: &[(usize, usize)]) -> Network {
        Network {
            junctions: points
                .iter()
                .enumerate()
                .map(|(i, &(x, y))| Junction {
                    id: i as u64 + 1,
                    x: Some(x),
                    y: Some(y),
                })
                .collect(),
            links: links
                .iter()
                .map(|&(from, to)| Link {
                    from,
                    to,
                    cost: 1,
                    ..Link::default()
                })
                .collect(),
            turn_restrictions: Vec::new(),
        }
    }

    #[test]
    fn a_cross_junction() {
        // Centre 0; arms east 1, north 2, west 3, south 4.
        let n = net(
            &[(0.0, 0.0), (1.0, 0.0), (0.0, 1.0), (-1.0, 0.0), (0.0, -1.0)],
            &[(1, 0), (0, 2), (0, 3), (0, 4)],
        );
        let c = Coordinates::Planar { origin: None };
        // Arriving from the east (heading west).
        assert_eq!(turn_kind(&n, c, 0, 0, 2), TurnKind::Straight);
        assert_eq!(turn_kind(&n, c, 0, 0, 3), TurnKind::Left); // west -> south
        assert_eq!(turn_kind(&n, c, 0, 0, 1), TurnKind::Right); // west -> north
        assert_eq!(turn_kind(&n, c, 0, 0, 0), TurnKind::UTurn);
        // Arriving from the north along link 1 (driven 2 -> 0, heading south).
        assert_eq!(turn_kind(&n, c, 1, 0, 0), TurnKind::Left); // south -> east
    }

    #[test]
    fn no_coordinates_only_u_turns_are_known() {
        let mut n = net(&[(0.0, 0.0), (1.0, 0.0), (2.0, 0.0)], &[(0, 1), (1, 2)]);
        n.junctions[1].x = None;
        let c = Coordinates::Undeclared;
        assert_eq!(turn_kind(&n, c, 0, 1, 1), TurnKind::Unknown);
        assert_eq!(turn_kind(&n, c, 0, 1, 0), TurnKind::UTurn);
    }
}
