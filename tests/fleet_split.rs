//! The split with dump sites, yards and truck types against exhaustive
//! enumeration written here, independent of the crate: its own
//! Floyd–Warshall shortest paths (least cost, ties least time, the
//! convention of the model), its own route evaluation, and every choice of
//! cuts, truck types, directions and tips enumerated.

use arcwright::fleet::split::split;
use arcwright::fleet::Tables;
use arcwright::model::{
    Balance, DumpSite, Fleet, Hours, Instance, Link, Network, Operations, ServeDirection,
    ServiceSpec, TruckType, Yard,
};

const INF: i64 = i64::MAX / 8;

/// A small deterministic generator (64-bit LCG, Knuth's constants).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self, n: u64) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 33) % n
    }
}

/// Lexicographic (cost, time) all-pairs shortest paths, without `banned` links.
fn floyd(net: &Network, banned: &[usize]) -> Vec<Vec<(i64, i64)>> {
    let n = net.junctions.len();
    let mut d = vec![vec![(INF, INF); n]; n];
    for (v, row) in d.iter_mut().enumerate() {
        row[v] = (0, 0);
    }
    for (i, l) in net.links.iter().enumerate() {
        if banned.contains(&i) {
            continue;
        }
        let w = (l.cost, l.time.unwrap_or(l.cost));
        let mut put = |a: usize, b: usize| {
            if w < d[a][b] {
                d[a][b] = w;
            }
        };
        put(l.from, l.to);
        if !l.oneway {
            put(l.to, l.from);
        }
    }
    for k in 0..n {
        for i in 0..n {
            for j in 0..n {
                if d[i][k].0 < INF && d[k][j].0 < INF {
                    let w = (d[i][k].0 + d[k][j].0, d[i][k].1 + d[k][j].1);
                    if w < d[i][j] {
                        d[i][j] = w;
                    }
                }
            }
        }
    }
    d
}

struct World {
    inst: Instance,
    types: Vec<TruckType>,
    yards: Vec<usize>,
    sites: Vec<DumpSite>,
    return_empty: bool,
    weight: i64,
    dist: Vec<Vec<Vec<(i64, i64)>>>,
}

/// Route of type `k` over `tasks` with directions `dirs` (bit m: backward)
/// and tip choice per gap `tips[m]` (0: none, s+1: site s; `tips[m]` is the
/// gap after task m, the last one before the return). Returns (cost, time)
/// if feasible.
fn route(w: &World, k: usize, tasks: &[usize], dirs: u32, tips: &[usize]) -> Option<(i64, i64)> {
    let ty = &w.types[k];
    let d = &w.dist[k];
    let yard = w.yards[ty.yard];
    let (mut driven, mut time, mut unload, mut load) = (0i64, 0i64, 0i64, 0i64);
    let mut at = yard;
    for (m, &t) in tasks.iter().enumerate() {
        let task = &w.inst.tasks()[t];
        let back = dirs >> m & 1 == 1;
        if back && !task.either {
            return None;
        }
        if ty.no_service.contains(&task.link) || ty.no_entry.contains(&task.link) {
            return None;
        }
        let (s, e) = if back {
            (task.head, task.tail)
        } else {
            (task.tail, task.head)
        };
        let (c, tm) = d[at][s];
        if c >= INF {
            return None;
        }
        driven += c + task.cost;
        time += tm + task.time;
        load += task.demand;
        if load > ty.capacity {
            return None;
        }
        at = e;
        if tips[m] > 0 {
            if load == 0 {
                return None; // an empty truck does not tip
            }
            let site = &w.sites[tips[m] - 1];
            let (c, tm) = d[at][site.junction];
            if c >= INF {
                return None;
            }
            driven += c;
            let mut arrive = time + tm;
            if let Some(h) = site.hours {
                if arrive > h.closes {
                    return None;
                }
                arrive = arrive.max(h.opens);
            }
            time = arrive + site.unload_time;
            unload += site.unload_cost;
            load = 0;
            at = site.junction;
        }
    }
    if w.return_empty && !w.sites.is_empty() && load > 0 {
        return None;
    }
    let (c, tm) = d[at][yard];
    if c >= INF {
        return None;
    }
    driven += c;
    time += tm;
    if ty.shift_limit.is_some_and(|s| time > s) {
        return None;
    }
    let milli = ty.cost_per_mille * driven + 1000 * unload;
    Some((ty.fixed_cost + (milli + 999) / 1000, time))
}

