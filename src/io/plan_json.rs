//! Plan files: our own JSON schema for fleet plans, meant to be re-checked by
//! any outside tool.
//!
//! ```json
//! {
//!   "format": "arcwright-plan",
//!   "version": 1,
//!   "instance": "gdb1",
//!   "units": {"cost": null, "length": null, "time": null, "load": null},
//!   "run": {"seed": 1, "workers": 2, "time_limit_s": null, "max_iterations": 2000,
//!           "iterations": 2000, "stopped_early": false,
//!           "crate_version": "0.1.0"},
//!   "cost": 316,
//!   "lower_bound": 252,
//!   "lower_bound_method": "one-index LP with cuts",
//!   "gap_percent": 25.40,
//!   "routes": [
//!     {
//!       "load": 5,
//!       "cost": 74,
//!       "time": 74,
//!       "services": [
//!         {"from": 1, "to": 12, "link": 4},
//!         {"from": 12, "to": 6, "link": 14}
//!       ]
//!     }
//!   ]
//! }
//! ```
//!
//! - `instance`: the instance name; `cost`: total plan cost (service plus
//!   deadhead, the published convention); `lower_bound`: the solver's lower
//!   bound (optional, `null` when unknown); `lower_bound_method` and
//!   `gap_percent` (optional, for people; readers ignore them): which
//!   bound it is and the gap to it in percent.
//! - `routes`: one object per truck, in any order. `services` lists the
//!   required links served, in driving order, each as the junction numbers
//!   `from` → `to` **in the service direction, in the instance's own vertex
//!   numbering** ([`Junction::id`](crate::model::Junction::id), 1-based in
//!   the public sets), plus `link`, the 0-based index of the link in the
//!   instance's link list (the order of the input file; it tells parallel
//!   links apart). Between two services, and from and back to the depot, a
//!   truck drives a shortest deadhead path.
//! - `load`: the route's total demand; `cost`: its service plus deadhead cost;
//!   `time`: its service plus driving time; `length` (only when every street
//!   of the scenario has a length): the length it drives.
//! - `version`: 1 (a file stating another version is refused; a file without
//!   one is read as version 1); `units`: the scenario's units, `null` where
//!   undeclared; `run` (optional, [`RunSettings`]): how the plan was made.
//!   Readers ignore `units`, `run` and route `length`.
//!
//! - `walk` (optional, per route; written when the scenario has turn rules,
//!   [`PlanRecord::walks`]): every street driven, in order, served and
//!   deadhead, as `{"link": 242, "from": 164, "to": 165, "serve": true,
//!   "turn": "right", "turn_cost": 0}`: `link`, `from`, `to` as in
//!   `services` (junction ids, the direction driven), `serve` whether the
//!   street is served on this step, and from the second step on the turn
//!   made into it (`straight`, `left`, `right`, `u_turn`, `unknown` without
//!   coordinates) and its penalty. The route's `cost` is the sum of its
//!   steps' costs (service cost when served, driving cost otherwise) plus
//!   the `turn_cost`s, so a tool can verify turns and costs along the walk
//!   without computing paths. [`read_walks`] reads it for
//!   [`crate::check::check_turn_walks`]; the two plan readers below ignore it.
//!
//! With turn rules the routes' figures are recomputed on the turn-aware
//! network ([`crate::turns::route_with_turns`]), without them from the
//! shortest deadhead paths.
//!
//! Two readers; errors of both name the file and, for services, the line.
//!
//! - [`read_plan`] (and [`read_plan_with`]) is strict: it checks that every
//!   `(from, to, link)` is a required link served in an allowed direction,
//!   that no link is served twice, that the instance name matches, and that
//!   every stated cost, load and time equals the recomputed one, and that a
//!   stated lower bound lies between 0 and the plan's cost. Whether every task
//!   is served and routes respect the fleet is left to [`crate::check`].
//! - [`read_plan_as_written`] checks only the structure (JSON syntax and
//!   schema, the instance name, and that each service names a required link
//!   and the two ends of that link) and returns the plan with the figures
//!   the file states, so that [`crate::check::check_plan`] can list every
//!   semantic problem at once: a link served twice or not at all, a service
//!   against its allowed direction, a wrong load, route cost or total, the
//!   fleet limits.

