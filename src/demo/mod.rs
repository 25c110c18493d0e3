//! Seeded generator of invented demo towns.
//!
//! [`town`] builds a whole [`Instance`] from a [`TownSpec`]: a street grid in
//! the centre, rings of curving suburban streets around it joined by spokes,
//! a few cul-de-sacs on the outskirts, a fast non-required arterial running
//! diagonally across the town, some one-way streets, a couple of streets whose
//! two sides are served separately, invented street names, a yard by the
//! arterial and a fleet of a few trucks.
//!
//! Units: coordinates and costs are metres (the cost of a link is its length,
//! so a plan's cost is the distance driven), demands are bins, times are
//! seconds. The town is the same for the same spec on every machine (the
//! random source is ChaCha8 seeded from [`TownSpec::seed`]).
//!
//! ```
//! use arcwright::demo::{town, TownSpec};
//! let inst = town(&TownSpec::new(7, 4)).unwrap();
//! assert!(inst.tasks().len() > 40);
//! assert_eq!(inst, town(&TownSpec::new(7, 4)).unwrap()); // deterministic
//! ```
//!
//! The figures used (house frontages, truck speeds, time per bin, truck
//! capacity in bins) are plausible round numbers chosen for the demo, not
//! measurements.

use std::collections::HashSet;
use std::f64::consts::PI;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use crate::model::{
    Coordinates, Cost, Fleet, Instance, Junction, Link, ModelError, Network, ServeDirection,
    ServiceSpec, Units,
};

/// What kind of town to invent.
#[derive(Clone, Debug, PartialEq)]
pub struct TownSpec {
    /// Seed of the random source; the same spec gives the same town.
    pub seed: u64,
    /// Blocks along each side of the central grid (the grid has
    /// `blocks + 1` junctions per side). At least 2.
    pub blocks: usize,
    /// Rings of suburban streets around the grid (0 for none).
    pub rings: usize,
    /// Cul-de-sacs on the outermost ring (or on the grid edge without rings).
    pub cul_de_sacs: usize,
    /// Load limit of a truck, in bins.
    pub capacity: Cost,
    /// Shift limit of a truck, in seconds.
    pub shift_limit: Option<Cost>,
    /// Largest number of trucks; `None` sizes the fleet from the town
    /// (enough for the load and the work time, plus two spares).
    pub max_trucks: Option<usize>,
}

impl TownSpec {
    /// A town of `blocks` × `blocks` central blocks with a ring of suburbs per
    /// three blocks (at least one), trucks of 700 bins and rounds of at most
    /// four hours (one load from the yard to the yard).
    pub fn new(seed: u64, blocks: usize) -> Self {
        TownSpec {
            seed,
            blocks,
            rings: (blocks / 3).max(1),
            cul_de_sacs: 2 + blocks / 2,
            capacity: 700,
            shift_limit: Some(4 * 3600),
            max_trucks: None,
        }
    }

    /// The committed demo town (`instances/demo-town.json`): seed 2026, eight
    /// blocks, two rings: a few hundred streets.
    pub fn demo() -> Self {
        TownSpec::new(2026, 8)
    }
}

/// `k` copies of `one` sharing only its yard junction (the yard becomes
/// junction 0), with `one`'s capacity and no fleet bound, shift limit or
/// street names: a reference instance of any size whose optimum is known
/// when `one`'s is. A route serving streets of several copies passes the
/// yard between them and can be cut there into routes of single copies at
/// the same cost and within capacity, so the optimum of the copies is
/// exactly `k` times the optimum of `one` without a fleet bound or shift
/// limit (and `k` copies of an optimal plan of `one` reach it).
///
/// ```
/// use arcwright::demo::{glued_copies, town, TownSpec};
/// let one = town(&TownSpec::new(7, 2)).unwrap();
/// let three = glued_copies(&one, 3).unwrap();
/// assert_eq!(three.tasks().len(), 3 * one.tasks().len());
/// assert_eq!(three.depot(), 0);
/// ```
///
/// # Errors
/// [`ModelError`] when the copies do not make a valid instance, as for
/// [`Instance::new`].
pub fn glued_copies(one: &Instance, k: usize) -> Result<Instance, ModelError> {
    let net = one.network();
    let nj = net.junctions.len();
    let depot = one.depot();
    let map = |c: usize, v: usize| {
        if v == depot {
            0
        } else {
            1 + c * (nj - 1) + if v < depot { v } else { v - 1 }
        }
    };
    let mut out = Network::with_junctions(1 + k * (nj - 1));
    for c in 0..k {
        for l in &net.links {
            let mut copy = l.clone();
            copy.from = map(c, l.from);
            copy.to = map(c, l.to);
            copy.name = None;
            out.add_link(copy);
        }
    }
    let fleet = Fleet::with_capacity(one.fleet().capacity);
    Instance::new(format!("{} x{k}", one.name), out, fleet, 0)
}

