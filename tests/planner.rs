//! The planner end to end: on the demo town and on a public gdb file, every
//! output is written, the plan file passes the independent checker, the
//! GeoJSON parses with the `geojson` crate, the SVG with `roxmltree`, and the
//! sheets add up to the plan's total. One test runs the real example program.

use std::path::{Path, PathBuf};
use std::process::Command;

use arcwright::app::{self, FleetOverrides, Hooks, PlanOptions};
use arcwright::check::{check_plan, At, Violation};
use arcwright::io::plan_json::{read_plan, write_plan};
use arcwright::model::Dir;
use arcwright::paths::Distances;
use arcwright::plan::{walk, Plan, Visit};

fn out_dir(name: &str) -> PathBuf {
    let d = Path::new(env!("CARGO_TARGET_TMPDIR")).join(name);
    let _ = std::fs::remove_dir_all(&d);
    d
}

fn shared(rel: &str) -> Option<PathBuf> {
    let p = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../shared/instances")
        .join(rel);
    if p.exists() {
        Some(p)
    } else {
        println!("SKIPPED: {} is absent", p.display());
        None
    }
}

fn demo_path() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(app::DEFAULT_SCENARIO)
}

fn options(input: PathBuf, out: &Path) -> PlanOptions {
    PlanOptions {
        input: Some(input),
        iterations: Some(10),
        seed: 3,
        workers: 1,
        out: out.to_path_buf(),
        quiet: true,
        ..Default::default()
    }
}

/// Sum of the last `distance_after` of every truck CSV.
fn csv_total(dir: &Path, trucks: usize) -> i64 {
    let width = trucks.to_string().len();
    (1..=trucks)
        .map(|r| {
            let text = std::fs::read_to_string(dir.join(format!("truck-{r:0width$}.csv"))).unwrap();
            let last = text.lines().last().unwrap();
            // distance_after is the second-last column; street names may be quoted.
            let cols: Vec<&str> = last.rsplitn(3, ',').collect();
            cols[1].parse::<i64>().unwrap()
        })
        .sum()
}

