//! Plan files: round trip and typed errors, on gdb1 (Golden, DeArmon &
//! Baker 1983, from ../shared/instances).

mod common;

use std::path::PathBuf;

use arcwright::error::ParseProblem;
use arcwright::io::{read_dat_file, read_plan, write_plan};
use arcwright::Solver;

fn gdb1() -> Option<arcwright::model::Instance> {
    let p = common::shared_file("plan_json", "gdb/gdb1.dat")?;
    Some(read_dat_file(p).unwrap().instance)
}

#[test]
fn round_trip_keeps_the_plan_and_uses_file_vertex_numbers() {
    let Some(inst) = gdb1() else { return };
    let sol = Solver::new(&inst).max_iterations(50).solve().unwrap();
    let text = write_plan(&inst, &sol.plan, Some(sol.lower_bound.value));
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(v["instance"], "gdb1");
    assert_eq!(v["cost"], sol.cost);
    // Services name the file's 1-based vertices: the first is on a link of
    // gdb1 whose ends appear in the file as written.
    let s0 = &v["routes"][0]["services"][0];
    let link = &inst.network().links[s0["link"].as_u64().unwrap() as usize];
    let ids = [
        inst.network().junctions[link.from].id,
        inst.network().junctions[link.to].id,
    ];
    let pair = [s0["from"].as_u64().unwrap(), s0["to"].as_u64().unwrap()];
    assert!(pair == ids || pair == [ids[1], ids[0]]);
    let back = read_plan(&text, "plan.json", &inst).unwrap();
    assert_eq!(back, sol.plan);
    arcwright::check::check_plan(&inst, &back).unwrap();
}

#[test]
fn errors_name_the_file_the_line_and_the_problem() {
    let Some(inst) = gdb1() else { return };
    let sol = Solver::new(&inst).max_iterations(20).solve().unwrap();
    let text = write_plan(&inst, &sol.plan, None);

    // Syntax error: line and column from the JSON parser.
    let broken = text.replacen("\"routes\": [", "\"routes\": [[", 1);
    let e = read_plan(&broken, "bad.json", &inst).unwrap_err();
    assert_eq!(e.location().unwrap().file, "bad.json");
    assert!(e.location().unwrap().line.is_some());
    assert!(matches!(e.problem(), Some(ParseProblem::Json { .. })));

    // A (from, to) pair that is not the required link it names. gdb1 has no
    // vertex 99; the error points at the line of that service.
    let first = text.lines().position(|l| l.contains("\"link\"")).unwrap() + 1;
    let wrong = text.replacen("{\"from\": ", "{\"from\": 99, \"was\": ", 1);
    let e = read_plan(&wrong, "wrong.json", &inst).unwrap_err();
    assert!(
        matches!(
            e.problem(),
            Some(ParseProblem::NotARequiredLink {
                route: 0,
                position: 0,
                from: 99,
                ..
            })
        ),
        "{e}"
    );
    assert_eq!(e.location().unwrap().line, Some(first));
    assert!(
        e.to_string().starts_with(&format!("wrong.json:{first}:")),
        "{e}"
    );

    // Wrong instance name.
    let other = text.replacen("\"gdb1\"", "\"gdb2\"", 1);
    let e = read_plan(&other, "other.json", &inst).unwrap_err();
    assert!(matches!(
        e.problem(),
        Some(ParseProblem::WrongInstance { .. })
    ));

    // Stated cost that does not match.
    let cost = format!("\"cost\": {},", sol.cost);
    let lied = text.replacen(&cost, &format!("\"cost\": {},", sol.cost - 1), 1);
    let e = read_plan(&lied, "lied.json", &inst).unwrap_err();
    assert!(
        matches!(e.problem(), Some(ParseProblem::Mismatch { .. })),
        "{e}"
    );
}

#[test]
fn a_link_served_twice_is_refused() {
    let Some(inst) = gdb1() else { return };
    let sol = Solver::new(&inst).max_iterations(20).solve().unwrap();
    let text = write_plan(&inst, &sol.plan, None);
    // Duplicate the first service line of the first route.
    let lines: Vec<&str> = text.lines().collect();
    let k = lines.iter().position(|l| l.contains("\"link\"")).unwrap();
    let mut dup: Vec<String> = lines.iter().map(|s| s.to_string()).collect();
    let line = format!("{},", lines[k].trim_end_matches(','));
    dup.insert(k, line);
    let e = read_plan(&dup.join("\n"), "dup.json", &inst).unwrap_err();
    assert!(
        matches!(e.problem(), Some(ParseProblem::ServedTwice { .. })),
        "{e}"
    );
}

