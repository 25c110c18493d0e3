//! Our own JSON scenario format: a street network, the yard and the fleet.
//!
//! A scenario is one JSON object:
//!
//! | field | type | meaning |
//! |---|---|---|
//! | `format` | string | always `"arcwright-scenario"` |
//! | `version` | integer | always `1` |
//! | `name` | string, optional | a name for reports (default `""`) |
//! | `units` | object, optional | `{ "cost": string?, "length": string?, "time": string?, "load": string? }`: the unit of every cost, of street lengths, of times and the shift limit, of demands and the capacity (1 to 24 characters each; see [`crate::model::Units`]). Undeclared units are shown as `cost units`, ... |
//! | `coordinates` | object, optional | `{ "system": "wgs84" }` (`x` longitude, `y` latitude, degrees) or `{ "system": "planar", "origin": { "lon": number, "lat": number }? }` (metres east and north; the origin places the point (0, 0) on the Earth); see [`crate::model::Coordinates`]. Absent: undeclared, never guessed |
//! | `junctions` | array | `{ "id": integer, "x": number?, "y": number? }`; ids are any distinct non-negative integers (OSM node ids, say) |
//! | `streets` | array | see below |
//! | `yard` | integer | id of the junction the trucks leave from and return to (the depot); give `yard` or `yards` |
//! | `fleet` | object | `{ "capacity": integer, "shift_limit": integer?, "max_trucks": integer? }`; give `fleet` or `truck_types` |
//! | `yards` | array, optional | several yards: `{ "name": string, "junction": id }`; the first is the depot of the plain model |
//! | `dump_sites` | array, optional | `{ "name": string?, "junction": id, "unload_time": integer, "unload_cost": integer?, "opens": integer?, "closes": integer? }` (unload cost default 0; opening hours in time units since the start of the shift, default always open) |
//! | `return_empty` | bool, optional | with dump sites: whether a truck must tip before returning to its yard (default `true`) |
//! | `truck_types` | array, optional | `{ "name": string, "count": integer?, "capacity": integer, "shift_limit": integer?, "yard": string?, "fixed_cost": integer?, "cost_per_mille": integer?, "no_entry": [street index or road class]?, "no_service": [street index or road class]? }` |
//! | `balance` | object, optional | `{ "longest_shift_weight": integer }`: minimise total cost + weight × longest shift time (default: least total cost) |
//!
//! The dump sites, yards, truck types and balance setting are described in
//! [`crate::model::Operations`]: a truck tips whenever it chooses, the load
//! limit (`capacity`) holds for each trip between tips, the shift limit for
//! the whole route; `count` omitted means as many trucks as needed; a truck
//! type's `yard` names one of `yards` (it may be omitted when there is at
//! most one); `fixed_cost` (default 0) is paid per truck used,
//! `cost_per_mille` (default 1000) scales the cost of every street the truck
//! drives, in thousandths; `no_entry` and `no_service` list streets by their
//! position in `streets` (0-based, as integers) and road classes (as strings,
//! the streets' `class` values, such as `"primary"`) that the type must not
//! drive on, or must not serve (`"no_entry": [12, "living_street"]`). A
//! street without a `class` is barred only by its position; a class that no
//! street has and that is not an OpenStreetMap `highway=*` road class is an
//! error (a misspelling). With `truck_types`, the plain model's fleet (what
//! [`Instance::fleet`] returns) has the largest capacity, no shift limit and
//! as many trucks as all types together. Files without these fields read as
//! before, with every feature off.
//!
//! | `turn_restrictions` | array, optional | `{ "rule": string, "from_street": integer, "via": id, "to_street": integer }`, see below |
//! | `turn_rules` | object, optional | `{ "driving_side": "right" \| "left", "u_turns": "dead_ends_only" \| "allowed", "penalties": { "straight": integer, "right": integer, "left": integer, "u_turn": integer }, "obey_restrictions": bool }`, every field optional (defaults `"right"`, `"dead_ends_only"`, all penalties 0, `true`); see [`crate::turns`]. Absent: trucks turn freely and pay nothing (the plan is exactly that of a file without it) |
//!
//! A street is `{ "from": id, "to": id, "one_way": bool?, "cost": integer,
//! "length": integer?, "drive_time": integer?, "name": string?, "class":
//! string?, "geometry": [[x, y], ...]?, "service": {...}? }` (`length`, in
//! the `length` unit, is shown on the sheets and never decides the plan):
//! `one_way` (default `false`) means it may only be driven from `from` to
//! `to`; `cost` is paid each time it is driven without serving
//! (deadheading); `drive_time` defaults to `cost`. A street with a `service`
//! block is *required*: `{ "demand": integer, "cost": integer, "time":
//! integer?, "directions": "either" | "forward" }` (`time` defaults to the
//! service cost, `directions` to `"either"`). A street whose two sides are
//! served separately is written as two streets with `"directions":
//! "forward"`, one each way. Omitted `shift_limit` / `max_trucks` mean no
//! limit. `class` is the road class (the OpenStreetMap `highway=*` value,
//! such as `"residential"`); `geometry` is the street's shape for maps, the
//! points from `from` to `to` (both included) in the junctions' coordinate
//! system; without it maps draw a straight line. Unknown fields are rejected,
//! so a misspelt field is an error, not silently ignored.
//!
//! A turn restriction (read from OpenStreetMap `type=restriction` relations,
//! or written by the planner; obeyed when the scenario has `turn_rules`) says
//! that a truck arriving at junction `via` along street number `from_street`
//! (0-based position in `streets`) may not turn into street `to_street`
//! (`rule` starting with `no_`, such as `"no_left_turn"`), or may only turn
//! into it (`rule` starting with `only_`, such as `"only_straight_on"`).
//!
//! All costs, lengths, times and demands are exact integers in
//! `0..=`[`MAX_NUMBER`]. Coordinates are decimal numbers, checked against the
//! declared system when read ([`crate::model::Coordinates::check_point`]:
//! finite, longitude within ±180° and latitude within ±90° for WGS 84, planar
//! values within 40,000 km); an impossible one is a
//! [`ParseProblem::Coordinate`] at its JSON path (`junctions[3].y`).
//!
//! ```
//! use arcwright::io::scenario::{read_scenario, write_scenario};
//! let text = r#"{
//!   "format": "arcwright-scenario",
//!   "version": 1,
//!   "name": "three streets",
//!   "junctions": [
//!     { "id": 10, "x": 0.0, "y": 0.0 },
//!     { "id": 20, "x": 100.0, "y": 0.0 },
//!     { "id": 30 }
//!   ],
//!   "streets": [
//!     { "from": 10, "to": 20, "cost": 4, "name": "Mill Lane", "class": "residential",
//!       "geometry": [[0.0, 0.0], [50.0, 12.5], [100.0, 0.0]],
//!       "service": { "demand": 2, "cost": 6, "time": 9, "directions": "either" } },
//!     { "from": 20, "to": 30, "one_way": true, "cost": 5, "drive_time": 7,
//!       "service": { "demand": 3, "cost": 5, "directions": "forward" } },
//!     { "from": 30, "to": 10, "cost": 7 }
//!   ],
//!   "yard": 10,
//!   "fleet": { "capacity": 10, "shift_limit": 480, "max_trucks": 2 },
//!   "turn_restrictions": [
//!     { "rule": "no_left_turn", "from_street": 0, "via": 20, "to_street": 1 }
//!   ]
//! }"#;
//! let inst = read_scenario(text, "three.json").unwrap();
//! assert_eq!(inst.tasks().len(), 2);
//! assert_eq!(inst.depot(), 0);
//! assert_eq!(inst.fleet().max_vehicles, Some(2));
//! assert_eq!(inst.network().links[0].geometry.len(), 3);
//! assert_eq!(inst.network().turn_restrictions[0].via, 1);
//! // Writing and reading again gives the same instance.
//! let again = read_scenario(&write_scenario(&inst), "again.json").unwrap();
//! assert_eq!(again, inst);
//! ```
//!
//! Errors name the file and a line: for JSON syntax and wrong-type errors
//! the line (and, in the message, the column) reported by serde_json; for
//! errors in the meaning (unknown or duplicate junction id, negative cost,
//! a demand over the capacity, a required street that cannot be reached
//! from the yard and back) the JSON path, e.g. `streets[12].to`, in a
//! [`ParseProblem::AtPath`], and the line where that value starts.

