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
//! - [`summary_table`]: a plain-text table of the routes and totals.
//!
//! Every sheet and the summary start with [`CAUTIONS`].

pub mod geo;
pub mod sheets;
pub mod svg;

use std::fmt::Write as _;
use std::time::Duration;

use crate::model::{Cost, Instance};
use crate::plan::Plan;

/// Printed at the head of every route sheet and summary.
pub const CAUTIONS: [&str; 4] = [
    "This plan is advice for a licensed transport planner, not an order: check it before any truck leaves the yard.",
    "Check height, weight and width limits and turn restrictions on every street; the street data may not record them.",
    "Respect the driving-hours and rest rules that apply to your drivers, and allow for breaks, tipping and refuelling.",
    "Follow local codes (school zones, quiet hours, access times, road works) and the instructions of the road authority.",
];

/// The street name of link `link`, or `link N` when it has none (`N` is the
/// 0-based index in the scenario's street list, as in plan files and in the
/// checker's messages).
pub fn street_label(inst: &Instance, link: usize) -> String {
    match &inst.network().links[link].name {
        Some(n) if !n.trim().is_empty() => n.clone(),
        _ => format!("link {link}"),
    }
}

/// A time as it is shown for `inst`: the number itself, followed by
/// `h:mm:ss` (reading it as seconds) when the scenario gives times of its own
/// (see [`Instance::has_times`]); the research files have none, and their
/// "times" are just costs.
pub fn show_time(inst: &Instance, t: Cost) -> String {
    if inst.has_times() {
        format!("{t} ({})", fmt_time(t))
    } else {
        t.to_string()
    }
}

/// A time in seconds as `h:mm:ss`.
pub fn fmt_time(secs: Cost) -> String {
    let sign = if secs < 0 { "-" } else { "" };
    let s = secs.unsigned_abs();
    format!("{sign}{}:{:02}:{:02}", s / 3600, s / 60 % 60, s % 60)
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
    let rows = sheets::all_rows(inst, dist, plan);
    let mut out = vec![
        OutputFile {
            name: "summary.txt".into(),
            contents: summary_table(inst, plan, extras),
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
            contents: sheets::csv_of_rows(route_rows),
        });
    }
    if let Some(g) = geo::feature_collection_of_rows(inst, &rows, None) {
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
}

/// The plan as a plain-text table: one line per route (services, load, cost,
/// service and deadhead cost, time) and a total line, then the bound, gap,
/// run time and the cautions.
pub fn summary_table(inst: &Instance, plan: &Plan, extras: &SummaryExtras) -> String {
    let fleet = inst.fleet();
    let mut out = String::new();
    let _ = writeln!(out, "Plan for {}", inst.name);
    let _ = writeln!(
        out,
        "{:>5}  {:>8}  {:>12}  {:>10}  {:>10}  {:>10}  {:>18}",
        "truck", "streets", "load", "cost", "service", "deadhead", "time"
    );
    let (mut total_service, mut total_time, mut total_load) = (0, 0, 0);
    for (r, route) in plan.routes.iter().enumerate() {
        let service: Cost = route.visits.iter().map(|v| inst.tasks()[v.task].cost).sum();
        total_service += service;
        total_time += route.time;
        total_load += route.load;
        let _ = writeln!(
            out,
            "{:>5}  {:>8}  {:>12}  {:>10}  {:>10}  {:>10}  {:>18}",
            r + 1,
            route.visits.len(),
            format!("{}/{}", route.load, fleet.capacity),
            route.cost,
            service,
            route.cost - service,
            show_time(inst, route.time)
        );
    }
    let _ = writeln!(
        out,
        "{:>5}  {:>8}  {:>12}  {:>10}  {:>10}  {:>10}  {:>18}",
        "total",
        plan.visits(),
        total_load,
        plan.cost,
        total_service,
        plan.cost - total_service,
        show_time(inst, total_time)
    );
    let mut limits = format!("capacity {}", fleet.capacity);
    if let Some(s) = fleet.shift_limit {
        let _ = write!(limits, ", shift limit {}", show_time(inst, s));
    }
    if let Some(m) = fleet.max_vehicles {
        let _ = write!(limits, ", at most {m} trucks");
    }
    let _ = writeln!(out, "Fleet: {limits}.");
    if let Some((v, by)) = &extras.lower_bound {
        let _ = write!(out, "Lower bound: {v} ({by})");
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
    out.push_str("\nCautions:\n");
    for c in CAUTIONS {
        let _ = writeln!(out, " - {c}");
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn times_read_as_hours_minutes_seconds() {
        assert_eq!(fmt_time(0), "0:00:00");
        assert_eq!(fmt_time(3661), "1:01:01");
        assert_eq!(fmt_time(36_000 + 59), "10:00:59");
    }

    #[test]
    fn escaping_keeps_xml_and_csv_intact() {
        assert_eq!(
            svg::xml_escape("A&B <\"x\">"),
            "A&amp;B &lt;&quot;x&quot;&gt;"
        );
    }
}
