//! Ruin and recreate with simulated annealing: the search inside a district.
//!
//! After the slack induction by string removals of Christiaens & Vanden
//! Berghe (2020, Transportation Science 54), adapted to arcs (a task is
//! inserted in whichever allowed direction is cheaper):
//!
//! - **Ruin.** A random seed task and its nearest tasks in turn; for each of
//!   them whose route is not yet ruined, a string of consecutive tasks around
//!   it is removed from its route (or, half of the time, a string with a
//!   kept stretch inside it: the "split string"), until a random number of
//!   routes (about `4 c̄ / (1 + L) − 1` at most, with `c̄` removed tasks on
//!   average and strings of at most `L` tasks) have been ruined.
//! - **Recreate.** The removed tasks, in a random order, by demand, or by
//!   distance from the yard, each go to its cheapest feasible position
//!   (capacity, shift limit, allowed directions) among the positions next
//!   to one of its nearest tasks and at both ends of their routes (SISR
//!   looks at every position of every route; the restriction to nearby
//!   positions is ours, so that a move costs the same in a large district
//!   as in a small one), each position skipped with a small probability
//!   ("blinks");
//!   a new route is opened only when no position fits and the fleet bound
//!   allows it.
//! - **Acceptance.** Simulated annealing: a plan costing up to
//!   `−T ln U` more than the current one is accepted (`U` uniform), with the
//!   temperature `T` lowered geometrically over the run. The best plan seen
//!   is kept.
//!
//! Every route stays feasible at every step, so the best plan is feasible.
//! Parameter values are the published ones (`c̄ = 10`, `L = 10`, blink rate
//! 0.01, split depth 0.01; from memory, and the split depth used in our own
//! reading: the chance of keeping one more street inside a split string)
//! except the temperatures, which are set per district from its streets'
//! costs (ours).

use rand::seq::SliceRandom;
use rand::Rng;
use rand_chacha::ChaCha12Rng;

use crate::construct::arcs::{ArcMatrix, BIG};

/// Average number of tasks removed per ruin (`c̄`).
const AVG_REMOVED: f64 = 10.0;
/// Longest removed string (`L`).
const MAX_STRING: usize = 10;
/// Probability of skipping an insertion position.
const BLINK: f64 = 0.01;
/// Probability of the split-string removal.
const SPLIT_RATE: f64 = 0.5;
/// Probability of growing the kept stretch of a split string by one more.
const SPLIT_DEPTH: f64 = 0.01;
/// Limits are checked every this many iterations.
const CHECK_EVERY: u64 = 64;

/// A plan of a district with each route's cost, time and load.
#[derive(Clone)]
struct State {
    routes: Vec<Vec<u32>>,
    cost: Vec<i64>,
    time: Vec<i64>,
    load: Vec<i64>,
    total: i64,
    /// Route of each task (`u32::MAX` while removed).
    at: Vec<u32>,
    /// Position of each task in its route.
    pos: Vec<u32>,
}

impl State {
    fn new(m: &ArcMatrix, routes: &[Vec<u32>]) -> State {
        let mut s = State {
            routes: routes.to_vec(),
            cost: Vec::new(),
            time: Vec::new(),
            load: Vec::new(),
            total: 0,
            at: vec![u32::MAX; m.n],
            pos: vec![0; m.n],
        };
        for r in 0..s.routes.len() {
            let (c, t, l) = m.route_eval(&s.routes[r]);
            s.cost.push(c);
            s.time.push(t);
            s.load.push(l);
            s.total += c;
            for (i, &a) in s.routes[r].iter().enumerate() {
                s.at[ArcMatrix::task(a)] = r as u32;
                s.pos[ArcMatrix::task(a)] = i as u32;
            }
        }
        s
    }

    /// Re-evaluates route `r` after a change and updates the total and the
    /// positions.
    fn refresh(&mut self, m: &ArcMatrix, r: usize) {
        for (i, &a) in self.routes[r].iter().enumerate() {
            self.pos[ArcMatrix::task(a)] = i as u32;
        }
        let (c, t, l) = m.route_eval(&self.routes[r]);
        self.total += c - self.cost[r];
        self.cost[r] = c;
        self.time[r] = t;
        self.load[r] = l;
    }
}