use std::collections::HashMap;
use std::path::Path;

use serde::{Deserialize, Serialize};

use super::MAX_NUMBER;
use crate::error::{Error, ParseProblem, Problems, Result};
use crate::model::{
    Balance, Coordinates, Cost, DumpSite, Element, Fleet, Hours, Instance, Junction, Link,
    ModelError, Network, Operations, OperationsError, ServeDirection, ServiceSpec, TruckType,
    TurnRestriction, Units, Yard,
};

/// The value of the `format` field.
pub const FORMAT_TAG: &str = "arcwright-scenario";
/// The version written and read.
pub const VERSION: u32 = 1;

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct FileRec {
    format: String,
    version: u32,
    #[serde(default)]
    name: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    units: Option<UnitsRec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    coordinates: Option<CoordinatesRec>,
    junctions: Vec<JunctionRec>,
    streets: Vec<StreetRec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    yard: Option<u64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    fleet: Option<FleetRec>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    yards: Vec<YardRec>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    dump_sites: Vec<DumpSiteRec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    return_empty: Option<bool>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    truck_types: Vec<TruckTypeRec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    balance: Option<BalanceRec>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    turn_restrictions: Vec<TurnRec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    turn_rules: Option<crate::turns::TurnRules>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct TurnRec {
    rule: String,
    from_street: usize,
    via: u64,
    to_street: usize,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct YardRec {
    name: String,
    junction: u64,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct DumpSiteRec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    name: Option<String>,
    junction: u64,
    unload_time: i64,
    #[serde(default, skip_serializing_if = "is_zero")]
    unload_cost: i64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    opens: Option<i64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    closes: Option<i64>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct TruckTypeRec {
    name: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    count: Option<usize>,
    capacity: i64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    shift_limit: Option<i64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    yard: Option<String>,
    #[serde(default, skip_serializing_if = "is_zero")]
    fixed_cost: i64,
    #[serde(default = "per_mille_one", skip_serializing_if = "is_per_mille_one")]
    cost_per_mille: i64,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    no_entry: Vec<StreetOrClass>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    no_service: Vec<StreetOrClass>,
}

/// An entry of a truck type's `no_entry` / `no_service`: a street by its
/// position in `streets`, or a road class by name.
#[derive(Clone, Debug, PartialEq, Eq)]
enum StreetOrClass {
    Street(usize),
    Class(String),
}

impl Serialize for StreetOrClass {
    fn serialize<S: serde::Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        match self {
            StreetOrClass::Street(i) => s.serialize_u64(*i as u64),
            StreetOrClass::Class(c) => s.serialize_str(c),
        }
    }
}

impl<'de> Deserialize<'de> for StreetOrClass {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        struct V;
        impl serde::de::Visitor<'_> for V {
            type Value = StreetOrClass;
            fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
                f.write_str("a street (its position in `streets`, from 0) or a road class name")
            }
            fn visit_u64<E: serde::de::Error>(self, v: u64) -> std::result::Result<Self::Value, E> {
                usize::try_from(v)
                    .map(StreetOrClass::Street)
                    .map_err(|_| E::custom(format!("street {v} is out of range")))
            }
            fn visit_i64<E: serde::de::Error>(self, v: i64) -> std::result::Result<Self::Value, E> {
                u64::try_from(v)
                    .map_err(|_| E::invalid_value(serde::de::Unexpected::Signed(v), &self))
                    .and_then(|v| self.visit_u64(v))
            }
            fn visit_str<E: serde::de::Error>(
                self,
                v: &str,
            ) -> std::result::Result<Self::Value, E> {
                if v.trim().is_empty() {
                    return Err(E::invalid_value(serde::de::Unexpected::Str(v), &self));
                }
                Ok(StreetOrClass::Class(v.to_string()))
            }
        }
        d.deserialize_any(V)
    }
}

/// The streets and the road classes of a `no_entry` / `no_service` list.
fn split_list(list: &[StreetOrClass]) -> (Vec<usize>, Vec<String>) {
    let mut streets = Vec::new();
    let mut classes = Vec::new();
    for x in list {
        match x {
            StreetOrClass::Street(i) => streets.push(*i),
            StreetOrClass::Class(c) => classes.push(c.clone()),
        }
    }
    (streets, classes)
}

