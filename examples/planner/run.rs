//! The two things the planner does: plan a scenario and write the reports,
//! and re-verify a plan file. Everything of substance is a library call.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

use arcwright::bounds::lp::LP_CUTS;
use arcwright::check::fleet::check_fleet_plan;
use arcwright::check::{check_plan, check_turn_walks, check_walks, Violation};
use arcwright::demo::{town, TownSpec};
use arcwright::fleet::FleetSolver;
use arcwright::fleet::{FleetPlan, Tables};
use arcwright::io::fleet_plan::FLEET_PLAN_FORMAT;
use arcwright::io::plan_json::{
    read_plan_as_written, read_plan_claims, read_plan_with, read_walks, write_plan_record,
    PlanRecord, RunSettings,
};
use arcwright::io::{detect_format, read_dat, read_scenario, read_text, write_scenario, Format};
use arcwright::io::{read_fleet_plan, read_fleet_plan_as_written, write_fleet_plan};
use arcwright::model::Instance;
use arcwright::paths::Distances;
use arcwright::plan::{walk, Plan};
use arcwright::report::fleet::{describe_fleet, fleet_csv, fleet_markdown, fleet_rows};
use arcwright::report::geo::fleet_feature_collection;
use arcwright::report::svg::fleet_map;
use arcwright::report::{bundle_walks, route_walks, summary_table, OutputFile, SummaryExtras};
use arcwright::{LpOutcome, Progress, Solver};

use arcwright::map::{load_map, MapFormat, MapOptions};

use crate::cli::{FleetArgs, MapArgs, PlanArgs, DEFAULT_SCENARIO};
use crate::output::{prepare_folder, write_files};
use crate::AppError;

/// A scenario read for a run, with the map's build report when it came
/// from a map file.
pub struct Loaded {
    /// The validated instance, fleet overrides applied.
    pub instance: Instance,
    /// What the map builder made of a map file (printed before the plan).
    pub map_report: Option<String>,
    /// Built from OpenStreetMap data: outputs carry its attribution.
    pub osm: bool,
}

/// Reads a scenario: a street map when the name says so
/// ([`arcwright::map::map_format`]: `.osm.pbf`, `.pbf`, `.osm`, `.xml`,
/// `.geojson`), built with the map options; a research-format file when the
/// name ends in `.dat` (any case), our JSON scenario format when it ends in
/// `.json`, and for other names whichever the text looks like (JSON starts
/// with `{`, after any byte-order mark; [`detect_format`]). Fleet overrides
/// are applied and the result revalidated.
pub fn load_scenario(path: &Path, fleet: &FleetArgs, map: &MapArgs) -> Result<Loaded, AppError> {
    if arcwright::map::map_format(path).is_some() {
        let options = MapOptions::from_args(map.profile.as_deref(), map.yard.as_deref())
            .map_err(AppError::Map)?;
        let built = load_map(path, &options).map_err(AppError::Map)?;
        return Ok(Loaded {
            instance: fleet.apply(built.instance).map_err(AppError::Fleet)?,
            map_report: Some(built.report.to_string()),
            osm: built.report.format != MapFormat::GeoJson,
        });
    }
    if *map != MapArgs::default() {
        return Err(AppError::Usage(format!(
            "--profile and --yard build a map file (.osm.pbf, .osm, .geojson); {} is a scenario",
            path.display()
        )));
    }
    Ok(Loaded {
        instance: read_scenario_or_dat(path, fleet)?,
        map_report: None,
        osm: false,
    })
}

/// Reads a scenario file with the reader [`detect_format`] picks: the
/// research format when the name ends in `.dat` (any case), our JSON
/// scenario format when it ends in `.json`, and for other names whichever the
/// text looks like (JSON starts with `{`, after any byte-order mark).
fn read_scenario_or_dat(path: &Path, fleet: &FleetArgs) -> Result<Instance, AppError> {
    let (name, text) = read_text(path).map_err(AppError::Input)?;
    let inst = match detect_format(&text, &name) {
        Format::Dat => read_dat(&text, &name).map_err(AppError::Input)?.instance,
        Format::Scenario => read_scenario(&text, &name).map_err(AppError::Input)?,
    };
    fleet.apply(inst).map_err(AppError::Fleet)
}