/// The annealing schedule of one run: from `hot` to `cold` (geometric).
#[derive(Clone, Copy, Debug)]
pub(super) struct Temperatures {
    pub hot: f64,
    pub cold: f64,
}

/// Temperature scale of a district: the mean service cost of its tasks (at
/// least 1), the typical size of a single move's cost change.
pub(super) fn temperature_scale(m: &ArcMatrix) -> f64 {
    let n = m.n.max(1);
    let sum: i64 = (0..m.n).map(|t| m.serve_cost[2 * t]).sum();
    (sum as f64 / n as f64).max(1.0)
}

/// What a run found.
pub(super) struct Outcome {
    /// The best plan if strictly cheaper than the start (empty routes left
    /// out), with its cost.
    pub better: Option<(i64, Vec<Vec<u32>>)>,
    /// Iterations made.
    pub iterations: u64,
}

/// Runs up to `iterations` ruin-and-recreate moves on `routes` (task arcs of
/// `m`, all feasible), `near[t]` listing each task's nearest tasks.
/// `stop` is asked every few iterations. Returns a plan only when strictly
/// cheaper, with feasible routes only, and never more routes than
/// `m.max_routes` when the fleet is bounded.
pub(super) fn anneal(
    m: &ArcMatrix,
    near: &[Vec<u32>],
    routes: &[Vec<u32>],
    iterations: u64,
    temps: Temperatures,
    rng: &mut ChaCha12Rng,
    stop: &dyn Fn() -> bool,
) -> Outcome {
    let mut cur = State::new(m, routes);
    let start = cur.total;
    let mut best_total = start;
    let mut best: Option<Vec<Vec<u32>>> = None;
    let depot_gap: Vec<i64> = (0..m.n)
        .map(|t| {
            let (f, b) = (2 * t as u32, 2 * t as u32 + 1);
            m.d(m.depot, f).min(m.d(m.depot, b))
        })
        .collect();
    let mut removed: Vec<usize> = Vec::new();
    let mut ruined: Vec<u32> = Vec::new();
    let mut done = 0;
    let ratio = (temps.cold / temps.hot).max(1e-9);
    while done < iterations {
        if done % CHECK_EVERY == 0 && stop() {
            break;
        }
        let temp = temps.hot * ratio.powf(done as f64 / iterations.max(1) as f64);
        done += 1;
        let mut cand = cur.clone();
        removed.clear();
        ruin(m, near, &mut cand, &mut removed, &mut ruined, rng);
        if removed.is_empty() {
            continue;
        }
        order(&mut removed, &depot_gap, m, rng);
        if !recreate(m, near, &mut cand, &removed, &ruined, rng) {
            continue;
        }
        let threshold = -temp * rng.random::<f64>().max(1e-300).ln();
        if (cand.total as f64) < cur.total as f64 + threshold {
            cur = cand;
            if cur.total < best_total {
                best_total = cur.total;
                best = Some(cur.routes.clone());
            }
        }
    }
    Outcome {
        better: best.map(|b| {
            (
                best_total,
                b.into_iter().filter(|r| !r.is_empty()).collect(),
            )
        }),
        iterations: done,
    }
}

