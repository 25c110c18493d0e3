//! What the builder made of a map, for the planner to print.

use std::fmt;

use super::build::{Dropped, StreetGraph};
use super::raw::MapFormat;
use super::yard::YardReport;
use crate::model::Instance;

/// The numbers of a built map (see [`crate::map::load_map`]).
#[derive(Clone, Debug, PartialEq)]
pub struct BuildReport {
    /// The map file.
    pub file: String,
    /// Its format.
    pub format: MapFormat,
    /// The profile's name.
    pub profile: String,
    /// Junctions of the kept network.
    pub junctions: usize,
    /// Streets (chains between junctions) of the kept network.
    pub streets: usize,
    /// Streets to be served.
    pub required_streets: usize,
    /// Required links (a street served one side at a time gives two).
    pub tasks: usize,
    /// Total length of the kept streets, metres (each street once).
    pub length_m: f64,
    /// Total length of the required streets, metres.
    pub required_length_m: f64,
    /// One-way streets.
    pub one_way_streets: usize,
    /// Turn restrictions kept.
    pub restrictions: usize,
    /// What was left out because trucks cannot drive around it.
    pub dropped: Dropped,
    /// Where the yard is.
    pub yard: YardReport,
    /// Ways read with a `highway` tag (GeoJSON: lines).
    pub ways_read: usize,
    /// Ways of a class the profile does not drive.
    pub ways_other_class: usize,
    /// Ways closed to trucks.
    pub ways_closed: usize,
    /// References to nodes missing from the file.
    pub missing_node_refs: usize,
    /// Cuts made in streets too long for one truck to serve in one pass.
    pub long_cuts: usize,
    /// Address points in the map.
    pub addresses_read: usize,
    /// Address points given to a served street, when demand is counted by
    /// address.
    pub addresses_snapped: Option<usize>,
    /// With the profile's turn rules: streets to serve that the rules (and
    /// the map's restrictions) cut off from the yard, driven but not served.
    pub cut_off_by_turns: Vec<String>,
}

impl BuildReport {
    pub(crate) fn new(
        file: &str,
        format: MapFormat,
        profile: &str,
        graph: &StreetGraph,
        inst: &Instance,
        street_of: &[usize],
    ) -> BuildReport {
        let mut required = vec![false; graph.streets.len()];
        for t in inst.tasks() {
            required[street_of[t.link]] = true;
        }
        BuildReport {
            file: file.to_string(),
            format,
            profile: profile.to_string(),
            junctions: graph.junctions.len(),
            streets: graph.streets.len(),
            required_streets: required.iter().filter(|&&r| r).count(),
            tasks: inst.tasks().len(),
            length_m: graph.streets.iter().map(|s| s.length_m).sum(),
            required_length_m: graph
                .streets
                .iter()
                .zip(&required)
                .filter(|(_, &r)| r)
                .map(|(s, _)| s.length_m)
                .sum(),
            one_way_streets: graph.streets.iter().filter(|s| s.one_way).count(),
            restrictions: graph.turns.len(),
            dropped: graph.dropped.clone(),
            yard: graph.yard.1,
            ways_read: graph.ways_read,
            ways_other_class: graph.ways_other_class,
            ways_closed: graph.ways_closed,
            missing_node_refs: graph.missing_node_refs,
            long_cuts: graph.long_cuts,
            addresses_read: graph.addresses_read,
            addresses_snapped: graph.addresses_snapped,
            cut_off_by_turns: Vec::new(),
        }
    }
}

impl fmt::Display for BuildReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let km = |m: f64| m / 1000.0;
        writeln!(
            f,
            "map {} ({:?}), profile: {}",
            self.file, self.format, self.profile
        )?;
        writeln!(
            f,
            "  read {} street ways: {} of classes not driven, {} closed to trucks{}",
            self.ways_read,
            self.ways_other_class,
            self.ways_closed,
            if self.missing_node_refs > 0 {
                format!(
                    ", {} node references outside the extract",
                    self.missing_node_refs
                )
            } else {
                String::new()
            }
        )?;
        writeln!(
            f,
            "  network: {} junctions, {} streets ({:.1} km), {} one-way, {} turn restrictions",
            self.junctions,
            self.streets,
            km(self.length_m),
            self.one_way_streets,
            self.restrictions
        )?;
        writeln!(
            f,
            "  to serve: {} streets ({:.1} km), {} passes",
            self.required_streets,
            km(self.required_length_m),
            self.tasks
        )?;
        if let Some(n) = self.addresses_snapped {
            writeln!(
                f,
                "  demand by address: {n} of {} address points on served streets",
                self.addresses_read
            )?;
        }
        if self.long_cuts > 0 {
            writeln!(
                f,
                "  {} cuts made in streets too long for one truck to serve in one pass",
                self.long_cuts
            )?;
        }
        if self.dropped.pieces > 0 {
            writeln!(
                f,
                "  left out (trucks cannot drive there and back): {} pieces, {:.2} km{}",
                self.dropped.pieces,
                km(self.dropped.length_m),
                if self.dropped.names.is_empty() {
                    String::new()
                } else {
                    format!(", such as {}", self.dropped.names.join(", "))
                }
            )?;
        }
        if !self.cut_off_by_turns.is_empty() {
            let n = self.cut_off_by_turns.len();
            let shown: Vec<&str> = self
                .cut_off_by_turns
                .iter()
                .take(5)
                .map(String::as_str)
                .collect();
            writeln!(
                f,
                "  not served: {n} streets that the turn rules and the map's restrictions cut off from the yard ({}{})",
                shown.join(", "),
                if n > 5 { ", ..." } else { "" }
            )?;
        }
        write!(f, "  yard: {}", self.yard)
    }
}
