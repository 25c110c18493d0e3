//! The cutting-plane LP bound (`arcwright::bounds::lp`) against outside
//! references:
//! - the LP value for fixed cut lists equals scipy's `linprog` (HiGHS),
//!   fixture `tests/fixtures/lp_cuts.json` made by `scripts/lp_fixture.py`
//!   with scipy 1.17.1 (the version is also read from the fixture);
//! - never above the best known values of `../shared/instances/reference.csv`
//!   (gdb, val, egl; CARPData.jl compilation, R. Martinelli 2021);
//! - never above the cost of a plan found by the solver on random mixed
//!   instances (property test, iteration limits);
//! - hand-built instances where a known odd cut or capacity cut is violated
//!   and must be found, with optima worked out by hand.

use std::collections::HashSet;
use std::path::Path;
use std::sync::atomic::AtomicBool;
use std::sync::{Arc, Mutex};

use arcwright::bounds::lp::separation::{Limits, Separator};
use arcwright::bounds::lp::{solve_cuts, ClarabelBackend, Formulation, LpBound};
use arcwright::check::check_plan;
use arcwright::io::{read_dat_file, read_reference};
use arcwright::model::{Fleet, Instance, Link, Network, ServeDirection, ServiceSpec};
use arcwright::{Error, Solver};
use proptest::prelude::*;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde_json::Value;

fn link(from: usize, to: usize, cost: i64, oneway: bool, demand: Option<i64>, fwd: bool) -> Link {
    Link {
        from,
        to,
        oneway,
        cost,
        time: None,
        service: demand.map(|demand| ServiceSpec {
            demand,
            cost,
            time: None,
            direction: if fwd {
                ServeDirection::Forward
            } else {
                ServeDirection::Either
            },
        }),
        name: None,
        ..Link::default()
    }
}

/// Builds the fixture's instance (links as `[from, to, cost, oneway,
/// demand or null, forward_only]`).
fn fixture_instance(v: &Value) -> Instance {
    let n = v["n"].as_u64().unwrap() as usize;
    let mut net = Network::with_junctions(n);
    for l in v["links"].as_array().unwrap() {
        let l = l.as_array().unwrap();
        net.add_link(link(
            l[0].as_u64().unwrap() as usize,
            l[1].as_u64().unwrap() as usize,
            l[2].as_i64().unwrap(),
            l[3].as_bool().unwrap(),
            l[4].as_i64(),
            l[5].as_bool().unwrap(),
        ));
    }
    let mut fleet = Fleet::with_capacity(v["capacity"].as_i64().unwrap());
    fleet.shift_limit = v["shift_limit"].as_i64();
    let depot = v["depot"].as_u64().unwrap() as usize;
    Instance::new(v["name"].as_str().unwrap(), net, fleet, depot).unwrap()
}

/// Our right-hand sides and LP values for the fixture's fixed cut lists equal
/// those of the independent Python code and scipy's `linprog` (HiGHS), and
/// the sound rounding gives the ceiling of scipy's value.
#[test]
fn lp_values_match_scipy_linprog() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/lp_cuts.json");
    let fixture: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    assert_eq!(
        fixture["scipy"], "1.17.1",
        "fixture made with another scipy"
    );
    let instances = fixture["instances"].as_array().unwrap();
    assert_eq!(instances.len(), 8);
    for v in instances {
        let inst = fixture_instance(v);
        let form = Formulation::new(&inst);
        let mut cuts = Vec::new();
        for c in v["cuts"].as_array().unwrap() {
            let mut mask = vec![false; form.junctions()];
            for s in c["set"].as_array().unwrap() {
                mask[s.as_u64().unwrap() as usize] = true;
            }
            let cut = form.cut(&mask).expect("positive right-hand side");
            assert_eq!(
                cut.rhs,
                c["rhs"].as_i64().unwrap(),
                "{}: {:?}",
                inst.name,
                cut.set
            );
            cuts.push(cut);
        }
        let want = v["lp_value"].as_f64().unwrap();
        let (point, sound) = solve_cuts(&form, &cuts, &mut ClarabelBackend, None).unwrap();
        assert!(
            (point.objective - want).abs() <= 1e-6 * want.abs().max(1.0),
            "{}: ours {} scipy {want}",
            inst.name,
            point.objective
        );
        assert_eq!(sound, (want - 1e-6).ceil() as i64, "{}", inst.name);
    }
}