use serde::{Deserialize, Serialize};

use super::scenario::{line_of, Seg};
use crate::error::{Error, ParseProblem, Result};
use crate::model::{Cost, Dir, Instance};
use crate::paths::Distances;
use crate::plan::{totals, Plan, Route, Step, Totals, Visit};
use crate::turns::{route_with_turns, Turn, TurnKind, TurnTable, TurnWalk};

/// How a plan was made, recorded in the plan file (`run`). No clock
/// readings: a run with an iteration limit writes the same file every time.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunSettings {
    /// Random seed.
    pub seed: u64,
    /// Search threads.
    pub workers: usize,
    /// Time limit in seconds, if any.
    pub time_limit_s: Option<f64>,
    /// Iteration limit, if any.
    pub max_iterations: Option<u64>,
    /// Iterations done.
    pub iterations: u64,
    /// Whether the search was stopped before its limits (Ctrl-C).
    pub stopped_early: bool,
    /// Version of this crate that made the plan.
    pub crate_version: String,
}

/// What a plan file records beside the routes.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct PlanRecord {
    /// The solver's lower bound (`lower_bound`).
    pub lower_bound: Option<Cost>,
    /// Which method gave the lower bound (`lower_bound_method`, written
    /// only when known).
    pub lower_bound_method: Option<String>,
    /// The gap in percent, `100 (cost - bound) / bound` (`gap_percent`,
    /// written only when known; for reading by people, nothing checks it).
    pub gap_percent: Option<f64>,
    /// Length driven by each route, in the scenario's length unit, when the
    /// scenario gives every street a length (`routes[i].length`).
    pub route_lengths: Option<Vec<Cost>>,
    /// How the plan was made (`run`).
    pub run: Option<RunSettings>,
    /// The explicit walk of each route with its turns (`routes[i].walk`),
    /// written when given; the planner gives it when the scenario has turn
    /// rules ([`crate::turns::walks_with_turns`]).
    pub walks: Option<Vec<TurnWalk>>,
}

/// Writes a plan as JSON (schema in the module docs), with the lower bound
/// when known.
pub fn write_plan(inst: &Instance, plan: &Plan, lower_bound: Option<Cost>) -> String {
    write_plan_record(
        inst,
        plan,
        &PlanRecord {
            lower_bound,
            ..PlanRecord::default()
        },
    )
}

fn json_str<T: Serialize + ?Sized>(v: &T) -> String {
    // Strings, numbers, options and plain structs always serialize.
    serde_json::to_string(v).expect("plain values serialize")
}