/// Where the scenario of a run comes from: the file given, or
/// [`DEFAULT_SCENARIO`] when it exists, or else the demo town generated in
/// memory (the same town; used when the program runs outside the project
/// folder). Returns the instance and a description for the summary.
pub fn resolve_scenario(opts: &PlanArgs) -> Result<(Loaded, String), AppError> {
    if let Some(p) = &opts.scenario {
        return Ok((
            load_scenario(p, &opts.fleet, &opts.map)?,
            p.display().to_string(),
        ));
    }
    let default = Path::new(DEFAULT_SCENARIO);
    if default.exists() {
        return Ok((
            load_scenario(default, &opts.fleet, &opts.map)?,
            DEFAULT_SCENARIO.to_string(),
        ));
    }
    if opts.map != MapArgs::default() {
        return Err(AppError::Usage(
            "--profile and --yard build a map file: name one (.osm.pbf, .osm, .geojson)".into(),
        ));
    }
    let inst = town(&TownSpec::demo()).map_err(AppError::Fleet)?;
    // Going through the scenario text keeps this path identical to reading the file.
    let inst = read_scenario(&write_scenario(&inst), "<demo town>").map_err(AppError::Input)?;
    let inst = opts.fleet.apply(inst).map_err(AppError::Fleet)?;
    let loaded = Loaded {
        instance: inst,
        map_report: None,
        osm: false,
    };
    Ok((loaded, "the demo town (generated)".to_string()))
}

/// A progress callback.
pub type ProgressHook<'a> = Box<dyn Fn(&Progress) + Send + Sync + 'a>;

/// Callbacks of a planning run.
#[derive(Default)]
pub struct Hooks<'a> {
    /// Called whenever the best plan improves.
    pub on_progress: Option<ProgressHook<'a>>,
    /// Set to true to stop the search early (the best plan is still written).
    pub stop: Option<Arc<AtomicBool>>,
}

/// What a planning run did.
pub struct PlanRun {
    /// Where the scenario came from.
    pub source: String,
    /// What the map builder made of a map file.
    pub map_report: Option<String>,
    /// Where the scenario was saved (`--save-scenario`).
    pub saved_scenario: Option<PathBuf>,
    /// Whether the stop flag ended the search.
    pub stopped_early: bool,
    /// The summary table, with cautions.
    pub summary: String,
    /// The files written, in the order of [`render`].
    pub files: Vec<PathBuf>,
}

/// Checks a plan and its explicit walks with the independent checker. With
/// turn rules the walks are those of [`route_walks`] (turns included) and
/// their turns and costs are checked too ([`check_turn_walks`]).
pub fn verify(inst: &Instance, dist: &Distances, plan: &Plan) -> Result<(), Vec<Violation>> {
    check_plan(inst, plan)?;
    if inst.turn_rules().is_some() {
        return check_turn_walks(inst, plan, &route_walks(inst, dist, plan));
    }
    let walks: Vec<_> = plan
        .routes
        .iter()
        .map(|r| walk(inst, dist, &r.visits))
        .collect();
    check_walks(inst, &walks)
}