/// A `no_entry` / `no_service` list from streets and road classes.
fn join_list(streets: &[usize], classes: &[String]) -> Vec<StreetOrClass> {
    streets
        .iter()
        .map(|&i| StreetOrClass::Street(i))
        .chain(classes.iter().map(|c| StreetOrClass::Class(c.clone())))
        .collect()
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct BalanceRec {
    longest_shift_weight: i64,
}

fn is_zero(v: &i64) -> bool {
    *v == 0
}

fn per_mille_one() -> i64 {
    1000
}

fn is_per_mille_one(v: &i64) -> bool {
    *v == 1000
}

#[derive(Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct UnitsRec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    cost: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    length: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    time: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    load: Option<String>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct CoordinatesRec {
    system: SystemRec,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    origin: Option<OriginRec>,
}

#[derive(Serialize, Deserialize, Clone, Copy, PartialEq)]
#[serde(rename_all = "lowercase")]
enum SystemRec {
    Wgs84,
    Planar,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct OriginRec {
    lon: f64,
    lat: f64,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct JunctionRec {
    id: u64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    x: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    y: Option<f64>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct StreetRec {
    from: u64,
    to: u64,
    #[serde(default)]
    one_way: bool,
    cost: i64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    length: Option<i64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    drive_time: Option<i64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    name: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    class: Option<String>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    geometry: Vec<[f64; 2]>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    service: Option<ServiceRec>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct ServiceRec {
    demand: i64,
    cost: i64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    time: Option<i64>,
    #[serde(default)]
    directions: Directions,
}

#[derive(Serialize, Deserialize, Default, Clone, Copy)]
#[serde(rename_all = "lowercase")]
enum Directions {
    #[default]
    Either,
    Forward,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct FleetRec {
    capacity: i64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    shift_limit: Option<i64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    max_trucks: Option<usize>,
}

/// One step of a JSON path.
#[derive(Clone, Debug)]
pub(crate) enum Seg {
    Key(&'static str),
    Index(usize),
}

fn path_string(path: &[Seg]) -> String {
    let mut s = String::new();
    for seg in path {
        match seg {
            Seg::Key(k) => {
                if !s.is_empty() {
                    s.push('.');
                }
                s.push_str(k);
            }
            Seg::Index(i) => s.push_str(&format!("[{i}]")),
        }
    }
    s
}

/// The line where the top-level `key` of a JSON object starts, in text
/// that serde_json has already accepted.
pub(crate) fn line_of_key(text: &str, key: &'static str) -> Option<usize> {
    line_of(text, &[Seg::Key(key)])
}

/// Finds the line where the value at `path` starts, in text that serde_json
/// has already accepted. `None` when it cannot be found.
pub(crate) fn line_of(text: &str, path: &[Seg]) -> Option<usize> {
    let mut sc = Scan {
        b: text.as_bytes(),
        i: 0,
        line: 1,
    };
    sc.find(path)
}

struct Scan<'a> {
    b: &'a [u8],
    i: usize,
    line: usize,
}

impl Scan<'_> {
    fn peek(&self) -> Option<u8> {
        self.b.get(self.i).copied()
    }

    fn ws(&mut self) {
        while let Some(c) = self.peek() {
            if !matches!(c, b' ' | b'\t' | b'\r' | b'\n') {
                break;
            }
            if c == b'\n' {
                self.line += 1;
            }
            self.i += 1;
        }
    }

    /// Reads a string starting at `"`; returns its raw content.
    fn string(&mut self) -> Option<&[u8]> {
        if self.peek()? != b'"' {
            return None;
        }
        self.i += 1;
        let start = self.i;
        loop {
            match self.peek()? {
                b'"' => {
                    let s = &self.b[start..self.i];
                    self.i += 1;
                    return Some(s);
                }
                b'\\' => self.i += 2,
                b'\n' => {
                    self.line += 1;
                    self.i += 1
                }
                _ => self.i += 1,
            }
        }
    }

    fn skip_value(&mut self) -> Option<()> {
        self.ws();
        match self.peek()? {
            b'"' => {
                self.string()?;
            }
            b'{' | b'[' => {
                let mut depth = 0usize;
                loop {
                    match self.peek()? {
                        b'"' => {
                            self.string()?;
                            continue;
                        }
                        b'{' | b'[' => depth += 1,
                        b'}' | b']' => {
                            depth -= 1;
                            if depth == 0 {
                                self.i += 1;
                                return Some(());
                            }
                        }
                        b'\n' => self.line += 1,
                        _ => {}
                    }
                    self.i += 1;
                }
            }
            _ => {
                while let Some(c) = self.peek() {
                    if matches!(c, b',' | b'}' | b']' | b' ' | b'\t' | b'\r' | b'\n') {
                        break;
                    }
                    self.i += 1;
                }
            }
        }
        Some(())
    }

    fn find(&mut self, path: &[Seg]) -> Option<usize> {
        self.ws();
        let Some((first, rest)) = path.split_first() else {
            return Some(self.line);
        };
        match (self.peek()?, first) {
            (b'{', Seg::Key(k)) => {
                self.i += 1;
                loop {
                    self.ws();
                    if self.peek()? == b'}' {
                        return None;
                    }
                    let key = self.string()?;
                    let hit = key == k.as_bytes();
                    self.ws();
                    if self.peek()? != b':' {
                        return None;
                    }
                    self.i += 1;
                    if hit {
                        return self.find(rest);
                    }
                    self.skip_value()?;
                    self.ws();
                    if self.peek()? != b',' {
                        return None;
                    }
                    self.i += 1;
                }
            }
            (b'[', Seg::Index(n)) => {
                self.i += 1;
                let mut idx = 0;
                loop {
                    self.ws();
                    if self.peek()? == b']' {
                        return None;
                    }
                    if idx == *n {
                        return self.find(rest);
                    }
                    self.skip_value()?;
                    self.ws();
                    if self.peek()? != b',' {
                        return None;
                    }
                    self.i += 1;
                    idx += 1;
                }
            }
            _ => None,
        }
    }
}

/// Reads a scenario file from disk.
///
/// # Errors
/// [`Error::Io`] when the file cannot be read, [`ParseProblem::NotUtf8`] (with its line) when
/// it is not UTF-8, and the errors of [`read_scenario`].
pub fn read_scenario_file(path: impl AsRef<Path>) -> Result<Instance> {
    let (name, text) = super::read_text(path.as_ref())?;
    read_scenario(&text, &name)
}

/// Parses scenario JSON text. `file` names the source in errors.
///
/// A byte-order mark before the JSON is skipped. After the JSON itself
/// reads, validation goes on past the first problem and reports them all
/// (up to [`crate::model::MAX_PROBLEMS`]) in one [`Error::Several`].
///
/// # Errors
/// [`ParseProblem::Json`] for JSON syntax or a value of the wrong type (at
/// its line, with the column), a wrong `format` or `version`, and then each
/// problem of the content at its JSON path and line: a junction id given
/// twice or unknown, a number above [`MAX_NUMBER`], a negative shift limit,
/// a junction's coordinates outside the declared system
/// ([`ParseProblem::Coordinate`], every such junction), or an invalid
/// instance ([`ParseProblem::Model`]).
///
/// # Complexity
/// `O(L + V + E)` for `L` bytes of text, `V` junctions and `E` streets
/// (finding the line of a problem scans the text once per problem).
///
/// ```
/// let text = r#"{"format": "arcwright-scenario", "version": 1, "name": "lane",
///   "junctions": [{"id": 1}, {"id": 2}],
///   "streets": [{"from": 1, "to": 2, "cost": 60, "name": "Mill Lane",
///                "service": {"demand": 12, "cost": 75}}],
///   "yard": 1, "fleet": {"capacity": 100}}"#;
/// let inst = arcwright::io::read_scenario(text, "lane.json").unwrap();
/// assert_eq!(inst.tasks()[0].cost, 75);
/// let bad = text.replace("\"to\": 2", "\"to\": 7");
/// let e = arcwright::io::read_scenario(&bad, "lane.json").unwrap_err();
/// assert_eq!(e.to_string(), "lane.json:3: at `streets[0].to`: no junction has id 7");
/// ```
pub fn read_scenario(text: &str, file: &str) -> Result<Instance> {
    // A byte-order mark, as some editors write, is not JSON: skip it.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let rec: FileRec = serde_json::from_str(text).map_err(|e| Error::json(file, &e))?;
    let mut c = Collect {
        file,
        text,
        problems: Problems::new(file),
    };
    if rec.format != FORMAT_TAG {
        c.at(
            vec![Seg::Key("format")],
            ParseProblem::Unexpected {
                expected: "\"arcwright-scenario\"",
                found: rec.format.clone(),
            },
        );
        return Err(c.problems.failed());
    }
    if rec.version != VERSION {
        c.at(
            vec![Seg::Key("version")],
            ParseProblem::Unexpected {
                expected: "version 1",
                found: rec.version.to_string(),
            },
        );
        return Err(c.problems.failed());
    }
    let (junctions, index) = c.junctions(&rec.junctions);
    let links = c.streets(&rec.streets, &index);
    let turn_restrictions = c.turns(&rec.turn_restrictions, &index, rec.streets.len());
    let fleet_ops = c.fleet_and_operations(&rec, &index);
    let (fleet, depot, ops) = match fleet_ops {
        Ok((fleet, depot, ops)) => (fleet, Some(depot), Some(ops)),
        Err(e) => {
            c.problems.push(e);
            (Fleet::with_capacity(1), None, None)
        }
    };
    let at = |path: Vec<Seg>, problem: ParseProblem| c.error_at(path, problem);
    let units = read_units(rec.units.as_ref(), &at);
    let system = read_system(rec.coordinates.as_ref(), &at);
    let (units, system) = match (units, system) {
        (Ok(u), Ok(s)) => (Some(u), Some(s)),
        (u, s) => {
            for e in [u.err(), s.err()].into_iter().flatten() {
                c.problems.push(e);
            }
            (None, None)
        }
    };
    if let Some(system) = system {
        c.coordinates(&junctions, system);
    }
    let (Some(depot), Some(ops), Some(units), Some(system), true) =
        (depot, ops, units, system, c.problems.is_empty())
    else {
        return Err(c.problems.failed());
    };
    let network = Network {
        junctions,
        links,
        turn_restrictions,
    };
    let inst = match Instance::validate(rec.name, network, fleet, depot) {
        Ok(inst) => inst,
        Err(all) => {
            for m in all {
                c.at(model_error_path(&m), ParseProblem::Model(m));
            }
            return Err(c.problems.failed());
        }
    };
    let rules = rec.turn_rules;
    // The coordinates were checked above; this cannot fail.
    let inst = inst
        .with_units(units)
        .with_coordinates(system)
        .map_err(|(j, e)| c.coordinate_error(j, e))?;
    let inst = inst.with_operations(ops).map_err(|e| {
        let path = operations_error_path(&rec.yards, &rec.truck_types, &e);
        c.error_at(path, ParseProblem::Model(ModelError::Operations(e)))
    })?;
    inst.with_turn_rules(rules).map_err(|all| {
        for e in all {
            let path = turn_error_path(&e);
            c.at(path, ParseProblem::Turn(e));
        }
        c.problems.failed()
    })
}

/// Where in the scenario a turn-rule problem is.
fn turn_error_path(e: &crate::turns::TurnError) -> Vec<Seg> {
    use crate::turns::TurnError;
    match e {
        TurnError::NotMeeting { index, .. } => {
            vec![Seg::Key("turn_restrictions"), Seg::Index(*index)]
        }
        TurnError::NegativePenalty { which, .. } => {
            vec![
                Seg::Key("turn_rules"),
                Seg::Key("penalties"),
                Seg::Key(which),
            ]
        }
        TurnError::NoWayOut { link, .. } => vec![Seg::Key("streets"), Seg::Index(*link)],
    }
}

/// The problems of one scenario text, each at its JSON path and line.
struct Collect<'t> {
    file: &'t str,
    text: &'t str,
    problems: Problems,
}

impl Collect<'_> {
    /// The error for `problem` at `path`, with its line.
    fn error_at(&self, path: Vec<Seg>, problem: ParseProblem) -> Error {
        Error::parse(
            self.file,
            line_of(self.text, &path),
            ParseProblem::AtPath {
                path: path_string(&path),
                problem: Box::new(problem),
            },
        )
    }

    /// The fleet, depot and operations (see [`fleet_and_operations`]), the
    /// junctions looked up in `index`.
    fn fleet_and_operations(
        &self,
        rec: &FileRec,
        index: &HashMap<u64, usize>,
    ) -> Result<(Fleet, usize, Operations)> {
        let at = |path: Vec<Seg>, problem: ParseProblem| self.error_at(path, problem);
        let lookup = |path: Vec<Seg>, id: u64| -> Result<usize> {
            index
                .get(&id)
                .copied()
                .ok_or_else(|| at(path, ParseProblem::UnknownJunction { id }))
        };
        let limit = |path: Vec<Seg>, what: &'static str, v: i64| -> Result<()> {
            if v > MAX_NUMBER {
                let max = MAX_NUMBER as u64;
                return Err(at(
                    path,
                    ParseProblem::TooLarge {
                        what,
                        value: v as u64,
                        max,
                    },
                ));
            }
            Ok(())
        };
        fleet_and_operations(rec, &lookup, &at, &limit)
    }

    /// The problem of junction `j`'s coordinates, at `junctions[j].x` or
    /// `junctions[j].y`.
    fn coordinate_error(&self, j: usize, e: crate::model::CoordError) -> Error {
        let axis = if matches!(e.axis, "x" | "longitude") {
            "x"
        } else {
            "y"
        };
        self.error_at(
            vec![Seg::Key("junctions"), Seg::Index(j), Seg::Key(axis)],
            ParseProblem::Coordinate(e),
        )
    }

    /// Checks every junction's coordinates against the declared `system`
    /// and records a problem for each junction that cannot be in it.
    fn coordinates(&mut self, junctions: &[Junction], system: Coordinates) {
        for (i, j) in junctions.iter().enumerate() {
            if let (Some(x), Some(y)) = (j.x, j.y) {
                if let Err(e) = system.check_point(x, y) {
                    let e = self.coordinate_error(i, e);
                    self.problems.push(e);
                }
            }
        }
    }

    /// Records `problem` at `path`.
    fn at(&mut self, path: Vec<Seg>, problem: ParseProblem) {
        let e = self.error_at(path, problem);
        self.problems.push(e);
    }

    /// `v` if it is at most [`MAX_NUMBER`], else a problem and `None`.
    fn limit(&mut self, path: Vec<Seg>, what: &'static str, v: i64) -> Option<i64> {
        if v > MAX_NUMBER {
            let problem = ParseProblem::TooLarge {
                what,
                value: v as u64,
                max: MAX_NUMBER as u64,
            };
            self.at(path, problem);
            return None;
        }
        Some(v)
    }

    fn junctions(&mut self, recs: &[JunctionRec]) -> (Vec<Junction>, HashMap<u64, usize>) {
        let mut index: HashMap<u64, usize> = HashMap::with_capacity(recs.len());
        let mut junctions = Vec::with_capacity(recs.len());
        for (i, j) in recs.iter().enumerate() {
            if let Some(&first) = index.get(&j.id) {
                self.at(
                    vec![Seg::Key("junctions"), Seg::Index(i), Seg::Key("id")],
                    ParseProblem::DuplicateJunction { id: j.id, first },
                );
            } else {
                index.insert(j.id, i);
            }
            junctions.push(Junction {
                id: j.id,
                x: j.x,
                y: j.y,
            });
        }
        (junctions, index)
    }

    fn lookup(&mut self, index: &HashMap<u64, usize>, path: Vec<Seg>, id: u64) -> Option<usize> {
        let found = index.get(&id).copied();
        if found.is_none() {
            self.at(path, ParseProblem::UnknownJunction { id });
        }
        found
    }

    /// The streets as links; a street with an unknown end is left out (its
    /// problem is recorded).
    fn streets(&mut self, recs: &[StreetRec], index: &HashMap<u64, usize>) -> Vec<Link> {
        let mut links = Vec::with_capacity(recs.len());
        for (i, s) in recs.iter().enumerate() {
            let p = |k: &'static str| vec![Seg::Key("streets"), Seg::Index(i), Seg::Key(k)];
            let ps = |k: &'static str| {
                let mut v = p("service");
                v.push(Seg::Key(k));
                v
            };
            let from = self.lookup(index, p("from"), s.from);
            let to = self.lookup(index, p("to"), s.to);
            let mut ok = self.limit(p("cost"), "cost", s.cost).is_some();
            if let Some(len) = s.length {
                ok &= self.limit(p("length"), "length", len).is_some();
            }
            if let Some(t) = s.drive_time {
                ok &= self.limit(p("drive_time"), "drive time", t).is_some();
            }
            if let Some(sv) = &s.service {
                ok &= self.limit(ps("demand"), "demand", sv.demand).is_some();
                ok &= self.limit(ps("cost"), "service cost", sv.cost).is_some();
                if let Some(t) = sv.time {
                    ok &= self.limit(ps("time"), "service time", t).is_some();
                }
            }
            let (Some(from), Some(to), true) = (from, to, ok) else {
                continue;
            };
            links.push(Link {
                from,
                to,
                oneway: s.one_way,
                cost: s.cost,
                time: s.drive_time,
                service: s.service.as_ref().map(|sv| ServiceSpec {
                    demand: sv.demand,
                    cost: sv.cost,
                    time: sv.time,
                    direction: match sv.directions {
                        Directions::Either => ServeDirection::Either,
                        Directions::Forward => ServeDirection::Forward,
                    },
                }),
                name: s.name.clone(),
                length: s.length,
                geometry: s.geometry.clone(),
                class: s.class.clone(),
            });
        }
        links
    }