/// Grid spacing (metres).
const BLOCK: f64 = 120.0;
/// Junction spacing along suburban rings (metres).
const RING_STEP: f64 = 105.0;
/// Distance between suburban rings (metres).
const RING_GAP: f64 = 150.0;
/// Deadhead speed on town streets (m/s, about 30 km/h).
const STREET_SPEED: f64 = 8.3;
/// Deadhead speed on the arterial (m/s, about 60 km/h).
const ARTERIAL_SPEED: f64 = 16.7;
/// Creeping speed while collecting (m/s).
const SERVE_SPEED: f64 = 2.5;
/// Seconds per bin emptied.
const SECONDS_PER_BIN: f64 = 8.0;

const NAME_FIRST: &[&str] = &[
    "Alder", "Bracken", "Cinder", "Dovet", "Ember", "Fallow", "Gorse", "Hazel", "Ivel", "Juniper",
    "Kestle", "Linnet", "Marrow", "Nettle", "Oriel", "Pipit", "Quill", "Rook", "Sorrel", "Tansy",
    "Umber", "Vetch", "Wren", "Yarrow", "Brindle", "Copper", "Drover", "Furrow", "Gable", "Heron",
    "Larch", "Mallow", "Orchard", "Pennant", "Rushy", "Saddle", "Thimble", "Wicker", "Barley",
    "Clover",
];
const NAME_SECOND: &[&str] = &[
    "brook", "field", "gate", "holm", "ley", "mead", "ridge", "stead", "ton", "wick", "worth",
    "combe", "dene", "fold", "hurst", "moor", "shaw", "well", "croft", "bank",
];
const GRID_KINDS: &[&str] = &["Street", "Road", "Row", "Lane"];
const RING_KINDS: &[&str] = &["Crescent", "Drive", "Gardens", "Rise", "Walk", "Grove"];
const SPOKE_KINDS: &[&str] = &["Lane", "Path", "Hill", "Way"];
const DEAD_END_KINDS: &[&str] = &["Close", "Court", "Mews", "End"];

struct Names {
    used: HashSet<String>,
}

impl Names {
    fn pick(&mut self, rng: &mut ChaCha8Rng, kinds: &[&str]) -> String {
        for attempt in 0.. {
            let a = NAME_FIRST[rng.random_range(0..NAME_FIRST.len())];
            let b = NAME_SECOND[rng.random_range(0..NAME_SECOND.len())];
            let k = kinds[rng.random_range(0..kinds.len())];
            // Half the names are compounds ("Hazelmead Rise"), half plain ("Hazel Rise").
            let name = if rng.random_bool(0.5) || attempt > 20 {
                format!("{a}{b} {k}")
            } else {
                format!("{a} {k}")
            };
            let name = if attempt > 40 {
                format!("{name} {}", attempt - 40)
            } else {
                name
            };
            if self.used.insert(name.clone()) {
                return name;
            }
        }
        unreachable!()
    }
}

struct Builder {
    net: Network,
    rng: ChaCha8Rng,
    names: Names,
}

impl Builder {
    fn junction(&mut self, x: f64, y: f64) -> usize {
        let id = self.net.junctions.len() as u64 + 1;
        self.net.junctions.push(Junction {
            id,
            x: Some((x * 10.0).round() / 10.0),
            y: Some((y * 10.0).round() / 10.0),
        });
        self.net.junctions.len() - 1
    }

    fn xy(&self, j: usize) -> (f64, f64) {
        let p = &self.net.junctions[j];
        (p.x.unwrap_or(0.0), p.y.unwrap_or(0.0))
    }

    fn straight(&self, a: usize, b: usize) -> f64 {
        let (ax, ay) = self.xy(a);
        let (bx, by) = self.xy(b);
        ((ax - bx).powi(2) + (ay - by).powi(2)).sqrt()
    }