/// The plan file and every report for `plan`, after checking it: a plan that
/// fails the independent checker is refused ([`AppError::Refused`]), and so
/// is a plan file that does not read back to the same plan. Self-loops are
/// written served forward ([`Plan::self_loops_forward`]): the same drive, and
/// the only direction a plan file can state for them.
pub fn render(
    inst: &Instance,
    dist: &Distances,
    plan: &Plan,
    extras: &SummaryExtras,
    run: Option<RunSettings>,
) -> Result<Vec<OutputFile>, AppError> {
    let plan = &plan.clone().self_loops_forward(inst);
    verify(inst, dist, plan).map_err(|v| AppError::Refused(describe_all(inst, &v)))?;
    let walks = route_walks(inst, dist, plan);
    let turns = inst.turn_rules().is_some();
    let record = PlanRecord {
        lower_bound: extras.lower_bound.as_ref().map(|b| b.0),
        lower_bound_method: extras.lower_bound.as_ref().map(|b| b.1.clone()),
        gap_percent: extras.gap_percent,
        route_lengths: extras
            .route_lengths
            .clone()
            .or_else(|| arcwright::report::route_lengths(inst, dist, plan)),
        run,
        walks: turns.then(|| walks.clone()),
    };
    let json = write_plan_record(inst, plan, &record);
    match read_plan_with(&json, "plan.json", inst, dist) {
        Ok(back) if back == *plan => {}
        Ok(_) => {
            return Err(AppError::Internal(
                "the plan file does not read back to the same plan".into(),
            ))
        }
        Err(e) => {
            return Err(AppError::Internal(format!(
                "the plan file does not read back: {e}"
            )))
        }
    }
    if turns && read_walks(&json, "plan.json", inst).ok().flatten().as_ref() != Some(&walks) {
        return Err(AppError::Internal(
            "the walks of the plan file do not read back".into(),
        ));
    }
    let mut files = vec![OutputFile {
        name: "plan.json".into(),
        contents: json,
    }];
    files.extend(bundle_walks(inst, plan, &walks, extras));
    Ok(files)
}

/// Plans the scenario of `opts` and writes the plan and reports into
/// `opts.out` (checked before the search).
pub fn run_plan(opts: &PlanArgs, hooks: Hooks<'_>) -> Result<PlanRun, AppError> {
    let (loaded, source) = resolve_scenario(opts)?;
    let inst = loaded.instance;
    if inst.turn_rules().is_some() && !inst.operations().is_plain(&inst) {
        // The fleet solver (tips, yards, truck types, balance) prices
        // routes without turns: refuse before anything is searched or written.
        return Err(AppError::Unsupported(format!(
            "{source}: the scenario sets turn_rules together with dump sites, several yards, \
             truck types or balance; turn rules do not combine with those yet: remove \
             turn_rules, or plan without the fleet features"
        )));
    }
    prepare_folder(&opts.out)?;
    if let Some(path) = &opts.save_scenario {
        save_scenario(path, &inst)?;
    }
    let stop = hooks
        .stop
        .clone()
        .unwrap_or_else(|| Arc::new(AtomicBool::new(false)));
    if !inst.operations().is_plain(&inst) {
        let (map_report, osm) = (loaded.map_report, loaded.osm);
        let hooks = Hooks {
            on_progress: hooks.on_progress,
            stop: Some(stop),
        };
        let mut run = run_fleet_plan(opts, &inst, source, osm, hooks)?;
        run.map_report = map_report;
        return Ok(run);
    }
    let dist = Distances::new(&inst).map_err(AppError::Distances)?;
    let mut solver = Solver::new(&inst)
        .distances(&dist)
        .seed(opts.seed)
        .workers(opts.effective_workers())
        .stop_flag(stop.clone());
    if let Some(t) = opts.effective_time_limit() {
        solver = solver.time_limit(t);
    }
    if let Some(n) = opts.iterations {
        solver = solver.max_iterations(n);
    }
    if let Some(f) = hooks.on_progress {
        solver = solver.on_progress(f);
    }
    if let Some(budget) = opts.lp_budget() {
        solver = solver.lp_bound(budget);
    }
    let solution = solver.solve().map_err(AppError::Solve)?;
    let stopped_early = stop.load(Ordering::SeqCst);
    let extras = SummaryExtras {
        lower_bound: Some((solution.lower_bound.value, bound_method(&solution))),
        gap_percent: Some(solution.gap),
        run_time: Some(solution.stats.elapsed),
        iterations: Some(solution.stats.iterations),
        stopped_early,
        route_lengths: arcwright::report::route_lengths(&inst, &dist, &solution.plan),
        turn_counts: arcwright::report::turn_counts(&inst, &dist, &solution.plan),
    };
    let run = RunSettings {
        seed: opts.seed,
        workers: opts.effective_workers(),
        time_limit_s: opts.effective_time_limit().map(|t| t.as_secs_f64()),
        max_iterations: opts.iterations,
        iterations: solution.stats.iterations,
        stopped_early,
        crate_version: env!("CARGO_PKG_VERSION").to_string(),
    };
    let mut files = render(&inst, &dist, &solution.plan, &extras, Some(run))?;
    let mut summary = summary_table(&inst, &solution.plan, &extras);
    if loaded.osm {
        attribute_osm(&mut files);
        summary.push_str(&format!("\n{OSM_ATTRIBUTION}\n"));
    }
    let files = write_files(&opts.out, &files)?;
    Ok(PlanRun {
        source,
        map_report: loaded.map_report,
        saved_scenario: opts.save_scenario.clone(),
        stopped_early,
        summary,
        files,
    })
}

