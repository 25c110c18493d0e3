//! Real maps in: OpenStreetMap (PBF, XML) and GeoJSON street networks turned
//! into a scenario a fleet can be planned on.
//!
//! One call, [`load_map`], reads a map file, builds the street network the
//! trucks can drive under a service [`Profile`], places the yard and returns
//! a validated [`Instance`] with a [`BuildReport`] to print:
//!
//! ```no_run
//! use arcwright::map::{load_map, MapOptions, Profile};
//! let built = load_map("helsinki.osm.pbf", &MapOptions::default()).unwrap();
//! println!("{}", built.report);
//! let scenario = arcwright::io::write_scenario(&built.instance); // JSON to edit
//! # let _ = scenario;
//! ```
//!
//! # The rules
//!
//! The reference script `scripts/osm_reference.py` (pyosmium, networkx)
//! follows the same rules; the tests compare both on a real extract.
//!
//! 1. **Streets.** A way is a street when its `highway` value is a road class
//!    of the profile, it is not `area=yes`, none of `access`, `vehicle`,
//!    `motor_vehicle`, `hgv` has a value of the profile's `closed_access`
//!    (default `no`, `private`), its `service` is not one of
//!    `closed_service` (parking aisles, driveways, ...), and `oneway` is not
//!    `reversible` / `alternating` (direction changes during the day).
//!    `highway=construction` and the like are not road classes, so never
//!    driven.
//! 2. **Direction.** `oneway=yes/true/1`: one way as drawn; `-1`/`reverse`:
//!    one way against the drawing; `no/false/0`: two-way; absent: one way on
//!    `junction=roundabout/circular` and on `highway=motorway`, else two-way;
//!    any other value: two-way.
//! 3. **Clipped extracts.** Repeated consecutive nodes are dropped; a node
//!    missing from the file breaks the way; pieces of fewer than two nodes
//!    are dropped.
//! 4. **Splitting.** Ways are split at every node that ends a way piece or is
//!    used twice or more (by two ways, or twice by one).
//! 5. **What trucks can drive around.** Only the strongly connected part of
//!    the directed street graph is kept (Tarjan's algorithm, `petgraph`): the
//!    largest one (most junctions), or the one holding the yard node when the
//!    yard is given as a node. What is left out is reported
//!    ([`BuildReport::dropped`]), never dropped silently.
//! 6. **Contraction.** Where exactly two pieces meet, and they agree on road
//!    class, name (`name`, else `ref`), direction kind and GeoJSON settings
//!    (and, one-way, one arrives and one leaves), they are joined into one
//!    street that keeps the whole polyline.
//! 7. **Lengths** are geodesic on the WGS84 ellipsoid (Karney's algorithm).
//!    A required street too long for one truck to serve in one pass is cut
//!    at inner nodes into pieces a truck can serve (reported as
//!    [`BuildReport::long_cuts`]; none in ordinary town maps).
//! 8. **Turn restrictions**: `type=restriction` relations whose `restriction`
//!    (else `restriction:hgv`) starts with `no_` or `only_`, with one `from`
//!    way, one `via` node and one `to` way, where the via node is a junction
//!    and kept streets of both ways end there. They are kept in the network
//!    ([`crate::model::TurnRestriction`]) for turn-aware routing; the solver
//!    does not use them yet.
//!
//! # Numbers in the scenario
//!
//! Exact integers, rounded once per link from the geodesic length:
//!
//! - **cost**: metres (deadheading and serving cost the same distance);
//! - **time**: seconds, length / the class's `drive_kmh` (driving) or
//!   `serve_kmh` (serving);
//! - **demand**: load units (kg in the built-in profiles), length × the
//!   profile's `per_km_of_kerb` × kerbs served (2 when both sides are served
//!   in one pass, 1 per pass when one side at a time); or, with the
//!   profile's `per_address` and a map with address points, `per_address` ×
//!   the addresses nearest to the street (see [`Profile`]);
//! - **length**: metres, as the cost;
//! - **fleet**: the profile's truck capacity, shift (seconds) and truck limit.
//!
//! The instance declares these units (cost `m`, length `m`, time `s`, load
//! the profile's `load_unit`) and its coordinate system,
//! [`crate::model::Coordinates::Wgs84`]: junctions carry longitude (`x`) and
//! latitude (`y`); every link carries its polyline
//! ([`crate::model::Link::geometry`]) and road class.
//!
//! # GeoJSON
//!
//! A FeatureCollection of LineString and MultiLineString features (other
//! geometries are skipped; a file with none is an error). Lines join where
//! they share a position exactly. Properties read:
//!
//! - OpenStreetMap-style, as text: `highway` (default `unclassified`),
//!   `name`, `ref`, `oneway`, `junction`, `access`, `vehicle`,
//!   `motor_vehicle`, `hgv`, `service`, `area`;
//! - our own, for GIS users: `required` (true/false: serve it, or only drive
//!   it, whatever the profile says for its class), `demand_per_km` (whole
//!   number: load per km of kerb instead of the profile's), `one_way`
//!   (true: one way in the drawing's direction; false: two-way; overrides
//!   `oneway`).
//!
//! Each distinct position gets a node id 1, 2, ... in order of first
//! appearance (the ids a yard `node:ID` refers to).
//!
//! # Cost
//!
//! Reading and building are linear in the map's size apart from hash maps
//! and the geodesic lengths; the PBF reader reads the file twice to keep only
//! the nodes of streets in memory. Yard snapping is a scan of the junctions.