/// Never above the best known value on gdb, val and egl (round limits keep
/// the test short: the full runs are in `examples/bound_report.rs`).
#[test]
fn never_above_best_known_on_public_sets() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../shared/instances");
    let refs = match read_reference(root.join("reference.csv")) {
        Ok(refs) => refs,
        Err(Error::Io { .. }) => {
            println!("SKIPPED: {} is absent", root.display());
            return;
        }
        Err(e) => panic!("{e}"),
    };
    let mut equal_gdb = 0;
    for r in &refs {
        let inst = read_dat_file(root.join(&r.file)).unwrap().instance;
        let rounds = if r.set == "egl" { 3 } else { 30 };
        let res = LpBound::new(&inst).unwrap().max_rounds(rounds).run();
        assert!(
            res.bound <= r.best_known,
            "{}: LP bound {} > best known {}",
            r.instance,
            res.bound,
            r.best_known
        );
        assert!(res.bound >= inst.total_service_cost());
        if r.set == "gdb" && res.bound == r.best_known {
            equal_gdb += 1;
        }
    }
    // Measured: 21 of 23 (gdb8 and gdb12 stay below); a weaker separation
    // would drop this.
    assert!(
        equal_gdb >= 20,
        "only {equal_gdb} gdb bounds equal the optimum"
    );
}

/// Depot 0 joined to junction 1 by three required two-link paths (0–2–1,
/// 0–3–1, 0–4–1, cost 10 each) and a plain link 0–1 of cost 5; one truck
/// suffices. Junctions 0 and 1 have odd degree, so a deadhead path joins
/// them: the optimum is 60 + 5 = 65 (by hand). At x = 0 the odd cut around
/// {1} (three required links cross it, right-hand side 1; no capacity
/// count) must be found.
#[test]
fn odd_cut_is_found() {
    let mut net = Network::with_junctions(5);
    for m in 2..5 {
        net.add_required_edge(0, m, 10, 1);
        net.add_required_edge(m, 1, 10, 1);
    }
    net.add_edge(0, 1, 5);
    let inst = Instance::new("odd", net, Fleet::with_capacity(100), 0).unwrap();
    let form = Formulation::new(&inst);
    let sep = Separator::new(&form);
    let x = vec![0.0; form.columns().len()];
    let limits = Limits {
        max_cuts: 100,
        round: 0,
        deadline: None,
    };
    let cuts = sep.separate(&form, &x, &limits, &mut HashSet::new());
    let odd = cuts
        .iter()
        .find(|c| c.set == vec![1])
        .expect("odd cut around junction 1");
    assert_eq!(odd.rhs, 1);
    assert_eq!(odd.cols.len(), 4);
    let res = LpBound::new(&inst).unwrap().max_rounds(20).run();
    assert_eq!(res.bound, 65);
    assert!(res.finished);
    let sol = Solver::new(&inst)
        .seed(3)
        .max_iterations(50)
        .solve()
        .unwrap();
    assert_eq!(sol.cost, 65);
}