/// Which bound the gap is against, for the summary and the plan file: the
/// method's name, and why the LP bound was not used when it was asked for
/// but did not apply (the run then goes on with the combinatorial bound).
pub fn bound_method(solution: &arcwright::Solution) -> String {
    let by = solution.lower_bound.by;
    match &solution.lp {
        Some(LpOutcome::DoesNotApply(why)) => format!("{by}; the LP bound does not apply: {why}"),
        Some(LpOutcome::Ran(r)) if r.bound == solution.lower_bound.value && by != LP_CUTS => {
            format!("{by}; the LP bound reached the same")
        }
        Some(LpOutcome::Ran(r)) if r.bound < solution.lower_bound.value => {
            format!("{by}; the LP bound reached {}", r.bound)
        }
        _ => by.to_string(),
    }
}

/// Plans a scenario with dump sites, several yards, truck types or
/// balancing with the fleet solver, checks the plan independently and
/// writes `plan.json` (every tip recorded), `sheets.md` (with "tip at
/// ..., unload ...") and one `truck-N.csv` per truck (tip lines too). Seed, workers and iteration limit as given; with a
/// time limit (the default without `--iterations`) the local search runs
/// until it ends, and Ctrl-C (the stop flag) ends it early: either way the
/// best plan so far is checked and written.
fn run_fleet_plan(
    opts: &PlanArgs,
    inst: &Instance,
    source: String,
    osm: bool,
    hooks: Hooks<'_>,
) -> Result<PlanRun, AppError> {
    let f = &opts.fleet;
    let overrides = f.capacity.is_some() || f.shift_limit.is_some() || f.max_trucks.is_some();
    if overrides && !inst.operations().truck_types.is_empty() {
        return Err(AppError::Usage(
            "--capacity, --shift-limit and --max-trucks do not apply to a scenario with truck_types: change the truck types in the scenario".into(),
        ));
    }
    let mut solver = FleetSolver::new(inst)
        .seed(opts.seed)
        .workers(opts.effective_workers());
    if let Some(n) = opts.iterations {
        solver = solver.max_iterations(n);
    }
    if let Some(t) = opts.effective_time_limit() {
        solver = solver.time_limit(t);
        if opts.iterations.is_none() {
            // Search until the time limit, as the plain planner does.
            solver = solver.moves(u64::MAX);
        }
    }
    let stop = hooks.stop.clone();
    if let Some(stop) = hooks.stop {
        solver = solver.stop_flag(stop);
    }
    if let Some(f) = hooks.on_progress {
        solver = solver.on_progress(f);
    }
    let sol = solver.solve().map_err(AppError::FleetSolve)?;
    if let Err(v) = check_fleet_plan(inst, &sol.plan) {
        return Err(AppError::Refused(v.iter().map(|x| x.to_string()).collect()));
    }
    let json = write_fleet_plan(inst, &sol.plan);
    if read_fleet_plan(&json, "plan.json", inst).ok().as_ref() != Some(&sol.plan) {
        return Err(AppError::Internal(
            "the fleet plan file does not read back".into(),
        ));
    }
    let sheets = fleet_markdown(inst, &sol.plan);
    let u = inst.units();
    let (long, short) = sol.shift_spread;
    let summary = format!(
        "{}: cost {} (lower bound {}, {}), {} trucks, {} trips, {} tips, shifts {} to {}\n\nCautions:\n{}\n",
        inst.name,
        u.cost_text(sol.cost),
        u.cost_text(sol.lower_bound.value),
        sol.lower_bound.by,
        sol.plan.routes.len(),
        sol.plan.trips(),
        sol.plan.tips(),
        u.time_text(short),
        u.time_text(long),
        arcwright::report::CAUTIONS
            .iter()
            .map(|c| format!("- {c}"))
            .collect::<Vec<_>>()
            .join("\n")
    );
    let mut files = vec![
        OutputFile {
            name: "plan.json".into(),
            contents: json,
        },
        OutputFile {
            name: "sheets.md".into(),
            contents: sheets,
        },
        OutputFile {
            name: "summary.txt".into(),
            contents: summary.clone(),
        },
    ];
    files.extend(fleet_files(inst, &sol.plan)?);
    let mut summary = summary;
    if osm {
        attribute_osm(&mut files);
        summary.push_str(&format!("\n{OSM_ATTRIBUTION}\n"));
    }
    let files = write_files(&opts.out, &files)?;
    Ok(PlanRun {
        source,
        map_report: None,
        saved_scenario: opts.save_scenario.clone(),
        // Ctrl-C, not the time limit (which ends every timed fleet run).
        stopped_early: stop.is_some_and(|s| s.load(Ordering::SeqCst)),
        summary,
        files,
    })
}