/// Every (cost, time) a route of type `k` over `tasks` can have.
fn all_routes(w: &World, k: usize, tasks: &[usize]) -> Vec<(i64, i64)> {
    let m = tasks.len();
    let s = w.sites.len() + 1;
    let mut out = Vec::new();
    let combos = s.pow(m as u32);
    for dirs in 0..(1u32 << m) {
        for mut code in 0..combos {
            let mut tips = vec![0; m];
            for t in tips.iter_mut() {
                *t = code % s;
                code /= s;
            }
            if let Some(x) = route(w, k, tasks, dirs, &tips) {
                out.push(x);
            }
        }
    }
    // Only options that no other beats in both cost and time can be part of
    // a best split (the objective is a sum of costs plus a maximum of times).
    out.sort_unstable();
    let mut pareto: Vec<(i64, i64)> = Vec::new();
    for x in out {
        if pareto.last().is_none_or(|p| x.1 < p.1) {
            pareto.push(x);
        }
    }
    if w.weight == 0 {
        pareto.truncate(1);
    }
    pareto
}

/// Least objective over all splits of `tour`: cuts, types, and every route.
fn enumerate(w: &World, tour: &[usize]) -> Option<i64> {
    let n = tour.len();
    let nt = w.types.len();
    // options[i][j][k]: every (cost, time) of a route of tour[i..j] of type k.
    let mut options = vec![vec![vec![Vec::new(); nt]; n + 1]; n + 1];
    for i in 0..n {
        for j in i + 1..=n {
            for (k, o) in options[i][j].iter_mut().enumerate() {
                *o = all_routes(w, k, &tour[i..j]);
            }
        }
    }
    let mut best: Option<i64> = None;
    for cuts in 0..(1u32 << (n - 1)) {
        let mut bounds = vec![0];
        for p in 1..n {
            if cuts >> (p - 1) & 1 == 1 {
                bounds.push(p);
            }
        }
        bounds.push(n);
        let pieces: Vec<(usize, usize)> = bounds.windows(2).map(|b| (b[0], b[1])).collect();
        let mut assign = vec![0usize; pieces.len()];
        loop {
            let ok = (0..nt).all(|k| {
                let used = assign.iter().filter(|&&a| a == k).count();
                w.types[k].count.is_none_or(|c| used <= c)
            });
            if ok {
                // Every combination of route options of the pieces.
                let lists: Vec<&Vec<(i64, i64)>> = pieces
                    .iter()
                    .zip(&assign)
                    .map(|(&(i, j), &k)| &options[i][j][k])
                    .collect();
                if lists.iter().all(|l| !l.is_empty()) {
                    // min over plans of cost + w·longest = min over T of
                    // (least cost with every route time <= T) + w·T.
                    let mut ts: Vec<i64> =
                        lists.iter().flat_map(|l| l.iter().map(|x| x.1)).collect();
                    ts.sort_unstable();
                    ts.dedup();
                    for t in ts {
                        let costs: Option<Vec<i64>> = lists
                            .iter()
                            .map(|l| l.iter().filter(|x| x.1 <= t).map(|x| x.0).min())
                            .collect();
                        if let Some(c) = costs {
                            let v = c.iter().sum::<i64>() + w.weight * t;
                            if best.is_none_or(|b| v < b) {
                                best = Some(v);
                            }
                        }
                    }
                }
            }
            let mut p = 0;
            while p < assign.len() {
                assign[p] += 1;
                if assign[p] < nt {
                    break;
                }
                assign[p] = 0;
                p += 1;
            }
            if p == assign.len() {
                break;
            }
        }
    }
    best
}