#[test]
fn demo_town_end_to_end() {
    let dir = out_dir("planner-demo");
    let run = app::run_plan(&options(demo_path(), &dir), Hooks::default()).unwrap();
    let inst = &run.instance;
    let plan = &run.solution.plan;
    let routes = plan.routes.len();
    assert!(routes >= 1);

    // Every output is there.
    let mut names: Vec<String> = run
        .files
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    names.sort();
    let mut expected: Vec<String> = [
        "plan.json",
        "plan.geojson",
        "plan.svg",
        "sheets.md",
        "summary.txt",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    let width = routes.to_string().len();
    expected.extend((1..=routes).map(|r| format!("truck-{r:0width$}.csv")));
    expected.sort();
    assert_eq!(names, expected);
    for f in &run.files {
        assert!(f.exists(), "{}", f.display());
    }

    // The plan file reads back and passes the independent checker, also
    // through the `check` entry point.
    let text = std::fs::read_to_string(dir.join("plan.json")).unwrap();
    let back = read_plan(&text, "plan.json", inst).unwrap();
    assert_eq!(&back, plan);
    check_plan(inst, &back).unwrap();
    let checked = app::run_check(
        &demo_path(),
        &dir.join("plan.json"),
        &FleetOverrides::default(),
    )
    .unwrap();
    assert!(checked.violations.is_empty(), "{:?}", checked.violations);

    // Sheets add up to the plan's total.
    assert_eq!(csv_total(&dir, routes), plan.cost);

    // GeoJSON: one LineString per step plus the yard point.
    let dist = Distances::new(inst).unwrap();
    let steps: usize = plan
        .routes
        .iter()
        .map(|r| walk(inst, &dist, &r.visits).len())
        .sum();
    let gj: geojson::GeoJson = std::fs::read_to_string(dir.join("plan.geojson"))
        .unwrap()
        .parse()
        .unwrap();
    let geojson::GeoJson::FeatureCollection(fc) = gj else {
        panic!("not a FeatureCollection")
    };
    assert_eq!(fc.features.len(), steps + 1);

    // SVG is well-formed XML.
    let svg = std::fs::read_to_string(dir.join("plan.svg")).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    assert_eq!(doc.root_element().tag_name().name(), "svg");

    // The summary shows the total, the bound and the cautions.
    assert!(run.summary.contains(&plan.cost.to_string()));
    assert!(run.summary.contains("Lower bound"));
    assert!(run.summary.contains(arcwright::report::CAUTIONS[0]));
}

#[test]
fn research_file_end_to_end_without_maps() {
    let Some(gdb) = shared("gdb/gdb1.dat") else {
        return;
    };
    let dir = out_dir("planner-gdb1");
    let run = app::run_plan(&options(gdb.clone(), &dir), Hooks::default()).unwrap();
    let plan = &run.solution.plan;
    check_plan(&run.instance, plan).unwrap();
    assert!(dir.join("plan.json").exists());
    assert!(dir.join("sheets.md").exists());
    assert!(!dir.join("plan.geojson").exists());
    assert!(!dir.join("plan.svg").exists());
    assert_eq!(csv_total(&dir, plan.routes.len()), plan.cost);
    // No valid plan is cheaper than the published lower bound listed in
    // ../shared/instances/reference.csv (its `source` column names the compilation).
    let reference = arcwright::io::read_reference(shared("reference.csv").unwrap()).unwrap();
    let bound: i64 = reference
        .iter()
        .find(|r| r.set == "gdb" && r.instance == "gdb1")
        .map(|r| r.lower_bound)
        .expect("gdb1 in reference.csv");
    assert!(
        plan.cost >= bound,
        "cost {} below the published bound {bound}",
        plan.cost
    );
    assert!(run.solution.lower_bound.value <= bound);
}

#[test]
fn fleet_overrides_reach_the_plan() {
    let Some(gdb) = shared("gdb/gdb1.dat") else {
        return;
    };
    let dir = out_dir("planner-gdb1-cap");
    let mut o = options(gdb, &dir);
    o.fleet.capacity = Some(10);
    let run = app::run_plan(&o, Hooks::default()).unwrap();
    assert_eq!(run.instance.fleet().capacity, 10);
    assert!(run.solution.plan.routes.iter().all(|r| r.load <= 10));
    // Too small a fleet is an error with a message, not a panic.
    let mut o = options(
        shared("gdb/gdb1.dat").unwrap(),
        &out_dir("planner-gdb1-small"),
    );
    o.fleet.max_trucks = Some(Some(1));
    let err = app::run_plan(&o, Hooks::default()).unwrap_err();
    assert!(!err.to_string().is_empty());
}

#[test]
fn check_reports_every_violation_of_a_tampered_plan() {
    let dir = out_dir("planner-tamper");
    let run = app::run_plan(&options(demo_path(), &dir), Hooks::default()).unwrap();
    let inst = &run.instance;
    let dist = Distances::new(inst).unwrap();
    // Drop the last service of the first route and the first of the last
    // route; the figures in the file are recomputed so that it reads, and
    // the checker must name both streets as unserved.
    let mut routes: Vec<Vec<Visit>> = run
        .solution
        .plan
        .routes
        .iter()
        .map(|r| r.visits.clone())
        .collect();
    let a = routes[0].pop().unwrap();
    let b = routes.last_mut().unwrap().remove(0);
    let plan = Plan::from_visits(inst, &dist, routes);
    let bad = dir.join("tampered.json");
    std::fs::write(&bad, write_plan(inst, &plan, None)).unwrap();
    let checked = app::run_check(&demo_path(), &bad, &FleetOverrides::default()).unwrap();
    let text: Vec<String> = checked.violations.iter().map(|v| v.to_string()).collect();
    assert_eq!(text.len(), 2, "{text:?}");
    for v in [a, b] {
        let link = inst.tasks()[v.task].link;
        assert!(
            text.iter()
                .any(|t| t.contains(&format!("(link {link}) is not served"))),
            "{text:?}"
        );
    }
}

/// A plan file for the demo town that is readable but wrong in three ways:
/// task 0 is served twice (route 0 position 0, route 1 last position), the
/// last task is not served, and route 1 states a cost 5 above its true cost
/// (the plan total states the true sum). Written with the fleet loosened
/// (no capacity, shift or truck-count limit in the way), so exactly these
/// three violations are expected; returns the file, the overrides to check
/// it with, and the expected violations in the checker's order.
fn tampered_plan_file(dir: &Path) -> (PathBuf, FleetOverrides, Vec<Violation>) {
    let base = app::load_scenario(&demo_path(), &FleetOverrides::default()).unwrap();
    let n = base.tasks().len();
    assert!(n >= 4);
    let fleet = FleetOverrides {
        capacity: Some(base.tasks().iter().map(|t| t.demand).sum::<i64>() + 1),
        shift_limit: Some(None),
        max_trucks: Some(None),
    };
    let inst = fleet.apply(base).unwrap();
    let dist = Distances::new(&inst).unwrap();
    let fwd = |t: usize| Visit::new(t, Dir::Forward);
    let half = n / 2;
    let r0: Vec<Visit> = (0..half).map(fwd).collect();
    let mut r1: Vec<Visit> = (half..n - 1).map(fwd).collect();
    r1.push(fwd(0));
    let again = r1.len() - 1;
    let plan = Plan::from_visits(&inst, &dist, vec![r0, r1]);
    let true_cost = plan.routes[1].cost;
    let mut json: serde_json::Value =
        serde_json::from_str(&write_plan(&inst, &plan, None)).unwrap();
    json["routes"][1]["cost"] = (true_cost + 5).into();
    let file = dir.join("wrong-figures.json");
    std::fs::create_dir_all(dir).unwrap();
    std::fs::write(&file, serde_json::to_string_pretty(&json).unwrap()).unwrap();
    let t = inst.tasks();
    let expected = vec![
        Violation::ServedTwice {
            task: 0,
            link: t[0].link,
            first: At { route: 0, pos: 0 },
            again: At {
                route: 1,
                pos: again,
            },
        },
        Violation::NotServed {
            task: n - 1,
            link: t[n - 1].link,
        },
        Violation::WrongCost {
            route: 1,
            reported: true_cost + 5,
            actual: true_cost,
        },
    ];
    (file, fleet, expected)
}

#[test]
fn check_lists_wrong_figures_and_double_service_instead_of_failing_to_read() {
    let dir = out_dir("planner-wrong-figures");
    let (file, fleet, expected) = tampered_plan_file(&dir);
    let checked = app::run_check(&demo_path(), &file, &fleet).unwrap();
    assert_eq!(checked.violations, expected);
    // The plan returned keeps the figure stated in the file.
    let Violation::WrongCost { reported, .. } = expected[2] else {
        unreachable!()
    };
    assert_eq!(checked.plan.routes[1].cost, reported);
    // The strict reader still refuses the same file.
    let inst = fleet
        .apply(app::load_scenario(&demo_path(), &FleetOverrides::default()).unwrap())
        .unwrap();
    let text = std::fs::read_to_string(&file).unwrap();
    assert!(read_plan(&text, "wrong-figures.json", &inst).is_err());
    // A file that is not a plan at all is still a read error.
    let broken = dir.join("broken.json");
    std::fs::write(&broken, "{ \"format\": \"arcwright-plan\", ").unwrap();
    let err = app::run_check(&demo_path(), &broken, &fleet).unwrap_err();
    assert!(matches!(err, app::AppError::Input(_)), "{err}");
}

#[test]
fn bad_input_is_a_clear_error() {
    let dir = out_dir("planner-bad");
    std::fs::create_dir_all(&dir).unwrap();
    let bad = dir.join("broken.json");
    std::fs::write(&bad, "{ \"format\": \"arcwright-scenario\", ").unwrap();
    let err = app::run_plan(&options(bad.clone(), &dir.join("out")), Hooks::default())
        .unwrap_err()
        .to_string();
    assert!(err.contains("broken.json"), "{err}");
    let missing = dir.join("missing.dat");
    let err = app::run_plan(&options(missing, &dir.join("out")), Hooks::default())
        .unwrap_err()
        .to_string();
    assert!(err.contains("missing.dat"), "{err}");
    assert!(!dir.join("out").exists());
}

/// The example program itself, as a user runs it: plan, then `check`.
#[test]
fn the_example_program_runs() {
    let cargo = env!("CARGO");
    let root = env!("CARGO_MANIFEST_DIR");
    // Build the example with the profile this test was built with, so that
    // `cargo test` and `cargo test --release` reuse what they compiled.
    let me = std::env::current_exe().unwrap();
    let profile_dir = me.parent().unwrap().parent().unwrap();
    let profile = if profile_dir.file_name().is_some_and(|n| n == "release") {
        "release"
    } else {
        "test"
    };
    let status = Command::new(cargo)
        .args([
            "build",
            "--quiet",
            "--profile",
            profile,
            "--example",
            "planner",
        ])
        .current_dir(root)
        .status()
        .unwrap();
    assert!(status.success());
    let exe = profile_dir
        .join("examples/planner")
        .with_extension(std::env::consts::EXE_EXTENSION);
    assert!(exe.exists(), "{} not built", exe.display());
    let dir = out_dir("planner-process");
    let out = Command::new(&exe)
        .args(["--iterations", "40", "--workers", "1", "--out"])
        .arg(&dir)
        .current_dir(root)
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "{stdout}\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        stdout.contains("Scenario: instances/demo-town.json"),
        "{stdout}"
    );
    assert!(stdout.contains("total"), "{stdout}");
    assert!(stdout.contains(arcwright::report::CAUTIONS[0]), "{stdout}");
    assert!(dir.join("plan.svg").exists());
    let out = Command::new(&exe)
        .args(["check", "instances/demo-town.json"])
        .arg(dir.join("plan.json"))
        .current_dir(root)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    // A plan of another scenario fails the check with a non-zero exit code.
    if let Some(gdb) = shared("gdb/gdb1.dat") {
        let out = Command::new(&exe)
            .arg("check")
            .arg(&gdb)
            .arg(dir.join("plan.json"))
            .current_dir(root)
            .output()
            .unwrap();
        assert!(!out.status.success());
    }
    // A readable plan with wrong figures: every violation listed, exit 1.
    let (file, _, expected) = tampered_plan_file(&dir.join("wrong"));
    let cap = app::load_scenario(&demo_path(), &FleetOverrides::default())
        .unwrap()
        .tasks()
        .iter()
        .map(|t| t.demand)
        .sum::<i64>()
        + 1;
    let out = Command::new(&exe)
        .args(["check", "instances/demo-town.json"])
        .arg(&file)
        .args(["--capacity", &cap.to_string()])
        .args(["--shift-limit", "none", "--max-trucks", "none"])
        .current_dir(root)
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(1), "{stdout}");
    for v in &expected {
        assert!(stdout.contains(&format!("  - {v}\n")), "{v}\n{stdout}");
    }
    assert!(stdout.contains("3 problem(s)"), "{stdout}");
    // An unreadable plan file: exit 2.
    let out = Command::new(&exe)
        .args(["check", "instances/demo-town.json"])
        .arg(dir.join("no-such-plan.json"))
        .current_dir(root)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let out = Command::new(&exe).arg("--bogus").output().unwrap();
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn a_plan_failing_the_checker_is_refused() {
    let inst = app::load_scenario(&demo_path(), &FleetOverrides::default()).unwrap();
    let dist = Distances::new(&inst).unwrap();
    // Every task on its own route: valid except that it needs far more
    // trucks than the fleet has.
    let routes: Vec<Vec<Visit>> = (0..inst.tasks().len())
        .map(|t| vec![Visit::new(t, arcwright::model::Dir::Forward)])
        .collect();
    let plan = Plan::from_visits(&inst, &dist, routes);
    match app::render(&inst, &dist, &plan, &Default::default()) {
        Err(app::AppError::Refused(v)) => {
            assert!(
                v.iter()
                    .any(|x| x.to_string().contains("trucks") || x.to_string().contains("routes")),
                "{v:?}"
            );
        }
        other => panic!("not refused: {:?}", other.map(|f| f.len())),
    }
    // A plan with a misreported cost is refused too.
    let run_dir = out_dir("planner-refuse");
    let run = app::run_plan(&options(demo_path(), &run_dir), Hooks::default()).unwrap();
    let mut bad = run.solution.plan.clone();
    bad.routes[0].cost -= 1;
    bad.cost -= 1;
    assert!(matches!(
        app::render(&run.instance, &dist, &bad, &Default::default()),
        Err(app::AppError::Refused(_))
    ));
}