    /// The turn restrictions; one with a bad rule, street number or via
    /// junction is left out (its problem is recorded).
    fn turns(
        &mut self,
        recs: &[TurnRec],
        index: &HashMap<u64, usize>,
        streets: usize,
    ) -> Vec<TurnRestriction> {
        let mut out = Vec::with_capacity(recs.len());
        for (i, t) in recs.iter().enumerate() {
            let p =
                |k: &'static str| vec![Seg::Key("turn_restrictions"), Seg::Index(i), Seg::Key(k)];
            let mut ok = true;
            if !(t.rule.starts_with("no_") || t.rule.starts_with("only_")) {
                let problem = ParseProblem::Unexpected {
                    expected: "a rule starting with no_ or only_",
                    found: t.rule.clone(),
                };
                self.at(p("rule"), problem);
                ok = false;
            }
            for (k, street) in [("from_street", t.from_street), ("to_street", t.to_street)] {
                if street >= streets {
                    let problem = ParseProblem::Unexpected {
                        expected: "the number of a street (0-based position in `streets`)",
                        found: street.to_string(),
                    };
                    self.at(p(k), problem);
                    ok = false;
                }
            }
            let via = self.lookup(index, p("via"), t.via);
            if let (Some(via), true) = (via, ok) {
                out.push(TurnRestriction {
                    rule: t.rule.clone(),
                    from: t.from_street,
                    via,
                    to: t.to_street,
                });
            }
        }
        out
    }
}