    /// Adds a street link of `length` metres; `frontage` is metres of kerb per
    /// bin (both sides together), `None` for a link that needs no service.
    #[allow(clippy::too_many_arguments)]
    fn street(
        &mut self,
        a: usize,
        b: usize,
        length: f64,
        oneway: bool,
        frontage: Option<f64>,
        direction: ServeDirection,
        speed: f64,
        name: &str,
    ) -> usize {
        let length = length.max(1.0);
        let service = frontage.map(|f| {
            let bins = ((length / f) * self.rng.random_range(0.6..1.4))
                .round()
                .max(1.0);
            ServiceSpec {
                demand: bins as Cost,
                cost: length.round() as Cost,
                time: Some((length / SERVE_SPEED + bins * SECONDS_PER_BIN).round() as Cost),
                direction,
            }
        });
        self.net.add_link(Link {
            from: a,
            to: b,
            oneway,
            cost: length.round() as Cost,
            time: Some((length / speed).round().max(1.0) as Cost),
            service,
            name: Some(name.to_string()),
            ..Link::default()
        })
    }
}

/// Invents a town as described by `spec` (see the [module docs](self)).
///
/// `blocks` below 2 is raised to 2 and a capacity below 60 bins to 60 (the
/// fullest street of a town carries fewer bins). The only error left is a
/// shift limit too short for some street on its own (a few minutes suffice).
///
/// # Errors
/// [`ModelError`] only when the shift limit is too short for some street on its own.
pub fn town(spec: &TownSpec) -> Result<Instance, ModelError> {
    let blocks = spec.blocks.max(2);
    let capacity = spec.capacity.max(60);
    let mut b = Builder {
        net: Network::default(),
        rng: ChaCha8Rng::seed_from_u64(spec.seed),
        names: Names {
            used: HashSet::new(),
        },
    };
    // The parts in the order they draw from the generator (the order is
    // part of the town a seed makes).
    let grid = central_grid(&mut b, blocks);
    let half = blocks as f64 * BLOCK / 2.0;
    let corner = half * std::f64::consts::SQRT_2;
    let rings = suburban_rings(&mut b, spec, corner);
    let perimeter = connectors_and_spokes(&mut b, &grid, &rings);
    cul_de_sacs(&mut b, spec, &rings, &perimeter);
    let yard = arterial_and_yard(&mut b, spec, &grid, &rings, corner);
    let fleet = fleet_for(&b.net, spec, capacity);
    let name = format!("demo town (seed {}, {} blocks)", spec.seed, blocks);
    // Costs are metres of street, times seconds, demands bins; the town is
    // invented, so its planar metres have no place on the Earth.
    let inst = Instance::new(name, b.net, fleet, yard)?.with_units(Units {
        cost: Some("m".into()),
        length: None,
        time: Some("s".into()),
        load: Some("bins".into()),
    });
    Ok(inst
        .with_coordinates(Coordinates::Planar { origin: None })
        .expect("the generator places junctions within a few kilometres"))
}

/// The central grid of `blocks` x `blocks` blocks: `grid[row][col]`
/// junctions (row 0 at the south), one-way interior rows, two avenues whose
/// sides are served apart.
fn central_grid(b: &mut Builder, blocks: usize) -> Vec<Vec<usize>> {
    let n = blocks + 1;
    let half = blocks as f64 * BLOCK / 2.0;
    let mut grid = vec![vec![0usize; n]; n]; // grid[row][col], row 0 at the south
    for (r, row) in grid.iter_mut().enumerate() {
        for (c, cell) in row.iter_mut().enumerate() {
            let jx = b.rng.random_range(-8.0..8.0);
            let jy = b.rng.random_range(-8.0..8.0);
            let x = c as f64 * BLOCK - half + jx;
            let y = r as f64 * BLOCK - half + jy;
            *cell = b.junction(x, y);
        }
    }
    // Interior rows may be one-way; columns stay two-way so the grid stays
    // strongly connected. Two interior columns have their sides served apart.
    let oneway_rows: Vec<bool> = (0..n).map(|r| r > 0 && r + 1 < n && r % 3 == 1).collect();
    let mut two_sided: Vec<usize> = Vec::new();
    if n >= 4 {
        two_sided.push(1 + b.rng.random_range(0..(n - 2) / 2));
        let second = n - 2 - b.rng.random_range(0..(n - 2) / 2);
        if second != two_sided[0] {
            two_sided.push(second);
        }
    }
    for r in 0..n {
        let name = b.names.pick(&mut b.rng, GRID_KINDS);
        let eastward = r % 2 == 1;
        for c in 0..blocks {
            let (mut u, mut v) = (grid[r][c], grid[r][c + 1]);
            if oneway_rows[r] && !eastward {
                std::mem::swap(&mut u, &mut v);
            }
            let len = b.straight(u, v);
            b.street(
                u,
                v,
                len,
                oneway_rows[r],
                Some(14.0),
                if oneway_rows[r] {
                    ServeDirection::Forward
                } else {
                    ServeDirection::Either
                },
                STREET_SPEED,
                &name,
            );
        }
    }
    for c in 0..n {
        let name = b.names.pick(&mut b.rng, &["Avenue", "Street", "Road"]);
        for pair in grid.windows(2) {
            let (u, v) = (pair[0][c], pair[1][c]);
            let len = b.straight(u, v);
            if two_sided.contains(&c) {
                // Each side carries its own bins: one required link per side,
                // served in the direction of travel on that side.
                b.street(
                    u,
                    v,
                    len,
                    false,
                    Some(24.0),
                    ServeDirection::Forward,
                    STREET_SPEED,
                    &format!("{name} (northbound side)"),
                );
                b.street(
                    v,
                    u,
                    len,
                    false,
                    Some(24.0),
                    ServeDirection::Forward,
                    STREET_SPEED,
                    &format!("{name} (southbound side)"),
                );
            } else {
                b.street(
                    u,
                    v,
                    len,
                    false,
                    Some(14.0),
                    ServeDirection::Either,
                    STREET_SPEED,
                    &name,
                );
            }
        }
    }
    grid
}