/// Removes strings of tasks around a random seed task (see the module docs);
/// the removed tasks go to `removed`.
fn ruin(
    m: &ArcMatrix,
    near: &[Vec<u32>],
    s: &mut State,
    removed: &mut Vec<usize>,
    ruined: &mut Vec<u32>,
    rng: &mut ChaCha12Rng,
) {
    let used = s.routes.iter().filter(|r| !r.is_empty()).count().max(1);
    let avg = s.routes.iter().map(Vec::len).sum::<usize>() as f64 / used as f64;
    let l_max = (MAX_STRING as f64).min(avg).max(1.0);
    let k_max = (4.0 * AVG_REMOVED / (1.0 + l_max) - 1.0).max(1.0);
    let strings = (rng.random_range(1.0..k_max + 1.0) as usize).max(1);
    let seed = rng.random_range(0..m.n);
    ruined.clear();
    for &c in std::iter::once(&(seed as u32)).chain(near[seed].iter()) {
        if ruined.len() >= strings {
            break;
        }
        let r = s.at[c as usize];
        if r == u32::MAX || ruined.contains(&r) {
            continue;
        }
        ruined.push(r);
        let route = &s.routes[r as usize];
        let pos = route
            .iter()
            .position(|&a| ArcMatrix::task(a) == c as usize)
            .expect("task in its route");
        let cap = (l_max as usize).min(route.len()).max(1);
        let len = rng.random_range(1..=cap);
        let (from, keep) = if rng.random_bool(SPLIT_RATE) && len < route.len() {
            // A window of `len + kept` tasks around `pos`; `kept` of them
            // (a stretch inside the window) stay.
            let mut kept = 1;
            while len + kept < route.len() && rng.random_bool(SPLIT_DEPTH) {
                kept += 1;
            }
            let window = len + kept;
            let lo = pos.saturating_sub(window - 1);
            let hi = pos.min(route.len() - window);
            let from = rng.random_range(lo..=hi);
            let keep_at = from + rng.random_range(0..=len);
            (from, Some((keep_at, kept, window)))
        } else {
            let lo = pos.saturating_sub(len - 1);
            let hi = pos.min(route.len() - len);
            (rng.random_range(lo..=hi), None)
        };
        let route = &mut s.routes[r as usize];
        let (window, kept_range) = match keep {
            Some((keep_at, kept, window)) => (window, keep_at..keep_at + kept),
            None => (len, 0..0),
        };
        let mut out = Vec::with_capacity(route.len());
        for (i, &a) in route.iter().enumerate() {
            if i >= from && i < from + window && !kept_range.contains(&i) {
                let t = ArcMatrix::task(a);
                removed.push(t);
                s.at[t] = u32::MAX;
            } else {
                out.push(a);
            }
        }
        *route = out;
        s.refresh(m, r as usize);
    }
}

/// Orders the removed tasks: random (weight 4), largest demand first (4),
/// farthest from the yard first (2), nearest first (1).
fn order(removed: &mut [usize], depot_gap: &[i64], m: &ArcMatrix, rng: &mut ChaCha12Rng) {
    removed.shuffle(rng);
    match rng.random_range(0..11) {
        0..4 => {}
        4..8 => removed.sort_by_key(|&t| std::cmp::Reverse(m.demand[2 * t])),
        8..10 => removed.sort_by_key(|&t| std::cmp::Reverse(depot_gap[t])),
        _ => removed.sort_by_key(|&t| depot_gap[t]),
    }
}

/// Draws the number of positions before the next blink (geometric with
/// rate [`BLINK`]).
fn next_blink(rng: &mut ChaCha12Rng) -> usize {
    let u: f64 = rng.random::<f64>().max(1e-300);
    (u.ln() / (1.0 - BLINK).ln()) as usize
}

/// Inserts each removed task at its cheapest feasible position next to one
/// of its nearest tasks or at the ends of their routes (anywhere in the
/// ruined routes when all its nearest tasks are out); `false` if one fits
/// nowhere (the candidate plan is then dropped).
fn recreate(
    m: &ArcMatrix,
    near: &[Vec<u32>],
    s: &mut State,
    removed: &[usize],
    ruined: &[u32],
    rng: &mut ChaCha12Rng,
) -> bool {
    let mut blink = next_blink(rng);
    let mut look: Vec<u32> = Vec::new();
    let mut spots: Vec<(u32, u32)> = Vec::new();
    for &t in removed {
        let arcs = [2 * t as u32, 2 * t as u32 + 1];
        let demand = m.demand[2 * t];
        look.clear();
        // Positions: next to each nearest task, and both ends of its route
        // (the legs from and to the yard).
        spots.clear();
        for &v in &near[t] {
            let r = s.at[v as usize];
            if r == u32::MAX {
                continue;
            }
            let p = s.pos[v as usize];
            spots.push((r, p));
            spots.push((r, p + 1));
            if !look.contains(&r) {
                look.push(r);
                spots.push((r, 0));
                spots.push((r, s.routes[r as usize].len() as u32));
            }
        }
        if spots.is_empty() {
            // Every nearest task is out too: any place in the ruined routes.
            for &r in ruined {
                spots.extend((0..=s.routes[r as usize].len() as u32).map(|i| (r, i)));
            }
        }
        // (delta cost, route, position, arc)
        let mut best: Option<(i64, usize, usize, u32)> = None;
        for &(r, i) in &spots {
            let (r, i) = (r as usize, i as usize);
            if s.load[r] + demand > m.capacity {
                continue;
            }
            if blink == 0 {
                blink = next_blink(rng);
                continue;
            }
            blink -= 1;
            let route = &s.routes[r];
            let prev = if i == 0 { m.depot } else { route[i - 1] };
            let next = if i < route.len() { route[i] } else { m.depot };
            let base = m.d(prev, next);
            for &a in &arcs {
                if !m.allowed[a as usize] {
                    continue;
                }
                let dc = m.d(prev, a) + m.serve_cost[a as usize] + m.d(a, next) - base;
                if dc >= BIG || best.is_some_and(|b| dc >= b.0) {
                    continue;
                }
                if let Some(limit) = m.shift {
                    let dt =
                        m.t(prev, a) + m.serve_time[a as usize] + m.t(a, next) - m.t(prev, next);
                    if s.time[r] + dt > limit {
                        continue;
                    }
                }
                best = Some((dc, r, i, a));
            }
        }
        let (r, i, a) = match best {
            Some((_, r, i, a)) => (r, i, a),
            None => match open_route(m, s, t) {
                Some(x) => x,
                None => return false,
            },
        };
        s.routes[r].insert(i, a);
        s.at[t] = r as u32;
        s.refresh(m, r);
    }
    true
}

