//! Outputs for people: route sheets, a summary table, GeoJSON and SVG maps.
//!
//! Every function here returns a `String`; writing files is left to the
//! caller (the `planner` example writes them all into one folder).
//!
//! - [`sheets`]: one CSV per truck ([`sheets::route_csv`]) and one Markdown
//!   document for all ([`sheets::markdown`]), built from the explicit walk
//!   ([`crate::plan::walk`]) with running load, distance and time;
//! - [`geo`]: a GeoJSON FeatureCollection (RFC 7946) of every step;
//! - [`svg`]: a map of the network and the routes;
//! - [`summary_table`]: a plain-text table of the routes and totals;
//! - [`directions`]: with turn rules, one manoeuvre per street ("left onto
//!   Mill Lane", "U-turn at the dead end of ...") and the turns counted;
//!   [`route_walks`] gives the walks the sheets, maps and plan file share;
//! - [`fleet`]: route sheets of fleet plans, with every tip ("tip at
//!   Landfill, unload 15 min"); the SVG map marks the operations' other
//!   yards and dump sites.
//!
//! The Markdown sheets and the summary carry the [`CAUTIONS`]; the CSV sheets
//! are plain tables (header on line 1) for spreadsheets. Every number is
//! labelled with the unit the scenario declares ([`crate::model::Units`]),
//! and [`describe`] puts the checker's findings in the sheets' words.

pub mod directions;
pub mod fleet;
pub mod geo;
pub mod sheets;
pub mod svg;
mod violations;

pub use violations::{describe, street_ref};

use std::fmt::Write as _;
use std::time::Duration;

use crate::model::{Coordinates, Cost, Instance};
use crate::plan::Plan;

/// Printed in the Markdown route sheets and the summary.
pub const CAUTIONS: [&str; 4] = [
    "This plan is advice for a licensed transport planner, not an order: check it before any truck leaves the yard.",
    "Check height, weight and width limits and turn restrictions on every street; the street data may not record them.",
    "Respect the driving-hours and rest rules that apply to your drivers, and allow for breaks, tipping and refuelling.",
    "Follow local codes (school zones, quiet hours, access times, road works) and the instructions of the road authority.",
];

/// The street name of link `link`, or, when it has none, a label naming its
/// junctions and its place in the scenario's street list (the `link` of plan
/// files): `street 3–7 (#8)`.
pub fn street_label(inst: &Instance, link: usize) -> String {
    let net = inst.network();
    let l = &net.links[link];
    match &l.name {
        Some(n) if !n.trim().is_empty() => n.clone(),
        _ => format!(
            "street {}–{} (#{link})",
            net.junctions[l.from].id, net.junctions[l.to].id
        ),
    }
}

/// One output file: a name (no folder) and its contents.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct OutputFile {
    /// File name, e.g. `truck-1.csv`.
    pub name: String,
    /// Contents.
    pub contents: String,
}

/// Every report of a plan, ready to be written into one folder:
/// `summary.txt`, `sheets.md`, one `truck-N.csv` per route (numbers padded
/// to equal width when there are ten or more), and `plan.geojson` and
/// `plan.svg` when the scenario has coordinates. The plan file itself
/// (`plan.json`) is written by the caller, who has checked the plan.
pub fn bundle(
    inst: &Instance,
    dist: &crate::paths::Distances,
    plan: &Plan,
    extras: &SummaryExtras,
) -> Vec<OutputFile> {
    // The walks are expanded once (one shortest-path search per deadhead leg).
    bundle_walks(inst, plan, &route_walks(inst, dist, plan), extras)
}

/// The explicit walk of every route as the trucks drive it. With turn rules
/// it is the walk with its turns ([`crate::turns::walks_with_turns`]: every
/// leg least-cost with turn penalties, banned turns avoided); without, the
/// walk of [`crate::plan::walk`] with no turns recorded.
///
/// # Panics
///
/// With turn rules, when a route has a leg with no allowed way: plans of
/// the solver never do, and [`crate::check::check_plan`] reports such a
/// plan (`NoPath`) before anything is drawn.
pub fn route_walks(
    inst: &Instance,
    dist: &crate::paths::Distances,
    plan: &Plan,
) -> Vec<crate::turns::TurnWalk> {
    match inst.turn_rules() {
        Some(rules) => {
            // Instance::with_turn_rules has checked that the table can be built.
            let table = crate::turns::TurnTable::new(inst, rules).expect("checked turn rules");
            crate::turns::walks_with_turns(inst, &table, plan)
                .expect("every leg of a checked plan has an allowed way")
        }
        None => plan
            .routes
            .iter()
            .map(|r| crate::turns::TurnWalk {
                steps: crate::plan::walk(inst, dist, &r.visits),
                turns: Vec::new(),
            })
            .collect(),
    }
}