/// Rings of curving suburban streets around the grid (corner distance
/// `corner`); each ring as (junction, angle) pairs.
fn suburban_rings(b: &mut Builder, spec: &TownSpec, corner: f64) -> Vec<Vec<(usize, f64)>> {
    let mut rings: Vec<Vec<(usize, f64)>> = Vec::new(); // (junction, angle)
    for k in 0..spec.rings {
        let radius = corner + 110.0 + RING_GAP * k as f64;
        let count = ((2.0 * PI * radius / RING_STEP).round() as usize).max(12);
        let phase = b.rng.random_range(0.0..2.0 * PI);
        let (wobble, lobes) = (
            b.rng.random_range(8.0..25.0),
            b.rng.random_range(3..7) as f64,
        );
        let offset = b.rng.random_range(0.0..2.0 * PI / count as f64);
        let mut ring = Vec::with_capacity(count);
        for i in 0..count {
            let a = offset + 2.0 * PI * i as f64 / count as f64;
            let rr = radius + wobble * (lobes * a + phase).sin();
            ring.push((b.junction(rr * a.cos(), rr * a.sin()), a));
        }
        // Ring streets: crescents of 4 to 8 links, each with its own name.
        let mut i = 0;
        while i < count {
            let len = b.rng.random_range(4..=8).min(count - i);
            let name = b.names.pick(&mut b.rng, RING_KINDS);
            for s in i..i + len {
                let (u, v) = (ring[s].0, ring[(s + 1) % count].0);
                // A curving street is a little longer than its chord.
                let length = b.straight(u, v) * 1.04;
                b.street(
                    u,
                    v,
                    length,
                    false,
                    Some(20.0),
                    ServeDirection::Either,
                    STREET_SPEED,
                    &name,
                );
            }
            i += len;
        }
        rings.push(ring);
    }
    rings
}

/// Streets from the grid's edge to the first ring and spokes between rings;
/// returns the grid's perimeter junctions.
fn connectors_and_spokes(
    b: &mut Builder,
    grid: &[Vec<usize>],
    rings: &[Vec<(usize, f64)>],
) -> Vec<usize> {
    let n = grid.len();
    // Connectors from the grid edge to the first ring, and spokes between rings.
    let perimeter: Vec<usize> = (0..n)
        .flat_map(|i| [grid[0][i], grid[n - 1][i], grid[i][0], grid[i][n - 1]])
        .collect::<Vec<_>>();
    let mut perimeter = perimeter;
    perimeter.sort_unstable();
    perimeter.dedup();
    if let Some(first) = rings.first().cloned() {
        for (idx, &p) in perimeter.iter().enumerate() {
            if idx % 2 == 1 {
                continue;
            }
            let q = nearest(b, &first, p);
            let len = b.straight(p, q) * 1.02;
            let name = b.names.pick(&mut b.rng, SPOKE_KINDS);
            let required = b.rng.random_bool(0.7);
            b.street(
                p,
                q,
                len,
                false,
                required.then_some(22.0),
                ServeDirection::Either,
                STREET_SPEED,
                &name,
            );
        }
    }
    for k in 1..rings.len() {
        let (inner, outer) = (rings[k - 1].clone(), rings[k].clone());
        let every = 4;
        let start = b.rng.random_range(0..every);
        for (i, &(p, _)) in inner.iter().enumerate() {
            if i % every != start {
                continue;
            }
            let q = nearest(b, &outer, p);
            let len = b.straight(p, q) * 1.03;
            let name = b.names.pick(&mut b.rng, SPOKE_KINDS);
            b.street(
                p,
                q,
                len,
                false,
                Some(22.0),
                ServeDirection::Either,
                STREET_SPEED,
                &name,
            );
        }
    }
    perimeter
}