/// A route of its own for task `t` (in an empty slot or a new one), in its
/// cheaper feasible direction: (route, position, arc); `None` when the
/// fleet bound is reached or the task fits no route alone.
fn open_route(m: &ArcMatrix, s: &mut State, t: usize) -> Option<(usize, usize, u32)> {
    let used = s.routes.iter().filter(|r| !r.is_empty()).count();
    if m.max_routes.is_some_and(|k| used >= k) {
        return None;
    }
    let a = [2 * t as u32, 2 * t as u32 + 1]
        .into_iter()
        .filter(|&a| m.allowed[a as usize] && m.route_feasible(&[a]))
        .min_by_key(|&a| m.route_eval(&[a]).0)?;
    let r = match s.routes.iter().position(Vec::is_empty) {
        Some(r) => r,
        None => {
            s.routes.push(Vec::new());
            s.cost.push(0);
            s.time.push(0);
            s.load.push(0);
            s.routes.len() - 1
        }
    };
    Some((r, 0, a))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::demo::{town, TownSpec};
    use crate::improve::local_search::neighbour_lists;
    use crate::paths::Distances;
    use rand::SeedableRng;

    /// From one route per street, the annealing returns a strictly cheaper
    /// plan whose routes are feasible, serve every street once and cost
    /// what it says (re-evaluated here from the matrix).
    #[test]
    fn cheaper_feasible_and_complete_from_a_poor_start() {
        let inst = town(&TownSpec::new(11, 4)).expect("town");
        let dist = Distances::new(&inst).expect("distances");
        let m = ArcMatrix::new(&inst, &dist).expect("matrix");
        let near = neighbour_lists(&m, 20);
        let routes: Vec<Vec<u32>> = (0..m.n)
            .map(|t| {
                let a = if m.allowed[2 * t] { 2 * t } else { 2 * t + 1 };
                vec![a as u32]
            })
            .collect();
        assert!(routes.iter().all(|r| m.route_feasible(r)));
        let start: i64 = routes.iter().map(|r| m.route_eval(r).0).sum();
        let t = temperature_scale(&m);
        let temps = Temperatures {
            hot: t,
            cold: t / 100.0,
        };
        let run = |seed| {
            let mut rng = ChaCha12Rng::seed_from_u64(seed);
            anneal(&m, &near, &routes, 3000, temps, &mut rng, &|| false)
        };
        let out = run(3);
        assert_eq!(out.iterations, 3000);
        let (cost, better) = out
            .better
            .expect("an improvement over one route per street");
        assert!(cost < start, "{cost} vs {start}");
        assert_eq!(better.iter().map(|r| m.route_eval(r).0).sum::<i64>(), cost);
        assert!(better.iter().all(|r| m.route_feasible(r)));
        let mut tasks: Vec<usize> = better
            .iter()
            .flatten()
            .map(|&a| ArcMatrix::task(a))
            .collect();
        tasks.sort_unstable();
        assert_eq!(tasks, (0..m.n).collect::<Vec<_>>());
        // Same seed, same plan.
        assert_eq!(run(3).better.expect("plan").1, better);
    }
}