/// Depot 0 —(10)— junction 1, and a required triangle 1–2–3 (cost 1,
/// demand 4 each) with trucks of 5: each task needs its own truck, so the
/// cut around {1, 2, 3} needs 2·3 crossings, all deadheads on 0–1 (60), and
/// the cut around {2, 3} 6 − 2 = 4 deadheads on 1–2 or 1–3 (4). The
/// optimum is 3 + 64 = 67 (by hand: routes 0-1-2-1-0, 0-1-2-3-1-0,
/// 0-1-3-1-0 with the middle link of each served).
#[test]
fn capacity_cut_is_found() {
    let mut net = Network::with_junctions(4);
    net.add_edge(0, 1, 10);
    net.add_required_edge(1, 2, 1, 4);
    net.add_required_edge(2, 3, 1, 4);
    net.add_required_edge(3, 1, 1, 4);
    let inst = Instance::new("capacity", net, Fleet::with_capacity(5), 0).unwrap();
    let form = Formulation::new(&inst);
    let sep = Separator::new(&form);
    let x = vec![0.0; form.columns().len()];
    let limits = Limits {
        max_cuts: 100,
        round: 0,
        deadline: None,
    };
    let cuts = sep.separate(&form, &x, &limits, &mut HashSet::new());
    let cap = cuts
        .iter()
        .find(|c| c.set == vec![1, 2, 3])
        .expect("capacity cut around the triangle");
    assert_eq!(cap.rhs, 6);
    // The LP point with x(0,1) = 6 only still violates the cut around {2, 3}.
    let mut x = vec![0.0; form.columns().len()];
    let c01 = form
        .columns()
        .iter()
        .position(|c| (c.u, c.v) == (0, 1))
        .unwrap();
    x[c01] = 6.0;
    let cuts = sep.separate(&form, &x, &limits, &mut HashSet::new());
    assert!(cuts.iter().any(|c| c.set == vec![2, 3] && c.rhs == 4));
    let res = LpBound::new(&inst).unwrap().max_rounds(20).run();
    assert_eq!(res.bound, 67);
    let sol = Solver::new(&inst)
        .seed(3)
        .max_iterations(50)
        .solve()
        .unwrap();
    assert_eq!(sol.cost, 67);
}

/// The runner moves to another thread, reports improving bounds, and a set
/// stop flag ends it before the first solve with the service cost.
#[test]
fn runs_in_a_thread_with_progress_and_stop_flag() {
    let mut net = Network::with_junctions(4);
    net.add_edge(0, 1, 10);
    net.add_required_edge(1, 2, 1, 4);
    net.add_required_edge(2, 3, 1, 4);
    net.add_required_edge(3, 1, 1, 4);
    let inst = Instance::new("capacity", net, Fleet::with_capacity(5), 0).unwrap();
    let seen = Arc::new(Mutex::new(Vec::new()));
    let log = seen.clone();
    let run = LpBound::new(&inst)
        .unwrap()
        .max_rounds(20)
        .on_progress(move |p| log.lock().unwrap().push(p.bound));
    let res = std::thread::spawn(move || run.run()).join().unwrap();
    let seen = seen.lock().unwrap();
    assert!(seen.windows(2).all(|w| w[0] < w[1]), "{seen:?}");
    assert_eq!(seen.last(), Some(&res.bound));

    let stop = Arc::new(AtomicBool::new(true));
    let res = LpBound::new(&inst).unwrap().stop_flag(stop).run();
    assert_eq!((res.rounds, res.bound, res.finished), (0, 3, false));
}

/// A random connected mixed network: a two-way tree plus extra links (some
/// one-way), about half required (some Forward-only), random capacity and
/// sometimes a shift limit.
fn random_instance(seed: u64) -> Instance {
    let mut r = ChaCha8Rng::seed_from_u64(seed);
    let n = r.random_range(3..9);
    let mut net = Network::with_junctions(n);
    let req = |r: &mut ChaCha8Rng| r.random_bool(0.6).then(|| r.random_range(0..6));
    for v in 1..n {
        let u = r.random_range(0..v);
        let (c, d) = (r.random_range(1..20), req(&mut r));
        let fwd = r.random_bool(0.2);
        net.add_link(link(u, v, c, false, d, fwd));
    }
    for _ in 0..r.random_range(0..n) {
        let (u, v) = (r.random_range(0..n), r.random_range(0..n));
        let (c, d, oneway) = (r.random_range(0..20), req(&mut r), r.random_bool(0.3));
        let fwd = oneway || r.random_bool(0.2);
        net.add_link(link(u, v, c, oneway, d, fwd));
    }
    // At least six tasks, so that capacity matters.
    while net.links.iter().filter(|l| l.service.is_some()).count() < 6 {
        let (u, v) = (r.random_range(0..n), r.random_range(0..n));
        net.add_link(link(
            u,
            v,
            r.random_range(1..20),
            false,
            Some(r.random_range(0..6)),
            false,
        ));
    }
    let demand: i64 = net
        .links
        .iter()
        .filter_map(|l| l.service.as_ref().map(|s| s.demand))
        .sum();
    let biggest = net
        .links
        .iter()
        .filter_map(|l| l.service.as_ref().map(|s| s.demand))
        .max()
        .unwrap_or(1);
    let mut fleet = Fleet::with_capacity(biggest.max(r.random_range(1..=demand.max(1))));
    if r.random_bool(0.3) {
        fleet.shift_limit = Some(r.random_range(40..200));
    }
    Instance::new("random", net, fleet, r.random_range(0..n)).unwrap()
}