/// The library snippet of the README, as written there.
#[test]
fn readme_library_snippet_runs() {
    use arcwright::demo::{town, TownSpec};
    use arcwright::{paths::Distances, report, Solver};

    let inst = town(&TownSpec::new(7, 4)).unwrap();
    let solution = Solver::new(&inst)
        .seed(1)
        .workers(1)
        .max_iterations(50)
        .solve()
        .unwrap();
    assert!(check_plan(&inst, &solution.plan).is_ok());
    let dist = Distances::new(&inst).unwrap();
    let sheets = report::sheets::markdown(&inst, &dist, &solution.plan);
    let map = report::svg::map(&inst, &dist, &solution.plan);
    assert!(sheets.contains("## Truck 1"));
    assert!(map.is_some());
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    assert!(readme.contains("Solver::new(&inst).seed(1).workers(1).max_iterations(50).solve()"));
}

/// What Ctrl-C does in the program: the stop flag ends a long search early
/// and the best plan so far is still checked and written.
#[test]
fn stop_flag_ends_the_search_and_still_writes_the_plan() {
    use std::sync::atomic::{AtomicBool, Ordering};
    use std::sync::Arc;
    let dir = out_dir("planner-stop");
    let mut o = options(demo_path(), &dir);
    o.iterations = None;
    o.time_limit = Some(std::time::Duration::from_secs(600));
    let stop = Arc::new(AtomicBool::new(false));
    let flag = stop.clone();
    // Raise the flag at the first improvement, as a user pressing Ctrl-C would.
    let hooks = Hooks {
        on_progress: Some(Box::new(move |_| flag.store(true, Ordering::SeqCst))),
        stop: Some(stop),
    };
    let start = std::time::Instant::now();
    let run = app::run_plan(&o, hooks).unwrap();
    assert!(start.elapsed().as_secs() < 120, "{:?}", start.elapsed());
    assert!(run.stopped_early);
    assert!(run.summary.contains("stopped early"));
    check_plan(&run.instance, &run.solution.plan).unwrap();
    assert!(dir.join("plan.json").exists() && dir.join("plan.svg").exists());
}

