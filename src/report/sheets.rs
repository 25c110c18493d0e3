//! Route sheets: the explicit walk of every route, street by street.

use std::fmt::Write as _;

use crate::model::{Cost, Instance};
use crate::paths::Distances;
use crate::plan::{walk, Plan};

use super::{show_time, street_label, CAUTIONS};

/// What a truck does on one step of its walk.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Action {
    /// Drive without serving, from the yard to the first service.
    FromYard,
    /// Serve the link.
    Serve,
    /// Drive without serving between two services.
    Deadhead,
    /// Drive without serving, back to the yard after the last service.
    ToYard,
}

impl Action {
    /// The word printed on sheets.
    pub fn label(self) -> &'static str {
        match self {
            Action::FromYard => "deadhead (leave yard)",
            Action::Serve => "serve",
            Action::Deadhead => "deadhead",
            Action::ToYard => "deadhead (return to yard)",
        }
    }

    /// True for the three deadhead kinds.
    pub fn is_deadhead(self) -> bool {
        self != Action::Serve
    }
}

/// One line of a route sheet.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SheetRow {
    /// Step number, from 1.
    pub step: usize,
    /// Link index in the network.
    pub link: usize,
    /// Street name, or `link N` (see [`street_label`]) when the link has none.
    pub street: String,
    /// Junction id (as in the source data) where the step starts.
    pub from: u64,
    /// Junction id where the step ends.
    pub to: u64,
    /// Junction indices (into the network) where the step starts and ends.
    pub ends: (usize, usize),
    /// What the truck does.
    pub action: Action,
    /// Cost of the step (the link's length in the demo town).
    pub distance: Cost,
    /// Load carried after the step.
    pub load: Cost,
    /// Cost driven so far on this route, after the step.
    pub cumulative_distance: Cost,
    /// Time used so far on this route, after the step.
    pub time: Cost,
}

/// The rows of route `r`'s sheet: the explicit walk from [`walk`], with
/// running totals. The last row's `cumulative_distance` is the route's cost
/// and its `time` the route's time, when the plan's figures are right.
pub fn route_rows(inst: &Instance, dist: &Distances, plan: &Plan, r: usize) -> Vec<SheetRow> {
    let steps = walk(inst, dist, &plan.routes[r].visits);
    let first_serve = steps.iter().position(|s| s.serve).unwrap_or(steps.len());
    let last_serve = steps.iter().rposition(|s| s.serve).unwrap_or(0);
    let net = inst.network();
    let task_of_link = task_index(inst);
    let (mut load, mut cost, mut time) = (0, 0, 0);
    steps
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let link = &net.links[s.link];
            let (distance, dt) = if s.serve {
                let t = &inst.tasks()[task_of_link[s.link].expect("served links are tasks")];
                load += t.demand;
                (t.cost, t.time)
            } else {
                (link.cost, link.drive_time())
            };
            cost += distance;
            time += dt;
            let action = if s.serve {
                Action::Serve
            } else if i < first_serve {
                Action::FromYard
            } else if i > last_serve {
                Action::ToYard
            } else {
                Action::Deadhead
            };
            SheetRow {
                step: i + 1,
                link: s.link,
                street: street_label(inst, s.link),
                from: net.junctions[s.from].id,
                to: net.junctions[s.to].id,
                ends: (s.from, s.to),
                action,
                distance,
                load,
                cumulative_distance: cost,
                time,
            }
        })
        .collect()
}

pub(crate) fn task_index(inst: &Instance) -> Vec<Option<usize>> {
    let mut of = vec![None; inst.network().links.len()];
    for (i, t) in inst.tasks().iter().enumerate() {
        of[t.link] = Some(i);
    }
    of
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Route `r`'s sheet as CSV (RFC 4180 quoting), one row per step, with the
/// columns `step, street, link` (0-based index in the scenario's street
/// list), `from_junction, to_junction` (junction ids), `action, distance,
/// load_after, distance_after, time_after`. The cautions come first as `#`
/// comment lines; spreadsheet programs show them as plain text rows.
pub fn route_csv(inst: &Instance, dist: &Distances, plan: &Plan, r: usize) -> String {
    csv_of_rows(&route_rows(inst, dist, plan, r))
}

/// The rows of every route ([`route_rows`]), computed once for all outputs.
pub fn all_rows(inst: &Instance, dist: &Distances, plan: &Plan) -> Vec<Vec<SheetRow>> {
    (0..plan.routes.len())
        .map(|r| route_rows(inst, dist, plan, r))
        .collect()
}

/// [`route_csv`] from rows already computed.
pub fn csv_of_rows(rows: &[SheetRow]) -> String {
    let mut out = String::new();
    for c in CAUTIONS {
        let _ = writeln!(out, "# {c}");
    }
    out.push_str("step,street,link,from_junction,to_junction,action,distance,load_after,distance_after,time_after\n");
    for row in rows {
        let _ = writeln!(
            out,
            "{},{},{},{},{},{},{},{},{},{}",
            row.step,
            csv_field(&row.street),
            row.link,
            row.from,
            row.to,
            row.action.label(),
            row.distance,
            row.load,
            row.cumulative_distance,
            row.time
        );
    }
    out
}

fn md_cell(s: &str) -> String {
    s.replace('|', "\\|")
}

/// One readable Markdown document with the sheets of all routes.
pub fn markdown(inst: &Instance, dist: &Distances, plan: &Plan) -> String {
    markdown_of_rows(inst, plan, &all_rows(inst, dist, plan))
}

/// [`markdown`] from the rows of every route ([`all_rows`]).
pub fn markdown_of_rows(inst: &Instance, plan: &Plan, all: &[Vec<SheetRow>]) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "# Route sheets: {}\n", md_cell(&inst.name));
    out.push_str("> **Read before driving.**\n");
    for c in CAUTIONS {
        let _ = writeln!(out, "> - {c}");
    }
    out.push('\n');
    let yard = inst.network().junctions[inst.depot()].id;
    let _ = writeln!(
        out,
        "{} route(s), total distance {}, yard at junction {}. Distances are in the \
         scenario's cost unit (metres for the demo town), times in its time unit \
         (seconds for the demo town, where h:mm:ss follows).\n",
        plan.routes.len(),
        plan.cost,
        yard
    );
    for (r, (route, rows)) in plan.routes.iter().zip(all).enumerate() {
        let served = rows.iter().filter(|x| x.action == Action::Serve).count();
        let _ = writeln!(out, "## Truck {}\n", r + 1);
        let _ = writeln!(
            out,
            "{} streets served, load {}, distance {}, time {}.\n",
            served,
            route.load,
            route.cost,
            show_time(inst, route.time)
        );
        out.push_str("| step | street | from → to | action | distance | load | distance so far | time so far |\n");
        out.push_str("|---:|---|---|---|---:|---:|---:|---:|\n");
        for x in rows {
            let _ = writeln!(
                out,
                "| {} | {} | {} → {} | {} | {} | {} | {} | {} |",
                x.step,
                md_cell(&x.street),
                x.from,
                x.to,
                x.action.label(),
                x.distance,
                x.load,
                x.cumulative_distance,
                show_time(inst, x.time)
            );
        }
        out.push('\n');
    }
    out
}