/// A random small world: 7 junctions on a ring with chords, `tasks`
/// required streets, two yards, two dump sites (one with opening hours and
/// a gate fee), two truck types.
fn world(seed: u64, tasks: usize, variant: u64) -> World {
    let mut g = Lcg(seed);
    let n = 7;
    let mut net = Network::with_junctions(n);
    let mut links = Vec::new();
    for v in 0..n {
        links.push((v, (v + 1) % n));
    }
    for _ in 0..4 {
        let a = g.next(n as u64) as usize;
        let b = (a + 2 + g.next(n as u64 - 3) as usize) % n;
        links.push((a, b));
    }
    for (i, &(a, b)) in links.iter().enumerate() {
        let cost = 1 + g.next(9) as i64;
        let time = cost + g.next(4) as i64;
        let service = (i < tasks).then(|| ServiceSpec {
            demand: 1 + g.next(4) as i64,
            cost: cost + g.next(3) as i64,
            time: Some(time + 1),
            direction: if g.next(3) == 0 {
                ServeDirection::Forward
            } else {
                ServeDirection::Either
            },
        });
        net.add_link(Link {
            from: a,
            to: b,
            oneway: service.is_some() && g.next(5) == 0,
            cost,
            time: Some(time),
            service,
            name: None,
            length: None,
            geometry: Vec::new(),
            class: None,
        });
    }
    let inst = Instance::new("tiny world", net, Fleet::with_capacity(6), 0).unwrap();
    let yards = vec![
        Yard {
            name: "west".into(),
            junction: 0,
        },
        Yard {
            name: "east".into(),
            junction: 4,
        },
    ];
    let sites = vec![
        DumpSite {
            name: Some("tip".into()),
            junction: 2,
            unload_time: 3,
            unload_cost: 2,
            hours: Some(Hours {
                opens: 8,
                closes: 60,
            }),
        },
        DumpSite {
            name: None,
            junction: 5 + g.next(2) as usize,
            unload_time: 5,
            unload_cost: 0,
            hours: None,
        },
    ];
    let types = vec![
        TruckType {
            name: "small".into(),
            count: Some(if variant & 1 == 0 { 1 } else { 2 }),
            capacity: 6,
            shift_limit: Some(120),
            yard: 0,
            fixed_cost: 7,
            cost_per_mille: 800,
            no_entry: vec![],
            no_service: vec![],
            no_entry_classes: vec![],
            no_service_classes: vec![],
        },
        TruckType {
            name: "large".into(),
            count: if variant & 2 == 0 { None } else { Some(1) },
            capacity: 9,
            shift_limit: None,
            yard: 1,
            fixed_cost: 15,
            cost_per_mille: 1250,
            no_entry: vec![links.len() - 1],
            no_service: vec![0],
            no_entry_classes: vec![],
            no_service_classes: vec![],
        },
    ];
    let return_empty = variant & 4 == 0;
    let weight = if variant & 8 == 0 { 0 } else { 2 };
    let ops = Operations {
        dump_sites: sites.clone(),
        return_empty,
        yards: yards.clone(),
        truck_types: types.clone(),
        balance: if weight == 0 {
            Balance::LeastCost
        } else {
            Balance::LongestShift { weight }
        },
    };
    let inst = inst.with_operations(ops).unwrap();
    let dist = types
        .iter()
        .map(|t| floyd(inst.network(), &t.no_entry))
        .collect();
    World {
        inst,
        yards: yards.iter().map(|y| y.junction).collect(),
        types,
        sites,
        return_empty,
        weight,
        dist,
    }
}

/// What the splits of a test used (so that the test is known to exercise
/// tips, both types and infeasible orders).
#[derive(Default, Debug)]
struct Seen {
    feasible: usize,
    infeasible: usize,
    tips_between: usize,
    types: [usize; 2],
}