/// Writes a plan as JSON with everything `record` holds: route lengths and
/// the run settings besides the lower bound; every route's time is written.
pub fn write_plan_record(inst: &Instance, plan: &Plan, record: &PlanRecord) -> String {
    let net = inst.network();
    let u = inst.units();
    let mut s = String::new();
    s.push_str("{\n  \"format\": \"arcwright-plan\",\n  \"version\": 1,\n");
    s.push_str(&format!(
        "  \"instance\": {},\n  \"units\": {{\"cost\": {}, \"length\": {}, \"time\": {}, \"load\": {}}},\n",
        json_str(&inst.name),
        json_str(&u.cost),
        json_str(&u.length),
        json_str(&u.time),
        json_str(&u.load)
    ));
    if let Some(run) = &record.run {
        s.push_str(&format!("  \"run\": {},\n", json_str(run)));
    }
    s.push_str(&format!(
        "  \"cost\": {},\n  \"lower_bound\": {},\n",
        plan.cost,
        json_str(&record.lower_bound)
    ));
    if let Some(m) = &record.lower_bound_method {
        s.push_str(&format!("  \"lower_bound_method\": {},\n", json_str(m)));
    }
    if let Some(g) = record.gap_percent.filter(|g| g.is_finite()) {
        s.push_str(&format!("  \"gap_percent\": {g:.2},\n"));
    }
    s.push_str("  \"routes\": [");
    for (ri, r) in plan.routes.iter().enumerate() {
        s.push_str(if ri == 0 { "\n" } else { ",\n" });
        let length = match record.route_lengths.as_ref().and_then(|l| l.get(ri)) {
            Some(l) => format!("\n      \"length\": {l},"),
            None => String::new(),
        };
        s.push_str(&format!(
            "    {{\n      \"load\": {},\n      \"cost\": {},\n      \"time\": {},{length}\n      \"services\": [",
            r.load, r.cost, r.time
        ));
        for (k, v) in r.visits.iter().enumerate() {
            let t = &inst.tasks()[v.task];
            let (a, b) = t.ends(v.dir);
            s.push_str(if k == 0 { "\n" } else { ",\n" });
            s.push_str(&format!(
                "        {{\"from\": {}, \"to\": {}, \"link\": {}}}",
                net.junctions[a].id, net.junctions[b].id, t.link
            ));
        }
        s.push_str("\n      ]");
        if let Some(w) = record.walks.as_ref().and_then(|w| w.get(ri)) {
            write_walk(&mut s, inst, w);
        }
        s.push_str("\n    }");
    }
    s.push_str("\n  ]\n}\n");
    s
}

/// The `walk` array of one route: one step per line.
fn write_walk(s: &mut String, inst: &Instance, w: &TurnWalk) {
    let net = inst.network();
    s.push_str(",\n      \"walk\": [");
    for (k, st) in w.steps.iter().enumerate() {
        s.push_str(if k == 0 { "\n" } else { ",\n" });
        s.push_str(&format!(
            "        {{\"link\": {}, \"from\": {}, \"to\": {}, \"serve\": {}",
            st.link, net.junctions[st.from].id, net.junctions[st.to].id, st.serve
        ));
        if let Some(t) = k.checked_sub(1).and_then(|i| w.turns.get(i)) {
            s.push_str(&format!(
                ", \"turn\": {}, \"turn_cost\": {}",
                json_str(&t.kind),
                t.cost
            ));
        }
        s.push('}');
    }
    s.push_str("\n      ]");
}

#[derive(Deserialize)]
struct FileService {
    from: u64,
    to: u64,
    link: i64,
}

#[derive(Deserialize)]
struct FileStep {
    link: i64,
    from: u64,
    to: u64,
    serve: bool,
    turn: Option<TurnKind>,
    turn_cost: Option<Cost>,
}

#[derive(Deserialize)]
struct FileRoute {
    load: Option<Cost>,
    cost: Option<Cost>,
    time: Option<Cost>,
    services: Vec<FileService>,
    walk: Option<Vec<FileStep>>,
}

#[derive(Deserialize)]
struct FilePlan {
    format: Option<String>,
    version: Option<u32>,
    instance: String,
    cost: Option<Cost>,
    lower_bound: Option<Cost>,
    routes: Vec<FileRoute>,
}

/// The plan format version written and read.
pub const PLAN_VERSION: u32 = 1;

/// What a plan file claims besides its routes, for checking it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PlanClaims {
    /// The format version (1 when the file does not say).
    pub version: u32,
    /// The stated total cost.
    pub cost: Option<Cost>,
    /// The stated lower bound.
    pub lower_bound: Option<Cost>,
}