/// The structure-only reader leaves a service against its allowed direction
/// to the checker, and recomputes the figures a file leaves out. On the demo
/// town (instances/demo-town.json), which has one-side-only streets.
#[test]
fn reading_as_written_leaves_direction_and_figures_to_the_checker() {
    use arcwright::check::{check_plan, At, Violation};
    use arcwright::io::{read_plan_as_written, read_scenario_file};
    use arcwright::model::{Dir, Fleet};
    use arcwright::paths::Distances;
    use arcwright::plan::{Plan, Visit};

    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("instances/demo-town.json");
    let base = read_scenario_file(&path).unwrap();
    // Loosen the fleet so that only the planted problem remains.
    let capacity = base.tasks().iter().map(|t| t.demand).sum::<i64>() + 1;
    let inst = base.with_fleet(Fleet::with_capacity(capacity)).unwrap();
    assert_eq!(inst.fleet().shift_limit, None);
    let dist = Distances::new(&inst).unwrap();
    let one_side = inst.tasks().iter().position(|t| !t.either).unwrap();
    let all: Vec<Visit> = (0..inst.tasks().len())
        .map(|t| Visit::new(t, Dir::Forward))
        .collect();
    let plan = Plan::from_visits(&inst, &dist, vec![all]);
    let mut json: serde_json::Value =
        serde_json::from_str(&write_plan(&inst, &plan, None)).unwrap();
    // Serve the one-side street from its far end, and state no figures.
    let s = &mut json["routes"][0]["services"][one_side];
    let (from, to) = (s["from"].clone(), s["to"].clone());
    s["from"] = to;
    s["to"] = from;
    json.as_object_mut().unwrap().remove("cost");
    let r = json["routes"][0].as_object_mut().unwrap();
    r.remove("cost");
    r.remove("load");
    let text = serde_json::to_string_pretty(&json).unwrap();

    let e = read_plan(&text, "flipped.json", &inst).unwrap_err();
    assert!(
        matches!(e.problem(), Some(ParseProblem::NotARequiredLink { .. })),
        "{e}"
    );
    let read = read_plan_as_written(&text, "flipped.json", &inst, &dist).unwrap();
    assert_eq!(read.routes[0].visits[one_side].dir, Dir::Backward);
    assert_eq!(
        check_plan(&inst, &read),
        Err(vec![Violation::DirectionNotAllowed {
            at: At {
                route: 0,
                pos: one_side
            },
            task: one_side,
            link: inst.tasks()[one_side].link,
            street: inst.network().street_label(inst.tasks()[one_side].link),
        }])
    );
}

/// Defect (issue 8, §3.1) at the library level: a required two-way
/// self-loop served backward is written as from = to and reads back
/// forward, so a plan straight from `Solver::solve` did not read back equal.
/// The solver now returns self-loops served forward; every plan it returns
/// writes and reads back identically (six such loops, several seeds).
#[test]
fn solver_plans_with_two_way_self_loops_read_back_equal() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/self_loops.json");
    let inst = arcwright::io::read_scenario_file(path).unwrap();
    let loops = inst.tasks().iter().filter(|t| t.tail == t.head && t.either);
    assert!(loops.count() >= 6);
    for seed in 1..=6 {
        let sol = Solver::new(&inst)
            .seed(seed)
            .workers(1)
            .max_iterations(30)
            .solve()
            .unwrap();
        arcwright::check::check_plan(&inst, &sol.plan).unwrap();
        let text = write_plan(&inst, &sol.plan, Some(sol.lower_bound.value));
        let back = read_plan(&text, "self_loops.plan.json", &inst).unwrap();
        assert_eq!(back, sol.plan, "seed {seed}");
    }
}

/// Frictions 2.5/2.6 on plan files: positions given once, a line for every
/// error of a file that reads as JSON, trucks and services numbered from 1
/// as on the sheets, and a byte-order mark skipped.
#[test]
fn plan_file_errors_have_a_line_and_speak_of_trucks() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/self_loops.json");
    let inst = arcwright::io::read_scenario_file(path).unwrap();
    let sol = Solver::new(&inst).max_iterations(10).solve().unwrap();
    let text = write_plan(&inst, &sol.plan, None);
    let line_of = |needle: &str| text.lines().position(|l| l.contains(needle)).unwrap() + 1;

    // A byte-order mark, as some editors write, is skipped.
    let bom = format!("\u{feff}{text}");
    assert_eq!(read_plan(&bom, "bom.json", &inst).unwrap(), sol.plan);

    // Syntax error: the line in the location, the column once in the message.
    let broken = text.replacen("\"routes\": [", "\"routes\": [[", 1);
    let e = read_plan(&broken, "bad.json", &inst).unwrap_err();
    let msg = e.to_string();
    assert!(e.location().unwrap().line.is_some(), "{msg}");
    assert_eq!(msg.matches("column").count(), 1, "{msg}");
    assert!(!msg.contains(" at line "), "{msg}");

    // Another format, another instance, a wrong total: each at its line.
    for (from, to, key) in [
        ("\"arcwright-plan\"", "\"a-spreadsheet\"", "\"format\""),
        ("\"instance\": \"", "\"instance\": \"x", "\"instance\""),
    ] {
        let e = read_plan(&text.replacen(from, to, 1), "f.json", &inst).unwrap_err();
        assert_eq!(e.location().unwrap().line, Some(line_of(key)), "{e}");
    }
    let cost = format!("\"cost\": {},", sol.cost);
    let lied = text.replacen(&cost, &format!("\"cost\": {},", sol.cost + 1), 1);
    let e = read_plan(&lied, "lied.json", &inst).unwrap_err();
    assert_eq!(e.location().unwrap().line, Some(line_of(&cost)), "{e}");

    // A wrong figure of the first route names Truck 1 at that route's line.
    let load = format!("\"load\": {},", sol.plan.routes[0].load);
    let lied = text.replacen(&load, "\"load\": 999,", 1);
    let e = read_plan(&lied, "lied.json", &inst).unwrap_err();
    assert_eq!(e.location().unwrap().line, Some(line_of(&load)), "{e}");
    assert!(e.to_string().contains("Truck 1 load"), "{e}");

    // A service naming a street that is not to be served: Truck 1, service 1.
    let wrong = text.replacen("{\"from\": ", "{\"from\": 99, \"was\": ", 1);
    let e = read_plan(&wrong, "wrong.json", &inst).unwrap_err();
    let msg = e.to_string();
    assert!(
        msg.contains(": Truck 1, service 1: junctions 99 to"),
        "{msg}"
    );
    assert!(!msg.contains("route"), "{msg}");
}