fn check_against_enumeration(w: &World, tour: &[usize], seen: &mut Seen) {
    let tables = Tables::new(&w.inst).unwrap();
    let want = enumerate(w, tour);
    match split(&w.inst, &tables, tour) {
        Err(_) => {
            assert_eq!(want, None, "split found nothing for {tour:?}");
            seen.infeasible += 1;
        }
        Ok(s) => {
            seen.feasible += 1;
            assert!(s.exact);
            assert_eq!(Some(s.objective), want, "tour {tour:?}");
            // Each route, re-evaluated here, costs what the split says.
            for r in &s.routes {
                let tasks: Vec<usize> = r.visits.iter().map(|v| v.task).collect();
                let dirs = r
                    .visits
                    .iter()
                    .enumerate()
                    .map(|(m, v)| u32::from(v.dir == arcwright::model::Dir::Backward) << m)
                    .sum();
                let mut tips = vec![0; tasks.len()];
                for t in &r.tips {
                    assert!(t.after >= 1);
                    tips[t.after - 1] = t.site + 1;
                }
                assert_eq!(
                    route(w, r.truck_type, &tasks, dirs, &tips),
                    Some((r.cost, r.time))
                );
                assert!(r.feasible(&tables));
                seen.types[r.truck_type] += 1;
                seen.tips_between += r.tips.iter().filter(|t| t.after < tasks.len()).count();
            }
            let served: usize = s.routes.iter().map(|r| r.visits.len()).sum();
            assert_eq!(served, tour.len());
            // The crate's independent checker accepts the plan (it serves
            // every task of these instances, as the tours are complete).
            let plan = arcwright::fleet::FleetPlan::new(s.routes.clone());
            if let Err(v) = arcwright::check::fleet::check_fleet_plan(&w.inst, &plan) {
                panic!("checker rejects the split of {tour:?}: {v:?}");
            }
        }
    }
}

#[test]
fn split_equals_enumeration_on_tiny_worlds() {
    let mut g = Lcg(99);
    let mut seen = Seen::default();
    for seed in 1..=6u64 {
        for variant in 0..16u64 {
            let tasks = 4 + (seed as usize + variant as usize) % 3;
            let w = world(seed * 31 + variant, tasks, variant);
            let n = w.inst.tasks().len();
            let mut tour: Vec<usize> = (0..n).collect();
            for i in (1..n).rev() {
                tour.swap(i, g.next(i as u64 + 1) as usize);
            }
            check_against_enumeration(&w, &tour, &mut seen);
        }
    }
    eprintln!("{seen:?}");
    assert!(seen.feasible >= 60 && seen.tips_between > 10, "{seen:?}");
    assert!(seen.types.iter().all(|&t| t > 10), "{seen:?}");
}

#[test]
fn split_equals_enumeration_with_seven_streets() {
    for variant in [0u64, 3, 6, 9] {
        let w = world(7 + variant, 7, variant);
        let tour: Vec<usize> = (0..7).rev().collect();
        check_against_enumeration(&w, &tour, &mut Seen::default());
    }
}

/// All orders of `0..n` (Heap's algorithm).
fn permutations(n: usize) -> Vec<Vec<usize>> {
    let mut a: Vec<usize> = (0..n).collect();
    let mut out = vec![a.clone()];
    let mut c = vec![0; n];
    let mut i = 0;
    while i < n {
        if c[i] < i {
            if i % 2 == 0 {
                a.swap(0, i);
            } else {
                a.swap(c[i], i);
            }
            out.push(a.clone());
            c[i] += 1;
            i = 0;
        } else {
            c[i] = 0;
            i += 1;
        }
    }
    out
}

/// The solver reaches the optimum over all plans, enumerated here: every
/// plan's routes, put one after the other, are a split of some order, so the
/// least objective over all orders of the enumeration above is the optimum.
#[test]
fn solver_reaches_the_enumerated_optimum() {
    for (seed, variant) in [(3u64, 0u64), (5, 1), (8, 2), (11, 5), (13, 8), (21, 12)] {
        let w = world(seed, 5, variant);
        let best = permutations(5)
            .iter()
            .filter_map(|p| enumerate(&w, p))
            .min()
            .expect("some plan");
        let sol = arcwright::fleet::FleetSolver::new(&w.inst)
            .max_iterations(30)
            .moves(300)
            .solve()
            .unwrap();
        assert!(arcwright::check::fleet::check_fleet_plan(&w.inst, &sol.plan).is_ok());
        assert_eq!(sol.objective, best, "seed {seed} variant {variant}");
        assert!(sol.lower_bound.value <= sol.cost);
    }
}