#[test]
fn scenario_kind_is_told_by_name_or_by_content() {
    let dir = out_dir("planner-kinds");
    std::fs::create_dir_all(&dir).unwrap();
    let dat = " NOMBRE : tiny\n VERTICES : 3\n ARISTAS_REQ : 2\n ARISTAS_NOREQ : 1\n \
               VEHICULOS : 2\n CAPACIDAD : 5\n TIPO_COSTES_ARISTAS : EXPLICITOS\n \
               COSTE_TOTAL_REQ : 7\n LISTA_ARISTAS_REQ :\n ( 1 , 2)  coste 3 demanda 2\n \
               ( 2 , 3)  coste 4 demanda 2\n LISTA_ARISTAS_NOREQ :\n ( 3 , 1)  coste 6\n \
               DEPOSITO :   1\n";
    let txt = dir.join("tiny.txt");
    std::fs::write(&txt, dat).unwrap();
    let inst = app::load_scenario(&txt, &FleetOverrides::default()).unwrap();
    assert_eq!(inst.tasks().len(), 2);
    let json = dir.join("tiny.scenario");
    std::fs::write(&json, arcwright::io::write_scenario(&inst)).unwrap();
    assert_eq!(
        app::load_scenario(&json, &FleetOverrides::default()).unwrap(),
        inst
    );
}
