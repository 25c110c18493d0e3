//! Plan files of the fleet model (routes with tips, truck types, yards): our
//! own JSON schema, written by [`write_fleet_plan`] and read back, strictly,
//! by [`read_fleet_plan`].
//!
//! ```json
//! {
//!   "format": "arcwright-fleet-plan",
//!   "version": 1,
//!   "instance": "two yards and a landfill",
//!   "cost": 412,
//!   "objective": 412,
//!   "longest_shift": 187,
//!   "shortest_shift": 95,
//!   "trips": 4,
//!   "tips": 3,
//!   "routes": [
//!     {
//!       "truck_type": "small",
//!       "yard": "north",
//!       "cost": 230,
//!       "driven": 225,
//!       "time": 187,
//!       "trip_loads": [5, 4, 0],
//!       "stops": [
//!         { "serve": { "street": 0, "from": 1, "to": 2 } },
//!         { "tip": { "site": 0, "name": "Landfill", "junction": 5 } },
//!         { "serve": { "street": 1, "from": 2, "to": 3 } },
//!         { "tip": { "site": 0, "name": "Landfill", "junction": 5 } }
//!       ]
//!     }
//!   ]
//! }
//! ```
//!
//! - `routes`: one per truck used. `truck_type` and `yard` by name; the truck
//!   leaves the yard, makes its `stops` in order and drives back, always on
//!   shortest deadhead paths for its type.
//! - A `serve` stop names the street (0-based index in the scenario's
//!   `streets`, or the link index of a research file) and its two junction
//!   ids in the service direction. A `tip` stop names the dump site (0-based
//!   index in `dump_sites`), with its name (when it has one) and junction id
//!   for people reading the file; every tip is recorded, in order.
//! - `trip_loads`: the load of each trip (the last one is 0 when the route
//!   ends with a tip); `driven`: the cost of the streets driven before the
//!   truck type's cost factor; `cost`: the route's cost (fixed cost, cost
//!   factor, unload costs: see [`crate::model::Operations`]); `time`: its
//!   shift time.
//! - `objective`: what the solver minimised (the cost, plus the
//!   longest-shift weight × `longest_shift` when balancing).
//!
//! [`read_fleet_plan`] rebuilds every route from the stops and checks that
//! each stated number equals the recomputed one; whether every street is
//! served once and every limit kept is for
//! [`crate::check::fleet::check_fleet_plan`].

use serde::{Deserialize, Serialize};

use crate::error::{Error, ParseProblem, Result};
use crate::fleet::{FleetPlan, FleetRoute, Tables, Tip};
use crate::model::{Cost, Dir, Instance};
use crate::plan::Visit;

/// The value of the `format` field.
pub const FLEET_PLAN_FORMAT: &str = "arcwright-fleet-plan";

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct FileRec {
    format: String,
    version: u32,
    instance: String,
    cost: Cost,
    objective: Cost,
    longest_shift: Cost,
    shortest_shift: Cost,
    trips: usize,
    tips: usize,
    routes: Vec<RouteRec>,
}

#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct RouteRec {
    truck_type: String,
    yard: String,
    cost: Cost,
    driven: Cost,
    time: Cost,
    trip_loads: Vec<Cost>,
    stops: Vec<StopRec>,
}

#[derive(Serialize, Deserialize)]
#[serde(rename_all = "lowercase", deny_unknown_fields)]
enum StopRec {
    Serve {
        street: usize,
        from: u64,
        to: u64,
    },
    Tip {
        site: usize,
        #[serde(default, skip_serializing_if = "Option::is_none")]
        name: Option<String>,
        junction: u64,
    },
}

/// Writes a fleet plan as JSON (schema in the module docs).
pub fn write_fleet_plan(inst: &Instance, plan: &FleetPlan) -> String {
    let ops = inst.operations();
    let types = ops.types_of(inst);
    let yards = ops.yards_of(inst);
    let id = |j: usize| inst.network().junctions[j].id;
    let routes = plan
        .routes
        .iter()
        .map(|r| {
            let mut stops = Vec::new();
            let mut tips = r.tips.iter().peekable();
            for pos in 0..=r.visits.len() {
                while let Some(t) = tips.next_if(|t| t.after == pos) {
                    let s = &ops.dump_sites[t.site];
                    stops.push(StopRec::Tip {
                        site: t.site,
                        name: s.name.clone(),
                        junction: id(s.junction),
                    });
                }
                if let Some(v) = r.visits.get(pos) {
                    let task = &inst.tasks()[v.task];
                    let (a, b) = task.ends(v.dir);
                    stops.push(StopRec::Serve {
                        street: task.link,
                        from: id(a),
                        to: id(b),
                    });
                }
            }
            RouteRec {
                truck_type: types[r.truck_type].name.clone(),
                yard: yards[r.yard].name.clone(),
                cost: r.cost,
                driven: r.driven,
                time: r.time,
                trip_loads: r.trip_loads.clone(),
                stops,
            }
        })
        .collect();
    let (longest, shortest) = plan.shift_spread();
    let rec = FileRec {
        format: FLEET_PLAN_FORMAT.to_string(),
        version: 1,
        instance: inst.name.clone(),
        cost: plan.cost,
        objective: plan.objective(inst),
        longest_shift: longest,
        shortest_shift: shortest,
        trips: plan.trips(),
        tips: plan.tips(),
        routes,
    };
    let mut s = serde_json::to_string_pretty(&rec).expect("plan records always serialize");
    s.push('\n');
    s
}

