//! Service profiles: which streets the trucks drive and serve, how fast, and
//! how much each street yields. A small TOML file of our own design; two are
//! built in ([`Profile::refuse`], the default, and [`Profile::gritting`]).
//!
//! ```toml
//! name = "refuse collection"
//! load_unit = "kg"                           # unit of demands and capacity (default kg)
//! closed_access = ["no", "private"]          # access / vehicle / motor_vehicle / hgv values not driven
//! closed_service = ["parking_aisle", "driveway"]   # service=* kinds not driven
//!
//! [truck]
//! capacity = 9000       # load units (kg) per truck
//! shift = 28800         # seconds per route (optional)
//! max_trucks = 10       # optional
//!
//! [demand]
//! per_km_of_kerb = 400  # load units per km of one kerb
//! per_address = 25      # optional: load units per address point instead
//! address_snap_m = 50   # optional: largest address-to-street distance (default 50)
//!
//! [classes]             # the road classes (OSM highway=*) trucks may drive
//! residential = { drive_kmh = 25, serve = "both_sides", serve_kmh = 5 }
//! primary     = { drive_kmh = 40, serve = "each_side", serve_kmh = 6 }
//! service     = { drive_kmh = 15, serve = "no" }
//! ```
//!
//! The optional `[turn_rules]` table gives the built scenario turn rules,
//! with the fields and defaults of the scenario's `turn_rules` object
//! ([`crate::turns::TurnRules`]; penalties in metres, the maps' cost unit):
//!
//! ```toml
//! [turn_rules]
//! u_turns = "dead_ends_only"            # or "allowed"
//! driving_side = "right"                # or "left"
//! obey_restrictions = true              # the map's no_* / only_* turn restrictions
//! penalties = { left = 30, u_turn = 60 }
//! ```
//!
//! Without it the trucks turn freely (the built-in profiles have none).
//!
//! `serve` is `"no"` (driven, not served), `"both_sides"` (both kerbs in one
//! pass: one required street, either direction on a two-way street) or
//! `"each_side"` (one kerb per pass: two required streets, one each way on a
//! two-way street, both in the driving direction on a one-way street). A
//! street served on both sides in one pass yields the demand of two kerbs.
//!
//! With `per_address`, and a map that has address points (OSM nodes and
//! buildings with `addr:housenumber`; GeoJSON Point features with that
//! property), each address is given to the nearest served street within
//! `address_snap_m` metres and a street's demand is `per_address` times its
//! addresses (split between the two passes of a street served one side at a
//! time); a served street without an address is then only driven. A map
//! without address points falls back to the load per km of kerb.
//! The full defaults are in `src/map/profiles/refuse.toml` and
//! `src/map/profiles/gritting.toml`.

use std::collections::BTreeMap;
use std::path::Path;

use serde::Deserialize;
use toml::Spanned;

use super::error::MapError;
use crate::model::Cost;
use crate::turns::TurnRules;

/// Road classes a profile may name: the OpenStreetMap `highway=*` values of
/// ways a vehicle can use. Anything else in a profile is an error.
pub const ROAD_CLASSES: &[&str] = &[
    "motorway",
    "motorway_link",
    "trunk",
    "trunk_link",
    "primary",
    "primary_link",
    "secondary",
    "secondary_link",
    "tertiary",
    "tertiary_link",
    "unclassified",
    "residential",
    "living_street",
    "service",
    "road",
    "track",
    "busway",
    "pedestrian",
];

/// How the streets of a class are served.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Serve {
    /// Driven, not served.
    No,
    /// Both kerbs in one pass.
    BothSides,
    /// One kerb per pass (two passes).
    EachSide,
}

/// What a profile says about one road class.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ClassRule {
    /// Driving speed without serving, km/h.
    pub drive_kmh: u32,
    /// How the class is served.
    pub serve: Serve,
    /// Speed while serving, km/h (default: `drive_kmh`).
    #[serde(default)]
    pub serve_kmh: Option<u32>,
}

