//! Path-Scanning (Golden, DeArmon & Baker 1983).
//!
//! Builds one route at a time: from the end of the route so far, go to the
//! nearest unserved task (in an allowed direction) that still fits the
//! truck's remaining capacity and, with a shift limit, still allows the
//! return to the depot within the shift; when none fits, drive back to the
//! depot and start a new route. Ties among equally near tasks are broken by
//! one of the five classic rules ([`Rule`]) or at random.
//! Every route built is feasible by construction.

use std::collections::BTreeMap;

use rand::Rng;

use super::arcs::{ArcMatrix, BIG};

/// Tie-breaking rule among the nearest feasible tasks.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Rule {
    /// Maximise the deadhead from the task's end back to the depot.
    FarFromDepot,
    /// Minimise the deadhead from the task's end back to the depot.
    NearDepot,
    /// Maximise demand / service cost.
    MaxYield,
    /// Minimise demand / service cost.
    MinYield,
    /// [`Rule::FarFromDepot`] while the truck is less than half full, else
    /// [`Rule::NearDepot`].
    ByLoad,
    /// Uniformly random among the tied tasks (the randomized variant).
    Random,
}

/// The five deterministic rules.
pub const RULES: [Rule; 5] = [
    Rule::FarFromDepot,
    Rule::NearDepot,
    Rule::MaxYield,
    Rule::MinYield,
    Rule::ByLoad,
];

/// The arc taken among the nearest `ties` (not empty): a random one under
/// [`Rule::Random`] (the first without a generator), else the best by `rule`
/// (the first on ties).
fn choose<R: Rng>(m: &ArcMatrix, rule: Rule, rng: Option<&mut R>, load: i64, ties: &[u32]) -> u32 {
    match (rule, rng) {
        (Rule::Random, Some(r)) => ties[r.random_range(0..ties.len())],
        (Rule::Random, None) => ties[0],
        _ => {
            let mut b = ties[0];
            for &x in &ties[1..] {
                if better(m, rule, load, x, b) {
                    b = x;
                }
            }
            b
        }
    }
}

/// `a` better than `b` under `rule` (strict), for arcs `a`, `b`.
fn better(m: &ArcMatrix, rule: Rule, load: i64, a: u32, b: u32) -> bool {
    let back = |x: u32| m.d(x, m.depot);
    // demand/cost compared by cross-multiplication; cost 0 counts as infinite yield.
    let yield_cmp = |x: u32, y: u32| {
        let (dx, cx) = (m.demand[x as usize], m.serve_cost[x as usize]);
        let (dy, cy) = (m.demand[y as usize], m.serve_cost[y as usize]);
        (dx as i128 * cy.max(0) as i128).cmp(&(dy as i128 * cx.max(0) as i128))
    };
    match rule {
        Rule::FarFromDepot => back(a) > back(b),
        Rule::NearDepot => back(a) < back(b),
        Rule::MaxYield => yield_cmp(a, b).is_gt(),
        Rule::MinYield => yield_cmp(a, b).is_lt(),
        Rule::ByLoad => {
            if 2 * load < m.capacity {
                back(a) > back(b)
            } else {
                back(a) < back(b)
            }
        }
        Rule::Random => false,
    }
}

