//! The LP lower bound run beside the search (`Solver::lp_bound`): the bound
//! a solution reports is never above its cost, is at least the combinatorial
//! bound, reaches the published optimum of gdb1 (reference.csv: Belenguer &
//! Benavent 2003 lower bound 316 = best known 316, from the CARPData.jl
//! compilation in `../shared`), leaves the plan unchanged, and a stop flag
//! ends the bound thread promptly.

mod common;

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use arcwright::bounds::lp::LP_CUTS;
use arcwright::demo::{town, TownSpec};
use arcwright::io::{read_dat_file, read_reference};
use arcwright::{LpBudget, LpOutcome, Solver};

#[test]
fn gdb_solutions_report_the_lp_bound_never_above_their_cost() {
    let Some(dir) = common::shared_dir("lp_in_solver::gdb") else {
        return;
    };
    let refs = read_reference(dir.join("reference.csv")).unwrap();
    for name in ["gdb1", "gdb2", "gdb8", "gdb13"] {
        let inst = read_dat_file(dir.join(format!("gdb/{name}.dat")))
            .unwrap()
            .instance;
        let plain = Solver::new(&inst).max_iterations(300).solve().unwrap();
        let with = Solver::new(&inst)
            .max_iterations(300)
            .lp_bound(LpBudget::rounds(100))
            .solve()
            .unwrap();
        // The bound never changes the plan.
        assert_eq!(with.plan, plain.plan, "{name}");
        assert!(with.lower_bound.value <= with.cost, "{name}");
        assert!(with.lower_bound.value >= plain.lower_bound.value, "{name}");
        let Some(LpOutcome::Ran(r)) = &with.lp else {
            panic!("{name}: the LP bound did not run: {:?}", with.lp)
        };
        assert_eq!(with.lower_bound.value, r.bound.max(plain.lower_bound.value));
        let published = refs.iter().find(|r| r.instance == name).unwrap();
        assert!(r.bound <= published.lower_bound, "{name}");
        let expected_gap =
            100.0 * (with.cost - with.lower_bound.value) as f64 / with.lower_bound.value as f64;
        assert!((with.gap - expected_gap).abs() < 1e-9, "{name}");
        if name == "gdb1" {
            // Measured: the LP bound reaches the published optimum of gdb1.
            assert_eq!(r.bound, 316);
            assert_eq!(with.lower_bound.value, 316);
            assert_eq!(with.lower_bound.by, LP_CUTS);
        }
    }
}

#[test]
fn progress_reports_carry_the_best_bound_so_far() {
    let Some(path) = common::shared_file("lp_in_solver::progress", "gdb/gdb1.dat") else {
        return;
    };
    let inst = read_dat_file(path).unwrap().instance;
    let seen = std::sync::Mutex::new(Vec::new());
    let sol = Solver::new(&inst)
        .max_iterations(2000)
        .epoch(50)
        .lp_bound(LpBudget::rounds(100))
        .on_progress(|p| seen.lock().unwrap().push((p.best_cost, p.lower_bound)))
        .solve()
        .unwrap();
    let seen = seen.into_inner().unwrap();
    assert!(!seen.is_empty());
    assert!(seen.iter().any(|&(cost, _)| cost.is_some()));
    for &(cost, bound) in &seen {
        // Phase reports before the first plan carry no cost.
        assert!(cost.is_none_or(|c| bound <= c) && bound <= sol.lower_bound.value);
    }
}

#[test]
fn a_stop_flag_ends_search_and_bound_promptly() {
    // A town of some 1,500 streets: the LP takes far longer than the test
    // waits (measured: a 4,463-street town improves for a whole minute).
    let inst = town(&TownSpec::new(5, 16)).unwrap();
    let stop = Arc::new(AtomicBool::new(false));
    let setter = {
        let stop = stop.clone();
        std::thread::spawn(move || {
            std::thread::sleep(Duration::from_millis(1500));
            stop.store(true, Ordering::SeqCst);
        })
    };
    let start = Instant::now();
    let sol = Solver::new(&inst)
        .stop_flag(stop)
        .lp_bound(LpBudget::with_search())
        .solve()
        .unwrap();
    setter.join().unwrap();
    // Generous: one LP solve or separation after the flag, on a shared machine.
    assert!(
        start.elapsed() < Duration::from_secs(60),
        "{:?}",
        start.elapsed()
    );
    assert!(sol.lower_bound.value <= sol.cost);
    match &sol.lp {
        // The bound was cut off, not finished: the flag ended it.
        Some(LpOutcome::Ran(r)) => assert!(!r.finished, "{r:?}"),
        other => panic!("{other:?}"),
    }
}