type Lookup<'a> = dyn Fn(Vec<Seg>, u64) -> Result<usize> + 'a;
type At<'a> = dyn Fn(Vec<Seg>, ParseProblem) -> Error + 'a;
type Limit<'a> = dyn Fn(Vec<Seg>, &'static str, i64) -> Result<()> + 'a;

/// A number that must be at most [`MAX_NUMBER`] and not negative.
fn number(at: &At, limit: &Limit, path: Vec<Seg>, what: &'static str, v: i64) -> Result<()> {
    limit(path.clone(), what, v)?;
    if v < 0 {
        return Err(at(path, ParseProblem::Negative { what, value: v }));
    }
    Ok(())
}

/// The fleet, depot and operations of a scenario: `yard` + `fleet` (the
/// plain model) or `yards` / `truck_types`, plus dump sites and balance.
fn fleet_and_operations(
    rec: &FileRec,
    lookup: &Lookup,
    at: &At,
    limit: &Limit,
) -> Result<(Fleet, usize, Operations)> {
    let key = |k: &'static str| vec![Seg::Key(k)];
    let both = |k: &'static str, other: &'static str| {
        at(key(k), ParseProblem::Conflict { given: k, other })
    };
    let mut yards = Vec::with_capacity(rec.yards.len());
    for (i, y) in rec.yards.iter().enumerate() {
        let p = vec![Seg::Key("yards"), Seg::Index(i), Seg::Key("junction")];
        yards.push(Yard {
            name: y.name.clone(),
            junction: lookup(p, y.junction)?,
        });
    }
    let depot = match (rec.yard, yards.first()) {
        (Some(_), Some(_)) => return Err(both("yard", "yards")),
        (Some(id), None) => lookup(key("yard"), id)?,
        (None, Some(y)) => y.junction,
        (None, None) => {
            return Err(at(
                Vec::new(),
                ParseProblem::MissingKey {
                    key: "yard (or yards)",
                },
            ))
        }
    };
    let dump_sites = read_dump_sites(rec, lookup, at, limit)?;
    let truck_types = read_truck_types(rec, at, limit)?;
    let fleet = match (&rec.fleet, truck_types.is_empty()) {
        (Some(_), false) => return Err(both("fleet", "truck_types")),
        (None, true) => {
            return Err(at(
                Vec::new(),
                ParseProblem::MissingKey {
                    key: "fleet (or truck_types)",
                },
            ))
        }
        (Some(f), true) => {
            limit(key_in("fleet", "capacity"), "capacity", f.capacity)?;
            if let Some(t) = f.shift_limit {
                number(at, limit, key_in("fleet", "shift_limit"), "shift limit", t)?;
            }
            Fleet {
                capacity: f.capacity,
                shift_limit: f.shift_limit,
                max_vehicles: f.max_trucks,
            }
        }
        // The plain model's view of a mixed fleet: the largest load limit,
        // no shift limit, as many trucks as all types together.
        (None, false) => Fleet {
            capacity: truck_types.iter().map(|t| t.capacity).max().unwrap_or(1),
            shift_limit: None,
            max_vehicles: truck_types
                .iter()
                .map(|t| t.count)
                .try_fold(0usize, |a, c| c.map(|c| a.saturating_add(c))),
        },
    };
    let balance = match &rec.balance {
        None => Balance::LeastCost,
        Some(b) => {
            let p = key_in("balance", "longest_shift_weight");
            number(at, limit, p, "longest-shift weight", b.longest_shift_weight)?;
            Balance::LongestShift {
                weight: b.longest_shift_weight,
            }
        }
    };
    let ops = Operations {
        dump_sites,
        return_empty: rec.return_empty.unwrap_or(true),
        yards,
        truck_types,
        balance,
    };
    Ok((fleet, depot, ops))
}