/// Runs Path-Scanning over the given tasks (indices into the instance's
/// tasks) and returns routes as task arcs. With `rng` and [`Rule::Random`]
/// ties are broken at random; with `alpha > 0` (randomized variant) a task
/// whose distance is within `alpha` percent of the nearest also counts as
/// tied. `capacity` and the shift limit are those of the matrix unless
/// `unlimited` (then a single giant route, used by Merge-Split to order tasks).
pub fn path_scan<R: Rng>(
    m: &ArcMatrix,
    tasks: &[usize],
    rule: Rule,
    mut rng: Option<&mut R>,
    alpha: u32,
    unlimited: bool,
) -> Vec<Vec<u32>> {
    let mut left: Vec<usize> = tasks.to_vec();
    let mut routes = Vec::new();
    let capacity = if unlimited { i64::MAX } else { m.capacity };
    let shift = if unlimited { None } else { m.shift };
    let mut ties: Vec<u32> = Vec::new();
    while !left.is_empty() {
        let mut route: Vec<u32> = Vec::new();
        let (mut load, mut time) = (0i64, 0i64);
        let mut at = m.depot;
        loop {
            let mut best_d = i64::MAX;
            ties.clear();
            for &t in &left {
                if load + m.demand[2 * t] > capacity {
                    continue;
                }
                for a in [2 * t as u32, 2 * t as u32 + 1] {
                    if !m.allowed[a as usize] {
                        continue;
                    }
                    let d = m.d(at, a);
                    if d >= BIG {
                        continue;
                    }
                    if let Some(s) = shift {
                        let fin = time + m.t(at, a) + m.serve_time[a as usize] + m.t(a, m.depot);
                        if fin > s {
                            continue;
                        }
                    }
                    let tol = if alpha > 0 {
                        best_d.saturating_mul(100 + alpha as i64) / 100
                    } else {
                        best_d
                    };
                    if d < best_d {
                        best_d = d;
                        let tol2 = if alpha > 0 {
                            d * (100 + alpha as i64) / 100
                        } else {
                            d
                        };
                        ties.retain(|&x| m.d(at, x) <= tol2);
                        ties.push(a);
                    } else if d <= tol {
                        ties.push(a);
                    }
                }
            }
            if ties.is_empty() {
                break;
            }
            let pick = choose(m, rule, rng.as_deref_mut(), load, &ties);
            time += m.t(at, pick) + m.serve_time[pick as usize];
            load += m.demand[pick as usize];
            at = pick;
            route.push(pick);
            let task = ArcMatrix::task(pick);
            let pos = left.iter().position(|&t| t == task).expect("task left");
            left.swap_remove(pos);
        }
        if route.is_empty() {
            // Cannot happen for a validated instance (every task fits alone);
            // stop rather than loop forever.
            break;
        }
        routes.push(route);
    }
    routes
}