/// Reads what a plan file claims besides its routes (version, cost, lower
/// bound), for [`read_plan_as_written`] callers that check a file.
///
/// # Errors
///
/// JSON syntax or schema errors, as [`read_plan_as_written`].
pub fn read_plan_claims(text: &str, file: &str) -> Result<PlanClaims> {
    let fp = parse_json(text, file)?;
    Ok(PlanClaims {
        version: fp.version.unwrap_or(PLAN_VERSION),
        cost: fp.cost,
        lower_bound: fp.lower_bound,
    })
}

/// The plan file's JSON, after any byte-order mark; syntax and schema errors
/// give their line in the location and their column in the message, once.
fn parse_json(text: &str, file: &str) -> Result<FilePlan> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    serde_json::from_str(text).map_err(|e| Error::json(file, &e))
}

/// Reads a plan file written by [`write_plan`] (or by any tool following the
/// schema) for `inst`; `file` names the source in errors.
///
/// # Errors
///
/// [`Error::Parse`] naming `file` (and the line where it is known) for:
/// JSON syntax or schema errors ([`ParseProblem::Json`]); a `version` other
/// than [`PLAN_VERSION`] or a `lower_bound` outside 0 and the plan's cost
/// ([`ParseProblem::Unexpected`]); a plan for another instance
/// ([`ParseProblem::WrongInstance`]); a service that is not a required
/// street in an allowed direction ([`ParseProblem::NotARequiredLink`]) or a
/// street served twice ([`ParseProblem::ServedTwice`]); a stated load, cost
/// or time that differs from the recomputed one ([`ParseProblem::Mismatch`]);
/// and an instance whose shortest paths cannot be computed.
pub fn read_plan(text: &str, file: &str, inst: &Instance) -> Result<Plan> {
    let dist = Distances::new(inst).map_err(|e| {
        Error::parse(
            file,
            None,
            ParseProblem::Json {
                message: format!("cannot compute distances: {e}"),
            },
        )
    })?;
    read_plan_with(text, file, inst, &dist)
}

/// Reads the structure of a plan file: the file's plan and the visits of
/// each of its routes (empty routes kept). `strict` refuses a service
/// against its allowed direction and a link served twice; otherwise the
/// first becomes a [`Dir::Backward`] visit and the second a repeated visit,
/// both left to the checker.
fn parse(
    text: &str,
    file: &str,
    inst: &Instance,
    strict: bool,
) -> Result<(FilePlan, Vec<Vec<Visit>>)> {
    let fp = parse_json(text, file)?;
    check_header(&fp, text, file, inst)?;
    let routes = services(&fp, text, file, inst, strict)?;
    Ok((fp, routes))
}

/// The file's `version`, `format` and `instance` against what this reader
/// reads and `inst`.
fn check_header(fp: &FilePlan, text: &str, file: &str, inst: &Instance) -> Result<()> {
    let line = |key| super::scenario::line_of_key(text, key);
    if let Some(v) = fp.version.filter(|&v| v != PLAN_VERSION) {
        return Err(Error::parse(
            file,
            line("version"),
            ParseProblem::Unexpected {
                expected: "plan format version 1 (the version this program reads)",
                found: format!("version {v}"),
            },
        ));
    }
    if let Some(f) = fp.format.as_ref().filter(|&f| f != "arcwright-plan") {
        return Err(Error::parse(
            file,
            line("format"),
            ParseProblem::Json {
                message: format!("format is `{f}`, expected `arcwright-plan`"),
            },
        ));
    }
    if fp.instance != inst.name {
        return Err(Error::parse(
            file,
            line("instance"),
            ParseProblem::WrongInstance {
                expected: inst.name.clone(),
                found: fp.instance.clone(),
            },
        ));
    }
    Ok(())
}

