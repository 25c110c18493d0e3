//! The map as read, before any street is built: node positions, ways with the
//! tags that matter, and turn-restriction relations.

use std::collections::{BTreeMap, HashMap};

/// The tags the builder looks at; readers keep only these.
pub const KEYS: &[&str] = &[
    "highway",
    "name",
    "ref",
    "oneway",
    "junction",
    "access",
    "vehicle",
    "motor_vehicle",
    "hgv",
    "service",
    "area",
];

/// Settings a GIS user puts on a GeoJSON feature (our own property names,
/// see the module documentation of [`crate::map`]).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Overrides {
    /// `required`: serve this street (true) or only drive it (false),
    /// whatever the profile says for its class.
    pub required: Option<bool>,
    /// `demand_per_km`: load per km of kerb, instead of the profile's rate.
    pub demand_per_km: Option<u32>,
    /// `one_way`: true, one way in the drawing's direction; false, two-way.
    pub one_way: Option<bool>,
}

/// A way (OSM) or a line (GeoJSON) that may be a street.
#[derive(Clone, Debug, PartialEq)]
pub struct RawWay {
    /// OSM way id, or the GeoJSON feature's position.
    pub id: i64,
    /// Node ids in drawing order (GeoJSON: ids given to distinct positions).
    pub nodes: Vec<i64>,
    /// The tags of [`KEYS`] that are present.
    pub tags: BTreeMap<String, String>,
    /// Our own settings (GeoJSON only).
    pub overrides: Overrides,
}

impl RawWay {
    /// A tag's value.
    pub fn tag(&self, key: &str) -> Option<&str> {
        self.tags.get(key).map(String::as_str)
    }
}

/// A `type=restriction` relation, as read.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RawRestriction {
    /// Relation id.
    pub id: i64,
    /// The `restriction` value (else `restriction:hgv`), possibly empty.
    pub rule: String,
    /// Ways in the `from` role.
    pub from: Vec<i64>,
    /// Nodes in the `via` role.
    pub via_nodes: Vec<i64>,
    /// Members that make the relation unusable here: `via` ways, `from` or
    /// `to` members that are not ways.
    pub unusable: usize,
    /// Ways in the `to` role.
    pub to: Vec<i64>,
}

/// Which reader made a [`RawMap`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MapFormat {
    /// OpenStreetMap PBF.
    Pbf,
    /// OpenStreetMap XML.
    Xml,
    /// GeoJSON.
    GeoJson,
}

/// A map as read from a file.
#[derive(Clone, Debug, PartialEq)]
pub struct RawMap {
    /// The file name, for messages.
    pub file: String,
    /// The format read.
    pub format: MapFormat,
    /// Positions `[lon, lat]` of the nodes the ways use (nodes the file does
    /// not hold are absent: clipped extracts).
    pub nodes: HashMap<i64, [f64; 2]>,
    /// Ways with a `highway` tag (GeoJSON: every line feature).
    pub ways: Vec<RawWay>,
    /// Turn-restriction relations.
    pub restrictions: Vec<RawRestriction>,
    /// Address points: positions `[lon, lat]` of nodes (GeoJSON: Point
    /// features) with an `addr:housenumber`, and the centres of ways with one
    /// (buildings), for demand per address.
    pub addresses: Vec<[f64; 2]>,
    /// Ways with an `addr:housenumber` (buildings): their nodes, turned into
    /// [`RawMap::addresses`] once node positions are known.
    pub(crate) address_ways: Vec<Vec<i64>>,
    /// How many elements the file held in all (nodes, ways, relations or
    /// features), for the "empty map" check.
    pub elements: usize,
}

impl RawMap {
    /// An empty map of the given file and format.
    pub(crate) fn new(file: &str, format: MapFormat) -> RawMap {
        RawMap {
            file: file.to_string(),
            format,
            nodes: HashMap::new(),
            ways: Vec::new(),
            restrictions: Vec::new(),
            elements: 0,
            addresses: Vec::new(),
            address_ways: Vec::new(),
        }
    }

    /// Adds the centre (mean of the distinct nodes the file holds) of every
    /// address way to [`RawMap::addresses`].
    pub(crate) fn resolve_address_ways(&mut self, positions: &HashMap<i64, [f64; 2]>) {
        for nodes in std::mem::take(&mut self.address_ways) {
            let mut seen = std::collections::HashSet::new();
            let pts: Vec<[f64; 2]> = nodes
                .iter()
                .filter(|n| seen.insert(**n))
                .filter_map(|n| positions.get(n).copied())
                .collect();
            if !pts.is_empty() {
                let k = pts.len() as f64;
                let lon = pts.iter().map(|p| p[0]).sum::<f64>() / k;
                let lat = pts.iter().map(|p| p[1]).sum::<f64>() / k;
                self.addresses.push([lon, lat]);
            }
        }
    }
}

/// Keeps the tags of [`KEYS`] from `(key, value)` pairs; `None` when there
/// is no `highway` tag.
pub(crate) fn street_tags<'a>(
    tags: impl Iterator<Item = (&'a str, &'a str)>,
) -> Option<BTreeMap<String, String>> {
    let kept: BTreeMap<String, String> = tags
        .filter(|(k, _)| KEYS.contains(k))
        .map(|(k, v)| (k.to_string(), v.to_string()))
        .collect();
    kept.contains_key("highway").then_some(kept)
}

/// The tag that makes a node or way an address point.
pub const ADDRESS_KEY: &str = "addr:housenumber";

/// The rule of a restriction relation from its tags, if it is one.
pub(crate) fn restriction_rule<'a>(
    tags: impl Iterator<Item = (&'a str, &'a str)>,
) -> Option<String> {
    let mut is_restriction = false;
    let mut rule = None;
    let mut hgv = None;
    for (k, v) in tags {
        match k {
            "type" => is_restriction = v == "restriction",
            "restriction" => rule = Some(v.to_string()),
            "restriction:hgv" => hgv = Some(v.to_string()),
            _ => {}
        }
    }
    is_restriction.then(|| rule.or(hgv).unwrap_or_default())
}
