//! Route sheets: the explicit walk of every route, street by street.
//!
//! Each step shows what it is: its **cost** (the figure the plan minimises,
//! in the scenario's cost unit), and, where the scenario has them, the
//! street's **length** (when every street has a `length`) and the **time**
//! taken (when the scenario declares a time unit or gives times that differ
//! from costs; the research files have neither, and their sheets have no
//! time column that would only repeat the cost).

use std::fmt::Write as _;

use crate::model::{Cost, Instance, Units};
use crate::paths::Distances;
use crate::plan::Plan;
use crate::turns::{Turn, TurnWalk};

use super::directions::{dead_ends, manoeuvre, turn_counts, TurnCounts};
use super::{street_label, CAUTIONS};

/// What a truck does on one step of its walk.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Action {
    /// Drive without serving, from the yard to the first service.
    FromYard,
    /// Serve the street.
    Serve,
    /// Drive without serving between two services.
    Deadhead,
    /// Drive without serving, back to the yard after the last service.
    ToYard,
    /// Drive loaded to a dump site to tip (fleet plans).
    ToDumpSite,
    /// Drive empty from a dump site to the next street or the yard (fleet plans).
    FromDumpSite,
}

impl Action {
    /// The word printed on sheets.
    pub fn label(self) -> &'static str {
        match self {
            Action::FromYard => "deadhead (leave yard)",
            Action::Serve => "serve",
            Action::Deadhead => "deadhead",
            Action::ToYard => "deadhead (return to yard)",
            Action::ToDumpSite => "deadhead (to dump site)",
            Action::FromDumpSite => "deadhead (from dump site)",
        }
    }

    /// True for every kind but [`Action::Serve`].
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
    /// Street name, or a label naming its junctions (see [`street_label`]).
    pub street: String,
    /// Junction id (as in the source data) where the step starts.
    pub from: u64,
    /// Junction id where the step ends.
    pub to: u64,
    /// Junction indices (into the network) where the step starts and ends.
    pub ends: (usize, usize),
    /// What the truck does.
    pub action: Action,
    /// Cost of the step: the service cost when serving, the street's cost
    /// when deadheading.
    pub cost: Cost,
    /// Length of the street, when the scenario gives it.
    pub length: Option<Cost>,
    /// Time of the step: service time when serving, drive time otherwise.
    pub step_time: Cost,
    /// Load carried after the step.
    pub load: Cost,
    /// Cost so far on this route, after the step.
    pub cost_so_far: Cost,
    /// Length driven so far, when every street driven so far has a length.
    pub length_so_far: Option<Cost>,
    /// Time used so far on this route, after the step.
    pub time: Cost,
    /// With turn rules: the turn made into this step (none on the first),
    /// its penalty counted in `cost_so_far`.
    pub turn: Option<Turn>,
    /// With turn rules: the manoeuvre in words ([`super::directions::manoeuvre`]).
    pub manoeuvre: Option<String>,
}

/// The rows of route `r`'s sheet: the explicit walk ([`super::route_walks`]:
/// with turn rules the walk with its turns, else [`crate::plan::walk`]) with
/// running totals. The last row's `cost_so_far` is the route's cost and its
/// `time` the route's time, when the plan's figures are right.
pub fn route_rows(inst: &Instance, dist: &Distances, plan: &Plan, r: usize) -> Vec<SheetRow> {
    let one = Plan {
        routes: vec![plan.routes[r].clone()],
        cost: plan.routes[r].cost,
    };
    let walks = super::route_walks(inst, dist, &one);
    rows_of_walk(inst, &dead_ends(inst), &walks[0])
}