/// The visits of each route of the file (empty routes kept); see [`parse`]
/// for `strict`.
fn services(
    fp: &FilePlan,
    text: &str,
    file: &str,
    inst: &Instance,
    strict: bool,
) -> Result<Vec<Vec<Visit>>> {
    let net = inst.network();
    let mut task_of = vec![usize::MAX; net.links.len()];
    for (i, t) in inst.tasks().iter().enumerate() {
        task_of[t.link] = i;
    }
    let mut served = vec![false; inst.tasks().len()];
    let mut routes = Vec::new();
    for (ri, r) in fp.routes.iter().enumerate() {
        let mut visits = Vec::new();
        for (k, s) in r.services.iter().enumerate() {
            let path = [
                Seg::Key("routes"),
                Seg::Index(ri),
                Seg::Key("services"),
                Seg::Index(k),
            ];
            let line = || line_of(text, &path);
            let bad = || {
                Error::parse(
                    file,
                    line(),
                    ParseProblem::NotARequiredLink {
                        route: ri,
                        position: k,
                        from: s.from,
                        to: s.to,
                        link: s.link,
                    },
                )
            };
            if s.link < 0 || s.link as usize >= net.links.len() {
                return Err(bad());
            }
            let ti = task_of[s.link as usize];
            if ti == usize::MAX {
                return Err(bad());
            }
            let t = &inst.tasks()[ti];
            let id = |j: usize| net.junctions[j].id;
            let dir = if (s.from, s.to) == (id(t.tail), id(t.head)) {
                Dir::Forward
            } else if (s.from, s.to) == (id(t.head), id(t.tail)) && (t.either || !strict) {
                Dir::Backward
            } else {
                return Err(bad());
            };
            if strict && served[ti] {
                return Err(Error::parse(
                    file,
                    line(),
                    ParseProblem::ServedTwice {
                        route: ri,
                        position: k,
                        link: t.link,
                    },
                ));
            }
            served[ti] = true;
            visits.push(Visit::new(ti, dir));
        }
        routes.push(visits);
    }
    Ok(routes)
}

/// [`read_plan`] with precomputed distances.
///
/// # Errors
///
/// As [`read_plan`] (apart from computing the distances).
pub fn read_plan_with(text: &str, file: &str, inst: &Instance, dist: &Distances) -> Result<Plan> {
    let (fp, routes) = parse(text, file, inst, true)?;
    let plan = match turn_table(inst, file)? {
        Some(table) => {
            let routes: Vec<Route> = routes
                .into_iter()
                .filter(|r| !r.is_empty())
                .map(|v| route_with_turns(inst, &table, v))
                .collect();
            let cost = routes.iter().map(|r| r.cost).sum();
            Plan { routes, cost }
        }
        None => Plan::from_visits(inst, dist, routes),
    };
    // Stated values must match (empty routes are dropped by from_visits).
    let mut pi = 0;
    for (ri, r) in fp.routes.iter().enumerate() {
        if r.services.is_empty() {
            continue;
        }
        let pr = &plan.routes[pi];
        pi += 1;
        for (what, stated, computed) in [
            ("load", r.load, pr.load),
            ("cost", r.cost, pr.cost),
            ("time", r.time, pr.time),
        ] {
            if let Some(st) = stated {
                if st != computed {
                    let path = [Seg::Key("routes"), Seg::Index(ri), Seg::Key(what)];
                    return Err(Error::parse(
                        file,
                        line_of(text, &path),
                        ParseProblem::Mismatch {
                            what: format!("Truck {} {what}", ri + 1),
                            stated: st,
                            computed,
                        },
                    ));
                }
            }
        }
    }
    if let Some(c) = fp.cost {
        if c != plan.cost {
            return Err(Error::parse(
                file,
                super::scenario::line_of_key(text, "cost"),
                ParseProblem::Mismatch {
                    what: "plan cost".into(),
                    stated: c,
                    computed: plan.cost,
                },
            ));
        }
    }
    if let Some(b) = fp.lower_bound.filter(|&b| b > plan.cost || b < 0) {
        return Err(Error::parse(
            file,
            super::scenario::line_of_key(text, "lower_bound"),
            ParseProblem::Unexpected {
                expected: "a lower bound between 0 and the plan's own cost",
                found: format!("lower_bound {b} for a plan costing {}", plan.cost),
            },
        ));
    }
    Ok(plan)
}