mod address;
mod build;
mod contract;
mod error;
mod geojson;
mod graph;
mod length;
mod long;
mod pbf;
mod profile;
mod raw;
mod report;
mod scenario;
mod xml;
mod yard;

use std::path::Path;

pub use build::{
    build_graph, Dropped, MapJunction, Street, StreetGraph, StreetTurn, MAX_YARD_SNAP_M,
};
pub use error::{Element, MapError};
pub use geojson::{parse_geojson, DEFAULT_CLASS};
pub use length::{metres, polyline_metres};
pub use pbf::read_pbf;
pub use profile::{ClassRule, Profile, Serve, TruckDefaults, ROAD_CLASSES};
pub use raw::{MapFormat, Overrides, RawMap, RawRestriction, RawWay, KEYS};
pub use report::BuildReport;
pub use scenario::to_instance;
pub use xml::parse_osm_xml;
pub use yard::{YardChoice, YardHow, YardReport};

use crate::model::Instance;

/// How to build a scenario from a map.
#[derive(Clone, Debug, PartialEq)]
pub struct MapOptions {
    /// The service profile (default: [`Profile::refuse`]).
    pub profile: Profile,
    /// Where the yard is; `None`: the junction nearest the map's centre.
    pub yard: Option<YardChoice>,
}

impl MapOptions {
    /// Options from command-line text: a profile name (`refuse`,
    /// `gritting`) or TOML file, and a yard `LON,LAT` or `node:ID`; `None`
    /// keeps the default (refuse profile, yard nearest the centre).
    ///
    /// ```
    /// use arcwright::map::{MapOptions, YardChoice};
    /// let o = MapOptions::from_args(Some("gritting"), Some("node:7")).unwrap();
    /// assert_eq!(o.yard, Some(YardChoice::Node(7)));
    /// assert!(MapOptions::from_args(None, Some("north")).is_err());
    /// ```
    ///
    /// # Errors
    ///
    /// [`MapError::YardSyntax`] for a yard that is not `LON,LAT` or
    /// `node:ID`; the errors of [`Profile::read_file`] for a profile file.
    pub fn from_args(profile: Option<&str>, yard: Option<&str>) -> Result<MapOptions, MapError> {
        Ok(MapOptions {
            profile: match profile {
                Some(p) => Profile::named_or_file(p)?,
                None => Profile::refuse(),
            },
            yard: yard.map(str::parse).transpose()?,
        })
    }
}