/// Reads a fleet plan written by [`write_fleet_plan`] for `inst`.
///
/// # Errors
///
/// A parse [`Error`] naming `file` and the JSON path: bad JSON or schema,
/// another instance, an unknown truck type, yard or dump site, a serve stop
/// that is not a street to serve in an allowed direction, a route that
/// cannot be driven by its truck type, or a stated number that differs from
/// the recomputed one.
pub fn read_fleet_plan(text: &str, file: &str, inst: &Instance) -> Result<FleetPlan> {
    let rec = parse(text, file, inst)?;
    let at = at_path(file);
    let tables = Tables::new(inst).map_err(|e| {
        at(
            String::new(),
            ParseProblem::Json {
                message: e.to_string(),
            },
        )
    })?;
    let mut routes = Vec::with_capacity(rec.routes.len());
    for (ri, r) in rec.routes.iter().enumerate() {
        routes.push(read_route(inst, &tables, &at, ri, r)?);
    }
    let plan = FleetPlan::new(routes);
    if plan.cost != rec.cost {
        return Err(at(
            "cost".into(),
            ParseProblem::Mismatch {
                what: "plan cost".into(),
                stated: rec.cost,
                computed: plan.cost,
            },
        ));
    }
    Ok(plan)
}

/// A fleet plan file as written: the routes with their stops resolved and
/// every number as the file states it, not recomputed (for
/// [`crate::check::fleet::check_fleet_plan`] to judge), and the plan-wide
/// figures the file claims.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct WrittenFleetPlan {
    /// The routes with their stated cost, driven, time and trip loads; the
    /// plan's stated total cost.
    pub plan: FleetPlan,
    /// The stated objective.
    pub objective: Cost,
    /// The stated longest shift time.
    pub longest_shift: Cost,
    /// The stated shortest shift time.
    pub shortest_shift: Cost,
    /// The stated number of trips.
    pub trips: usize,
    /// The stated number of tips.
    pub tips: usize,
}

/// Reads a fleet plan file for `inst` as written, without recomputing
/// anything: what `planner check` hands to the checker, so that every wrong
/// number is listed rather than the first one stopping the read.
///
/// # Errors
///
/// A parse [`Error`] naming `file` and the JSON path when the file is not a
/// plan of `inst`: bad JSON or schema, another instance, an unknown truck
/// type, yard or dump site, or a serve stop that is not a street to serve in
/// an allowed direction.
pub fn read_fleet_plan_as_written(
    text: &str,
    file: &str,
    inst: &Instance,
) -> Result<WrittenFleetPlan> {
    let rec = parse(text, file, inst)?;
    let at = at_path(file);
    let ops = inst.operations();
    let (types, yards) = (ops.types_of(inst), ops.yards_of(inst));
    let mut routes = Vec::with_capacity(rec.routes.len());
    for (ri, r) in rec.routes.iter().enumerate() {
        let find = |what: &'static str, key: &str, name: &String, pos: Option<usize>| {
            pos.ok_or_else(|| {
                at(
                    format!("routes[{ri}].{key}"),
                    ParseProblem::UnknownName {
                        what,
                        name: name.clone(),
                    },
                )
            })
        };
        let truck_type = find(
            "truck type",
            "truck_type",
            &r.truck_type,
            types.iter().position(|t| t.name == r.truck_type),
        )?;
        let yard = find(
            "yard",
            "yard",
            &r.yard,
            yards.iter().position(|y| y.name == r.yard),
        )?;
        let (visits, tips) = read_stops(inst, &at, ri, r)?;
        routes.push(FleetRoute {
            truck_type,
            yard,
            visits,
            tips,
            trip_loads: r.trip_loads.clone(),
            cost: r.cost,
            driven: r.driven,
            time: r.time,
        });
    }
    Ok(WrittenFleetPlan {
        plan: FleetPlan {
            routes,
            cost: rec.cost,
        },
        objective: rec.objective,
        longest_shift: rec.longest_shift,
        shortest_shift: rec.shortest_shift,
        trips: rec.trips,
        tips: rec.tips,
    })
}

/// Errors at a JSON path of `file`.
fn at_path(file: &str) -> impl Fn(String, ParseProblem) -> Error + '_ {
    move |path: String, problem: ParseProblem| {
        Error::parse(
            file,
            None,
            ParseProblem::AtPath {
                path,
                problem: Box::new(problem),
            },
        )
    }
}