/// Reads a plan file checking only its structure, and keeps the figures it
/// states, for re-checking it with [`crate::check::check_plan`] (which then
/// reports every problem, where [`read_plan`] stops at the first).
///
/// Read errors are limited to what makes the file unreadable as a plan of
/// `inst`: JSON syntax and schema, a `format` other than `arcwright-plan`,
/// another instance name, and a service whose `link` is not a required link
/// or whose `(from, to)` are not the two ends of that link. Everything else
/// is kept as written for the checker to judge:
///
/// - routes keep the file's order, empty routes included, so the checker's
///   route numbers are the file's;
/// - a link served twice gives two visits of its task; a service from the
///   link's `to` end to its `from` end gives a [`Dir::Backward`] visit even
///   when only forward service is allowed;
/// - each route's `load` and `cost` and the plan's `cost` are the stated
///   ones; a figure the file leaves out is recomputed (with `dist`), so that
///   only stated figures can be found wrong;
/// - a route's `time` is the stated one; a file without route times gets
///   [`Route::time`] recomputed with `dist` (service time plus driving time
///   along the least-cost legs).
///
/// # Errors
///
/// [`Error::Parse`] naming `file` for JSON syntax or schema errors, another
/// `format` or `version`, a plan for another instance, and a service that
/// names no required street or not its two ends (see above); the line is
/// given where it is known.
pub fn read_plan_as_written(
    text: &str,
    file: &str,
    inst: &Instance,
    dist: &Distances,
) -> Result<Plan> {
    let (fp, visits) = parse(text, file, inst, false)?;
    let table = turn_table(inst, file)?;
    let mut computed_total: Cost = 0;
    let routes: Vec<Route> = fp
        .routes
        .iter()
        .zip(visits)
        .map(|(r, visits)| {
            let Totals { load, cost, time } = match &table {
                // Visits as written may name a task twice or against its
                // direction: price what can be priced.
                Some(t) if visits.iter().all(|v| v.task < inst.tasks().len()) => {
                    let x = route_with_turns(inst, t, visits.clone());
                    Totals {
                        load: x.load,
                        cost: x.cost,
                        time: x.time,
                    }
                }
                _ => totals(inst, dist, &visits),
            };
            computed_total = computed_total.saturating_add(cost);
            Route {
                visits,
                load: r.load.unwrap_or(load),
                cost: r.cost.unwrap_or(cost),
                time: r.time.unwrap_or(time),
            }
        })
        .collect();
    Ok(Plan {
        routes,
        cost: fp.cost.unwrap_or(computed_total),
    })
}

/// The turn table of an instance with turn rules (`None` without).
fn turn_table(inst: &Instance, file: &str) -> Result<Option<TurnTable>> {
    let Some(rules) = inst.turn_rules() else {
        return Ok(None);
    };
    TurnTable::new(inst, rules).map(Some).map_err(|e| {
        Error::parse(
            file,
            None,
            ParseProblem::Json {
                message: format!(
                    "the scenario's turn rules cannot be used: {}",
                    e.iter()
                        .map(|x| x.to_string())
                        .collect::<Vec<_>>()
                        .join("; ")
                ),
            },
        )
    })
}

