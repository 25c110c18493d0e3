//! District improvement (the solver's decomposition of large plans): every
//! plan passes the checker, results are deterministic for a seed and worker
//! count, and a round never makes the plan worse. Iteration limits only, on
//! small invented towns forced into districts.

mod common;

use std::sync::atomic::AtomicBool;
use std::sync::{Arc, Mutex};

use arcwright::check::check_plan;
use arcwright::demo::{glued_copies, town, TownSpec};
use arcwright::io::{read_dat_file, read_reference};
use arcwright::model::{Cost, Instance};
use arcwright::{Decomposition, Phase, Progress, Solver};

fn small_town() -> Instance {
    town(&TownSpec::new(11, 6)).expect("town")
}

fn districts(streets: usize) -> Decomposition {
    Decomposition::Districts { streets }
}

#[test]
fn district_plans_pass_the_checker_and_are_deterministic() {
    let inst = small_town();
    assert!(inst.tasks().len() > 100, "{} streets", inst.tasks().len());
    let run = |workers| {
        Solver::new(&inst)
            .seed(5)
            .workers(workers)
            .decomposition(districts(40))
            .max_iterations(300)
            .solve()
            .expect("plan")
    };
    let a = run(2);
    assert!(
        check_plan(&inst, &a.plan).is_ok(),
        "{:?}",
        check_plan(&inst, &a.plan)
    );
    assert!(a.cost >= a.lower_bound.value);
    let b = run(2);
    assert_eq!(a.cost, b.cost);
    assert_eq!(a.plan.routes, b.plan.routes);
    // District streams depend on the seed, the round and the district only.
    let c = run(1);
    assert_eq!(a.plan.routes, c.plan.routes);
    assert_eq!(a.stats.iterations, c.stats.iterations);
}

#[test]
fn district_rounds_never_make_the_plan_worse() {
    let inst = small_town();
    let seen: Mutex<Vec<(Phase, Option<Cost>)>> = Mutex::new(Vec::new());
    let sol = Solver::new(&inst)
        .seed(9)
        .workers(2)
        .decomposition(districts(30))
        .max_iterations(400)
        .on_progress(|p: &Progress| seen.lock().unwrap().push((p.phase, p.best_cost)))
        .solve()
        .expect("plan");
    let seen = seen.into_inner().unwrap();
    // Phases in order: distances, bound, construction, then districts.
    let phases: Vec<Phase> = seen.iter().map(|s| s.0).collect();
    assert_eq!(
        &phases[..4],
        &[
            Phase::Distances,
            Phase::Bound,
            Phase::Construction,
            Phase::Districts
        ]
    );
    let costs: Vec<Cost> = seen.iter().filter_map(|s| s.1).collect();
    assert!(!costs.is_empty());
    assert!(costs.windows(2).all(|w| w[1] < w[0]), "{costs:?}");
    assert_eq!(*costs.last().unwrap(), sol.cost);
    assert!(check_plan(&inst, &sol.plan).is_ok());
}

#[test]
fn a_raised_stop_flag_still_returns_a_checked_plan() {
    let inst = small_town();
    let stop = Arc::new(AtomicBool::new(true));
    let sol = Solver::new(&inst)
        .decomposition(districts(40))
        .stop_flag(stop)
        .solve()
        .expect("the construction is returned");
    assert!(check_plan(&inst, &sol.plan).is_ok());
    assert_eq!(sol.stats.iterations, 0);
    assert_eq!(sol.plan.visits(), inst.tasks().len());
}

#[test]
fn glued_copies_of_gdb1_reach_k_times_the_published_optimum() {
    let Some(dir) = common::shared_dir("districts::glued_gdb1") else {
        return;
    };
    // gdb1 (Golden, DeArmon & Baker 1983): optimum 316, proven (reference.csv).
    let refs = read_reference(dir.join("reference.csv")).expect("reference");
    let r = refs
        .iter()
        .find(|r| r.instance == "gdb1")
        .expect("gdb1 row");
    assert!(r.proven_optimal || r.lower_bound == r.best_known);
    let one = read_dat_file(dir.join("gdb/gdb1.dat"))
        .expect("gdb1")
        .instance;
    let inst = glued_copies(&one, 4).expect("copies");
    let sol = Solver::new(&inst)
        .seed(3)
        .workers(2)
        .decomposition(districts(60))
        .max_iterations(100_000)
        .solve()
        .expect("plan");
    assert!(check_plan(&inst, &sol.plan).is_ok());
    let opt = 4 * r.best_known;
    assert!(sol.cost >= opt, "{} below the optimum {opt}", sol.cost);
    // Districts of about two copies each, 100,000 ruin-and-recreate moves
    // in all (about half a second): within 2% of the optimum.
    assert!(sol.cost <= opt + opt / 50, "{} vs optimum {opt}", sol.cost);
}