/// One `truck-N.csv` per truck of a fleet plan (numbers padded as for plain
/// plans; tip lines with dump site and unload time, the truck's type and
/// yard), then `plan.svg` and `plan.geojson` (when the scenario has
/// coordinates): the walks on each truck type's own streets, the way to a
/// dump site and back marked, yards and dump sites labelled.
fn fleet_files(inst: &Instance, plan: &FleetPlan) -> Result<Vec<OutputFile>, AppError> {
    let tables = Tables::new(inst).map_err(AppError::Distances)?;
    let rows = fleet_rows(inst, &tables, plan);
    let width = plan.routes.len().to_string().len();
    let mut files: Vec<OutputFile> = (0..plan.routes.len())
        .map(|r| OutputFile {
            name: format!("truck-{:0width$}.csv", r + 1),
            contents: fleet_csv(inst, &tables, plan, r),
        })
        .collect();
    if let Some(g) = fleet_feature_collection(inst, plan, &rows) {
        files.push(OutputFile {
            name: "plan.geojson".into(),
            contents: g,
        });
    }
    if let Some(m) = fleet_map(inst, plan, &rows) {
        files.push(OutputFile {
            name: "plan.svg".into(),
            contents: m,
        });
    }
    Ok(files)
}

/// The attribution OpenStreetMap's licence asks of anything made from its data.
pub const OSM_ATTRIBUTION: &str =
    "Map data © OpenStreetMap contributors, ODbL 1.0 (https://www.openstreetmap.org/copyright)";

/// Adds the OpenStreetMap attribution to the map picture (bottom right), the
/// GeoJSON (a foreign member `attribution`), the summary and the sheets.
fn attribute_osm(files: &mut [arcwright::report::OutputFile]) {
    for f in files.iter_mut() {
        match f.name.as_str() {
            "plan.svg" => {
                let height: f64 = f
                    .contents
                    .split("height=\"")
                    .nth(1)
                    .and_then(|r| r.split('"').next())
                    .and_then(|h| h.parse().ok())
                    .unwrap_or(0.0);
                let text = format!(
                    "<text id=\"attribution\" x=\"992\" y=\"{:.0}\" text-anchor=\"end\" font-size=\"10\" fill=\"#555555\">{}</text>\n</svg>\n",
                    height - 8.0,
                    arcwright::report::svg::xml_escape(OSM_ATTRIBUTION)
                );
                if let Some(end) = f.contents.rfind("</svg>") {
                    f.contents.truncate(end);
                    f.contents.push_str(&text);
                }
            }
            "plan.geojson" => {
                if let Ok(mut v) = serde_json::from_str::<serde_json::Value>(&f.contents) {
                    v["attribution"] = serde_json::json!(OSM_ATTRIBUTION);
                    if let Ok(t) = serde_json::to_string_pretty(&v) {
                        f.contents = t;
                    }
                }
            }
            "summary.txt" | "sheets.md" => {
                f.contents.push_str(&format!("\n{OSM_ATTRIBUTION}\n"));
            }
            _ => {}
        }
    }
}

