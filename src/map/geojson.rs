//! The GeoJSON reader (RFC 7946 FeatureCollections of LineString and
//! MultiLineString features, the `geojson` crate).
//!
//! Lines meet where they share a position exactly (the same two numbers);
//! each distinct position gets a node id 1, 2, ... in order of first
//! appearance. Properties are read as described in [`crate::map`].

use std::collections::{BTreeMap, HashMap};

use geojson::{GeoJson, JsonObject, JsonValue, Value};

use super::error::{Element, MapError};
use super::raw::{MapFormat, Overrides, RawMap, RawWay, ADDRESS_KEY, KEYS};

/// The class given to a line without a `highway` property.
pub const DEFAULT_CLASS: &str = "unclassified";

fn element(file: &str, i: usize, problem: String) -> MapError {
    MapError::Element {
        file: file.to_string(),
        element: Element::Feature(i),
        problem,
    }
}

/// Reads GeoJSON text. `file` names it in errors.
///
/// # Errors
///
/// [`MapError::Syntax`] for text that is not JSON or not GeoJSON;
/// [`MapError::Element`] (naming `features[i]`) for a line with fewer than two
/// positions, a position outside -180..180 / -90..90, or one of our own
/// properties with a wrong type; [`MapError::Empty`] for a collection without
/// features; [`MapError::NoStreets`] when no feature is a line.
pub fn parse_geojson(text: &str, file: &str) -> Result<RawMap, MapError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let json: JsonValue = serde_json::from_str(text).map_err(|e| MapError::Syntax {
        file: file.to_string(),
        line: e.line().max(1),
        problem: e.to_string(),
    })?;
    let gj = GeoJson::from_json_value(json).map_err(|e| MapError::Syntax {
        file: file.to_string(),
        line: 1,
        problem: format!("not GeoJSON: {e}"),
    })?;
    let features = match gj {
        GeoJson::FeatureCollection(fc) => fc.features,
        GeoJson::Feature(f) => vec![f],
        GeoJson::Geometry(_) => {
            return Err(MapError::Syntax {
                file: file.to_string(),
                line: 1,
                problem: "a bare geometry: expected a FeatureCollection of street lines".into(),
            })
        }
    };
    let mut map = RawMap::new(file, MapFormat::GeoJson);
    map.elements = features.len();
    if features.is_empty() {
        return Err(MapError::Empty {
            file: file.to_string(),
            detail: "a FeatureCollection without features".into(),
        });
    }
    let mut ids: HashMap<(u64, u64), i64> = HashMap::new();
    let mut other: BTreeMap<&'static str, usize> = BTreeMap::new();
    for (i, f) in features.iter().enumerate() {
        let lines: Vec<&Vec<Vec<f64>>> = match f.geometry.as_ref().map(|g| &g.value) {
            Some(Value::LineString(c)) => vec![c],
            Some(Value::MultiLineString(c)) => c.iter().collect(),
            Some(Value::Point(p))
                if f.properties
                    .as_ref()
                    .is_some_and(|o| o.contains_key(ADDRESS_KEY)) =>
            {
                if let [lon, lat, ..] = p.as_slice() {
                    map.addresses.push([*lon, *lat]);
                }
                *other.entry("address Point").or_default() += 1;
                continue;
            }
            Some(v) => {
                *other.entry(v.type_name()).or_default() += 1;
                continue;
            }
            None => {
                *other.entry("no geometry").or_default() += 1;
                continue;
            }
        };
        let (tags, overrides) = properties(f.properties.as_ref(), file, i)?;
        for line in lines {
            let nodes = line_nodes(line, &mut ids, &mut map, file, i)?;
            map.ways.push(RawWay {
                id: i as i64,
                nodes,
                tags: tags.clone(),
                overrides: overrides.clone(),
            });
        }
    }
    if map.ways.is_empty() {
        let found: Vec<String> = other.iter().map(|(k, n)| format!("{n} {k}")).collect();
        return Err(MapError::NoStreets {
            file: file.to_string(),
            detail: format!(
                "no LineString or MultiLineString feature (found {})",
                found.join(", ")
            ),
        });
    }
    Ok(map)
}

/// The node ids of a line's positions (new ids for new positions).
fn line_nodes(
    line: &[Vec<f64>],
    ids: &mut HashMap<(u64, u64), i64>,
    map: &mut RawMap,
    file: &str,
    i: usize,
) -> Result<Vec<i64>, MapError> {
    if line.len() < 2 {
        return Err(element(
            file,
            i,
            "a line needs at least two positions".into(),
        ));
    }
    let mut nodes = Vec::with_capacity(line.len());
    for p in line {
        let (lon, lat) = match p.as_slice() {
            // `+ 0.0` turns -0.0 into 0.0: one position, one node.
            [lon, lat, ..] => (*lon + 0.0, *lat + 0.0),
            _ => return Err(element(file, i, "a position needs two numbers".into())),
        };
        if !(-180.0..=180.0).contains(&lon) || !(-90.0..=90.0).contains(&lat) {
            return Err(element(
                file,
                i,
                format!("position {lon}, {lat} is not a longitude, latitude"),
            ));
        }
        let next = ids.len() as i64 + 1;
        let id = *ids.entry((lon.to_bits(), lat.to_bits())).or_insert(next);
        map.nodes.insert(id, [lon, lat]);
        nodes.push(id);
    }
    Ok(nodes)
}

/// The OSM-style tags and our own settings of a feature.
fn properties(
    props: Option<&JsonObject>,
    file: &str,
    i: usize,
) -> Result<(BTreeMap<String, String>, Overrides), MapError> {
    let mut tags = BTreeMap::new();
    let mut o = Overrides::default();
    let empty = JsonObject::new();
    for (k, v) in props.unwrap_or(&empty) {
        let bad =
            |want: &str| element(file, i, format!("property `{k}` must be {want}, found {v}"));
        match k.as_str() {
            "required" => o.required = Some(v.as_bool().ok_or_else(|| bad("true or false"))?),
            "one_way" => o.one_way = Some(v.as_bool().ok_or_else(|| bad("true or false"))?),
            "demand_per_km" => {
                let n = v
                    .as_u64()
                    .ok_or_else(|| bad("a whole number of at least 0"))?;
                o.demand_per_km = Some(u32::try_from(n).map_err(|_| bad("at most 4294967295"))?);
            }
            key if KEYS.contains(&key) => {
                let text = match v {
                    JsonValue::String(s) => s.clone(),
                    JsonValue::Bool(b) => b.to_string(),
                    JsonValue::Number(n) => n.to_string(),
                    JsonValue::Null => continue,
                    _ => return Err(bad("text")),
                };
                tags.insert(key.to_string(), text);
            }
            _ => {}
        }
    }
    tags.entry("highway".to_string())
        .or_insert_with(|| DEFAULT_CLASS.to_string());
    Ok((tags, o))
}