/// [`bundle`] from walks already expanded ([`route_walks`], or the walks a
/// plan file states).
pub fn bundle_walks(
    inst: &Instance,
    plan: &Plan,
    walks: &[crate::turns::TurnWalk],
    extras: &SummaryExtras,
) -> Vec<OutputFile> {
    let rows = sheets::rows_of_walks(inst, walks);
    let mut extras = extras.clone();
    if extras.route_lengths.is_none() && sheets::shows_lengths(inst) {
        extras.route_lengths = rows
            .iter()
            .map(|r| r.last().map_or(Some(0), |x| x.length_so_far))
            .collect();
    }
    if extras.turn_counts.is_none() && inst.turn_rules().is_some() {
        extras.turn_counts = rows
            .iter()
            .map(|r| sheets::counts_of_rows(inst, r))
            .collect();
    }
    let mut out = vec![
        OutputFile {
            name: "summary.txt".into(),
            contents: summary_table(inst, plan, &extras),
        },
        OutputFile {
            name: "sheets.md".into(),
            contents: sheets::markdown_of_rows(inst, plan, &rows),
        },
    ];
    let width = plan.routes.len().to_string().len();
    for (r, route_rows) in rows.iter().enumerate() {
        out.push(OutputFile {
            name: format!("truck-{:0width$}.csv", r + 1),
            contents: sheets::csv_of_rows(inst, route_rows),
        });
    }
    if let Some(g) = geo::feature_collection_of_rows(inst, &rows) {
        out.push(OutputFile {
            name: "plan.geojson".into(),
            contents: g,
        });
    }
    if let Some(m) = svg::map_of_rows(inst, plan, &rows) {
        out.push(OutputFile {
            name: "plan.svg".into(),
            contents: m,
        });
    }
    out
}

/// Extra figures for [`summary_table`] that come from the solver.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SummaryExtras {
    /// Lower bound value and the method that gave it.
    pub lower_bound: Option<(Cost, String)>,
    /// Optimality gap in percent (100 · (cost − bound) / bound).
    pub gap_percent: Option<f64>,
    /// Run time of the search.
    pub run_time: Option<Duration>,
    /// Iterations done.
    pub iterations: Option<u64>,
    /// Whether the search was stopped early (Ctrl-C).
    pub stopped_early: bool,
    /// Length driven by each route ([`route_lengths`]); the summary shows a
    /// length column only when these are given. [`bundle`] fills them in
    /// from the sheets when the scenario has lengths.
    pub route_lengths: Option<Vec<Cost>>,
    /// With turn rules, the turns each route makes; the summary shows left
    /// turns and U-turns per truck when given. [`bundle`] fills them in.
    pub turn_counts: Option<Vec<directions::TurnCounts>>,
}

/// The plan as a plain-text table: one line per truck (streets served, load,
/// cost, service and deadhead cost, and length and time where the sheets
/// show them), a total line, the units, the fleet, the bound, gap, run time,
/// what was not drawn and why, and the cautions.
pub fn summary_table(inst: &Instance, plan: &Plan, extras: &SummaryExtras) -> String {
    let fleet = inst.fleet();
    let u = inst.units();
    let lens = extras
        .route_lengths
        .as_ref()
        .filter(|l| l.len() == plan.routes.len());
    let (lengths, times) = (lens.is_some(), sheets::shows_times(inst));
    let mut out = String::new();
    let _ = writeln!(out, "Plan for {}", inst.name);
    let mut head = format!(
        "{:>5}  {:>8}  {:>12}  {:>10}  {:>10}  {:>10}",
        "truck", "streets", "load", "cost", "service", "deadhead"
    );
    if lengths {
        let _ = write!(head, "  {:>10}", "length");
    }
    if times {
        let _ = write!(head, "  {:>20}", "time");
    }
    let counts = extras
        .turn_counts
        .as_ref()
        .filter(|c| c.len() == plan.routes.len());
    if counts.is_some() {
        let _ = write!(head, "  {:>6}  {:>7}", "left", "U-turns");
    }
    let _ = writeln!(out, "{head}");
    let mut all = directions::TurnCounts::default();
    let (mut total_service, mut total_time, mut total_load, mut total_len) = (0, 0, 0, 0);
    let line = |out: &mut String,
                cells: [String; 6],
                len: Cost,
                time: Cost,
                turns: Option<&directions::TurnCounts>| {
        let mut l = format!(
            "{:>5}  {:>8}  {:>12}  {:>10}  {:>10}  {:>10}",
            cells[0], cells[1], cells[2], cells[3], cells[4], cells[5]
        );
        if lengths {
            let _ = write!(l, "  {len:>10}");
        }
        if times {
            let t = match u.clock(time) {
                Some(c) => format!("{time} ({c})"),
                None => time.to_string(),
            };
            let _ = write!(l, "  {t:>20}");
        }
        if let Some(c) = turns {
            let _ = write!(l, "  {:>6}  {:>7}", c.left, c.u_turns);
        }
        let _ = writeln!(out, "{l}");
    };
    for (r, route) in plan.routes.iter().enumerate() {
        let service: Cost = route.visits.iter().map(|v| inst.tasks()[v.task].cost).sum();
        let len = lens.map_or(0, |l| l[r]);
        total_service += service;
        total_time += route.time;
        total_load += route.load;
        total_len += len;
        line(
            &mut out,
            [
                (r + 1).to_string(),
                route.visits.len().to_string(),
                format!("{}/{}", route.load, fleet.capacity),
                route.cost.to_string(),
                service.to_string(),
                (route.cost - service).to_string(),
            ],
            len,
            route.time,
            counts.map(|c| &c[r]),
        );
        if let Some(c) = counts {
            all.add(&c[r]);
        }
    }
    line(
        &mut out,
        [
            "total".into(),
            plan.visits().to_string(),
            total_load.to_string(),
            plan.cost.to_string(),
            total_service.to_string(),
            (plan.cost - total_service).to_string(),
        ],
        total_len,
        total_time,
        counts.map(|_| &all),
    );
    if counts.is_some() {
        let _ = writeln!(out, "Turns (all trucks): {}.", sheets::counts_text(&all));
    }
    summary_footer(&mut out, inst, extras);
    out
}