/// Writes the scenario as JSON, through a temporary file renamed into place
/// (never a half-written file).
fn save_scenario(path: &Path, inst: &Instance) -> Result<(), AppError> {
    let write = |source| AppError::Write {
        path: path.to_path_buf(),
        source,
    };
    let mut tmp = path.as_os_str().to_owned();
    tmp.push(".partial");
    let tmp = PathBuf::from(tmp);
    std::fs::write(&tmp, write_scenario(inst)).map_err(write)?;
    std::fs::rename(&tmp, path).map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        write(e)
    })
}

/// What re-verifying a plan file found.
pub struct CheckRun {
    /// How many trucks the plan uses.
    pub trucks: usize,
    /// Every problem found, in the words of the sheets (empty when valid).
    pub problems: Vec<String>,
    /// The plan's stated cost with its unit.
    pub cost_text: String,
}

/// The checker's findings in the words of the sheets.
fn describe_all(inst: &Instance, v: &[Violation]) -> Vec<String> {
    v.iter()
        .map(|x| arcwright::report::describe(inst, x))
        .collect()
}

/// Reads `plan_file` against `scenario` and checks it with the independent
/// checker (plan and explicit walks).
///
/// A file that is not a plan of the scenario is an `Err`
/// ([`AppError::Input`]); everything else wrong with a readable file is
/// listed in [`CheckRun::problems`], all of it. The walks are checked only
/// when the plan itself passes.
pub fn run_check(
    scenario: &Path,
    plan_file: &Path,
    fleet: &FleetArgs,
    map: &MapArgs,
) -> Result<CheckRun, AppError> {
    refuse_swapped(scenario, plan_file)?;
    let inst = load_scenario(scenario, fleet, map)?.instance;
    let (name, text) = arcwright::io::read_text(plan_file).map_err(AppError::Input)?;
    if json_format(plan_file).as_deref() == Some(FLEET_PLAN_FORMAT) {
        return check_fleet_file(&inst, &text, &name);
    }
    let dist = Distances::new(&inst).map_err(AppError::Distances)?;
    let plan = read_plan_as_written(&text, &name, &inst, &dist).map_err(AppError::Input)?;
    let claims = read_plan_claims(&text, &name).map_err(AppError::Input)?;
    let walks = read_walks(&text, &name, &inst).map_err(AppError::Input)?;
    let mut violations = check_plan(&inst, &plan).err().unwrap_or_default();
    match &walks {
        // The walks the file states, checked street by street and turn by turn.
        Some(w) => violations.extend(check_turn_walks(&inst, &plan, w).err().unwrap_or_default()),
        None if violations.is_empty() => {
            violations = verify(&inst, &dist, &plan).err().unwrap_or_default()
        }
        None => {}
    }
    let mut problems = describe_all(&inst, &violations);
    if walks.is_none() && inst.turn_rules().is_some() {
        problems.push(
            "the scenario has turn rules, but the plan file gives no walk (`routes[].walk`): \
             the streets driven and the turns made cannot be checked"
                .to_string(),
        );
    }
    if let Some(b) = claims.lower_bound {
        let units = inst.units();
        if b > plan.cost {
            problems.push(format!(
                "the plan claims a lower bound of {}, above its own cost of {}: no plan can cost less than a true lower bound",
                units.cost_text(b),
                units.cost_text(plan.cost)
            ));
        } else if b < 0 {
            problems.push(format!("the plan claims a negative lower bound ({b})"));
        }
    }
    let cost_text = inst.units().cost_text(plan.cost);
    Ok(CheckRun {
        trucks: plan.routes.len(),
        problems,
        cost_text,
    })
}