/// Dead-end streets of one or two links off the outermost ring (or the
/// grid's perimeter when there is no ring).
fn cul_de_sacs(b: &mut Builder, spec: &TownSpec, rings: &[Vec<(usize, f64)>], perimeter: &[usize]) {
    // --- Cul-de-sacs on the outskirts ----------------------------------------
    let base: Vec<usize> = match rings.last() {
        Some(r) => r.iter().map(|&(j, _)| j).collect(),
        None => perimeter.to_vec(),
    };
    let mut taken = HashSet::new();
    for _ in 0..spec.cul_de_sacs {
        let mut p = base[b.rng.random_range(0..base.len())];
        for _ in 0..10 {
            if !taken.contains(&p) {
                break;
            }
            p = base[b.rng.random_range(0..base.len())];
        }
        if !taken.insert(p) {
            continue;
        }
        let name = b.names.pick(&mut b.rng, DEAD_END_KINDS);
        let (px, py) = b.xy(p);
        let r = (px * px + py * py).sqrt().max(1.0);
        let (ux, uy) = (px / r, py / r);
        let segs = b.rng.random_range(1..=2);
        let mut at = p;
        let bend = b.rng.random_range(-0.4..0.4);
        for s in 1..=segs {
            let d = 55.0 * s as f64;
            let (bx, by) = (-uy * bend * d, ux * bend * d);
            let q = b.junction(px + ux * d + bx, py + uy * d + by);
            let len = b.straight(at, q);
            b.street(
                at,
                q,
                len,
                false,
                Some(16.0),
                ServeDirection::Either,
                STREET_SPEED,
                &name,
            );
            at = q;
        }
    }
}

/// The fast road on the diagonal (nothing to collect) and the yard beyond
/// its south-western end; returns the yard.
fn arterial_and_yard(
    b: &mut Builder,
    spec: &TownSpec,
    grid: &[Vec<usize>],
    rings: &[Vec<(usize, f64)>],
    corner: f64,
) -> usize {
    let n = grid.len();
    // --- The arterial and the yard ------------------------------------------
    // A fast road on the south-west to north-east diagonal with interchanges
    // at the grid's corners and centre and at each ring; nothing to collect
    // on it. The yard sits beyond its south-western end.
    let arterial = b.names.pick(&mut b.rng, &["Bypass", "Parkway"]);
    let mut stops: Vec<usize> = Vec::new();
    let sw_angle = 1.25 * PI;
    let ne_angle = 0.25 * PI;
    for ring in rings.iter().rev() {
        stops.push(nearest_angle(ring, sw_angle));
    }
    stops.push(grid[0][0]);
    stops.push(grid[n / 2][n / 2]);
    stops.push(grid[n - 1][n - 1]);
    for ring in rings.iter() {
        stops.push(nearest_angle(ring, ne_angle));
    }
    let outer = corner + 110.0 + RING_GAP * spec.rings as f64 + 120.0;
    let yard_at = sw_angle.cos() * outer;
    let yard = b.junction(yard_at, yard_at);
    stops.insert(0, yard);
    for w in stops.windows(2) {
        let len = b.straight(w[0], w[1]);
        let name = if w[0] == yard {
            "Yard access road".to_string()
        } else {
            arterial.clone()
        };
        b.street(
            w[0],
            w[1],
            len,
            false,
            None,
            ServeDirection::Either,
            ARTERIAL_SPEED,
            &name,
        );
    }
    yard
}