/// The fleet bound (with the trip bound) is never above the optimum over
/// all plans, enumerated here as in the test above, on tiny worlds with
/// tipping, two yards and two truck types (least cost: the optimum
/// objective is the optimum cost).
#[test]
fn fleet_bound_is_never_above_the_enumerated_optimum() {
    use arcwright::fleet::bound::{fleet_bound, trip_bound};
    let mut raised = 0;
    for (seed, variant) in [
        (2u64, 0u64),
        (4, 1),
        (6, 2),
        (9, 3),
        (12, 4),
        (17, 5),
        (23, 6),
        (31, 7),
    ] {
        let w = world(seed, 5, variant);
        assert_eq!(w.weight, 0);
        let Some(best) = permutations(5)
            .iter()
            .filter_map(|p| enumerate(&w, p))
            .min()
        else {
            continue;
        };
        let t = Tables::new(&w.inst).unwrap();
        let lb = fleet_bound(&w.inst, &t);
        assert!(
            lb.value <= best,
            "seed {seed} variant {variant}: {lb:?} > {best}"
        );
        let trips = trip_bound(&w.inst, &t).expect("dump sites");
        assert!(
            trips <= best,
            "seed {seed} variant {variant}: {trips} > {best}"
        );
        raised += usize::from(lb.by == arcwright::fleet::bound::TRIPS);
    }
    eprintln!("the trip bound was the base of {raised} of 8 bounds");
}

mod properties {
    use super::*;
    use arcwright::check::fleet::check_fleet_plan;
    use arcwright::fleet::{FleetPlan, FleetRoute, FleetSolver};
    use proptest::prelude::*;

    /// The route without its tip number `i`, if it still evaluates.
    fn without_tip(w: &World, t: &Tables, r: &FleetRoute, i: usize) -> Option<FleetRoute> {
        let mut tips = r.tips.clone();
        tips.remove(i);
        FleetRoute::new(&w.inst, t, r.truck_type, r.visits.clone(), tips).ok()
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

        /// Every split passes the checker and costs at least the fleet
        /// bound, every trip is within its type's load limit, and no tip can be dropped to make a feasible route
        /// cheaper (under balancing: cheaper and within the longest shift).
        #[test]
        fn splits_are_checked_bounded_loaded_within_limits_and_tip_no_more_than_pays(
            seed in 0u64..10_000,
            variant in 0u64..16,
            tasks in 3usize..=7,
            shuffle in 0u64..10_000,
        ) {
            let w = world(seed, tasks, variant);
            let t = Tables::new(&w.inst).unwrap();
            let n = w.inst.tasks().len();
            let mut g = Lcg(shuffle);
            let mut tour: Vec<usize> = (0..n).collect();
            for i in (1..n).rev() {
                tour.swap(i, g.next(i as u64 + 1) as usize);
            }
            let Ok(s) = split(&w.inst, &t, &tour) else { return Ok(()) };
            let plan = FleetPlan::new(s.routes.clone());
            prop_assert!(check_fleet_plan(&w.inst, &plan).is_ok());
            // The bound is never above a plan the checker accepts.
            let lb = arcwright::fleet::bound::fleet_bound(&w.inst, &t);
            prop_assert!(lb.value <= plan.cost, "{:?} > {}", lb, plan.cost);
            for r in &plan.routes {
                let cap = w.types[r.truck_type].capacity;
                prop_assert!(r.trip_loads.iter().all(|&l| l <= cap));
                for i in 0..r.tips.len() {
                    if let Some(x) = without_tip(&w, &t, r, i) {
                        if x.feasible(&t) {
                            // The split's route is the cheapest of its piece and
                            // type among routes no longer than the longest shift
                            // it allowed; so a cheaper one is longer than the plan's
                            // longest shift (only possible under balancing).
                            prop_assert!(
                                x.cost >= r.cost || (w.weight > 0 && x.time > s.longest),
                                "dropping tip {} of {:?} saves {}", i, r.tips, r.cost - x.cost
                            );
                        }
                    }
                }
            }
        }

        /// Every plan the solver returns passes the checker, keeps every
        /// trip within its type's load limit, and costs at least the bound.
        #[test]
        fn solver_plans_pass_the_checker(seed in 0u64..10_000, variant in 0u64..16, workers in 1usize..=2) {
            let w = world(seed, 5 + (seed % 3) as usize, variant);
            let sol = FleetSolver::new(&w.inst).seed(seed).workers(workers).max_iterations(10).moves(20).solve();
            if let Ok(sol) = sol {
                prop_assert!(check_fleet_plan(&w.inst, &sol.plan).is_ok());
                for r in &sol.plan.routes {
                    let cap = w.types[r.truck_type].capacity;
                    prop_assert!(r.trip_loads.iter().all(|&l| l <= cap));
                }
                prop_assert_eq!(sol.objective, sol.plan.objective(&w.inst));
                prop_assert!(sol.lower_bound.value <= sol.cost);
            }
        }
    }
}