/// The file's record, checked to be a fleet plan (format, version) of `inst`.
fn parse(text: &str, file: &str, inst: &Instance) -> Result<FileRec> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let rec: FileRec = serde_json::from_str(text).map_err(|e| {
        let line = (e.line() > 0).then_some(e.line());
        Error::parse(
            file,
            line,
            ParseProblem::Json {
                message: e.to_string(),
            },
        )
    })?;
    let at = at_path(file);
    if rec.format != FLEET_PLAN_FORMAT || rec.version != 1 {
        return Err(at(
            "format".into(),
            ParseProblem::Unexpected {
                expected: "\"arcwright-fleet-plan\", version 1",
                found: format!("{}, version {}", rec.format, rec.version),
            },
        ));
    }
    if rec.instance != inst.name {
        return Err(at(
            "instance".into(),
            ParseProblem::WrongInstance {
                expected: inst.name.clone(),
                found: rec.instance,
            },
        ));
    }
    Ok(rec)
}

/// Rebuilds route `ri` of a plan file and compares its stated numbers.
fn read_route(
    inst: &Instance,
    tables: &Tables,
    at: &dyn Fn(String, ParseProblem) -> Error,
    ri: usize,
    r: &RouteRec,
) -> Result<FleetRoute> {
    let ops = inst.operations();
    let types = ops.types_of(inst);
    let p = |k: &str| format!("routes[{ri}].{k}");
    let k = types
        .iter()
        .position(|t| t.name == r.truck_type)
        .ok_or_else(|| {
            at(
                p("truck_type"),
                ParseProblem::UnknownName {
                    what: "truck type",
                    name: r.truck_type.clone(),
                },
            )
        })?;
    let (visits, tips) = read_stops(inst, at, ri, r)?;
    let route = FleetRoute::new(inst, tables, k, visits, tips).map_err(|e| {
        at(
            p("stops"),
            ParseProblem::Unexpected {
                expected: "a route its truck type can drive",
                found: format!("{e:?}"),
            },
        )
    })?;
    let home = &ops.yards_of(inst)[route.yard].name;
    if *home != r.yard {
        return Err(at(
            p("yard"),
            ParseProblem::Unexpected {
                expected: "the home yard of the truck type",
                found: r.yard.clone(),
            },
        ));
    }
    let stated = [
        ("cost", r.cost, route.cost),
        ("driven", r.driven, route.driven),
        ("time", r.time, route.time),
    ];
    for (what, s, c) in stated {
        if s != c {
            return Err(at(
                p(what),
                ParseProblem::Mismatch {
                    what: format!("route {ri} {what}"),
                    stated: s,
                    computed: c,
                },
            ));
        }
    }
    if r.trip_loads != route.trip_loads {
        return Err(at(
            p("trip_loads"),
            ParseProblem::Unexpected {
                expected: "the recomputed trip loads",
                found: format!("{:?} (recomputed {:?})", r.trip_loads, route.trip_loads),
            },
        ));
    }
    Ok(route)
}

/// The visits and tips of route `ri` of a plan file, from its stops.
fn read_stops(
    inst: &Instance,
    at: &dyn Fn(String, ParseProblem) -> Error,
    ri: usize,
    r: &RouteRec,
) -> Result<(Vec<Visit>, Vec<Tip>)> {
    let ops = inst.operations();
    let id = |j: usize| inst.network().junctions[j].id;
    let (mut visits, mut tips) = (Vec::new(), Vec::new());
    for (si, s) in r.stops.iter().enumerate() {
        let sp = format!("routes[{ri}].stops[{si}]");
        match s {
            StopRec::Tip { site, .. } => {
                if *site >= ops.dump_sites.len() {
                    return Err(at(
                        sp,
                        ParseProblem::UnknownName {
                            what: "dump site",
                            name: site.to_string(),
                        },
                    ));
                }
                tips.push(Tip {
                    after: visits.len(),
                    site: *site,
                });
            }
            StopRec::Serve { street, from, to } => {
                let visit = inst.tasks().iter().enumerate().find_map(|(t, task)| {
                    (task.link == *street)
                        .then(|| {
                            [Dir::Forward, Dir::Backward].into_iter().find(|&d| {
                                let (a, b) = task.ends(d);
                                task.allows(d) && id(a) == *from && id(b) == *to
                            })
                        })
                        .flatten()
                        .map(|d| Visit::new(t, d))
                });
                let Some(v) = visit else {
                    return Err(at(
                        sp,
                        ParseProblem::NotARequiredLink {
                            route: ri,
                            position: si,
                            from: *from,
                            to: *to,
                            link: *street as i64,
                        },
                    ));
                };
                visits.push(v);
            }
        }
    }
    Ok((visits, tips))
}