impl Default for MapOptions {
    fn default() -> Self {
        MapOptions {
            profile: Profile::refuse(),
            yard: None,
        }
    }
}

/// A scenario built from a map.
#[derive(Clone, Debug)]
pub struct MapScenario {
    /// The validated instance (name: the file name without its extension).
    pub instance: Instance,
    /// The street graph it was built from.
    pub graph: StreetGraph,
    /// For every link of the instance, its street in `graph.streets`.
    pub street_of_link: Vec<usize>,
    /// What was built, for people.
    pub report: BuildReport,
}

/// The map format a file name says, if any: `.osm.pbf` / `.pbf`, `.osm` /
/// `.xml`, `.geojson` (not `.json`, which is our scenario format).
///
/// ```
/// use arcwright::map::{map_format, MapFormat};
/// assert_eq!(map_format("town.osm.pbf".as_ref()), Some(MapFormat::Pbf));
/// assert_eq!(map_format("town.geojson".as_ref()), Some(MapFormat::GeoJson));
/// assert_eq!(map_format("town.json".as_ref()), None);
/// ```
pub fn map_format(path: &Path) -> Option<MapFormat> {
    let name = path.file_name()?.to_string_lossy().to_ascii_lowercase();
    if name.ends_with(".pbf") {
        Some(MapFormat::Pbf)
    } else if name.ends_with(".osm") || name.ends_with(".xml") {
        Some(MapFormat::Xml)
    } else if name.ends_with(".geojson") {
        Some(MapFormat::GeoJson)
    } else {
        None
    }
}

/// Reads a map file, in the format its name says ([`map_format`]).
///
/// # Errors
///
/// [`MapError::UnknownFormat`] for another file name, else the errors of
/// [`read_pbf`], [`parse_osm_xml`] and [`parse_geojson`].
pub fn read_map(path: &Path) -> Result<RawMap, MapError> {
    let file = path.display().to_string();
    let text = || {
        std::fs::read_to_string(path).map_err(|source| MapError::Io {
            file: file.clone(),
            source,
        })
    };
    match map_format(path) {
        Some(MapFormat::Pbf) => read_pbf(path),
        Some(MapFormat::Xml) => parse_osm_xml(&text()?, &file),
        Some(MapFormat::GeoJson) => parse_geojson(&text()?, &file),
        None => Err(MapError::UnknownFormat { file }),
    }
}

/// Builds the scenario of a map already read.
///
/// # Errors
///
/// As [`build_graph`] and [`to_instance`].
pub fn build_scenario(map: &RawMap, options: &MapOptions) -> Result<MapScenario, MapError> {
    let graph = build_graph(map, &options.profile, options.yard)?;
    let name = Path::new(&map.file)
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let name = name
        .trim_end_matches(".pbf")
        .trim_end_matches(".osm")
        .trim_end_matches(".geojson")
        .trim_end_matches(".xml")
        .to_string();
    let (instance, street_of_link, cut_off) =
        to_instance(&graph, &options.profile, &name, &map.file)?;
    let mut report = BuildReport::new(
        &map.file,
        map.format,
        &options.profile.name,
        &graph,
        &instance,
        &street_of_link,
    );
    report.cut_off_by_turns = cut_off;
    Ok(MapScenario {
        instance,
        graph,
        street_of_link,
        report,
    })
}

/// Reads a map file and builds its scenario: the one call a planner needs.
///
/// # Errors
///
/// A typed [`MapError`] naming the file and the element (way, node,
/// feature) or line: unreadable or truncated file, no streets, an empty map,
/// a yard outside the map, a network that is not a valid scenario.
pub fn load_map(path: impl AsRef<Path>, options: &MapOptions) -> Result<MapScenario, MapError> {
    let map = read_map(path.as_ref())?;
    build_scenario(&map, options)
}