/// The rows of one walk's sheet, with running totals; with turn rules each
/// row carries its turn and manoeuvre (`dead_ends`: [`dead_ends`]).
pub fn rows_of_walk(inst: &Instance, dead_ends: &[bool], w: &TurnWalk) -> Vec<SheetRow> {
    let steps = &w.steps;
    let first_serve = steps.iter().position(|s| s.serve).unwrap_or(steps.len());
    let last_serve = steps.iter().rposition(|s| s.serve).unwrap_or(0);
    let net = inst.network();
    let task_of_link = task_index(inst);
    let turns = inst.turn_rules().is_some();
    let (mut load, mut cost, mut time, mut length) = (0, 0, 0, Some(0));
    steps
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let link = &net.links[s.link];
            let (step_cost, dt) = if s.serve {
                let t = &inst.tasks()[task_of_link[s.link].expect("served links are tasks")];
                load += t.demand;
                (t.cost, t.time)
            } else {
                (link.cost, link.drive_time())
            };
            let turn = i.checked_sub(1).and_then(|k| w.turns.get(k)).copied();
            cost += step_cost + turn.map_or(0, |t| t.cost);
            time += dt;
            length = length.zip(link.length).map(|(a, b)| a + b);
            let action = if s.serve {
                Action::Serve
            } else if i < first_serve {
                Action::FromYard
            } else if i > last_serve {
                Action::ToYard
            } else {
                Action::Deadhead
            };
            let prev = i.checked_sub(1).map(|k| &steps[k]);
            SheetRow {
                step: i + 1,
                link: s.link,
                street: street_label(inst, s.link),
                from: net.junctions[s.from].id,
                to: net.junctions[s.to].id,
                ends: (s.from, s.to),
                action,
                cost: step_cost,
                length: link.length,
                step_time: dt,
                load,
                cost_so_far: cost,
                length_so_far: length,
                time,
                turn: turns.then_some(turn).flatten(),
                manoeuvre: turns.then(|| manoeuvre(inst, dead_ends, prev, s, turn)),
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

/// Whether the sheets show lengths: every street of the scenario has one.
pub fn shows_lengths(inst: &Instance) -> bool {
    let links = &inst.network().links;
    !links.is_empty() && links.iter().all(|l| l.length.is_some())
}

/// Whether the sheets show times: the scenario declares a time unit, or
/// gives times that differ from the costs.
pub fn shows_times(inst: &Instance) -> bool {
    inst.units().time.is_some() || inst.has_times()
}

/// Route `r`'s sheet as plain RFC 4180 CSV (written with the `csv` crate):
/// the header on line 1, then one row per step. Columns: `step`, `street`,
/// `link` (0-based index in the scenario's street list, as in plan files),
/// `from_junction`, `to_junction` (junction ids), `action`, `cost (U)`,
/// then `length (U)` and `time (U)` when the scenario has them
/// ([`shows_lengths`], [`shows_times`]), `load_after (U)`,
/// `cost_so_far (U)`, and `length_so_far (U)`, `time_so_far (U)` likewise;
/// `U` is the unit the scenario declares, or `cost units`, `load units`...
/// With turn rules, three more: `turn` (the turn into the step: `left`,
/// `right`, `straight`, `u_turn`, `unknown`; empty on the first step),
/// `turn_cost (U)` (its penalty, counted in `cost_so_far`) and `manoeuvre`
/// (the instruction in words). The cautions are in the summary and the
/// Markdown sheets.
pub fn route_csv(inst: &Instance, dist: &Distances, plan: &Plan, r: usize) -> String {
    csv_of_rows(inst, &route_rows(inst, dist, plan, r))
}

/// The rows of every route ([`route_rows`]), computed once for all outputs.
pub fn all_rows(inst: &Instance, dist: &Distances, plan: &Plan) -> Vec<Vec<SheetRow>> {
    rows_of_walks(inst, &super::route_walks(inst, dist, plan))
}

/// The rows of every walk ([`rows_of_walk`]).
pub fn rows_of_walks(inst: &Instance, walks: &[TurnWalk]) -> Vec<Vec<SheetRow>> {
    let ends = dead_ends(inst);
    walks.iter().map(|w| rows_of_walk(inst, &ends, w)).collect()
}

/// [`route_csv`] from rows already computed.
pub fn csv_of_rows(inst: &Instance, rows: &[SheetRow]) -> String {
    let cols = CsvColumns::of(inst);
    let mut w = csv::Writer::from_writer(Vec::new());
    // Writing to memory cannot fail; a failure would be a bug here.
    w.write_record(cols.head(inst)).expect("CSV to memory");
    for x in rows {
        w.write_record(cols.record(x)).expect("CSV to memory");
    }
    csv_text(w)
}

/// The text a CSV writer to memory holds.
pub(crate) fn csv_text(w: csv::Writer<Vec<u8>>) -> String {
    String::from_utf8(w.into_inner().expect("CSV to memory")).expect("UTF-8 fields give UTF-8")
}

/// The columns of a scenario's CSV sheets (see [`route_csv`]): the optional
/// length, time and turn columns shown or not.
#[derive(Clone, Copy, Debug)]
pub(crate) struct CsvColumns {
    lengths: bool,
    times: bool,
    turns: bool,
}

impl CsvColumns {
    /// The columns of `inst`'s sheets.
    pub(crate) fn of(inst: &Instance) -> CsvColumns {
        CsvColumns {
            lengths: shows_lengths(inst),
            times: shows_times(inst),
            turns: inst.turn_rules().is_some(),
        }
    }

    /// The header: names with their units.
    pub(crate) fn head(&self, inst: &Instance) -> Vec<String> {
        let u = inst.units();
        let with = |name: &str, unit: String| format!("{name} ({unit})");
        let mut head: Vec<String> = [
            "step",
            "street",
            "link",
            "from_junction",
            "to_junction",
            "action",
        ]
        .map(String::from)
        .to_vec();
        head.push(with("cost", u.cost_label()));
        if self.lengths {
            head.push(with("length", u.length_label()));
        }
        if self.times {
            head.push(with("time", u.time_label()));
        }
        head.push(with("load_after", u.load_label()));
        head.push(with("cost_so_far", u.cost_label()));
        if self.lengths {
            head.push(with("length_so_far", u.length_label()));
        }
        if self.times {
            head.push(with("time_so_far", u.time_label()));
        }
        if self.turns {
            head.push("turn".into());
            head.push(with("turn_cost", u.cost_label()));
            head.push("manoeuvre".into());
        }
        head
    }

    /// One step's record, in the order of [`CsvColumns::head`].
    pub(crate) fn record(&self, x: &SheetRow) -> Vec<String> {
        self.record_as(x, Some((&x.street, x.link)), x.action.label())
    }

    /// One record with `street` (its label and link index; both cells empty
    /// for `None`, a stop at a junction such as a tip) and the `action` word
    /// given; every other cell from `x`.
    pub(crate) fn record_as(
        &self,
        x: &SheetRow,
        street: Option<(&str, usize)>,
        action: &str,
    ) -> Vec<String> {
        let opt = |v: Option<Cost>| v.map_or(String::new(), |x| x.to_string());
        let mut rec = vec![
            x.step.to_string(),
            street.map_or(String::new(), |s| s.0.to_string()),
            street.map_or(String::new(), |s| s.1.to_string()),
            x.from.to_string(),
            x.to.to_string(),
            action.to_string(),
            x.cost.to_string(),
        ];
        if self.lengths {
            rec.push(opt(x.length));
        }
        if self.times {
            rec.push(x.step_time.to_string());
        }
        rec.push(x.load.to_string());
        rec.push(x.cost_so_far.to_string());
        if self.lengths {
            rec.push(opt(x.length_so_far));
        }
        if self.times {
            rec.push(x.time.to_string());
        }
        if self.turns {
            rec.push(x.turn.map_or(String::new(), |t| turn_word(t.kind)));
            rec.push(x.turn.map_or(String::new(), |t| t.cost.to_string()));
            rec.push(x.manoeuvre.clone().unwrap_or_default());
        }
        rec
    }
}

fn md_cell(s: &str) -> String {
    s.replace('|', "\\|")
}

/// One readable Markdown document with the sheets of all routes.
pub fn markdown(inst: &Instance, dist: &Distances, plan: &Plan) -> String {
    markdown_of_rows(inst, plan, &all_rows(inst, dist, plan))
}

/// The sentence that says in which units a scenario's numbers are.
pub fn units_note(inst: &Instance) -> String {
    let u = inst.units();
    let mut parts = vec![format!("costs in {}", u.cost_label())];
    if shows_lengths(inst) {
        parts.push(format!("lengths in {}", u.length_label()));
    }
    if shows_times(inst) {
        parts.push(format!("times in {}", u.time_label()));
    }
    parts.push(format!("loads in {}", u.load_label()));
    let declared = [&u.cost, &u.length, &u.time, &u.load]
        .iter()
        .any(|x| x.is_some());
    format!(
        "Units: {}{}.",
        parts.join(", "),
        if declared {
            ""
        } else {
            " (the scenario declares no units)"
        }
    )
}

/// [`markdown`] from the rows of every route ([`all_rows`]).
pub fn markdown_of_rows(inst: &Instance, plan: &Plan, all: &[Vec<SheetRow>]) -> String {
    let u = inst.units();
    let (lengths, times) = (shows_lengths(inst), shows_times(inst));
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
        "{} truck(s), total cost {}, yard at junction {}. {}\n",
        plan.routes.len(),
        u.cost_text(plan.cost),
        yard,
        units_note(inst)
    );
    let (head, align) = md_header(inst);
    for (r, (route, rows)) in plan.routes.iter().zip(all).enumerate() {
        let served = rows.iter().filter(|x| x.action == Action::Serve).count();
        let _ = writeln!(out, "## Truck {}\n", r + 1);
        let mut line = format!(
            "{} streets served, load {}, cost {}",
            served,
            u.load_text(route.load),
            u.cost_text(route.cost)
        );
        if let Some(len) = lengths
            .then(|| rows.last().and_then(|x| x.length_so_far))
            .flatten()
        {
            let _ = write!(line, ", length {}", u.length_text(len));
        }
        if times {
            let _ = write!(line, ", time {}", u.time_text(route.time));
        }
        if let Some(c) = counts_of_rows(inst, rows) {
            let _ = write!(line, ". Turns: {}", counts_text(&c));
        }
        let _ = writeln!(out, "{line}.\n");
        let _ = writeln!(out, "{head}\n{align}");
        for x in rows {
            let _ = writeln!(out, "{}", md_row(u, lengths, times, x));
        }
        if inst.turn_rules().is_some() {
            let _ = writeln!(
                out,
                "\nArrive at the yard (junction {yard}). Turn costs are counted in the cost so far."
            );
        }
        out.push('\n');
    }
    out
}

/// The header and alignment rows of a Markdown sheet table.
fn md_header(inst: &Instance) -> (String, String) {
    let u = inst.units();
    let (lengths, times) = (shows_lengths(inst), shows_times(inst));
    let mut head = format!(
        "| step | street | from → to | action | cost ({}) |",
        u.cost_label()
    );
    let mut align = String::from("|---:|---|---|---|---:|");
    if inst.turn_rules().is_some() {
        head = format!(
            "| step | manoeuvre | street | from → to | action | turn cost ({}) | cost ({}) |",
            u.cost_label(),
            u.cost_label()
        );
        align = String::from("|---:|---|---|---|---|---:|---:|");
    }
    if lengths {
        let _ = write!(head, " length ({}) |", u.length_label());
        align.push_str("---:|");
    }
    if times {
        let _ = write!(head, " time ({}) |", u.time_label());
        align.push_str("---:|");
    }
    let _ = write!(head, " load ({}) | cost so far |", u.load_label());
    align.push_str("---:|---:|");
    if lengths {
        head.push_str(" length so far |");
        align.push_str("---:|");
    }
    if times {
        head.push_str(" time so far |");
        align.push_str("---:|");
    }
    (head, align)
}

/// One step as a row of a Markdown sheet table (columns of [`md_header`]).
fn md_row(u: &Units, lengths: bool, times: bool, x: &SheetRow) -> String {
    let mut cells = match &x.manoeuvre {
        Some(m) => format!(
            "| {} | {} | {} | {} → {} | {} | {} | {} |",
            x.step,
            md_cell(m),
            md_cell(&x.street),
            x.from,
            x.to,
            x.action.label(),
            x.turn.map_or(String::new(), |t| t.cost.to_string()),
            x.cost
        ),
        None => format!(
            "| {} | {} | {} → {} | {} | {} |",
            x.step,
            md_cell(&x.street),
            x.from,
            x.to,
            x.action.label(),
            x.cost
        ),
    };
    if lengths {
        let _ = write!(
            cells,
            " {} |",
            x.length.map_or(String::new(), |v| v.to_string())
        );
    }
    if times {
        let _ = write!(cells, " {} |", x.step_time);
    }
    let _ = write!(cells, " {} | {} |", x.load, x.cost_so_far);
    if lengths {
        let _ = write!(
            cells,
            " {} |",
            x.length_so_far.map_or(String::new(), |v| v.to_string())
        );
    }
    if times {
        let t = match u.clock(x.time) {
            Some(c) => format!("{} ({c})", x.time),
            None => x.time.to_string(),
        };
        let _ = write!(cells, " {t} |");
    }
    cells
}

/// The word of a turn kind in CSV sheets and plan files (its `Display`).
pub fn turn_word(k: crate::turns::TurnKind) -> String {
    k.to_string()
}

/// The turns of one route's rows counted, with turn rules (`None` without).
pub fn counts_of_rows(inst: &Instance, rows: &[SheetRow]) -> Option<TurnCounts> {
    inst.turn_rules()?;
    let w = TurnWalk {
        steps: rows
            .iter()
            .map(|x| crate::plan::Step {
                link: x.link,
                from: x.ends.0,
                to: x.ends.1,
                serve: x.action == Action::Serve,
            })
            .collect(),
        turns: rows.iter().filter_map(|x| x.turn).collect(),
    };
    Some(turn_counts(&w, &dead_ends(inst)))
}

/// "4 left, 6 right, 1 U-turn (at a dead end)" in words.
pub fn counts_text(c: &TurnCounts) -> String {
    let mut s = format!("{} left, {} right", c.left, c.right);
    let u = c.u_turns;
    let _ = write!(s, ", {u} U-turn{}", if u == 1 { "" } else { "s" });
    if u > 0 {
        if c.u_turns_at_dead_ends == u {
            s.push_str(if u == 1 {
                " (at a dead end)"
            } else {
                " (all at dead ends)"
            });
        } else {
            let _ = write!(s, " ({} at dead ends)", c.u_turns_at_dead_ends);
        }
    }
    if c.unknown > 0 {
        let _ = write!(s, ", {} of unknown angle (no coordinates)", c.unknown);
    }
    s
}