/// The `dump_sites` of a scenario.
fn read_dump_sites(
    rec: &FileRec,
    lookup: &Lookup,
    at: &At,
    limit: &Limit,
) -> Result<Vec<DumpSite>> {
    let mut dump_sites = Vec::with_capacity(rec.dump_sites.len());
    for (i, d) in rec.dump_sites.iter().enumerate() {
        let p = |k: &'static str| vec![Seg::Key("dump_sites"), Seg::Index(i), Seg::Key(k)];
        number(at, limit, p("unload_time"), "unload time", d.unload_time)?;
        number(at, limit, p("unload_cost"), "unload cost", d.unload_cost)?;
        let hours = match (d.opens, d.closes) {
            (None, None) => None,
            (o, c) => {
                let opens = o.unwrap_or(0);
                let closes = c.unwrap_or(MAX_NUMBER);
                number(at, limit, p("opens"), "opening time", opens)?;
                number(at, limit, p("closes"), "closing time", closes)?;
                Some(Hours { opens, closes })
            }
        };
        dump_sites.push(DumpSite {
            name: d.name.clone(),
            junction: lookup(p("junction"), d.junction)?,
            unload_time: d.unload_time,
            unload_cost: d.unload_cost,
            hours,
        });
    }
    Ok(dump_sites)
}