/// The trucks' defaults.
#[derive(Clone, Debug, PartialEq, Eq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TruckDefaults {
    /// Load limit of one truck.
    pub capacity: Cost,
    /// Time limit of one route, seconds.
    #[serde(default)]
    pub shift: Option<Cost>,
    /// Largest number of trucks.
    #[serde(default)]
    pub max_trucks: Option<usize>,
}

fn fifty() -> u32 {
    50
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct DemandRec {
    per_km_of_kerb: u32,
    #[serde(default)]
    per_address: Option<u32>,
    #[serde(default = "fifty")]
    address_snap_m: u32,
}

fn kg() -> String {
    "kg".to_string()
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct ProfileRec {
    name: String,
    #[serde(default = "kg")]
    load_unit: String,
    #[serde(default)]
    closed_access: Vec<String>,
    #[serde(default)]
    closed_service: Vec<String>,
    truck: TruckDefaults,
    demand: DemandRec,
    classes: BTreeMap<Spanned<String>, Spanned<ClassRule>>,
    #[serde(default)]
    turn_rules: Option<TurnRules>,
}

/// A service profile (see the module documentation for the file format).
#[derive(Clone, Debug, PartialEq)]
pub struct Profile {
    /// A name for reports.
    pub name: String,
    /// The unit of demands and capacity (default `kg`).
    pub load_unit: String,
    /// `access`, `vehicle`, `motor_vehicle` and `hgv` values that close a way.
    pub closed_access: Vec<String>,
    /// `service=*` values that close a way.
    pub closed_service: Vec<String>,
    /// The trucks.
    pub truck: TruckDefaults,
    /// Load per km of one kerb.
    pub demand_per_km_of_kerb: u32,
    /// Load per address point, when demand is counted by address (maps
    /// without address points fall back to the load per km of kerb).
    pub demand_per_address: Option<u32>,
    /// Largest distance, metres, from an address point to the street it is
    /// given to (default 50).
    pub address_snap_m: u32,
    /// The road classes the trucks may drive, with their rules.
    pub classes: BTreeMap<String, ClassRule>,
    /// Turn rules for the built scenario (`[turn_rules]`; `None`: trucks
    /// turn freely, as without the table). With `obey_restrictions` (the
    /// default) the map's own turn restrictions are obeyed.
    pub turn_rules: Option<TurnRules>,
}

const REFUSE: &str = include_str!("profiles/refuse.toml");
const GRITTING: &str = include_str!("profiles/gritting.toml");

impl Profile {
    /// Kerbside refuse collection (the default): residential streets served
    /// both sides in one pass, main roads one side at a time, motorways and
    /// service roads driven only. See `src/map/profiles/refuse.toml`.
    pub fn refuse() -> Profile {
        Profile::parse(REFUSE, "<refuse>").expect("the built-in refuse profile is valid")
    }

    /// Winter gritting and ploughing: every class treated, wide roads one
    /// side at a time. See `src/map/profiles/gritting.toml`.
    pub fn gritting() -> Profile {
        Profile::parse(GRITTING, "<gritting>").expect("the built-in gritting profile is valid")
    }

    /// A built-in profile by name (`refuse`, `gritting`), else a TOML file.
    ///
    /// # Errors
    ///
    /// As [`Profile::read_file`].
    pub fn named_or_file(name: &str) -> Result<Profile, MapError> {
        match name {
            "refuse" => Ok(Profile::refuse()),
            "gritting" => Ok(Profile::gritting()),
            path => Profile::read_file(Path::new(path)),
        }
    }

    /// Reads a profile file.
    ///
    /// # Errors
    ///
    /// [`MapError::Io`] when it cannot be read, else as [`Profile::parse`].
    pub fn read_file(path: &Path) -> Result<Profile, MapError> {
        let file = path.display().to_string();
        let text = std::fs::read_to_string(path).map_err(|source| MapError::Io {
            file: file.clone(),
            source,
        })?;
        Profile::parse(&text, &file)
    }

    /// Parses profile TOML text. `file` names it in errors.
    ///
    /// ```
    /// use arcwright::map::Profile;
    /// let p = Profile::parse(r#"
    ///     name = "sweeping"
    ///     [truck]
    ///     capacity = 100
    ///     [demand]
    ///     per_km_of_kerb = 10
    ///     [classes]
    ///     residential = { drive_kmh = 20, serve = "each_side", serve_kmh = 8 }
    /// "#, "sweep.toml").unwrap();
    /// assert_eq!(p.classes.len(), 1);
    /// // A misspelt road class is an error that names it.
    /// let bad = p_text_with("residental");
    /// assert!(Profile::parse(&bad, "bad.toml").unwrap_err().to_string().contains("residental"));
    /// # fn p_text_with(class: &str) -> String {
    /// #     format!("name = \"x\"\n[truck]\ncapacity = 1\n[demand]\nper_km_of_kerb = 1\n\
    /// #              [classes]\n{class} = {{ drive_kmh = 5, serve = \"no\" }}\n")
    /// # }
    /// ```
    ///
    /// # Errors
    ///
    /// [`MapError::Profile`] (with the line) for TOML that does not fit the
    /// format, a speed of zero, a capacity below one or no class;
    /// [`MapError::UnknownRoadClass`] for a class not in [`ROAD_CLASSES`].
    pub fn parse(text: &str, file: &str) -> Result<Profile, MapError> {
        let line_of = |pos: usize| 1 + text[..pos.min(text.len())].matches('\n').count();
        let problem = |line: Option<usize>, problem: String| MapError::Profile {
            file: file.to_string(),
            line,
            problem,
        };
        let rec: ProfileRec = toml::from_str(text).map_err(|e| {
            let line = e.span().map(|s| line_of(s.start));
            problem(line, e.message().to_string())
        })?;
        if rec.truck.capacity < 1 {
            return Err(problem(None, "truck capacity must be at least 1".into()));
        }
        if rec.classes.is_empty() {
            return Err(problem(None, "no road class: [classes] is empty".into()));
        }
        let mut classes = BTreeMap::new();
        for (k, v) in rec.classes {
            let line = Some(line_of(k.span().start));
            let name = k.into_inner();
            if !ROAD_CLASSES.contains(&name.as_str()) {
                return Err(MapError::UnknownRoadClass {
                    file: file.to_string(),
                    line,
                    class: name,
                    known: ROAD_CLASSES.join(", "),
                });
            }
            let rule = v.into_inner();
            if rule.drive_kmh == 0 || rule.serve_kmh == Some(0) {
                return Err(problem(line, format!("class `{name}`: a speed of 0 km/h")));
            }
            classes.insert(name, rule);
        }
        if !(1..=24).contains(&rec.load_unit.chars().count())
            || rec.load_unit.chars().any(char::is_control)
        {
            return Err(problem(
                None,
                "load_unit must be 1 to 24 characters of text".into(),
            ));
        }
        Ok(Profile {
            name: rec.name,
            load_unit: rec.load_unit,
            closed_access: rec.closed_access,
            closed_service: rec.closed_service,
            truck: rec.truck,
            demand_per_km_of_kerb: rec.demand.per_km_of_kerb,
            demand_per_address: rec.demand.per_address,
            address_snap_m: rec.demand.address_snap_m,
            classes,
            turn_rules: rec.turn_rules,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn built_in_profiles_read() {
        let r = Profile::refuse();
        assert_eq!(r.classes["residential"].serve, Serve::BothSides);
        assert_eq!(r.classes["primary"].serve, Serve::EachSide);
        assert!(!r.classes.contains_key("footway"));
        let g = Profile::gritting();
        assert_eq!(g.classes["motorway"].serve, Serve::EachSide);
    }

    #[test]
    fn unknown_class_is_named_with_its_line() {
        let text = "name = \"x\"\n[truck]\ncapacity = 5\n[demand]\nper_km_of_kerb = 1\n[classes]\nresidental = { drive_kmh = 5, serve = \"no\" }\n";
        match Profile::parse(text, "p.toml") {
            Err(MapError::UnknownRoadClass { line, class, .. }) => {
                assert_eq!(class, "residental");
                assert_eq!(line, Some(7));
            }
            other => panic!("{other:?}"),
        }
    }
}