/// Reads the explicit walks of a plan file (`routes[i].walk`, one per
/// route, every step with its turn), for [`crate::check::check_turn_walks`];
/// `Ok(None)` when no route has a walk. Steps are kept as written (a walk
/// that does not connect, a wrong turn or cost is for the checker to find);
/// junction ids are turned into junction indices.
///
/// ```
/// use arcwright::io::plan_json::{read_walks, write_plan_record, PlanRecord};
/// use arcwright::model::{Dir, Fleet, Instance, Network};
/// use arcwright::plan::{Plan, Visit};
/// use arcwright::turns::{route_with_turns, walks_with_turns, TurnRules, TurnTable};
///
/// let mut net = Network::with_junctions(3);
/// net.add_edge(0, 1, 5);
/// net.add_required_edge(1, 2, 4, 1);
/// let inst = Instance::new("spur", net, Fleet::with_capacity(9), 0).unwrap()
///     .with_turn_rules(Some(TurnRules::default())).unwrap();
/// let table = TurnTable::new(&inst, inst.turn_rules().unwrap()).unwrap();
/// let route = route_with_turns(&inst, &table, vec![Visit::new(0, Dir::Forward)]);
/// let plan = Plan { cost: route.cost, routes: vec![route] };
/// let walks = walks_with_turns(&inst, &table, &plan).unwrap();
/// let record = PlanRecord { walks: Some(walks.clone()), ..PlanRecord::default() };
/// let text = write_plan_record(&inst, &plan, &record);
/// assert_eq!(read_walks(&text, "plan.json", &inst).unwrap(), Some(walks));
/// ```
///
/// # Errors
///
/// [`Error::Parse`] naming `file` and the line for: JSON syntax or schema
/// errors; some routes with a walk and others without; a negative `link`;
/// a junction id no junction has; a step after the first without its
/// `turn` and `turn_cost`.
pub fn read_walks(text: &str, file: &str, inst: &Instance) -> Result<Option<Vec<TurnWalk>>> {
    let fp = parse_json(text, file)?;
    if fp.routes.iter().all(|r| r.walk.is_none()) {
        return Ok(None);
    }
    let net = inst.network();
    let index: std::collections::HashMap<u64, usize> = net
        .junctions
        .iter()
        .enumerate()
        .map(|(i, j)| (j.id, i))
        .collect();
    let mut walks = Vec::with_capacity(fp.routes.len());
    for (ri, r) in fp.routes.iter().enumerate() {
        let at = |k: Option<usize>, key: Option<&'static str>, problem: ParseProblem| {
            let mut path = vec![Seg::Key("routes"), Seg::Index(ri), Seg::Key("walk")];
            let mut shown = format!("routes[{ri}].walk");
            if let Some(k) = k {
                path.push(Seg::Index(k));
                shown.push_str(&format!("[{k}]"));
            }
            if let Some(key) = key {
                shown.push_str(&format!(".{key}"));
            }
            let line = line_of(text, &path).or_else(|| line_of(text, &path[..2]));
            Error::parse(
                file,
                line,
                ParseProblem::AtPath {
                    path: shown,
                    problem: Box::new(problem),
                },
            )
        };
        let Some(steps) = &r.walk else {
            return Err(at(
                None,
                None,
                ParseProblem::Json {
                    message: "this route has no walk, but other routes have one: give every route its walk".into(),
                },
            ));
        };
        let mut w = TurnWalk::default();
        for (k, st) in steps.iter().enumerate() {
            let junction = |id: u64, key| {
                index
                    .get(&id)
                    .copied()
                    .ok_or_else(|| at(Some(k), Some(key), ParseProblem::UnknownJunction { id }))
            };
            let link = usize::try_from(st.link).map_err(|_| {
                at(
                    Some(k),
                    Some("link"),
                    ParseProblem::Negative {
                        what: "street number (`link`)",
                        value: st.link,
                    },
                )
            })?;
            w.steps.push(Step {
                link,
                from: junction(st.from, "from")?,
                to: junction(st.to, "to")?,
                serve: st.serve,
            });
            if k > 0 {
                let (Some(kind), Some(cost)) = (st.turn, st.turn_cost) else {
                    return Err(at(
                        Some(k),
                        None,
                        ParseProblem::Json {
                            message: "every step after the first states the turn into it: `turn` and `turn_cost`".into(),
                        },
                    ));
                };
                w.turns.push(Turn { kind, cost });
            }
        }
        walks.push(w);
    }
    Ok(Some(walks))
}
