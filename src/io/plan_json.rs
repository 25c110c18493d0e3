//! Plan files: our own JSON schema for fleet plans, meant to be re-checked by
//! any outside tool.
//!
//! ```json
//! {
//!   "format": "arcwright-plan",
//!   "version": 1,
//!   "instance": "gdb1",
//!   "cost": 316,
//!   "lower_bound": 252,
//!   "routes": [
//!     {
//!       "load": 5,
//!       "cost": 74,
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
//!   bound (optional, `null` when unknown).
//! - `routes`: one object per truck, in any order. `services` lists the
//!   required links served, in driving order, each as the junction numbers
//!   `from` → `to` **in the service direction, in the instance's own vertex
//!   numbering** ([`Junction::id`](crate::model::Junction::id), 1-based in
//!   the public sets), plus `link`, the 0-based index of the link in the
//!   instance's link list (the order of the input file; it tells parallel
//!   links apart). Between two services, and from and back to the depot, a
//!   truck drives a shortest deadhead path.
//! - `load`: the route's total demand; `cost`: its service plus deadhead cost.
//!
//! Two readers; errors of both name the file and, for services, the line.
//!
//! - [`read_plan`] (and [`read_plan_with`]) is strict: it checks that every
//!   `(from, to, link)` is a required link served in an allowed direction,
//!   that no link is served twice, that the instance name matches, and that
//!   every stated cost and load equals the recomputed one. Whether every task
//!   is served and routes respect the fleet is left to [`crate::check`].
//! - [`read_plan_as_written`] checks only the structure (JSON syntax and
//!   schema, the instance name, and that each service names a required link
//!   and the two ends of that link) and returns the plan with the figures
//!   the file states, so that [`crate::check::check_plan`] can list every
//!   semantic problem at once: a link served twice or not at all, a service
//!   against its allowed direction, a wrong load, route cost or total, the
//!   fleet limits.

use serde::Deserialize;

use crate::error::{Error, ParseProblem, Result};
use crate::model::{Cost, Dir, Instance};
use crate::paths::Distances;
use crate::plan::{evaluate, Plan, Route, Visit};

/// Writes a plan as JSON (schema in the module docs).
pub fn write_plan(inst: &Instance, plan: &Plan, lower_bound: Option<Cost>) -> String {
    let net = inst.network();
    let mut s = String::new();
    s.push_str("{\n  \"format\": \"arcwright-plan\",\n  \"version\": 1,\n");
    s.push_str(&format!(
        "  \"instance\": {},\n  \"cost\": {},\n  \"lower_bound\": {},\n  \"routes\": [",
        serde_json::to_string(&inst.name).expect("string"),
        plan.cost,
        lower_bound.map_or("null".to_string(), |b| b.to_string())
    ));
    for (ri, r) in plan.routes.iter().enumerate() {
        s.push_str(if ri == 0 { "\n" } else { ",\n" });
        s.push_str(&format!(
            "    {{\n      \"load\": {},\n      \"cost\": {},\n      \"services\": [",
            r.load, r.cost
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
        s.push_str("\n      ]\n    }");
    }
    s.push_str("\n  ]\n}\n");
    s
}

#[derive(Deserialize)]
struct FileService {
    from: u64,
    to: u64,
    link: i64,
}

#[derive(Deserialize)]
struct FileRoute {
    load: Option<Cost>,
    cost: Option<Cost>,
    services: Vec<FileService>,
}

#[derive(Deserialize)]
struct FilePlan {
    format: Option<String>,
    instance: String,
    cost: Option<Cost>,
    routes: Vec<FileRoute>,
}

/// Line of the `k`-th (0-based) `"link"` key in the text: the line of the
/// `k`-th service in documents that use `link` only as the service key.
fn service_line(text: &str, k: usize) -> Option<usize> {
    let (idx, _) = text.match_indices("\"link\"").nth(k)?;
    Some(text[..idx].bytes().filter(|&b| b == b'\n').count() + 1)
}

/// Reads a plan file written by [`write_plan`] (or by any tool following the
/// schema) for `inst`; `file` names the source in errors.
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
    let fp: FilePlan = serde_json::from_str(text).map_err(|e| {
        Error::parse(
            file,
            Some(e.line()),
            ParseProblem::Json {
                message: format!("column {}: {e}", e.column()),
            },
        )
    })?;
    if let Some(f) = &fp.format {
        if f != "arcwright-plan" {
            return Err(Error::parse(
                file,
                None,
                ParseProblem::Json {
                    message: format!("format is `{f}`, expected `arcwright-plan`"),
                },
            ));
        }
    }
    if fp.instance != inst.name {
        return Err(Error::parse(
            file,
            None,
            ParseProblem::WrongInstance {
                expected: inst.name.clone(),
                found: fp.instance,
            },
        ));
    }
    let net = inst.network();
    let mut task_of = vec![usize::MAX; net.links.len()];
    for (i, t) in inst.tasks().iter().enumerate() {
        task_of[t.link] = i;
    }
    let mut served = vec![false; inst.tasks().len()];
    let mut global = 0usize;
    let mut routes = Vec::new();
    for (ri, r) in fp.routes.iter().enumerate() {
        let mut visits = Vec::new();
        for (k, s) in r.services.iter().enumerate() {
            let line = service_line(text, global);
            global += 1;
            let bad = || {
                Error::parse(
                    file,
                    line,
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
                    line,
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
    Ok((fp, routes))
}

/// [`read_plan`] with precomputed distances.
pub fn read_plan_with(text: &str, file: &str, inst: &Instance, dist: &Distances) -> Result<Plan> {
    let (fp, routes) = parse(text, file, inst, true)?;
    let plan = Plan::from_visits(inst, dist, routes.clone());
    // Stated values must match (empty routes are dropped by from_visits).
    let mut pi = 0;
    for (ri, r) in fp.routes.iter().enumerate() {
        if r.services.is_empty() {
            continue;
        }
        let pr = &plan.routes[pi];
        pi += 1;
        for (what, stated, computed) in [("load", r.load, pr.load), ("cost", r.cost, pr.cost)] {
            if let Some(st) = stated {
                if st != computed {
                    return Err(Error::parse(
                        file,
                        None,
                        ParseProblem::Mismatch {
                            what: format!("route {ri} {what}"),
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
                None,
                ParseProblem::Mismatch {
                    what: "plan cost".into(),
                    stated: c,
                    computed: plan.cost,
                },
            ));
        }
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
/// - the file has no route times: [`Route::time`] is recomputed with `dist`
///   (service time plus driving time along the least-cost legs).
pub fn read_plan_as_written(
    text: &str,
    file: &str,
    inst: &Instance,
    dist: &Distances,
) -> Result<Plan> {
    let (fp, visits) = parse(text, file, inst, false)?;
    let mut computed_total: Cost = 0;
    let routes: Vec<Route> = fp
        .routes
        .iter()
        .zip(visits)
        .map(|(r, visits)| {
            let (load, cost, time) = evaluate(inst, dist, &visits);
            computed_total = computed_total.saturating_add(cost);
            Route {
                visits,
                load: r.load.unwrap_or(load),
                cost: r.cost.unwrap_or(cost),
                time,
            }
        })
        .collect();
    Ok(Plan {
        routes,
        cost: fp.cost.unwrap_or(computed_total),
    })
}