/// Distances answered on demand give exactly the plan of the full matrices
/// (same values, so the same search), and with turn rules the district
/// search keeps plans valid and deterministic for the seed and worker count.
#[test]
fn on_demand_distances_and_turn_rules_in_districts() {
    use arcwright::paths::Distances;
    use arcwright::turns::TurnRules;
    let inst = small_town();
    let run = |dist: &Distances| {
        Solver::new(&inst)
            .seed(3)
            .workers(2)
            .distances(dist)
            .decomposition(districts(40))
            .max_iterations(200)
            .solve()
            .expect("plan")
    };
    let full = Distances::new(&inst).unwrap();
    let lazy = Distances::on_demand(&inst);
    let (a, b) = (run(&full), run(&lazy));
    assert_eq!(a.plan.routes, b.plan.routes);
    assert_eq!(a.cost, b.cost);
    assert!(check_plan(&inst, &b.plan).is_ok());

    let turned = small_town()
        .with_turn_rules(Some(TurnRules::default()))
        .unwrap();
    let solve = |workers| {
        Solver::new(&turned)
            .seed(4)
            .workers(workers)
            .decomposition(districts(40))
            .max_iterations(200)
            .solve()
            .expect("plan")
    };
    let (x, y) = (solve(2), solve(1));
    assert!(
        check_plan(&turned, &x.plan).is_ok(),
        "{:?}",
        check_plan(&turned, &x.plan)
    );
    assert_eq!(x.plan.routes, y.plan.routes);
    assert_eq!(x.cost, y.cost);
    // Banned U-turns can only make the plan dearer than free turns allow.
    assert!(x.cost >= a.lower_bound.value);
}

/// The cost of the first plan a run reports (its first `Districts` event)
/// and the run's solution.
fn first_plan_of(solver: Solver<'_>) -> (Cost, arcwright::Solution) {
    let first: Mutex<Option<Cost>> = Mutex::new(None);
    let sol = solver
        .on_progress(|p: &Progress| {
            let mut f = first.lock().unwrap();
            if p.phase == Phase::Districts && f.is_none() {
                *f = p.best_cost;
            }
        })
        .solve()
        .expect("plan");
    let f = first
        .into_inner()
        .unwrap()
        .expect("a first plan was reported");
    (f, sol)
}

/// Above 2,048 streets the first plan comes from Path-Scanning on candidate
/// lists (five rules) and the split. A deadline already passed, or a stop
/// flag already set, stops the rules still running once one rule's plan
/// exists: the plan returned passes the checker and its first plan costs no
/// less than the best of the five rules (run uninterrupted); with turn
/// rules too (turn-aware distances on demand at this size).
#[test]
fn an_interrupted_construction_still_returns_a_checked_plan() {
    let plain = town(&TownSpec::new(3, 21)).expect("town");
    assert!(
        plain.tasks().len() > 2048,
        "{} streets",
        plain.tasks().len()
    );
    let turned = plain
        .clone()
        .with_turn_rules(Some(arcwright::turns::TurnRules::default()))
        .expect("turn rules");
    for inst in [plain, turned] {
        let (all_rules, _) = first_plan_of(Solver::new(&inst).seed(1).workers(2).max_iterations(1));
        let late = Solver::new(&inst)
            .seed(1)
            .workers(2)
            .time_limit(std::time::Duration::ZERO);
        let stopped = Solver::new(&inst)
            .seed(1)
            .workers(2)
            .stop_flag(Arc::new(AtomicBool::new(true)));
        for solver in [late, stopped] {
            let (first, sol) = first_plan_of(solver);
            assert!(first >= all_rules, "{first} < {all_rules}");
            assert_eq!(check_plan(&inst, &sol.plan), Ok(()));
            assert!(sol.cost <= first && sol.cost >= sol.lower_bound.value);
        }
    }
}