/// Path-Scanning over all tasks with candidate lists (`cand[t]`: tasks near
/// task `t`, as from `candidates::candidate_lists`): from the end of the
/// route so far, only the unserved candidates of the last task served are
/// examined; the whole set of unserved tasks is looked at only when a route
/// starts at the depot or no candidate fits. Ties are broken as in
/// [`path_scan`] (among the candidates examined). Every route is feasible.
///
/// When no candidate fits and the legs are answered on demand, the nearest
/// feasible unserved task is found by one search from the route's end that
/// stops as soon as it is known ([`ArcMatrix::nearest_arcs`]), not by a
/// full search of the network; the ties are the same arcs, in the same
/// order, as a scan of all unserved tasks would give. The search is skipped
/// when no unserved task fits the truck's remaining capacity.
///
/// `give_up` is asked between tasks; when it answers true the construction
/// stops and returns `None` (used to stop the remaining rules once a plan
/// exists and the deadline has passed).
///
/// **Cost.** `O(n c + R n)` for `n` tasks, lists of `c` and `R` route starts
/// and exhausted neighbourhoods, plus one bounded search per exhausted
/// neighbourhood, instead of `O(n^2)`: a few seconds for 20,000 streets.
/// The plans differ from [`path_scan`]'s, which the solver keeps for
/// instances up to `LISTED_FROM` tasks.
pub fn path_scan_listed<R: Rng>(
    m: &ArcMatrix,
    cand: &[Vec<u32>],
    rule: Rule,
    mut rng: Option<&mut R>,
    give_up: &dyn Fn() -> bool,
) -> Option<Vec<Vec<u32>>> {
    let n = m.n;
    // Unserved tasks with O(1) removal.
    let mut left: Vec<usize> = (0..n).collect();
    let mut pos: Vec<usize> = (0..n).collect();
    let mut served = vec![false; n];
    // Demands of the unserved tasks (value -> count), for the capacity test.
    let mut demands: BTreeMap<i64, usize> = BTreeMap::new();
    for t in 0..n {
        *demands.entry(m.demand[2 * t]).or_default() += 1;
    }
    let mut routes = Vec::new();
    let mut ties: Vec<u32> = Vec::new();
    while !left.is_empty() {
        let mut route: Vec<u32> = Vec::new();
        let (mut load, mut time) = (0i64, 0i64);
        let mut at = m.depot;
        loop {
            if give_up() {
                return None;
            }
            ties.clear();
            if at != m.depot {
                let near = cand[ArcMatrix::task(at)].iter().map(|&t| t as usize);
                nearest(m, near.filter(|&t| !served[t]), at, load, time, &mut ties);
            }
            if ties.is_empty() {
                if m.is_on_demand() && at != m.depot {
                    let fits = demands
                        .first_key_value()
                        .is_some_and(|(&d, _)| load + d <= m.capacity);
                    if fits {
                        let mut ok = |a: u32, _d: i64, lt: i64| {
                            let t = ArcMatrix::task(a);
                            !served[t]
                                && m.allowed[a as usize]
                                && load + m.demand[a as usize] <= m.capacity
                                && m.shift.is_none_or(|s| {
                                    time + lt + m.serve_time[a as usize] + m.t(a, m.depot) <= s
                                })
                        };
                        ties = m.nearest_arcs(at, &mut ok);
                        // The order of a scan of `left`.
                        ties.sort_unstable_by_key(|&a| (pos[ArcMatrix::task(a)], a));
                    }
                } else {
                    nearest(m, left.iter().copied(), at, load, time, &mut ties);
                }
            }
            if ties.is_empty() {
                break;
            }
            let pick = choose(m, rule, rng.as_deref_mut(), load, &ties);
            time += m.t(at, pick) + m.serve_time[pick as usize];
            load += m.demand[pick as usize];
            at = pick;
            route.push(pick);
            let task = ArcMatrix::task(pick);
            served[task] = true;
            let d = m.demand[2 * task];
            match demands.get_mut(&d) {
                Some(c) if *c > 1 => *c -= 1,
                _ => {
                    demands.remove(&d);
                }
            }
            let p = pos[task];
            let last = *left.last().expect("task left");
            left[p] = last;
            pos[last] = p;
            left.pop();
        }
        if route.is_empty() {
            break;
        }
        routes.push(route);
    }
    Some(routes)
}

/// The nearest feasible arcs (all ties) from arc `at` among `tasks`.
fn nearest(
    m: &ArcMatrix,
    tasks: impl Iterator<Item = usize>,
    at: u32,
    load: i64,
    time: i64,
    ties: &mut Vec<u32>,
) {
    nearest_by(m, tasks, |a| (m.d(at, a), m.t(at, a)), load, time, ties)
}

/// [`nearest`] with the legs from the current arc given by `leg` (cost, time).
fn nearest_by(
    m: &ArcMatrix,
    tasks: impl Iterator<Item = usize>,
    leg: impl Fn(u32) -> (i64, i64),
    load: i64,
    time: i64,
    ties: &mut Vec<u32>,
) {
    let mut best_d = i64::MAX;
    for t in tasks {
        if load + m.demand[2 * t] > m.capacity {
            continue;
        }
        for a in [2 * t as u32, 2 * t as u32 + 1] {
            if !m.allowed[a as usize] {
                continue;
            }
            let (d, lt) = leg(a);
            if d >= BIG || d > best_d {
                continue;
            }
            if let Some(s) = m.shift {
                if time + lt + m.serve_time[a as usize] + m.t(a, m.depot) > s {
                    continue;
                }
            }
            if d < best_d {
                best_d = d;
                ties.clear();
            }
            ties.push(a);
        }
    }
}