/// The `truck_types` of a scenario, their yards by index into `yards`.
fn read_truck_types(rec: &FileRec, at: &At, limit: &Limit) -> Result<Vec<TruckType>> {
    let mut truck_types = Vec::with_capacity(rec.truck_types.len());
    for (i, t) in rec.truck_types.iter().enumerate() {
        let p = |k: &'static str| vec![Seg::Key("truck_types"), Seg::Index(i), Seg::Key(k)];
        limit(p("capacity"), "capacity", t.capacity)?;
        if t.capacity <= 0 {
            return Err(at(
                p("capacity"),
                ParseProblem::Model(ModelError::BadCapacity {
                    capacity: t.capacity,
                }),
            ));
        }
        if let Some(v) = t.shift_limit {
            number(at, limit, p("shift_limit"), "shift limit", v)?;
        }
        number(at, limit, p("fixed_cost"), "fixed cost", t.fixed_cost)?;
        number(
            at,
            limit,
            p("cost_per_mille"),
            "cost factor",
            t.cost_per_mille,
        )?;
        let yard = match (&t.yard, rec.yards.len()) {
            (None, 0 | 1) => 0,
            (None, _) => return Err(at(p("name"), ParseProblem::MissingKey { key: "yard" })),
            (Some(name), _) => rec
                .yards
                .iter()
                .position(|y| &y.name == name)
                .ok_or_else(|| {
                    at(
                        p("yard"),
                        ParseProblem::UnknownName {
                            what: "yard",
                            name: name.clone(),
                        },
                    )
                })?,
        };
        let (no_entry, no_entry_classes) = split_list(&t.no_entry);
        let (no_service, no_service_classes) = split_list(&t.no_service);
        truck_types.push(TruckType {
            name: t.name.clone(),
            count: t.count,
            capacity: t.capacity,
            shift_limit: t.shift_limit,
            yard,
            fixed_cost: t.fixed_cost,
            cost_per_mille: t.cost_per_mille,
            no_entry,
            no_service,
            no_entry_classes,
            no_service_classes,
        });
    }
    Ok(truck_types)
}

fn key_in(a: &'static str, b: &'static str) -> Vec<Seg> {
    vec![Seg::Key(a), Seg::Key(b)]
}

/// Where in the file an error of the operations points.
fn operations_error_path(
    yards: &[YardRec],
    types: &[TruckTypeRec],
    e: &OperationsError,
) -> Vec<Seg> {
    let field = match e {
        OperationsError::Negative { what, .. } => match *what {
            "unload time" => Some("unload_time"),
            "unload cost" => Some("unload_cost"),
            "opening time" => Some("opens"),
            "shift limit" => Some("shift_limit"),
            "fixed cost" => Some("fixed_cost"),
            "cost factor" => Some("cost_per_mille"),
            _ => None,
        },
        OperationsError::BadHours { .. } => Some("closes"),
        OperationsError::NoSuchStreet { list, .. }
        | OperationsError::UnknownRoadClass { list, .. } => Some(*list),
        _ => None,
    };
    let mut p = match e.element() {
        Some(Element::DumpSite(i)) => vec![Seg::Key("dump_sites"), Seg::Index(i)],
        Some(Element::Street(i)) => vec![Seg::Key("streets"), Seg::Index(i)],
        Some(Element::Yard(name)) => match yards.iter().position(|y| y.name == name) {
            Some(i) => vec![Seg::Key("yards"), Seg::Index(i)],
            None => vec![Seg::Key("yard")],
        },
        Some(Element::TruckType(name)) => match types.iter().position(|t| t.name == name) {
            Some(i) => vec![Seg::Key("truck_types"), Seg::Index(i)],
            None => vec![Seg::Key("fleet")],
        },
        None => Vec::new(),
    };
    if let (Some(f), false) = (field, p.is_empty()) {
        p.push(Seg::Key(f));
    }
    p
}

/// The declared units, each checked ([`Units::valid_unit`]).
fn read_units(
    rec: Option<&UnitsRec>,
    at: &impl Fn(Vec<Seg>, ParseProblem) -> Error,
) -> Result<Units> {
    let Some(u) = rec else {
        return Ok(Units::default());
    };
    for (key, v) in [
        ("cost", &u.cost),
        ("length", &u.length),
        ("time", &u.time),
        ("load", &u.load),
    ] {
        if let Some(text) = v {
            if !Units::valid_unit(text) {
                return Err(at(
                    vec![Seg::Key("units"), Seg::Key(key)],
                    ParseProblem::Unexpected {
                        expected: "a unit name of 1 to 24 characters, such as \"m\" or \"bins\"",
                        found: text.clone(),
                    },
                ));
            }
        }
    }
    Ok(Units {
        cost: u.cost.clone(),
        length: u.length.clone(),
        time: u.time.clone(),
        load: u.load.clone(),
    })
}

/// The declared coordinate system; the origin is checked as a WGS 84 point.
fn read_system(
    rec: Option<&CoordinatesRec>,
    at: &impl Fn(Vec<Seg>, ParseProblem) -> Error,
) -> Result<Coordinates> {
    let Some(c) = rec else {
        return Ok(Coordinates::Undeclared);
    };
    let origin = match (&c.origin, c.system) {
        (None, _) => None,
        (Some(_), SystemRec::Wgs84) => {
            return Err(at(
                vec![Seg::Key("coordinates"), Seg::Key("origin")],
                ParseProblem::Unexpected {
                    expected: "no origin for \"wgs84\" (an origin places \"planar\" metres)",
                    found: "an origin".into(),
                },
            ))
        }
        (Some(o), SystemRec::Planar) => {
            Coordinates::check_origin(o.lon, o.lat).map_err(|e| {
                let key = if e.axis == "longitude" { "lon" } else { "lat" };
                at(
                    vec![Seg::Key("coordinates"), Seg::Key("origin"), Seg::Key(key)],
                    ParseProblem::Coordinate(e),
                )
            })?;
            Some((o.lon, o.lat))
        }
    };
    Ok(match c.system {
        SystemRec::Wgs84 => Coordinates::Wgs84,
        SystemRec::Planar => Coordinates::Planar { origin },
    })
}