/// Balancing trades cost for a shorter longest shift, never the other way:
/// for the same order, the split under `cost + 2 × longest` costs at least
/// the least-cost split and its longest shift is at most as long (both
/// splits are exact, so `c_w + 2 L_w <= c_0 + 2 L_0` and `c_0 <= c_w`).
#[test]
fn balancing_shortens_the_longest_shift_at_a_cost() {
    let mut shorter = 0;
    for seed in 0..40u64 {
        let plain = world(seed, 7, 2);
        let balanced = world(seed, 7, 2 | 8);
        assert_eq!(plain.inst.network(), balanced.inst.network());
        let tour: Vec<usize> = (0..plain.inst.tasks().len()).collect();
        let a = split(&plain.inst, &Tables::new(&plain.inst).unwrap(), &tour);
        let b = split(&balanced.inst, &Tables::new(&balanced.inst).unwrap(), &tour);
        let (Ok(a), Ok(b)) = (a, b) else { continue };
        assert!(b.cost >= a.cost && b.longest <= a.longest, "seed {seed}");
        assert_eq!(b.objective, b.cost + 2 * b.longest);
        shorter += usize::from(b.longest < a.longest);
    }
    assert!(shorter > 0, "balancing never changed a plan");
}

/// The solver with two yards, two truck types and tipping reaches the
/// enumerated optimum on worlds of six streets too (all 720 orders
/// enumerated).
#[test]
fn solver_reaches_the_enumerated_optimum_with_six_streets() {
    for (seed, tasks, variant) in [(4u64, 6usize, 0u64), (10, 6, 3)] {
        let w = world(seed, tasks, variant);
        let best = permutations(tasks)
            .iter()
            .filter_map(|p| enumerate(&w, p))
            .min()
            .expect("some plan");
        let sol = arcwright::fleet::FleetSolver::new(&w.inst)
            .max_iterations(30)
            .moves(300)
            .solve()
            .unwrap();
        assert!(arcwright::check::fleet::check_fleet_plan(&w.inst, &sol.plan).is_ok());
        assert_eq!(
            sol.objective, best,
            "seed {seed} tasks {tasks} variant {variant}"
        );
    }
}

/// With an iteration limit the result depends only on the seed and the
/// worker count (run twice, same plan).
#[test]
fn same_seed_same_plan() {
    let w = world(5, 7, 1);
    let run = |workers| {
        arcwright::fleet::FleetSolver::new(&w.inst)
            .seed(4)
            .workers(workers)
            .max_iterations(20)
            .moves(40)
            .solve()
            .unwrap()
            .plan
    };
    let a = run(1);
    assert_eq!(a, run(1));
    assert_eq!(run(2), run(2));
}

/// A stop flag set before the search still gives a plan (at least one start
/// is always split), checked; progress reports come in phase order and the
/// run says it was stopped early.
#[test]
fn stop_flag_set_before_the_search_still_gives_a_checked_plan() {
    use std::sync::atomic::AtomicBool;
    use std::sync::{Arc, Mutex};
    let w = world(8, 6, 2);
    let phases = Mutex::new(Vec::new());
    let sol = arcwright::fleet::FleetSolver::new(&w.inst)
        .max_iterations(1_000_000)
        .moves(u64::MAX)
        .stop_flag(Arc::new(AtomicBool::new(true)))
        .on_progress(|p| phases.lock().unwrap().push(p.phase))
        .solve()
        .unwrap();
    assert!(sol.stopped_early);
    assert_eq!(sol.rounds, 0);
    assert!(arcwright::check::fleet::check_fleet_plan(&w.inst, &sol.plan).is_ok());
    let phases = phases.into_inner().unwrap();
    use arcwright::Phase;
    let first = |p: Phase| phases.iter().position(|&x| x == p).expect("reported");
    assert!(first(Phase::Distances) < first(Phase::Bound));
    assert!(first(Phase::Bound) < first(Phase::Construction));
    assert!(first(Phase::Construction) < first(Phase::Search));
}
