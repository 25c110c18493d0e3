//! The typed errors of the map readers, the profile reader and the builder.

use std::fmt;

use crate::model::ModelError;

/// A place in a map file that a problem is about.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Element {
    /// An OpenStreetMap node, by id.
    Node(i64),
    /// An OpenStreetMap way, by id.
    Way(i64),
    /// An OpenStreetMap relation, by id.
    Relation(i64),
    /// A GeoJSON feature, by its 0-based position in `features`.
    Feature(usize),
}

impl fmt::Display for Element {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Element::Node(id) => write!(f, "node {id}"),
            Element::Way(id) => write!(f, "way {id}"),
            Element::Relation(id) => write!(f, "relation {id}"),
            Element::Feature(i) => write!(f, "features[{i}]"),
        }
    }
}

/// Why a map, a service profile or a yard could not be turned into a scenario.
///
/// Every variant names the file (as the caller gave it) and, where there is
/// one, the element (way, node, feature) or line.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum MapError {
    /// The file could not be opened or read.
    #[error("{file}: {source}")]
    Io {
        /// The file.
        file: String,
        /// What the system said.
        #[source]
        source: std::io::Error,
    },
    /// The file name does not say which map format it is.
    #[error("{file}: not a map file arcwright reads (expected a name ending in .osm.pbf, .pbf, .osm, .geojson or .json)")]
    UnknownFormat {
        /// The file.
        file: String,
    },
    /// An OSM PBF file that cannot be decoded (truncated, corrupt, not PBF).
    #[error("{file}: not a readable OpenStreetMap PBF file ({problem})")]
    Pbf {
        /// The file.
        file: String,
        /// What the decoder said.
        problem: String,
    },
    /// A syntax problem in a text file (OSM XML, GeoJSON).
    #[error("{file}:{line}: {problem}")]
    Syntax {
        /// The file.
        file: String,
        /// 1-based line.
        line: usize,
        /// What is wrong.
        problem: String,
    },
    /// A problem with one element of the map.
    #[error("{file}: {element}: {problem}")]
    Element {
        /// The file.
        file: String,
        /// The way, node, relation or feature.
        element: Element,
        /// What is wrong, in the words of the map.
        problem: String,
    },
    /// The file holds no map data at all.
    #[error("{file}: the map is empty ({detail})")]
    Empty {
        /// The file.
        file: String,
        /// What was found instead.
        detail: String,
    },
    /// The map has data but no street the trucks may drive.
    #[error("{file}: no streets to plan on: {detail}")]
    NoStreets {
        /// The file.
        file: String,
        /// What was found instead.
        detail: String,
    },
    /// A service profile that cannot be used.
    #[error("{file}{}: {problem}", line.map(|l| format!(":{l}")).unwrap_or_default())]
    Profile {
        /// The profile file (`<refuse>` / `<gritting>` for the built-in ones).
        file: String,
        /// 1-based line, when known.
        line: Option<usize>,
        /// What is wrong.
        problem: String,
    },
    /// A road class in a profile that arcwright does not know.
    #[error("{file}{}: unknown road class `{class}` (known: {known})", line.map(|l| format!(":{l}")).unwrap_or_default())]
    UnknownRoadClass {
        /// The profile file.
        file: String,
        /// 1-based line, when known.
        line: Option<usize>,
        /// The class as written.
        class: String,
        /// The classes that are known, comma separated.
        known: String,
    },
    /// The yard point is farther from every drivable junction than allowed.
    #[error("{file}: the yard at {lon}, {lat} is {distance_m:.0} m from the nearest drivable junction (more than {max_m:.0} m): is it inside the map?")]
    YardTooFar {
        /// The map file.
        file: String,
        /// Yard longitude.
        lon: f64,
        /// Yard latitude.
        lat: f64,
        /// Distance to the nearest drivable junction, metres.
        distance_m: f64,
        /// The largest snap distance allowed, metres.
        max_m: f64,
    },
    /// The yard node is not on a street the trucks may drive.
    #[error("{file}: the yard node {node} is not on a street the trucks may drive")]
    YardNotOnStreet {
        /// The map file.
        file: String,
        /// The node id given.
        node: i64,
    },
    /// A yard given in a form that cannot be read.
    #[error("yard `{text}`: expected LON,LAT (decimal degrees) or node:ID")]
    YardSyntax {
        /// The text given.
        text: String,
    },
    /// The profile's turn rules cannot be used on the built network (a
    /// street to serve that can only be left by a banned turn, ...).
    #[error("{file}: the profile's turn rules cannot be used: {}", .problems.join("; "))]
    TurnRules {
        /// The map file.
        file: String,
        /// Every problem, with streets named.
        problems: Vec<String>,
    },
    /// The built network does not make a valid scenario.
    #[error("{file}: {problem}")]
    Model {
        /// The map file.
        file: String,
        /// The problem, with streets named.
        problem: String,
        /// The model's own error.
        #[source]
        source: ModelError,
    },
}