/// Where in the file a model error points.
fn model_error_path(m: &ModelError) -> Vec<Seg> {
    let street = |link: usize, rest: &[&'static str]| {
        let mut p = vec![Seg::Key("streets"), Seg::Index(link)];
        p.extend(rest.iter().map(|k| Seg::Key(k)));
        p
    };
    match m {
        ModelError::Negative { link, what, .. } => match *what {
            "cost" => street(*link, &["cost"]),
            "time" => street(*link, &["drive_time"]),
            "service cost" => street(*link, &["service", "cost"]),
            "service time" => street(*link, &["service", "time"]),
            "demand" => street(*link, &["service", "demand"]),
            _ => street(*link, &[]),
        },
        ModelError::DemandExceedsCapacity { link, .. } => street(*link, &["service", "demand"]),
        ModelError::BadCapacity { .. } => vec![Seg::Key("fleet"), Seg::Key("capacity")],
        ModelError::NoVehicles { .. } => vec![Seg::Key("fleet"), Seg::Key("max_trucks")],
        ModelError::DepotOutOfRange { .. } => vec![Seg::Key("yard")],
        other => match other.link() {
            Some(l) => street(l, &[]),
            None => Vec::new(),
        },
    }
}

/// Writes an instance as pretty-printed scenario JSON (readable by
/// [`read_scenario`], giving an equal instance back as long as the junction
/// ids are distinct and the coordinates finite).
pub fn write_scenario(inst: &Instance) -> String {
    let net = inst.network();
    let ops = inst.operations();
    let id = |j: usize| net.junctions[j].id;
    let finite = |v: Option<f64>| v.filter(|x| x.is_finite());
    let rec = FileRec {
        format: FORMAT_TAG.to_string(),
        version: VERSION,
        name: inst.name.clone(),
        units: units_rec(inst.units()),
        coordinates: match inst.coordinates() {
            Coordinates::Undeclared => None,
            Coordinates::Wgs84 => Some(CoordinatesRec {
                system: SystemRec::Wgs84,
                origin: None,
            }),
            Coordinates::Planar { origin } => Some(CoordinatesRec {
                system: SystemRec::Planar,
                origin: origin.map(|(lon, lat)| OriginRec { lon, lat }),
            }),
        },
        junctions: net
            .junctions
            .iter()
            .map(|j| JunctionRec {
                id: j.id,
                x: finite(j.x),
                y: finite(j.y),
            })
            .collect(),
        streets: net
            .links
            .iter()
            .map(|l| StreetRec {
                from: id(l.from),
                to: id(l.to),
                one_way: l.oneway,
                cost: l.cost,
                length: l.length,
                drive_time: l.time,
                name: l.name.clone(),
                class: l.class.clone(),
                geometry: l
                    .geometry
                    .iter()
                    .copied()
                    .filter(|p| p[0].is_finite() && p[1].is_finite())
                    .collect(),
                service: l.service.as_ref().map(|s| ServiceRec {
                    demand: s.demand,
                    cost: s.cost,
                    time: s.time,
                    directions: match s.direction {
                        ServeDirection::Either => Directions::Either,
                        ServeDirection::Forward => Directions::Forward,
                    },
                }),
            })
            .collect(),
        yard: ops.yards.is_empty().then(|| id(inst.depot())),
        fleet: ops.truck_types.is_empty().then(|| FleetRec {
            capacity: inst.fleet().capacity as Cost,
            shift_limit: inst.fleet().shift_limit,
            max_trucks: inst.fleet().max_vehicles,
        }),
        yards: ops
            .yards
            .iter()
            .map(|y| YardRec {
                name: y.name.clone(),
                junction: id(y.junction),
            })
            .collect(),
        dump_sites: dump_site_recs(inst),
        return_empty: (!ops.return_empty).then_some(false),
        truck_types: truck_type_recs(inst),
        balance: match ops.balance {
            Balance::LeastCost => None,
            Balance::LongestShift { weight } => Some(BalanceRec {
                longest_shift_weight: weight,
            }),
        },
        turn_restrictions: net
            .turn_restrictions
            .iter()
            .map(|t| TurnRec {
                rule: t.rule.clone(),
                from_street: t.from,
                via: id(t.via),
                to_street: t.to,
            })
            .collect(),
        turn_rules: inst.turn_rules().copied(),
    };
    // Plain structs of integers, strings, booleans and finite floats always
    // serialize; a failure here would be a bug in this function.
    let mut s = serde_json::to_string_pretty(&rec).expect("scenario records always serialize");
    s.push('\n');
    s
}

/// The dump sites of `inst` as scenario records.
fn dump_site_recs(inst: &Instance) -> Vec<DumpSiteRec> {
    let ops = inst.operations();
    let id = |j: usize| inst.network().junctions[j].id;
    ops.dump_sites
        .iter()
        .map(|d| DumpSiteRec {
            name: d.name.clone(),
            junction: id(d.junction),
            unload_time: d.unload_time,
            unload_cost: d.unload_cost,
            opens: d.hours.map(|h| h.opens),
            closes: d.hours.map(|h| h.closes),
        })
        .collect()
}

/// The truck types of `inst` as scenario records (yards by name).
fn truck_type_recs(inst: &Instance) -> Vec<TruckTypeRec> {
    let ops = inst.operations();
    ops.truck_types
        .iter()
        .map(|t| TruckTypeRec {
            name: t.name.clone(),
            count: t.count,
            capacity: t.capacity,
            shift_limit: t.shift_limit,
            yard: ops.yards.get(t.yard).map(|y| y.name.clone()),
            fixed_cost: t.fixed_cost,
            cost_per_mille: t.cost_per_mille,
            no_entry: join_list(&t.no_entry, &t.no_entry_classes),
            no_service: join_list(&t.no_service, &t.no_service_classes),
        })
        .collect()
}

fn units_rec(u: &Units) -> Option<UnitsRec> {
    (*u != Units::default()).then(|| UnitsRec {
        cost: u.cost.clone(),
        length: u.length.clone(),
        time: u.time.clone(),
        load: u.load.clone(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_lines_of_paths() {
        let text = "{\n \"a\": [1,\n {\"b\": \"x,]}\"},\n {\"b\":\n 2}\n ]\n}";
        let p = [Seg::Key("a"), Seg::Index(2), Seg::Key("b")];
        assert_eq!(line_of(text, &p), Some(5));
        assert_eq!(path_string(&p), "a[2].b");
        assert_eq!(line_of(text, &[Seg::Key("a"), Seg::Index(7)]), None);
    }
}