/// The cheapest of twelve greedy plans written here (nearest next task
/// that fits the load and the shift, ties within 25% of the nearest broken
/// at random; a textbook construction), each accepted by the checker.
///
/// (Not the memetic `Solver`: under an iteration limit it did not return on
/// about 3% of these instances, 2026-12-02; reported to the lead.)
fn cheapest_plan(inst: &Instance) -> Option<i64> {
    use arcwright::model::Dir;
    use arcwright::paths::{Distances, UNREACHABLE};
    use arcwright::plan::{totals, Plan, Totals, Visit};
    let dist = Distances::new(inst).ok()?;
    let fleet = inst.fleet();
    let mut best: Option<i64> = None;
    for seed in 0..12u64 {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        let mut left: Vec<usize> = (0..inst.tasks().len()).collect();
        let mut routes: Vec<Vec<Visit>> = Vec::new();
        while !left.is_empty() {
            let mut route: Vec<Visit> = Vec::new();
            loop {
                let at = route
                    .last()
                    .map_or(inst.depot(), |v| inst.tasks()[v.task].ends(v.dir).1);
                let mut options: Vec<(i64, usize, Visit)> = Vec::new();
                for (k, &t) in left.iter().enumerate() {
                    for dir in [Dir::Forward, Dir::Backward] {
                        if !inst.tasks()[t].allows(dir) {
                            continue;
                        }
                        let v = Visit::new(t, dir);
                        let mut next = route.clone();
                        next.push(v);
                        let Totals { load, cost, time } = totals(inst, &dist, &next);
                        let fits = load <= fleet.capacity
                            && cost < UNREACHABLE
                            && fleet.shift_limit.is_none_or(|l| time <= l);
                        if fits {
                            options.push((dist.cost(at, inst.tasks()[t].ends(dir).0), k, v));
                        }
                    }
                }
                let Some(near) = options.iter().map(|o| o.0).min() else {
                    break;
                };
                options.retain(|o| o.0 * 4 <= near * 5);
                let (_, k, v) = options[rng.random_range(0..options.len())];
                route.push(v);
                left.swap_remove(k);
            }
            if route.is_empty() {
                return None; // a task alone breaks the shift limit
            }
            routes.push(route);
        }
        let plan = Plan::from_visits(inst, &dist, routes);
        if check_plan(inst, &plan).is_ok() {
            best = Some(best.map_or(plan.cost, |b| b.min(plan.cost)));
        }
    }
    best
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// The bound never exceeds the cost of a checked plan.
    #[test]
    fn never_above_a_plan(seed: u64) {
        let inst = random_instance(seed);
        let Some(cost) = cheapest_plan(&inst) else {
            // A shift limit too short for some task: no plan to compare with.
            return Ok(());
        };
        let res = LpBound::new(&inst).unwrap().max_rounds(15).run();
        prop_assert!(res.bound >= inst.total_service_cost());
        prop_assert!(res.bound <= cost, "bound {} > plan {}", res.bound, cost);
    }
}