/// `planner check` of a fleet plan file (routes with tips, truck types,
/// yards): read as written, checked by the independent fleet checker, the
/// plan-wide figures it states compared with the routes it lists; every
/// finding in the words of the fleet sheets.
fn check_fleet_file(inst: &Instance, text: &str, name: &str) -> Result<CheckRun, AppError> {
    let written = read_fleet_plan_as_written(text, name, inst).map_err(AppError::Input)?;
    let plan = &written.plan;
    let mut problems: Vec<String> = match check_fleet_plan(inst, plan) {
        Err(v) => v.iter().map(|x| describe_fleet(inst, plan, x)).collect(),
        Ok(()) => Vec::new(),
    };
    let u = inst.units();
    let (longest, shortest) = plan.shift_spread();
    let stated = [
        ("objective", written.objective, plan.objective(inst), true),
        ("longest shift", written.longest_shift, longest, false),
        ("shortest shift", written.shortest_shift, shortest, false),
    ];
    for (what, s, actual, cost) in stated {
        if s != actual {
            let text = |x| if cost { u.cost_text(x) } else { u.time_text(x) };
            problems.push(format!(
                "the plan states its {what} as {}, its trucks give {}",
                text(s),
                text(actual)
            ));
        }
    }
    for (what, s, actual) in [
        ("trips", written.trips, plan.trips()),
        ("tips", written.tips, plan.tips()),
    ] {
        if s != actual {
            problems.push(format!(
                "the plan states {s} {what}, its trucks make {actual}"
            ));
        }
    }
    Ok(CheckRun {
        trucks: plan.routes.len(),
        problems,
        cost_text: u.cost_text(plan.cost),
    })
}

/// The `format` a JSON file names, if it is JSON with one.
fn json_format(path: &Path) -> Option<String> {
    let text = std::fs::read_to_string(path).ok()?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
    let v: serde_json::Value = serde_json::from_str(text).ok()?;
    v.get("format")?.as_str().map(String::from)
}

/// `planner check PLAN SCENARIO` (the files swapped) is named as such.
fn refuse_swapped(scenario: &Path, plan_file: &Path) -> Result<(), AppError> {
    let order = "the order is `planner check SCENARIO PLAN`";
    if matches!(
        json_format(scenario).as_deref(),
        Some("arcwright-plan" | FLEET_PLAN_FORMAT)
    ) {
        return Err(AppError::Usage(format!(
            "{} is a plan file, not a scenario: {order}",
            scenario.display()
        )));
    }
    if json_format(plan_file).as_deref() == Some("arcwright-scenario") {
        return Err(AppError::Usage(format!(
            "{} is a scenario, not a plan file: {order}",
            plan_file.display()
        )));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use arcwright::model::{Dir, Fleet};
    use arcwright::plan::Visit;

    fn demo() -> Instance {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(DEFAULT_SCENARIO);
        load_scenario(&path, &FleetArgs::default(), &MapArgs::default())
            .unwrap()
            .instance
    }

    #[test]
    fn a_plan_failing_the_checker_is_refused() {
        let inst = demo();
        let dist = Distances::new(&inst).unwrap();
        // Every task on its own route: valid except that it needs far more
        // trucks than the fleet has.
        let routes: Vec<Vec<Visit>> = (0..inst.tasks().len())
            .map(|t| vec![Visit::new(t, Dir::Forward)])
            .collect();
        let plan = Plan::from_visits(&inst, &dist, routes);
        match render(&inst, &dist, &plan, &Default::default(), None) {
            Err(AppError::Refused(v)) => {
                assert!(v.iter().any(|x| x.contains("trucks")), "{v:?}");
            }
            other => panic!("not refused: {:?}", other.map(|f| f.len())),
        }
        // A plan with a misreported cost is refused too.
        let loose = inst
            .with_fleet(Fleet::with_capacity(inst.total_demand()))
            .unwrap();
        let all: Vec<Visit> = (0..loose.tasks().len())
            .map(|t| Visit::new(t, Dir::Forward))
            .collect();
        let mut bad = Plan::from_visits(&loose, &dist, vec![all]);
        assert!(render(&loose, &dist, &bad, &Default::default(), None).is_ok());
        bad.routes[0].cost -= 1;
        bad.cost -= 1;
        assert!(matches!(
            render(&loose, &dist, &bad, &Default::default(), None),
            Err(AppError::Refused(_))
        ));
    }
}