/// The lines under the summary table: units, fleet, bound and gap, run
/// time, what was not drawn and why, and the cautions.
fn summary_footer(out: &mut String, inst: &Instance, extras: &SummaryExtras) {
    let fleet = inst.fleet();
    let u = inst.units();
    let _ = writeln!(out, "{}", sheets::units_note(inst));
    let mut limits = format!("capacity {}", u.load_text(fleet.capacity));
    if let Some(s) = fleet.shift_limit {
        let _ = write!(limits, ", shift limit {}", u.time_text(s));
    }
    if let Some(m) = fleet.max_vehicles {
        let _ = write!(limits, ", at most {m} trucks");
    }
    let _ = writeln!(out, "Fleet: {limits}.");
    if let Some((v, by)) = &extras.lower_bound {
        let _ = write!(out, "Lower bound: {} ({by})", u.cost_text(*v));
        if let Some(g) = extras.gap_percent {
            let _ = write!(out, ", gap {g:.2}%");
        }
        out.push_str(".\n");
    }
    if let Some(t) = extras.run_time {
        let _ = write!(out, "Run time: {:.1} s", t.as_secs_f64());
        if let Some(i) = extras.iterations {
            let _ = write!(out, ", {i} iterations");
        }
        if extras.stopped_early {
            out.push_str(" (stopped early; best plan so far)");
        }
        out.push_str(".\n");
    }
    if let Some(why) = maps_note(inst) {
        let _ = writeln!(out, "{why}");
    }
    out.push_str("\nCautions:\n");
    for c in CAUTIONS {
        let _ = writeln!(out, " - {c}");
    }
}

/// The length each route drives (service and deadhead, along its explicit
/// walk), when every street of the scenario has a length ([`sheets::shows_lengths`]).
pub fn route_lengths(
    inst: &Instance,
    dist: &crate::paths::Distances,
    plan: &Plan,
) -> Option<Vec<Cost>> {
    if !sheets::shows_lengths(inst) {
        return None;
    }
    route_walks(inst, dist, plan)
        .iter()
        .map(|w| {
            w.steps
                .iter()
                .map(|s| inst.network().links[s.link].length)
                .sum::<Option<Cost>>()
        })
        .collect()
}

/// With turn rules, the turns each route of `plan` makes along its walk
/// ([`route_walks`]); `None` without turn rules.
pub fn turn_counts(
    inst: &Instance,
    dist: &crate::paths::Distances,
    plan: &Plan,
) -> Option<Vec<directions::TurnCounts>> {
    inst.turn_rules()?;
    let ends = directions::dead_ends(inst);
    Some(
        route_walks(inst, dist, plan)
            .iter()
            .map(|w| directions::turn_counts(w, &ends))
            .collect(),
    )
}

/// Why a map or GeoJSON is not written, when it is not.
pub fn maps_note(inst: &Instance) -> Option<String> {
    if geo::points(inst).is_none() {
        let js = &inst.network().junctions;
        let missing = js.iter().filter(|j| j.x.is_none() || j.y.is_none()).count();
        return Some(if missing == js.len() {
            "No map and no GeoJSON: the scenario gives no junction coordinates.".into()
        } else {
            format!(
                "No map and no GeoJSON: {missing} of {} junctions have no coordinates.",
                js.len()
            )
        });
    }
    match inst.coordinates() {
        Coordinates::Undeclared => Some(
            "Map drawn from the coordinates as plain numbers (the scenario does not declare its \
             coordinate system: add \"coordinates\"); no GeoJSON, no scale bar."
                .into(),
        ),
        Coordinates::Planar { origin: None } => Some(
            "No GeoJSON: the scenario's planar coordinates have no origin, so they cannot be \
             placed on a world map (add \"origin\": {\"lon\": .., \"lat\": ..})."
                .into(),
        ),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escaping_keeps_xml_and_csv_intact() {
        assert_eq!(
            svg::xml_escape("A&B <\"x\">"),
            "A&amp;B &lt;&quot;x&quot;&gt;"
        );
    }
}