/// A fleet for the town: enough trucks for the load and the work, plus two.
fn fleet_for(net: &Network, spec: &TownSpec, capacity: Cost) -> Fleet {
    let demand: Cost = net
        .links
        .iter()
        .filter_map(|l| l.service.as_ref())
        .map(|s| s.demand)
        .sum();
    let work: Cost = net
        .links
        .iter()
        .filter_map(|l| l.service.as_ref())
        .map(|s| s.time.unwrap_or(s.cost))
        .sum();
    let by_load = (demand + capacity - 1) / capacity;
    let by_time = spec
        .shift_limit
        .map_or(0, |s| (work + s.max(1) - 1) / s.max(1));
    let max_trucks = spec.max_trucks.unwrap_or(by_load.max(by_time) as usize + 2);
    Fleet {
        capacity,
        shift_limit: spec.shift_limit,
        max_vehicles: Some(max_trucks.max(1)),
    }
}

fn nearest(b: &Builder, ring: &[(usize, f64)], p: usize) -> usize {
    ring.iter()
        .map(|&(j, _)| j)
        .min_by(|&x, &y| b.straight(p, x).total_cmp(&b.straight(p, y)))
        .expect("rings are not empty")
}

fn nearest_angle(ring: &[(usize, f64)], angle: f64) -> usize {
    let gap = |a: f64| {
        let d = (a - angle).rem_euclid(2.0 * PI);
        d.min(2.0 * PI - d)
    };
    ring.iter()
        .min_by(|x, y| gap(x.1).total_cmp(&gap(y.1)))
        .expect("rings are not empty")
        .0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn same_seed_same_town_other_seed_other_town() {
        let a = town(&TownSpec::new(11, 5)).unwrap();
        let b = town(&TownSpec::new(11, 5)).unwrap();
        let c = town(&TownSpec::new(12, 5)).unwrap();
        assert_eq!(a, b);
        assert_ne!(a.network(), c.network());
    }

    #[test]
    fn demo_town_has_every_feature() {
        let inst = town(&TownSpec::demo()).unwrap();
        let net = inst.network();
        let links = &net.links;
        assert!((200..=600).contains(&links.len()), "{} links", links.len());
        // One-way streets.
        assert!(links.iter().any(|l| l.oneway && l.service.is_some()));
        // A non-required arterial that is faster per metre than the streets.
        let art: Vec<_> = links.iter().filter(|l| l.service.is_none()).collect();
        assert!(!art.is_empty());
        let speed = |l: &Link| l.cost as f64 / l.drive_time() as f64;
        let fastest_street = links
            .iter()
            .filter(|l| l.service.is_some())
            .map(speed)
            .fold(0.0, f64::max);
        assert!(art.iter().any(|l| speed(l) > fastest_street * 1.5));
        // Two sides served separately: two required forward links in opposite
        // directions between the same junctions, both two-way for driving.
        let pairs = links
            .iter()
            .filter(|l| {
                !l.oneway
                    && l.service
                        .as_ref()
                        .is_some_and(|s| s.direction == ServeDirection::Forward)
            })
            .filter(|l| {
                links.iter().any(|m| {
                    m.from == l.to
                        && m.to == l.from
                        && m.service
                            .as_ref()
                            .is_some_and(|s| s.direction == ServeDirection::Forward)
                })
            })
            .count();
        assert!(pairs >= 4, "{pairs} two-sided links");
        // Cul-de-sacs: junctions of degree one other than the yard.
        let mut deg = vec![0; net.len()];
        for l in links {
            deg[l.from] += 1;
            deg[l.to] += 1;
        }
        let dead_ends = (0..net.len())
            .filter(|&j| deg[j] == 1 && j != inst.depot())
            .count();
        assert!(dead_ends >= 3, "{dead_ends} dead ends");
        // Named streets, coordinates, distinct times and costs, a limited fleet.
        assert!(links.iter().all(|l| l.name.is_some()));
        assert!(net.junctions.iter().all(|j| j.x.is_some() && j.y.is_some()));
        assert!(inst.has_times());
        assert!(inst.fleet().shift_limit.is_some());
        assert!(inst.fleet().max_vehicles.is_some());
        assert!(inst.total_demand() > inst.fleet().capacity);
    }

    #[test]
    fn any_size_builds() {
        for blocks in [2, 3, 6, 20] {
            let mut spec = TownSpec::new(blocks as u64, blocks);
            spec.rings = blocks / 4;
            let inst = town(&spec).unwrap();
            assert!(inst.tasks().len() >= 2 * blocks * (blocks + 1));
        }
    }
}
